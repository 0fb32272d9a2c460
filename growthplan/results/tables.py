"""Labelled tables of a solved plan: the one place where years and sector names are attached.

Shadow prices are reported as *values*: the improvement of the objective per
unit by which a condition is relaxed (one more unit of a commodity in a year,
one more unit of capacity, one more person-year); non-negative at an optimum
whatever the objective's sense.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd

from ..backends.base import SolverOutcome
from ..lp.conditions import Schedules
from ..lp.data import PlanData
from ..lp.program import LinearProgram
from .accounts import employment, employment_column, national_accounts

__all__ = ["schedules", "frames", "current_prices", "money_factor"]

# tables whose columns are sectors or commodities: their unit per column in attrs["units"]
PER_SECTOR = ("output", "starts", "capacity", "capital_deliveries", "retirements",
              "surplus")


def schedules(d: PlanData, lp: LinearProgram, x: np.ndarray) -> Schedules:
    """The solution's schedules as arrays (capacity and deliveries through the operators)."""
    T, n = d.T, d.m  # per technique (per sector without alternatives)
    output = lp.cols["output"].take(x)
    starts = lp.cols["starts"].take(x)
    kappa = lp.cols["consumption"].take(x) if "consumption" in lp.cols else None
    level = float(x[lp.cols["level"].start]) if "level" in lp.cols else None
    g, w = lp.operators["capacity"], lp.operators["deliveries"]
    # the state form carries the new capacity in columns of its own: read it from them,
    # so that the audit's vintage-by-vintage recomputation checks the stock rows too
    new = lp.cols["stock"].take(x).ravel() if "stock" in lp.cols else g @ starts.ravel()
    cap = (d.base.ravel() + new).reshape(T + 1, n)
    deliv = (w @ starts.ravel()).reshape(T, d.n) + d.pipe_deliveries
    imports = lp.cols["imports"].take(x) if "imports" in lp.cols else None
    exports = lp.cols["exports"].take(x) if "exports" in lp.cols else None
    shipments = lp.cols["shipments"].take(x) if "shipments" in lp.cols else None
    own = lp.cols["regional_consumption"].take(x) if "regional_consumption" in lp.cols \
        else None
    return Schedules(output=output, starts=starts, consumption=kappa, level=level,
                     imports=imports, exports=exports, capacity=cap, deliveries=deliv,
                     shipments=shipments, regional_consumption=own)


