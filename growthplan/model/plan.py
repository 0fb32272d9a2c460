"""The multi-year plan: what the analyst states.

Timing conventions (kept everywhere in the library, and stated in the README):

* plan year index ``t = 0..T−1`` is the first..last calendar year given in
  ``years``; a series given as a start value and a growth rate is
  ``X_t = X_0 (1 + r)^t``;
* ``initial_capacity`` is the capacity in service in year 0;
* a start made in year ``τ`` delivers its capital goods in years
  ``τ..τ+θ−1`` (by the spending profile; in year ``τ`` when ``θ = 0``) and
  enters service in year ``τ + θ`` at age 0;
* terminal capacity ``C_T`` is the capacity in service in the first year
  after the plan.
"""

from __future__ import annotations

import os
import time
from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import numpy as np
from pydantic import Field, PrivateAttr, field_validator, model_validator

from ..errors import GrowthplanError
from ..limits import MAX_YEARS
from . import objectives as obj
from .economy import Economy
from .regions import Regions, check_regions
from .satellite import Budget, Cap, IntensityCeiling, Satellite, limits_over
from .series import series as _series
from .technique import Technique, check_techniques
from .validation import Model, Rule

if TYPE_CHECKING:
    from ..backends.base import Backend
    from ..backends.options import SolveOptions
    from ..lp.data import PlanData
    from ..lp.program import LinearProgram
    from ..results.result import PlanResult


__all__ = ["TechnicalChange", "LabourSupply", "Consumption", "Target", "StartsCeiling",
           "TerminalGrowth", "Trade", "Plan"]


class LabourSupply(Model):
    """Labour available per year for one labour kind.

    Parameters
    ----------
    start : float, optional
        Person-years available in the first plan year (grown at ``growth``).
    growth : float, default 0.0
        Yearly growth rate of ``start``.
    series : list, dict or Series, optional
        Person-years per plan year (instead of ``start`` and ``growth``).
    kind : str, default "labour"
        Labour kind this supply is for.
    """

    start: float | None = Field(default=None, ge=0, allow_inf_nan=False)
    growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    series: Any = None
    kind: str = "labour"

    @field_validator("start", "growth", mode="before")
    @classmethod
    def _number(cls, v: Any) -> Any:
        if isinstance(v, bool | np.bool_):
            raise Rule("be a number, not true or false", v)
        return v

    @model_validator(mode="after")
    def _one(self) -> LabourSupply:
        if (self.start is None) == (self.series is None):
            raise Rule("be given as start (with growth) or as series, exactly one", None,
                       field="start")
        return self

    def path(self, years: list[int]) -> np.ndarray:
        """Person-years for each plan year.

        Parameters
        ----------
        years : list of int
            The plan years.

        Returns
        -------
        numpy.ndarray
            ``start (1 + growth)^t`` for plan year ``t = 0, 1, …``, or ``series``
            checked to give one value >= 0 per plan year.
        """
        field = "labour.start" if self.series is None else "labour.series"
        return _series(self.start if self.series is None else self.series, years, field,
                       self.growth)


class Consumption(Model):
    """Household consumption: the basket, its floors and how fast it may fall.

    Parameters
    ----------
    basket : dict of str to float, optional
        Commodities per unit of consumption level (default: the economy's).
    floor : float, list, dict or Series, default 0.0
        Least consumption level per year (a number is grown at ``floor_growth``).
    floor_growth : float, default 0.0
        Yearly growth rate of a ``floor`` given as a number.
    max_fall : float, optional
        Largest allowed fall from one year to the next, as a share (0.02 = 2 %).
    population : float, list, dict or Series, optional
        Population per plan year (a number is grown at ``population_growth``);
        with it the accounts report consumption per head.
    population_growth : float, default 0.0
    """

    basket: dict[str, float] | None = None
    floor: Any = 0.0
    floor_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    max_fall: float | None = Field(default=None, ge=0, le=1)
    population: Any = None
    population_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)


