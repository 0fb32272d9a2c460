"""The pipeline of growthplan.solve: back ends, fallbacks, objective stages."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal, one_sector
from helpers import two_sector

import growthplan as gp
from growthplan import solve
from growthplan.backends.base import Feature, SolverOutcome, Status
from growthplan.backends.options import highs_backend

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, terminal=gp.TerminalGrowth(rate=0.02))


class Failing:
    """A back end that always fails and offers HiGHS as its alternative."""

    name = "failing"
    features = frozenset({Feature.DUALS})

    def solve(self, lp, *, stop=None, callback=None) -> SolverOutcome:
        return SolverOutcome(Status.ERROR, "broken on purpose", float("nan"),
                             np.full(lp.shape[1], np.nan), None, "failing")

    def alternatives(self):
        return [highs_backend()]


def test_a_failed_solve_falls_back_to_the_alternatives():
    lp = solve.program(_plan())
    out = solve.run(lp, Failing())
    assert out.status is Status.OPTIMAL
    assert out.options["fallback_from"] == ["failing: error (broken on purpose)"]
    r = assert_optimal(_plan().solve(backend=Failing()))
    assert r.solver["backend"] == "failing"


def test_the_program_is_the_compiled_plan():
    plan = _plan()
    a, b = solve.program(plan), plan.compile()
    assert a.shape == b.shape and a.nnz == b.nnz
    np.testing.assert_array_equal(a.cost, b.cost)


def test_pulp_and_highs_agree():
    # PuLP's bundled CBC is a reference solver outside the library
    plan = gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=20),
                   labour=gp.LabourSupply(start=80), terminal=gp.TerminalGrowth(rate=0.02))
    highs = assert_optimal(plan.solve())
    cbc = assert_optimal(plan.solve_pulp())
    assert cbc.objective == pytest.approx(highs.objective, rel=1e-6)


def test_optimise_holds_each_stage_with_an_added_row():
    # terminal capacity first, then least labour with the first optimum held
    tc, ll = gp.objectives.TerminalCapacity(), gp.objectives.LeastLabour()

    def plan(objective) -> gp.Plan:
        return gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=10),
                       labour=gp.LabourSupply(start=200), objective=objective)

    first = assert_optimal(plan(tc).solve())
    lp = solve.program(plan(gp.objectives.Lexicographic([tc, ll], tolerance=1e-6)))
    assert len(lp.stages) == 2
    final, out = solve.optimise(lp, highs_backend())
    assert out.status is Status.OPTIMAL
    assert "held_objective" in final.rows and final.shape[0] == lp.shape[0] + 1
    assert out.options["held_optima"][0] == pytest.approx(first.objective, rel=1e-9)


def test_an_impossible_plan_ends_in_a_diagnosis():
    plan = gp.Plan(economy=one_sector(), years=YEARS,
                   targets=[gp.Target("goods", year=2033, output_at_least=1e6)])
    r = plan.solve()
    assert r.status is Status.INFEASIBLE and r.diagnosis is not None
    assert "output target" in set(r.diagnosis.shortfalls["condition"])
