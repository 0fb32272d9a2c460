"""Foreign trade: the foreign-exchange condition (elastic) and the trade bounds.

``p^m·m_t − p^e·e_t ≤ F_t``; imports and exports within their ceilings
(column bounds, checked by the audit).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


class ForeignExchange(Condition):
    def __init__(self) -> None:
        super().__init__(name="foreign_exchange", elastic=True, words="foreign exchange",
                         role="fact")

    def applies(self, d: PlanData) -> bool:
        return d.trades

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return d.T, cols.get("imports", 0) + cols.get("exports", 0)

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        eye_t = sparse.eye_array(d.T, format="csr")
        coeffs = {}
        if "imports" in ctx.cols and d.imports is not None:
            coeffs["imports"] = sparse.kron(eye_t, sparse.csr_array(d.imports.prices[None, :]),
                                            format="csr")
        if "exports" in ctx.cols and d.exports is not None:
            coeffs["exports"] = sparse.kron(eye_t, sparse.csr_array(-d.exports.prices[None, :]),
                                            format="csr")
        assert d.inflow is not None
        return RowBlock("foreign_exchange", (d.T,), (tuple(d.years),), coeffs, -np.inf,
                        d.inflow)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        assert d.inflow is not None
        spend = np.zeros(d.T)
        scale = d.inflow.copy()
        for flows, side, sign in ((s.imports, d.imports, 1.0), (s.exports, d.exports, -1.0)):
            if side is not None and side.goods:
                assert flows is not None
                spend += sign * (flows @ side.prices)
                scale += np.abs(flows) @ side.prices
        return [Check("foreign exchange", spend - d.inflow, scale,
                      [("foreign exchange", y) for y in d.years], np.zeros(d.T, int))]

    def magnitude(self, d: PlanData, required: np.ndarray) -> np.ndarray:
        return np.maximum(np.abs(required), 1.0)

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        return ("foreign exchange", "", label[1])

    def unit(self, d: PlanData, label: tuple[Any, ...]) -> str:
        return f"{d.value_unit} a year"

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the foreign-exchange limit in {label[1]}"


class TradeBounds(Condition):
    """Import and export ceilings and signs: column bounds, so audit only."""

    def __init__(self) -> None:
        super().__init__(name="trade_bounds", elastic=False, words="trade bounds")

    def applies(self, d: PlanData) -> bool:
        return d.trades

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        return 0, 0

    def build(self, ctx: Context) -> RowBlock | None:
        return None  # bounds on columns, set by the builder

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        out = []
        for flows, side, word in ((s.imports, d.imports, "import"),
                                  (s.exports, d.exports, "export")):
            if side is None or not side.goods:
                continue
            assert flows is not None
            labels = [(word, y, g) for y in d.years for g in side.goods]
            groups = np.tile(np.arange(len(side.goods)), d.T)
            ceil = np.where(np.isfinite(side.ceilings), side.ceilings, 0.0)
            out.append(Check(f"{word} ceiling",
                             np.where(np.isfinite(side.ceilings), flows - side.ceilings,
                                      -np.inf).ravel(),
                             (np.abs(flows) + ceil).ravel(), labels, groups))
            # judged against the good's largest flow over the plan, as capacity's signs are
            size = np.tile(np.max(np.abs(flows), axis=0), d.T)
            out.append(Check(f"non-negative {word}s", -flows.ravel(), size, labels, groups))
        return out
