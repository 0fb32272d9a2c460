"""Uncertain coefficients: drawn economies, stress tests, re-optimisation and robust plans.

An :class:`UncertaintySpec` names what is uncertain (input, capital or labour
coefficients, mean service lives, labour growth, exogenous demand), by which
distribution, and how the draws of the cells it selects are correlated. Draw
``i`` of a spec is a plan of its own (:meth:`UncertaintySpec.draw`): its
random numbers come from ``SeedSequence(seed).spawn(...)[i]`` alone, so a
draw is the same whatever executor computes it and in whatever order.

Every value is drawn by the inverse of its distribution function from a
uniform number ``u``: one ``u`` for the whole selection (``"shared"``, perfect
correlation), one per cell (``"independent"``), or ``u = Φ(Lε)`` with ``L``
the Cholesky factor of a stated correlation matrix (a Gaussian copula).

Three analyses run on any ``concurrent.futures.Executor``, like
:func:`growthplan.scenarios.sweep`:

* :func:`stress_test` keeps a solved plan's capacity starts and asks what each
  drawn economy can then deliver (an elastic re-solve per draw);
* :func:`reoptimise` solves the plan again in every drawn economy;
* :func:`robust_plan` finds one set of starts that meets every condition in
  all of ``N`` drawn economies, solved as one LP.
"""

from __future__ import annotations

import math
import os
import warnings
from concurrent.futures import Executor
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Annotated, Any, Literal

import numpy as np
import pandas as pd
from pydantic import Field, field_validator, model_validator
from scipy import sparse, stats

from ..errors import invalid
from ..limits import MAX_DRAWS, MAX_ROBUST_SCENARIOS
from ..model.validation import Model, Rule

if TYPE_CHECKING:
    from ..backends.base import Backend
    from ..model.plan import Plan

__all__ = ["Normal", "LogNormal", "Uniform", "Triangular", "Empirical", "Uncertain",
           "UncertaintySpec", "UncertaintyResult", "RobustPlan", "stress_test", "reoptimise",
           "robust_plan", "fix_starts"]

COLUMNS = ["draw", "status", "quantity", "year", "name", "value", "error"]


# -- distributions ------------------------------------------------------------------------

class _Distribution(Model):
    def ppf(self, u: np.ndarray) -> np.ndarray:  # pragma: no cover - overridden
        raise NotImplementedError


class Normal(_Distribution):
    """Normal distribution truncated at zero (``mean``, ``sd`` of the untruncated one)."""

    kind: Literal["normal"] = Field(default="normal",
                                 description="The distribution: normal truncated at zero.")
    mean: float = Field(allow_inf_nan=False, description="Mean of the untruncated normal.")
    sd: float = Field(ge=0, allow_inf_nan=False,
                      description="Standard deviation of the untruncated normal, >= 0.")

    @model_validator(mode="after")
    def _positive(self) -> Normal:
        if self.sd == 0 and self.mean < 0:
            raise Rule("be >= 0 when sd is 0 (the distribution is truncated at zero)",
                       self.mean, field="mean")
        return self

    def ppf(self, u: np.ndarray) -> np.ndarray:
        if self.sd == 0:
            return np.full(np.shape(u), self.mean)
        a = -self.mean / self.sd
        return np.asarray(stats.truncnorm.ppf(u, a, np.inf, loc=self.mean, scale=self.sd))


class LogNormal(_Distribution):
    """Lognormal distribution given by its own ``mean`` and ``sd`` (not those of the log)."""

    kind: Literal["lognormal"] = Field(default="lognormal",
                                 description="The distribution: lognormal.")
    mean: float = Field(gt=0, allow_inf_nan=False,
                        description="Mean of the drawn values (not of their log), > 0.")
    sd: float = Field(ge=0, allow_inf_nan=False,
                      description="Standard deviation of the drawn values, >= 0.")

    def ppf(self, u: np.ndarray) -> np.ndarray:
        if self.sd == 0:
            return np.full(np.shape(u), self.mean)
        s2 = math.log1p((self.sd / self.mean) ** 2)
        mu = math.log(self.mean) - s2 / 2
        return np.exp(mu + math.sqrt(s2) * stats.norm.ppf(u))


class Uniform(_Distribution):
    """Uniform distribution on ``[low, high]``."""

    kind: Literal["uniform"] = Field(default="uniform",
                                 description="The distribution: uniform.")
    low: float = Field(allow_inf_nan=False, description="Smallest value.")
    high: float = Field(allow_inf_nan=False, description="Largest value, >= low.")

    @model_validator(mode="after")
    def _order(self) -> Uniform:
        if self.high < self.low:
            raise Rule(f"be >= low ({self.low})", self.high, field="high")
        return self

    def ppf(self, u: np.ndarray) -> np.ndarray:
        if self.high == self.low:
            return np.full(np.shape(u), self.low)
        return self.low + np.asarray(u) * (self.high - self.low)


class Triangular(_Distribution):
    """Triangular distribution on ``[low, high]`` with its peak at ``mode``."""

    kind: Literal["triangular"] = Field(default="triangular",
                                 description="The distribution: triangular.")
    low: float = Field(allow_inf_nan=False, description="Smallest value.")
    mode: float = Field(allow_inf_nan=False, description="Most likely value.")
    high: float = Field(allow_inf_nan=False, description="Largest value.")

    @model_validator(mode="after")
    def _order(self) -> Triangular:
        if not self.low <= self.mode <= self.high:
            raise Rule("satisfy low <= mode <= high", [self.low, self.mode, self.high],
                       field="mode")
        return self

    def ppf(self, u: np.ndarray) -> np.ndarray:
        lo, c, hi = self.low, self.mode, self.high
        u = np.asarray(u, dtype=float)
        if hi == lo:
            return np.full(u.shape, lo)
        f = (c - lo) / (hi - lo)
        left = lo + np.sqrt(u * (hi - lo) * (c - lo))
        right = hi - np.sqrt((1 - u) * (hi - lo) * (hi - c))
        return np.where(u < f, left, right)


