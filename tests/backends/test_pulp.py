"""PuLP interop: the same LinearProgram, readable names, and guards for known PuLP faults."""

from __future__ import annotations

import warnings

import highspy
import numpy as np
import pulp
import pytest
from conftest import assert_optimal, one_sector
from helpers import economy, make_plan
from helpers import random_plan as _plan
from hypothesis import given, settings
from hypothesis import strategies as st
from pulp.apis import coin_api

import growthplan as gp
from growthplan.backends.certificate import optimality_gap

YEARS = range(2030, 2036)


def cbc(**kw):
    return pulp.COIN_CMD(path=coin_api.COIN_CMD.executableExtension(coin_api.pulp_cbc_path),
                         msg=False, **kw)


def test_names_are_readable_and_sanitised():
    econ = gp.Economy(sectors=["iron & steel", "food-stuffs"],
                      input_coefficients=[[0.1, 0.0], [0.0, 0.1]],
                      capital_coefficients=[[0.5, 0.5], [0.0, 0.0]],
                      capital={s: gp.CapitalSpec(initial_capacity=10, mean_service_life=10)
                               for s in ("iron & steel", "food-stuffs")})
    prob = gp.Plan(economy=econ, years=YEARS).to_pulp()
    names = {v.name for v in prob.variables()}
    assert "starts_2031_iron___steel" in names and "output_2030_food_stuffs" in names
    cons = {c.name for c in prob.constraints()}
    assert "balance_2030_iron___steel" in cons and "capacity_2035_food_stuffs" in cons


@settings(max_examples=6)
@given(st.integers(0, 10_000), st.integers(2, 4), st.integers(3, 6))
def test_cbc_and_highs_through_pulp_match_the_direct_path(seed, n, T):
    plan, _ = _plan(seed, n, T)
    direct = assert_optimal(plan.solve())
    for solver in (cbc(), pulp.HiGHS(msg=False)):
        r = assert_optimal(plan.solve_pulp(solver))
        assert r.objective == pytest.approx(direct.objective, rel=1e-6)


def test_highs_class_duals_are_corrected_on_maximisation():
    """PuLP 3.3's HiGHS class returns duals negated on maximisation problems."""
    plan, _ = _plan(3, 3, 5)
    direct = assert_optimal(plan.solve())
    prob = plan.to_pulp()
    prob.solve(pulp.HiGHS(msg=False))
    raw = np.array([c.pi for c in prob.constraints()][:3])
    corrected = assert_optimal(plan.solve_pulp(pulp.HiGHS(msg=False)))
    np.testing.assert_allclose(corrected.shadow_prices.to_numpy(),
                               direct.shadow_prices.to_numpy(), atol=1e-8)
    # the raw values carry the wrong sign: balance rows of a maximisation have duals <= 0
    assert (raw >= -1e-12).all() and (raw > 0).any()


def test_time_limited_highs_class_is_not_optimal():
    """PuLP 3.3 maps HiGHS's time limit to Optimal; the live model status is read."""
    plan = make_plan(economy(30), 20)
    r = plan.solve_pulp(pulp.HiGHS(msg=False, timeLimit=0.01))
    assert r.status is gp.Status.TIME_LIMIT and not r.ok


def test_iteration_limited_cbc_is_not_optimal():
    """CBC's 'Stopped on iterations' must not come back as a plan."""
    plan = make_plan(economy(30), 20)
    r = plan.solve_pulp(cbc(options=["maxIterations 20"]))
    assert not r.ok
    with pytest.raises(gp.PlanNotOptimal):
        _ = r.output


def test_optimality_certificate():
    plan, _ = _plan(5, 3, 5)
    r = assert_optimal(plan.solve(method="simplex"))
    lp, x, y = r.lp, r.outcome.x, r.outcome.row_dual
    assert optimality_gap(lp, x, y) < 1e-9
    assert optimality_gap(lp, x, -y) == np.inf  # wrong-signed duals are caught
    assert optimality_gap(lp, x * 0.9, y) > 1e-3  # a feasible but worse point is caught


def test_user_constraints_are_kept(tmp_path):
    plan = gp.Plan(economy=one_sector(), years=YEARS)
    prob = plan.to_pulp()
    z = {v.name: v for v in prob.variables()}["starts_2031_goods"]
    prob.addConstraint(pulp.LpConstraint(pulp.LpAffineExpression([(z, 1.0)]),
                                         pulp.LpConstraintLE, "my_cap", 5.0))
    r = assert_optimal(plan.solve_pulp(cbc(), problem=prob))
    assert r.starts.loc[2031, "goods"] <= 5 + 1e-7
    assert r.objective < assert_optimal(plan.solve()).objective


def test_mps_keeps_the_sense_and_reads_back(tmp_path):
    plan, _ = _plan(2, 3, 4)
    direct = assert_optimal(plan.solve())
    path = plan.write_mps(tmp_path / "plan.mps")
    assert "MAX" in path.read_text().upper().split("ROWS")[0]
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    assert h.readModel(str(path)) == highspy.HighsStatus.kOk
    h.run()
    assert h.getInfo().objective_function_value == pytest.approx(direct.objective, rel=1e-8)
    with pytest.raises(gp.InvalidInput, match="overwrite"):
        plan.write_mps(path)
    lp_file = plan.write_lp(tmp_path / "plan.lp")
    assert "Maximize" in lp_file.read_text() or "MAXIMIZE" in lp_file.read_text().upper()


def test_no_deprecation_warnings_from_pulp():
    plan, _ = _plan(1, 2, 3)
    with warnings.catch_warnings():
        warnings.simplefilter("error", DeprecationWarning)
        plan.to_pulp()
        plan.solve_pulp(cbc())
