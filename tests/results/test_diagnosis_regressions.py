"""Regressions of the diagnosis: each built from a reproducer that failed before."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from conftest import random_economy
from helpers import two_sector
from scipy.optimize import linprog
from scipy.sparse import csr_array, vstack

import growthplan as gp
from growthplan.demo import demo_plan
from growthplan.results.diagnosis import deletion_filter, diagnose


def maximum_alone(lp, r: int) -> float:
    """Most the row ``r`` can reach, its bound dropped, by scipy's linprog (SciPy's HiGHS)."""
    a = csr_array(lp.matrix)
    keep = np.arange(lp.shape[0]) != r
    lo, up, a_k = lp.row_lower[keep], lp.row_upper[keep], a[keep]
    a_ub = vstack([a_k[np.isfinite(up)], -a_k[np.isfinite(lo)]])
    b_ub = np.concatenate([up[np.isfinite(up)], -lo[np.isfinite(lo)]])
    bounds = [(x if np.isfinite(x) else None, y if np.isfinite(y) else None)
              for x, y in zip(lp.col_lower, lp.col_upper, strict=True)]
    res = linprog(-a[[r]].toarray().ravel(), A_ub=a_ub, b_ub=b_ub, bounds=bounds,
                  method="highs")
    assert res.status == 0
    return float(-res.fun)


def consumption_plan(required: float) -> gp.Plan:
    return gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=50.0),
                   consumption=gp.Consumption(floor=0.0),
                   targets=[gp.Target(year=2032, consumption_at_least=required)])


def test_consumption_target_beyond_reach_is_blamed_on_the_target_not_labour():
    # a 2-sector, 3-year plan, the target at 1.01 times its reachable maximum: the
    # shortfall is on the target, by its gap to the maximum, and labour is not named
    lp = consumption_plan(1.0).compile()
    m = maximum_alone(lp, lp.rows["targets"].start)
    required = 1.01 * m
    r = consumption_plan(required).solve()
    assert r.status is gp.Status.INFEASIBLE
    short = r.diagnosis.shortfalls
    assert list(short.condition) == ["consumption target"]
    assert float(short.shortfall.iloc[0]) == pytest.approx(required - m, abs=1e-9 * required)
    assert "labour" not in set(short.condition)
    assert r.diagnosis.conflict()
    # the other view: what labour would let the target be met
    assert r.diagnosis.other_view is not None
    assert set(r.diagnosis.other_view.condition) == {"labour"}


@pytest.mark.parametrize("value", [1e20, 1e22, 1e308])
def test_numbers_the_solver_reads_as_infinite_are_refused_naming_the_field(value):
    plan = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=60.0),
                   targets=[gp.Target("food", year=2031, output_at_least=value)])
    with pytest.raises(gp.InvalidInput, match=r"targets\[0\]\.output_at_least must be below"):
        plan.solve()


def test_a_huge_target_below_the_limit_is_impossible_not_an_error():
    plan = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=60.0),
                   targets=[gp.Target("food", year=2031, output_at_least=1e19)])
    r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    assert list(r.diagnosis.shortfalls.condition) == ["output target"]
    assert "optimal" not in str(r.summary()).lower()


def test_a_not_verified_result_never_says_optimal():
    from growthplan.backends.base import SolverOutcome, Status
    from growthplan.results.result import PlanResult
    from growthplan.results.summary import Summary

    plan = consumption_plan(1.0)
    lp = plan.compile()
    out = SolverOutcome(status=Status.OPTIMAL, message="Optimal", objective=1.0,
                        x=np.zeros(lp.shape[1]), row_dual=None, method="simplex")
    r = PlanResult(plan, lp, out, status=Status.NOT_VERIFIED, timings={})
    text = str(Summary(r))
    assert "optimal" not in text.lower()
    assert "objective" not in text
    with pytest.raises(gp.SolverFailure) as err:
        r.raise_for_status()
    assert "optimal" not in str(err.value).lower()


def test_demo_energy_target_20000_in_words_with_a_conflict():
    # the demo with its 2034 energy target raised to 20,000: no objective, the status in
    # words with the reachable maximum (14,149.19, as found by maximising the target alone
    # in tests/results/test_impossible.py) and its unit, and a conflict
    demo = demo_plan()
    targets = [demo.targets[0].model_copy(update={"capacity_at_least": 20000.0}),
               *demo.targets[1:]]
    plan = gp.Plan(**{**{k: getattr(demo, k) for k in type(demo).model_fields},
                      "targets": targets})
    r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    text = str(r.summary())
    assert "objective" not in text and "nan" not in text
    assert ("impossible: the capacity target energy in 2034 cannot be met: at most 14,149.2 "
            "million arvens at 2026 prices a year can be reached") in text
    assert r.diagnosis.conflict()
    assert "capacity target of energy in 2034" in r.diagnosis.conflict() or \
        "balance" in r.diagnosis.conflict()
    assert r.diagnosis.audit_ok


def test_the_deletion_filter_finds_an_irreducible_conflict():
    # without HiGHS's subset the library's own filter names the target and what it needs
    from growthplan.backends.pulp import PulpBackend

    plan = gp.Plan(economy=two_sector(), years=range(2030, 2035),
                   targets=[gp.Target("food", year=2031, output_at_least=1000.0)])
    lp = plan.compile()
    d = diagnose(lp, backend=PulpBackend())
    assert "deletion filter" in d.subset_source
    assert "the output target of food in 2031" in d.conflict()
    rows = deletion_filter(lp, np.arange(lp.shape[0]))
    assert rows is not None and lp.rows["targets"].start in rows
    # irreducible: dropping any one row leaves a feasible problem
    for r in rows:
        assert deletion_filter(lp, np.setdiff1d(rows, [r])) is None


def test_relax_orders_and_priority_lists():
    plan = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=20.0),
                   targets=[gp.Target("food", year=2031, output_at_least=80.0)])
    lp = plan.compile()
    aims = diagnose(lp)
    facts = diagnose(lp, relax="facts")
    listed = diagnose(lp, relax=["labour"])
    assert set(aims.shortfalls.kind) == {"aim"}
    assert set(facts.shortfalls.kind) == {"fact"}
    assert listed.shortfalls.equals(facts.shortfalls)
    together = diagnose(lp, relax="together")
    assert together.relaxed == "together" and not together.shortfalls.empty
    with pytest.raises(gp.InvalidInput, match="relax must"):
        diagnose(lp, relax="everything")
    with pytest.raises(gp.InvalidInput, match="relax must"):
        diagnose(lp, relax=["labor"])


def test_an_unfinished_diagnosis_says_what_was_tried_and_what_next():
    rng = np.random.default_rng(5)
    econ = random_economy(rng, 30)
    plan = gp.Plan(economy=econ, years=range(2030, 2045),
                   labour=gp.LabourSupply(start=float(np.sum(econ.labour_coefficients) * 120)),
                   consumption=gp.Consumption(floor=1e5))
    d = diagnose(plan.compile(), budget=0.01)
    assert d.status is not gp.Status.OPTIMAL
    text = d.headline()
    assert "did not finish" in text and "Tried:" in text and "Try next" in text


@pytest.mark.slow
def test_a_71_by_30_consumption_floor_beyond_reach_is_diagnosed():
    # a random 71-sector economy over 30 years, its consumption floor beyond reach
    rng = np.random.default_rng(71)
    econ = random_economy(rng, 71)
    supply = float(np.asarray(econ.labour_coefficients).sum() * 120)
    plan = gp.Plan(economy=econ, years=range(2030, 2060),
                   labour=gp.LabourSupply(start=supply),
                   consumption=gp.Consumption(floor=1e5))
    with warnings.catch_warnings():
        warnings.simplefilter("error", gp.SlowMethodWarning)
        r = plan.solve()
    assert r.status is gp.Status.INFEASIBLE
    d = r.diagnosis
    assert d.status is gp.Status.OPTIMAL and not d.shortfalls.empty
    assert set(d.shortfalls.kind) == {"aim"}
    assert d.method == "ipm"
    assert d.audit_ok
    assert d.conflict() or "set subset=True" in d.subset_source


def test_an_undecided_interior_point_at_size_goes_to_the_elastic_re_solve(monkeypatch):
    # at 200 × 30 the interior point ended the impossible plan "unknown" (no progress)
    # after 24 s and the simplex alternative had not decided after 15 minutes: above
    # the slow-method size the elastic re-solve decides first
    from growthplan import solve as pipeline
    from growthplan.backends import highs
    from growthplan.backends.base import SolverOutcome, Status

    lp = gp.Plan(economy=two_sector(), years=range(2030, 2035),
                 targets=[gp.Target("food", year=2031, output_at_least=1000.0)]).compile()
    unknown = SolverOutcome(status=Status.UNKNOWN, message="Unknown", objective=np.nan,
                            x=np.full(lp.shape[1], np.nan), row_dual=None, method="ipm")
    be = gp.HighsBackend("ipm")
    assert not be.undecided_at_size(lp, unknown)  # small: the alternatives decide
    monkeypatch.setattr(highs, "SLOW_METHOD_NONZEROS", lp.nnz - 1)
    assert be.undecided_at_size(lp, unknown)
    unknown.method = "simplex"
    assert not be.undecided_at_size(lp, unknown)
    unknown.method = "ipm"

    class Undecided(gp.HighsBackend):
        def solve(self, lp, *, stop=None, callback=None):
            return unknown

        def alternatives(self):
            raise AssertionError("the alternatives come after the elastic re-solve")

    out = pipeline.run(lp, Undecided("ipm"))
    assert out.status is Status.UNKNOWN and "elastic" in out.options["deferred"]
    # the plan itself: unknown, then the elastic re-solve confirms it impossible
    plan = gp.Plan(economy=two_sector(), years=range(2030, 2035),
                   targets=[gp.Target("food", year=2031, output_at_least=1000.0)])
    r = pipeline.solve(plan, backend=Undecided("ipm"))
    assert r.status is gp.Status.INFEASIBLE
    assert "first solve ended without a verdict" in " ".join(r.warnings)


def test_top_down_levels_give_the_lexicographic_optimum_of_bottom_up():
    # relax="facts" on a plan whose facts alone cannot meet the aims: bottom-up solves an
    # impossible first level, top-down never does; the optimum is the same, and equals
    # the closed form (labour 20 + the target's need; SciPy's linprog for the maximum)
    from growthplan.results import diagnosis as D

    plan = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=20.0),
                   targets=[gp.Target("food", year=2031, output_at_least=80.0)])
    lp = plan.compile()
    elastic, info = D.elastic_program(lp)
    groups = D._priority("facts", info)[1]
    solver = D._solver(elastic, "simplex", None, None)
    views = [D._solve_view(elastic, info, groups, solver, D._Clock(60.0), "facts",
                           top_down=t) for t in (False, True)]
    assert all(v.status is gp.Status.OPTIMAL for v in views)
    np.testing.assert_allclose(views[0].s, views[1].s, rtol=1e-7, atol=1e-9)
    # with the aims as the second group (and so minimised first, facts free) too
    groups = D._priority("aims", info)[1]
    views = [D._solve_view(elastic, info, groups, solver, D._Clock(60.0), "aims",
                           top_down=t) for t in (False, True)]
    np.testing.assert_allclose(views[0].s, views[1].s, rtol=1e-7, atol=1e-9)
    # an undecided earlier level is passed over: the next level decides
    calls = []
    real = D._run

    def undecided_first(lp, solver, clock, name, *a, **k):
        calls.append(name)
        out = real(lp, solver, clock, name, *a, **k)
        if len(calls) == 1:
            out.status = gp.Status.UNKNOWN
        return out

    D._run, saved = undecided_first, D._run
    try:
        v = D._solve_view(elastic, info, D._priority("facts", info)[1], solver,
                          D._Clock(60.0), "facts")
    finally:
        D._run = saved
    assert v.status is gp.Status.OPTIMAL and len(calls) >= 2
    np.testing.assert_allclose(v.s, diagnose_shares(lp, "facts"), rtol=1e-7, atol=1e-9)


def diagnose_shares(lp, relax):
    from growthplan.results import diagnosis as D

    elastic, info = D.elastic_program(lp)
    solver = D._solver(elastic, "simplex", None, None)
    return D._solve_view(elastic, info, D._priority(relax, info)[1], solver,
                         D._Clock(60.0), relax).s


def test_above_the_subset_size_the_deletion_filter_keeps_to_the_budget(monkeypatch):
    # HiGHS's own subset search has no time limit (at 71 × 30 it had not ended after
    # 5 minutes): above IIS_NONZERO_LIMIT the library's deletion filter runs instead
    from growthplan.results import diagnosis as D

    plan = gp.Plan(economy=two_sector(), years=range(2030, 2035),
                   targets=[gp.Target("food", year=2031, output_at_least=1000.0)])
    lp = plan.compile()
    monkeypatch.setattr(D, "IIS_NONZERO_LIMIT", lp.nnz - 1)
    d = diagnose(lp)
    assert "deletion filter" in d.subset_source and "nonzeros" in d.subset_source
    assert "the output target of food in 2031" in d.conflict()
    # above CONFLICT_NONZERO_LIMIT no simplex solve fits a budget: said, with the way on
    monkeypatch.setattr(D, "CONFLICT_NONZERO_LIMIT", lp.nnz - 1)
    d = diagnose(lp)
    assert d.conflict() == "" and "set subset=True" in d.subset_source
    assert f"{lp.nnz:,} nonzeros" in d.subset_source
    assert "the output target of food in 2031" in diagnose(lp, subset=True).conflict()


def test_an_unfinished_other_view_is_said_and_the_diagnosis_stands(monkeypatch):
    from growthplan.results import diagnosis as D

    plan = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                   labour=gp.LabourSupply(start=20.0),
                   targets=[gp.Target("food", year=2031, output_at_least=80.0)])
    lp = plan.compile()
    real = D._solve_view

    def slow_other(*a, top_down=False, **k):  # the other view runs out of its allowance
        if top_down:
            return D._View(gp.Status.TIME_LIMIT, np.zeros(len(a[1])))
        return real(*a, **k)

    monkeypatch.setattr(D, "_solve_view", slow_other)
    d = diagnose(lp)
    assert d.confirmed and set(d.shortfalls.kind) == {"aim"} and d.other_view is None
    assert any("did not finish" in n and "relax='facts'" in n for n in d.notes)
    monkeypatch.setattr(D, "_solve_view", real)
    assert diagnose(lp).other_view is not None


def test_when_the_held_facts_have_no_shadow_price_the_other_view_is_not_solved():
    # labour is ample, the target beyond what capital allows: relaxing labour cannot
    # help (its shadow price is zero), so the facts-first view is the same; checked by
    # computing that view outright
    plan = gp.Plan(economy=two_sector(), years=range(2030, 2035),
                   labour=gp.LabourSupply(start=1e5),
                   targets=[gp.Target("food", year=2031, output_at_least=1000.0)])
    lp = plan.compile()
    d = diagnose(lp)
    assert d.other_view is None
    assert any("Relaxing the facts first gives the same shortfalls" in n for n in d.notes)
    assert any(s.name == "facts: the same as aims" for s in d.steps)
    facts = diagnose(lp, relax="facts").shortfalls
    keys = ["condition", "sector", "year"]
    assert facts[keys].equals(d.shortfalls[keys]) and set(facts.kind) == {"aim"}
    np.testing.assert_allclose(facts.shortfall, d.shortfalls.shortfall, rtol=1e-9)
    # where labour binds, the other view is solved and differs
    tight = gp.Plan(economy=two_sector(), years=range(2030, 2033),
                    labour=gp.LabourSupply(start=20.0),
                    targets=[gp.Target("food", year=2031, output_at_least=80.0)])
    assert diagnose(tight.compile()).other_view is not None