class Empirical(_Distribution):
    """An empirical sample: each draw is one of its values, each equally likely."""

    kind: Literal["empirical"] = Field(default="empirical",
                                 description="The distribution: an empirical sample.")
    sample: list[float] = Field(description="The observed values, each drawn with equal "
                                            "probability.")

    @field_validator("sample")
    @classmethod
    def _finite(cls, v: list[float]) -> list[float]:
        arr = np.asarray(v, dtype=float)
        if arr.size == 0 or not np.all(np.isfinite(arr)):
            raise Rule("be a non-empty list of finite numbers", v)
        return sorted(float(x) for x in arr)

    def ppf(self, u: np.ndarray) -> np.ndarray:
        s = np.asarray(self.sample)
        idx = np.minimum((np.asarray(u) * s.size).astype(int), s.size - 1)
        return s[idx]


Distribution = Annotated[Normal | LogNormal | Uniform | Triangular | Empirical,
                         Field(discriminator="kind")]

_WHAT = Literal["input_coefficients", "capital_coefficients", "labour_coefficients",
                "mean_service_life", "labour_growth", "final_demand", "import_prices",
                "export_prices", "intensities"]
_PRICES = ("import_prices", "export_prices")


class Uncertain(Model):
    """One uncertain quantity: what, which cells, its distribution and correlation.

    Parameters
    ----------
    what : str
        ``"input_coefficients"``, ``"capital_coefficients"``,
        ``"labour_coefficients"`` (cells ``rows`` × ``cols``),
        ``"mean_service_life"`` or ``"final_demand"`` (``cols``: sectors) or
        ``"labour_growth"`` (``cols``: labour kinds with a supply), or
        ``"import_prices"``/``"export_prices"`` (``cols``: goods of the plan's
        trade with such a price; world prices in the plan's value unit), or
        ``"intensities"`` (cells stressors × sectors or technique keys of the
        plan's satellite accounts; a technique without an intensity of its
        own follows its sector's draw).
    rows, cols : str or list of str, optional
        Commodities (labour kinds for labour coefficients) and sectors
        selected; all when omitted. One row and one column select one cell.
    distribution : Normal, LogNormal, Uniform, Triangular or Empirical
    relative : bool, default True
        The draw multiplies the nominal value (a factor around 1); False
        replaces it. Exogenous demand is relative only (its whole path is
        scaled).
    correlation : "shared", "independent" or a matrix, default "shared"
        One draw for every selected cell (perfect correlation), one per cell,
        or a correlation matrix over the cells (row-major order of
        ``rows`` × ``cols``) joined by a Gaussian copula.
    """

    what: _WHAT = Field(description=(
        "What is uncertain: input_coefficients, capital_coefficients, labour_coefficients "
        "(cells rows x cols), mean_service_life, final_demand (cols: sectors), labour_growth "
        "(cols: labour kinds with a supply), import_prices or export_prices (cols: traded "
        "goods), intensities (cells stressors x sectors or techniques of the satellite "
        "accounts)."))
    rows: list[str] | None = Field(default=None, description=(
        "Commodities (labour kinds for labour_coefficients) selected; all when omitted. "
        "Coefficient blocks only."))
    cols: list[str] | None = Field(default=None, description=(
        "Sectors (or labour kinds, or goods) selected; all when omitted. One row and one "
        "column select one cell."))
    distribution: Distribution = Field(description=(
        "The distribution of the drawn value: normal (truncated at zero), lognormal (its own "
        "mean and sd), uniform, triangular or empirical (a sample)."))
    relative: bool = Field(default=True, description=(
        "True: the draw multiplies the nominal value (a factor around 1). False: it replaces "
        "it. final_demand is relative only (its whole path is scaled)."))
    correlation: Literal["shared", "independent"] | list[list[float]] = Field(
        default="shared", description=(
            "shared: one draw for every selected cell (perfect correlation); independent: one "
            "per cell; or a correlation matrix over the cells in row-major order (a Gaussian "
            "copula)."))

    @field_validator("rows", "cols", mode="before")
    @classmethod
    def _names(cls, v: Any) -> Any:
        if isinstance(v, str):
            return [v]
        if v is not None and not list(v):
            raise Rule("name at least one (leave it out for all)", v)
        return v

    @field_validator("correlation")
    @classmethod
    def _matrix(cls, v: Any) -> Any:
        if isinstance(v, str):
            return v
        m = np.asarray(v, dtype=float)
        if m.ndim != 2 or m.shape[0] != m.shape[1] or not np.all(np.isfinite(m)):
            raise Rule("be a square matrix of finite numbers", v)
        if not np.allclose(m, m.T, atol=1e-12) or not np.allclose(np.diag(m), 1.0):
            raise Rule("be symmetric with ones on the diagonal", v)
        if np.linalg.eigvalsh(m).min() < -1e-10:
            raise Rule("be positive semi-definite", v)
        return v

    @model_validator(mode="after")
    def _fits(self) -> Uncertain:
        if self.rows is not None and self.what not in ("input_coefficients",
                                                       "capital_coefficients",
                                                       "labour_coefficients", "intensities"):
            raise Rule(f"be left out for {self.what} (select with cols)", self.rows,
                       field="rows")
        if self.what == "final_demand" and not self.relative:
            raise Rule("be true for final_demand (the demand path is scaled)", False,
                       field="relative")
        return self

    def _cells(self, plan: Plan, where: str) -> tuple[list[str], list[str], list[str], list[str]]:
        """(row names available, column names available, rows chosen, columns chosen)."""
        econ = plan.economy
        if self.what in ("input_coefficients", "capital_coefficients"):
            all_rows, all_cols = econ.names, econ.names
        elif self.what == "labour_coefficients":
            if econ.labour_coefficients is None:
                raise invalid(f"{where}.what", "name a block the economy has", self.what)
            all_rows, all_cols = list(econ.labour_kinds or []), econ.names
        elif self.what == "labour_growth":
            all_rows, all_cols = [""], [ls.kind for ls in plan.labour]
            if not all_cols:
                raise invalid(f"{where}.what", "name a block the plan has (no labour supply)",
                              self.what)
        elif self.what in _PRICES:
            prices = getattr(plan.trade, self.what, None) if plan.trade is not None else None
            if not prices:
                raise invalid(f"{where}.what", "name a block the plan has (no trade with "
                              f"{self.what})", self.what)
            all_rows, all_cols = [""], list(prices)
        elif self.what == "intensities":
            if plan.satellite is None:
                raise invalid(f"{where}.what", "name a block the plan has (no satellite "
                              "accounts)", self.what)
            all_rows = [st.name for st in plan.satellite.stressors]
            all_cols = econ.names + _technique_columns(plan)
        else:
            all_rows, all_cols = [""], econ.names
        rows = self.rows if self.rows is not None else all_rows
        cols = self.cols if self.cols is not None else all_cols
        for key, chosen, allowed in (("rows", rows, all_rows), ("cols", cols, all_cols)):
            bad = [x for x in chosen if x not in allowed]
            if bad:
                raise invalid(f"{where}.{key}", f"name entries of {self.what} "
                              f"({', '.join(allowed[:10])})", bad[:5])
        k = len(rows) * len(cols)
        if not isinstance(self.correlation, str) and len(self.correlation) != k:
            raise invalid(f"{where}.correlation", f"be {k}×{k}, one row per selected cell",
                          f"{len(self.correlation)} rows")
        return all_rows, all_cols, rows, cols

    def _uniforms(self, rng: np.random.Generator, k: int) -> np.ndarray:
        if self.correlation == "shared":
            return np.full(k, rng.random())
        if self.correlation == "independent":
            return rng.random(k)
        m = np.asarray(self.correlation, dtype=float)
        # eigen-factor rather than Cholesky: semi-definite matrices (perfect correlation) allowed
        w, v = np.linalg.eigh(m)
        factor = v * np.sqrt(np.clip(w, 0.0, None))
        return np.asarray(stats.norm.cdf(factor @ rng.standard_normal(k)))


