"""The marginal abatement curve by parametric re-solve (LP duality: V(E) is concave and
its slope is the budget's shadow price)."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
from conftest import one_sector

import growthplan as gp
from growthplan.results import charts
from growthplan.scenarios.abatement import abatement_curve


def budget_plan(total: float = 330.0) -> gp.Plan:
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    return gp.Plan(economy=one_sector(), years=range(2030, 2036), satellite=sat,
                   limits=[gp.Budget(what="CO2", total=total)])


def test_curve_is_concave_and_its_slopes_are_the_prices():
    """Between two budgets the chord's slope lies between the two shadow prices (a concave
    V with V' = the dual: LP duality); the loss falls to zero once the budget is slack."""
    levels = [250.0, 300.0, 330.0, 360.0, 400.0, 500.0]
    curve = abatement_curve(budget_plan(), levels)
    assert list(curve["level"]) == levels and (curve["status"] == "optimal").all()
    v, price = curve["objective"].to_numpy(), curve["value"].to_numpy()
    slopes = np.diff(v) / np.diff(levels)
    assert np.all(slopes <= price[:-1] + 1e-9) and np.all(slopes >= price[1:] - 1e-9)
    assert np.all(np.diff(slopes) <= 1e-9)  # concave
    assert curve["loss"].iloc[-1] == 0 and np.all(np.diff(curve["loss"]) <= 1e-9)
    assert curve["emitted"].iloc[0] == pytest.approx(250.0, rel=1e-9)
    ax = charts.plot_abatement(curve)
    assert "t" in ax.get_xlabel() and "per t" in ax.figure.axes[1].get_ylabel()


def test_cap_path_is_scaled_and_impossible_levels_are_kept():
    """A cap path keeps its rate; with demand 30 (output 75, 37.5 t a year) a cap of 30 t
    cannot hold and is reported as infeasible rather than dropped."""
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2034), satellite=sat,
                   final_demand={"goods": 30.0},
                   limits=[gp.Cap(what="CO2", at_most=60.0, rate=-0.05)])
    curve = abatement_curve(plan, [30.0, 60.0, 62.0])
    assert list(curve["status"]) == ["infeasible", "optimal", "optimal"]
    v, price = curve["objective"].to_numpy()[1:], curve["value"].to_numpy()[1:]
    slope = (v[1] - v[0]) / 2.0  # the path scaled with its first year: V' = Σ y_t E_t / E_0
    assert price[1] - 1e-9 <= slope <= price[0] + 1e-9
    assert np.isnan(curve["objective"].iloc[0])
    with pytest.raises(gp.InvalidInput, match="limit"):
        abatement_curve(plan, [1.0], limit=3)
    with pytest.raises(gp.InvalidInput, match="levels"):
        abatement_curve(plan, [float("nan")])
