"""Emissions of a solved plan and the shadow prices of its limits, labelled with their units.

A limit's shadow price is the improvement of the objective per unit by
which it is relaxed (one more tonne allowed), the row's dual; in base-year
money it is scaled by the same numeraire as the commodity prices (the first
year's output bundle has the same value at shadow and at base-year prices).
A budget has one price: its row's dual, the same for every year of its
window; in money it is reported at the numeraire of the window's first year.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

if TYPE_CHECKING:
    from ..lp.conditions import Schedules
    from ..lp.data import PlanData
    from ..lp.program import LinearProgram

__all__ = ["emission_frames", "HOUSEHOLDS"]

HOUSEHOLDS = "households"  # the sector and technique label of households' direct emissions

PRICE_COLUMNS = ["limit", "kind", "what", "year", "bound", "emitted", "slack", "value",
                 "price", "unit", "price_unit"]


def emission_frames(d: PlanData, lp: LinearProgram, value: np.ndarray, s: Schedules,
                    factor: np.ndarray, objective_unit: str = "") -> dict[str, Any]:
    """``emissions`` (long), ``emission_totals`` (years × names) and ``emission_prices``."""
    sat = d.satellite
    idx = pd.Index(d.years, name="year")
    if sat is None:
        empty = pd.DataFrame(columns=["year", "stressor", "sector", "technique", "amount",
                                      "unit"])
        return {"emissions": empty, "emission_totals": pd.DataFrame(index=idx),
                "emission_prices": pd.DataFrame(columns=PRICE_COLUMNS)}
    by_tech = sat.intensity * s.output[None, :, :]               # names × years × techniques
    kappa = s.consumption
    homes = (sat.households[:, None] * kappa[None, :] if kappa is not None
             else np.zeros((len(sat.names), d.T)))
    W, T, m = by_tech.shape
    sectors = [d.names[j] for j in d.tech_sector]
    long = pd.DataFrame({
        "year": np.tile(np.repeat(d.years, m + 1), W),
        "stressor": np.repeat(sat.names, T * (m + 1)),
        "sector": np.tile([*sectors, HOUSEHOLDS], W * T),
        "technique": np.tile([*d.tech_names, HOUSEHOLDS], W * T),
        "amount": np.concatenate([by_tech, homes[:, :, None]], axis=2).ravel(),
        "unit": np.repeat(sat.units, T * (m + 1))})
    long = long[long["amount"] != 0].reset_index(drop=True)
    totals = pd.DataFrame((by_tech.sum(axis=2) + homes).T, index=idx,
                          columns=pd.Index(sat.names, name="stressor"))
    totals.attrs["units"] = dict(zip(sat.names, sat.units, strict=True))
    out = {"emissions": long, "emission_totals": totals,
           "emission_prices": _prices(d, lp, value, totals.to_numpy().T, s.output, factor,
                                     objective_unit)}
    return out


def _prices(d: PlanData, lp: LinearProgram, value: np.ndarray, emitted: np.ndarray,
            output: np.ndarray, factor: np.ndarray, objective_unit: str) -> pd.DataFrame:
    sat = d.satellite
    assert sat is not None
    if "emissions" not in lp.rows:
        return pd.DataFrame(columns=PRICE_COLUMNS)
    from ..lp.conditions.emissions import gdp_coefficients

    duals = lp.rows["emissions"].take(value)
    gdp = None
    recs = []
    i = 0
    for lim in sat.limits:
        unit = sat.units[lim.w]
        money = f"{d.value_unit} per {unit}" if d.value_unit else f"per {unit}"
        e = emitted[lim.w]
        if lim.kind == "budget":
            years = [d.years[t] for t in lim.t]
            used = float(e[lim.t].sum())
            f = factor[lim.t[0]]
            recs.append((lim.index, lim.kind, lim.what, f"{years[0]}–{years[-1]}"
                         if len(years) > 1 else years[0], float(lim.bound[0]), used,
                         float(lim.bound[0]) - used, duals[i], duals[i] * f, unit, money))
            i += 1
            continue
        for j, t in enumerate(lim.t):
            if lim.kind == "cap":
                bound = float(lim.bound[j])
            else:
                if gdp is None:
                    gdp = np.einsum("tk,tk->t", gdp_coefficients(d), output)
                bound = float(lim.bound[t] * gdp[t])
            recs.append((lim.index, lim.kind, lim.what, d.years[t], bound, float(e[t]),
                         bound - float(e[t]), duals[i], duals[i] * factor[t], unit, money))
            i += 1
    out = pd.DataFrame(recs, columns=PRICE_COLUMNS)
    out.attrs["note"] = (
        f"value: objective{' (' + objective_unit + ')' if objective_unit else ''} gained per "
        "unit of the limit relaxed; price: the same in base-year money per unit, numeraire: "
        "the first year's output bundle has the same value at shadow prices as at base-year "
        "prices (a budget at its first year's)")
    return out