class UncertaintySpec(Model):
    """What is uncertain, and the seed of the draws.

    Parameters
    ----------
    items : list of Uncertain
        Applied in order (two relative items on the same cell multiply).
    seed : int, default 0
        Draw ``i`` uses ``numpy.random.SeedSequence(seed).spawn(i + 1)[i]``.
    draws : int, default 100
        Drawn economies used by :func:`stress_test` and :func:`reoptimise`
        when they are not given a number (a plan file's ``uncertainty:``
        section sets it).

    Examples
    --------
    >>> spec = UncertaintySpec(items=[Uncertain(what="capital_coefficients",
    ...     distribution=Uniform(low=0.9, high=1.1))], seed=7)
    """

    items: list[Uncertain] = Field(min_length=1, description=(
        "The uncertain quantities, applied in order (two relative items on one cell "
        "multiply)."))
    seed: int = Field(default=0, ge=0, description=(
        "Seed of the draws: draw i uses numpy.random.SeedSequence(seed).spawn(i + 1)[i], so "
        "a draw is the same whatever computes it and in whatever order."))
    draws: int = Field(default=100, ge=1, le=MAX_DRAWS, description=(
        "Number of drawn economies the analyses use when not told otherwise."))

    def check(self, plan: Plan) -> None:
        """Raise InvalidInput when an item selects cells the plan does not have."""
        for k, item in enumerate(self.items):
            item._cells(plan, f"items.{k}")

    def rng(self, i: int) -> np.random.Generator:
        """The generator of draw ``i`` (a child of the seed, independent of other draws)."""
        return np.random.default_rng(np.random.SeedSequence(self.seed, spawn_key=(int(i),)))

    def values(self, plan: Plan, i: int) -> list[np.ndarray]:
        """The values drawn for each item in draw ``i`` (rows × cols of its selection)."""
        rng = self.rng(i)
        out = []
        for k, item in enumerate(self.items):
            _, _, rows, cols = item._cells(plan, f"items.{k}")
            u = item._uniforms(rng, len(rows) * len(cols))
            out.append(item.distribution.ppf(u).reshape(len(rows), len(cols)))
        return out

    def draw(self, plan: Plan, i: int) -> Any:
        """Plan of draw ``i``: the nominal plan with every item's cells drawn (validated anew)."""
        from ..lp.data import exogenous_demand
        from ..model.economy import CapitalSpec, Economy
        from ..model.plan import LabourSupply, Plan, Trade

        econ = plan.economy
        assert econ.capital is not None  # a valid plan's economy has capital for every sector
        blocks = {"input_coefficients": np.array(econ.input_coefficients, dtype=float),
                  "capital_coefficients": np.array(econ.capital_coefficients, dtype=float)}
        if econ.labour_coefficients is not None:
            blocks["labour_coefficients"] = np.array(econ.labour_coefficients, dtype=float)
        lives = np.array([econ.capital[k].mean_service_life for k in econ.names], dtype=float)
        growth = np.array([ls.growth for ls in plan.labour], dtype=float)
        demand = np.ones(econ.n)
        prices = {w: np.array(list(getattr(plan.trade, w).values()), dtype=float)
                  for w in _PRICES if plan.trade is not None}
        sat = plan.satellite
        if sat is not None:
            cols_i = econ.names + _technique_columns(plan)
            blocks["intensities"] = np.array(
                [[st.intensities.get(c, np.nan if ":" in c and c not in econ.names else 0.0)
                  for c in cols_i] for st in sat.stressors], dtype=float)
        touched: set[str] = set()
        for k, (item, drawn) in enumerate(zip(self.items, self.values(plan, i), strict=True)):
            all_rows, all_cols, rows, cols = item._cells(plan, f"items.{k}")
            r = np.array([all_rows.index(x) for x in rows])
            c = np.array([all_cols.index(x) for x in cols])
            target = {"mean_service_life": lives[None, :], "labour_growth": growth[None, :],
                      "final_demand": demand[None, :],
                      **{w: v[None, :] for w, v in prices.items()}}.get(item.what)
            if target is None:
                target = blocks[item.what]
            cell = np.ix_(r, c)
            target[cell] = target[cell] * drawn if item.relative else drawn
            touched.add(item.what)
        fields = {f: getattr(plan, f) for f in type(plan).model_fields}
        if touched & {"input_coefficients", "capital_coefficients", "labour_coefficients",
                      "mean_service_life"}:
            capital = {name: spec if lives[j] == spec.mean_service_life else
                       CapitalSpec(**{**spec.model_dump(), "mean_service_life": lives[j]})
                       for j, (name, spec) in enumerate(econ.capital.items())}
            data = {f: getattr(econ, f) for f in type(econ).model_fields}
            data.update(blocks, capital=capital)
            if econ.labour_coefficients is None:
                data.pop("labour_kinds", None)
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                fields["economy"] = Economy(**data)
        if "intensities" in touched:
            assert sat is not None
            stressors = []
            for st, row in zip(sat.stressors, blocks["intensities"], strict=True):
                # NaN: a technique without its own intensity, still following its sector
                given = {c: float(v) for c, v in zip(cols_i, row, strict=True)
                         if np.isfinite(v) and (v != 0 or c in st.intensities)}
                stressors.append(st.model_copy(update={"intensities": given}))
            fields["satellite"] = sat.model_copy(update={"stressors": stressors})
        if "labour_growth" in touched:
            fields["labour"] = [LabourSupply(**{**ls.model_dump(), "growth": float(g)})
                                for ls, g in zip(plan.labour, growth, strict=True)]
        if "final_demand" in touched:
            path = exogenous_demand(plan) * demand[None, :]
            fields["final_demand"] = pd.DataFrame(path, index=plan.years, columns=econ.names)
            fields["final_demand_growth"] = 0.0
        if touched & set(_PRICES):
            assert plan.trade is not None  # checked: prices are uncertain only with trade
            trade = plan.trade.model_dump()
            for w, v in prices.items():
                trade[w] = dict(zip(trade[w], v.tolist(), strict=True))
            fields["trade"] = Trade(**trade)
        return Plan(**fields)


