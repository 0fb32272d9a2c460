"""The tables of a solved plan, each declared once: the one place where labels are attached.

A result table is declared with :func:`table`: its name, how it is computed
(a function of :class:`Solved`), its unit in words and whether it is
exported. :class:`~growthplan.PlanResult` gives it an attribute of the same
name, the CSV folder a ``<name>.csv`` file and the workbook a sheet (the name
cut to 31 characters), in the order the tables are declared here. Each
table is computed on first access, alone, and kept; what several tables
share (the signed duals, the retirements) is computed once in
:class:`Solved`.

Shadow prices are reported as *values*: the improvement of the objective per
unit by which a condition is relaxed (one more unit of a commodity in a year,
one more unit of capacity, one more person-year); non-negative at an optimum
whatever the objective's sense.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..errors import GrowthplanError
from ..lp.conditions import Schedules
from ..lp.data import PlanData
from ..lp.program import LinearProgram
from .accounts import employment, employment_column, national_accounts

if TYPE_CHECKING:
    from .result import PlanResult

__all__ = ["ResultTable", "Solved", "TABLES", "table", "exported", "with_units", "schedules",
           "calibration", "current_prices", "money_factor"]


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


def with_units(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy whose column headers carry their units, for exports ("energy [GWh]")."""
    units = frame.attrs.get("units")
    unit = frame.attrs.get("unit")
    if isinstance(frame.columns, pd.MultiIndex) or (not units and not unit):
        return frame
    share = ("share", "growth", "per_head")

    def label(c: object) -> object:
        if units and c in units:
            return f"{c} [{units[c]}]"
        if unit and isinstance(c, str) and not c.startswith("employment") \
                and not c.endswith(share):
            return f"{c} [{unit}]"
        return c

    return frame.rename(columns=label)


def _as_is(value: Any) -> pd.DataFrame | None:
    return value if isinstance(value, pd.DataFrame) else None


@dataclass(frozen=True)
class ResultTable:
    """One table of a solved plan.

    Attributes
    ----------
    name : str
        The :class:`~growthplan.PlanResult` attribute (when ``attribute``) and
        the key :meth:`PlanResult._get` computes it by.
    compute : callable
        ``compute(solved) -> value``, from a :class:`Solved`; called once per result.
    doc : str
        The attribute's docstring.
    unit : str
        What the values are measured in, in words.
    export : callable or None
        ``export(value) -> DataFrame or None``: the frame the CSV file and the
        sheet hold (None or an empty frame: not written); None: never exported.
    file : str
        The CSV file's stem and the sheet's name (cut to 31 characters).
    attribute : bool
        Whether ``PlanResult`` has an attribute of this name for it.
    """

    name: str
    compute: Callable[[Solved], Any]
    doc: str
    unit: str = ""
    export: Callable[[Any], pd.DataFrame | None] | None = with_units
    file: str = ""
    attribute: bool = True

    @property
    def csv(self) -> str:
        """The CSV file's name."""
        return f"{self.file or self.name}.csv"

    @property
    def sheet(self) -> str:
        """The workbook sheet's name."""
        return (self.file or self.name)[:31]


TABLES: dict[str, ResultTable] = {}
"""Every result table by name, in export order."""


def table(name: str, *, doc: str, unit: str = "",
          export: Callable[[Any], pd.DataFrame | None] | None = with_units, file: str = "",
          attribute: bool = True) -> Callable[[Callable[[Solved], Any]], Callable[[Solved], Any]]:
    """Declare a result table: decorate the function that computes it from a :class:`Solved`.

    Parameters
    ----------
    name : str
        Its name (a new ``PlanResult`` attribute needs one line there, see
        the contributor guide).
    doc : str
        One line on what it holds, its shape first ("Output, years × sectors.").
    unit : str, optional
        Its unit in words.
    export : callable or None, default with_units
        How it is written to the CSV folder and the workbook; None: it is not.
    file : str, optional
        The file and sheet name when it differs from ``name``.
    attribute : bool, default True
        Whether ``PlanResult`` shows it as an attribute.

    Returns
    -------
    callable
        The decorator (it returns the function unchanged).
    """
    if name in TABLES:
        raise GrowthplanError(f"the result table {name!r} is declared twice")

    def register(compute: Callable[[Solved], Any]) -> Callable[[Solved], Any]:
        TABLES[name] = ResultTable(name=name, compute=compute, doc=doc, unit=unit,
                                   export=export, file=file, attribute=attribute)
        return compute

    return register


