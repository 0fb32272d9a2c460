"""Diagnosis of impossible plans against closed-form maxima."""

from __future__ import annotations

import pytest
from conftest import one_sector

import growthplan as gp

YEARS = range(2030, 2040)


def test_single_impossible_target_reports_exact_shortfall():
    """One sector, geometric retirement: capacity can at most grow at the Harrod–Domar
    rate (1 − a)/b − δ = 0.15, so capacity in 2035 is at most 100·1.15^5 (Harrod–Domar; README)."""
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   targets=[gp.Target("goods", year=2035, capacity_at_least=250.0)])
    r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    d = r.diagnosis.shortfalls
    assert len(d) == 1
    row = d.iloc[0]
    assert row.condition == "capacity target" and row.sector == "goods" and row.year == 2035
    assert row.achievable == pytest.approx(100 * 1.15 ** 5, rel=1e-8)
    assert row.shortfall == pytest.approx(250 - 100 * 1.15 ** 5, rel=1e-8)
    assert row.share == pytest.approx(row.shortfall / 250)
    with pytest.raises(gp.PlanInfeasible, match="capacity target goods 2035"):
        r.raise_for_status()
    assert "Cannot be met" in str(r.summary())


def test_two_impossible_targets_are_ranked():
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   targets=[gp.Target("goods", year=2035, capacity_at_least=250.0),
                            gp.Target("goods", year=2032, output_at_least=200.0)])
    d = plan.solve().diagnosis.shortfalls
    assert list(d.condition) == ["output target", "capacity target"]
    assert d.iloc[0].shortfall == pytest.approx(200 - 100 * 1.15 ** 2, rel=1e-8)
    assert d.iloc[1].shortfall == pytest.approx(250 - 100 * 1.15 ** 5, rel=1e-8)


def test_labour_shortfall():
    # output 2031 >= 100 needs 0.5 * 100 = 50 person-years; only 40 are there
    plan = gp.Plan(economy=one_sector(), years=YEARS, labour=gp.LabourSupply(start=40.0),
                   targets=[gp.Target("goods", year=2031, output_at_least=100.0)])
    r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    d = r.diagnosis.shortfalls
    # default weights count shares: 20 of 100 target units (20 %) is cheaper than
    # 10 more of 40 person-years (25 %)
    assert len(d) == 1 and d.iloc[0].condition == "output target"
    assert d.iloc[0].shortfall == pytest.approx(20.0)
    # labour is a fact: weights act within a level and never put it before the aim
    from growthplan.results.diagnosis import diagnose

    d1 = diagnose(r.lp, weights={"targets": 100.0}).shortfalls
    assert list(d1.condition) == ["output target"]
    # asked for, facts come first: 10 more person-years meet the target
    d2 = diagnose(r.lp, relax="facts").shortfalls
    assert list(d2.condition) == ["labour"]
    assert d2.iloc[0].shortfall == pytest.approx(10.0)
    assert r.diagnosis.other_view is not None
    assert list(r.diagnosis.other_view.condition) == ["labour"]
    assert "50 person-years instead of 40" in r.diagnosis.views()


def test_infeasible_subset_names_the_conflict():
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   targets=[gp.Target("goods", year=2035, capacity_at_least=250.0)])
    iis = plan.solve().diagnosis.infeasible_subset
    assert iis is not None and len(iis) > 0
    assert any(c == "targets" and y == 2035 for c, y in zip(iis.condition, iis.year,
                                                             strict=True))
    # in the trade's words, with the years as data
    assert "the capacity target of goods in 2035" in r_conflict(plan)
    # the conflict is between the target and the capacity accounts, not labour
    assert "labour" not in set(iis.condition)


def r_conflict(plan):
    text = plan.solve().diagnosis.conflict()
    assert "balance of goods in 2030–2034" in text and "cannot all hold together" in text
    return text


def test_unbounded_plan_names_runaway_columns():
    econ = gp.Economy(sectors=["g"], input_coefficients=[[0.5]],
                      capital={"g": gp.CapitalSpec(initial_capacity=10, mean_service_life=10)})
    r = gp.Plan(economy=econ, years=range(2030, 2033)).solve()
    assert r.status is gp.Status.UNBOUNDED
    assert any(c.startswith("starts_") or c == "level" for c in r.runaway)
    with pytest.raises(gp.PlanUnbounded, match="Runaway columns"):
        r.raise_for_status()