def _technique_columns(plan: Any) -> list[str]:
    """Technique keys of the plan's alternative techniques (cells of drawn intensities)."""
    return [tq.key for tq in plan.techniques if tq.key not in plan.economy.names]


# -- the analyses ---------------------------------------------------------------------------

@dataclass
class UncertaintyResult:
    """The outcome of :func:`stress_test` or :func:`reoptimise`.

    Attributes
    ----------
    table : pandas.DataFrame
        Tidy: one row per draw, quantity, year and name, with columns draw,
        status, quantity, year, name, value, error. Quantities:
        ``"feasible"`` (1 or 0), ``"objective"`` (stress test: the plan's
        objective reached with the kept starts and the least shortfall),
        ``"starts_cut"`` (stress test), ``"drawn"`` (the mean value drawn for each
        item, named ``"<k>: <what>"``), ``"objective"`` and the key figures
        (re-optimisation), ``"met"`` (1 or 0) and ``"shortfall"`` per
        condition (stress test), ``"output"``, ``"capacity"`` (per year and
        sector) and ``"shadow_price"`` (per year and commodity,
        re-optimisation). A draw that failed has one row with status
        ``"error"`` and the error.
    kind : {"stress_test", "reoptimise"}
    nominal : PlanResult or None
        The nominal plan's result (stress test: whose starts were kept).
    """

    table: pd.DataFrame
    kind: str
    nominal: Any = None

    @property
    def failed(self) -> pd.DataFrame:
        """Rows of draws that raised an error."""
        return self.table[self.table["status"] == "error"]

    @property
    def draws(self) -> int:
        """Number of draws (failed ones included)."""
        return int(self.table["draw"].nunique())

    def figures(self) -> pd.DataFrame:
        """One row per draw: status and the figures without a year (wide)."""
        t = self.table
        scalar = t[t["year"].isna() & (t["status"] != "error")]
        wide = scalar.pivot_table(index="draw", columns="name", values="value",
                                  aggfunc="first") if not scalar.empty else pd.DataFrame()
        status = t.groupby("draw")["status"].first()
        return pd.concat([status, wide], axis=1)

    def probability(self) -> pd.DataFrame:
        """Probability that the plan is feasible and that each condition is met.

        Draws that failed with an error are left out (``draws`` counts the
        rest). Returns condition, year, probability, draws and, for the
        stress test, the mean and 95th percentile of the shortfall.
        """
        t = self.table[self.table["status"] != "error"]
        met = t[t["quantity"].isin(["met", "feasible"])]
        g = met.groupby(["name", "year"], dropna=False, sort=False)["value"]
        out = pd.DataFrame({"probability": g.mean(), "draws": g.size()})
        short = t[t["quantity"] == "shortfall"].groupby(["name", "year"], dropna=False,
                                                       sort=False)["value"]
        if len(short):
            out["mean_shortfall"] = short.mean()
            out["shortfall_p95"] = short.quantile(0.95)
        return out.reset_index().rename(columns={"name": "condition"})

    def quantiles(self, quantity: str = "capacity", *, sector: str | None = None,
                  q: tuple[float, ...] = (0.05, 0.25, 0.5, 0.75, 0.95)) -> pd.DataFrame:
        """Quantiles over draws of a yearly quantity (summed over sectors unless one is named).

        Returns
        -------
        DataFrame with years as rows and the quantiles as columns.
        """
        t = self.table[(self.table["quantity"] == quantity) & (self.table["status"] != "error")]
        if t.empty:
            raise invalid("quantity", "be a yearly quantity of this table (output, capacity, "
                          "shadow_price)", quantity)
        if sector is not None:
            t = t[t["name"] == sector]
        per = t.groupby(["draw", "year"])["value"].sum().unstack("year")
        return per.quantile(list(q)).T.rename_axis(index="year", columns="quantile")


