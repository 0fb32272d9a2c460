"""Impossible targets on the demo plan: the shortfall is the exact gap to the reachable maximum.

For a capacity target R that the plan cannot reach, the least shortfall is R − M, where M
is the most capacity the plan can have in that year with every other condition kept. M is
found twice: by maximising the target's quantity in the plan's own LP, and independently
by bisection on feasibility (statuses of ``plan.solve``) to 1e-9 relative. The sweep then
asks for targets between M and 3·M and checks every diagnosis against R − M.
"""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_infeasible, assert_optimal

import growthplan as gp
from growthplan.demo import demo_plan

DEMO = demo_plan()
FIELDS = {k: getattr(DEMO, k) for k in type(DEMO).model_fields}

# (targets of the plan, index of the swept target): the demo's 2034 energy capacity target,
# and a machinery capacity target added for 2036. Output, consumption and floor aims on
# random plans are swept in tests/results/test_diagnosis_property.py (aims are relaxed
# before labour, so each gap is reported on the aim itself).
CASES = {
    "energy-2034": (list(DEMO.targets), 0),
    "machinery-2036": ([*DEMO.targets, gp.Target("machinery", year=2036,
                                                  capacity_at_least=1.0)], 2),
}
PER_TARGET = 25       # default run: 2 × 25 = 50 impossible targets
PER_TARGET_SLOW = 60  # -m slow


def plan_with(case: str, value: float) -> gp.Plan:
    """A new Plan with the demo's fields and the swept target set to ``value``."""
    targets, i = CASES[case]
    targets = list(targets)
    targets[i] = targets[i].model_copy(update={"capacity_at_least": float(value)})
    return gp.Plan(**{**FIELDS, "targets": targets})


def lp_maximum(case: str) -> float:
    """Most capacity reachable in the target's year: maximise the target row's activity
    with that row's bound dropped (every other condition of the plan kept)."""
    targets, i = CASES[case]
    plan = plan_with(case, targets[i].required)
    lp = plan.compile()
    r = lp.rows["targets"].start + i
    lower = lp.row_lower.copy()
    offset = targets[i].required - lower[r]  # capacity from before the plan
    lower[r] = -np.inf
    cost = lp.matrix.tocsr()[[r]].toarray().ravel()
    out = gp.HighsBackend("simplex", tolerance=1e-9).solve(
        lp.replace(cost=cost, sense="max", row_lower=lower, stages=[]))
    assert out.status is gp.Status.OPTIMAL
    return float(out.objective + offset)


def bisection(case: str, rel: float = 1e-9) -> tuple[float, float]:
    """The independent check: bracket M by ``plan.solve()`` statuses alone.

    ``lo`` always solved to optimality and ``hi`` never did. Within about 1e-7 of M the
    verdict may be ``unknown`` (the solver says infeasible, the elastic re-solve finds a
    shortfall below its threshold): counted as not feasible.
    """
    targets, i = CASES[case]
    lo = targets[i].required
    assert_optimal(plan_with(case, lo).solve())
    hi = 2 * lo
    while plan_with(case, hi).solve().status is gp.Status.OPTIMAL:
        lo, hi = hi, 2 * hi
    while hi - lo > rel * lo:
        mid = 0.5 * (lo + hi)
        if plan_with(case, mid).solve().status is gp.Status.OPTIMAL:
            lo = mid
        else:
            hi = mid
    return lo, hi


@pytest.fixture(scope="module")
def maxima() -> dict[str, float]:
    out = {}
    for case in CASES:
        lo, hi = bisection(case)
        m = lp_maximum(case)
        # the two routes agree: the LP maximum lies in the bisection bracket (± 1e-9)
        assert lo * (1 - 1e-9) <= m <= hi * (1 + 1e-9), (case, lo, m, hi)
        out[case] = 0.5 * (lo + hi)
    return out


def sweep(n: int) -> list:
    return [pytest.param(case, k, n) for case in CASES for k in range(1, n + 1)]


def check(case: str, value: float, m: float) -> None:
    targets, i = CASES[case]
    target = targets[i]
    r = assert_infeasible(plan_with(case, value).solve())
    d = r.diagnosis
    assert d is not None and d.confirmed
    short = d.shortfalls
    on_target = short[(short["condition"] == "capacity target")
                      & (short["sector"] == target.sector) & (short["year"] == target.year)]
    # the target itself is the only condition that falls short ...
    assert len(on_target) == len(short) == 1, short
    # ... and by exactly the gap to the reachable maximum
    assert float(on_target["shortfall"].sum()) == pytest.approx(value - m, rel=1e-6)
    assert float(on_target["achievable"].iloc[0]) == pytest.approx(m, rel=1e-6)
    assert float(on_target["required"].iloc[0]) == pytest.approx(value, rel=1e-12)


@pytest.mark.parametrize(("case", "k", "n"), sweep(PER_TARGET))
def test_shortfall_is_the_gap_to_the_maximum(maxima, case, k, n):
    m = maxima[case]
    value = m * 3.0 ** (k / n)  # geometric, from just above M to 3·M
    check(case, value, m)


@pytest.mark.slow
@pytest.mark.parametrize(("case", "k", "n"), sweep(PER_TARGET_SLOW))
def test_shortfall_is_the_gap_to_the_maximum_dense(maxima, case, k, n):
    m = maxima[case]
    check(case, m * 3.0 ** (k / n), m)


def test_maximum_is_reachable(maxima):
    """Just below M the plan solves; the target at M · (1 + 1e-6) does not."""
    for case, m in maxima.items():
        assert_optimal(plan_with(case, m * (1 - 1e-8)).solve())
        assert_infeasible(plan_with(case, m * (1 + 1e-6)).solve())


def test_model_copy_with_new_targets_is_solved_with_them():
    plan = demo_plan()
    assert_optimal(plan.solve())  # fills the plan's cache of lowered arrays
    big = plan.targets[0].model_copy(update={"capacity_at_least": 1e7})
    copy = plan.model_copy(update={"targets": [big, plan.targets[1]]})
    assert copy.targets[0].required == 1e7
    assert_infeasible(copy.solve())


def test_shortfall_accuracy_as_documented(maxima):
    m = maxima["energy-2034"]
    value = m * 3.0 ** (1 / 25)
    short = plan_with("energy-2034", value).solve().diagnosis.shortfalls
    assert float(short["shortfall"].iloc[0]) == pytest.approx(value - m, abs=1e-9 * value)
