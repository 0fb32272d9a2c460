"""Terminal growth: after the plan, capacity goes on growing at a stated rate. Elastic.

In each sector's final lead-time window (its last ``max(θ, 1)`` plan years)
the starts are at least what a balanced path growing at ``g`` needs:
``z_jt ≥ ψ_j C_jt`` with ``ψ(g) = (1+g)^θ / Σ_a S(a)(1+g)^-a``; with several
techniques the sector's starts and needs are summed over them,
``Σ_k z_kt ≥ Σ_k ψ_k C_kt``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData
    from ..program import Block


def window(d: PlanData) -> list[tuple[int, int]]:
    """(year index, sector) of the rows, sector by sector.

    A sector's window is the last ``max(θ, 1)`` plan years, ``θ`` the longest
    lead time of its techniques.
    """
    theta = np.zeros(d.n, dtype=int)
    np.maximum.at(theta, d.tech_sector, np.maximum(d.theta, 1))
    return [(t, j) for j in range(d.n) for t in range(d.T - int(theta[j]), d.T) if t >= 0]


class Terminal(Condition):
    def __init__(self) -> None:
        super().__init__(name="terminal", elastic=True, words="terminal growth")

    def applies(self, d: PlanData) -> bool:
        return d.psi is not None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        g = capacity_nnz_by_row(d)
        rows = window(d)
        own = d.tech_sector
        # G's row (t, k) covers starts of years τ ≤ t − θ_k; the start z_kt itself is
        # among them only when θ_k = 0 (techniques of a sector have columns of their own)
        if "stock" in cols:  # z_kt and K_kt for each of the sector's techniques
            return len(rows), sum(2 * int(np.count_nonzero(own == j)) for _, j in rows)
        nnz = sum(int(g[t, k]) + (0 if d.theta[k] == 0 else 1)
                  for t, j in rows for k in np.flatnonzero(own == j))
        return len(rows), nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        assert d.psi is not None
        T, m = d.T, d.m
        rows = window(d)
        own = d.tech_sector
        r_idx: list[int] = []
        c_idx: list[int] = []
        psi: list[float] = []
        lower: list[float] = []
        for r, (t, j) in enumerate(rows):  # Σ_k z_kt ≥ Σ_k ψ_k C_kt over the sector's k
            ks = np.flatnonzero(own == j)
            r_idx.extend([r] * ks.size)
            c_idx.extend((t * m + ks).tolist())
            psi.extend(d.psi[ks].tolist())
            lower.append(float(np.sum(d.psi[ks] * d.base[t, ks])))
        zsel = sparse.csr_array((np.ones(len(c_idx)), (r_idx, c_idx)), shape=(len(rows), T * m))
        weights = sparse.csr_array((-np.array(psi, dtype=float), (r_idx, c_idx)),
                                   shape=(len(rows), (T + 1) * m))
        coeffs = ctx.new_capacity(weights)
        coeffs["starts"] = sparse.csr_array(zsel + coeffs["starts"]) if "starts" in coeffs \
            else zsel
        labels = tuple((d.years[t], d.names[j]) for t, j in rows)
        return RowBlock("terminal", (len(rows),), (labels,), coeffs, np.array(lower), np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None and d.terminal_rate is not None
        g = d.terminal_rate
        own = d.tech_sector
        viol, scale, labels, groups = [], [], [], []
        for t, j in window(d):
            need, got = 0.0, 0.0
            for k in np.flatnonzero(own == j):
                surv = d.surv_full[k]
                if np.isfinite(d.geometric_rate[k]):  # closed form of the infinite sum
                    total = (1 + g) / (g + d.geometric_rate[k])
                else:
                    total = float(np.sum(surv * (1.0 + g) ** -np.arange(surv.size,
                                                                         dtype=float)))
                need += (1.0 + g) ** int(d.theta[k]) / total * cap[t, k]
                got += s.starts[t, k]
            viol.append(need - got)
            scale.append(abs(need) + abs(got))
            labels.append(("terminal growth", d.years[t], d.names[j]))
            groups.append(j)
        return [Check("terminal", np.array(viol), np.array(scale), labels, np.array(groups))]

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        return lower

    def magnitude(self, d: PlanData, required: np.ndarray) -> np.ndarray:
        return np.maximum(np.abs(required), 1e-9 * max(1.0, float(np.abs(d.base).max())))

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        year, sector = label[1]
        return ("terminal growth", sector, year)

    def describe(self, label: tuple[Any, ...]) -> str:
        year, sector = label[1]
        return f"the terminal growth of {sector} in {year}"
