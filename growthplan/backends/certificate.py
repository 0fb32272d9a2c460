"""Scaling and the optimality certificate, shared by every back end.

:func:`equilibrate` brings matrix entries near 1 by powers of two (so the
scaling adds no rounding error); :func:`scaled` applies it to a programme;
:func:`optimality_gap` checks a primal–dual pair against the unscaled LP,
whatever a solver's status text says.
"""

from __future__ import annotations

import numpy as np
from scipy import sparse

from ..lp.program import LinearProgram

__all__ = ["equilibrate", "scaled", "optimality_gap", "valid_ray", "entry_range",
           "SCALE_RANGE", "GAP_TOLERANCE"]

SCALE_RANGE = 1e8     # matrices whose entries span more than this are equilibrated first
GAP_TOLERANCE = 1e-7  # relative duality gap that certifies an optimum


def entry_range(lp: LinearProgram) -> float:
    """Largest over smallest absolute nonzero entry of the matrix (1 when empty)."""
    data = np.abs(lp.matrix.data)
    data = data[data > 0]
    return float(data.max() / data.min()) if data.size else 1.0


def equilibrate(lp: LinearProgram, passes: int = 3) -> tuple[np.ndarray, np.ndarray]:
    """Row and column factors (powers of two) that bring the matrix entries near 1.

    Alternating geometric-mean scaling on base-2 exponents: each pass divides
    every row, then every column, by the square root of its largest times its
    smallest absolute entry, rounded to a power of two. Returns ``(r, c)``;
    the scaled matrix is ``diag(r) M diag(c)``.
    """
    m = sparse.csr_array(abs(lp.matrix))
    m.data = np.log2(m.data)
    r = np.zeros(m.shape[0])
    c = np.zeros(m.shape[1])
    rows = np.repeat(np.arange(m.shape[0]), np.diff(m.indptr))
    cols = m.indices
    base = m.data
    for _ in range(passes):
        e = base + r[rows] + c[cols]
        r -= np.round(_mid(e, rows, m.shape[0]))
        e = base + r[rows] + c[cols]
        c -= np.round(_mid(e, cols, m.shape[1]))
    return np.exp2(r), np.exp2(c)


def _mid(e: np.ndarray, index: np.ndarray, size: int) -> np.ndarray:
    """(max + min) / 2 of the exponents ``e`` grouped by ``index`` (0 for empty lines)."""
    hi = np.full(size, -np.inf)
    lo = np.full(size, np.inf)
    np.maximum.at(hi, index, e)
    np.minimum.at(lo, index, e)
    return np.where(np.isfinite(hi), (hi + lo) / 2.0, 0.0)


def scaled(lp: LinearProgram, r: np.ndarray, c: np.ndarray) -> LinearProgram:
    """``lp`` in scaled variables ``v = diag(c) v'`` and rows multiplied by ``r``."""
    m = sparse.csc_array(sparse.diags_array(r) @ lp.matrix @ sparse.diags_array(c))
    with np.errstate(invalid="ignore"):
        return lp.replace(matrix=m, cost=lp.cost * c, row_lower=lp.row_lower * r,
                          row_upper=lp.row_upper * r, col_lower=lp.col_lower / c,
                          col_upper=lp.col_upper / c, stages=[])


