"""HiGHS specifics: the model handed to HiGHS, the transfer timing, the optional HiPO method."""

from __future__ import annotations

import numpy as np
from helpers import economy, make_plan

from growthplan.backends import highs as hb


def _plan_lp():
    plan = make_plan(economy(6), 5)
    return plan, plan.compile()


def test_load_passes_the_lp_exactly():
    # the array overload of passModel needs an integrality array: an empty one was
    # read as garbage and refused, so compare HiGHS's copy with the LP entry by entry
    _, lp = _plan_lp()
    h = hb._new_highs()
    h.setOptionValue("output_flag", False)
    seconds = hb.load(h, lp)
    assert seconds >= 0
    got = h.getLp()
    inf = np.inf
    m = lp.matrix.tocsc()
    assert (got.num_col_, got.num_row_) == (lp.shape[1], lp.shape[0])
    assert got.sense_ == (hb.highspy.ObjSense.kMaximize if lp.sense == "max"
                          else hb.highspy.ObjSense.kMinimize)
    np.testing.assert_array_equal(np.asarray(got.col_cost_), lp.cost)
    for mine, theirs in [(lp.col_lower, got.col_lower_), (lp.col_upper, got.col_upper_),
                         (lp.row_lower, got.row_lower_), (lp.row_upper, got.row_upper_)]:
        np.testing.assert_array_equal(np.asarray(theirs), np.clip(mine, -inf, inf))
    np.testing.assert_array_equal(np.asarray(got.a_matrix_.start_), m.indptr)
    np.testing.assert_array_equal(np.asarray(got.a_matrix_.index_), m.indices)
    np.testing.assert_array_equal(np.asarray(got.a_matrix_.value_), m.data)
    assert not any(int(v) for v in got.integrality_)


def test_transfer_is_timed_apart_from_the_solve():
    plan, _ = _plan_lp()
    r = plan.solve()
    assert r.ok
    assert r.timings["transfer"] == r.solver["options"]["transfer_seconds"] >= 0
