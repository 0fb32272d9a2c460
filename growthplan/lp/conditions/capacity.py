"""Capacity: output of each technique (sector) within its capacity in service.

``x_kt − u_k (G z)_kt ≤ u_k base_kt`` where ``C = base + G z`` is the
capacity in service (see :mod:`growthplan.lp.build`). Hard in the diagnosis.
The audit also checks starts against their ceilings and every schedule
against its sign.

In the state form the new capacity ``K = G z`` has columns of its own
(``x_kt − u_k K_kt ≤ u_k base_kt``, the same rows with the same bounds, so
their shadow prices are the same), and :class:`CapacityStock` carries it from
year to year: ``K_kt − ρ_k K_k,t−1 − Σ_τ f_k(t − τ − θ_k) z_kτ = 0`` with
``f_k(a) = S_k(a) − ρ_k S_k(a − 1)``, an identity of the survival profile for
any ``ρ_k``. ``ρ_k`` is chosen per technique to make ``f_k`` shortest: the
geometric profile's own ratio leaves one term (the vintage entering service),
``ρ = 1`` leaves two for a sudden exit (entry and exit). The audit is that of
the expression form: the capacity read from ``K`` is checked against the
vintage-by-vintage recomputation.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData


# an increment below this share of the profile's largest value is the rounding of an
# exact zero (S(a) − ρ S(a − 1) of a geometric profile computed by powers)
_ROUNDING = 1e-13


def stock_recursion(d: PlanData) -> tuple[np.ndarray, np.ndarray]:
    """``(ρ, f)`` of the state form: carry-over per technique and increments by age.

    ``f`` has the shape of ``d.surv`` (techniques × (T + 2)); for each
    technique ``ρ`` is the candidate (0, 1 or the profile's first ratio)
    leaving the fewest nonzero increments.
    """
    surv = d.surv
    prev = np.concatenate([np.zeros((d.m, 1)), surv[:, :-1]], axis=1)
    rho = np.zeros(d.m)
    f = surv.copy()
    for k in range(d.m):
        top = float(np.abs(surv[k]).max()) if surv.shape[1] else 0.0
        ratio = surv[k, 1] / surv[k, 0] if surv.shape[1] > 1 and surv[k, 0] else 0.0
        best = int(np.count_nonzero(surv[k]))
        for r in (1.0, ratio):
            cand = surv[k] - r * prev[k]
            cand[np.abs(cand) <= _ROUNDING * top] = 0.0
            if int(np.count_nonzero(cand)) < best:
                best, rho[k], f[k] = int(np.count_nonzero(cand)), r, cand
    return rho, f


def _carry(d: PlanData, rho: np.ndarray) -> sparse.csr_array:
    """``K_t − ρ K_{t−1}`` over rows (t, k), t = 0..T."""
    n = d.m
    size = (d.T + 1) * n
    t, k = np.divmod(np.arange(n, size), n)  # rows of years t ≥ 1
    keep = rho[k] != 0
    rows = np.concatenate([np.arange(size), (t * n + k)[keep]])
    cols = np.concatenate([np.arange(size), ((t - 1) * n + k)[keep]])
    vals = np.concatenate([np.ones(size), -rho[k][keep]])
    return sparse.csr_array((vals, (rows, cols)), shape=(size, size))


class Capacity(Condition):
    def __init__(self) -> None:
        super().__init__(name="capacity", elastic=False, words="capacity")

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        if "stock" in cols:
            return d.T * d.m, 2 * d.T * d.m
        g = capacity_nnz_by_row(d)[: d.T]
        return d.T * d.m, d.T * d.m + int(g.sum())

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        T, n = d.T, d.m
        u = np.tile(d.util, T)
        # -u on rows (t, k) of G for the plan years t < T
        pick = sparse.hstack([sparse.diags_array(-u), sparse.csr_array((T * n, n))])
        return RowBlock("capacity", (T, n), (tuple(d.years), tuple(d.tech_names)),
                        {"output": sparse.eye_array(T * n, format="csr"),
                         **ctx.new_capacity(pick)},
                        -np.inf, d.base[:T] * d.util[None, :])

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None
        groups = np.tile(np.arange(d.m), d.T)
        grid = [(y, c) for y in d.years for c in d.tech_names]
        # a sign is judged against the size of the technique's sector over the plan (its
        # largest output, start or capacity of any technique), not against the value
        # itself: a basic variable at -4e-10 beside starts of 1,000, or in an idle
        # alternative technique, is the solver's tolerance, not a negative plan
        own = np.max(np.abs(np.vstack([s.output, s.starts, cap])), axis=0)
        sector = np.zeros(d.n)
        np.maximum.at(sector, d.tech_sector, own)
        size = np.tile(sector[d.tech_sector], d.T)
        checks = [
            Check("capacity", (s.output - d.util * cap[:-1]).ravel(),
                  (np.abs(s.output) + d.util * np.abs(cap[:-1])).ravel(),
                  [("capacity", *g) for g in grid], groups),
            Check("reported capacity", np.abs(s.capacity - cap).ravel(), np.abs(cap).ravel(),
                  [("capacity in service", y, c) for y in [*d.years, d.years[-1] + 1]
                   for c in d.tech_names], np.tile(np.arange(d.m), d.T + 1)),
            Check("non-negative output", -s.output.ravel(), size,
                  [("output", *g) for g in grid], groups),
            Check("non-negative starts", -s.starts.ravel(), size,
                  [("starts", *g) for g in grid], groups)]
        for j, rows, at_most in d.ceilings:
            got = s.starts[rows, j]
            checks.append(Check("starts ceiling", got - at_most, np.abs(got) + at_most,
                                [("starts ceiling", d.years[r], d.tech_names[j])
                                 for r in rows],
                                np.full(len(rows), j)))
        return checks

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the capacity of {label[2]} in {label[1]}"


class CapacityStock(Condition):
    """The state form's stock rows (see the module notes); none in the expression form."""

    def __init__(self) -> None:
        super().__init__(name="capacity_stock", elastic=False, words="capacity stock")

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        if "stock" not in cols:
            return 0, 0
        rho, f = stock_recursion(d)
        carry = (d.T + 1) * d.m + d.T * int(np.count_nonzero(rho))
        return (d.T + 1) * d.m, carry + int(capacity_nnz_by_row(d, f).sum())

    def build(self, ctx: Context) -> RowBlock | None:
        if "stock" not in ctx.cols:
            return None
        from ..build import capacity_operator

        d = ctx.data
        rho, f = stock_recursion(d)
        return RowBlock("capacity_stock", (d.T + 1, d.m),
                        ((*d.years, d.years[-1] + 1), tuple(d.tech_names)),
                        {"stock": _carry(d, rho),
                         "starts": sparse.csr_array(-capacity_operator(d, f))}, 0.0, 0.0)

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the new capacity of {label[2]} carried into {label[1]}"