def _rows(draw: int, status: str,
          items: list[tuple[str, Any, str, float]]) -> list[tuple[Any, ...]]:
    return [(draw, status, q, y, n, float(v), "") for q, y, n, v in items]


def _error_row(draw: int, exc: BaseException | str) -> list[tuple[Any, ...]]:
    text = exc if isinstance(exc, str) else f"{type(exc).__name__}: {exc}"
    return [(draw, "error", "error", None, "", np.nan, text)]


def _drawn(spec: UncertaintySpec, plan: Plan, i: int) -> list[tuple[str, Any, str, float]]:
    return [("drawn", None, f"{k}: {item.what}", float(np.mean(v)))
            for k, (item, v) in enumerate(zip(spec.items, spec.values(plan, i), strict=True))]


def _paths(d: Any, output: np.ndarray, capacity: np.ndarray) -> list[tuple[str, Any, str, float]]:
    out: list[tuple[str, Any, str, float]] = []
    years = [*d.years, d.years[-1] + 1]
    for name, arr, ys in (("output", output, d.years), ("capacity", capacity, years)):
        for t, y in enumerate(ys):
            out.extend((name, y, s, arr[t, j]) for j, s in enumerate(d.names))
    return out


def fix_starts(lp: Any, starts: np.ndarray, *, ceiling: bool = False) -> Any:
    """``lp`` with its capacity starts fixed to ``starts`` (years × sectors).

    With ``ceiling=True`` the starts may fall short of ``starts`` (``0 ≤ z ≤
    starts``, within the plan's own ceilings): the economy builds what it can.
    """
    z = lp.cols["starts"]
    lo, up = lp.col_lower.copy(), lp.col_upper.copy()
    v = np.asarray(starts, dtype=float).ravel()
    if v.size != z.size:
        raise invalid("starts", f"hold {z.size} values (years × sectors)", f"{v.size} values")
    if ceiling:
        lo[z.start:z.stop] = 0.0
        up[z.start:z.stop] = np.minimum(up[z.start:z.stop], v)
    else:
        lo[z.start:z.stop] = up[z.start:z.stop] = v
    return lp.replace(col_lower=lo, col_upper=up)


def _elastic(lp: Any) -> tuple[Any, Any, list[dict[str, Any]]]:
    """Least total shortfall, then, holding it, the plan's own objective (its first stage)."""
    from ..backends.base import Status
    from ..backends.options import SolveOptions, highs_backend
    from ..results.diagnosis import elastic_program

    elastic, info = elastic_program(lp)
    solver = highs_backend(SolveOptions(method="simplex", tolerance=1e-9))
    out = solver.solve(elastic)
    if out.status is not Status.OPTIMAL or not np.any(lp.cost):
        return elastic, out, info
    f = float(elastic.cost @ out.x)
    held = elastic.add_rows("held_shortfall", sparse.csr_array(elastic.cost[None, :]),
                            np.array([-np.inf]), np.array([f + 1e-9 * max(1.0, f)]),
                            ("shortfall",))
    cost = np.concatenate([lp.cost, np.zeros(elastic.shape[1] - lp.shape[1])])
    again = solver.solve(held.replace(cost=cost, sense=lp.sense))
    return elastic, (again if again.status is Status.OPTIMAL else out), info


def _stress_one(plan: Plan, spec: UncertaintySpec, i: int,
                starts: np.ndarray) -> list[tuple[Any, ...]]:
    from ..backends.base import Status
    from ..lp.build import build
    from ..results.diagnosis import POSITIVE_SHARE

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        p = spec.draw(plan, i)
        d = p.lowered()
        lp = build(d)
        elastic, out, info = _elastic(fix_starts(lp, starts))
        cut = 0.0
        if out.status is Status.INFEASIBLE:  # the fixed starts cannot be supplied at all
            cut = 1.0
            elastic, out, info = _elastic(fix_starts(lp, starts, ceiling=True))
    if out.status is not Status.OPTIMAL:
        return [(i, out.status.value, "feasible", None, "plan", 0.0, "")] + \
            _rows(i, out.status.value, _drawn(spec, plan, i))
    share = elastic.cols["shortfall"].take(out.x)
    items = _drawn(spec, plan, i)
    any_short = False
    for rec, s in zip(info, share, strict=True):
        cname, sector, year = rec["condition"].shortfall_label(rec["label"])
        # the default labour kind is not named twice ("labour", not "labour labour")
        name = cname if sector == cname else f"{cname} {sector}".strip()
        short = s > POSITIVE_SHARE
        any_short |= bool(short)
        items.append(("met", year, name, 0.0 if short else 1.0))
        items.append(("shortfall", year, name, float(s * rec["unit"]) if short else 0.0))
    items.append(("feasible", None, "plan", 0.0 if any_short or cut else 1.0))
    items.append(("starts_cut", None, "starts_cut", cut))
    x = out.x[: lp.shape[1]]
    items.append(("objective", None, "objective", float(lp.cost @ x)))
    z = lp.cols["starts"].take(x)
    cap = (d.base.ravel() + lp.operators["capacity"] @ z.ravel()).reshape(d.T + 1, d.n)
    items.extend(_paths(d, lp.cols["output"].take(x), cap))
    return _rows(i, "met" if not (any_short or cut) else "short", items)


