"""Shared test helpers: plans used by tests and benchmarks alike (imported by both)."""

from __future__ import annotations

import numpy as np

import growthplan as gp

__all__ = ["economy", "make_plan"]


def economy(n: int, seed: int = 1) -> gp.Economy:
    """A dense random productive economy with n sectors (20-year geometric lives)."""
    rng = np.random.default_rng(seed)
    a = rng.uniform(0, 1, (n, n))
    a *= 0.6 / a.sum(axis=0).max()
    b = rng.uniform(0, 1, (n, n))
    b *= 2.0 / b.sum(axis=0).max()
    names = [f"s{i}" for i in range(n)]
    cap = {s: gp.CapitalSpec(initial_capacity=float(rng.uniform(50, 150)),
                             mean_service_life=20.0) for s in names}
    return gp.Economy(sectors=names, input_coefficients=a, capital_coefficients=b,
                      labour_coefficients=[rng.uniform(0.1, 1.0, n)], capital=cap)


def make_plan(econ: gp.Economy, years: int) -> gp.Plan:
    """A terminal-capacity plan with a labour limit growing 1 % a year."""
    supply = float((np.asarray(econ.labour_coefficients) @ np.full(econ.n, 100.0))[0])
    return gp.Plan(economy=econ, years=range(2030, 2030 + years),
                   labour=gp.LabourSupply(start=supply, growth=0.01),
                   objective=gp.objectives.TerminalCapacity(
                       proportions={s: 1.0 for s in econ.names}))
