"""RAS and GRAS: margins, zeros, signs, fixed cells, and the minimum-information solution."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize

import growthplan as gp
from growthplan.statistics import gras, ras

PRIOR = np.array([[1.0, 2.0, 0.0], [3.0, 0.0, 4.0], [0.0, 5.0, 6.0]])
MIXED = np.array([[1.0, -2.0, 3.0], [3.0, 1.0, -4.0], [-1.0, 5.0, 6.0]])


def _min_information(a: np.ndarray, u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """The GRAS objective minimised directly (Temurshoev, Miller & Bouwmeester 2013, eq. 3):
    min Σ |a_ij| z_ij (ln z_ij − 1) over z > 0 on the nonzero cells, with Σ_j a_ij z_ij = u_i
    and Σ_i a_ij z_ij = v_j; for a >= 0 this is the RAS cross-entropy (Miller & Blair 2009,
    section 7.4). Solved with scipy's SLSQP, independently of the library."""
    cells = np.argwhere(a != 0)
    w = np.array([a[i, j] for i, j in cells])
    rows = np.array([[w[k] if cells[k][0] == i else 0.0 for k in range(len(w))]
                     for i in range(a.shape[0])])
    cols = np.array([[w[k] if cells[k][1] == j else 0.0 for k in range(len(w))]
                     for j in range(a.shape[1])])
    eq = np.vstack([rows, cols[:-1]])  # one margin is implied by the others
    target = np.concatenate([u, v[:-1]])
    res = minimize(lambda z: float(np.sum(np.abs(w) * z * (np.log(z) - 1))),
                   np.ones(len(w)), jac=lambda z: np.abs(w) * np.log(z), method="SLSQP",
                   bounds=[(1e-9, None)] * len(w),
                   constraints=[{"type": "eq", "fun": lambda z: eq @ z - target,
                                 "jac": lambda z: eq}],
                   options={"ftol": 1e-14, "maxiter": 500})
    assert res.success, res.message
    x = np.zeros_like(a)
    for k, (i, j) in enumerate(cells):
        x[i, j] = w[k] * res.x[k]
    return x


def test_ras_meets_margins_keeps_zeros_and_is_minimum_information():
    u, v = np.array([4.0, 8.0, 12.0]), np.array([5.0, 9.0, 10.0])
    out = ras(PRIOR, u, v)
    x = out.matrix
    assert out.converged and out.iterations > 1
    np.testing.assert_allclose(x.sum(axis=1), u, atol=1e-10)
    np.testing.assert_allclose(x.sum(axis=0), v, atol=1e-10)
    assert np.all(x[PRIOR == 0] == 0)
    # RAS form x = r̂ A ŝ (Miller & Blair 2009, section 7.4)
    np.testing.assert_allclose(x, out.row_multipliers[:, None] * PRIOR
                               * out.column_multipliers[None, :], rtol=1e-12)
    # the minimum cross-entropy solution (scipy.optimize)
    np.testing.assert_allclose(x, _min_information(PRIOR, u, v), atol=1e-5)


def test_gras_keeps_signs_and_is_minimum_information():
    u, v = np.array([3.0, -1.0, 12.0]), np.array([2.0, 5.0, 7.0])
    out = gras(MIXED, u, v)
    x = out.matrix
    np.testing.assert_allclose(x.sum(axis=1), u, atol=1e-10)
    np.testing.assert_allclose(x.sum(axis=0), v, atol=1e-10)
    assert np.all(np.sign(x) == np.sign(MIXED))
    # GRAS as the minimiser of the information loss (Temurshoev, Miller & Bouwmeester 2013)
    np.testing.assert_allclose(x, _min_information(MIXED, u, v), atol=1e-5)


def test_gras_row_without_positive_entries():
    # Temurshoev, Miller & Bouwmeester (2013): with no positive entry the row multiplier
    # is −n_i / u_i, where the formula of Junius & Oosterhaven (2003) divides by zero
    a = np.array([[0.0, -2.0, -3.0], [3.0, 1.0, 4.0]])
    u, v = np.array([-6.0, 10.0]), np.array([3.0, 0.0, 1.0])
    x = gras(a, u, v).matrix
    np.testing.assert_allclose(x.sum(axis=1), u, atol=1e-10)
    np.testing.assert_allclose(x.sum(axis=0), v, atol=1e-10)
    assert np.all(np.sign(x) == np.sign(a))
    np.testing.assert_allclose(x, _min_information(a, u, v), atol=1e-5)


def test_gras_equals_ras_on_non_negative_matrices():
    # closed form: with no negative entry the GRAS update is the RAS update (J&O 2003)
    u, v = np.array([4.0, 8.0, 12.0]), np.array([5.0, 9.0, 10.0])
    np.testing.assert_allclose(gras(PRIOR, u, v).matrix, ras(PRIOR, u, v).matrix,
                               rtol=1e-12)


def test_fixed_cells_are_kept_and_labels_follow():
    a = pd.DataFrame(PRIOR, index=list("abc"), columns=list("xyz"))
    fixed = np.zeros((3, 3), dtype=bool)
    fixed[2, 2] = True
    u = pd.Series({"c": 12.0, "a": 4.0, "b": 8.0})  # any order, by label
    v = pd.Series({"x": 5.0, "y": 9.0, "z": 10.0})
    x = ras(a, u, v, fixed=fixed).matrix
    assert isinstance(x, pd.DataFrame) and list(x.index) == list("abc")
    assert x.loc["c", "z"] == 6.0
    np.testing.assert_allclose(x.sum(axis=1), u[list("abc")], atol=1e-10)
    np.testing.assert_allclose(x.sum(axis=0), v, atol=1e-10)