def exported(get: Callable[[str], Any]) -> dict[str, pd.DataFrame]:
    """Every exported table of a result by file name, in order, empty ones left out.

    Parameters
    ----------
    get : callable
        ``get(name)``: the table (``PlanResult._get``).

    Returns
    -------
    dict of str to pandas.DataFrame
    """
    out = {}
    for t in TABLES.values():
        if t.export is None:
            continue
        frame = t.export(get(t.name))
        if frame is not None and not frame.empty:
            out[t.file or t.name] = frame
    return out


class Solved:
    """What the tables are computed from: the arrays, the programme, the solution.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.

    Attributes
    ----------
    d : PlanData
    lp : LinearProgram
    s : Schedules
    result : PlanResult
    """

    def __init__(self, result: PlanResult) -> None:
        assert result.data is not None and result._schedules is not None
        self.result = result
        self.d: PlanData = result.data
        self.lp: LinearProgram = result.lp
        self.s: Schedules = result._schedules
        self.years = pd.Index(self.d.years, name="year")
        self.sectors = pd.Index(self.d.names, name="sector")
        self.goods = pd.Index(self.d.names, name="commodity")
        self.units = dict(zip(self.d.names, self.d.units, strict=True))

    def frame(self, a: np.ndarray, *, index: pd.Index | None = None,
              columns: pd.Index | None = None, units: bool = False) -> pd.DataFrame:
        """Years × sectors (or the given labels), each column's unit in ``attrs`` if asked."""
        out = pd.DataFrame(a, index=self.years if index is None else index,
                           columns=self.sectors if columns is None else columns)
        if units:
            out.attrs["units"] = dict(self.units)
        return out

    def series(self, a: np.ndarray, name: str) -> pd.Series:
        """One value a year."""
        return pd.Series(a, index=self.years, name=name)

    @cached_property
    def value(self) -> np.ndarray:
        """Every row's value: objective gained per unit the row is relaxed (NaN without duals)."""
        lp = self.lp
        dual = self.result.outcome.row_dual
        if dual is None:
            dual = np.full(lp.shape[0], np.nan)
        sign = 1.0 if lp.sense == "max" else -1.0
        value = sign * lp.row_sign * dual
        return np.where(np.abs(value) < 1e-12, 0.0, value)

    def values_of(self, family: str) -> np.ndarray | None:
        """The values of one family's rows, years first (None when it has no rows)."""
        rows = self.lp.rows.get(family)
        return None if rows is None else rows.take(self.value)

    @cached_property
    def prices(self) -> np.ndarray:
        """Shadow prices of the commodity balances, years × commodities."""
        return self.lp.rows["balance"].take(self.value)

    @cached_property
    def rents(self) -> np.ndarray:
        """Quasi-rents per technique, years × techniques."""
        return self.lp.rows["capacity"].take(self.value)

    @cached_property
    def sector_capacity(self) -> np.ndarray:
        """Capacity in service by sector, years and the year after × sectors."""
        return self.d.by_sector(self.s.capacity)

    @cached_property
    def retired(self) -> np.ndarray:
        """Capacity retired during each year, per technique."""
        d, T, m = self.d, self.d.T, self.d.m
        starts, cap = self.s.starts, self.s.capacity
        entering = np.zeros((T + 1, m))  # capacity entering service at age 0 in each year
        for j in range(m):
            th = int(d.theta[j])
            for tau in range(T):
                if tau + th <= T:
                    entering[tau + th, j] += starts[tau, j]
            for back, amount in enumerate(d.pipeline[j][::-1], start=1):
                if 0 <= th - back <= T:
                    entering[th - back, j] += amount
        retire = cap[:-1] + entering[1:] - cap[1:]
        return np.asarray(np.maximum(retire, 0.0) * (np.abs(retire) > 1e-12))

    @cached_property
    def factor(self) -> np.ndarray:
        """Per-year factor from shadow values to base-year money (see :func:`money_factor`)."""
        return money_factor(self.d, self.prices, self.d.supplied(self.s.output))

    @property
    def money_note(self) -> str:
        return (f"{self.d.value_unit} per unit; numeraire: the first year's output bundle has "
                "the same value at shadow prices as at base-year prices")

    @cached_property
    def emissions(self) -> dict[str, Any]:
        """The emission tables (empty without a satellite account), computed together."""
        from .emissions import emission_frames

        return emission_frames(self.d, self.lp, self.value, self.s, self.factor)

    @cached_property
    def regional(self) -> dict[str, pd.DataFrame]:
        """The regional tables (empty for a plan of one region), computed together."""
        from .regions import regional_frames

        return regional_frames(self.d, self.s, self.prices)

    def labour_values(self, scale: np.ndarray | None = None) -> pd.DataFrame:
        """Values of the labour rows, years × kinds (empty without labour limits)."""
        values = self.values_of("labour")
        if values is None:
            return pd.DataFrame(index=self.years)
        if scale is not None:
            values = values * scale[:, None]
        return pd.DataFrame(values, index=self.years,
                            columns=pd.Index(self.d.labour_kinds, name="kind"))

    def traded(self, key: str) -> pd.DataFrame:
        """Imports or exports, years × commodities (empty without them)."""
        flows = getattr(self.s, key)
        side = getattr(self.d, key)
        if flows is None or side is None:
            return pd.DataFrame(index=self.years)
        return pd.DataFrame(flows, index=self.years,
                            columns=pd.Index(side.goods, name="commodity"))


