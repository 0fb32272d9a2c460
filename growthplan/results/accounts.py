"""A plan in national-accounts terms, at base-year prices.

For each plan year, with base-year prices ``p`` (one per commodity):

* gross output ``p·x``; intermediate use ``p·A x``;
* value added (GDP from production) ``p·(x − A x)``;
* final uses: gross fixed investment (capital goods delivered, ``p·W z``),
  consumption ``p·h κ``, exogenous demand ``p·g``, exports ``p·e`` less
  imports ``p·m``; and free disposal, the value of what the balances leave
  unused (``p·(x + m − e − A x − W z − h κ − g)``), shown separately so the
  identity GDP = final uses + disposal is exact;
* employment by labour kind, retirements of capacity valued at the capital
  goods they embody (``Σ_j (p·b_j) × retired_j``; with technical change each
  vintage at the capital coefficients of its start year);
* growth rates of the main aggregates (real, since all are at base-year prices).

Every aggregate is a sum of values, so it does not change when a sector's unit
does (its price scaled inversely).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..lp.conditions import Schedules
from ..lp.data import PlanData

__all__ = ["national_accounts", "employment", "employment_column", "employment_kind"]


def employment_column(kind: str) -> str:
    """"employment" for the default labour kind "labour", "employment skilled" else
    (never "employment labour")."""
    return "employment" if kind == "labour" else f"employment {kind}"


def employment_kind(column: str) -> str | None:
    """The labour kind of an accounts column made by :func:`employment_column`, or None."""
    if column == "employment":
        return "labour"
    return column[len("employment "):] if column.startswith("employment ") else None


def _trade(d: PlanData, s: Schedules) -> tuple[np.ndarray, np.ndarray]:
    exp = np.zeros(d.T)
    imp = np.zeros(d.T)
    if s.imports is not None and d.imports is not None:
        imp = s.imports @ d.prices[d.imports.index]
    if s.exports is not None and d.exports is not None:
        exp = s.exports @ d.prices[d.exports.index]
    return exp, imp


def _retired_value(d: PlanData, s: Schedules) -> np.ndarray:
    """Value of the capacity retired in each year, vintage by vintage.

    Capacity started in plan year ``τ`` is valued at the capital goods it
    embodies, ``p·b_τ``; capacity from before the plan at the base year's.
    What retires during year ``t`` is ``(S(a) − S(a + 1))`` of each vintage of
    age ``a`` in year ``t``.
    """
    p = d.prices
    out = np.zeros(d.T)
    base_value = p @ d.b
    for j in range(d.m):
        surv = np.append(d.surv_full[j], 0.0)  # S(a) = 0 past the profile's end
        last = surv.size - 1
        theta = int(d.theta[j])
        out += (d.initial[:-1, j] - d.initial[1:, j]) * base_value[j]
        vintages = [(-(k + 1), v, base_value[j]) for k, v in enumerate(d.pipeline[j][::-1])]
        vintages += [(tau, s.starts[tau, j], float(p @ d.b_at(tau)[:, j])) for tau in range(d.T)]
        for tau, amount, value in vintages:
            for t in range(d.T):
                age = t - tau - theta
                if age >= 0:
                    out[t] += amount * value * (surv[min(age, last)]
                                                - surv[min(age + 1, last)])
    return out


def national_accounts(d: PlanData, s: Schedules, retirements: np.ndarray) -> pd.DataFrame:
    """The accounts table, years as rows (see the module notes).

    Parameters
    ----------
    d : PlanData
        The plan's arrays (prices, coefficients, demand).
    s : Schedules
        The solution.
    retirements : numpy.ndarray
        Capacity retired in each year, years × techniques (sectors).

    Returns
    -------
    pandas.DataFrame
        Columns ``gross_output``, ``intermediate_use``, ``gdp``, ``investment``,
        ``investment_share``, ``consumption``, ``exogenous_demand``, ``exports``,
        ``imports``, ``disposal``, ``retirements``, ``consumption_per_head`` when
        the plan gives a population, one ``employment <kind>``
        per labour kind, and ``<aggregate>_growth`` for gross output, GDP,
        investment and consumption; ``attrs["unit"]`` holds the value unit.
    """
    p = d.prices
    x = s.output
    kappa = np.zeros(d.T) if s.consumption is None else s.consumption
    gross = d.supplied(x) @ p
    inter = d.intermediate(x) @ p
    gdp = gross - inter
    invest = s.deliveries @ p
    cons = kappa * float(d.basket @ p)
    demand = d.demand @ p
    exp, imp = _trade(d, s)
    disposal = gdp - (invest + cons + demand + exp - imp)
    disposal = np.where(np.abs(disposal) <= 1e-9 * np.maximum(np.abs(gross), 1e-300), 0.0,
                        disposal)
    if d.b_year is None:
        retired = retirements @ (p @ d.b)  # capital goods in one unit of capacity, valued
    else:  # each vintage valued at the capital coefficients of its own start year
        retired = _retired_value(d, s)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(gdp > 0, invest / gdp, np.nan)
    out = pd.DataFrame({"gross_output": gross, "intermediate_use": inter, "gdp": gdp,
                        "investment": invest, "investment_share": share,
                        "consumption": cons, "exogenous_demand": demand, "exports": exp,
                        "imports": imp, "disposal": disposal, "retirements": retired},
                       index=pd.Index(d.years, name="year"))
    if d.population is not None:
        out.insert(out.columns.get_loc("consumption") + 1, "consumption_per_head",
                   cons / d.population)
    used = d.labour_used(x, every_kind=True)
    for k, kind in enumerate(d.labour_all_kinds):
        out[employment_column(kind)] = used[:, k]
    for col in ("gross_output", "gdp", "investment", "consumption"):
        prev = out[col].shift(1)
        with np.errstate(divide="ignore", invalid="ignore"):
            out[f"{col}_growth"] = np.where(prev > 0, out[col] / prev - 1.0, np.nan)
    out.attrs["unit"] = d.value_unit
    return out


def employment(d: PlanData, s: Schedules) -> pd.DataFrame:
    """Labour used by sector and kind, years × (kind, sector).

    Parameters
    ----------
    d : PlanData
    s : Schedules

    Returns
    -------
    pandas.DataFrame
        ``attrs["units"]`` maps each kind to its unit.
    """
    cols = {}
    for k, kind in enumerate(d.labour_all_kinds):
        for name in d.names:
            cols[(kind, name)] = np.zeros(d.T)
        for j, sector in enumerate(d.tech_sector):  # a sector's techniques add up
            coef = d.labour_all[k, j] if d.labour_all_year is None \
                else d.labour_all_year[:, k, j]
            key = (kind, d.names[sector])
            cols[key] = cols[key] + s.output[:, j] * coef
    out = pd.DataFrame(cols, index=pd.Index(d.years, name="year"))
    if cols:
        out.columns = pd.MultiIndex.from_tuples(list(cols), names=["kind", "sector"])
    out.attrs["units"] = dict(zip(d.labour_all_kinds, d.labour_all_units, strict=True))
    return out
