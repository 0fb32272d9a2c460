"""National targets: a good's output or capacity summed over every region, at least. Elastic.

``Σ_r Σ_{k makes (r, i)} x_kt ≥ v`` or the same sum of capacity in service
``base + G z``; a capacity target may name the year after the plan.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData
    from ..program import Block


def _makers(d: PlanData, good: int) -> np.ndarray:
    """Techniques whose main product is ``good`` in any region."""
    return np.flatnonzero(d.tech_sector % len(d.regions.sectors) == good)


class NationalTargets(Condition):
    def __init__(self) -> None:
        super().__init__(name="national_targets", elastic=True, words="national target")

    def applies(self, d: PlanData) -> bool:
        return d.regions is not None and bool(d.regions.national)

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        g = capacity_nnz_by_row(d)
        nnz = 0
        for quantity, good, t, *_ in d.regions.national:
            ks = _makers(d, good)
            if quantity == "capacity" and "stock" not in cols:
                nnz += int(g[t, ks].sum())
            else:  # output, or capacity read off the stock columns of the state form
                nnz += ks.size
        return len(d.regions.national), nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        T, m = d.T, d.m
        rows_x, rows_w, lower = [], [], []
        width = (T + 1) * m  # the rows (t, k) of the capacity operator G
        for quantity, good, t, required, _, _ in d.regions.national:
            ks = _makers(d, good)
            x = sparse.csr_array((1, T * m))
            w = sparse.csr_array((1, width))
            if quantity == "output":
                x = sparse.csr_array((np.ones(ks.size), (np.zeros(ks.size, int), t * m + ks)),
                                     shape=(1, T * m))
                lower.append(required)
            else:
                w = sparse.csr_array((np.ones(ks.size), (np.zeros(ks.size, int), t * m + ks)),
                                     shape=(1, width))
                lower.append(required - float(d.base[t, ks].sum()))
            rows_x.append(x)
            rows_w.append(w)
        labels = tuple((year, good_name, quantity)
                       for quantity, _, _, _, year, good_name in d.regions.national)
        coeffs = {"output": sparse.csr_array(sparse.vstack(rows_x))}
        coeffs.update(ctx.new_capacity(sparse.csr_array(sparse.vstack(rows_w))))
        return RowBlock(self.name, (len(labels),), (labels,), coeffs, np.array(lower), np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None
        viol, scale, labels = [], [], []
        for quantity, good, t, required, year, name in d.regions.national:
            ks = _makers(d, good)
            got = float((s.output[t, ks] if quantity == "output" else cap[t, ks]).sum())
            viol.append(required - got)
            scale.append(required + abs(got))
            labels.append((self.name, year, name, quantity))
        return [Check("national target", np.array(viol), np.array(scale), labels,
                      np.arange(len(labels)))]

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        return np.array([r[3] for r in d.regions.national])

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        year, good, quantity = label[1]
        return (f"national {quantity} target", good, year)

    def describe(self, label: tuple[Any, ...]) -> str:
        year, good, quantity = label[1]
        return f"the national {quantity} target of {good} in {year}"