# -- the tables, in export order ---------------------------------------------------------

@table("accounts", unit="money at base-year prices a year (shares and growth as ratios)",
       doc="The plan in national-accounts terms at base-year prices, by year "
           "(see growthplan.results.accounts).")
def _accounts(s: Solved) -> pd.DataFrame:
    return national_accounts(s.d, s.s, s.retired)


@table("output", unit="each sector's unit a year", doc="Output, years × sectors.")
def _output(s: Solved) -> pd.DataFrame:
    return s.frame(s.d.by_sector(s.s.output), units=True)


@table("capacity", unit="each sector's unit a year",
       doc="Capacity in service, years (and the year after) × sectors.")
def _capacity(s: Solved) -> pd.DataFrame:
    years = s.d.years
    return s.frame(s.sector_capacity, index=pd.Index([*years, years[-1] + 1], name="year"),
                   units=True)


@table("utilisation", unit="ratio", doc="Output over capacity in service.")
def _utilisation(s: Solved) -> pd.DataFrame:
    cap = s.sector_capacity[:-1]
    with np.errstate(divide="ignore", invalid="ignore"):
        return s.frame(np.where(cap > 0, s.d.by_sector(s.s.output) / cap, np.nan))


@table("starts", unit="each sector's unit a year", doc="Capacity starts, years × sectors.")
def _starts(s: Solved) -> pd.DataFrame:
    return s.frame(s.d.by_sector(s.s.starts), units=True)


@table("capital_deliveries", unit="each commodity's unit a year",
       doc="Capital goods delivered, years × commodities.")
def _capital_deliveries(s: Solved) -> pd.DataFrame:
    return s.frame(s.s.deliveries, columns=s.goods, units=True)


@table("retirements", unit="each sector's unit a year",
       doc="Capacity retired during each year, years × sectors.")
def _retirements(s: Solved) -> pd.DataFrame:
    return s.frame(s.d.by_sector(s.retired), units=True)


@table("labour", unit="each labour kind's unit (person-years by default)",
       doc="Labour used and available, years × (kind, used/available).")
def _labour(s: Solved) -> pd.DataFrame:
    d, output = s.d, s.s.output
    if d.labour.shape[0]:
        used = d.labour_used(output)
        lab = {}
        for k, kind in enumerate(d.labour_kinds):
            lab[(kind, "used")] = used[:, k]
            lab[(kind, "available")] = d.supply[k]
        return pd.DataFrame(lab, index=s.years)
    if d.labour_all.shape[0]:
        used = d.labour_used(output, every_kind=True)
        return pd.DataFrame({(kind, "used"): used[:, k]
                             for k, kind in enumerate(d.labour_all_kinds)}, index=s.years)
    return pd.DataFrame(index=s.years)


@table("employment", unit="each labour kind's unit (person-years by default)",
       doc="Labour used by kind and sector, years × (kind, sector).")
def _employment(s: Solved) -> pd.DataFrame:
    return employment(s.d, s.s)


@table("consumption", unit="units of the consumption level; commodities in their units",
       doc="Consumption level and commodities consumed, years × columns.")
