"""The pipeline: one lowering per solve, labels as data, checks at construction, sizes."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_infeasible, assert_optimal, one_sector, random_economy
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.model import capital as capital_module
from growthplan.model.economy import Economy


def test_diagnosis_with_plan_years_that_are_not_calendar_years():
    """Years 0..5 with a terminal condition: labels are data, never parsed from names."""
    plan = gp.Plan(economy=one_sector(), years=range(0, 6),
                   targets=[gp.Target("goods", year=6, capacity_at_least=1e5)],
                   terminal=gp.TerminalGrowth(rate=0.03))
    r = assert_infeasible(plan.solve())
    short = r.diagnosis.shortfalls
    assert set(short.year) <= set(range(0, 7))
    row = short[short.condition == "capacity target"].iloc[0]
    assert row.year == 6 and row.sector == "goods"


def test_under_construction_beyond_the_lead_time_is_refused_at_construction():
    with pytest.raises(gp.InvalidInput, match="under_construction.goods"):
        gp.Plan(economy=one_sector(), years=range(2030, 2035),
                under_construction={"goods": [5.0, 1.0, 2.0]})


def test_the_plan_is_lowered_once_per_solve(monkeypatch):
    """The balanced-growth search runs once and each survival profile is computed once."""
    calls = {"balanced": 0, "survival": 0}
    real_bg = Economy.dynamic_balanced_growth
    real_surv = capital_module.survival

    def bg(self):
        calls["balanced"] += 1
        return real_bg(self)

    def surv(*a, **k):
        calls["survival"] += 1
        return real_surv(*a, **k)

    monkeypatch.setattr(Economy, "dynamic_balanced_growth", bg)
    monkeypatch.setattr(capital_module, "survival", surv)
    from growthplan.demo import demo_plan

    plan = demo_plan()
    calls.update(balanced=0, survival=0)
    assert_optimal(plan.solve())
    assert calls["balanced"] == 1
    n = plan.economy.n
    # the lowering asks each sector once for its profile and its initial survival
    assert calls["survival"] <= 2 * n, calls


@settings(max_examples=25)
@given(st.integers(0, 10_000), st.integers(1, 5), st.integers(1, 9),
       st.sampled_from(["geometric", "sudden_exit", "weibull", "linear"]), st.integers(0, 3),
       st.booleans(), st.booleans())
def test_size_estimate_equals_the_built_matrix(seed, n, T, profile, lead, terminal, targets):
    """The sum of the condition families' counts is the built matrix, on random plans."""
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n, profile=profile, lead=lead)
    years = list(range(2030, 2030 + T))
    tg = [gp.Target("s0", year=2030 + T, capacity_at_least=10.0),
          gp.Target("s0", year=2030, output_at_least=1.0)] if targets else []
    plan = gp.Plan(economy=econ, years=years, labour=gp.LabourSupply(start=1e4),
                   consumption=gp.Consumption(floor=1.0, max_fall=0.1), targets=tg,
                   terminal=gp.TerminalGrowth(rate=0.02) if terminal else None)
    est = plan.estimate_size()
    lp = plan.compile(size_limit=None)
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)


@pytest.mark.parametrize("years", [1, 2, 3])
@pytest.mark.parametrize("lead", [0, 1, 3])
def test_horizons_shorter_than_the_lead_time_solve(years, lead):
    """Horizons of 1..3 years with lead times up to 3 (once a crash in the delivery operator).

    Closed forms for one sector (a = 0.6, b = 2, geometric δ = 0.05, C0 = 100, capital
    goods spread evenly over the lead time), derived by hand from the balance
    0.4 x_t ≥ b · deliveries_t and x_t ≤ C_t:
    θ = 0: a start serves in its own year, z ≤ 0.2 (C + z), so C grows by 1.25·0.95 = 1.1875;
    θ = 1: the Harrod–Domar factor 1.15;
    θ = 3: nothing started enters service before year 3; in a 3-year plan the start of year
    0 delivers 2z/3 a year, bound by year 2's surplus 0.4·100·0.95², so z = 54.15.
    """
    r = assert_optimal(gp.Plan(economy=one_sector(lead_time=lead),
                               years=range(2030, 2030 + years)).solve())
    expect = {0: 100 * 1.1875 ** years, 1: 100 * 1.15 ** years,
              3: 100 * 0.95 ** years + (54.15 if years == 3 else 0.0)}[lead]
    assert r.objective == pytest.approx(expect, rel=1e-9)


def test_fastest_horizon_never_crashes_on_short_horizons():
    """Fastest(max_years=N), N = 1..12, lead time 3: capacity is 95, 90.25, 139.89 after
    1, 2, 3 years (closed forms above), so a target of 120 needs exactly 3 years."""
    econ = one_sector(lead_time=3)
    for n in range(1, 13):
        plan = gp.Plan(economy=econ, years=range(2030, 2031),
                       targets=[gp.Target("goods", year=2031, capacity_at_least=120.0)],
                       objective=gp.objectives.Fastest(max_years=n))
        r = plan.solve()
        if n < 3:
            assert_infeasible(r)
            row = r.diagnosis.shortfalls.iloc[0]
            assert row.shortfall == pytest.approx(120.0 - 100 * 0.95 ** n, rel=1e-9)
        else:
            assert_optimal(r)
            assert r.plan.horizon == 3


def test_a_copy_with_new_targets_is_solved_with_them():
    """model_copy(update=...) validates again and never reuses the original's arrays."""
    from growthplan.demo import demo_plan

    plan = demo_plan()
    assert_optimal(plan.solve())
    huge = plan.targets[0].model_copy(update={"capacity_at_least": 1e7})
    copy = plan.model_copy(update={"targets": [huge, plan.targets[1]]})
    assert_infeasible(copy.solve())
    with pytest.raises(gp.InvalidInput, match="targets"):
        plan.model_copy(update={"targets": [gp.Target("nowhere", year=2030,
                                                      output_at_least=1.0)]})
