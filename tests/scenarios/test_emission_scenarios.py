"""Emissions in scenarios: intensities drawn in stress tests, limits in revised plans."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import one_sector

import growthplan as gp


def plan() -> gp.Plan:
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t",
                                              intensities={"goods": 0.5,
                                                           "goods:clean": 0.1})])
    return gp.Plan(economy=one_sector(), years=range(2030, 2034), satellite=sat,
                   techniques=[gp.Technique(sector="goods", label="clean",
                                            capital={"goods": 2.5})],
                   limits=[gp.Cap(what="CO2", at_most=60.0)])


def test_drawn_intensity_scales_the_chosen_cell():
    spec = gp.UncertaintySpec(items=[gp.Uncertain(what="intensities", rows="CO2", cols="goods",
                                                  distribution=gp.Uniform(low=0.8, high=1.2))],
                              seed=3)
    base = plan()
    for i in range(3):
        factor = spec.values(base, i)[0][0, 0]
        drawn = spec.draw(base, i).satellite.stressors[0].intensities
        assert drawn["goods"] == pytest.approx(0.5 * factor, rel=1e-12)
        assert drawn["goods:clean"] == 0.1  # its own intensity, not drawn


def test_technique_without_its_own_intensity_follows_its_sector():
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    base = plan().model_copy(update={"satellite": sat})
    spec = gp.UncertaintySpec(items=[gp.Uncertain(what="intensities", cols="goods",
                                                  distribution=gp.Uniform(low=2, high=2))])
    drawn = spec.draw(base, 0)
    d = drawn.lowered().satellite
    np.testing.assert_allclose(d.intensity[0, 0], [1.0, 1.0])  # base and clean: 0.5 · 2


def test_stress_test_runs_with_drawn_intensities():
    """Fixed starts, intensities 1.25 times as high: the fixed starts need output 120 in
    2032 (their capital goods), which now emits 120 · 0.5 · 1.25 = 75 t against a cap of
    60 t: the stress test reports the cap exceeded by 15 t (by hand)."""
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    nominal = gp.Plan(economy=one_sector(), years=range(2030, 2034), satellite=sat,
                      limits=[gp.Cap(what="CO2", at_most=60.0)])
    spec = gp.UncertaintySpec(items=[gp.Uncertain(what="intensities", rows="CO2",
                                                  distribution=gp.Uniform(low=1.25, high=1.25))])
    t = gp.stress_test(nominal, spec, draws=1).table
    short = t[(t["quantity"] == "shortfall") & (t["year"] == 2032)]
    assert list(short["name"]) == ["emissions cap CO2"]
    assert short["value"].iloc[0] == pytest.approx(15.0, rel=1e-7)
    with pytest.raises(gp.InvalidInput, match="satellite"):
        gp.UncertaintySpec(items=[gp.Uncertain(what="intensities", distribution=gp.Uniform(
            low=1, high=1))]).draw(gp.Plan(economy=one_sector(), years=range(2030, 2032)), 0)


def test_revision_keeps_the_remaining_limits():
    """Revised from 2032: a cap keeps its remaining years and path, a budget over the whole
    plan keeps what is left after the emissions already made (here 100 t)."""
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    p = gp.Plan(economy=one_sector(), years=range(2030, 2036), satellite=sat,
                limits=[gp.Cap(what="CO2", at_most=60.0, rate=-0.1),
                        gp.Budget(what="CO2", total=400.0)])
    starts = p.solve().starts.loc[2030:2031]
    with pytest.raises(gp.InvalidInput, match="budget_used"):
        gp.revise(p, starts, 2032)
    new = gp.revise(p, starts, 2032, budget_used={1: 100.0})
    cap, budget = new.limits
    assert cap.years == [2032, 2033, 2034, 2035]
    np.testing.assert_allclose(cap.at_most, 60.0 * 0.9 ** np.arange(2, 6))
    assert budget.total == 300.0 and budget.first == 2032
    assert new.solve().ok