def frames(d: PlanData, lp: LinearProgram, outcome: SolverOutcome, s: Schedules,
           discount_rate: float | None) -> dict[str, Any]:
    """Every table of the result, labelled."""
    names, years = d.names, d.years
    T, m = d.T, d.m
    idx = pd.Index(years, name="year")
    cols = pd.Index(names, name="sector")
    goods = pd.Index(names, name="commodity")
    output, starts, cap, kappa = s.output, s.starts, s.capacity, s.consumption
    entering = np.zeros((T + 1, m))  # capacity entering service at age 0 in each year
    for j in range(m):
        th = int(d.theta[j])
        for tau in range(T):
            if tau + th <= T:
                entering[tau + th, j] += starts[tau, j]
        for back, amount in enumerate(d.pipeline[j][::-1], start=1):
            if 0 <= th - back <= T:
                entering[th - back, j] += amount
    retire = cap[:-1] + entering[1:] - cap[1:]  # per technique
    retired = np.maximum(retire, 0.0) * (np.abs(retire) > 1e-12)
    out: dict[str, Any] = {}

    def frame(a: np.ndarray, index: pd.Index = idx, columns: pd.Index = cols) -> pd.DataFrame:
        return pd.DataFrame(a, index=index, columns=columns)

    # sector tables sum the sector's techniques (their main product)
    out["output"] = frame(d.by_sector(output))
    out["starts"] = frame(d.by_sector(starts))
    sector_cap = d.by_sector(cap)
    out["capacity"] = frame(sector_cap, index=pd.Index([*years, years[-1] + 1], name="year"))
    with np.errstate(divide="ignore", invalid="ignore"):
        out["utilisation"] = frame(np.where(sector_cap[:-1] > 0,
                                            d.by_sector(output) / sector_cap[:-1], np.nan))
    out["capital_deliveries"] = frame(s.deliveries, columns=goods)
    out["retirements"] = frame(d.by_sector(retired))
    if d.labour.shape[0]:
        used = d.labour_used(output)
        lab = {}
        for k, kind in enumerate(d.labour_kinds):
            lab[(kind, "used")] = used[:, k]
            lab[(kind, "available")] = d.supply[k]
        out["labour"] = pd.DataFrame(lab, index=idx)
    elif d.labour_all.shape[0]:
        used = d.labour_used(output, every_kind=True)
        out["labour"] = pd.DataFrame({(kind, "used"): used[:, k]
                                      for k, kind in enumerate(d.labour_all_kinds)}, index=idx)
    else:
        out["labour"] = pd.DataFrame(index=idx)
    if kappa is not None:
        by_pair = kappa[:, None] * d.basket[None, :]
        if s.regional_consumption is not None:  # each region at its own level
            from ..lp.regional import regional_use

            by_pair = regional_use(d, s.regional_consumption)
        cons = pd.DataFrame(by_pair, index=idx, columns=cols)
        cons.insert(0, "level", kappa)
        out["consumption"] = cons
    else:
        out["consumption"] = pd.DataFrame(index=idx)
    use = d.intermediate(output) + s.deliveries + d.demand
    if kappa is not None:
        use = use + kappa[:, None] * d.basket
    supply = d.supplied(output).copy()
    for key, side, direction, flows in (("imports", d.imports, 1.0, s.imports),
                                        ("exports", d.exports, -1.0, s.exports)):
        if flows is not None and side is not None:
            for i, j in enumerate(side.index):
                supply[:, j] += direction * flows[:, i]
            out[key] = pd.DataFrame(flows, index=idx,
                                    columns=pd.Index(side.goods, name="commodity"))
        else:
            out[key] = pd.DataFrame(index=idx)
    out["surplus"] = frame(supply - use, columns=goods)
    dual = outcome.row_dual
    if dual is None:
        dual = np.full(lp.shape[0], np.nan)
    sign = 1.0 if lp.sense == "max" else -1.0
    value = sign * lp.row_sign * dual
    value = np.where(np.abs(value) < 1e-12, 0.0, value)
    prices = lp.rows["balance"].take(value)
    out["shadow_prices"] = frame(prices, columns=goods)
    out["shadow_prices_current"] = frame(current_prices(prices, d.supplied(output),
                                                        discount_rate),
                                         columns=goods)
    rents = lp.rows["capacity"].take(value)  # per technique
    out["quasi_rents"] = frame(_best(d, rents))
    if "labour" in lp.rows:
        out["labour_values"] = pd.DataFrame(lp.rows["labour"].take(value), index=idx,
                                            columns=pd.Index(d.labour_kinds, name="kind"))
    else:
        out["labour_values"] = pd.DataFrame(index=idx)
    tv = pd.DataFrame([(t.quantity, t.sector or "", t.year, t.required) for t in d.targets],
                      columns=["condition", "sector", "year", "required"])
    if "targets" in lp.rows:
        tv["value"] = lp.rows["targets"].take(value)
    out["target_values"] = tv
    out["level"] = s.level
    out["terminal_value"] = float(d.prices @ sector_cap[-1])
    out["accounts"] = national_accounts(d, s, retired)
    out["employment"] = employment(d, s)
    factor = money_factor(d, prices, d.supplied(output))
    money_note = (f"{d.value_unit} per unit; numeraire: the first year's output bundle has "
                  "the same value at shadow prices as at base-year prices")
    out["shadow_prices_money"] = frame(prices * factor[:, None], columns=goods)
    out["quasi_rents_money"] = frame(_best(d, rents) * factor[:, None])
    if "labour" in lp.rows:
        out["labour_values_money"] = pd.DataFrame(
            lp.rows["labour"].take(value) * factor[:, None], index=idx,
            columns=pd.Index(d.labour_kinds, name="kind"))
    else:
        out["labour_values_money"] = pd.DataFrame(index=idx)
    for key in ("shadow_prices_money", "quasi_rents_money", "labour_values_money"):
        out[key].attrs["note"] = money_note
    if "consumption_floor" in lp.rows:
        out["floor_values"] = pd.Series(lp.rows["consumption_floor"].take(value), index=idx,
                                        name="consumption_floor_value")
    else:
        out["floor_values"] = pd.Series(np.full(T, np.nan), index=idx,
                                        name="consumption_floor_value")
    out["calibration"] = calibration(d, output)
    out["technique_rents"] = rents
    out["technique_retirements"] = retired
    units = dict(zip(names, d.units, strict=True))
    for key in PER_SECTOR:
        out[key].attrs["units"] = units
    from .emissions import emission_frames

    out.update(emission_frames(d, lp, value, s, factor))
    if "foreign_exchange" in lp.rows:
        out["shadow_exchange_rate"] = pd.Series(lp.rows["foreign_exchange"].take(value),
                                                index=idx, name="shadow_exchange_rate")
    else:
        out["shadow_exchange_rate"] = pd.Series(np.full(T, np.nan), index=idx,
                                                name="shadow_exchange_rate")
    # several regions: accounts, gap, flows and prices by region (empty for one region)
    from .regions import regional_frames

    out.update(regional_frames(d, s, prices))
    return out