def _reopt_one(plan: Plan, spec: UncertaintySpec, i: int, options: dict[str, Any]
               ) -> list[tuple[Any, ...]]:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        p = spec.draw(plan, i)
        result = p.solve(**options)
    items = _drawn(spec, plan, i)
    figures = result.key_figures()
    status = figures.pop("status")
    items.append(("feasible", None, "plan", 1.0 if result.ok else 0.0))
    for k, v in figures.items():
        if isinstance(v, int | float | np.floating) and not isinstance(v, bool):
            items.append((k, None, k, float(v)))
    if result.ok:
        d = result.data
        items.extend(_paths(d, result.output.to_numpy(), result.capacity.to_numpy()))
        prices = result.shadow_prices.to_numpy()
        for t, y in enumerate(d.years):
            items.extend(("shadow_price", y, c, prices[t, j]) for j, c in enumerate(d.names))
    return _rows(i, status, items)


def _chunk(job: tuple[Any, ...]) -> list[tuple[Any, ...]]:
    """Run one chunk of draws (top level, so process pools and Dask can pickle it)."""
    fn_name, plan, spec, draws, extra = job
    fn: Any = {"stress": _stress_one, "reoptimise": _reopt_one}[fn_name]
    rows: list[tuple[Any, ...]] = []
    for i in draws:
        try:
            rows.extend(fn(plan, spec, i, extra))
        except Exception as exc:  # a failed draw is data, not the end of the analysis
            rows.extend(_error_row(i, exc))
    return rows


def _check_draws(draws: Any, field: str = "draws", most: int = MAX_DRAWS) -> int:
    """A count of draws within the library's limit, refused before anything is allocated."""
    if isinstance(draws, bool) or not isinstance(draws, int | np.integer) or draws < 1:
        raise invalid(field, "be a whole number >= 1", draws)
    if draws > most:
        raise invalid(field, f"be at most {most:,}", int(draws))
    return int(draws)



def _chunk_warm(task: tuple[str, list[int]]) -> list[tuple[Any, ...]]:
    """A chunk of draws of the analysis a pool worker was started with (by its key)."""
    from .sweep import _WARM

    key, draws = task
    kind, plan, spec, extra = _WARM[key]
    return _chunk((kind, plan, spec, draws, extra))


def _chunk_based(task: tuple[tuple[Any, ...], list[int]]) -> list[tuple[Any, ...]]:
    """A chunk of draws whose base (kind, plan, spec, extra) a Dask worker holds already."""
    (kind, plan, spec, extra), draws = task
    return _chunk((kind, plan, spec, draws, extra))


def _run(kind: str, plan: Plan, spec: UncertaintySpec, draws: int, extra: Any,
         executor: Executor | None, max_workers: int | None, chunk: int | None,
         progress: bool, in_flight: int | None = None) -> pd.DataFrame:
    """Run chunks of draws on an executor, results in draw order, failures as rows.

    The default process pool receives the plan, the spec and the extra data
    once per worker (its initializer); tasks then carry only draw numbers.
    At most ``in_flight`` chunks are out at a time (default four per worker).
    """
    from ..progress import sweep_progress
    from .sweep import (
        LOST,
        _scattered,
        _token,
        _warm,
        check_workers,
        in_order,
        owned_pool,
        worker_pool,
    )

    own = executor is None
    workers = check_workers(max_workers) or os.cpu_count() or 1
    if chunk is not None:
        chunk = _check_draws(chunk, "chunk")
    size = chunk or max(1, math.ceil(draws / (4 * workers)))
    groups = [list(range(s, min(s + size, draws))) for s in range(0, draws, size)]
    jobs = [(kind, plan, spec, g, extra) for g in groups]
    key = _token()
    if own:
        pool: Executor = worker_pool(workers, _warm, (key, (kind, plan, spec, extra)))
        fn: Any = _chunk_warm
        args: list[Any] = [(key, g) for g in groups]
    else:
        assert executor is not None
        pool, fn, args = executor, _chunk, jobs
        ref = _scattered(executor, (kind, plan, spec, extra))
        if ref is not None:  # a Dask cluster: the base sits on every worker once
            fn, args = _chunk_based, [(ref, g) for g in groups]
    parts: list[list[tuple[Any, ...]]] = [[] for _ in jobs]
    with owned_pool(pool, own), sweep_progress(progress, draws) as bar:
        for k, got in in_order(pool, fn, args, max(1, in_flight or 4 * workers)):
            if got is LOST:  # a worker died: each draw again, alone
                parts[k] = _alone(jobs[k], getattr(pool, "_mp_context", None))
            elif isinstance(got, BaseException):  # the executor failed on this chunk
                parts[k] = [r for i in groups[k] for r in _error_row(i, got)]
            else:
                parts[k] = got
            bar.update(len(groups[k]))
    rows = [r for part in parts for r in part]
    table = pd.DataFrame(rows, columns=COLUMNS)
    table["year"] = table["year"].astype("Int64")
    return table


def _alone(job: tuple[Any, ...], mp_context: Any) -> list[tuple[Any, ...]]:
    """Draws of a chunk whose pool broke, each in a fresh one-worker pool."""
    from .sweep import worker_pool

    kind, plan, spec, draws, extra = job
    rows: list[tuple[Any, ...]] = []
    for i in draws:
        with worker_pool(1, mp_context=mp_context) as pool:
            try:
                rows.extend(pool.submit(_chunk, (kind, plan, spec, [i], extra)).result())
            except BrokenProcessPool:
                rows.extend(_error_row(i, f"worker died while solving draw {i} (twice; the "
                                          "second time alone)"))
    return rows


