"""The pipeline: one lowering per solve, labels as data, checks at construction, sizes."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_infeasible, assert_optimal, one_sector, random_economy
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan import capital as capital_module
from growthplan.economy import Economy


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
    """Horizons of 1..3 years with lead times up to 3 build and solve (closed form below)."""
    econ = one_sector(lead_time=lead)
    r = gp.Plan(economy=econ, years=range(2030, 2030 + years)).solve()
    assert r.status in (gp.Status.OPTIMAL, gp.Status.UNBOUNDED)
    if lead >= 1 and r.ok:
        # nothing started in the plan enters service before 2030 + lead: with lead > years
        # terminal capacity is what is left of today's (geometric, δ = 1/20)
        if lead > years:
            assert r.capacity.iloc[-1, 0] == pytest.approx(100 * 0.95 ** years)


def test_fastest_horizon_never_crashes_on_short_horizons():
    """Fastest(max_years=N) for every N = 1..12 on a lead time of 3 (the search starts at 1)."""
    econ = one_sector(lead_time=3)
    for n in range(1, 13):
        plan = gp.Plan(economy=econ, years=range(2030, 2031),
                       targets=[gp.Target("goods", year=2031, capacity_at_least=120.0)],
                       objective=gp.objectives.Fastest(max_years=n))
        r = plan.solve()
        assert r.status in (gp.Status.OPTIMAL, gp.Status.INFEASIBLE), (n, r.status)
        if r.status is gp.Status.INFEASIBLE:
            assert r.diagnosis is not None and not r.diagnosis.shortfalls.empty