def optimality_gap(lp: LinearProgram, x: np.ndarray, y: np.ndarray, *,
                   strict: bool = False) -> float:
    """Relative gap between the primal objective and the dual bound of ``(x, y)``.

    ``y`` are row duals in the model's own sense (d objective / d row bound).
    Duals of the wrong sign for their row, or reduced costs that point at a
    missing bound, make the dual bound infinite. Zero (to rounding) certifies
    that ``x`` is optimal.

    The gap is relative to the objective's own size, ``max(|primal|, |dual|)``
    (with a floor of ``1e-6 max|c| max|x|`` for an optimum of zero), so it
    means the same whatever unit the objective is measured in. ``strict`` is
    kept for callers of the earlier signature and changes nothing.
    """
    sigma = 1.0 if lp.sense == "max" else -1.0
    row_sign = lp.row_sign
    value = sigma * row_sign * y  # ≥ 0 for a dual-feasible y
    # duals read back from text files carry about 8 significant digits: a relative slack
    scale = max(1.0, float(np.abs(y).max(initial=0.0)) * float(np.abs(lp.matrix.data).max(
        initial=0.0)), float(np.abs(lp.cost).max(initial=0.0)))
    tol = 1e-6 * scale
    if not np.all(np.isfinite(y)) or not np.all(np.isfinite(x)) or np.any(value < -tol):
        return float("inf")
    rhs = np.where(row_sign > 0, lp.row_upper, lp.row_lower)
    rc = lp.cost - lp.matrix.T @ y
    bound = np.zeros_like(rc)
    up = sigma * rc > tol
    lo = sigma * rc < -tol
    if np.any(up & ~np.isfinite(lp.col_upper)) or np.any(lo & ~np.isfinite(lp.col_lower)):
        return float("inf")
    bound[up] = lp.col_upper[up]
    bound[lo] = lp.col_lower[lo]
    # A reduced cost within the tolerance still counts at the finite bound its sign
    # points at, so the dual bound stays a valid one (weak duality): a fixed column (starts
    # held at another plan's) gives no false gap, and a column at a ceiling with a small
    # reduced cost of the wrong sign keeps the gap it really opens. Only a small reduced
    # cost pointing at an infinite bound is dropped (a perturbation of y).
    small = ~(up | lo)
    fixed = small & np.isfinite(lp.col_lower) & (lp.col_lower == lp.col_upper)
    bound[fixed] = lp.col_lower[fixed]
    to_up = small & ~fixed & (sigma * rc > 0) & np.isfinite(lp.col_upper)
    to_lo = small & ~fixed & (sigma * rc < 0) & np.isfinite(lp.col_lower)
    bound[to_up] = lp.col_upper[to_up]
    bound[to_lo] = lp.col_lower[to_lo]
    dual = float(np.sum(np.where(np.isfinite(rhs), rhs, 0.0) * y) + np.sum(rc * bound))
    primal = float(lp.cost @ x)
    # relative to the objective's own size, never to a fixed 1: an objective in
    # small units (labour in millions of person-years, say) would otherwise pass
    # on any feasible point; the floor only matters for an optimum of zero
    size = max(abs(primal), abs(dual),
               1e-6 * float(np.abs(lp.cost).max(initial=0.0)) * float(np.abs(x).max(initial=0.0)))
    return abs(dual - primal) / size if size > 0 else 0.0


def valid_ray(lp: LinearProgram, ray: np.ndarray, tol: float = 1e-7) -> bool:
    """Whether ``ray`` is a direction of unbounded improvement of ``lp``.

    Every row with a finite upper (lower) bound must not rise (fall) along it,
    every column with a finite bound must not cross it, and the objective must
    improve; each to ``tol`` relative to the size of the terms.
    """
    if ray is None or not np.all(np.isfinite(ray)) or not np.any(ray):
        return False
    r = ray / np.abs(ray).max()
    ar = lp.matrix @ r
    size = np.abs(lp.matrix) @ np.abs(r) + 1e-300
    rows_ok = np.all(np.where(np.isfinite(lp.row_upper), ar <= tol * size, True)) and \
        np.all(np.where(np.isfinite(lp.row_lower), ar >= -tol * size, True))
    cols_ok = np.all(np.where(np.isfinite(lp.col_upper), r <= tol, True)) and \
        np.all(np.where(np.isfinite(lp.col_lower), r >= -tol, True))
    gain = float(lp.cost @ r) * (1.0 if lp.sense == "max" else -1.0)
    return bool(rows_ok and cols_ok and gain > tol * float(np.abs(lp.cost) @ np.abs(r)))
