"""Every array the LP, the audit and the results need, computed once from a validated plan.

:func:`lower` is the only place that reads the pydantic models on the way
to the solver: survival profiles, the capacity from before the plan, the
pipeline of unfinished construction, per-year series and the terminal
proportions are computed here once and shared by the builder, the audit and
the result tables.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from ..model import objectives as obj
from ..model.series import series
from ..model.validation import Rule

if TYPE_CHECKING:
    from ..model.plan import Plan
    from ..model.technique import TechniqueSet

__all__ = ["PlanData", "TargetData", "SatelliteData", "LimitData", "satellite_data",
           "TradeSide", "lower", "techniques", "basket",
           "consumption_floor",
           "population",
           "labour_supply", "exogenous_demand", "trade_sides", "terminal_proportions"]


@dataclass(frozen=True)
class TargetData:
    """One target as numbers: what, where (sector index ``j`` or None), when (``t``)."""

    index: int
    quantity: str       # "output", "capacity" or "consumption"
    sector: str | None
    j: int | None
    year: int
    t: int
    required: float


@dataclass(frozen=True)
class TradeSide:
    """Importable (or exportable) goods: names, positions, prices, ceilings (years × goods)."""

    goods: list[str]
    index: np.ndarray
    prices: np.ndarray
    ceilings: np.ndarray


@dataclass
class PlanData:
    """A validated plan as arrays (``T`` years, ``n`` sectors, ``m`` techniques).

    Commodity arrays (balances, demand, prices) have ``n`` entries; the
    arrays of activities (coefficient columns, capital specs, capacity,
    starts) have one entry per technique, ``m`` of them. Without alternative
    techniques ``m = n`` and technique ``j`` is sector ``j``
    (``tech`` is None).
    """

    names: list[str]
    years: list[int]
    a: np.ndarray                    # commodities × techniques
    b: np.ndarray                    # commodities × techniques
    labour: np.ndarray               # kinds with a supply × techniques
    labour_kinds: list[str]
    labour_all: np.ndarray           # every kind × techniques
    labour_all_kinds: list[str]
    supply: np.ndarray               # kinds with a supply × years
    basket: np.ndarray
    has_consumption: bool
    floor: np.ndarray
    max_fall: float | None
    demand: np.ndarray               # years × sectors
    theta: np.ndarray
    spending: np.ndarray             # techniques × max(1, max lead time)
    util: np.ndarray
    surv: np.ndarray                 # techniques × (T + 2): S(0..T+1)
    surv_full: list[np.ndarray]      # each technique's whole survival profile
    geometric_rate: np.ndarray       # δ for geometric profiles, NaN for the others
    initial: np.ndarray              # (T+1) × techniques: initial capacity still in service
    pipeline: list[np.ndarray]       # per technique: starts made before the plan, oldest first
    base: np.ndarray                 # (T+1) × techniques: initial + pipeline capacity
    pipe_deliveries: np.ndarray      # years × commodities
    upper_starts: np.ndarray         # years × techniques (0 outside availability)
    ceilings: list[tuple[int, list[int], float]]  # (technique, year indices, at most)
    targets: list[TargetData]
    proportions: np.ndarray | None
    proportions_source: str
    terminal_rate: float | None
    psi: np.ndarray | None
    imports: TradeSide | None
    exports: TradeSide | None
    inflow: np.ndarray | None
    objective: Any
    prices: np.ndarray = field(default_factory=lambda: np.zeros(0))  # base-year, per unit
    units: list[str] = field(default_factory=list)
    labour_units: list[str] = field(default_factory=list)  # of the kinds with a supply
    labour_all_units: list[str] = field(default_factory=list)
    value_unit: str = ""
    a_year: np.ndarray | None = None          # years × n × m (technical change)
    b_year: np.ndarray | None = None          # years × n × m, for starts made in each year
    labour_year: np.ndarray | None = None     # years × kinds with a supply × m
    labour_all_year: np.ndarray | None = None  # years × every kind × m
    population: np.ndarray | None = None      # per plan year
    base_output: np.ndarray | None = None     # base-year gross output, by sector
    first_year_within: float | None = None
    extra: dict[str, Any] = field(default_factory=dict)
    tech: TechniqueSet | None = None          # alternative techniques (None: one per sector)
    satellite: SatelliteData | None = None    # emissions and resources, their limits
    # -- several regions (lp.regional): shipments, transport, regional labour -----------
    regions: Any = None                       # RegionData; None for a plan of one region

    @property
    def m(self) -> int:
        """Number of techniques (activities): ``n`` without alternatives."""
        return self.n if self.tech is None else self.tech.m

    @property
    def tech_names(self) -> list[str]:
        """Column label of each technique (the sector's name for its base technique)."""
        return self.names if self.tech is None else self.tech.keys

    @property
    def tech_sector(self) -> np.ndarray:
        """Index of the commodity each technique makes."""
        return np.arange(self.n) if self.tech is None else self.tech.sector

    @property
    def sel(self) -> np.ndarray:
        """``n × m``: 1 where technique ``k`` makes commodity ``i`` as its main product."""
        out = np.zeros((self.n, self.m))
        out[self.tech_sector, np.arange(self.m)] = 1.0
        return out

    @property
    def q(self) -> np.ndarray:
        """``n × m`` output coefficients (main product and by-products)."""
        return np.eye(self.n) if self.tech is None else self.tech.outputs

    def by_sector(self, x: np.ndarray) -> np.ndarray:
        """Sum a technique array (``… × m``) over the techniques of each sector (``… × n``)."""
        return x if self.tech is None else x @ self.sel.T

    def supplied(self, x: np.ndarray) -> np.ndarray:
        """Commodities produced ``Q x_t`` of each year, main products and by-products."""
        return x if self.tech is None else x @ self.tech.outputs.T

    @property
    def T(self) -> int:  # noqa: N802 - the trade's symbol
        """Number of plan years."""
        return len(self.years)

    @property
    def n(self) -> int:
        """Number of sectors (commodities)."""
        return len(self.names)

    @property
    def changing(self) -> bool:
        """Whether coefficients change over the plan (technical change)."""
        return self.a_year is not None

    def a_at(self, t: int) -> np.ndarray:
        """Input coefficients of plan year ``t``."""
        return self.a if self.a_year is None else self.a_year[t]

    def b_at(self, t: int) -> np.ndarray:
        """Capital coefficients of capacity started in plan year ``t``."""
        return self.b if self.b_year is None else self.b_year[t]

    def labour_at(self, t: int, *, every_kind: bool = False) -> np.ndarray:
        """Labour coefficients of plan year ``t`` (kinds with a supply, or every kind)."""
        if every_kind:
            return self.labour_all if self.labour_all_year is None else self.labour_all_year[t]
        return self.labour if self.labour_year is None else self.labour_year[t]

    def intermediate(self, x: np.ndarray) -> np.ndarray:
        """Intermediate use ``A_t x_t`` of each year, years × commodities."""
        if self.a_year is None:
            return x @ self.a.T
        return np.einsum("tij,tj->ti", self.a_year, x)

    def labour_used(self, x: np.ndarray, *, every_kind: bool = False) -> np.ndarray:
        """Labour used ``l_t x_t`` of each year, years × kinds."""
        lab = self.labour_all_year if every_kind else self.labour_year
        if lab is None:
            return x @ (self.labour_all if every_kind else self.labour).T
        return np.einsum("tkj,tj->tk", lab, x)

    @property
    def trades(self) -> bool:
        """Whether the plan has a foreign-exchange condition."""
        return self.inflow is not None and bool(
            (self.imports is not None and self.imports.goods)
            or (self.exports is not None and self.exports.goods))


# -- per-year series and derived vectors (also used by Plan's validation) ------------------

def basket(plan: Plan) -> np.ndarray:
    """Consumption basket per unit of consumption level (zeros without one)."""
    econ = plan.economy
    if plan.consumption is not None and plan.consumption.basket is not None:
        b = plan.consumption.basket
        unknown = [k for k in b if k not in econ.names]
        if unknown:
            raise Rule("name sectors of the economy", unknown, field="consumption.basket")
        out = np.array([float(b.get(k, 0.0)) for k in econ.names])
    elif econ.consumption_basket is not None:
        out = np.array(econ.consumption_basket)
    elif plan.consumption is not None:
        raise Rule("be given here or in the economy", None, field="consumption.basket")
    else:
        return np.zeros(econ.n)
    if not np.all(np.isfinite(out)) or np.any(out < 0) or out.sum() <= 0:
        raise Rule("hold amounts >= 0 with a positive sum", out.tolist(),
                   field="consumption.basket")
    return out


def consumption_floor(plan: Plan) -> np.ndarray:
    """Least consumption level per plan year."""
    if plan.consumption is None:
        return np.zeros(len(plan.years))
    return series(plan.consumption.floor, plan.years, "consumption.floor",
                  plan.consumption.floor_growth)


def population(plan: Plan) -> np.ndarray | None:
    """Population per plan year (None without one)."""
    c = plan.consumption
    if c is None or c.population is None:
        return None
    return series(c.population, plan.years, "consumption.population", c.population_growth)


def labour_supply(plan: Plan) -> np.ndarray:
    """Labour available, kinds with a supply × years."""
    rows = []
    for i, ls in enumerate(plan.labour):
        try:
            rows.append(ls.path(plan.years))
        except Rule as exc:  # name the supply's place in the plan
            exc.field = (exc.field or "").replace("labour.", f"labour.{i}.", 1)
            raise
    return np.array(rows).reshape(len(plan.labour), len(plan.years))


def exogenous_demand(plan: Plan) -> np.ndarray:
    """Exogenous final demand, years × sectors."""
    import pandas as pd

    names = plan.economy.names
    out = np.zeros((len(plan.years), len(names)))
    fd = plan.final_demand
    if fd is None:
        return out
    if isinstance(fd, pd.DataFrame):
        unknown = [c for c in fd.columns if c not in names]
        if unknown:
            raise Rule("name sectors of the economy", unknown[:5], field="final_demand")
        fd = {c: fd[c] for c in fd.columns}
    if not isinstance(fd, dict):
        raise Rule("map sectors to numbers or per-year series", type(fd).__name__,
                   field="final_demand")
    for k, v in fd.items():
        if k not in names:
            raise Rule("name sectors of the economy", k, field="final_demand")
        out[:, names.index(k)] = series(v, plan.years, f"final_demand.{k}",
                                        plan.final_demand_growth)
    return out


def trade_sides(plan: Plan) -> tuple[TradeSide | None, TradeSide | None, np.ndarray | None]:
    """Imports, exports and the foreign-exchange inflow per year (None without trade)."""
    t = plan.trade
    if t is None:
        return None, None, None
    inflow = series(t.inflow, plan.years, "trade.inflow", t.inflow_growth)
    names = plan.economy.names
    sides = []
    for side in ("import", "export"):
        prices = getattr(t, f"{side}_prices")
        ceil_in = getattr(t, f"{side}_ceilings")
        goods = [k for k in names if k in prices]
        ceil = np.full((len(plan.years), len(goods)), np.inf)
        for i, g in enumerate(goods):
            if g in ceil_in:
                ceil[:, i] = series(ceil_in[g], plan.years, f"trade.{side}_ceilings.{g}")
        sides.append(TradeSide(goods, np.array([names.index(g) for g in goods], dtype=int),
                               np.array([prices[g] for g in goods], dtype=float), ceil))
    return sides[0], sides[1], inflow


def terminal_proportions(plan: Plan) -> tuple[np.ndarray, str]:
    """Proportions ``π`` of the terminal-capacity objective and where they came from.

    ``π`` is scaled so that the bundle is worth one unit of value at base-year
    prices (``p·π = 1``): the level ``λ`` is then the value of the terminal
    capacity bundle, whatever units the sectors are measured in.
    """
    econ = plan.economy
    prices = econ.prices
    o = next((c for c in obj.components(plan.objective)
              if isinstance(c, obj.TerminalCapacity)), None)
    if o is not None and o.proportions:
        p = np.array([float(o.proportions.get(k, 0.0)) for k in econ.names])
        return p / (prices @ p), "given"
    try:
        v = econ.dynamic_balanced_growth().proportions.to_numpy()
        valued = v * prices  # judged in value: a sector in small units is not "zero"
        if np.all(valued > 1e-12 * valued.sum()):
            return v / (prices @ v), "balanced growth"
    except (ValueError, ArithmeticError):
        pass
    c0 = np.array([econ.capital[k].initial_capacity for k in econ.names])  # type: ignore[index]
    if c0.sum() <= 0:
        return 1.0 / (econ.n * prices), "equal"
    return c0 / (prices @ c0), "initial capacity"


def techniques(plan: Plan) -> TechniqueSet | None:
    """The plan's techniques as arrays, None when each sector has only its base technique.

    Embodied technical change splits each changing technique by vintage
    (:func:`growthplan.model.technique.split_vintages`).
    """
    from ..model.technique import split_vintages, technique_arrays

    tc = plan.technical_change
    embodied = tc is not None and tc.embodied and bool(tc.input_rate or tc.capital_rate
                                                      or tc.labour_rate)
    sat = plan.satellite
    if tc is not None and tc.embodied and sat is not None and sat.rates_given():
        embodied = True  # intensities that change go with the vintage
    if not plan.techniques and not embodied:
        return None
    ts = technique_arrays(plan.economy, plan.techniques)
    if embodied:
        assert tc is not None
        T = len(plan.years)
        factors = {k: tc.factors(plan.economy.names, T, k)
                   for k in ("input", "capital", "labour")}
        if sat is not None and sat.rates_given():  # a sector whose intensity changes splits too
            factors["intensity"] = 1.0 + np.abs(
                sat.factors(plan.economy.names, T) - 1.0).sum(axis=0)
        ts = split_vintages(ts, list(plan.years), factors)
    return ts


def _pipeline_capacity(theta: int, starts: np.ndarray, surv: np.ndarray, T: int) -> np.ndarray:
    """Capacity in service in years 0..T from starts made before the plan (oldest first)."""
    out = np.zeros(T + 1)
    for back, amount in enumerate(starts[::-1], start=1):
        enter = theta - back  # plan year in which this start enters service
        ages = np.arange(T + 1) - enter
        ok = (ages >= 0) & (ages < surv.size)
        out[ok] += amount * surv[ages[ok]]
    return out


def lower(plan: Plan, *, proportions: tuple[np.ndarray, str] | None = None) -> PlanData:
    """The arrays of a validated plan.

    Parameters
    ----------
    plan : Plan
    proportions : (array, str), optional
        Terminal proportions and their source, when already known (the
        horizon search lowers many plans of the same economy).
    """
    econ = plan.economy
    names, years = econ.names, list(plan.years)
    T, n = len(years), econ.n
    assert econ.capital is not None  # Plan's validation requires it
    ts = techniques(plan)
    if ts is None:
        specs = [econ.capital[k] for k in names]
        b = np.asarray(econ.capital_coefficients, dtype=float)
        owner = np.arange(n)
    else:
        specs, b, owner = ts.specs, ts.capital, ts.sector
    m = len(specs)
    theta = np.array([s.lead_time for s in specs], dtype=int)
    width = int(max(1, theta.max()))
    spending = np.zeros((m, width))
    for j, s in enumerate(specs):
        spending[j, : len(s.spending_profile or [])] = s.spending_profile
    surv_full = [np.asarray(s.survival(), dtype=float) for s in specs]
    surv = np.zeros((m, T + 2))
    for j, prof in enumerate(surv_full):
        k = min(prof.size, T + 2)
        surv[j, :k] = prof[:k]
    geo = np.array([s.declining_balance / s.mean_service_life if s.retirement == "geometric"
                    else np.nan for s in specs])
    initial = np.array([s.initial_capacity * s.initial_survival(T) for s in specs]).T.reshape(
        T + 1, m).copy()
    base = initial.copy()
    pipe_del = np.zeros((T, n))
    pipeline = [np.zeros(0) for _ in range(m)]
    for sector, past in (plan.under_construction or {}).items():
        j = names.index(sector)  # the base technique (its first vintage) builds them
        v = np.asarray(past, dtype=float)
        pipeline[j] = v
        base[:, j] += _pipeline_capacity(int(theta[j]), v, surv_full[j], T)
        for back, amount in enumerate(v[::-1], start=1):
            for s_ in range(width):
                if 0 <= s_ - back < T:
                    pipe_del[s_ - back] += b[:, j] * spending[j, s_] * amount
    util = np.array([s.max_utilisation for s in specs], dtype=float)
    upper = np.full((T, m), np.inf)
    if ts is not None:  # starts outside a technique's availability years are held at zero
        yr = np.array(years)[:, None]
        lo = np.array([-np.inf if v is None else v for v in ts.first_year])[None, :]
        hi = np.array([np.inf if v is None else v for v in ts.last_start])[None, :]
        upper[(yr < lo) | (yr > hi)] = 0.0
    ceilings = []
    for sc in plan.starts_ceilings:
        rows = [years.index(y) for y in sc.years] if sc.years else list(range(T))
        for col in np.flatnonzero(owner == names.index(sc.sector)):  # each of its techniques
            upper[rows, col] = np.minimum(upper[rows, col], sc.at_most)
            ceilings.append((int(col), rows, float(sc.at_most)))
    kinds = list(econ.labour_kinds or [])
    if ts is not None:
        labour_all = ts.labour
    else:
        labour_all = (np.asarray(econ.labour_coefficients, dtype=float)
                      if econ.labour_coefficients is not None else np.zeros((0, n)))
    sup_kinds = [ls.kind for ls in plan.labour]
    labour = labour_all[[kinds.index(k) for k in sup_kinds]] if sup_kinds else np.zeros((0, m))
    targets = []
    for i, tg in enumerate(plan.targets):
        jt = names.index(tg.sector) if tg.sector is not None else None
        targets.append(TargetData(i, tg.quantity, tg.sector, jt, tg.year, tg.year - years[0],
                                  tg.required))
    prop, source = None, ""
    if any(isinstance(c, obj.TerminalCapacity) for c in obj.components(plan.objective)):
        prop, source = proportions if proportions is not None else terminal_proportions(plan)
    rate = plan.terminal.rate if plan.terminal is not None else None
    psi = None if rate is None else np.array([s.starts_per_capacity(rate) for s in specs])
    imports, exports, inflow = trade_sides(plan)
    data = PlanData(
        names=list(names), years=years,
        a=np.asarray(econ.input_coefficients, dtype=float) if ts is None else ts.inputs,
        b=b, labour=labour, labour_kinds=sup_kinds, labour_all=labour_all,
        labour_all_kinds=kinds, supply=labour_supply(plan), basket=basket(plan),
        has_consumption=plan.consumption is not None, floor=consumption_floor(plan),
        max_fall=plan.consumption.max_fall if plan.consumption else None,
        demand=exogenous_demand(plan), theta=theta, spending=spending, util=util, surv=surv,
        surv_full=surv_full, geometric_rate=geo, initial=initial, pipeline=pipeline,
        base=base, pipe_deliveries=pipe_del, upper_starts=upper, ceilings=ceilings,
        targets=targets, proportions=prop, proportions_source=source, terminal_rate=rate,
        psi=psi, imports=imports, exports=exports, inflow=inflow, objective=plan.objective,
        prices=econ.prices, units=econ.units,
        labour_units=[econ.labour_unit_names[kinds.index(k)] for k in sup_kinds],
        labour_all_units=econ.labour_unit_names, value_unit=econ.value_unit,
        base_output=None if econ.base_output is None else np.asarray(econ.base_output),
        first_year_within=plan.first_year_within, population=population(plan), tech=ts)
    # several regions: their arrays live in lp.regional (None without regions)
    from .regional import lower_regions

    data.regions = lower_regions(plan)
    tc = plan.technical_change
    if tc is not None and not tc.embodied and (tc.input_rate or tc.capital_rate
                                               or tc.labour_rate):
        own = data.tech_sector  # a technique changes at its sector's rates
        fa = tc.factors(data.names, T, "input")[:, own]
        fb = tc.factors(data.names, T, "capital")[:, own]
        fl = tc.factors(data.names, T, "labour")[:, own]
        data.a_year = data.a[None, :, :] * fa[:, None, :]
        data.b_year = data.b[None, :, :] * fb[:, None, :]
        data.labour_year = data.labour[None, :, :] * fl[:, None, :]
        data.labour_all_year = data.labour_all[None, :, :] * fl[:, None, :]
    if tc is not None and tc.embodied and ts is not None and np.any(ts.vintage > 0):
        from ..model.technique import technique_arrays

        first = technique_arrays(econ, plan.techniques)  # before the split, for the audit
        data.extra["vintage_factors"] = {
            "input": tc.factors(names, T, "input"), "labour": tc.factors(names, T, "labour"),
            "capital": tc.factors(names, T, "capital"), "base_inputs": first.inputs,
            "base_labour": first.labour, "base_capital": first.capital}
    data.satellite = satellite_data(plan, data)
    for arr_name in ("initial", "base", "surv", "pipe_deliveries", "demand", "supply"):
        arr = getattr(data, arr_name)
        if not np.all(np.isfinite(arr)):
            from ..errors import InvalidInput

            raise InvalidInput(f"the plan's {arr_name.replace('_', ' ')} must be finite numbers. "
                               "Got a non-finite value: check service lives, past growth and "
                               "investment histories.", field=arr_name)
    return data


# -- satellite accounts: emissions, resources and their limits ------------------------------

@dataclass(frozen=True)
class LimitData:
    """One limit as numbers: on row ``w`` of the satellite's names, over plan years ``t``.

    ``bound`` holds one ceiling per covered year (a cap), per plan year (an
    intensity ceiling, per unit of GDP), or one total (a budget).
    """

    index: int
    kind: str            # "cap", "budget" or "intensity"
    what: str
    w: int
    t: np.ndarray
    bound: np.ndarray


@dataclass
class SatelliteData:
    """Emissions and resource use per unit of activity, and the plan's limits on them.

    ``intensity`` is ``names × years × techniques`` (stressors, then impacts
    through the characterisation); ``households`` one amount per name and
    unit of the consumption level.
    """

    names: list[str]
    units: list[str]
    stressors: int
    intensity: np.ndarray
    households: np.ndarray
    limits: list[LimitData]
    resource: list[bool]

    def emitted(self, output: np.ndarray, consumption: np.ndarray | None) -> np.ndarray:
        """Emissions (or use) of each name and year, ``names × years``, from output by technique."""
        out = np.einsum("wtk,tk->wt", self.intensity, output)
        if consumption is not None:
            out = out + self.households[:, None] * consumption[None, :]
        return np.asarray(out)


def satellite_data(plan: Plan, d: PlanData) -> SatelliteData | None:
    """The satellite accounts of a plan as arrays (None without any)."""
    sat = plan.satellite
    if sat is None:
        return None
    c = sat.characterisation()
    base = sat.technique_intensities(d.names, d.tech, d.T)   # stressors × years × techniques
    intensity = np.einsum("ws,stk->wtk", c, base)
    limits = []
    for i, lim in enumerate(plan.limits):
        w = sat.names.index(lim.what)
        t = np.array(lim.window(d.years), dtype=int)
        where = f"limits.{i}"
        if lim.kind == "budget":
            bound = np.array([lim.total])
        else:
            bound = lim.path(d.years, where)
        limits.append(LimitData(i, lim.kind, lim.what, w, t, bound))
    resource = [s.resource for s in sat.stressors] + [i.resource for i in sat.impacts]
    return SatelliteData(names=sat.names, units=sat.units, stressors=len(sat.stressors),
                         intensity=intensity, households=c @ sat.households(), limits=limits,
                         resource=resource)
