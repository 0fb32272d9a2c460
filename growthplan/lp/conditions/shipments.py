"""Shipment ceilings: most units of a good shipped along a corridor a year, ``y^{rs}_{g,t} ≤ ȳ``.

Written as rows (not column bounds) so the diagnosis may relax them and
name the corridor: "shipments of tools from north to south in 2031".
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from scipy import sparse

from . import Check, Condition, Context, RowBlock, Schedules

if TYPE_CHECKING:
    from ..data import PlanData


def _limited(d: PlanData) -> np.ndarray:
    return np.flatnonzero(np.isfinite(d.regions.ceiling))


class ShipmentCeilings(Condition):
    def __init__(self) -> None:
        super().__init__(name="shipment_ceilings", elastic=True, words="shipments")

    def applies(self, d: PlanData) -> bool:
        return d.regions is not None and _limited(d).size > 0

    def count(self, d: PlanData, cols: dict[str, int]) -> tuple[int, int]:
        k = _limited(d).size
        return d.T * k, d.T * k

    def build(self, ctx: Context) -> RowBlock:
        d = ctx.data
        reg = d.regions
        keep = _limited(d)
        sel = sparse.csr_array((np.ones(keep.size), (np.arange(keep.size), keep)),
                               shape=(keep.size, reg.K))
        coeffs = {"shipments": sparse.kron(sparse.eye_array(d.T, format="csr"), sel,
                                           format="csr")}
        labels = tuple(reg.labels[k] for k in keep)
        return RowBlock(self.name, (d.T, keep.size), (tuple(d.years), labels), coeffs,
                        -np.inf, np.broadcast_to(reg.ceiling[keep], (d.T, keep.size)))

    def audit(self, d: PlanData, s: Schedules) -> list[Check]:
        assert s.shipments is not None
        reg = d.regions
        keep = _limited(d)
        y = s.shipments[:, keep]
        cap = np.broadcast_to(reg.ceiling[keep], y.shape)
        out = [Check("shipment ceilings", (y - cap).ravel(), (np.abs(y) + cap).ravel(),
                     [("shipment_ceilings", yr, reg.labels[k]) for yr in d.years
                      for k in keep], np.tile(np.arange(keep.size), d.T))]
        return out

    def shortfall_label(self, label: tuple[Any, ...]) -> tuple[str, str, Any]:
        o, dest, g = label[2]
        return (f"shipments {o} to {dest}", str(g), label[1])

    def describe(self, label: tuple[Any, ...]) -> str:
        o, dest, g = label[2]
        return f"shipments of {g} from {o} to {dest} in {label[1]}"