@settings(max_examples=15)
@given(seed=st.integers(0, 10_000), m=st.integers(2, 5), n=st.integers(2, 5),
       signed=st.booleans())
def test_reachable_margins_are_met(seed, m, n, signed):
    # totals of a matrix with the prior's sign pattern can always be met (common practice:
    # the test matrices of the RAS literature are built this way)
    rng = np.random.default_rng(seed)
    a = rng.uniform(0.1, 5, (m, n)) * (rng.uniform(size=(m, n)) < 0.8)
    a[np.arange(m), np.arange(m) % n] = 1.0  # every row and column has an entry
    a[np.arange(n) % m, np.arange(n)] = 1.0
    if signed:
        a *= np.where(rng.uniform(size=(m, n)) < 0.3, -1.0, 1.0)
    truth = a * rng.uniform(0.5, 2.0, (m, n))
    out = (gras if signed else ras)(a, truth.sum(axis=1), truth.sum(axis=0))
    x = out.matrix
    np.testing.assert_allclose(x.sum(axis=1), truth.sum(axis=1), atol=1e-10 * 10 * m * n)
    np.testing.assert_allclose(x.sum(axis=0), truth.sum(axis=0), atol=1e-10 * 10 * m * n)
    assert np.all(np.sign(x) == np.sign(a))


# -- errors: one clear message each ----------------------------------------------------


def test_inconsistent_totals():
    with pytest.raises(gp.InvalidInput, match=r"row_totals must add up to the sum of the "
                       r"column totals.*Got '24 against 25'"):
        ras(PRIOR, [4.0, 8.0, 12.0], [5.0, 9.0, 11.0])


def test_unreachable_total_names_the_row():
    a = PRIOR.copy()
    a[1] = 0.0
    with pytest.raises(gp.InvalidInput, match=r"row_totals\[1\] must be reachable: a positive "
                       r"total needs a free positive entry in its row"):
        ras(a, [4.0, 8.0, 12.0], [5.0, 9.0, 10.0])
    frame = pd.DataFrame(MIXED, index=list("abc"), columns=list("xyz"))
    frame["z"] = [1.0, 2.0, 3.0]
    with pytest.raises(gp.InvalidInput, match=r"column_totals\[z\] must be reachable: a "
                       r"negative total"):
        gras(frame, [1.0, 1.0, -1.0], [2.0, 0.0, -1.0])


def test_negative_entry_refused_by_ras():
    with pytest.raises(gp.InvalidInput, match=r"matrix\[0, 1\] must be >= 0 for RAS \(use "
                       r"GRAS"):
        ras(MIXED, [1.0, 1.0, 1.0], [1.0, 1.0, 1.0])


def test_pattern_that_cannot_carry_the_totals():
    # the totals are met only with x_11 = 0, which scaling never reaches
    with pytest.raises(gp.InvalidInput, match="reach the totals within 200 iterations"):
        ras([[1.0, 1.0], [1.0, 0.0]], [1.0, 10.0], [10.0, 1.0], max_iterations=200)
    out = ras([[1.0, 1.0], [1.0, 0.0]], [1.0, 10.0], [10.0, 1.0], max_iterations=200,
              strict=False)
    assert not out.converged and out.iterations == 200 and out.max_gap > 1e-12


def test_shapes_and_labels():
    with pytest.raises(gp.InvalidInput, match="row_totals must have 3 entries"):
        ras(PRIOR, [1.0, 2.0], [1.0, 1.0, 1.0])
    frame = pd.DataFrame(PRIOR, index=list("abc"), columns=list("xyz"))
    with pytest.raises(gp.InvalidInput, match=r"column_totals must have the labels of the "
                       r"matrix \(missing \['z'\]"):
        ras(frame, pd.Series({"a": 1.0, "b": 1.0, "c": 1.0}),
            pd.Series({"x": 1.0, "y": 1.0, "w": 1.0}))


def test_junius_oosterhaven_worked_example():
    # the 3 × 4 example of Junius & Oosterhaven (2003), as reproduced by Temurshoev, Miller &
    # Bouwmeester (2013); matrix, margins and the first rows of the result from memory, so
    # the margins are verified numerically here and the whole matrix against the
    # minimum-information solution (scipy.optimize)
    a = np.array([[7.0, 3, 5, -3], [2, 9, 8, 0], [-2, 0, 2, 0]])
    u, v = np.array([15.0, 26, -1]), np.array([9.0, 16, 17, -2])
    x = gras(a, u, v).matrix
    np.testing.assert_allclose(x.sum(axis=1), u, atol=1e-10)
    np.testing.assert_allclose(x.sum(axis=0), v, atol=1e-10)
    assert np.array_equal(np.sign(x), np.sign(a))
    np.testing.assert_allclose(x[0], [8.4243, 3.3752, 5.2004, -2.0000], atol=2e-3)
    np.testing.assert_allclose(x[1, :2], [3.0010, 12.6248], atol=2e-3)
    np.testing.assert_allclose(x, _min_information(a, u, v), atol=1e-4)
