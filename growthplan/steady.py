"""Steady-state analysis: Leontief inverse, multipliers, labour content, balanced growth.

Pure array functions; :class:`~growthplan.Economy` wraps them with sector labels.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from scipy import optimize, sparse
from scipy.sparse import csgraph
from scipy.sparse import linalg as splinalg

from .errors import NoBalancedGrowth, invalid

__all__ = [
    "BalancedGrowth",
    "spectral_radius",
    "hawkins_simon",
    "leontief_inverse",
    "structure",
    "perron",
    "power_iteration",
    "dynamic_growth",
]

DENSE_LIMIT = 400  # above this many sectors, eigen-solvers work on sparse matrices


@dataclass(frozen=True)
class BalancedGrowth:
    """The maximal balanced growth of an economy.

    Attributes
    ----------
    rate : float
        Growth rate ``g`` per year (0.05 for 5 %).
    factor : float
        ``1 + g``.
    proportions : pandas.Series
        Output proportions on the balanced ray, non-negative, summing to 1.
    spectral_radius : float
        Perron root of the matrix whose inverse gives the growth factor.
    method : str
        ``"eigen"``, ``"sparse-eigen"``, ``"power"`` or ``"root"``.
    iterations : int
        Power-iteration steps (0 for direct eigen-solvers).
    residual : float
        ``‖M v − ρ v‖₁ / ‖v‖₁`` of the returned vector.
    irreducible : bool
        Whether every sector feeds every other, directly or indirectly.
    period : int
        Index of imprimitivity (1 for a primitive matrix).
    """

    rate: float
    factor: float
    proportions: pd.Series
    spectral_radius: float
    method: str
    iterations: int = 0
    residual: float = 0.0
    irreducible: bool = True
    period: int = 1
    notes: list[str] = field(default_factory=list)

    def __repr__(self) -> str:
        top = ", ".join(f"{k}={v:.4f}" for k, v in self.proportions.items())
        return (f"BalancedGrowth(rate={self.rate:.6f}, method={self.method!r}, "
                f"proportions=[{top}])")


def _as_operator(m):
    return sparse.csr_array(m) if not sparse.issparse(m) else m


def spectral_radius(m) -> float:
    """Spectral radius of a non-negative matrix (dense ``eig`` or ARPACK for large n)."""
    n = m.shape[0]
    if n == 0:
        return 0.0
    if n <= DENSE_LIMIT:
        dense = m.toarray() if sparse.issparse(m) else np.asarray(m)
        return float(np.max(np.abs(np.linalg.eigvals(dense))))
    vals = splinalg.eigs(_as_operator(m).astype(float), k=1, which="LM",
                         return_eigenvectors=False, tol=1e-12, maxiter=20 * n)
    return float(np.abs(vals[0]))


def hawkins_simon(a: np.ndarray) -> tuple[bool, np.ndarray]:
    """Hawkins–Simon condition: all leading principal minors of ``I − A`` positive.

    Returns
    -------
    (holds, minors)
    """
    ia = np.eye(a.shape[0]) - a
    minors = np.array([np.linalg.det(ia[:k, :k]) for k in range(1, a.shape[0] + 1)])
    return bool(np.all(minors > 0)), minors


def leontief_inverse(a: np.ndarray) -> np.ndarray:
    """``(I − A)^-1``."""
    return np.linalg.solve(np.eye(a.shape[0]) - a, np.eye(a.shape[0]))


def structure(m) -> tuple[bool, int]:
    """(irreducible, period) of the non-negative matrix ``m`` from its graph.

    The period of an irreducible matrix is the gcd over its edges ``u → v`` of
    ``level(u) + 1 − level(v)`` for breadth-first levels from any vertex.
    """
    g = sparse.csr_array(np.abs(m) > 0) if not sparse.issparse(m) else (abs(m) > 0).tocsr()
    n = g.shape[0]
    ncomp, _ = csgraph.connected_components(g, directed=True, connection="strong")
    if ncomp > 1:
        return False, 0
    order, pred = csgraph.breadth_first_order(g, 0, directed=True, return_predecessors=True)
    level = np.zeros(n, dtype=np.int64)
    for v in order[1:]:
        level[v] = level[pred[v]] + 1
    coo = g.tocoo()
    diffs = np.abs(level[coo.row] + 1 - level[coo.col])
    period = int(np.gcd.reduce(diffs[diffs > 0])) if np.any(diffs > 0) else 0
    if period == 0:  # every edge steps exactly one level: a pure cycle structure
        period = int(np.gcd.reduce(level[coo.row] + 1))
    return True, max(period, 1)


def _fix_sign(v: np.ndarray, tol: float) -> np.ndarray | None:
    v = np.real(v)
    v = v if v.sum() >= 0 else -v
    scale = np.max(np.abs(v))
    if scale == 0 or np.any(v < -tol * scale):
        return None
    v = np.where(v < 0, 0.0, v)
    return v / v.sum()


def perron(m, *, method: str = "eigen", tol: float = 1e-12,
           max_iter: int = 100_000) -> tuple[float, np.ndarray, str, int, float]:
    """Perron root and a non-negative Perron vector of ``m``.

    Returns
    -------
    (rho, vector, method, iterations, residual)

    Raises
    ------
    NoBalancedGrowth
        When the leading eigenvector has parts of both signs (a reducible
        system without a non-negative ray) or the iteration fails.
    """
    n = m.shape[0]
    if method == "power":
        rho, v, it = power_iteration(m, tol=tol, max_iter=max_iter)
        used = "power"
    elif method == "eigen":
        it = 0
        if n <= DENSE_LIMIT:
            dense = m.toarray() if sparse.issparse(m) else np.asarray(m)
            vals, vecs = np.linalg.eig(dense)
            k = int(np.argmax(vals.real))
            rho, raw, used = float(vals[k].real), vecs[:, k], "eigen"
        else:
            vals, vecs = splinalg.eigs(_as_operator(m).astype(float), k=1, which="LR",
                                       tol=1e-13, maxiter=50 * n)
            rho, raw, used = float(vals[0].real), vecs[:, 0], "sparse-eigen"
        found = _fix_sign(raw, 1e-9)
        if found is None:
            raise NoBalancedGrowth(
                "The leading eigenvector has parts of both signs, so the system has no "
                "balanced-growth ray with non-negative proportions (it is reducible: some "
                "sectors do not feed the others).")
        v = found
    else:
        raise invalid("method", "be 'eigen' or 'power'", method)
    mv = m @ v
    residual = float(np.abs(mv - rho * v).sum() / np.abs(v).sum())
    return rho, v, used, it, residual


def power_iteration(m, *, tol: float = 1e-12, max_iter: int = 100_000,
                    start: np.ndarray | None = None) -> tuple[float, np.ndarray, int]:
    """Damped power iteration for the Perron root and vector.

    Each step averages the input vector with the renormalised output vector,
    ``v ← (v + M v / ‖M v‖₁) / 2``, which converges for irreducible matrices
    even when they are periodic.

    Returns
    -------
    (rho, vector, iterations)
    """
    n = m.shape[0]
    v = np.full(n, 1.0 / n) if start is None else np.asarray(start, float) / np.sum(start)
    steps = 0
    for steps in range(1, max_iter + 1):  # noqa: B007 (the count is returned)
        w = m @ v
        total = w.sum()
        if total <= 0:
            raise NoBalancedGrowth("The power iteration reached a zero vector: the matrix "
                                   "has no positive balanced-growth ray.")
        new = 0.5 * (v + w / total)
        if np.abs(new - v).sum() < tol:
            v = new
            break
        v = new
    else:
        raise NoBalancedGrowth(f"The power iteration did not converge to {tol:g} in "
                               f"{max_iter} steps.")
    rho = float((m @ v).sum() / v.sum())
    return rho, v, steps


def dynamic_growth(a: np.ndarray, b: np.ndarray, deliveries_per_capacity,
                   utilisation: np.ndarray, *, g_max: float = 10.0) -> tuple[float, np.ndarray]:
    """Largest ``g`` with ``ρ(A + B K(g) U⁻¹) = 1`` and its ray.

    ``K(g)`` is the diagonal of capital deliveries per unit of capacity on a
    path growing at ``g`` (from the retirement profiles, lead times and
    spending profiles); with geometric retirement at ``δ`` and one-year lead
    times it is ``g + δ``, and the condition is ``(I − A − BD) x = g B x``.
    """
    def radius(g: float) -> float:
        k = np.array([f(g) for f in deliveries_per_capacity])
        return spectral_radius(a + b * (k / utilisation)[None, :])

    lo, hi = 0.0, 0.0
    while radius(lo) >= 1:  # no growth even at g = 0: look for the rate of decline
        lo = -0.02 if lo == 0 else lo * 2
        if lo < -0.9:
            raise NoBalancedGrowth("Even shrinking at 90 % a year the economy cannot "
                                   "replace its capital: no balanced growth path exists.")
    hi = lo + 0.1
    while radius(hi) < 1:
        lo, hi = hi, (hi + 0.1) * 2
        if hi > g_max:
            raise NoBalancedGrowth("Balanced growth is unbounded: capital coefficients are "
                                   "too small to limit growth.")
    g = optimize.brentq(lambda x: radius(x) - 1.0, lo, hi, xtol=1e-14, rtol=1e-13)
    k = np.array([f(g) for f in deliveries_per_capacity])
    m = a + b * (k / utilisation)[None, :]
    _, v, _, _, _ = perron(m)
    return float(g), v


def fmt_rate(g: float) -> str:
    return f"{100 * g:.3f} %" if math.isfinite(g) else "n/a"
