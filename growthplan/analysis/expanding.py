"""The von Neumann expanding economy with joint production.

Goods × processes matrices ``P`` (inputs) and ``Q`` (outputs). The expansion
factor is ``α* = max α`` such that ``Q y ≥ α P y`` for some intensities
``y ≥ 0``, ``Σ y = 1``; the interest factor is ``β* = min β`` such that
``pᵀ Q ≤ β pᵀ P`` for some prices ``p ≥ 0``, ``Σ p = 1``. Both are found by
bisection over a linear feasibility test (Kemeny, Morgenstern and Thompson,
1956). Always ``β* ≤ α*``.

When ``α* = β*``
----------------
Kemeny, Morgenstern and Thompson show that, when every process uses some
input and every good is produced by some process, there is at least one and
at most ``min(goods, processes)`` expansion factors with an economic solution
(``pᵀ Q y > 0``); ``β*`` is the smallest of them and ``α*`` the largest. They
coincide, and the factor is unique, when the system is irreducible
(indecomposable): no subset of goods and processes can grow on its own, so
every good is used or produced in a way that links all processes — for a
single-product system ``Q = I``, ``P = A`` that is an irreducible ``A``, where
``α* = β* = 1/ρ(A)``. A decomposable system can have several factors and then
``α* > β*``: with ``P = I`` and ``Q = diag(2, 3)`` the second good alone grows
threefold, so ``α* = 3``, while the first good priced alone earns only 2, so
``β* = 2`` (at ``α*`` the intensities and at ``β*`` the prices then give
``pᵀ Q y = 0``, shown in :attr:`ExpandingEconomy.value_of_output`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike
from scipy.optimize import linprog

from ..errors import SolverFailure, invalid

__all__ = ["ExpandingEconomy", "expanding_economy"]


@dataclass(frozen=True)
class ExpandingEconomy:
    """Result of :func:`expanding_economy`.

    Attributes
    ----------
    expansion_factor : float
        ``α*``, the largest uniform factor by which all goods can grow.
    interest_factor : float
        ``β*``, the smallest factor at which no process makes a profit.
    intensities : pandas.Series
        Process intensities ``y`` at ``α*`` (sum 1).
    prices : pandas.Series
        Goods prices ``p`` at ``β*`` (sum 1).
    value_of_output : float
        ``pᵀ Q y`` (positive for an economically meaningful solution).
    bisection_steps : int
        Feasibility LPs solved for each factor.
    """

    expansion_factor: float
    interest_factor: float
    intensities: pd.Series
    prices: pd.Series
    value_of_output: float
    bisection_steps: int

    @property
    def growth_rate(self) -> float:
        """``α* − 1``."""
        return self.expansion_factor - 1.0


def _max_min(m: np.ndarray) -> tuple[float, np.ndarray]:
    """``max_y min_i (m y)_i`` over the simplex, and the maximiser."""
    goods, procs = m.shape
    # variables (y, s): maximise s  s.t.  s - (m y)_i <= 0,  sum y = 1
    c = np.zeros(procs + 1)
    c[-1] = -1.0
    a_ub = np.hstack([-m, np.ones((goods, 1))])
    a_eq = np.zeros((1, procs + 1))
    a_eq[0, :procs] = 1.0
    res = linprog(c, A_ub=a_ub, b_ub=np.zeros(goods), A_eq=a_eq, b_eq=[1.0],
                  bounds=[(0, None)] * procs + [(None, None)], method="highs")
    if res.status != 0:
        raise SolverFailure(f"feasibility LP failed: {res.message}")
    return float(-res.fun), res.x[:procs]


def _bisect(test: Callable[[float], bool], lo: float, hi: float, tol: float) -> tuple[float, int]:
    steps = 0
    while hi - lo > tol * max(1.0, hi):
        mid = 0.5 * (lo + hi)
        steps += 1
        if test(mid):
            lo = mid
        else:
            hi = mid
    return lo, steps


def expanding_economy(inputs: ArrayLike | pd.DataFrame, outputs: ArrayLike | pd.DataFrame,
                      *, tol: float = 1e-11) -> ExpandingEconomy:
    """Expansion factor, interest factor, intensities and prices of a von Neumann economy.

    Parameters
    ----------
    inputs : array_like or DataFrame, shape (goods, processes)
        ``P``: goods used by each process at unit intensity.
    outputs : array_like or DataFrame, shape (goods, processes)
        ``Q``: goods produced (jointly) by each process at unit intensity.
    tol : float, default 1e-11
        Relative tolerance of the bisection.

    Returns
    -------
    ExpandingEconomy

    Examples
    --------
    A single-product economy (``Q = I``, ``P = A``) expands by ``1/ρ(A)``:

    >>> a = [[0.15, 0.25], [0.20, 0.05]]
    >>> r = expanding_economy(a, [[1, 0], [0, 1]])
    >>> round(r.expansion_factor, 6)
    3.038324

    A decomposable system has two factors, and ``α* > β*``:

    >>> r = expanding_economy([[1, 0], [0, 1]], [[2, 0], [0, 3]])
    >>> round(r.expansion_factor, 6), round(r.interest_factor, 6)
    (3.0, 2.0)
    """
    goods = procs = None
    if isinstance(inputs, pd.DataFrame):
        goods, procs = list(inputs.index), list(inputs.columns)
        if isinstance(outputs, pd.DataFrame):
            outputs = outputs.loc[goods, procs]
    p = np.asarray(inputs, dtype=float)
    q = np.asarray(outputs, dtype=float)
    if p.ndim != 2 or p.shape != q.shape:
        raise invalid("outputs", f"have the shape of inputs {p.shape}", f"shape {q.shape}")
    if not (np.all(np.isfinite(p)) and np.all(np.isfinite(q))) or (p < 0).any() or (q < 0).any():
        raise invalid("inputs", "and outputs hold finite numbers >= 0", "a negative or NaN entry")
    if np.any(p.sum(axis=0) <= 0):
        raise invalid("inputs", "give every process some input (else expansion is unbounded)",
                      np.nonzero(p.sum(axis=0) <= 0)[0].tolist())
    if np.any(q.sum(axis=1) <= 0):
        raise invalid("outputs", "give every good some process producing it",
                      np.nonzero(q.sum(axis=1) <= 0)[0].tolist())
    goods = goods or [f"good_{i + 1}" for i in range(p.shape[0])]
    procs = procs or [f"process_{j + 1}" for j in range(p.shape[1])]
    feas = 1e-12
    hi = float(np.max(q.sum(axis=0) / p.sum(axis=0))) * (1 + 1e-9) + 1e-12
    alpha, steps = _bisect(lambda a: _max_min(q - a * p)[0] >= -feas, 0.0, hi, tol)
    _, y = _max_min(q - alpha * p)
    hi_b = float(np.max(q.sum(axis=0) / np.maximum(p.sum(axis=0), 1e-300))) + 1.0
    hi_b = max(hi_b, float(np.max(np.where(p > 0, q / np.where(p > 0, p, 1), 0))) + 1.0)
    # β*: smallest β with min_p max_j (pᵀ(Q − βP))_j <= 0, i.e. max_p min_j pᵀ(βP − Q) >= 0
    beta_lo, steps_b = _bisect(lambda b: not (_max_min((b * p - q).T)[0] >= -feas), 0.0,
                               hi_b, tol)
    beta = beta_lo
    _, prices = _max_min(((beta + tol * max(1, beta)) * p - q).T)
    y = np.clip(y, 0, None)
    prices = np.clip(prices, 0, None)
    return ExpandingEconomy(
        expansion_factor=alpha, interest_factor=beta,
        intensities=pd.Series(y / y.sum(), index=pd.Index(procs), name="intensity"),
        prices=pd.Series(prices / prices.sum(), index=pd.Index(goods), name="price"),
        value_of_output=float(prices @ q @ y / (prices.sum() * y.sum())),
        bisection_steps=max(steps, steps_b))