def _best(d: PlanData, rents: np.ndarray) -> np.ndarray:
    """A sector's quasi-rent: the largest over its techniques (its own without alternatives)."""
    if d.tech is None:
        return rents
    out = np.full((rents.shape[0], d.n), -np.inf)
    for k, j in enumerate(d.tech_sector):
        out[:, j] = np.maximum(out[:, j], rents[:, k])
    return out


def calibration(d: PlanData, output: np.ndarray) -> pd.DataFrame:
    """The first plan year against the base year, by sector (empty without a base year).

    Columns: base-year output, first-year output, their relative change, and
    for each labour kind the employment of both years.
    """
    if d.base_output is None:
        return pd.DataFrame(index=pd.Index([], name="sector"))
    base = d.base_output
    first = d.by_sector(output)[0]  # output: years × techniques
    with np.errstate(divide="ignore", invalid="ignore"):
        change = np.where(base > 0, first / base - 1.0, np.nan)
    out = pd.DataFrame({"base_output": base, "first_year_output": first, "change": change},
                       index=pd.Index(d.names, name="sector"))
    for k, kind in enumerate(d.labour_all_kinds):
        # the base year ran on the base techniques, the first columns
        out[f"base {employment_column(kind)}"] = base * d.labour_all[k, : d.n]
        out[f"first-year {employment_column(kind)}"] = d.by_sector(output[0] * d.labour_all[k])
    out.attrs["units"] = dict(zip(d.names, d.units, strict=True))
    return out


def money_factor(d: PlanData, prices: np.ndarray, output: np.ndarray) -> np.ndarray:
    """Per-year factor that turns shadow values into base-year money.

    Year ``t``'s shadow prices are scaled so that the first year's output
    bundle ``x_0`` has the same value at them as at base-year prices:
    ``factor_t = (p·x_0) / (y_t·x_0)`` (NaN where the bundle has no shadow value).
    """
    bundle = output[0] if output[0].sum() > 0 else np.ones(prices.shape[1])
    at_base = float(d.prices @ bundle)
    at_shadow = prices @ bundle
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.abs(at_shadow) > 1e-300, at_base / at_shadow, np.nan)


def current_prices(prices: np.ndarray, output: np.ndarray,
                   discount_rate: float | None) -> np.ndarray:
    """Shadow prices in current-year terms.

    With a discounted objective at rate ``r`` the year-``t`` prices are
    multiplied by ``(1 + r)^t``. Otherwise each year's prices are divided by
    that year's price of the first year's output bundle and multiplied by the
    first year's, so the bundle keeps its first-year value; the ratio between
    years is the plan's implied own rate of interest.
    """
    t = np.arange(prices.shape[0], dtype=float)
    if discount_rate is not None:
        return prices * (1.0 + discount_rate) ** t[:, None]
    weights = output[0] if output[0].sum() > 0 else np.ones(prices.shape[1])
    index = prices @ weights
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = np.where(index > 1e-300, index[0] / index, np.nan)
    return prices * scale[:, None]
