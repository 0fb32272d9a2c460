"""HiGHS specifics: the model handed to HiGHS, the transfer timing, the optional HiPO method."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from helpers import economy, make_plan

import growthplan as gp
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


def test_auto_picks_simplex_only_for_the_smallest_plans():
    assert hb.choose_method(hb.AUTO_IPM_NONZEROS) == "simplex"
    assert hb.choose_method(hb.AUTO_IPM_NONZEROS + 1) == "ipm"
    assert hb.choose_method(0) == "simplex"


def _slow_warnings(backend, lp):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        out = backend.solve(lp)
    assert out.status is gp.Status.OPTIMAL
    return [w for w in caught if issubclass(w.category, hb.SlowMethodWarning)]


@pytest.mark.parametrize("method", ["simplex", "ipm-crossover"])
def test_an_explicit_slow_method_on_a_large_plan_warns_once(monkeypatch, method):
    # the threshold lowered so that a small plan counts as large
    _, lp = _plan_lp()
    monkeypatch.setattr(hb, "SLOW_METHOD_NONZEROS", lp.nnz - 1)
    backend = hb.HighsBackend(method)
    got = _slow_warnings(backend, lp)
    assert len(got) == 1 and issubclass(got[0].category, gp.GrowthplanWarning)
    text = str(got[0].message)
    assert f"{method!r}" in text and f"{lp.nnz:,} nonzeros" in text and "\n" not in text
    assert _slow_warnings(backend, lp) == []  # once per back end


def test_no_slow_method_warning_for_interior_point_auto_small_plans_or_stand_ins(monkeypatch):
    _, lp = _plan_lp()
    assert _slow_warnings(hb.HighsBackend("simplex"), lp) == []  # below the threshold
    monkeypatch.setattr(hb, "SLOW_METHOD_NONZEROS", lp.nnz - 1)
    for backend in (hb.HighsBackend("ipm"), hb.HighsBackend("auto"),
                    *hb.HighsBackend("ipm").alternatives()):
        assert _slow_warnings(backend, lp) == []


def test_the_slow_method_warning_reaches_plan_solve(monkeypatch):
    plan, lp = _plan_lp()
    monkeypatch.setattr(hb, "SLOW_METHOD_NONZEROS", lp.nnz - 1)
    with pytest.warns(gp.SlowMethodWarning, match="'simplex'"):
        assert plan.solve(method="simplex").ok