def _consumption(s: Solved) -> pd.DataFrame:
    kappa = s.s.consumption
    if kappa is None:
        return pd.DataFrame(index=s.years)
    by_pair = kappa[:, None] * s.d.basket[None, :]
    if s.s.regional_consumption is not None:  # each region at its own level
        from ..lp.regional import regional_use

        by_pair = regional_use(s.d, s.s.regional_consumption)
    cons = s.frame(by_pair)
    cons.insert(0, "level", kappa)
    return cons


@table("surplus", unit="each commodity's unit a year",
       doc="Free-disposal slack of each commodity balance.")
def _surplus(s: Solved) -> pd.DataFrame:
    d, sch = s.d, s.s
    use = d.intermediate(sch.output) + sch.deliveries + d.demand
    if sch.consumption is not None:
        use = use + sch.consumption[:, None] * d.basket
    supply = d.supplied(sch.output).copy()
    for side, direction, flows in ((d.imports, 1.0, sch.imports),
                                   (d.exports, -1.0, sch.exports)):
        if flows is not None and side is not None:
            for i, j in enumerate(side.index):
                supply[:, j] += direction * flows[:, i]
    return s.frame(supply - use, columns=s.goods, units=True)


@table("shadow_prices", unit="objective per unit of each commodity",
       doc="Value of one more unit of each commodity per year, as solved.")
def _shadow_prices(s: Solved) -> pd.DataFrame:
    return s.frame(s.prices, columns=s.goods)


@table("shadow_prices_money", unit="money at base-year prices per unit",
       doc="Shadow prices in base-year money per unit: each year scaled so the first "
           "year's output bundle is worth the same at shadow and at base-year prices.")
def _shadow_prices_money(s: Solved) -> pd.DataFrame:
    out = s.frame(s.prices * s.factor[:, None], columns=s.goods)
    out.attrs["note"] = s.money_note
    return out


@table("shadow_prices_current", unit="objective per unit, current-year terms",
       doc="Shadow prices undiscounted to current-year terms (see the README).")
def _shadow_prices_current(s: Solved) -> pd.DataFrame:
    rate = s.result.plan.objective.discount_rate()
    return s.frame(current_prices(s.prices, s.d.supplied(s.s.output), rate), columns=s.goods)


@table("labour_values", unit="objective per unit of labour",
       doc="Value of one more person-year, years × kinds.")
def _labour_values(s: Solved) -> pd.DataFrame:
    return s.labour_values()


@table("labour_values_money", unit="money at base-year prices per unit of labour",
       doc="Labour values in base-year money (same numeraire).")
def _labour_values_money(s: Solved) -> pd.DataFrame:
    out = s.labour_values(s.factor)
    out.attrs["note"] = s.money_note
    return out


@table("quasi_rents", unit="objective per unit of capacity",
       doc="Value of one more unit of capacity, years × sectors.")
def _quasi_rents(s: Solved) -> pd.DataFrame:
    return s.frame(_best(s.d, s.rents))


@table("quasi_rents_money", unit="money at base-year prices per unit of capacity",
       doc="Quasi-rents in base-year money (same numeraire).")
def _quasi_rents_money(s: Solved) -> pd.DataFrame:
    out = s.frame(_best(s.d, s.rents) * s.factor[:, None])
    out.attrs["note"] = s.money_note
    return out


@table("target_values", unit="objective per unit of the target",
       doc="Each target with its value (cost of the requirement).")
def _target_values(s: Solved) -> pd.DataFrame:
    tv = pd.DataFrame([(t.quantity, t.sector or "", t.year, t.required) for t in s.d.targets],
                      columns=["condition", "sector", "year", "required"])
    values = s.values_of("targets")
    if values is not None:
        tv["value"] = values
    return tv


@table("imports", unit="each commodity's unit a year", doc="Imports, years × commodities.")
def _imports(s: Solved) -> pd.DataFrame:
    return s.traded("imports")


@table("exports", unit="each commodity's unit a year", doc="Exports, years × commodities.")
def _exports(s: Solved) -> pd.DataFrame:
    return s.traded("exports")


def _rate_frame(rate: pd.Series) -> pd.DataFrame | None:
    return None if rate.isna().all() else rate.to_frame()


@table("shadow_exchange_rate", unit="objective per unit of foreign exchange",
       export=_rate_frame,
       doc="Value of one more unit of foreign exchange per year (0 when the balance is "
           "slack).")
