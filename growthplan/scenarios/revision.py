"""Rolling re-planning: the plan revised from a later year, given what was actually built.

:func:`revise` turns a plan and the starts actually made in the years gone
by into a plan for the years left. Capacity started long enough ago to be in
service is folded into the revised plan's initial capacity; starts still
under construction (the last ``max(θ, 1)`` years of each sector) become its
``under_construction`` pipeline, so their remaining capital deliveries fall
in the revised years and their capacity enters service on schedule.

How the initial capacity keeps retiring: with a geometric retirement profile
survival is memoryless, so the capacity in service (all vintages summed into
one number) retires exactly as before. For every other profile the revised
capital spec carries the vintages as an ``investment_history`` (perpetual
inventory): the vintages of the original initial capacity (its own history,
or the steady age structure of ``past_growth``) and every start that entered
service, each in the year it did; the surviving sum is the initial capacity,
and its survival in later years follows the vintages' ages.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..errors import invalid
from ..limits import ACTUALS_MAX_BYTES

if TYPE_CHECKING:
    from ..model.plan import Plan

__all__ = ["revise", "compare", "read_actuals"]



def _actuals(plan: Plan, actuals: Any, k: int) -> np.ndarray:
    """Starts made in plan years 0..k−1, years × sectors."""
    names = plan.economy.names
    past = plan.years[:k]
    if isinstance(actuals, pd.DataFrame):
        unknown = [c for c in actuals.columns if c not in names]
        if unknown:
            raise invalid("actuals", "name sectors of the economy", unknown[:5])
        missing = [y for y in past if y not in actuals.index]
        if missing:
            raise invalid("actuals", f"give a row for every year {past[0]}..{past[-1]}",
                          f"missing {missing[:5]}")
        frame = actuals.loc[past].reindex(columns=names, fill_value=0.0)
        out = frame.to_numpy(dtype=float)
    elif isinstance(actuals, dict):
        out = np.zeros((k, len(names)))
        for sector, values in actuals.items():
            if sector not in names:
                raise invalid("actuals", "name sectors of the economy", sector)
            v = np.asarray(values, dtype=float).ravel()
            if v.size != k:
                raise invalid(f"actuals.{sector}", f"give one start per year gone by ({k})",
                              f"{v.size} values")
            out[:, names.index(sector)] = v
    else:
        raise invalid("actuals", "be a DataFrame (years × sectors) or a dict of sector to "
                      "starts per year", type(actuals).__name__)
    if not np.all(np.isfinite(out)) or np.any(out < 0):
        raise invalid("actuals", "hold finite starts >= 0", "a negative or non-finite start")
    return out


def read_actuals(path: Any) -> pd.DataFrame:
    """Capacity starts actually made, from a tidy CSV file, as years × sectors.

    The file has a header and three columns, ``year,sector,starts``: one row
    per year and sector, in any order. A sector missing from a year started
    nothing that year; every year before the revision must have at least one
    row (write ``0`` to say nothing was started). Starts are in each sector's
    own unit of capacity, as ``result.starts``.

    Parameters
    ----------
    path : path
        The CSV file.

    Returns
    -------
    DataFrame
        Years as rows, sectors as columns: the ``actuals`` of :func:`revise`.

    Raises
    ------
    InvalidInput
        Naming the file: missing columns, a year that is not whole, a start
        that is not a finite number >= 0, or a (year, sector) given twice.
    """
    import codecs
    import io
    import re

    from ..io.files import read_regular_file

    raw = read_regular_file(path, what="actuals", limit=ACTUALS_MAX_BYTES)
    bom = len(codecs.BOM_UTF8) if raw.startswith(codecs.BOM_UTF8) else 0
    try:
        text = raw[bom:].decode("utf-8")
    except UnicodeDecodeError as exc:  # the byte's place in the file, counted from 0
        at = bom + exc.start
        raise invalid(f"{path}", "be UTF-8 text", f"byte {at} (0x{raw[at]:02x}) is not "
                      "UTF-8") from None
    try:
        frame = pd.read_csv(io.StringIO(text), dtype=str, keep_default_na=False)
    except (ValueError, pd.errors.ParserError) as exc:  # the parser's reason, in its words
        reason = str(exc).strip().splitlines()[0] if str(exc).strip() else "no table"
        reason = re.sub(r"^Error tokenizing data\. C error: ", "", reason)
        raise invalid(f"{path}", "be a CSV table with columns year, sector, starts",
                      reason[0].lower() + reason[1:] if reason[1:2].islower() else reason
                      ) from None
    frame.columns = [str(c).strip().lower() for c in frame.columns]
    if sorted(frame.columns) != ["sector", "starts", "year"]:
        raise invalid(f"{path}", "have the columns year, sector, starts", list(frame.columns))
    if frame.empty:
        raise invalid(f"{path}", "hold at least one row", "no rows")
    years = pd.to_numeric(frame["year"].str.strip(), errors="coerce")
    bad = frame["year"][years.isna() | (years != years.round())]
    if len(bad):
        raise invalid(f"{path}: year", "hold whole years", bad.iloc[0])
    starts = pd.to_numeric(frame["starts"].str.strip(), errors="coerce")
    bad = frame["starts"][~np.isfinite(starts.to_numpy(dtype=float)) | (starts < 0)]
    if len(bad):
        raise invalid(f"{path}: starts", "hold finite numbers >= 0", bad.iloc[0])
    tidy = pd.DataFrame({"year": years.astype(int), "sector": frame["sector"].str.strip(),
                         "starts": starts.astype(float)})
    twice = tidy[tidy.duplicated(["year", "sector"])]
    if len(twice):
        raise invalid(f"{path}", "give each year and sector once",
                      f"{twice.iloc[0]['year']} {twice.iloc[0]['sector']} again")
    wide = tidy.pivot(index="year", columns="sector", values="starts").fillna(0.0)
    return wide.sort_index().rename_axis(index="year", columns="sector")


def _vintages(spec: Any, c0: float) -> np.ndarray:
    """Capacity of each vintage of the initial stock entering service, oldest first, the
    last in plan year 0 (scaled so the surviving sum in year 0 is ``c0``)."""
    s = np.asarray(spec.survival(), dtype=float)
    if spec.investment_history is not None:
        h = np.asarray(spec.investment_history, dtype=float)
    else:
        ages = np.arange(s.size, dtype=float)
        h = np.exp(-ages * np.log1p(spec.past_growth))[::-1]
    alive = float(np.sum(h[::-1][: s.size] * s[: h.size]))
    return h * (c0 / alive) if alive > 0 else h * 0.0


def revise(plan: Plan, actuals: Any, from_year: int, *, capacity: dict[str, float] | None = None,
           labour: dict[str, float] | None = None,
           budget_used: dict[int, float] | None = None) -> Any:
    """The plan for ``from_year``..end, starting from what was actually built.

    Parameters
    ----------
    plan : Plan
        The original plan.
    actuals : DataFrame or dict
        Capacity starts actually made in each year before ``from_year``
        (years × sectors, as ``result.starts``, or sector → list of starts).
    from_year : int
        First year of the revised plan; a plan year after the first.
    capacity : dict of str to float, optional
        Capacity actually in service in ``from_year`` by sector (default:
        what the original plan's retirement and the actual starts give).
    labour : dict of str to float, optional
        Latest labour supply by kind, for ``from_year``; default the original
        supply of that year. It grows at the original rate after.
    budget_used : dict of int to float, optional
        For each emission budget (by its index in ``plan.limits``) whose window
        began before ``from_year``: the amount already emitted in those years;
        the revised budget is what is left (a budget over earlier years only
        is dropped). Caps and ceilings keep their remaining years.

    Returns
    -------
    Plan
        Same economy coefficients, targets and ceilings of the remaining
        years, terminal condition and objective; initial capacity and
        ``under_construction`` from the actuals. Consumption's limit on the
        fall from the year before the revised plan is not carried over, nor
        is ``first_year_within`` (a condition on the original first year).
    """
    from ..lp.data import consumption_floor, exogenous_demand, labour_supply, trade_sides
    from ..model.economy import CapitalSpec, Economy
    from ..model.plan import Consumption, LabourSupply, Plan, StartsCeiling, Trade
    from ..model.technique import refuse_techniques

    refuse_techniques(plan, "revision")

    years = list(plan.years)
    if isinstance(from_year, bool) or not isinstance(from_year, int | np.integer) \
            or from_year not in years[1:]:
        raise invalid("from_year", f"be a plan year after the first ({years[0] + 1}.."
                      f"{years[-1]})", from_year)
    k = years.index(int(from_year))
    z = _actuals(plan, actuals, k)
    econ = plan.economy
    d = plan.lowered()
    names = econ.names
    new_years = years[k:]
    pipeline: dict[str, list[float]] = {}
    capital: dict[str, Any] = {}
    assert econ.capital is not None  # a valid plan's economy has capital for every sector
    for j, name in enumerate(names):
        spec = econ.capital[name]
        theta = int(d.theta[j])
        w = max(theta, 1)
        # every start by calendar year: the original pipeline, then the actuals
        before = d.pipeline[j]
        hist = np.concatenate([before, z[:, j]])
        first = years[0] - before.size
        pipe = hist[-w:] if hist.size >= w else np.concatenate([np.zeros(w - hist.size), hist])
        old = hist[: max(hist.size - w, 0)]  # in service by from_year (entered at τ + θ)
        surv = d.surv_full[j]
        enter = np.arange(old.size) + first + theta - from_year  # ≤ −1: plan years back
        ages = -enter
        alive = np.where(ages < surv.size, surv[np.minimum(ages, surv.size - 1)], 0.0)
        c_start = float(d.initial[k, j] + np.sum(old * alive))
        given = None if capacity is None else capacity.get(name)
        c_new = c_start if given is None else float(given)
        fields = spec.model_dump()
        fields["initial_capacity"] = c_new
        if spec.retirement == "geometric":
            fields["investment_history"] = None  # memoryless: one number is exact
        else:
            # vintages entering service, by calendar year, the last in from_year
            init = _vintages(spec, spec.initial_capacity)
            span_first = min(years[0] - init.size + 1, first + theta if old.size else years[0])
            length = from_year - span_first + 1
            vint = np.zeros(length)
            vint[years[0] - init.size + 1 - span_first:years[0] - span_first + 1] += init
            if old.size:
                pos = np.arange(old.size) + first + theta - span_first
                np.add.at(vint, pos, old)
            # drop vintages fully retired by from_year (keeps the history short)
            age_now = from_year - (np.arange(length) + span_first)
            keep = np.flatnonzero((age_now < surv.size) & (vint > 0))
            vint = vint[keep.min():] if keep.size else np.array([1.0])
            fields["investment_history"] = vint.tolist()
        capital[name] = CapitalSpec(**fields)
        if np.any(pipe > 0):
            pipeline[name] = pipe.tolist()
    data = {f: getattr(econ, f) for f in type(econ).model_fields}
    data["capital"] = capital
    if econ.labour_coefficients is None:
        data.pop("labour_kinds", None)
    fields_p = {f: getattr(plan, f) for f in type(plan).model_fields}
    fields_p["economy"] = Economy(**data)
    fields_p["years"] = new_years
    fields_p["under_construction"] = pipeline or None
    supply = labour_supply(plan)
    new_labour = []
    for i, ls in enumerate(plan.labour):
        latest = (labour or {}).get(ls.kind)
        if ls.series is None:
            start = float(supply[i, k]) if latest is None else float(latest)
            new_labour.append(LabourSupply(start=start, growth=ls.growth, kind=ls.kind))
        else:
            path = supply[i, k:] * (1.0 if latest is None else float(latest) / supply[i, k])
            new_labour.append(LabourSupply(series=path.tolist(), kind=ls.kind))
    unknown = [kind for kind in (labour or {}) if kind not in [ls.kind for ls in plan.labour]]
    if unknown:
        raise invalid("labour", "name labour kinds with a supply in the plan", unknown)
    fields_p["labour"] = new_labour
    if plan.consumption is not None:
        floor = consumption_floor(plan)[k:]
        fields_p["consumption"] = Consumption(**{**plan.consumption.model_dump(),
                                                 "floor": floor.tolist(), "floor_growth": 0.0})
    if plan.final_demand is not None:
        fields_p["final_demand"] = pd.DataFrame(exogenous_demand(plan)[k:], index=new_years,
                                                columns=names)
        fields_p["final_demand_growth"] = 0.0
    # the first plan year's nearness to the base year is a condition on that year alone
    fields_p["first_year_within"] = None
    fields_p["targets"] = [t for t in plan.targets if t.year >= from_year]
    ceilings = []
    for sc in plan.starts_ceilings:
        if sc.years is None:
            ceilings.append(sc)
        elif any(y >= from_year for y in sc.years):
            ceilings.append(StartsCeiling(sector=sc.sector, at_most=sc.at_most,
                                          years=[y for y in sc.years if y >= from_year]))
    fields_p["starts_ceilings"] = ceilings
    fields_p["limits"] = _remaining_limits(plan, from_year, budget_used or {})
    if plan.trade is not None:
        imp, exp, inflow = trade_sides(plan)
        t = plan.trade.model_dump()
        assert inflow is not None
        t.update(inflow=inflow[k:].tolist(), inflow_growth=0.0)
        for key, side in (("import_ceilings", imp), ("export_ceilings", exp)):
            if side is not None:
                t[key] = {g: side.ceilings[k:, i].tolist()
                          for i, g in enumerate(side.goods) if g in t[key]}
        fields_p["trade"] = Trade(**t)
    out = Plan(**fields_p)
    out._revised_from = int(from_year)  # its base is the actuals, not the base year
    return out


def _remaining_limits(plan: Any, from_year: int, used: dict[int, float]) -> list[Any]:
    """The plan's emission limits over the years from ``from_year`` on."""
    from ..model.satellite import Budget, Cap

    years = list(plan.years)
    out: list[Any] = []
    for i, lim in enumerate(plan.limits):
        window = [years[t] for t in lim.window(years)]
        left = [y for y in window if y >= from_year]
        if not left:
            continue
        if isinstance(lim, Budget):
            if left != window:
                if i not in used:
                    raise invalid("budget_used", f"give the amount of {lim.what} emitted in "
                                  f"{window[0]}–{from_year - 1} under limits.{i}", sorted(used))
                rest = lim.total - float(used[i])
                if not np.isfinite(rest) or rest < 0:
                    raise invalid(f"budget_used.{i}", f"be at most the budget ({lim.total:g})",
                                  used[i])
                lim = lim.model_copy(update={"total": rest, "first": from_year})
            out.append(lim)
        elif isinstance(lim, Cap):
            path = lim.path(years, f"limits.{i}")
            out.append(Cap(what=lim.what, at_most=path[len(window) - len(left):].tolist(),
                           years=left))
        else:
            path = lim.path(years, f"limits.{i}")
            out.append(lim.model_copy(update={"per_gdp": path[years.index(from_year):].tolist(),
                                              "rate": 0.0}))
    return out


def compare(result_a: Any, result_b: Any, *, quantities: tuple[str, ...] = (
        "output", "capacity", "starts")) -> pd.DataFrame:
    """Two results' schedules year by year, in the years they share.

    Returns
    -------
    DataFrame
        Tidy: year, sector, quantity, a, b, difference (b − a) and relative
        (difference / |a|, NaN where a is 0).
    """
    parts = []
    for q in quantities:
        fa, fb = getattr(result_a, q), getattr(result_b, q)
        years = fa.index.intersection(fb.index)
        sectors = fa.columns.intersection(fb.columns)
        if years.empty or sectors.empty:
            continue
        a = fa.loc[years, sectors].rename_axis(index="year", columns="sector").stack()
        b = fb.loc[years, sectors].rename_axis(index="year", columns="sector").stack()
        frame = pd.DataFrame({"a": a, "b": b}).reset_index()
        frame.insert(2, "quantity", q)
        parts.append(frame)
    if not parts:
        raise invalid("result_b", "share years and sectors with result_a", "no overlap")
    out = pd.concat(parts, ignore_index=True)
    out["difference"] = out["b"] - out["a"]
    with np.errstate(divide="ignore", invalid="ignore"):
        out["relative"] = np.where(out["a"] != 0, out["difference"] / out["a"].abs(), np.nan)
    return out
