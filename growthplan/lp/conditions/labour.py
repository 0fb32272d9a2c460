"""Labour: labour used of each kind within its supply, ``l_k · x_t ≤ L_kt``. Elastic."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


class Labour(Condition):
    def __init__(self) -> None:
        super().__init__(name="labour", elastic=True, words="labour", role="fact")

    def applies(self, d: PlanData) -> bool:
        return d.labour.shape[0] > 0

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        if d.changing:
            return d.T * d.labour.shape[0], sum(int(np.count_nonzero(d.labour_at(t)))
                                                for t in range(d.T))
        return d.T * d.labour.shape[0], d.T * int(np.count_nonzero(d.labour))

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        if d.changing:
            years = [sparse.csr_array(d.labour_at(t)) for t in range(d.T)]
            rows = sparse.csr_array(sparse.block_diag(years, format="csr"))
        else:
            rows = sparse.kron(sparse.eye_array(d.T, format="csr"),
                               sparse.csr_array(d.labour), format="csr")
        return RowBlock("labour", (d.T, len(d.labour_kinds)),
                        (tuple(d.years), tuple(d.labour_kinds)), {"output": rows}, -np.inf,
                        d.supply.T)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        out = []
        used_all = d.labour_used(s.output)
        scale_all = d.labour_used(np.abs(s.output))
        for k, kind in enumerate(d.labour_kinds):
            used = used_all[:, k]
            scale = scale_all[:, k] + d.supply[k]
            out.append(Check("labour", used - d.supply[k], scale,
                             [("labour", y, kind) for y in d.years], np.full(d.T, k)))
        return out

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("labour", str(label[2]), label[1])

    def unit(self, d: PlanData, label: tuple[Any, ...]) -> str:
        kinds = list(d.labour_kinds)
        return d.labour_units[kinds.index(label[2])] if label[2] in kinds else ""

    def describe(self, label: tuple[Any, ...]) -> str:
        kind = "" if label[2] == "labour" else f" of kind {label[2]}"
        return f"the labour supply{kind} in {label[1]}"