def stress_test(plan: Plan, spec: UncertaintySpec, draws: int | None = None, *,
                nominal: Any = None, executor: Executor | None = None,
                max_workers: int | None = None, chunk: int | None = None,
                progress: bool = False, in_flight: int | None = None) -> UncertaintyResult:
    """What a fixed plan delivers in drawn economies.

    The capacity starts of the nominal plan are kept (the starts columns
    fixed); in each drawn economy the elastic re-solve of
    :mod:`growthplan.results.diagnosis` finds the least total shortfall (as
    shares of what each condition asks) of the targets, consumption floors,
    labour limits and terminal condition. When the drawn economy cannot
    even supply the capital goods of the fixed starts, the starts become
    ceilings (the economy builds what it can; ``starts_cut`` is 1).

    Parameters
    ----------
    plan : Plan
    spec : UncertaintySpec
    draws : int, optional
        Drawn economies (default ``spec.draws``).
    nominal : PlanResult, optional
        The solved nominal plan whose starts are kept (solved here when omitted).
    executor, max_workers, progress
        As for :func:`growthplan.scenarios.sweep` (default: a process pool).
    chunk : int, optional
        Draws per task (default: about four tasks per worker).
    in_flight : int, optional
        Most tasks sent and not yet collected (default four per worker), so
        memory here and in a Dask scheduler stays bounded. The default
        process pool receives the plan and the spec once per worker, when it
        starts; tasks carry only draw numbers.

    Returns
    -------
    UncertaintyResult
        ``result.probability()`` gives the probability that each condition
        is met and the distribution of shortfalls.
    """
    from ..model.technique import refuse_techniques

    refuse_techniques(plan, "stress tests")
    spec.check(plan)
    n = _check_draws(spec.draws if draws is None else draws)
    if nominal is None:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            nominal = plan.solve()
    nominal.raise_for_status()
    starts = nominal.starts.to_numpy()
    table = _run("stress", plan, spec, n, starts, executor, max_workers, chunk, progress,
                 in_flight)
    return UncertaintyResult(table, "stress_test", nominal)


def reoptimise(plan: Plan, spec: UncertaintySpec, draws: int | None = None, *,
               executor: Executor | None = None, max_workers: int | None = None,
               chunk: int | None = None, progress: bool = False,
               solve_options: dict[str, Any] | None = None,
               in_flight: int | None = None) -> UncertaintyResult:
    """The optimal plan of every drawn economy: objective, key figures and shadow prices.

    Parameters
    ----------
    plan : Plan
    spec : UncertaintySpec
    draws : int, optional
        Drawn economies (default ``spec.draws``).
    executor, max_workers, chunk, progress, in_flight
        As for :func:`stress_test`.
    solve_options : dict, optional
        Keywords for :meth:`Plan.solve`.

    Returns
    -------
    UncertaintyResult
        ``result.probability()`` holds the probability that the plan is
        feasible at all; ``result.quantiles("capacity")`` the fan of capacity.
    """
    from ..model.technique import refuse_techniques

    refuse_techniques(plan, "re-optimisation per draw")
    spec.check(plan)
    n = _check_draws(spec.draws if draws is None else draws)
    table = _run("reoptimise", plan, spec, n, dict(solve_options or {}), executor,
                 max_workers, chunk, progress, in_flight)
    return UncertaintyResult(table, "reoptimise")


# -- the robust plan ------------------------------------------------------------------------

@dataclass
class RobustPlan:
    """One set of starts meeting every condition in all the sampled economies.

    Attributes
    ----------
    status : Status
    starts : pandas.DataFrame or None
        Capacity starts, years × sectors (None unless optimal).
    objective : float
        The robust objective: the worst scenario objective (``criterion="worst"``)
        or their mean (``"mean"``).
    scenario_objectives : numpy.ndarray
        Each scenario's own objective with the robust starts fixed and its
        other decisions optimised (the nominal economy first when it was
        included); with ``"worst"`` the smallest (largest when minimising)
        equals ``objective`` within solver tolerance.
    nominal_objective : float
        Optimum of the nominal plan alone.
    cost : float
        Cost of robustness: how much worse the robust objective is than the
        nominal optimum (≥ 0 up to solver tolerance when the nominal economy
        is a scenario).
    plans : list of Plan
        The scenario plans.
    """

    status: Any
    starts: pd.DataFrame | None
    objective: float
    scenario_objectives: np.ndarray
    nominal_objective: float
    cost: float
    criterion: str
    plans: list[Any] = field(default_factory=list)
    lp: Any = None

    def check(self) -> pd.DataFrame:
        """Each scenario solved again with the robust starts fixed: its largest shortfall.

        Returns
        -------
        DataFrame with scenario, status and max_shortfall_share (0 when every
        condition holds).
        """
        from ..lp.build import build

        if self.starts is None:
            raise invalid("starts", "exist (the robust plan was not solved)", None)
        rows = []
        for s, p in enumerate(self.plans):
            lp = build(p.lowered(), objective=False)
            elastic, out, _ = _elastic(fix_starts(lp, self.starts.to_numpy()))
            share = elastic.cols["shortfall"].take(out.x) if out.x is not None and \
                out.x.size else np.array([np.nan])
            rows.append((s, out.status.value, float(share.max(initial=0.0))))
        return pd.DataFrame(rows, columns=["scenario", "status", "max_shortfall_share"])


