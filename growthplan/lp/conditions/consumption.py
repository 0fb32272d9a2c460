"""Consumption: floors on the consumption level and a limit on its fall. Elastic.

``κ_t ≥ floor_t`` and ``κ_{t+1} ≥ (1 − f) κ_t``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData
    from ..program import Block


class ConsumptionFloor(Condition):
    def __init__(self) -> None:
        super().__init__(name="consumption_floor", elastic=True, words="consumption floor",
                         role="aim")

    def applies(self, d: PlanData) -> bool:
        return d.has_consumption

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return d.T, d.T

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        return RowBlock("consumption_floor", (d.T,), (tuple(d.years),),
                        {"consumption": sparse.eye_array(d.T, format="csr")}, d.floor, np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        k = s.consumption
        assert k is not None
        return [Check("consumption floor", d.floor - k, d.floor + np.abs(k),
                      [("consumption floor", y) for y in d.years], np.zeros(d.T, int))]

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("consumption floor", "", label[1])

    def unit(self, d: PlanData, label: tuple[Any, ...]) -> str:
        return "units of the consumption level"

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the consumption floor in {label[1]}"


class ConsumptionFall(Condition):
    def __init__(self) -> None:
        super().__init__(name="consumption_fall", elastic=True, words="consumption fall",
                         role="aim")

    def applies(self, d: PlanData) -> bool:
        return d.has_consumption and d.max_fall is not None and d.T > 1

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        assert d.max_fall is not None
        return d.T - 1, (2 if d.max_fall < 1 else 1) * (d.T - 1)

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        assert d.max_fall is not None
        fall = sparse.eye_array(d.T - 1, d.T, k=1, format="csr") - (1 - d.max_fall) * \
            sparse.eye_array(d.T - 1, d.T, format="csr")
        return RowBlock("consumption_fall", (d.T - 1,), (tuple(d.years[1:]),),
                        {"consumption": sparse.csr_array(fall)}, 0.0, np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        k = s.consumption
        assert k is not None and d.max_fall is not None
        return [Check("consumption fall", (1 - d.max_fall) * k[:-1] - k[1:],
                      np.abs(k[1:]) + np.abs(k[:-1]),
                      [("consumption fall", y) for y in d.years[1:]], np.zeros(d.T - 1, int))]

    def required(self, d: PlanData, block: Block, lower: np.ndarray,
                 upper: np.ndarray) -> np.ndarray:
        return np.zeros(block.size)

    def magnitude(self, d: PlanData, required: np.ndarray) -> np.ndarray:
        return np.maximum(d.floor[1:], 1.0)

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("consumption fall", "", label[1])

    def unit(self, d: PlanData, label: tuple[Any, ...]) -> str:
        return "units of the consumption level"

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the limit on the fall of consumption in {label[1]}"
