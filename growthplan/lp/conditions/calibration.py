"""Calibration: the first plan year starts from where the economy is. Elastic.

With ``Plan(first_year_within=s)`` the first year's output of every sector is
at least ``(1 − s)`` times its base-year output, ``x_0j ≥ (1 − s) x̄_j``, so
a plan cannot begin by abandoning capacity the economy uses today.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


class FirstYear(Condition):
    def __init__(self) -> None:
        super().__init__(name="first_year", elastic=True, words="first-year output")

    def applies(self, d: PlanData) -> bool:
        return d.first_year_within is not None and d.base_output is not None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return d.n, d.m

    def _floor(self, d: PlanData) -> np.ndarray:
        assert d.base_output is not None and d.first_year_within is not None
        return (1.0 - d.first_year_within) * d.base_output

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        # a sector's first-year output: the sum over its techniques
        sel = sparse.csr_array((np.ones(d.m), (d.tech_sector, np.arange(d.m))),
                               shape=(d.n, d.T * d.m))
        return RowBlock("first_year", (d.n,), (tuple((d.years[0], c) for c in d.names),),
                        {"output": sel}, self._floor(d), np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        floor = self._floor(d)
        x0 = d.by_sector(s.output)[0]
        return [Check("first-year output", floor - x0, floor + np.abs(x0),
                      [("first-year output", d.years[0], c) for c in d.names], np.arange(d.n))]

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        year, sector = label[1]
        return ("first-year output", str(sector), year)

    def describe(self, label: tuple[Any, ...]) -> str:
        year, sector = label[1]
        return f"the first-year output of {sector} in {year}"
