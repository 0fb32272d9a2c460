"""Steady-state analysis: Leontief inverse, multipliers, labour content, balanced growth.

Pure array functions; :class:`~growthplan.Economy` wraps them with sector labels.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any, NamedTuple, TypeAlias, cast

import numpy as np
import pandas as pd
from scipy import optimize, sparse
from scipy.sparse import csgraph
from scipy.sparse import linalg as splinalg

from ..errors import NoBalancedGrowth, invalid

_ARPACK_FAILURES = (splinalg.ArpackNoConvergence, splinalg.ArpackError)

# a square non-negative matrix, dense or scipy sparse
SquareMatrix: TypeAlias = "np.ndarray | sparse.sparray | sparse.spmatrix"

__all__ = [
    "BalancedGrowth",
    "spectral_radius",
    "hawkins_simon",
    "leontief_inverse",
    "structure",
    "perron",
    "Perron",
    "power_iteration",
    "dynamic_growth",
]

DENSE_LIMIT = 400  # above this many sectors, eigen-solvers work on sparse matrices
DENSE_FALLBACK = 3000  # when ARPACK fails, a dense eigen-solve up to this size
ARPACK_STEPS = 1000  # restarts before ARPACK is given up (it converges in a few when it can)


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
        What produced the proportions: ``"eigen"``, ``"sparse-eigen"``,
        ``"power"`` (also when a repeated Perron root left the eigen-solver's
        vector with mixed signs), ``"lp"`` (the non-negative null space of
        ``M − ρI`` found by a linear programme) or ``"root"``.
    iterations : int
        Power-iteration steps (0 for direct eigen-solvers).
    residual : float
        ``‖M v − ρ v‖₁ / ‖v‖₁`` of the returned vector.
    irreducible : bool
        Whether every sector feeds every other, directly or indirectly.
    period : int
        Index of imprimitivity (1 for a primitive matrix).
    unique : bool
        False when the Perron root is repeated with several independent
        eigenvectors (independent parts of a reducible economy with the same
        growth limit): the proportions are then one balanced ray of many.
    notes : list of str
        Plain-language remarks on the structure.
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
    unique: bool = True

    def __repr__(self) -> str:
        top = ", ".join(f"{k}={v:.4f}" for k, v in self.proportions.items())
        return (f"BalancedGrowth(rate={self.rate:.6f}, method={self.method!r}, "
                f"proportions=[{top}])")


def _as_operator(m: SquareMatrix) -> sparse.sparray | sparse.spmatrix:
    return sparse.csr_array(m) if not sparse.issparse(m) else m


def _dense(m: SquareMatrix) -> np.ndarray:
    # scipy has no type stubs: issparse does not narrow the union
    return cast(Any, m).toarray() if sparse.issparse(m) else np.asarray(m, dtype=float)


def _shift_invert(m: SquareMatrix) -> tuple[float, np.ndarray]:
    """Perron root and vector by ARPACK in shift-invert mode about ``σ`` just above ``ρ``.

    For a non-negative matrix every eigenvalue has ``|λ| ≤ ρ``, and ``ρ`` is at
    most the smallest of the largest column and row sums. For a real
    ``σ > ρ``, ``|σ − λ| ≥ σ − Re λ ≥ σ − ρ`` with equality only at ``λ = ρ``
    (Perron–Frobenius theory), so ``ρ`` is the eigenvalue nearest ``σ``, found
    in a few steps even when a long cycle puts every eigenvalue on ``|λ| = ρ``
    (where plain ARPACK does not converge).
    """
    op = sparse.csc_array(_as_operator(m).astype(float))
    mag = abs(op)
    bound = float(min(mag.sum(axis=0).max(), mag.sum(axis=1).max()))
    sigma = bound * (1.0 + 1e-6) + 1e-300
    vals, vecs = splinalg.eigs(op, k=1, sigma=sigma, which="LM", tol=1e-13,
                               maxiter=ARPACK_STEPS)
    return float(vals[0].real), vecs[:, 0]


def spectral_radius(m: SquareMatrix) -> float:
    """Spectral radius of a non-negative matrix (dense ``eig`` or ARPACK for large n).

    When ARPACK does not converge (long cycles put many eigenvalues on the
    circle ``|λ| = ρ``) its shift-invert mode takes over (see
    :func:`perron`), then the dense solver up to :data:`DENSE_FALLBACK`
    sectors, the damped power iteration beyond.
    """
    n = m.shape[0]
    if n == 0:
        return 0.0
    if n <= DENSE_LIMIT:
        return float(np.max(np.abs(np.linalg.eigvals(_dense(m)))))
    try:
        vals = splinalg.eigs(_as_operator(m).astype(float), k=1, which="LM",
                             return_eigenvectors=False, tol=1e-12, maxiter=ARPACK_STEPS)
        return float(np.abs(vals[0]))
    except _ARPACK_FAILURES:
        pass
    try:
        return abs(_shift_invert(m)[0])
    except (*_ARPACK_FAILURES, RuntimeError):
        if n <= DENSE_FALLBACK:
            return float(np.max(np.abs(np.linalg.eigvals(_dense(m)))))
        return power_iteration(m)[0]


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


def structure(m: SquareMatrix) -> tuple[bool, int]:
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


class Perron(NamedTuple):
    """Result of :func:`perron`."""

    rho: float
    vector: np.ndarray
    method: str
    iterations: int
    residual: float
    unique: bool


def _residual(m: SquareMatrix, v: np.ndarray, rho: float) -> float:
    return float(np.abs(m @ v - rho * v).sum() / np.abs(v).sum())


def _accept(m: SquareMatrix) -> float:
    """Largest residual ``‖Mv − ρv‖₁/‖v‖₁`` accepted for a computed Perron vector."""
    norm = float(abs(m).sum(axis=0).max()) if m.shape[0] else 0.0
    return 1e-9 * max(1.0, norm)


def _nullity(m: SquareMatrix, rho: float, vals: np.ndarray | None) -> int:
    """Independent eigenvectors for ``rho``: numerical nullity of ``M − ρI``.

    Checked by an SVD only when the eigenvalues show ``rho`` more than once
    (a defective root such as a Jordan block has a repeated eigenvalue but one
    eigenvector, so counting eigenvalues alone would overstate it).
    """
    n = m.shape[0]
    if vals is not None:
        close = np.abs(vals - rho) <= 1e-6 * max(abs(rho), 1e-300)
        if np.count_nonzero(close) < 2:
            return 1
    if n > DENSE_FALLBACK:
        return 1  # too large to decide by an SVD; reported as unique
    sv = np.linalg.svd(_dense(m) - rho * np.eye(n), compute_uv=False)
    return max(1, int(np.count_nonzero(sv <= 1e-9 * max(1.0, float(sv[0]) if sv.size else 1.0))))


def _nonneg_null_vector(m: SquareMatrix, rho: float) -> np.ndarray | None:
    """A vector ``v ≥ 0``, ``Σ v = 1`` with least ``‖(M − ρI) v‖₁``, by a linear programme."""
    n = m.shape[0]
    shifted = sparse.csr_array(_as_operator(m).astype(float)) - rho * sparse.eye_array(n)
    eye = sparse.eye_array(n)
    # variables (v, s+, s-): minimise Σ s+ + Σ s-  s.t.  (M − ρI) v − s+ + s- = 0, Σ v = 1
    a_eq = sparse.vstack([sparse.hstack([shifted, -eye, eye]),
                          sparse.hstack([sparse.csr_array(np.ones((1, n))),
                                         sparse.csr_array((1, 2 * n))])]).tocsc()
    b_eq = np.zeros(n + 1)
    b_eq[-1] = 1.0
    c = np.concatenate([np.zeros(n), np.ones(2 * n)])
    res = optimize.linprog(c, A_eq=a_eq, b_eq=b_eq, bounds=(0, None), method="highs")
    if res.status != 0:
        return None
    v = np.clip(res.x[:n], 0.0, None)
    return v / v.sum() if v.sum() > 0 else None


def perron(m: SquareMatrix, *, method: str = "eigen", tol: float = 1e-12,
           max_iter: int = 100_000) -> Perron:
    """Perron root and a non-negative Perron vector of ``m``.

    By Perron–Frobenius theory every non-negative matrix has a non-negative
    eigenvector for its spectral radius ``ρ``. When the eigen-solver returns
    one with parts of both signs, ``ρ`` is a repeated root (independent parts
    of a reducible matrix with the same growth limit) and its eigenspace holds
    non-negative vectors the solver did not pick. They are then found by the
    damped power iteration from equal proportions (the ray that iteration
    reaches) or, when it is slow, by a linear programme for ``v ≥ 0``,
    ``Σ v = 1`` with least ``‖(M − ρI) v‖₁``; either is kept only when its
    residual is below ``1e-9 · max(1, ‖M‖₁)``. A repeated root with several
    independent eigenvectors is reported as not unique, and then the power
    iteration's ray is returned whatever the solver picked, so the two methods
    agree.

    Above :data:`DENSE_LIMIT` sectors ARPACK is used; when it does not
    converge (long cycles), its shift-invert mode about a real shift just
    above ``ρ`` (``ρ`` is then the nearest eigenvalue), then a dense solve up
    to :data:`DENSE_FALLBACK` sectors and the damped power iteration beyond.

    Returns
    -------
    Perron
        ``(rho, vector, method, iterations, residual, unique)``.

    Raises
    ------
    NoBalancedGrowth
        When no non-negative vector satisfies ``M v = ρ v`` to the tolerance
        (only possible for a matrix with negative entries) or the iteration
        fails.
    """
    n = m.shape[0]
    if method == "power":
        rho, v, it = power_iteration(m, tol=tol, max_iter=max_iter)
        # above the dense limit an SVD would cost O(n³): reported as unique
        unique = n > DENSE_LIMIT or _nullity(m, rho, np.linalg.eigvals(_dense(m))) == 1
        return Perron(rho, v, "power", it, _residual(m, v, rho), unique)
    if method != "eigen":
        raise invalid("method", "be 'eigen' or 'power'", method)
    vals: np.ndarray | None = None
    raw: np.ndarray | None = None
    used = "eigen"
    if n > DENSE_LIMIT:
        try:
            top, vecs = splinalg.eigs(_as_operator(m).astype(float), k=1, which="LR",
                                      tol=1e-13, maxiter=ARPACK_STEPS)
            rho, raw, used = float(top[0].real), vecs[:, 0], "sparse-eigen"
        except _ARPACK_FAILURES:
            try:
                rho, raw = _shift_invert(m)
                used = "sparse-eigen"
            except (*_ARPACK_FAILURES, RuntimeError):
                raw = None
            if raw is None and n > DENSE_FALLBACK:
                rho, v, it = power_iteration(m, tol=tol, max_iter=max_iter)
                return Perron(rho, v, "power", it, _residual(m, v, rho), True)
    if raw is None:
        vals, vecs = np.linalg.eig(_dense(m))
        k = int(np.argmax(vals.real))
        rho, raw = float(vals[k].real), vecs[:, k]
    limit = _accept(m)
    found = _fix_sign(raw, 1e-9)
    # a positive vector from ARPACK is taken as unique (an SVD would cost O(n³))
    nullity = 1 if (found is not None and vals is None) else _nullity(m, rho, vals)
    it = 0
    if found is None or nullity > 1:
        nnz = cast(Any, m).nnz if sparse.issparse(m) else n * n
        steps = int(min(max_iter, 20_000, max(200, 5e8 // max(nnz, 1))))
        try:
            _, p_v, p_it = power_iteration(m, tol=tol, max_iter=steps)
        except NoBalancedGrowth:
            p_v = None
        if p_v is not None and _residual(m, p_v, rho) <= limit:
            found, used, it = p_v, "power", p_it
        elif found is None:
            found, used = _nonneg_null_vector(m, rho), "lp"
    if found is None or _residual(m, found, rho) > limit:
        raise NoBalancedGrowth(
            "No eigenvector of the Perron root has non-negative parts only (to a residual "
            f"of {limit:.1e}), so the system has no balanced-growth ray with non-negative "
            "proportions.")
    return Perron(rho, found, used, it, _residual(m, found, rho), nullity == 1)


def power_iteration(m: SquareMatrix, *, tol: float = 1e-12, max_iter: int = 100_000,
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


def dynamic_growth(a: np.ndarray, b: np.ndarray,
                   deliveries_per_capacity: Sequence[Callable[[float], float]],
                   utilisation: np.ndarray, *, g_max: float = 10.0) -> tuple[float, np.ndarray]:
    """Largest ``g`` with ``ρ(A + B K(g) U⁻¹) = 1`` and its ray.

    ``K(g)`` is the diagonal of capital deliveries per unit of capacity on a
    path growing at ``g`` (from the retirement profiles, lead times and
    spending profiles); with geometric retirement at ``δ`` and one-year lead
    times it is ``g + δ``, and the condition is ``(I − A − BD) x = g B x``.
    """
    def radius(g: float) -> float:
        k = np.array([f(g) for f in deliveries_per_capacity])
        with np.errstate(over="ignore", invalid="ignore"):
            mat = a + b * (k / utilisation)[None, :]
        # huge capital coefficients overflow: that capital cannot be replaced at g
        return spectral_radius(mat) if np.all(np.isfinite(mat)) else math.inf

    # bracket the root with radius(lo) < 1 <= radius(hi); the radius rises with g
    if radius(0.0) >= 1:  # no growth even at g = 0: look for the rate of decline
        hi, lo = 0.0, -0.02
        while radius(lo) >= 1:
            if lo <= -0.9:
                raise NoBalancedGrowth("Even shrinking at 90 % a year the economy cannot "
                                       "replace its capital: no balanced growth path exists.")
            hi, lo = lo, max(2.0 * lo, -0.9)
    else:
        lo, hi = 0.0, 0.1
        while radius(hi) < 1:
            lo, hi = hi, 2.0 * hi + 0.1
            if hi > g_max:
                raise NoBalancedGrowth("Balanced growth is unbounded: capital coefficients "
                                       "are too small to limit growth.")
    g = optimize.brentq(lambda x: radius(x) - 1.0, lo, hi, xtol=1e-14, rtol=1e-13)
    k = np.array([f(g) for f in deliveries_per_capacity])
    m = a + b * (k / utilisation)[None, :]
    return float(g), perron(m).vector


def fmt_rate(g: float) -> str:
    """A growth rate as a percentage with three decimals, or ``n/a`` when not finite."""
    return f"{100 * g:.3f} %" if math.isfinite(g) else "n/a"
