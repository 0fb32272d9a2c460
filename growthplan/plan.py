"""The multi-year plan: what the analyst states.

Timing conventions (MODEL.md §4, kept everywhere in the library):

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

import time
import warnings
from typing import Any

import numpy as np
import pandas as pd
from pydantic import Field, PrivateAttr, field_validator, model_validator

from . import objectives as obj
from ._validation import Model, Rule
from .economy import Economy
from .errors import EndEffectsWarning

__all__ = ["LabourSupply", "Consumption", "Target", "StartsCeiling", "TerminalGrowth", "Trade",
           "Plan"]


def _series(value: Any, years: list[int], field: str, growth: float = 0.0) -> np.ndarray:
    """A per-year array from a number (grown at ``growth``), a list, a dict or a Series."""
    t = np.arange(len(years), dtype=float)
    rule = "be a number, a list with one number per plan year, or a mapping of years to numbers"
    try:
        if isinstance(value, int | float) and not isinstance(value, bool):
            out = float(value) * (1.0 + growth) ** t
        elif isinstance(value, dict | pd.Series):
            items = {int(k): float(v) for k, v in dict(value).items()}
            unknown = [y for y in items if y not in years]
            if unknown:
                raise Rule(f"give values for plan years {years[0]}..{years[-1]} only", unknown,
                           field=field)
            missing = [y for y in years if y not in items]
            if missing:
                raise Rule("give a value for every plan year", f"missing {missing}",
                           field=field)
            out = np.array([items[y] for y in years])
        elif isinstance(value, str | bytes | bool) or value is None:
            raise Rule(rule, value, field=field)
        else:
            out = np.asarray(value, dtype=float)
            if out.shape != (len(years),):
                raise Rule(f"have one value per plan year ({len(years)})", f"{out.size} values",
                           field=field)
    except (TypeError, ValueError) as exc:
        if isinstance(exc, Rule):
            raise
        raise Rule(rule, value, field=field) from None
    if not np.all(np.isfinite(out)) or np.any(out < 0):
        raise Rule("hold finite values >= 0", value, field=field)
    return out


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

    @model_validator(mode="after")
    def _one(self) -> LabourSupply:
        if (self.start is None) == (self.series is None):
            raise Rule("be given as start (with growth) or as series, exactly one", None,
                       field="start")
        return self

    def path(self, years: list[int]) -> np.ndarray:
        """Person-years for each plan year."""
        return _series(self.start if self.series is None else self.series, years,
                       "labour.series", self.growth)


class Consumption(Model):
    """Household consumption: the basket, its floors and how fast it may fall.

    Parameters
    ----------
    basket : dict of str to float, optional
        Commodities per unit of consumption level (default: the economy's).
    floor : float, list, dict or Series, default 0.0
        Least consumption level per year (a number is grown at ``floor_growth``).
    floor_growth : float, default 0.0
    max_fall : float, optional
        Largest allowed fall from one year to the next, as a share (0.02 = 2 %).
    """

    basket: dict[str, float] | None = None
    floor: Any = 0.0
    floor_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    max_fall: float | None = Field(default=None, ge=0, le=1)


class Target(Model):
    """An at-least condition on one sector (or on the consumption level) in one year.

    Give exactly one of ``output_at_least``, ``capacity_at_least`` or
    ``consumption_at_least``. Capacity targets may name the year after the
    plan (terminal capacity). A consumption target without a sector bounds the
    consumption level; with a sector it bounds that commodity's consumption.
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
    def what(self) -> str:
        """``"output"``, ``"capacity"`` or ``"consumption"``."""
        for k in ("output", "capacity", "consumption"):
            if getattr(self, f"{k}_at_least") is not None:
                return k
        raise AssertionError("validated target without a condition")

    @property
    def value(self) -> float:
        """The required level."""
        return float(getattr(self, f"{self.what}_at_least"))


class StartsCeiling(Model):
    """Largest capacity starts of a sector per year (absorptive capacity)."""

    sector: str
    at_most: float = Field(ge=0, allow_inf_nan=False)
    years: list[int] | None = None

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
    targets : list of Target
    starts_ceilings : list of StartsCeiling
    under_construction : dict of str to list of float, optional
        Capacity started before the plan, one entry per past year, the last in
        the year before the plan; their remaining capital deliveries fall in
        plan years and their capacity enters service on schedule.
    terminal : TerminalGrowth, optional
        Post-horizon growth condition; without one the result warns of end
        effects.
    objective : TerminalCapacity, DiscountedConsumption or LeastLabour
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
    objective: (obj.TerminalCapacity | obj.DiscountedConsumption | obj.LeastLabour
                | obj.LeastForeignExchange | obj.Weighted | obj.Lexicographic
                | obj.Fastest) = Field(default_factory=obj.TerminalCapacity,
                                       discriminator="kind")
    _validate_seconds: float = PrivateAttr(default=0.0)

    def __init__(self, /, **data: Any) -> None:
        t0 = time.perf_counter()
        super().__init__(**data)
        self._validate_seconds = time.perf_counter() - t0

    @field_validator("years", mode="before")
    @classmethod
    def _years(cls, v: Any) -> Any:
        if isinstance(v, range):
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
            raise Rule("be consecutive and increasing", v)
        return v

    @field_validator("labour", mode="before")
    @classmethod
    def _labour(cls, v: Any) -> Any:
        if v is None:
            return []
        return [v] if isinstance(v, LabourSupply | dict) else v

    @model_validator(mode="after")
    def _check(self) -> Plan:
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
            ls.path(self.years)
        if len({ls.kind for ls in self.labour}) != len(self.labour):
            raise Rule("give each labour kind once", [ls.kind for ls in self.labour],
                       field="labour")
        if self.consumption is not None:
            self.consumption_floor()
            self.basket()
        first, last = self.years[0], self.years[-1]
        for i, tg in enumerate(self.targets):
            if tg.sector is not None and tg.sector not in names:
                raise Rule(f"name a sector of the economy ({', '.join(names)})", tg.sector,
                           field=f"targets.{i}.sector")
            limit = last + 1 if tg.what == "capacity" else last
            if not first <= tg.year <= limit:
                raise Rule(f"be a plan year {first}..{limit}", tg.year,
                           field=f"targets.{i}.year")
            if tg.what == "consumption" and self.consumption is None:
                raise Rule("come with a consumption part in the plan", tg.value,
                           field=f"targets.{i}.consumption_at_least")
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
        for part in obj.components(self.objective):
            if isinstance(part, obj.DiscountedConsumption) and self.consumption is None:
                raise Rule("come with a consumption part in the plan (the objective values "
                           "it)", None, field="consumption")
            if isinstance(part, obj.LeastLabour) and econ.labour_coefficients is None:
                raise Rule("come with labour coefficients in the economy (the objective "
                           "counts labour)", None, field="economy.labour_coefficients")
            if isinstance(part, obj.LeastForeignExchange) and self.trade is None:
                raise Rule("come with a trade part in the plan (the objective counts "
                           "foreign exchange)", None, field="trade")
            if isinstance(part, obj.TerminalCapacity) and part.proportions:
                unknown = [k for k in part.proportions if k not in names]
                if unknown:
                    raise Rule("name sectors of the economy", unknown,
                               field="objective.proportions")
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
            self.trade_data()
        self.exogenous_demand()
        return self

    # -- derived data ---------------------------------------------------------
    @property
    def horizon(self) -> int:
        """Number of plan years ``T``."""
        return len(self.years)

    def basket(self) -> np.ndarray:
        """Consumption basket per unit of consumption level (zeros without one)."""
        econ = self.economy
        if self.consumption is not None and self.consumption.basket is not None:
            b = self.consumption.basket
            unknown = [k for k in b if k not in econ.names]
            if unknown:
                raise Rule("name sectors of the economy", unknown, field="consumption.basket")
            out = np.array([float(b.get(k, 0.0)) for k in econ.names])
        elif econ.consumption_basket is not None:
            out = np.array(econ.consumption_basket)
        elif self.consumption is not None:
            raise Rule("be given here or in the economy", None, field="consumption.basket")
        else:
            return np.zeros(econ.n)
        if not np.all(np.isfinite(out)) or np.any(out < 0) or out.sum() <= 0:
            raise Rule("hold amounts >= 0 with a positive sum", out.tolist(),
                       field="consumption.basket")
        return out

    def consumption_floor(self) -> np.ndarray:
        """Least consumption level per plan year."""
        if self.consumption is None:
            return np.zeros(self.horizon)
        return _series(self.consumption.floor, self.years, "consumption.floor",
                       self.consumption.floor_growth)

    def labour_supply(self) -> np.ndarray:
        """Labour available, kinds × years (only the kinds with a supply)."""
        return np.array([ls.path(self.years) for ls in self.labour]).reshape(
            len(self.labour), self.horizon)

    def exogenous_demand(self) -> np.ndarray:
        """Exogenous final demand, years × sectors."""
        names = self.economy.names
        out = np.zeros((self.horizon, len(names)))
        fd = self.final_demand
        if fd is None:
            return out
        if isinstance(fd, pd.DataFrame):
            unknown = [c for c in fd.columns if c not in names]
            if unknown:
                raise Rule("name sectors of the economy", unknown, field="final_demand")
            fd = {c: fd[c] for c in fd.columns}
        if not isinstance(fd, dict):
            raise Rule("map sectors to numbers or per-year series", type(fd).__name__,
                       field="final_demand")
        for k, v in fd.items():
            if k not in names:
                raise Rule("name sectors of the economy", k, field="final_demand")
            out[:, names.index(k)] = _series(v, self.years, f"final_demand.{k}",
                                             self.final_demand_growth)
        return out

    def trade_data(self) -> dict[str, Any] | None:
        """Arrays of the trade part: names, prices, ceilings (years × goods), inflow."""
        if self.trade is None:
            return None
        t = self.trade
        out: dict[str, Any] = {"inflow": _series(t.inflow, self.years, "trade.inflow",
                                                 t.inflow_growth)}
        for side in ("import", "export"):
            prices = getattr(t, f"{side}_prices")
            goods = [k for k in self.economy.names if k in prices]
            ceil = np.full((self.horizon, len(goods)), np.inf)
            for i, g in enumerate(goods):
                if g in getattr(t, f"{side}_ceilings"):
                    ceil[:, i] = _series(getattr(t, f"{side}_ceilings")[g], self.years,
                                         f"trade.{side}_ceilings.{g}")
            out[side] = (goods, np.array([prices[g] for g in goods]), ceil)
        return out

    def terminal_proportions(self) -> tuple[np.ndarray, str]:
        """Proportions ``π`` of the terminal-capacity objective and where they came from."""
        econ = self.economy
        o = next((c for c in obj.components(self.objective)
                  if isinstance(c, obj.TerminalCapacity)), None)
        if o is not None and o.proportions:
            p = np.array([float(o.proportions.get(k, 0.0)) for k in econ.names])
            return p / p.sum(), "given"
        try:
            v = econ.dynamic_balanced_growth().proportions.to_numpy()
            if np.all(v > 1e-12):
                return v / v.sum(), "balanced growth"
        except (ValueError, ArithmeticError):
            pass
        c0 = np.array([econ.capital[k].initial_capacity for k in econ.names])  # type: ignore
        if c0.sum() <= 0:
            return np.full(econ.n, 1.0 / econ.n), "equal"
        return c0 / c0.sum(), "initial capacity"

    # -- actions ------------------------------------------------------------
    def compile(self, *, size_limit: int | None = 25_000_000):
        """The plan's :class:`~growthplan.compile.LinearProgram`.

        Refuses plans estimated above ``size_limit`` nonzeros (None: no limit);
        :meth:`estimate_size` gives the estimate without building anything.
        """
        from .compile import compile_plan

        return compile_plan(self, size_limit=size_limit)

    def estimate_size(self) -> dict[str, int]:
        """Rows, columns, nonzeros and peak build bytes of this plan's LP."""
        from .compile import estimate_size

        return estimate_size(self)

    def solve(self, *, method: str = "auto", time_limit: float | None = None,
              threads: int | None = None, tolerance: float | None = None,
              audit_tolerance: float = 1e-6, options: dict | None = None,
              progress: bool = False, stop=None, size_limit: int | None = 25_000_000):
        """Solve the plan with HiGHS and audit the result.

        The LP, for years ``t = 0..T−1`` (MODEL.md §4)::

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
        method : {"auto", "simplex", "ipm", "ipm-crossover", "pdlp"}
            HiGHS method. ``"auto"`` picks by problem size (see the README).
        time_limit : float, optional
            Seconds; a solve that hits it returns status ``time_limit``.
        threads : int, optional
        tolerance : float, optional
            Primal and dual feasibility tolerance of HiGHS.
        audit_tolerance : float, default 1e-6
            Largest violation, relative to each condition's scale, that the
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
        if isinstance(self.objective, obj.Fastest):
            return self._fastest(method=method, time_limit=time_limit, threads=threads,
                                 tolerance=tolerance, audit_tolerance=audit_tolerance,
                                 options=options, progress=progress, stop=stop,
                                 size_limit=size_limit)
        from .result import PlanResult
        from .solvers import solve_stages

        t0 = time.perf_counter()
        lp = self.compile(size_limit=size_limit)
        t1 = time.perf_counter()
        from .progress import solve_progress

        with solve_progress(progress, f"{self.economy.n} sectors × {self.horizon} years") as cb:
            lp, outcome = solve_stages(
                lp, method=method, time_limit=time_limit, threads=threads,
                tolerance=tolerance, options=options, callback=cb, stop=stop,
                tolerance_stage=getattr(self.objective, "tolerance", 0.0))
        timings = {"validate": self._validate_seconds, "compile": t1 - t0}
        return PlanResult.from_outcome(self, lp, outcome, timings=timings,
                                       audit_tolerance=audit_tolerance)

    def to_pulp(self, name: str = "growthplan"):
        """A ``pulp.LpProblem`` of this plan, built from the same LinearProgram as ``solve``.

        Names carry block, year and sector (``starts_2030_energy``). Add
        constraints of your own and pass the problem to :meth:`solve_pulp`.
        """
        from .solvers import to_pulp

        return to_pulp(self.compile(), name)[0]

    def solve_pulp(self, solver=None, *, problem=None, audit_tolerance: float = 1e-6):
        """Solve with a PuLP solver (default: PuLP's bundled CBC) and return a PlanResult.

        Parameters
        ----------
        solver : pulp.LpSolver, optional
        problem : pulp.LpProblem, optional
            A problem from :meth:`to_pulp`, perhaps with constraints of your own.
        """
        from .result import PlanResult
        from .solvers import solve_pulp, to_pulp

        t0 = time.perf_counter()
        lp = self.compile()
        prob = problem if problem is not None else to_pulp(lp)[0]
        t1 = time.perf_counter()
        outcome = solve_pulp(lp, prob, solver)
        return PlanResult.from_outcome(self, lp, outcome,
                                       timings={"validate": self._validate_seconds,
                                                "compile": t1 - t0},
                                       audit_tolerance=audit_tolerance)

    def write_mps(self, path, *, overwrite: bool = False):
        """Write the plan's LP as an MPS file (the objective sense included)."""
        return self._write(path, overwrite, lambda prob, p: prob.writeMPS(
            str(p), with_objsense=True))

    def write_lp(self, path, *, overwrite: bool = False):
        """Write the plan's LP in the LP file format."""
        return self._write(path, overwrite, lambda prob, p: prob.writeLP(str(p)))

    def _write(self, path, overwrite: bool, writer):
        import os
        import tempfile
        from pathlib import Path

        from .errors import invalid

        target = Path(path)
        if target.exists() and not overwrite:
            raise invalid("path", "not exist yet (pass overwrite=True to replace it)",
                          str(target))
        prob = self.to_pulp()
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix,
                                   dir=target.parent)
        os.close(fd)
        try:
            writer(prob, tmp)
            os.replace(tmp, target)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
        return target

    def with_horizon(self, years: int) -> Plan:
        """This plan over its first ``years`` years, targets moved to the end (see Fastest)."""
        first = self.years[0]
        last = first + years - 1
        targets = [t.model_copy(update={"year": last + 1 if t.what == "capacity" else last})
                   for t in self.targets]
        fields = {k: getattr(self, k) for k in type(self).model_fields}
        objective = self.objective.then if isinstance(self.objective, obj.Fastest) else \
            self.objective
        fields.update(years=list(range(first, last + 1)), targets=targets, objective=objective)
        return Plan(**fields)

    def _fastest(self, **kw: Any):
        """Bisection over horizons, each a feasibility LP (no objective).

        HiGHS cannot warm-start one horizon from another (each is an LP of
        another size), so every test starts cold; the shortest feasible
        horizon is then solved with the ``then`` objective and audited.
        """
        import dataclasses

        from .solvers import Status, solve_highs

        o = self.objective
        assert isinstance(o, obj.Fastest)
        tried: dict[int, str] = {}
        solver_kw = {k: kw[k] for k in ("method", "time_limit", "threads", "tolerance",
                                        "options", "stop") if k in kw}

        def feasible(years: int) -> bool:
            lp = self.with_horizon(years).compile(size_limit=kw.get("size_limit", 25_000_000))
            zero = np.zeros_like(lp.cost)
            probe = dataclasses.replace(lp, cost=zero, sense="min", stages=[(zero, "min")])
            status = solve_highs(probe, **solver_kw).status
            tried[years] = status.value
            return status is Status.OPTIMAL

        def final(years: int):
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", EndEffectsWarning)
                result = self.with_horizon(years).solve(**kw)
            result.horizons = dict(sorted(tried.items()))
            return result

        if not feasible(o.max_years):
            return final(o.max_years)  # infeasible: the result carries the diagnosis
        lo, hi = 0, o.max_years  # lo infeasible (or none), hi feasible
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if feasible(mid):
                hi = mid
            else:
                lo = mid
        return final(hi)
