"""The arrays of a plan over regions: shipment columns, transport, regional labour.

Shipment ``k`` carries good ``g(k)`` from region ``o(k)`` to region ``d(k)``
in each year. Its column in the balance of pair ``(d, g)`` is ``+1``, in
that of ``(o, g)`` ``−1``, and in the balance of the transport sector of the
paying region (origin or destination) ``−τ_k``: the shipment matrix
``S`` (pairs × shipments) below. At an optimum the shadow prices satisfy
``p_{d,g} ≤ p_{o,g} + τ_k p_{transport}`` with equality where the shipment is
positive (complementary slackness of the shipment column).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    from ..model.plan import Plan

__all__ = ["RegionData", "lower_regions"]


@dataclass
class RegionData:
    """Regions of a lowered plan (``R`` regions, ``n`` sectors each, ``K`` shipments)."""

    regions: list[str]
    sectors: list[str]
    origin: np.ndarray          # K: region index
    destination: np.ndarray     # K: region index
    good: np.ndarray            # K: sector index
    transport: np.ndarray       # K: transport units per unit shipped
    payer: np.ndarray           # K: pair index of the transport sector paid (-1: none)
    ceiling: np.ndarray         # K: most units a year (inf: none)
    share: np.ndarray           # K: fixed share of the destination's use (NaN: chosen)
    labour: np.ndarray | None   # R × years: each region's own supply (None: no regional rows)
    migration: np.ndarray | None  # R: ceiling on net inflow a year (None: no migration)
    paid_by: str = "origin"
    consumption_floor: np.ndarray | None = None  # R × years; None: one national level
    basket: np.ndarray | None = None   # pairs × R: each region's part of the basket
    weight: np.ndarray | None = None   # R: each region's share of the basket's value
    # national targets: (quantity, good index, plan-year index, required, year, good)
    national: list[tuple[str, int, int, float, int, str]] = field(default_factory=list)

    @property
    def R(self) -> int:  # noqa: N802 - the trade's symbol
        return len(self.regions)

    @property
    def K(self) -> int:  # noqa: N802
        return int(self.good.size)

    @property
    def labels(self) -> tuple[tuple[str, str, str], ...]:
        """Each shipment as ``(origin, destination, good)``."""
        return tuple((self.regions[o], self.regions[d], self.sectors[g])
                     for o, d, g in zip(self.origin, self.destination, self.good, strict=True))

    def matrix(self) -> np.ndarray:
        """``S``: pairs × shipments, the shipments' terms in the commodity balances."""
        n = len(self.sectors)
        out = np.zeros((self.R * n, self.K))
        k = np.arange(self.K)
        out[self.destination * n + self.good, k] += 1.0
        out[self.origin * n + self.good, k] -= 1.0
        paid = self.payer >= 0
        np.add.at(out, (self.payer[paid], k[paid]), -self.transport[paid])
        return out

    def pair_region(self, tech_sector: np.ndarray) -> np.ndarray:
        """Region index of each technique (its pair's region)."""
        return np.asarray(tech_sector) // len(self.sectors)


def lower_regions(plan: Plan) -> RegionData | None:
    """The regional arrays of a validated plan (None without regions)."""
    from ..model.series import series

    reg = plan.regions
    if reg is None:
        return None
    regions, sectors = list(reg.regions), list(reg.sectors)
    n = len(sectors)
    ship: list[tuple[int, int, int, float, float, float]] = []
    for o_name, d_name, c in reg.links():
        o, d = regions.index(o_name), regions.index(d_name)
        for g_name in (c.goods if c.goods is not None else sectors):
            ship.append((o, d, sectors.index(g_name), c.amount(c.transport, g_name, 0.0),
                         c.amount(c.ceiling, g_name, np.inf),
                         c.amount(c.shares, g_name, np.nan)))
    arr = np.array(ship, dtype=float).reshape(-1, 6)
    origin, destination, good = (arr[:, i].astype(int) for i in range(3))
    tau, ceiling, share = arr[:, 3], arr[:, 4], arr[:, 5]
    if reg.transport_sector is not None:
        t_idx = sectors.index(reg.transport_sector)
        paying = origin if reg.transport_paid_by == "origin" else destination
        payer = np.where(tau > 0, paying * n + t_idx, -1)
    else:
        payer = np.full(good.size, -1)
    labour = migration = None
    if reg.labour is not None:
        years = list(plan.years)
        labour = np.array([series(reg.labour[r], years, f"regions.labour.{r}",
                                  reg.labour_growth) for r in regions])
        if reg.migration is not None:
            migration = np.array([float(reg.migration.get(r, 0.0)) for r in regions])
    out = RegionData(regions=regions, sectors=sectors, origin=origin,
                     destination=destination, good=good, transport=tau, payer=payer,
                     ceiling=ceiling, share=share, labour=labour, migration=migration,
                     paid_by=reg.transport_paid_by)
    out.national = [(tg.quantity, sectors.index(tg.sector), tg.year - plan.years[0],
                     tg.required, tg.year, tg.sector) for tg in reg.national_targets]
    if reg.consumption_floors is not None:
        from .data import basket

        h = basket(plan)
        R = len(regions)
        parts = np.zeros((R * n, R))
        parts[np.arange(R * n), np.repeat(np.arange(R), n)] = h
        value = plan.economy.prices @ parts
        out.basket = parts
        out.weight = value / value.sum()
        out.consumption_floor = np.array([
            series(reg.consumption_floors.get(r, 0.0), list(plan.years),
                   f"regions.consumption_floors.{r}", reg.floor_growth) for r in regions])
    return out


def regional_use(d: Any, levels: np.ndarray) -> np.ndarray:
    """Consumption by pair, years × pairs, from the regions' consumption levels (years × R)."""
    return levels @ d.regions.basket.T


def shipments_in_balance(d: Any, shipments: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Net supply from shipments and its scale, years × pairs, from a shipment schedule."""
    s = d.regions.matrix()
    return shipments @ s.T, np.abs(shipments) @ np.abs(s).T


def both_ways(coeffs: dict[str, Any], rhs: np.ndarray) -> tuple[dict[str, Any], np.ndarray]:
    """An equality ``C v = rhs`` (rows ``(t, k)``) as two one-sided rows per ``(t, k)``.

    Rows come out as ``(t, side, k)``: ``C v ≤ rhs`` then ``−C v ≤ −rhs``, so
    every row has a finite upper bound only and a dual of one sign, as the
    optimality certificate expects of every row.
    """
    from scipy import sparse

    T, K = rhs.shape
    old = (np.arange(2)[None, :, None] * T * K + np.arange(T)[:, None, None] * K
           + np.arange(K)[None, None, :]).ravel()  # new row (t, side, k) ← old (side, t, k)
    out = {name: sparse.csr_array(sparse.vstack([c, -c], format="csr")[old])
           for name, c in coeffs.items()}
    return out, np.stack([rhs, -rhs], axis=1).reshape(T, 2 * K)
