"""Commodity balances: supply covers intermediate use, capital goods, consumption and demand.

``(Q − A) x_t + m_t − e_t + S y_t − W z − h κ_t ≥ g_t + pipeline deliveries_t``
(free disposal: a surplus is allowed), ``x_t`` the output of each technique
and ``Q`` what each makes (``Q = I`` with one technique per sector); with
several regions the commodities are region–sector pairs and ``S y_t`` the
shipments in, out and the transport they use (:mod:`growthplan.lp.regional`). Hard in
the diagnosis: a balance is physics, not a wish.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


class Balance(Condition):
    def __init__(self) -> None:
        super().__init__(name="balance", elastic=False, words="balance")

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        T, n = d.T, d.n
        eye = d.q
        nnz = sum(int(np.count_nonzero(eye - d.a_at(t))) for t in range(T)) if d.changing \
            else T * int(np.count_nonzero(eye - d.a))
        for s in range(min(d.spending.shape[1], T)):
            if d.changing:
                nnz += sum(int(np.count_nonzero(d.b_at(tau) * d.spending[:, s][None, :]))
                           for tau in range(T - s))
            else:
                nnz += (T - s) * int(np.count_nonzero(d.b * d.spending[:, s][None, :]))
        if "consumption" in cols:
            nnz += T * int(np.count_nonzero(d.basket))
        nnz += cols.get("imports", 0) + cols.get("exports", 0)
        if "shipments" in cols:  # several regions: + inbound − outbound − transport
            nnz += T * int(np.count_nonzero(d.regions.matrix()))
        return T * n, nnz

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        T, n = d.T, d.n
        eye_t = sparse.eye_array(T, format="csr")
        q = d.q
        if d.changing:  # each year's own input coefficients
            years = [sparse.csr_array(q - d.a_at(t)) for t in range(T)]
            out = sparse.csr_array(sparse.block_diag(years, format="csr"))
        else:
            out = sparse.kron(eye_t, sparse.csr_array(q - d.a), format="csr")
        coeffs: dict[str, sparse.sparray] = {"output": out, "starts": -ctx.deliveries}
        if "regional_consumption" in ctx.cols:  # each region's level and part of the basket
            coeffs["regional_consumption"] = sparse.kron(
                eye_t, sparse.csr_array(-d.regions.basket), format="csr")
        elif "consumption" in ctx.cols:
            coeffs["consumption"] = sparse.kron(eye_t, sparse.csr_array(-d.basket[:, None]),
                                                format="csr")
        for col, side, sign in (("imports", d.imports, 1.0), ("exports", d.exports, -1.0)):
            if col in ctx.cols and side is not None:
                sel = np.zeros((n, len(side.goods)))
                sel[side.index, np.arange(len(side.goods))] = sign
                coeffs[col] = sparse.kron(eye_t, sparse.csr_array(sel), format="csr")
        if "shipments" in ctx.cols:
            coeffs["shipments"] = sparse.kron(eye_t, sparse.csr_array(d.regions.matrix()),
                                              format="csr")
        return RowBlock("balance", (T, n), (tuple(d.years), tuple(d.names)), coeffs,
                        d.demand + d.pipe_deliveries, np.inf)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        kappa = np.zeros(d.T) if s.consumption is None else s.consumption
        deliv = s.deliveries_check
        assert deliv is not None
        intermediate = d.intermediate(s.output)
        cons = kappa[:, None] * d.basket[None, :]
        if s.regional_consumption is not None:
            from ..regional import regional_use

            cons = regional_use(d, s.regional_consumption)
        use = intermediate + deliv + cons + d.demand
        supply = d.supplied(s.output).copy()
        traded = np.zeros_like(supply)
        for flows, side, sign in ((s.imports, d.imports, 1.0), (s.exports, d.exports, -1.0)):
            if side is not None and side.goods:
                assert flows is not None
                for i, j in enumerate(side.index):
                    supply[:, j] += sign * flows[:, i]
                    traded[:, j] += np.abs(flows[:, i])
        if s.shipments is not None:
            from ..regional import shipments_in_balance

            net, gross = shipments_in_balance(d, s.shipments)
            supply += net
            traded += gross
        scale = np.abs(d.supplied(s.output)) + np.abs(intermediate) + np.abs(deliv) + np.abs(cons) \
            + d.demand + traded
        labels = [("balance", y, c) for y in d.years for c in d.names]
        groups = np.tile(np.arange(d.n), d.T)
        return [Check("balance", (use - supply).ravel(), scale.ravel(), labels, groups),
                Check("reported deliveries", np.abs(s.deliveries - deliv).ravel(),
                      np.abs(deliv).ravel(), [("deliveries", y, c) for y in d.years
                                              for c in d.names], groups)]

    def describe(self, label: tuple[Any, ...]) -> str:
        return f"the balance of {label[2]} in {label[1]}"