class Target(Model):
    """An at-least condition on one sector (or on the consumption level) in one year.

    Give exactly one of ``output_at_least``, ``capacity_at_least`` or
    ``consumption_at_least``. Capacity targets may name the year after the
    plan (terminal capacity). A consumption target without a sector bounds the
    consumption level; with a sector it bounds that commodity's consumption.

    Parameters
    ----------
    sector : str, optional
        The sector (commodity); may also be passed as the first positional
        argument. Required for output and capacity targets.
    year : int
        Plan year of the condition (for capacity also the year after the plan).
    output_at_least : float, optional
        Least gross output of ``sector`` in ``year``.
    capacity_at_least : float, optional
        Least capacity in service of ``sector`` in ``year``.
    consumption_at_least : float, optional
        Least consumption level (or consumption of ``sector``) in ``year``.
    """

    sector: str | None = None
    year: int
    output_at_least: float | None = Field(default=None, ge=0, allow_inf_nan=False)
    capacity_at_least: float | None = Field(default=None, ge=0, allow_inf_nan=False)
    consumption_at_least: float | None = Field(default=None, ge=0, allow_inf_nan=False)

    def __init__(self, sector: str | None = None, /, **data: Any) -> None:
        if sector is not None:
            data["sector"] = sector
        super().__init__(**data)

    @model_validator(mode="after")
    def _one(self) -> Target:
        given = [k for k in ("output_at_least", "capacity_at_least", "consumption_at_least")
                 if getattr(self, k) is not None]
        if len(given) != 1:
            raise Rule("give exactly one of output_at_least, capacity_at_least, "
                       "consumption_at_least", given or None, field="")
        if self.sector is None and given[0] != "consumption_at_least":
            raise Rule("name a sector for output and capacity targets", None, field="sector")
        return self

    @property
    def quantity(self) -> str:
        """What the target bounds: ``"output"``, ``"capacity"`` or ``"consumption"``."""
        for k in ("output", "capacity", "consumption"):
            if getattr(self, f"{k}_at_least") is not None:
                return k
        raise GrowthplanError("a validated target has no condition")  # never reached

    @property
    def required(self) -> float:
        """The least amount required."""
        return float(getattr(self, f"{self.quantity}_at_least"))


class StartsCeiling(Model):
    """Largest capacity starts of a sector per year (absorptive capacity).

    When the sector has alternative techniques (:class:`~growthplan.Technique`),
    the ceiling bounds the starts of each technique on its own, not their sum.

    Parameters
    ----------
    sector : str
        The sector; may also be passed as the first positional argument.
    at_most : float
        Largest capacity started in one year (by each of its techniques), >= 0.
    years : list of int, optional
        Plan years the ceiling applies to (default: every plan year).
    """

    sector: str
    at_most: float = Field(ge=0, allow_inf_nan=False)
    years: list[int] | None = None

    @field_validator("years")
    @classmethod
    def _some(cls, v: list[int] | None) -> list[int] | None:
        if v is not None and not v:
            raise Rule("name at least one year (leave it out for every year)", v)
        return v

    def __init__(self, sector: str | None = None, /, **data: Any) -> None:
        if sector is not None:
            data["sector"] = sector
        super().__init__(**data)


class TerminalGrowth(Model):
    """After the plan, capacity goes on growing at ``rate``.

    The starts of each sector's final lead-time window (its last
    ``max(θ, 1)`` plan years) are at least what a balanced path growing at
    ``rate`` needs: ``z_t ≥ ψ(rate) C_t`` with
    ``ψ(g) = (1+g)^θ / Σ_a S(a)(1+g)^-a``.

    Parameters
    ----------
    rate : float
        Growth rate per year after the plan, > -1.
    """

    rate: float = Field(gt=-1, allow_inf_nan=False)


class Trade(Model):
    """Foreign trade: which commodities can be imported or exported, at what prices.

    Parameters
    ----------
    import_prices, export_prices : dict of str to float
        Price in foreign currency of one unit of each importable (exportable)
        commodity; commodities not named cannot be traded that way.
    import_ceilings, export_ceilings : dict of str to number or per-year series
        Largest imports (exports) per year.
    inflow : number, list, dict or Series, default 0.0
        Net foreign exchange the plan may draw each year (aid, credit,
        reserves), ``p^m·m_t − p^e·e_t ≤ F_t``; a number grows at
        ``inflow_growth``.
    inflow_growth : float, default 0.0
        Yearly growth rate of an ``inflow`` given as a number.
    """

    import_prices: dict[str, float] = Field(default_factory=dict)
    export_prices: dict[str, float] = Field(default_factory=dict)
    import_ceilings: dict[str, Any] = Field(default_factory=dict)
    export_ceilings: dict[str, Any] = Field(default_factory=dict)
    inflow: Any = 0.0
    inflow_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)

    @field_validator("import_prices", "export_prices")
    @classmethod
    def _prices(cls, v: dict[str, float]) -> dict[str, float]:
        bad = {k: p for k, p in v.items() if not (np.isfinite(p) and p > 0)}
        if bad:
            raise Rule("hold prices > 0", bad)
        return v


