"""Regional consumption: each region's own level, the plan's level their weighted average.

With regional consumption floors each region ``r`` consumes its part of the
basket ``h^r`` times its own level ``κ^r_t``; the plan's level is
``κ_t = Σ_r w_r κ^r_t`` with ``w_r`` the region's share of the basket's value
at base-year prices (equal levels everywhere give the plan's level). The
link is an identity, written as two one-sided rows (hard in the diagnosis);
the floors ``κ^r_t ≥ F^r_t`` are elastic.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


def _regional(d: PlanData) -> bool:
    return d.has_consumption and d.regions is not None \
        and d.regions.consumption_floor is not None


class RegionalConsumptionLevel(Condition):
    def __init__(self) -> None:
        super().__init__(name="regional_consumption_level", elastic=False,
                         words="consumption level")

    def applies(self, d: PlanData) -> bool:
        return _regional(d)

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return 2 * d.T, 2 * d.T * (1 + int(np.count_nonzero(d.regions.weight)))

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        eye = sparse.eye_array(d.T, format="csr")
        w = sparse.csr_array(-d.regions.weight[None, :])
        from ..regional import both_ways

        coeffs, upper = both_ways({"consumption": eye,
                                   "regional_consumption": sparse.kron(eye, w, format="csr")},
                                  np.zeros((d.T, 1)))
        return RowBlock(self.name, (d.T, 2), (tuple(d.years), ("at most", "at least")),
                        coeffs, -np.inf, upper)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        assert s.consumption is not None and s.regional_consumption is not None
        mix = s.regional_consumption @ d.regions.weight
        return [Check("consumption level", np.abs(s.consumption - mix),
                      np.abs(s.consumption) + np.abs(mix),
                      [(self.name, y) for y in d.years], np.zeros(d.T, int))]

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the plan's consumption level as the regions' average in {label[1]}"


class RegionalConsumptionFloor(Condition):
    def __init__(self) -> None:
        super().__init__(name="regional_consumption_floor", elastic=True,
                         words="consumption floor")

    def applies(self, d: PlanData) -> bool:
        return _regional(d)

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return d.T * d.regions.R, d.T * d.regions.R

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        reg = d.regions
        return RowBlock(self.name, (d.T, reg.R), (tuple(d.years), tuple(reg.regions)),
                        {"regional_consumption": sparse.eye_array(d.T * reg.R, format="csr")},
                        reg.consumption_floor.T, np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        assert s.regional_consumption is not None
        reg = d.regions
        floor = reg.consumption_floor.T
        k = s.regional_consumption
        return [Check("regional consumption floor", (floor - k).ravel(),
                      (floor + np.abs(k)).ravel(),
                      [(self.name, y, r) for y in d.years for r in reg.regions],
                      np.tile(np.arange(reg.R), d.T))]

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("consumption floor", str(label[2]), label[1])

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the consumption floor of {label[2]} in {label[1]}"
