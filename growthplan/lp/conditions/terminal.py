"""Terminal growth: after the plan, capacity goes on growing at a stated rate. Elastic.

In each sector's final lead-time window (its last ``max(θ, 1)`` plan years)
the starts are at least what a balanced path growing at ``g`` needs:
``z_jt ≥ ψ_j C_jt`` with ``ψ(g) = (1+g)^θ / Σ_a S(a)(1+g)^-a``.
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
    """(year index, sector) of the rows, sector by sector."""
    return [(t, j) for j in range(d.n) for t in range(d.T - max(int(d.theta[j]), 1), d.T)
            if t >= 0]


class Terminal(Condition):
    def __init__(self) -> None:
        super().__init__(name="terminal", elastic=True, words="terminal growth")

    def applies(self, d: PlanData) -> bool:
        return d.psi is not None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        g = capacity_nnz_by_row(d)
        rows = window(d)
        # G's row (t, j) covers starts of years τ ≤ t − θ_j; the start z_jt itself is
        # among them only when θ_j = 0
        nnz = sum(int(g[t, j]) + (0 if d.theta[j] == 0 else 1) for t, j in rows)
        return len(rows), nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        assert d.psi is not None
        T, n = d.T, d.n
        rows = window(d)
        idx = np.array([t * n + j for t, j in rows], dtype=int)
        psi = np.array([d.psi[j] for _, j in rows])
        zsel = sparse.csr_array((np.ones(len(rows)), (np.arange(len(rows)), idx)),
                                shape=(len(rows), T * n))
        g_plan = ctx.capacity[: T * n]
        term = zsel - sparse.diags_array(psi) @ g_plan[idx]
        labels = tuple((d.years[t], d.names[j]) for t, j in rows)
        return RowBlock("terminal", (len(rows),), (labels,), {"starts": sparse.csr_array(term)},
                        psi * np.array([d.base[t, j] for t, j in rows]), np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None and d.terminal_rate is not None
        g = d.terminal_rate
        viol, scale, labels, groups = [], [], [], []
        for t, j in window(d):
            surv = d.surv_full[j]
            if np.isfinite(d.geometric_rate[j]):  # closed form of the infinite sum
                total = (1 + g) / (g + d.geometric_rate[j])
            else:
                total = float(np.sum(surv * (1.0 + g) ** -np.arange(surv.size, dtype=float)))
            need = (1.0 + g) ** int(d.theta[j]) / total * cap[t, j]
            viol.append(need - s.starts[t, j])
            scale.append(abs(need) + abs(s.starts[t, j]))
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