def robust_plan(plan: Plan, spec: UncertaintySpec, scenarios: int = 20, *,
                criterion: Literal["worst", "mean"] = "worst", include_nominal: bool = True,
                nominal: Any = None, backend: Backend | None = None) -> RobustPlan:
    """One set of starts that meets every condition in each of ``scenarios`` drawn economies.

    The scenario LPs are stacked block-diagonally with one shared set of
    starts columns; every scenario keeps its own output, consumption, level
    and trade columns and all its conditions (targets, floors, labour
    limits) hold in each. With ``criterion="worst"`` (the default) the
    objective is the worst scenario objective (for the terminal-capacity
    objective: the smallest terminal level); ``"mean"`` optimises the mean
    of the scenario objectives instead.

    Parameters
    ----------
    plan : Plan
        A plan with a single-stage objective (not Lexicographic or Fastest).
    spec : UncertaintySpec
    scenarios : int, default 20
        Drawn economies (draws ``0..scenarios−1`` of the spec).
    include_nominal : bool, default True
        Add the nominal economy as a scenario, so the robust plan works if the
        nominal coefficients come true and its objective is at most the
        nominal optimum (when maximising).
    nominal : PlanResult, optional
        The solved nominal plan (solved here when omitted).
    backend : Backend, optional
        Default HiGHS.
    """
    from ..backends.base import Status
    from ..backends.options import default_backend
    from ..lp.build import build
    from ..model.technique import refuse_techniques

    refuse_techniques(plan, "robust plans")
    from ..lp.program import Block, LinearProgram
    from ..solve import run

    spec.check(plan)
    n_s = _check_draws(scenarios, "scenarios", MAX_ROBUST_SCENARIOS)
    if criterion not in ("worst", "mean"):
        raise invalid("criterion", "be 'worst' or 'mean'", criterion)
    if plan.objective.horizon_search() is not None:
        raise invalid("plan.objective", "have a fixed horizon (not Fastest) for a robust plan",
                      plan.objective.kind)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        plans = ([plan] if include_nominal else []) + [spec.draw(plan, i) for i in range(n_s)]
        if nominal is None:
            nominal = plan.solve(backend=backend)
    lps = [build(p.lowered()) for p in plans]
    if len(lps[0].stages) > 1:
        raise invalid("plan.objective", "have a single stage for a robust plan",
                      plan.objective.kind)
    sense = lps[0].sense
    z0 = lps[0].cols["starts"]
    nz = z0.size
    zidx = np.arange(z0.start, z0.stop)
    blocks_m, own_sizes, costs_z, costs_own = [], [], [], []
    col_lo, col_up = [np.full(nz, -np.inf)], [np.full(nz, np.inf)]
    for lp in lps:
        m = sparse.csc_array(lp.matrix)
        other = np.setdiff1d(np.arange(lp.shape[1]), zidx)
        blocks_m.append((m[:, zidx], m[:, other]))
        own_sizes.append(other.size)
        costs_z.append(lp.cost[zidx])
        costs_own.append(lp.cost[other])
        col_lo[0] = np.maximum(col_lo[0], lp.col_lower[zidx])
        col_up[0] = np.minimum(col_up[0], lp.col_upper[zidx])
        col_lo.append(lp.col_lower[other])
        col_up.append(lp.col_upper[other])
    S = len(lps)
    worst = criterion == "worst"
    grid: list[list[Any]] = []
    for s, (mz, mo) in enumerate(blocks_m):
        line: list[Any] = [mz] + [mo if k == s else None for k in range(S)]
        if worst:
            line.append(None)
        grid.append(line)
    if worst:
        # w ≤ c_s·v_s (maximising) or w ≥ c_s·v_s (minimising), one row per scenario
        sign = 1.0 if sense == "max" else -1.0
        for s in range(S):
            line = [sparse.csr_array(-sign * costs_z[s][None, :])]
            line += [sparse.csr_array(-sign * costs_own[s][None, :]) if k == s else None
                     for k in range(S)]
            line.append(sparse.csr_array(np.array([[sign]])))
            grid.append(line)
    # fill the empty cells of the first row and column so block_array knows their shapes
    for k in range(S):
        if grid[0][1 + k] is None:
            grid[0][1 + k] = sparse.csr_array((blocks_m[0][0].shape[0], own_sizes[k]))
    matrix = sparse.csc_array(sparse.block_array(grid, format="csc"))
    row_lo = [lp.row_lower for lp in lps]
    row_up = [lp.row_upper for lp in lps]
    if worst:
        col_lo.append(np.array([-np.inf]))
        col_up.append(np.array([np.inf]))
        cost = np.zeros(matrix.shape[1])
        cost[-1] = 1.0
        row_lo.append(np.full(S, -np.inf))
        row_up.append(np.zeros(S))
    else:
        cost = np.concatenate([sum(costs_z) / S] + [c / S for c in costs_own])
    cols = {"starts": Block("starts", 0, z0.shape, z0.labels)}
    start = nz
    for s in range(S):
        cols[f"scenario_{s}"] = Block(f"scenario_{s}", start, (own_sizes[s],),
                                      (tuple(range(own_sizes[s])),))
        start += own_sizes[s]
    if worst:
        cols["worst"] = Block("worst", start, (), ())
    rows, start = {}, 0
    for s, lp in enumerate(lps):
        rows[f"scenario_{s}"] = Block(f"scenario_{s}", start, (lp.shape[0],),
                                      (tuple(range(lp.shape[0])),))
        start += lp.shape[0]
    if worst:
        rows["worst"] = Block("worst", start, (S,), (tuple(range(S)),))
    stacked = LinearProgram(matrix=matrix, row_lower=np.concatenate(row_lo),
                            row_upper=np.concatenate(row_up), col_lower=np.concatenate(col_lo),
                            col_upper=np.concatenate(col_up), cost=cost, sense=sense,
                            rows=rows, cols=cols)
    out = run(stacked, backend or default_backend())
    scen = np.full(S, np.nan)
    starts = None
    objective = float("nan")
    if out.status is Status.OPTIMAL:
        z = out.x[:nz]
        starts = pd.DataFrame(z.reshape(z0.shape), index=pd.Index(z0.labels[0], name="year"),
                              columns=pd.Index(z0.labels[1], name="sector"))
        # each scenario's own objective with the robust starts (its other columns free)
        for s, lp in enumerate(lps):
            alone = run(fix_starts(lp, z), backend or default_backend())
            if alone.status is Status.OPTIMAL:
                scen[s] = float(alone.objective)
        objective = float(out.objective) if worst else float(scen.mean())
    nom = float(nominal.objective) if nominal.ok else float("nan")
    cost_r = (nom - objective) if sense == "max" else (objective - nom)
    return RobustPlan(status=out.status, starts=starts, objective=objective,
                      scenario_objectives=scen, nominal_objective=nom, cost=cost_r,
                      criterion=criterion, plans=plans, lp=stacked)
