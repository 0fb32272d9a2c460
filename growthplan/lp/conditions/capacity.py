"""Capacity: output of each technique (sector) within its capacity in service.

``x_kt − u_k (G z)_kt ≤ u_k base_kt`` where ``C = base + G z`` is the
capacity in service (see :mod:`growthplan.lp.build`). Hard in the diagnosis.
The audit also checks starts against their ceilings and every schedule
against its sign.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules, capacity_nnz_by_row

if TYPE_CHECKING:
    from ..data import PlanData


class Capacity(Condition):
    def __init__(self) -> None:
        super().__init__(name="capacity", elastic=False, words="capacity")

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        g = capacity_nnz_by_row(d)[: d.T]
        return d.T * d.m, d.T * d.m + int(g.sum())

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        T, n = d.T, d.m
        u = np.tile(d.util, T)
        g_plan = ctx.capacity[: T * n]
        return RowBlock("capacity", (T, n), (tuple(d.years), tuple(d.tech_names)),
                        {"output": sparse.eye_array(T * n, format="csr"),
                         "starts": sparse.csr_array(-(sparse.diags_array(u) @ g_plan))},
                        -np.inf, d.base[:T] * d.util[None, :])

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        cap = s.capacity_check
        assert cap is not None
        groups = np.tile(np.arange(d.m), d.T)
        grid = [(y, c) for y in d.years for c in d.tech_names]
        # a sign is judged against the size of the technique's sector over the plan (its
        # largest output, start or capacity of any technique), not against the value
        # itself: a basic variable at -4e-10 beside starts of 1,000, or in an idle
        # alternative technique, is the solver's tolerance, not a negative plan
        own = np.max(np.abs(np.vstack([s.output, s.starts, cap])), axis=0)
        sector = np.zeros(d.n)
        np.maximum.at(sector, d.tech_sector, own)
        size = np.tile(sector[d.tech_sector], d.T)
        checks = [
            Check("capacity", (s.output - d.util * cap[:-1]).ravel(),
                  (np.abs(s.output) + d.util * np.abs(cap[:-1])).ravel(),
                  [("capacity", *g) for g in grid], groups),
            Check("reported capacity", np.abs(s.capacity - cap).ravel(), np.abs(cap).ravel(),
                  [("capacity in service", y, c) for y in [*d.years, d.years[-1] + 1]
                   for c in d.tech_names], np.tile(np.arange(d.m), d.T + 1)),
            Check("non-negative output", -s.output.ravel(), size,
                  [("output", *g) for g in grid], groups),
            Check("non-negative starts", -s.starts.ravel(), size,
                  [("starts", *g) for g in grid], groups)]
        for j, rows, at_most in d.ceilings:
            got = s.starts[rows, j]
            checks.append(Check("starts ceiling", got - at_most, np.abs(got) + at_most,
                                [("starts ceiling", d.years[r], d.tech_names[j])
                                 for r in rows],
                                np.full(len(rows), j)))
        return checks

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the capacity of {label[2]} in {label[1]}"