def _shadow_exchange_rate(s: Solved) -> pd.Series:
    values = s.values_of("foreign_exchange")
    return s.series(np.full(s.d.T, np.nan) if values is None else values,
                    "shadow_exchange_rate")


# several regions (empty tables for a plan of one region), exported flat
def _flat(frame: pd.DataFrame) -> pd.DataFrame:
    from .regions import flat_table

    return flat_table(frame)


@table("regional_accounts", export=_flat, unit="money at base-year prices a year",
       doc="Each region's product, investment and its share, consumption and employment, "
           "(year, region) × items, at base-year prices.")
def _regional_accounts(s: Solved) -> pd.DataFrame:
    return s.regional["regional_accounts"]


@table("regional_gap", export=_flat, unit="money per person-year; a ratio",
       doc="Regional product per person-year by region, and the ratio of the highest to "
           "the lowest, by year.")
def _regional_gap(s: Solved) -> pd.DataFrame:
    return s.regional["regional_gap"]


@table("flows", export=_flat, unit="each good's unit; value at base-year prices",
       doc="Shipments by year, origin, destination and good: units, transport used, value "
           "at base-year prices.")
def _flows(s: Solved) -> pd.DataFrame:
    return s.regional["flows"]


@table("spatial_prices", export=_flat, unit="objective per unit of each commodity",
       doc="Shadow prices by (year, commodity) × region, with the spread.")
def _spatial_prices(s: Solved) -> pd.DataFrame:
    return s.regional["spatial_prices"]


@table("regional_output", export=_flat, unit="each sector's unit a year",
       doc="Output, years × (region, sector).")
def _regional_output(s: Solved) -> pd.DataFrame:
    return s.regional["regional_output"]


@table("technique_schedules", file="techniques", attribute=False, export=_as_is,
       unit="each sector's unit a year",
       doc="Output, capacity and starts of every technique (plans with techniques only).")
def _technique_schedules(s: Solved) -> pd.DataFrame | None:
    if s.d.tech is None:
        return None
    from .techniques import technique_export

    return technique_export(s.result)


@table("emissions", export=_as_is, unit="each stressor's unit",
       doc="Emissions and resource use in long form: year, stressor (or impact), sector, "
           "technique (households for their direct emissions), amount, unit.")
def _emissions(s: Solved) -> pd.DataFrame:
    return s.emissions["emissions"]


@table("emission_totals", unit="each stressor's unit a year (in attrs['units'])",
       doc="Emissions of each stressor and impact by year (units in attrs['units']).")
def _emission_totals(s: Solved) -> pd.DataFrame:
    return s.emissions["emission_totals"]


@table("emission_prices", export=_as_is, unit="objective, and base-year money, per unit",
       doc="Every emission limit's row with its shadow price: value (objective gained per "
           "unit relaxed) and price (base-year money per unit); one row for a budget.")
def _emission_prices(s: Solved) -> pd.DataFrame:
    return s.emissions["emission_prices"]


@table("audit_checks", file="audit", attribute=False, export=_as_is,
       unit="relative violation", doc="Every condition family rechecked from the schedules.")
def _audit_checks(s: Solved) -> pd.DataFrame:
    assert s.result.audit is not None
    return s.result.audit.checks.reset_index()


# -- tables that are not exported --------------------------------------------------------

@table("calibration", export=None, unit="each sector's unit a year; employment in its unit",
       doc="The first plan year against the base year by sector: output, its change, "
           "employment (empty when the economy has no base-year output).")
def _calibration(s: Solved) -> pd.DataFrame:
    return calibration(s.d, s.s.output)


@table("floor_values", export=None, unit="objective per unit of the consumption level",
       doc="Value of relaxing the consumption floor by one unit, per year.")
def _floor_values(s: Solved) -> pd.Series:
    values = s.values_of("consumption_floor")
    return s.series(np.full(s.d.T, np.nan) if values is None else values,
                    "consumption_floor_value")


@table("terminal_value", export=None, unit="money at base-year prices",
       doc="Value at base-year prices of the capacity in service after the plan.")
def _terminal_value(s: Solved) -> float:
    return float(s.d.prices @ s.sector_capacity[-1])


@table("level", export=None, unit="units of the proportions bundle",
       doc="Terminal-capacity level λ (terminal-capacity objective only; None otherwise).")
def _level(s: Solved) -> float | None:
    return s.s.level


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
