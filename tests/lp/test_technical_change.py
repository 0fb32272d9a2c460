"""Technical change: coefficients that change year by year (disembodied)."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal, one_sector, random_economy
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.backends.pulp import cbc_solver

T = 6


@pytest.mark.parametrize("r", [-0.05, -0.02, 0.03])
def test_falling_input_coefficient_closed_form(r):
    """One sector, a_t = 0.6 (1 + r)^t, b = 2, geometric δ = 0.05, lead time 1: the surplus
    (1 − a_t) x_t buys capacity 1/b per unit, so C_{t+1} = C_t (1 + (1 − a_t)/b − δ) — the
    Harrod–Domar recursion with a changing input coefficient (derived by hand)."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2030 + T),
                   technical_change=gp.TechnicalChange(input_rate={"goods": r}))
    res = assert_optimal(plan.solve(method="simplex"))
    a_t = 0.6 * (1 + r) ** np.arange(T)
    assert res.objective == pytest.approx(100 * np.prod(1 + (1 - a_t) / 2.0 - 0.05), rel=1e-9)


def test_falling_capital_coefficient_closed_form():
    """Starts of year t embody b_t = 2 (1 − 0.04)^t: C_{t+1} = C_t (1 + 0.4 / b_t − δ)."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2030 + T),
                   technical_change=gp.TechnicalChange(capital_rate={"goods": -0.04}))
    res = assert_optimal(plan.solve(method="simplex"))
    b_t = 2.0 * 0.96 ** np.arange(T)
    assert res.objective == pytest.approx(100 * np.prod(1 + 0.4 / b_t - 0.05), rel=1e-9)


def test_labour_saving_change_lifts_a_binding_labour_limit():
    """Labour binding at 50 person-years with l = 0.5: output is capped at 100 a year; with
    l_t = 0.5 · 0.9^t the cap is 100 / 0.9^t, and the labour used is l_t x_t."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2030 + T),
                   labour=gp.LabourSupply(start=50.0),
                   technical_change=gp.TechnicalChange(labour_rate={"goods": -0.1}))
    res = assert_optimal(plan.solve(method="simplex"))
    l_t = 0.5 * 0.9 ** np.arange(T)
    used = res.labour[("labour", "used")].to_numpy()
    np.testing.assert_allclose(used, l_t * res.output["goods"].to_numpy(), rtol=1e-12)
    assert (res.output["goods"].to_numpy() <= 100 / 0.9 ** np.arange(T) + 1e-7).all()
    flat = assert_optimal(plan.model_copy(update={"technical_change": None}).solve())
    assert res.objective > flat.objective


@settings(max_examples=8)
@given(st.integers(0, 10_000), st.integers(2, 4), st.integers(2, 6))
def test_cbc_agrees_with_technical_change(seed, n, years):
    """The same plans solved by PuLP's bundled CBC: equal objectives; the size estimate
    equals the built matrix."""
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n)
    rates = {s: float(rng.uniform(-0.05, 0.0)) for s in econ.names}
    plan = gp.Plan(economy=econ, years=range(2030, 2030 + years),
                   labour=gp.LabourSupply(start=1e4),
                   technical_change=gp.TechnicalChange(input_rate=rates, capital_rate=rates,
                                                       labour_rate=rates))
    est = plan.estimate_size()
    lp = plan.compile(size_limit=None)
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
    a = plan.solve()
    if not a.ok:
        return
    b = assert_optimal(plan.solve(backend=gp.PulpBackend(cbc_solver())))
    assert b.objective == pytest.approx(a.objective, rel=1e-6, abs=1e-6)


def test_rising_inputs_that_become_unproductive_are_refused():
    with pytest.raises(gp.InvalidInput, match="technical_change.input_rate"):
        gp.Plan(economy=one_sector(), years=range(2030, 2045),
                technical_change=gp.TechnicalChange(input_rate={"goods": 0.05}))


def test_rates_are_fractions_and_sectors_known():
    with pytest.raises(gp.InvalidInput, match="input_rate"):
        gp.TechnicalChange(input_rate={"goods": -3.0})
    with pytest.raises(gp.InvalidInput, match="labour_rate"):
        gp.Plan(economy=one_sector(), years=range(2030, 2035),
                technical_change=gp.TechnicalChange(labour_rate={"nowhere": -0.01}))


def test_retirements_are_valued_vintage_by_vintage():
    """Without technical change the vintage-by-vintage value of retirements equals the
    retired capacity times p·b; with falling capital coefficients, later vintages are
    worth less, so the value is lower (recomputed here by hand for one sector)."""
    econ = one_sector(lead_time=2, retirement="sudden_exit", life=3.0)
    base = gp.Plan(economy=econ, years=range(2030, 2040), under_construction={"goods": [3.0, 4.0]})
    r = assert_optimal(base.solve(method="simplex"))
    np.testing.assert_allclose(r.accounts["retirements"], 2.0 * r.retirements["goods"],
                               rtol=1e-12, atol=1e-12)
    changed = base.model_copy(update={"technical_change": gp.TechnicalChange(
        capital_rate={"goods": -0.1})})
    c = assert_optimal(changed.solve(method="simplex"))
    starts = c.starts["goods"].to_numpy()
    # sudden exit at 3 years: a start of year τ serves years τ+2..τ+4 and retires in τ+4
    expect = np.zeros(10)
    for tau in range(10):
        if tau + 4 < 10:
            expect[tau + 4] += starts[tau] * 2.0 * 0.9 ** tau
    for back, amount in ((2, 3.0), (1, 4.0)):  # started before the plan, base-year b
        if 4 - back < 10:
            expect[4 - back] += amount * 2.0
    initial = c.data.initial[:, 0]
    expect += (initial[:-1] - initial[1:]) * 2.0
    np.testing.assert_allclose(c.accounts["retirements"], expect, rtol=1e-9, atol=1e-9)