class TechnicalChange(Model):
    """Coefficients that change year by year over the plan (disembodied change).

    A rate ``r`` for a sector makes that sector's column of coefficients
    ``c_t = c_0 (1 + r)^t`` in plan year ``t`` (``r = -0.03``: 3 % less each
    year). The change is disembodied: in year ``t`` all of a sector's
    capacity, old and new, uses that year's input and labour coefficients,
    and capacity started in year ``t`` embodies that year's capital
    coefficients. Sectors not named keep their coefficients.

    Parameters
    ----------
    input_rate : dict of str to float
        Yearly rate of change of each named sector's input coefficients.
    capital_rate : dict of str to float
        The same for capital coefficients (capital goods per unit of new capacity).
    labour_rate : dict of str to float
        The same for labour coefficients (every labour kind).
    embodied : bool, default False
        Embodied change instead: capacity started in year ``τ`` keeps the
        input and labour coefficients of year ``τ`` for its whole life, and
        the capacity from before the plan keeps the base year's (see
        :mod:`growthplan.model.technique`: the LP splits output by vintage).
    """

    input_rate: dict[str, float] = Field(default_factory=dict)
    capital_rate: dict[str, float] = Field(default_factory=dict)
    labour_rate: dict[str, float] = Field(default_factory=dict)
    embodied: bool = False

    @field_validator("input_rate", "capital_rate", "labour_rate")
    @classmethod
    def _rates(cls, v: dict[str, float]) -> dict[str, float]:
        bad = {k: r for k, r in v.items() if not (np.isfinite(r) and -1 < r <= 1)}
        if bad:
            raise Rule("hold yearly rates in (-1, 1] (fractions: -0.03 for 3 % less a year)",
                       bad)
        return v

    def factors(self, names: list[str], years: int, block: str) -> np.ndarray:
        """Multipliers of each sector's coefficients, years × sectors, for one block.

        Parameters
        ----------
        names : list of str
            The economy's sectors.
        years : int
            Number of plan years.
        block : {"input", "capital", "labour"}

        Returns
        -------
        numpy.ndarray
        """
        rates = getattr(self, f"{block}_rate")
        r = np.array([rates.get(k, 0.0) for k in names])
        return (1.0 + r[None, :]) ** np.arange(years, dtype=float)[:, None]


