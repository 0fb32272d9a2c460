"""Updating a matrix to new row and column totals: RAS and GRAS.

RAS scales the rows and columns of a non-negative matrix, ``X = r̂ A ŝ``,
until its row sums are ``u`` and its column sums ``v``; the result is the
matrix closest to ``A`` in the sense of minimum information (cross-entropy)
among those with these totals and the zero pattern of ``A`` (Miller & Blair
2009, section 7.4).

GRAS (Junius & Oosterhaven 2003) extends it to matrices with negative
entries: with ``A = P − N`` (positive and negative parts),
``x_ij = r_i p_ij s_j − n_ij / (r_i s_j)``, so every entry keeps its sign.
Each row multiplier solves ``r p_i(s) − n_i(s) / r = u_i``; when a row has no
positive entry the closed form of Junius & Oosterhaven divides by zero, and
the correction of Temurshoev, Miller & Bouwmeester (2013) gives
``r_i = −n_i / u_i`` (columns alike). GRAS is the minimiser of
``Σ |a_ij| z_ij ln(z_ij / e)`` with ``z_ij = x_ij / a_ij`` under the totals.

Cells can be fixed (kept at given values): their values are taken off the
totals and the other cells are balanced to what remains.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
import pandas as pd

from ..errors import invalid

__all__ = ["Balanced", "ras", "gras"]


@dataclass(frozen=True)
class Balanced:
    """A balanced matrix and how the iteration went.

    Attributes
    ----------
    matrix : DataFrame or ndarray
        The balanced matrix (a DataFrame when the input was one).
    row_multipliers, column_multipliers : ndarray
        ``r`` and ``s`` (1 for rows or columns with no free entry).
    iterations : int
        Row-and-column sweeps done.
    converged : bool
        Whether the largest gap fell to the tolerance.
    max_gap : float
        Largest absolute gap between a row or column sum and its total.
    """

    matrix: Any
    row_multipliers: np.ndarray
    column_multipliers: np.ndarray
    iterations: int
    converged: bool
    max_gap: float


def ras(matrix: Any, row_totals: Any, column_totals: Any, *, fixed: Any = None,
        tolerance: float = 1e-12, max_iterations: int = 10_000,
        consistency: float = 1e-9, strict: bool = True) -> Balanced:
    """Scale a non-negative matrix to the given row and column totals (RAS).

    Parameters
    ----------
    matrix : DataFrame or array_like, shape (m, n)
        The prior matrix, entries >= 0.
    row_totals : Series or array_like, shape (m,)
        Target row sums, >= 0.
    column_totals : Series or array_like, shape (n,)
        Target column sums, >= 0.
    fixed : DataFrame or array_like of bool, optional
        Cells kept at their values in ``matrix``.
    tolerance : float, default 1e-12
        Largest gap allowed, relative to the largest total.
    max_iterations : int, default 10000
    consistency : float, default 1e-9
        Largest difference allowed between the sum of the row totals and the
        sum of the column totals, relative to the larger.
    strict : bool, default True
        Raise when the iteration does not converge; with False the last
        iterate is returned with ``converged=False``.

    Returns
    -------
    Balanced

    Raises
    ------
    InvalidInput
        A negative entry or total; totals that do not add up to the same sum;
        a positive total on a row or column with no free positive entry; no
        convergence (the zero pattern cannot carry the totals) when ``strict``.
    """
    a, u, v, labels = _inputs(matrix, row_totals, column_totals)
    neg = np.argwhere(a < 0)
    if neg.size:
        i, j = neg[0]
        raise invalid(f"matrix[{_name(labels, 0, i)}, {_name(labels, 1, j)}]",
                      "be >= 0 for RAS (use GRAS for matrices with negative entries)",
                      float(a[i, j]))
    for what, t, axis in (("row_totals", u, 0), ("column_totals", v, 1)):
        if np.any(t < 0):
            k = int(np.argmax(t < 0))
            raise invalid(f"{what}[{_name(labels, axis, k)}]", "be >= 0 for RAS", float(t[k]))
    return _balance(a, u, v, labels, fixed, tolerance, max_iterations, consistency, strict)


def gras(matrix: Any, row_totals: Any, column_totals: Any, *, fixed: Any = None,
         tolerance: float = 1e-12, max_iterations: int = 10_000,
         consistency: float = 1e-9, strict: bool = True) -> Balanced:
    """Scale a matrix with entries of either sign to the given totals (GRAS).

    Every entry keeps its sign; zeros stay zero. Parameters, result and
    errors as :func:`ras`, except that entries and totals may be negative.

    Returns
    -------
    Balanced
    """
    a, u, v, labels = _inputs(matrix, row_totals, column_totals)
    return _balance(a, u, v, labels, fixed, tolerance, max_iterations, consistency, strict)


# -- internals -----------------------------------------------------------------

def _name(labels: tuple[list[str], list[str]] | None, axis: int, k: int) -> str:
    return str(k) if labels is None else labels[axis][k]


def _vector(t: Any, names: list[str] | None, size: int, field: str) -> np.ndarray:
    if isinstance(t, pd.Series) and names is not None:
        missing = [n for n in names if n not in t.index]
        unknown = [str(n) for n in t.index if n not in names]
        if missing or unknown:
            raise invalid(field, f"have the labels of the matrix (missing {missing}; unknown "
                          f"{unknown})", list(t.index))
        t = t.loc[names]
    try:
        arr = np.asarray(t, dtype=float).ravel()
    except (TypeError, ValueError):
        raise invalid(field, "hold numbers", t) from None
    if arr.size != size:
        raise invalid(field, f"have {size} entries", f"{arr.size} entries")
    if not np.all(np.isfinite(arr)):
        raise invalid(field, "hold finite numbers", arr)
    return arr


def _inputs(matrix: Any, u: Any, v: Any
            ) -> tuple[np.ndarray, np.ndarray, np.ndarray, tuple[list[str], list[str]] | None]:
    labels = None
    if isinstance(matrix, pd.DataFrame):
        labels = ([str(x) for x in matrix.index], [str(x) for x in matrix.columns])
        matrix = matrix.copy()
        matrix.index, matrix.columns = labels
    try:
        a = np.asarray(matrix, dtype=float)
    except (TypeError, ValueError):
        raise invalid("matrix", "hold numbers", matrix) from None
    if a.ndim != 2 or a.size == 0:
        raise invalid("matrix", "be a non-empty two-dimensional table", f"shape {a.shape}")
    if not np.all(np.isfinite(a)):
        i, j = np.argwhere(~np.isfinite(a))[0]
        raise invalid(f"matrix[{_name(labels, 0, i)}, {_name(labels, 1, j)}]", "be finite",
                      float(a[i, j]))
    uu = _vector(u, None if labels is None else labels[0], a.shape[0], "row_totals")
    vv = _vector(v, None if labels is None else labels[1], a.shape[1], "column_totals")
    return a, uu, vv, labels


def _fixed_mask(fixed: Any, shape: tuple[int, ...], labels: Any) -> np.ndarray:
    if fixed is None:
        return np.zeros(shape, dtype=bool)
    if isinstance(fixed, pd.DataFrame) and labels is not None:
        fixed = fixed.reindex(index=labels[0], columns=labels[1]).fillna(False)
    mask = np.asarray(fixed, dtype=bool)
    if mask.shape != shape:
        raise invalid("fixed", f"have the shape of the matrix {shape}", f"shape {mask.shape}")
    return mask


def _update(p: np.ndarray, n: np.ndarray, target: np.ndarray) -> np.ndarray:
    """Multipliers m with ``m p − n / m = target`` (the positive root).

    ``p == 0``: ``m = −n / target`` (the correction of Temurshoev, Miller &
    Bouwmeester 2013); ``p == n == 0``: an empty line, ``m = 1``. The root is
    written as ``2n / (sqrt(t² + 4pn) − t)`` when ``t < 0`` so that it does not
    lose digits to cancellation.
    """
    m = np.ones_like(target)
    disc = np.sqrt(target * target + 4.0 * p * n)
    both = p > 0
    pos = both & (target >= 0)
    m[pos] = (target[pos] + disc[pos]) / (2.0 * p[pos])
    negt = both & (target < 0)
    m[negt] = 2.0 * n[negt] / (disc[negt] - target[negt])
    only_neg = (p == 0) & (n > 0)
    with np.errstate(divide="ignore"):
        m[only_neg] = n[only_neg] / np.maximum(-target[only_neg], 0.0)  # inf: all vanish
    return m


def _fin(m: np.ndarray) -> np.ndarray:
    """Multipliers for positive parts: an infinite one stands only beside zeros."""
    return np.where(np.isinf(m), 0.0, m)


def _inv(m: np.ndarray) -> np.ndarray:
    """1 / m for negative parts: a zero multiplier stands only beside zeros."""
    return np.where((m > 0) & np.isfinite(m), 1.0 / np.where(m > 0, m, 1.0), 0.0)


def _entries(p: np.ndarray, n: np.ndarray, r: np.ndarray, s: np.ndarray) -> np.ndarray:
    return _fin(r)[:, None] * p * _fin(s)[None, :] - n * _inv(r)[:, None] * _inv(s)[None, :]


def _balance(a: np.ndarray, u: np.ndarray, v: np.ndarray, labels: Any, fixed: Any,
             tolerance: float, max_iterations: int, consistency: float,
             strict: bool) -> Balanced:
    mask = _fixed_mask(fixed, a.shape, labels)
    free = np.where(mask, 0.0, a)
    fixed_part = np.where(mask, a, 0.0)
    scale = max(float(np.abs(u).max()), float(np.abs(v).max()), 1e-300)
    su, sv = float(u.sum()), float(v.sum())
    if abs(su - sv) > consistency * max(abs(su), abs(sv), 1e-300):
        raise invalid("row_totals", "add up to the sum of the column totals (within "
                      f"{consistency:g} of it)", f"{su:.12g} against {sv:.12g}")
    uf = u - fixed_part.sum(axis=1)
    vf = v - fixed_part.sum(axis=0)
    p, n = np.maximum(free, 0.0), np.maximum(-free, 0.0)
    gap_tol = tolerance * scale
    for what, t, pos, negs, axis in (("row_totals", uf, p.sum(axis=1), n.sum(axis=1), 0),
                                     ("column_totals", vf, p.sum(axis=0), n.sum(axis=0), 1)):
        bad = ((t > gap_tol) & (pos == 0)) | ((t < -gap_tol) & (negs == 0))
        if bad.any():
            k = int(np.argmax(bad))
            sign = "positive" if t[k] > 0 else "negative"
            raise invalid(f"{what}[{_name(labels, axis, k)}]", f"be reachable: a {sign} total "
                          f"needs a free {sign} entry in its {'row' if axis == 0 else 'column'}"
                          " (the matrix has none there)", float((u if axis == 0 else v)[k]))
    r = np.ones(a.shape[0])
    s = np.ones(a.shape[1])
    gap = np.inf
    done = 0
    x = free
    with np.errstate(divide="ignore", invalid="ignore"):
        for it in range(1, max_iterations + 1):
            done = it
            r = _update(p @ _fin(s), n @ _inv(s), uf)
            s = _update(_fin(r) @ p, _inv(r) @ n, vf)
            x = _entries(p, n, r, s)
            gap = max(float(np.abs(x.sum(axis=1) - uf).max()),
                      float(np.abs(x.sum(axis=0) - vf).max()))
            if gap <= gap_tol:
                break
    x = x + fixed_part
    converged = gap <= gap_tol
    if strict and not converged:
        raise invalid("matrix", f"reach the totals within {max_iterations} iterations (its "
                      "zero pattern may not carry them; consider fixing fewer cells or "
                      "allowing entries where the totals need them)",
                      f"largest gap {gap:.3g}")
    out: Any = x if labels is None else pd.DataFrame(x, index=labels[0], columns=labels[1])
    return Balanced(matrix=out, row_multipliers=r, column_multipliers=s, iterations=done,
                    converged=converged, max_gap=gap)
