"""Fixed trade shares (Chenery–Moses): a corridor carries a fixed share of the destination's use.

For a shipment ``k`` of good ``g`` from ``r`` to ``s`` with share ``c_k``:
``y_kt = c_k · (A_t x_t + W z + h κ_t + g_t + pipeline deliveries_t)_{(s, g)}``,
the destination's intermediate use, capital goods, consumption and other
final demand of the good (the transport that shipments use is not counted).
Shipments without a share are chosen by the plan. Each equality is two
one-sided rows. Hard in the diagnosis: a share describes how the regions
trade, not a wish.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


def _fixed(d: PlanData) -> np.ndarray:
    return np.flatnonzero(np.isfinite(d.regions.share))


def _pick(d: PlanData) -> np.ndarray:
    """Fixed shipments × pairs: the share at each shipment's destination pair."""
    reg = d.regions
    keep = _fixed(d)
    out = np.zeros((keep.size, d.n))
    out[np.arange(keep.size), reg.destination[keep] * len(reg.sectors) + reg.good[keep]] = \
        reg.share[keep]
    return out


def _consumption(d: PlanData) -> tuple[str, np.ndarray] | None:
    """The consumption column block and its basket (pairs × levels), if the plan consumes."""
    if not d.has_consumption:
        return None
    if d.regions.consumption_floor is not None:
        return "regional_consumption", d.regions.basket
    return "consumption", d.basket[:, None]


def _deliveries_nnz(d: PlanData, rows: np.ndarray) -> int:
    """Nonzeros of the deliveries operator's rows ``(t, i)`` for ``i`` in ``rows``, all ``t``."""
    nnz = 0
    for s in range(min(d.spending.shape[1], d.T)):
        w = d.spending[:, s][None, :]
        for t in range(s, d.T):
            nnz += int(np.count_nonzero(d.b_at(t - s)[rows] * w))
    return nnz


class FixedTradeShares(Condition):
    def __init__(self) -> None:
        super().__init__(name="trade_shares", elastic=False, words="trade share")

    def applies(self, d: PlanData) -> bool:
        return d.regions is not None and _fixed(d).size > 0

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        p = _pick(d)
        k = p.shape[0]
        nnz = d.T * k
        nnz += sum(int(np.count_nonzero(p @ d.a_at(t))) for t in range(d.T)) if d.changing \
            else d.T * int(np.count_nonzero(p @ d.a))
        rows = np.flatnonzero(p.any(axis=0))
        per_row = {int(i): _deliveries_nnz(d, np.array([i])) for i in rows}
        nnz += sum(per_row[int(np.flatnonzero(p[j])[0])] for j in range(k) if p[j].any())
        cons = _consumption(d)
        if cons is not None:
            nnz += d.T * int(np.count_nonzero(p @ cons[1]))
        return 2 * d.T * k, 2 * nnz  # each equality as two one-sided rows

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        reg = d.regions
        keep = _fixed(d)
        p = _pick(d)
        eye = sparse.eye_array(d.T, format="csr")
        sel = sparse.csr_array((np.ones(keep.size), (np.arange(keep.size), keep)),
                               shape=(keep.size, reg.K))
        if d.changing:
            out = sparse.block_diag([sparse.csr_array(-(p @ d.a_at(t))) for t in range(d.T)],
                                    format="csr")
        else:
            out = sparse.kron(eye, sparse.csr_array(-(p @ d.a)), format="csr")
        starts = sparse.csr_array(-(sparse.kron(eye, sparse.csr_array(p), format="csr")
                                    @ ctx.deliveries))
        starts.eliminate_zeros()
        coeffs: dict[str, sparse.sparray] = {
            "shipments": sparse.kron(eye, sel, format="csr"), "output": sparse.csr_array(out),
            "starts": starts}
        cons = _consumption(d)
        if cons is not None:
            coeffs[cons[0]] = sparse.kron(eye, sparse.csr_array(-(p @ cons[1])), format="csr")
        from ..regional import both_ways

        coeffs, upper = both_ways(coeffs, (d.demand + d.pipe_deliveries) @ p.T)
        labels = tuple((*reg.labels[k], side) for side in ("at most", "at least") for k in keep)
        return RowBlock(self.name, (d.T, 2 * keep.size), (tuple(d.years), labels), coeffs,
                        -np.inf, upper)

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        assert s.shipments is not None and s.deliveries_check is not None
        reg = d.regions
        keep = _fixed(d)
        p = _pick(d)
        if s.regional_consumption is not None:
            cons = s.regional_consumption @ reg.basket.T
        elif s.consumption is not None:
            cons = s.consumption[:, None] * d.basket[None, :]
        else:
            cons = np.zeros((d.T, d.n))
        use = d.intermediate(s.output) + s.deliveries_check + cons + d.demand
        want = use @ p.T
        y = s.shipments[:, keep]
        return [Check("trade shares", np.abs(y - want).ravel(), (np.abs(y) + np.abs(want)).ravel(),
                      [(self.name, yr, reg.labels[k]) for yr in d.years for k in keep],
                      np.tile(np.arange(keep.size), d.T))]

    def describe(self, label: tuple[Any, ...]) -> str:
        o, dest, g = label[2][:3]
        return f"the trade share of {g} from {o} in {dest}'s use in {label[1]}"