class Plan(Model):
    """A multi-year growth plan of an economy.

    Parameters
    ----------
    economy : Economy
        With capital for every sector.
    years : range or list of int
        Consecutive calendar years of the plan.
    labour : LabourSupply or list of LabourSupply, optional
        Supply per labour kind; no labour limit when omitted.
    consumption : Consumption, optional
        Basket, floors and fall limit; needs a basket (here or in the economy).
    final_demand : dict, DataFrame, optional
        Exogenous final demand (government, stock building) by sector: a
        number (grown at ``final_demand_growth``), a per-year list, or a
        DataFrame with years as rows and sectors as columns.
    final_demand_growth : float, default 0.0
        Yearly growth rate of final demand given as numbers.
    targets : list of Target, optional
        At-least conditions on output, capacity or consumption.
    starts_ceilings : list of StartsCeiling, optional
        Largest yearly capacity starts of sectors.
    under_construction : dict of str to list of float, optional
        Capacity started before the plan, one entry per past year, the last in
        the year before the plan; their remaining capital deliveries fall in
        plan years and their capacity enters service on schedule.
    terminal : TerminalGrowth, optional
        Post-horizon growth condition; without one the result warns of end
        effects.
    trade : Trade, optional
        Imports and exports; a closed economy when omitted.
    technical_change : TechnicalChange, optional
        Input, capital and labour coefficients that change year by year.
    techniques : list of Technique, optional
        Alternative techniques of sectors (and phase-outs of their base
        techniques); see :mod:`growthplan.model.technique`.
    regions : Regions, optional
        Several regions in one plan: the economy's sectors are region–sector
        pairs (a MultiRegionalEconomy's economy), with shipments between
        regions, transport costs and regional labour; see
        :mod:`growthplan.model.regions`.
    first_year_within : float, optional
        Hold the first plan year's output of every sector at least at
        ``(1 − share)`` times its base-year output (the economy's
        ``base_output``), for plans that must start from where the economy
        is; a condition the diagnosis may relax.
    allow_high_rates : bool, default False
        Rates are fractions per year (0.015 for 1.5 %); a growth or discount
        rate above 1 (100 % a year) is refused as a likely percent unless this
        is True.
    objective : Objective, default TerminalCapacity()
        One of :mod:`growthplan.model.objectives`: ``TerminalCapacity``,
        ``DiscountedConsumption``, ``LeastLabour``, ``LeastForeignExchange``,
        ``Weighted``, ``Lexicographic`` or ``Fastest`` (chosen by ``kind`` in
        a mapping).
    satellite : Satellite, optional
        Emissions and natural resources per unit of output and of consumption
        (:mod:`growthplan.model.satellite`); the result then reports them.
    limits : list of Cap, Budget or IntensityCeiling, optional
        Yearly caps, cumulative budgets and ceilings per unit of GDP on the
        stressors and impacts of ``satellite`` (chosen by ``kind`` in a mapping).
    """

    economy: Economy
    years: list[int]
    labour: list[LabourSupply] = Field(default_factory=list)
    consumption: Consumption | None = None
    final_demand: Any = None
    final_demand_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    targets: list[Target] = Field(default_factory=list)
    starts_ceilings: list[StartsCeiling] = Field(default_factory=list)
    under_construction: dict[str, list[float]] | None = None
    terminal: TerminalGrowth | None = None
    trade: Trade | None = None
    technical_change: TechnicalChange | None = None
    techniques: list[Technique] = Field(default_factory=list)
    regions: Regions | None = None
    allow_high_rates: bool = False
    first_year_within: float | None = Field(default=None, gt=0, lt=1, allow_inf_nan=False)
    objective: (obj.TerminalCapacity | obj.DiscountedConsumption | obj.LeastLabour
                | obj.LeastForeignExchange | obj.Weighted | obj.Lexicographic
                | obj.Fastest) = Field(default_factory=obj.TerminalCapacity,
                                       discriminator="kind")
    satellite: Satellite | None = None
    limits: list[Annotated[Cap | Budget | IntensityCeiling, Field(discriminator="kind")]] = \
        Field(default_factory=list)
    _validate_seconds: float = PrivateAttr(default=0.0)
    _lowered: Any = PrivateAttr(default=None)
    _solve_options: dict[str, Any] = PrivateAttr(default_factory=dict)
    _revised_from: int | None = PrivateAttr(default=None)

    def __init__(self, /, **data: Any) -> None:
        t0 = time.perf_counter()
        super().__init__(**data)
        self._validate_seconds = time.perf_counter() - t0

    @field_validator("years", mode="before")
    @classmethod
    def _years(cls, v: Any) -> Any:
        if isinstance(v, range):
            if len(v) > MAX_YEARS:  # refuse before making the list
                raise Rule(f"span at most {MAX_YEARS} years", f"{len(v)} years")
            v = list(v)
        if isinstance(v, str | bytes) or not hasattr(v, "__iter__"):
            raise Rule("be a range or list of calendar years", v)
        v = list(v)
        if not v:
            raise Rule("hold at least one year", v)
        if any(isinstance(y, bool) or not isinstance(y, int | np.integer) for y in v):
            raise Rule("be whole calendar years", v)
        v = [int(y) for y in v]
        if any(b - a != 1 for a, b in zip(v, v[1:], strict=False)):
            raise Rule("be consecutive and increasing", v[:5] + ["…"] if len(v) > 5 else v)
        if len(v) > MAX_YEARS:
            raise Rule(f"span at most {MAX_YEARS} years", f"{len(v)} years")
        return v

    @field_validator("labour", mode="before")
    @classmethod
    def _labour(cls, v: Any) -> Any:
        if v is None:
            return []
        return [v] if isinstance(v, LabourSupply | dict) else v

    @model_validator(mode="after")
    def _check(self) -> Plan:
        # the series the LP will use are checked where they are computed, once
        from ..lp import data as lowering

        econ = self.economy
        names = econ.names
        if econ.capital is None:
            raise Rule("have capital for every sector to be planned", None,
                       field="economy.capital")
        kinds = econ.labour_kinds or []
        for i, ls in enumerate(self.labour):
            if econ.labour_coefficients is None:
                raise Rule("come with labour coefficients in the economy", ls.kind,
                           field=f"labour.{i}")
            if ls.kind not in kinds:
                raise Rule(f"name a labour kind of the economy {kinds}", ls.kind,
                           field=f"labour.{i}.kind")
        lowering.labour_supply(self)  # every series checked, with its field named
        if len({ls.kind for ls in self.labour}) != len(self.labour):
            raise Rule("give each labour kind once", [ls.kind for ls in self.labour],
                       field="labour")
        basket = lowering.basket(self)
        if self.consumption is not None:
            lowering.consumption_floor(self)
            pop = lowering.population(self)
            if pop is not None and np.any(pop <= 0):
                raise Rule("be > 0 in every plan year", self.consumption.population,
                           field="consumption.population")
        first, last = self.years[0], self.years[-1]
        for i, tg in enumerate(self.targets):
            if tg.sector is not None and tg.sector not in names:
                raise Rule(f"name a sector of the economy ({', '.join(names)})", tg.sector,
                           field=f"targets.{i}.sector")
            limit = last + 1 if tg.quantity == "capacity" else last
            if not first <= tg.year <= limit:
                raise Rule(f"be a plan year {first}..{limit}", tg.year,
                           field=f"targets.{i}.year")
            if tg.quantity == "consumption" and self.consumption is None:
                raise Rule("come with a consumption part in the plan", tg.required,
                           field=f"targets.{i}.consumption_at_least")
            if tg.quantity == "consumption" and tg.sector is not None and tg.required > 0 \
                    and basket[names.index(tg.sector)] == 0:
                raise Rule("name a commodity of the consumption basket (a share of 0 can "
                           "never be consumed)", tg.sector, field=f"targets.{i}.sector")
        for i, sc in enumerate(self.starts_ceilings):
            if sc.sector not in names:
                raise Rule(f"name a sector of the economy ({', '.join(names)})", sc.sector,
                           field=f"starts_ceilings.{i}.sector")
            bad = [y for y in (sc.years or []) if y not in self.years]
            if bad:
                raise Rule("be plan years", bad, field=f"starts_ceilings.{i}.years")
        if self.under_construction:
            for k, v in self.under_construction.items():
                if k not in names:
                    raise Rule("name sectors of the economy", k, field="under_construction")
                arr = np.asarray(v, dtype=float)
                if not np.all(np.isfinite(arr)) or np.any(arr < 0):
                    raise Rule("hold finite starts >= 0", v, field=f"under_construction.{k}")
                theta = econ.capital[k].lead_time
                window = max(theta, 1)
                if arr.size > window and np.any(arr[: arr.size - window] > 0):
                    raise Rule(f"list only starts still under construction (at most the lead "
                               f"time, {theta} years; older starts belong in "
                               "initial_capacity)", list(v), field=f"under_construction.{k}")
        self.objective.check(self)
        if self.technical_change is not None:
            tc = self.technical_change
            for field in ("input_rate", "capital_rate", "labour_rate"):
                unknown = [k for k in getattr(tc, field) if k not in names]
                if unknown:
                    raise Rule("name sectors of the economy", unknown[:5],
                               field=f"technical_change.{field}")
            if tc.input_rate:
                from ..analysis.steady import spectral_radius

                f = tc.factors(names, len(self.years), "input")
                for yi, year in enumerate(self.years):
                    rho = spectral_radius(np.asarray(econ.input_coefficients) * f[yi][None, :])
                    if rho >= 1:
                        raise Rule("keep the input coefficients productive in every plan "
                                   f"year (spectral radius < 1; {rho:.4g} in "
                                   f"{year})", tc.input_rate,
                                   field="technical_change.input_rate")
        if self.techniques:
            check_techniques(econ, self.techniques)
        if self.first_year_within is not None and econ.base_output is None:
            raise Rule("come with the economy's base_output (Economy.from_tables keeps it)",
                       self.first_year_within, field="first_year_within")
        if not self.allow_high_rates:
            for field, rate in self._rates():
                if rate > 1:
                    raise Rule(f"be a fraction per year (0.015 for 1.5 %); for {rate:g} % a "
                               f"year write {rate / 100:g}, or pass allow_high_rates=True for "
                               "a real rate above 100 % a year", rate, field=field)
        if self.trade is not None:
            t = self.trade
            for field in ("import_prices", "export_prices", "import_ceilings",
                          "export_ceilings"):
                unknown = [k for k in getattr(t, field) if k not in names]
                if unknown:
                    raise Rule("name sectors of the economy", unknown, field=f"trade.{field}")
            for field, prices in (("import_ceilings", t.import_prices),
                                  ("export_ceilings", t.export_prices)):
                loose = [k for k in getattr(t, field) if k not in prices]
                if loose:
                    raise Rule(f"name only commodities with a price in {field[:6]}_prices",
                               loose, field=f"trade.{field}")
            lowering.trade_sides(self)
        lowering.exogenous_demand(self)
        self._check_limits()
        if self.regions is not None:
            check_regions(self)
        return self

    def _check_limits(self) -> None:
        """Satellite intensities name sectors or techniques; limits name its stressors."""
        sat = self.satellite
        if sat is None:
            if self.limits:
                raise Rule("come with the plan's satellite accounts (satellite=...)",
                           self.limits[0].what, field="limits.0.what")
            return
        keys = [tq.key for tq in self.techniques]
        sat.check(self.economy.names, keys)
        years = self.years
        for i, lim in enumerate(self.limits):
            where = f"limits.{i}"
            if lim.what not in sat.names:
                raise Rule(f"name a stressor or impact ({', '.join(sat.names)})", lim.what,
                           field=f"{where}.what")
            if isinstance(lim, Cap):
                bad = [y for y in (lim.years or []) if y not in years]
                if bad or lim.years == []:
                    raise Rule("be plan years", bad or lim.years, field=f"{where}.years")
                lim.path(years, where)
            elif isinstance(lim, Budget):
                if not lim.window(years):
                    raise Rule(f"cover at least one plan year ({years[0]}..{years[-1]})",
                               [lim.first, lim.last], field=f"{where}.first")
                if (lim.first is not None and lim.last is not None
                        and lim.first > lim.last):
                    raise Rule("be at most last", lim.first, field=f"{where}.first")
            else:
                lim.path(years, where)

    # -- derived data and delegators ------------------------------------------------
    @property
    def horizon(self) -> int:
        """Number of plan years ``T``."""
        return len(self.years)

    def model_copy(self, *, update: Mapping[str, Any] | None = None, deep: bool = False) -> Plan:
        """A copy, validated again when ``update`` changes fields (its arrays are not shared).

        Parameters
        ----------
        update : dict, optional
            Fields to change; the copy goes through every check of construction.
        deep : bool, default False
            Copy the fields deeply (without ``update`` only).

        Returns
        -------
        Plan
        """
        if update:
            fields = {k: getattr(self, k) for k in type(self).model_fields}
            fields.update(update)
            new = Plan(**fields)
            new._solve_options = dict(self._solve_options)
            new._revised_from = self._revised_from
            return new
        out = super().model_copy(deep=deep)
        out._lowered = None
        return out

    def _rates(self) -> list[tuple[str, float]]:
        """Every yearly rate the plan states, with its field name."""
        out = [(f"labour.{i}.growth", ls.growth) for i, ls in enumerate(self.labour)]
        out.append(("final_demand_growth", self.final_demand_growth))
        if self.consumption is not None:
            out.append(("consumption.floor_growth", self.consumption.floor_growth))
            out.append(("consumption.population_growth", self.consumption.population_growth))
        if self.terminal is not None:
            out.append(("terminal.rate", self.terminal.rate))
        if self.trade is not None:
            out.append(("trade.inflow_growth", self.trade.inflow_growth))
        for part in obj.components(self.objective):
            r = part.discount_rate()
            if r is not None:
                out.append(("objective.rate", r))
        return out

    def validation_seconds(self) -> float:
        """Seconds spent validating this plan.

        Returns
        -------
        float
        """
        return self._validate_seconds

    def lowered(self) -> PlanData:
        """The plan's arrays (:class:`~growthplan.lp.data.PlanData`), computed once and kept.

        Returns
        -------
        PlanData
            The arrays the LP is built from.
        """
        if self._lowered is None:
            from ..lp import data as lowering

            self._lowered = lowering.lower(self)
        return self._lowered

    def compile(self, *, size_limit: int | None = 25_000_000,
                formulation: str = "expression") -> LinearProgram:
        """The plan's :class:`~growthplan.lp.program.LinearProgram`.

        Parameters
        ----------
        size_limit : int or None, default 25,000,000
            Largest LP (in nonzeros) to build; None builds any size.
        formulation : {"expression", "state"}
            How capacity in service is written: an expression in past starts,
            or stocks carried from year to year (:mod:`growthplan.lp.build`).

        Returns
        -------
        LinearProgram
        """
        from ..solve import program

        return program(self, size_limit=size_limit, formulation=formulation)

    def estimate_size(self, formulation: str = "expression") -> dict[str, float]:
        """Size, memory and a rough solve time of this plan's LP, without building it.

        Parameters
        ----------
        formulation : {"expression", "state"}
            How capacity in service is written (see :meth:`compile`).

        Returns
        -------
        dict
            ``rows``, ``columns``, ``nonzeros`` (exact), ``bytes`` (peak while
            building), ``peak_bytes`` (peak resident memory of a process that
            builds and solves it) and ``seconds`` (a rough expected solve time
            by interior point, fitted on one machine); see
            :func:`growthplan.lp.build.estimate_size`.
        """
        from ..lp.build import estimate_size

        return estimate_size(self, formulation)

    @property
    def solve_options(self) -> dict[str, Any]:
        """The solver settings of the plan file this plan was read from (``method``,
        ``time_limit``, ``threads``, ``tolerance``; empty for a plan built in Python).
        :meth:`solve` uses them where it is not told otherwise."""
        return dict(self._solve_options)

    @property
    def revised_from(self) -> int | None:
        """The first year of a revision made by :func:`growthplan.revise` (its starting
        capacity comes from the starts actually made, not from the base year); None
        for an original plan."""
        return self._revised_from

    def solve(self, *, method: str | None = None, time_limit: float | None = None,
              threads: int | None = None, tolerance: float | None = None,
              audit_tolerance: float = 1e-6, options: dict[str, Any] | None = None,
              progress: bool = False, stop: Any = None,
              size_limit: int | None = 25_000_000, backend: Backend | None = None,
              formulation: str = "auto", solver: SolveOptions | None = None) -> PlanResult:
        """Solve the plan (HiGHS by default) and audit the result.

        The LP, for years ``t = 0..T−1``::

            maximise (or minimise) the objective, e.g. λ with C_T ≥ λ π
            subject to, for every year t and sector or commodity j,
              x_t + m_t − e_t ≥ A x_t + Σ_s B W_s z_{t−s} + h κ_t + g_t   (balance)
              x_jt ≤ u_j C_jt,  C_jt = C0_j R_j(t) + Σ_τ S_j(t−τ−θ_j) z_jτ   (capacity)
              l_k x_t ≤ L_kt                                              (labour)
              p^m m_t − p^e e_t ≤ F_t                                     (foreign exchange)
              κ_t ≥ floor_t,  κ_{t+1} ≥ (1 − f) κ_t                        (consumption)
              targets, starts ceilings, terminal growth,  x, z, κ, m, e ≥ 0

        Parameters
        ----------
        method : {"auto", "simplex", "ipm", "ipm-crossover", "pdlp", "hipo"}, optional
            HiGHS method (default: the plan file's, else ``"auto"``). ``"auto"``
            picks by problem size (see the README); ``"hipo"`` needs the ``hipo``
            extra. ``time_limit``, ``threads`` and ``tolerance`` also default to
            the plan file's (:attr:`solve_options`).
            When a solve fails, the other method is tried before giving up.
        time_limit : float, optional
            Seconds; a solve that hits it returns status ``time_limit``.
        threads : int, optional
            HiGHS threads.
        tolerance : float, optional
            Primal and dual feasibility tolerance of HiGHS.
        audit_tolerance : float, default 1e-6
            Largest violation, relative to each condition's own terms, that the
            audit accepts.
        options : dict, optional
            Further HiGHS options by name (a bad name or value is an error).
        progress : bool, default False
            Show a progress bar fed by HiGHS's log (terminal or notebook).
        stop : callable or threading.Event, optional
            Interrupts the solve when true; the result then has status
            ``interrupted``.
        size_limit : int or None, default 25,000,000
            Largest LP (in nonzeros) to build; see :meth:`estimate_size`.
        backend : Backend, optional
            Another back end (:class:`growthplan.backends.PulpBackend`, …);
            then ``method``, ``time_limit``, ``threads``, ``tolerance`` and
            ``options`` belong to it.
        formulation : {"auto", "expression", "state"}
            How capacity in service is written in the LP (the same optimum
            either way); ``"auto"`` follows the measured rule of
            :func:`growthplan.backends.methods.choose`.
        solver : SolveOptions, optional
            All the settings above as one object
            (:class:`growthplan.backends.options.SolveOptions`, also what a plan
            file's ``solve`` section holds); then give none of them as keywords.

        Returns
        -------
        PlanResult

        Examples
        --------
        One sector with a = 0.6, b = 2 and a 20-year geometric life grows at
        the Harrod–Domar rate (1 − a)/b − δ = 0.15:

        >>> import warnings
        >>> from growthplan import CapitalSpec, Economy
        >>> econ = Economy(sectors=["goods"], input_coefficients=[[0.6]],
        ...                capital_coefficients=[[2.0]],
        ...                capital={"goods": CapitalSpec(initial_capacity=100,
        ...                                              mean_service_life=20)})
        >>> with warnings.catch_warnings():
        ...     warnings.simplefilter("ignore")
        ...     result = Plan(economy=econ, years=range(2030, 2035)).solve()
        >>> result.status.value, round(result.objective, 6), round(100 * 1.15 ** 5, 6)
        ('optimal', 201.135719, 201.135719)
        """
        from ..solve import solve

        given = self._solve_options
        method = method or given.get("method") or "auto"
        time_limit = time_limit if time_limit is not None else given.get("time_limit")
        threads = threads if threads is not None else given.get("threads")
        tolerance = tolerance if tolerance is not None else given.get("tolerance")
        return solve(self, backend=backend, method=method, time_limit=time_limit,
                     threads=threads, tolerance=tolerance, audit_tolerance=audit_tolerance,
                     options=options, progress=progress, stop=stop, size_limit=size_limit,
                     formulation=formulation, solver=solver)

    def to_pulp(self, name: str = "growthplan") -> Any:
        """A ``pulp.LpProblem`` of this plan, built from the same LinearProgram as ``solve``.

        Names carry block, year and sector (``starts_2030_energy``). Add
        constraints of your own and pass the problem to :meth:`solve_pulp`.

        Parameters
        ----------
        name : str, default "growthplan"
            Name of the problem.

        Returns
        -------
        pulp.LpProblem
        """
        from ..backends.pulp import to_pulp
        from ..solve import program

        return to_pulp(program(self), name)[0]

    def solve_pulp(self, solver: Any = None, *, problem: Any = None,
                   audit_tolerance: float = 1e-6) -> PlanResult:
        """Solve with a PuLP solver (default: PuLP's bundled CBC) through the same pipeline.

        Objective stages, the horizon search, the audit and the diagnosis run
        as with :meth:`solve`.

        Parameters
        ----------
        solver : pulp.LpSolver, optional
            The solver (default: CBC).
        problem : pulp.LpProblem, optional
            A problem from :meth:`to_pulp`, perhaps with constraints of your own.
        audit_tolerance : float, default 1e-6
            Largest relative violation the audit accepts.

        Returns
        -------
        PlanResult
        """
        from ..solve import solve_pulp

        return solve_pulp(self, solver, problem=problem, audit_tolerance=audit_tolerance)

    def write_mps(self, path: str | os.PathLike[str], *, overwrite: bool = False,
                  force: bool = False) -> Path:
        """Write the plan's LP as an MPS file (the objective sense included).

        Parameters
        ----------
        path : str or path-like
            The file to write (whole or not at all).
        overwrite : bool, default False
            Replace an existing file the library wrote (its first line is the mark).
        force : bool, default False
            With ``overwrite``, replace a file the library did not write (one
            without its mark, see :mod:`growthplan.io.marks`); without it such
            a file is refused, naming it.

        Returns
        -------
        pathlib.Path
            ``path``.
        """
        from ..solve import write_program

        return write_program(self, path, overwrite=overwrite, kind="mps", force=force)

    def write_lp(self, path: str | os.PathLike[str], *, overwrite: bool = False,
                 force: bool = False) -> Path:
        """Write the plan's LP in the LP file format.

        Parameters
        ----------
        path : str or path-like
            The file to write (whole or not at all).
        overwrite : bool, default False
            Replace an existing file the library wrote (its first line is the mark).
        force : bool, default False
            With ``overwrite``, replace a file the library did not write (one
            without its mark, see :mod:`growthplan.io.marks`); without it such
            a file is refused, naming it.

        Returns
        -------
        pathlib.Path
            ``path``.
        """
        from ..solve import write_program

        return write_program(self, path, overwrite=overwrite, kind="lp", force=force)

    def with_horizon(self, years: int) -> Plan:
        """This plan over its first ``years`` years, targets moved to the end (see Fastest).

        Parameters
        ----------
        years : int
            Number of plan years kept from the first.

        Returns
        -------
        Plan
            Output and consumption targets in the new last year, capacity
            targets in the year after it; a ``Fastest`` objective is replaced
            by its ``then`` objective.
        """
        first = self.years[0]
        last = first + years - 1
        targets = [t.model_copy(update={"year": last + 1 if t.quantity == "capacity" else last})
                   for t in self.targets]
        fields = {k: getattr(self, k) for k in type(self).model_fields}
        search = self.objective.horizon_search()
        objective = search.then if search is not None else self.objective
        new_years = list(range(first, last + 1))
        fields.update(years=new_years, targets=targets, objective=objective,
                      limits=limits_over(self.limits, self.years, new_years))
        return Plan(**fields)
