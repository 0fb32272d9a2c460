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


def test_a_small_reduced_cost_at_the_wrong_bound_keeps_its_gap():
    """Weak duality (any LP text, e.g. Chvátal 1983, ch. 5): b·y + Σ rc_j·(l_j or u_j, by
    the sign of rc_j) bounds the optimum. min 0.5 x1 + 1e6 x2, 1e6 x2 >= 1e6,
    0 <= x1 <= 1e6: y = 1 proves 1e6 optimal at x = (0, 1); the point (1e6, 1) costs
    1.5e6 and must not be certified, though rc_1 = 0.5 is below the certificate's
    tolerance. A fixed column (l = u) keeps no false gap."""
    import numpy as np
    from scipy import sparse

    from growthplan.backends.certificate import optimality_gap
    from growthplan.lp.program import LinearProgram

    m = sparse.csc_array(np.array([[0.0, 1e6]]))
    lp = LinearProgram(m, np.array([1e6]), np.array([np.inf]), np.array([0.0, 0.0]),
                       np.array([1e6, np.inf]), np.array([0.5, 1e6]), "min", {}, {})
    y = np.array([1.0])
    assert optimality_gap(lp, np.array([0.0, 1.0]), y) == 0.0
    assert optimality_gap(lp, np.array([1e6, 1.0]), y) == pytest.approx(1 / 3)
    held = lp.replace(col_lower=np.array([1e6, 0.0]))  # x1 fixed at 1e6: optimal there
    assert optimality_gap(held, np.array([1e6, 1.0]), y) == pytest.approx(0.0, abs=1e-15)
