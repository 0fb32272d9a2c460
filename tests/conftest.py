"""Shared fixtures, helpers and the hypothesis profiles."""

from __future__ import annotations

import os

os.environ.setdefault("MPLBACKEND", "Agg")  # charts render headless in the tests
import warnings

import numpy as np
import pytest
from hypothesis import HealthCheck, settings

import growthplan as gp

# CI is reproducible: derandomized, no deadline. Locally the same, unless
# HYPOTHESIS_PROFILE=explore asks for fresh random examples.
settings.register_profile("ci", derandomize=True, deadline=None, max_examples=40,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("explore", deadline=None, max_examples=200)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))


def assert_optimal(result: gp.PlanResult) -> gp.PlanResult:
    """The plan solved to optimality and passed its audit."""
    assert result.status is gp.Status.OPTIMAL, (result.status, result.message, result.warnings)
    assert result.ok
    assert result.audit is not None and result.audit.ok, result.audit
    return result


def assert_infeasible(result: gp.PlanResult) -> gp.PlanResult:
    assert result.status is gp.Status.INFEASIBLE, (result.status, result.message)
    assert not result.ok
    return result


def one_sector(a=0.6, b=2.0, life=20.0, c0=100.0, **spec) -> gp.Economy:
    """One sector with geometric retirement (the Harrod–Domar case of the docs)."""
    return gp.Economy(sectors=["goods"], input_coefficients=[[a]], capital_coefficients=[[b]],
                      labour_coefficients=[[0.5]],
                      capital={"goods": gp.CapitalSpec(initial_capacity=c0,
                                                       mean_service_life=life, **spec)})


def random_economy(rng: np.random.Generator, n: int, *, profile="geometric",
                   lead=1, basket=True) -> gp.Economy:
    """A random productive economy with capital (for property tests only)."""
    a = rng.uniform(0, 1, (n, n)) * (rng.uniform(0, 1, (n, n)) < 0.7)
    a *= rng.uniform(0.3, 0.8) / max(a.sum(axis=0).max(), 1e-9)
    b = rng.uniform(0, 1, (n, n)) * (rng.uniform(0, 1, (n, n)) < 0.5)
    b[0] += 0.2  # commodity 0 is always a capital good
    names = [f"s{i}" for i in range(n)]
    capital = {s: gp.CapitalSpec(initial_capacity=float(rng.uniform(50, 150)),
                                 mean_service_life=float(rng.integers(5, 30)),
                                 retirement=profile, lead_time=lead) for s in names}
    return gp.Economy(sectors=names, input_coefficients=a, capital_coefficients=b * 2,
                      labour_coefficients=[rng.uniform(0.1, 1.0, n)], capital=capital,
                      consumption_basket=rng.uniform(0.1, 1.0, n) if basket else None)


@pytest.fixture(autouse=True)
def _quiet_end_effects():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", gp.EndEffectsWarning)
        yield


def pytest_terminal_summary(terminalreporter):
    counts: list[tuple[str, int, str]] = []
    for module, label in (("test_fuzz", "fuzzed bad inputs"),
                          ("test_cli_hostile", "hostile command lines"),
                          ("test_numerics_hostile", "hostile numerics")):
        try:
            cases = __import__(module).CASES if module != "test_numerics_hostile" else \
                {k: v for k, v in __import__(module).HOSTILE.items() if "analysis" not in k}
        except (ImportError, AttributeError):
            continue
        if cases:
            parts = ", ".join(f"{k} {v}" for k, v in sorted(cases.items()))
            counts.append((label, sum(cases.values()), parts))
    try:
        from test_io_hostile import OUTCOMES
    except ImportError:
        OUTCOMES = None
    if OUTCOMES:
        outcomes: dict[str, int] = {}
        for (_, outcome), n in OUTCOMES.items():
            outcomes[outcome] = outcomes.get(outcome, 0) + n
        counts.append(("hostile file inputs", sum(outcomes.values()),
                       ", ".join(f"{k} {v}" for k, v in sorted(outcomes.items()))))
        families: dict[str, int] = {}
        for (family, _), n in OUTCOMES.items():
            families[family] = families.get(family, 0) + n
        terminalreporter.write_line("hostile file inputs by family: " + ", ".join(
            f"{k} {v}" for k, v in sorted(families.items())))
    for label, total, parts in counts:
        terminalreporter.write_line(f"{label}: {total} ({parts})")
    if counts:
        terminalreporter.write_line(
            f"hostile and malformed inputs in all: {sum(c[1] for c in counts)}")
