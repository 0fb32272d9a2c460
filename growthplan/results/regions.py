"""The tables of a plan over several regions, at base-year prices.

For each plan year and region ``r`` (its techniques ``k ∈ r``, prices ``p``):

* gross regional product ``Σ_{k∈r} p·(q_k − a_k) x_k`` (value added of the
  region's sectors; transport used by shipments is output of the transport
  sector that carries it, valued there);
* investment: the capital goods delivered for the region's capacity starts,
  ``p·(W z)`` over the region's own commodity rows, and its share of the
  regional product;
* consumption ``p·(h^r κ^r)`` (or ``p·(h^r κ)`` with one level), and
  employment (the first labour kind) with the region's supply when it has one.

Flows list every shipment by year (units of the good, the transport it
uses, and its value at the origin's base-year price). The spatial price
pattern sets each commodity's shadow price side by side by region with the
spread between the dearest and the cheapest: with transport cost ``τ`` per
unit, prices of a traded good differ by at most ``τ`` times the transport
sector's price, exactly that where the good moves. The regional gap is the
ratio of the highest to the lowest regional product per person-year of
labour (the region's supply when given, otherwise its employment).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

if TYPE_CHECKING:
    from ..lp.conditions import Schedules
    from ..lp.data import PlanData

__all__ = ["regional_frames", "REGIONAL_TABLES", "flow_matrix", "flat_table", "regional_words"]

# the result's regional tables, in the order of the exports
REGIONAL_TABLES = ("regional_accounts", "regional_gap", "flows", "spatial_prices",
                   "regional_output")


def _empty() -> dict[str, pd.DataFrame]:
    return {name: pd.DataFrame() for name in REGIONAL_TABLES}


def regional_frames(d: PlanData, s: Schedules, prices: np.ndarray) -> dict[str, pd.DataFrame]:
    """The regional tables (empty frames for a plan of one region).

    Parameters
    ----------
    d : PlanData
    s : Schedules
    prices : ndarray
        Shadow prices of the commodity balances, years × pairs (as reported).
    """
    reg = d.regions
    if reg is None:
        return _empty()
    R, n, T = reg.R, len(reg.sectors), d.T
    years = pd.Index(d.years, name="year")
    p = d.prices
    region_of_tech = reg.pair_region(d.tech_sector)
    member = np.zeros((d.m, R))
    member[np.arange(d.m), region_of_tech] = 1.0
    va = np.array([(p @ (d.q - d.a_at(t))) * s.output[t] for t in range(T)])  # years × m
    gdp = va @ member
    rows = np.repeat(np.arange(R), n)                      # region of each commodity row
    rmember = np.zeros((R * n, R))
    rmember[np.arange(R * n), rows] = 1.0
    deliv = s.deliveries_check if s.deliveries_check is not None else s.deliveries
    invest = (deliv * p[None, :]) @ rmember
    if s.regional_consumption is not None:
        cons_pairs = s.regional_consumption @ reg.basket.T
    elif s.consumption is not None:
        cons_pairs = s.consumption[:, None] * d.basket[None, :]
    else:
        cons_pairs = np.zeros((T, R * n))
    cons = (cons_pairs * p[None, :]) @ rmember
    if d.labour_all.shape[0]:
        lab = np.array([d.labour_at(t, every_kind=True)[0] for t in range(T)])
        employed = (s.output * lab) @ member
    else:
        employed = np.full((T, R), np.nan)
    supply = reg.labour.T if reg.labour is not None else np.full((T, R), np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(gdp != 0, invest / gdp, np.nan)
        growth = np.vstack([np.full((1, R), np.nan), gdp[1:] / gdp[:-1] - 1.0])
    idx = pd.MultiIndex.from_product([d.years, reg.regions], names=["year", "region"])
    accounts = pd.DataFrame({
        "regional_product": gdp.ravel(), "investment": invest.ravel(),
        "investment_share": share.ravel(), "consumption": cons.ravel(),
        "employment": employed.ravel(), "labour_supply": supply.ravel(),
        "product_growth": growth.ravel()}, index=idx)
    if reg.labour is None:
        accounts = accounts.drop(columns="labour_supply")
    accounts.attrs["unit"] = d.value_unit
    per_worker_base = supply if reg.labour is not None else employed
    with np.errstate(divide="ignore", invalid="ignore"):
        per_worker = np.where(per_worker_base > 0, gdp / per_worker_base, np.nan)
    gap = pd.DataFrame(per_worker, index=years,
                       columns=pd.Index(reg.regions, name="region"))
    with np.errstate(invalid="ignore", divide="ignore"):
        gap["highest_to_lowest"] = np.nanmax(per_worker, axis=1) / np.nanmin(per_worker,
                                                                             axis=1)
    gap.attrs["note"] = ("regional product per person-year of the region's labour supply"
                         if reg.labour is not None else
                         "regional product per person-year employed")
    out = {"regional_accounts": accounts, "regional_gap": gap}
    if s.shipments is not None and reg.K:
        y = s.shipments
        flows = pd.DataFrame({
            "year": np.repeat(d.years, reg.K),
            "origin": np.tile([reg.regions[o] for o in reg.origin], T),
            "destination": np.tile([reg.regions[o] for o in reg.destination], T),
            "good": np.tile([reg.sectors[g] for g in reg.good], T),
            "amount": y.ravel(),
            "transport_used": (y * reg.transport[None, :]).ravel(),
            "value": (y * p[reg.origin * n + reg.good][None, :]).ravel()})
        out["flows"] = flows
    else:
        out["flows"] = pd.DataFrame()
    grid = prices.reshape(T, R, n)                         # years × regions × goods
    sp = pd.DataFrame(grid.transpose(0, 2, 1).reshape(T * n, R),
                      index=pd.MultiIndex.from_product([d.years, reg.sectors],
                                                       names=["year", "commodity"]),
                      columns=pd.Index(reg.regions, name="region"))
    sp["spread"] = grid.max(axis=1).ravel() - grid.min(axis=1).ravel()
    out["spatial_prices"] = sp
    by_pair = d.by_sector(s.output)
    out["regional_output"] = pd.DataFrame(
        by_pair, index=years, columns=pd.MultiIndex.from_product([reg.regions, reg.sectors],
                                                                 names=["region", "sector"]))
    return out


def flat_table(frame: pd.DataFrame) -> pd.DataFrame:
    """A regional table for export: two-level rows as columns, two-level headers joined."""
    out = frame.copy()
    if isinstance(out.columns, pd.MultiIndex):
        out.columns = pd.Index(["/".join(map(str, c)) for c in out.columns])
    if isinstance(out.index, pd.MultiIndex):
        out = out.reset_index()
    return out


def flow_matrix(flows: pd.DataFrame, regions: list[str], *, year: int | None = None
                ) -> pd.DataFrame:
    """Value shipped from each region (rows) to each other (columns), in one year or all."""
    f = flows if year is None else flows[flows["year"] == year]
    table = f.pivot_table(index="origin", columns="destination", values="value",
                          aggfunc="sum", fill_value=0.0)
    return table.reindex(index=regions, columns=regions, fill_value=0.0).rename_axis(
        index="origin", columns="destination")


def regional_words(accounts: pd.DataFrame, gap: pd.DataFrame, flows: pd.DataFrame,
                   unit: str) -> list[tuple[str, Any]]:
    """A few lines on the regions for the report: growth, the gap and the main corridor."""
    years = sorted(set(accounts.index.get_level_values("year")))
    first, last = years[0], years[-1]
    out: list[tuple[str, Any]] = []
    for region, grp in accounts.groupby(level="region", sort=False):
        a = float(grp.loc[(first, region), "regional_product"])
        b = float(grp.loc[(last, region), "regional_product"])
        rate = (b / a) ** (1 / max(len(years) - 1, 1)) - 1 if a > 0 and b > 0 else float("nan")
        out.append((f"{region}", f"regional product {a:,.1f} → {b:,.1f} {unit} "
                                 f"({rate:+.1%} a year)"))
    g = gap["highest_to_lowest"]
    out.append(("regional gap", f"highest to lowest product per person-year "
                                f"{g.iloc[0]:.2f} in {first}, {g.iloc[-1]:.2f} in {last}"))
    if not flows.empty and flows["value"].sum() > 0:
        by = flows.groupby(["origin", "destination"])["value"].sum().sort_values()
        (o, dst), v = by.index[-1], float(by.iloc[-1])
        out.append(("main corridor", f"{o} to {dst}: {v:,.1f} {unit} shipped over the plan"))
    return out
