"""Targets: at-least conditions on output, capacity or consumption in named years. Elastic.

A capacity target may name the year after the plan (terminal capacity).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData
    from ..program import Block


class Targets(Condition):
    def __init__(self) -> None:
        super().__init__(name="targets", elastic=True, words="target")

    def applies(self, d: PlanData) -> bool:
        return bool(d.targets)

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        g = capacity_nnz_by_row(d)
        own = d.tech_sector
        nnz = 0
        for tg in d.targets:  # a sector's output and capacity: the sum over its techniques
            ks = np.flatnonzero(own == tg.j)
            capacity = len(ks) if "stock" in cols else int(g[tg.t, ks].sum())
            nnz += capacity if tg.quantity == "capacity" else \
                (len(ks) if tg.quantity == "output" else 1)
        return len(d.targets), nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        T, n = d.T, d.m
        own = d.tech_sector
        parts: dict[str, list[Any]] = {"output": [], "starts": [], "consumption": [],
                                       "stock": []}
        lower = []
        for tg in d.targets:
            row = {c: sparse.csr_array((1, ctx.width(c))) for c in parts if c in ctx.cols}
            if tg.quantity == "output":
                assert tg.j is not None
                ks = np.flatnonzero(own == tg.j)
                row["output"] = sparse.csr_array((np.ones(ks.size), (np.zeros(ks.size, int),
                                                                     tg.t * n + ks)),
                                                 shape=(1, T * n))
                lower.append(tg.required)
            elif tg.quantity == "capacity":
                assert tg.j is not None
                ks = np.flatnonzero(own == tg.j)
                pick = sparse.csr_array((np.ones(ks.size), (np.zeros(ks.size, int),
                                                            tg.t * n + ks)),
                                        shape=(1, (T + 1) * n))
                row.update(ctx.new_capacity(pick))
                lower.append(tg.required - float(d.base[tg.t, ks].sum()))
            else:
                coef = 1.0 if tg.j is None else float(d.basket[tg.j])
                row["consumption"] = sparse.csr_array(([coef], ([0], [tg.t])), shape=(1, T))
                lower.append(tg.required)
            for c in row:
                parts[c].append(row[c])
        coeffs = {c: sparse.csr_array(sparse.vstack(v)) for c, v in parts.items() if v}
        labels = tuple((tg.year, tg.sector or "", tg.quantity) for tg in d.targets)
        return RowBlock("targets", (len(d.targets),), (labels,), coeffs, np.array(lower),
                        np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None
        kappa = np.zeros(d.T) if s.consumption is None else s.consumption
        output, capacity = d.by_sector(s.output), d.by_sector(cap)
        viol, scale, labels, groups = [], [], [], []
        for tg in d.targets:
            if tg.quantity == "output":
                got = output[tg.t, tg.j]
            elif tg.quantity == "capacity":
                got = capacity[tg.t, tg.j]
            else:
                got = kappa[tg.t] * (1.0 if tg.j is None else d.basket[tg.j])
            viol.append(tg.required - got)
            scale.append(tg.required + abs(got))
            labels.append(("target", tg.year, tg.sector or "", tg.quantity))
            groups.append(tg.index)
        return [Check("target", np.array(viol), np.array(scale), labels, np.array(groups))]

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        return np.array([tg.required for tg in d.targets])

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        year, sector, quantity = label[1]
        return (f"{quantity} target", sector, year)

    def describe(self, label: tuple[Any, ...]) -> str:
        year, sector, quantity = label[1]
        where = f" of {sector}" if sector else ""
        return f"the {quantity} target{where} in {year}"
