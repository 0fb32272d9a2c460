"""The terminal level: capacity after the plan at least ``λ`` times the proportions ``π``.

``G_T z − π λ ≥ −base_T``; its rows exist when a terminal-capacity objective
is optimised. Hard in the diagnosis (``λ`` is free, so they always hold).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData


class TerminalLevel(Condition):
    def __init__(self) -> None:
        super().__init__(name="terminal_level", elastic=False, words="terminal level")

    def applies(self, d: PlanData) -> bool:
        return d.proportions is not None

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        assert d.proportions is not None
        # each technique's capacity counts towards its sector's row only
        own = d.m if "stock" in cols else int(capacity_nnz_by_row(d)[d.T].sum())
        return d.n, own + int(np.count_nonzero(d.proportions))

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        assert d.proportions is not None
        # each sector's techniques' capacity at the end: rows (T, k) of G
        end = sparse.hstack([sparse.csr_array((d.n, d.T * d.m)), sparse.csr_array(d.sel)])
        return RowBlock("terminal_level", (d.n,), (tuple(d.names),),
                        {**ctx.new_capacity(end),
                         "level": sparse.csr_array(-d.proportions[:, None])},
                        -d.by_sector(d.base[d.T]), np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        if s.level is None:
            return []
        cap = s.capacity_check
        assert cap is not None and d.proportions is not None
        end = d.by_sector(cap[-1])
        return [Check("terminal level", s.level * d.proportions - end,
                      np.abs(s.level) * d.proportions + np.abs(end),
                      [("terminal level", d.years[-1] + 1, c) for c in d.names],
                      np.arange(d.n))]

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the terminal capacity of {label[1]}"
