"""The economy: sectors, coefficients and capital, validated once.

Conventions: ``a_ij`` is commodity ``i`` used up per unit of
output of sector ``j``; ``b_ij`` is commodity ``i`` embodied in one unit of new
annual capacity of sector ``j``; labour coefficients are person-years per unit
of output, one row per labour kind.
"""

from __future__ import annotations

import json
import warnings
from functools import cached_property
from typing import Any

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike
from pydantic import Field, PrivateAttr, field_validator, model_validator

from ..analysis import steady
from ..errors import TinyCoefficientsWarning, UnproductiveEconomy
from . import capital as cap
from .validation import (
    Matrix,
    Model,
    Rule,
    Vector,
    align_matrix,
    align_vector,
    check_distinct,
    check_label,
)

__all__ = ["Sector", "CapitalSpec", "Economy"]


class Sector(Model):
    """One producing sector: its name, the unit its commodity is measured in, its price.

    Parameters
    ----------
    name : str
        Sector name, non-empty (surrounding blanks are dropped).
    unit : str, optional
        Unit of the commodity and of the sector's output per year (``"GWh"``,
        ``"thousand tonnes"``). Default: the economy's ``value_unit``, for
        tables in money.
    price : float, default 1.0
        Base-year price: the value of one unit at base-year prices, in the
        economy's ``value_unit`` (1 where the table is in money). Every figure
        that adds sectors is valued with these prices, so it does not change
        when a sector's unit does (with its price scaled inversely).
    """

    name: str
    unit: str | None = None
    price: float = 1.0

    @field_validator("name")
    @classmethod
    def _name(cls, v: str) -> str:
        if not v.strip():
            raise Rule("be a non-empty name", v)
        return check_label(v.strip())

    @field_validator("price", mode="before")
    @classmethod
    def _price(cls, v: Any) -> Any:
        if isinstance(v, bool) or not isinstance(v, int | float | np.integer | np.floating) \
                or not (np.isfinite(v) and v > 0):
            raise Rule("be a finite price > 0 (the value of one unit at base-year prices)", v)
        return float(v)

    @field_validator("unit")
    @classmethod
    def _unit(cls, v: str | None) -> str | None:
        return check_label(v)


class CapitalSpec(Model):
    """Fixed capital of one sector.

    Parameters
    ----------
    initial_capacity : float
        Capacity in service in the first plan year (output per year), >= 0.
    mean_service_life : float
        Mean service life in years, >= 1.
    retirement : {"geometric", "sudden_exit", "linear", "weibull", "lognormal"}
        Retirement profile family (see :mod:`growthplan.model.capital`).
    shape : float, optional
        Weibull shape or lognormal σ.
    declining_balance : float, default 1.0
        Geometric profile only: ``δ = declining_balance / mean_service_life``.
    lead_time : int, default 1
        Whole years from a capacity start to service.
    spending_profile : list of float, optional
        Share of the capital goods delivered in each construction year,
        ``max(lead_time, 1)`` entries summing to 1. Default: spread evenly.
    max_utilisation : float, default 1.0
        Largest share of capacity that can be used, in (0, 1].
    past_growth : float, default 0.0
        Growth rate of past investment that gave today's age structure.
    investment_history : list of float, optional
        Capacity that entered service in past years, oldest first, the last in
        plan year 0; overrides ``past_growth`` (perpetual inventory).

    Notes
    -----
    Validation computes the survival profile, the survival of today's stock
    and the perpetual-inventory stock once and refuses the spec when any of
    them is not finite, so a NaN never reaches a plan. Lives are at most
    1000 years except for the geometric profile, lead times at most 100 years.
    With ``past_growth < 0`` the steady-state age structure weighs age ``a`` by
    ``S(a)(1+g0)^-a``; it is refused when that sum diverges (the profile's tail
    ratio ``lim S(a+1)/S(a)`` divided by ``1 + g0`` is 1 or more: any negative
    ``g0`` for the lognormal profile or a Weibull shape below 1) or when the
    ages beyond the profile's cut at 1e-12 would change it by more than 1e-9.
    The geometric profile is memoryless: today's age structure does not matter
    and ``past_growth`` is not used.
    """

    initial_capacity: float = Field(ge=0, allow_inf_nan=False)
    mean_service_life: float
    retirement: str = "geometric"
    shape: float | None = None
    declining_balance: float = 1.0
    _survival_cache: dict[int | None, np.ndarray] = PrivateAttr(default_factory=dict)
    lead_time: int = 1
    spending_profile: list[float] | None = None
    max_utilisation: float = 1.0
    past_growth: float = 0.0
    investment_history: list[float] | None = None

    @field_validator("mean_service_life", mode="before")
    @classmethod
    def _life(cls, v: Any) -> Any:
        if not _is_number(v) or not np.isfinite(v) or v < 1:
            raise Rule("be a number of years >= 1", v)
        return v

    @field_validator("retirement")
    @classmethod
    def _profile(cls, v: str) -> str:
        if v not in cap.PROFILES:
            raise Rule(f"be one of {', '.join(cap.PROFILES)}", v)
        return v

    @field_validator("lead_time", mode="before")
    @classmethod
    def _lead(cls, v: Any) -> Any:
        if isinstance(v, bool) or not _is_number(v) or not np.isfinite(v) or v < 0 or v != int(v):
            raise Rule("be a whole number of years >= 0", v)
        if v > cap.MAX_LEAD_TIME:  # before the default spending profile is allocated
            raise Rule(f"be at most {cap.MAX_LEAD_TIME} years", v)
        return int(v)

    @field_validator("max_utilisation", mode="before")
    @classmethod
    def _util(cls, v: Any) -> Any:
        if not _is_number(v) or not (0 < v <= 1):
            raise Rule("be in (0, 1]", v)
        return v

    @field_validator("past_growth", "declining_balance", mode="before")
    @classmethod
    def _finite(cls, v: Any) -> Any:
        if not _is_number(v) or not np.isfinite(v) or v <= -1:
            raise Rule("be a finite number > -1", v)
        return v

    @model_validator(mode="after")
    def _consistent(self) -> CapitalSpec:
        n = max(self.lead_time, 1)
        if self.spending_profile is None:
            object.__setattr__(self, "spending_profile", [1.0 / n] * n)
        w = np.asarray(self.spending_profile, dtype=float)
        if w.size != n:
            raise Rule(f"have max(lead_time, 1) = {n} entries", self.spending_profile,
                       field="spending_profile")
        if not np.all(np.isfinite(w)) or np.any(w < 0) or abs(w.sum() - 1) > 1e-9:
            raise Rule("hold non-negative shares summing to 1", self.spending_profile,
                       field="spending_profile")
        if self.retirement == "geometric" and self.declining_balance <= 0:
            raise Rule("be > 0", self.declining_balance, field="declining_balance")
        if self.shape is not None and not (np.isfinite(self.shape) and self.shape > 0):
            raise Rule("be > 0", self.shape, field="shape")
        if self.retirement != "geometric" and self.mean_service_life > cap.MAX_LIFE:
            raise Rule(f"be at most {cap.MAX_LIFE:g} years for the {self.retirement} profile "
                       "(its arrays grow with the life)", self.mean_service_life,
                       field="mean_service_life")
        if self.investment_history is not None:
            h = np.asarray(self.investment_history, dtype=float)
            if h.size == 0 or not np.all(np.isfinite(h)) or np.any(h < 0):
                raise Rule("be a non-empty list of non-negative numbers",
                           self.investment_history, field="investment_history")
            if h.size > cap.MAX_AGE:
                raise Rule(f"cover at most {cap.MAX_AGE} years", f"{h.size} years",
                           field="investment_history")
        self._check_finite()
        return self

    def _check_finite(self) -> None:
        """Every derived capital array is finite, or the spec is refused."""
        s = self.survival()
        if not (np.all(np.isfinite(s)) and s.size and s[0] == 1.0):
            raise Rule("give a finite survival profile", self.mean_service_life,
                       field="mean_service_life")
        if self.investment_history is not None:
            h = np.asarray(self.investment_history[::-1], dtype=float)[: s.size]
            with np.errstate(over="ignore", invalid="ignore"):
                stock = float(np.sum(s[: h.size] * h))
            if not np.isfinite(stock):
                raise Rule("give a finite perpetual-inventory stock (the surviving sum of "
                           "its vintages overflows)", self.investment_history,
                           field="investment_history")
        r = self.initial_survival(1)  # raises InvalidInput naming past_growth or the history
        if not np.all(np.isfinite(r)):
            raise Rule("give a finite survival of today's stock", self.past_growth,
                       field="past_growth")

    def survival(self, max_age: int | None = None) -> np.ndarray:
        """Survival profile ``S(a)`` of new vintages (computed once per ``max_age``, read-only).

        Parameters
        ----------
        max_age : int, optional
            Last age of the array, padded with zeros or cut; default: where
            the profile ends (below 1e-12).

        Returns
        -------
        numpy.ndarray
            Share of a vintage still in service at ages ``0, 1, …``.
        """
        # the spec is frozen, so its profile never changes: keep it (the balanced-growth
        # search and the plan's lowering ask for it many times)
        cache = self._survival_cache
        if max_age not in cache:
            prof = cap.survival(self.retirement, self.mean_service_life, shape=self.shape,
                                declining_balance=self.declining_balance, max_age=max_age)
            prof.setflags(write=False)
            cache[max_age] = prof
        return cache[max_age]

    def initial_survival(self, horizon: int) -> np.ndarray:
        """Share of the initial capacity still in service in years ``0..horizon``.

        Parameters
        ----------
        horizon : int
            Last plan year.

        Returns
        -------
        numpy.ndarray
            ``horizon + 1`` shares, from the age structure given by
            ``investment_history`` or ``past_growth``.
        """
        hist = None if self.investment_history is None else np.asarray(self.investment_history)
        if self.retirement == "geometric" and hist is None:  # memoryless: age does not matter
            return (1.0 - self.declining_balance / self.mean_service_life) ** np.arange(
                horizon + 1, dtype=float)
        return cap.initial_survival(
            self.survival(), horizon, past_growth=self.past_growth, history=hist,
            tail=cap.tail_ratio(self.retirement, self.mean_service_life, shape=self.shape,
                                declining_balance=self.declining_balance))

    def _per_capacity(self, g: float) -> tuple[float, float]:
        geometric = self.retirement == "geometric"
        return cap.starts_per_capacity(
            None if geometric else self.survival(), g, lead_time=self.lead_time,
            spending=np.asarray(self.spending_profile),
            delta=self.declining_balance / self.mean_service_life if geometric else None)

    def starts_per_capacity(self, g: float) -> float:
        """Capacity starts per unit of capacity on a path growing at ``g``.

        Parameters
        ----------
        g : float
            Growth rate per year of the balanced path.

        Returns
        -------
        float
            Starts that keep capacity growing at ``g`` after retirements.
        """
        return self._per_capacity(g)[0]

    def deliveries_per_capacity(self, g: float) -> float:
        """Capital goods delivered per unit of capacity on a path growing at ``g``.

        Parameters
        ----------
        g : float
            Growth rate per year of the balanced path.

        Returns
        -------
        float
            Deliveries spread over the lead time by the spending profile
            (``g + δ`` for geometric retirement and a one-year lead time).
        """
        return self._per_capacity(g)[1]


def _is_number(v: Any) -> bool:
    return isinstance(v, int | float | np.integer | np.floating) and not isinstance(v, bool)


class Economy(Model):
    """A multi-sector economy: sectors, input, capital and labour coefficients, capital.

    Parameters
    ----------
    sectors : list of str or Sector
        Unique sector names (each sector produces one commodity).
    input_coefficients : array_like or DataFrame, shape (n, n)
        ``A``; a DataFrame is aligned to ``sectors`` by its labels.
    capital_coefficients : array_like or DataFrame, shape (n, n), optional
        ``B``; zeros when omitted.
    labour_coefficients : array_like, Series or DataFrame, shape (k, n), optional
        One row per labour kind (a 1-D array or Series is one kind).
    labour_kinds : list of str, optional
        Names of the labour kinds (default ``["labour"]`` or the DataFrame index).
    capital : dict of str to CapitalSpec, optional
        Capital of every sector; needed for planning and dynamic growth.
    consumption_basket : array_like or Series, optional
        Commodities per unit of the plan's consumption level.
    wage_basket : array_like or Series, optional
        Commodities consumed per person-year of labour (closes the model).
    value_unit : str, default "money at base-year prices"
        Unit of values (a currency at base-year prices, e.g. "million ARV at
        2025 prices"); also the unit of sectors given without one.
    labour_units : list of str, optional
        Unit of each labour kind (default "person-years").
    base_output : array_like or Series, optional
        Gross output of the base year (the transactions table's), by sector;
        kept by :meth:`from_tables` so a plan's first year can be compared
        with where the economy is (``PlanResult.calibration``).

    Notes
    -----
    Input, capital and labour coefficients below :data:`TINY_COEFFICIENT`
    (1e-12) times the largest entry of their column (the same sector) are set
    to zero with a :class:`~growthplan.errors.TinyCoefficientsWarning` naming
    the first ten cells: they are far below the LP solver's tolerances and
    could make it misjudge a plan. The caller's arrays are never changed.

    Examples
    --------
    >>> econ = Economy(sectors=["farm", "mill"],
    ...                input_coefficients=[[0.15, 0.25], [0.20, 0.05]])
    >>> econ.leontief_inverse().round(6).to_numpy().tolist()
    [[1.254125, 0.330033], [0.264026, 1.122112]]
    """

    sectors: list[Sector]
    input_coefficients: Matrix
    capital_coefficients: Matrix | None = None
    labour_coefficients: Matrix | None = None
    labour_kinds: list[str] | None = None
    capital: dict[str, CapitalSpec] | None = None
    consumption_basket: Vector | None = None
    wage_basket: Vector | None = None
    value_unit: str = "money at base-year prices"
    labour_units: list[str] | None = None
    base_output: Vector | None = None

    @model_validator(mode="before")
    @classmethod
    def _align(cls, data: Any) -> Any:
        if not isinstance(data, dict):
            return data
        data = dict(data)
        raw = data.get("sectors")
        if raw is None:
            return data
        if isinstance(raw, str | bytes) or not hasattr(raw, "__iter__"):
            raise Rule("be a list of sector names", raw, field="sectors")
        if any(isinstance(s, str) and not s.strip() for s in raw):
            raise Rule("be non-empty names", list(raw), field="sectors")
        for i, s in enumerate(raw):
            if isinstance(s, str):
                check_label(s.strip(), f"sectors.{i}")
        sectors = [Sector(name=s) if isinstance(s, str) else s for s in raw]
        names: list[Any] = [s.name if isinstance(s, Sector) else
                            (s.get("name") if isinstance(s, dict) else s) for s in sectors]
        data["sectors"] = sectors
        if not names:
            raise Rule("name at least one sector", raw, field="sectors")
        if any(not isinstance(x, str) for x in names):
            raise Rule("be a list of text names", names, field="sectors")
        stripped = [str(x).strip() for x in names]
        if len(set(stripped)) != len(stripped):
            dup = sorted({x for x in stripped if stripped.count(x) > 1})
            raise Rule("be unique", dup, field="sectors")
        check_distinct(stripped, "sectors")
        names = stripped
        for key in ("input_coefficients", "capital_coefficients"):
            if key in data:
                data[key] = align_matrix(data[key], names, key)
        lab = data.get("labour_coefficients")
        if isinstance(lab, pd.Series):
            data.setdefault("labour_kinds", [str(lab.name) if lab.name is not None
                                             else "labour"])
            lab = align_vector(lab, names, "labour_coefficients")
        elif isinstance(lab, pd.DataFrame):
            kinds = data.get("labour_kinds") or [str(k) for k in lab.index]
            data["labour_kinds"] = kinds
            lab = align_matrix(lab, names, "labour_coefficients", rows=kinds)
        if lab is not None:
            arr = np.asarray(lab, dtype=object)
            if arr.ndim == 1:
                lab = [list(arr)]
            data["labour_coefficients"] = lab
        for key in ("consumption_basket", "wage_basket", "base_output"):
            if key in data:
                data[key] = align_vector(data[key], names, key)
        capital = data.get("capital")
        if isinstance(capital, dict):
            unknown = [k for k in capital if k not in names]
            missing = [k for k in names if k not in capital]
            if unknown or missing:
                raise Rule("name every sector once (missing "
                           f"{missing}; unknown {unknown})", sorted(capital), field="capital")
            data["capital"] = {k: capital[k] for k in names}
        return data

    @model_validator(mode="after")
    def _check(self) -> Economy:
        n = len(self.sectors)
        a = self.input_coefficients
        if a.shape != (n, n):
            raise Rule(f"be square with one row and column per sector ({n}×{n})",
                       f"shape {a.shape}", field="input_coefficients")
        _nonneg(a, "input_coefficients", self.names)
        object.__setattr__(self, "input_coefficients",
                           _drop_tiny(a, "input_coefficients", self.names, self.names,
                                      self.prices))
        b = self.capital_coefficients
        if b is None:
            b = np.zeros((n, n))
            b.setflags(write=False)
            object.__setattr__(self, "capital_coefficients", b)
        if b.shape != (n, n):
            raise Rule(f"be square with one row and column per sector ({n}×{n})",
                       f"shape {b.shape}", field="capital_coefficients")
        _nonneg(b, "capital_coefficients", self.names)
        object.__setattr__(self, "capital_coefficients",
                           _drop_tiny(b, "capital_coefficients", self.names, self.names,
                                      self.prices))
        lab = self.labour_coefficients
        if lab is not None:
            if lab.ndim != 2 or lab.shape[1] != n:
                raise Rule(f"have one column per sector ({n})", f"shape {lab.shape}",
                           field="labour_coefficients")
            kinds = self.labour_kinds or (["labour"] if lab.shape[0] == 1 else
                                          [f"labour_{i}" for i in range(lab.shape[0])])
            _nonneg(lab, "labour_coefficients", self.names, [str(k) for k in kinds])
            if len(kinds) != lab.shape[0] or len(set(kinds)) != len(kinds):
                raise Rule(f"name each of the {lab.shape[0]} labour kinds once", kinds,
                           field="labour_kinds")
            for i, kind in enumerate(kinds):
                check_label(kind, f"labour_kinds.{i}")
            check_distinct([str(k) for k in kinds], "labour_kinds")
            object.__setattr__(self, "labour_kinds", list(kinds))
            object.__setattr__(self, "labour_coefficients",
                               _drop_tiny(lab, "labour_coefficients", list(kinds), self.names))
        elif self.labour_kinds:
            raise Rule("come with labour_coefficients", self.labour_kinds,
                       field="labour_kinds")
        if self.labour_units is not None:
            k = len(self.labour_kinds or [])
            if len(self.labour_units) != k or any(not str(u).strip()
                                                  for u in self.labour_units):
                raise Rule(f"give one non-empty unit per labour kind ({k})", self.labour_units,
                           field="labour_units")
        if not self.value_unit.strip():
            raise Rule("be a non-empty unit", self.value_unit, field="value_unit")
        check_label(self.value_unit, "value_unit")
        for i, u in enumerate(self.labour_units or []):
            check_label(u, f"labour_units.{i}")
        for key in ("consumption_basket", "wage_basket", "base_output"):
            v = getattr(self, key)
            if v is not None:
                if v.shape != (n,):
                    raise Rule(f"have one entry per sector ({n})", f"shape {v.shape}",
                               field=key)
                _nonneg(v, key, self.names)
        if self.wage_basket is not None and self.labour_coefficients is None:
            raise Rule("come with labour_coefficients (it closes the model through labour)",
                       "wage_basket", field="wage_basket")
        self._check_productive()
        return self

    def _check_productive(self) -> None:
        a = self.input_coefficients
        colsum = a.sum(axis=0)
        if colsum.size and colsum.max() < 1.0:
            return  # ρ(A) <= max column sum < 1: productive, no eigen-solve needed
        rho = steady.spectral_radius(a)
        if rho >= 1.0 - 1e-12:
            bad = [self.names[j] for j in np.nonzero(colsum >= 1.0)[0]]
            detail = (f" Sectors whose input coefficients sum to 1 or more: {bad}." if bad
                      else " No single column sums to 1; the cycle of inputs among sectors "
                      "uses up more than it makes.")
            raise UnproductiveEconomy(
                f"input_coefficients must describe a productive economy (spectral radius "
                f"< 1). Got spectral radius {rho:.6f}.{detail}",
                spectral_radius=rho, sectors=bad)

    # -- labels ---------------------------------------------------------------
    @property
    def names(self) -> list[str]:
        """Sector names in order."""
        return [s.name for s in self.sectors]

    @property
    def n(self) -> int:
        """Number of sectors."""
        return len(self.sectors)

    @property
    def units(self) -> list[str]:
        """Unit of each sector's commodity (the value unit where none is given)."""
        return [s.unit or self.value_unit for s in self.sectors]

    @property
    def prices(self) -> np.ndarray:
        """Base-year price of one unit of each commodity, in ``value_unit``."""
        return np.array([s.price for s in self.sectors], dtype=float)

    @property
    def labour_unit_names(self) -> list[str]:
        """Unit of each labour kind ("person-years" unless given)."""
        kinds = self.labour_kinds or []
        return list(self.labour_units) if self.labour_units else ["person-years"] * len(kinds)

    def _frame(self, m: np.ndarray, rows: list[str] | None = None) -> pd.DataFrame:
        return pd.DataFrame(m, index=pd.Index(rows or self.names), columns=pd.Index(self.names))

    @property
    def A(self) -> pd.DataFrame:  # noqa: N802 (the trade's symbol)
        """Input coefficients as a labelled DataFrame."""
        return self._frame(np.array(self.input_coefficients))

    @property
    def B(self) -> pd.DataFrame:  # noqa: N802
        """Capital coefficients as a labelled DataFrame."""
        return self._frame(np.array(self.capital_coefficients))

    # -- steady state -----------------------------------------------------------
    @cached_property
    def _leontief(self) -> np.ndarray:
        return steady.leontief_inverse(np.asarray(self.input_coefficients))

    def spectral_radius(self) -> float:
        """Spectral radius ``ρ(A)`` of the input coefficients.

        Returns
        -------
        float
        """
        return steady.spectral_radius(np.asarray(self.input_coefficients))

    def hawkins_simon(self) -> pd.Series:
        """Leading principal minors of ``I − A`` (all positive for a productive economy).

        Returns
        -------
        pandas.Series
            The minor of order ``k``, labelled by the ``k``-th sector.
        """
        _, minors = steady.hawkins_simon(np.asarray(self.input_coefficients))
        return pd.Series(minors, index=pd.Index(self.names[: len(minors)], name="up to"),
                         name="minor")

    def leontief_inverse(self) -> pd.DataFrame:
        """``(I − A)^-1``: gross output of each row sector per unit of final demand.

        Returns
        -------
        pandas.DataFrame
            Sectors × sectors.
        """
        return self._frame(self._leontief.copy())

    def output_multipliers(self) -> pd.Series:
        """Column sums of the Leontief inverse (simple output multipliers).

        Returns
        -------
        pandas.Series
            One multiplier per sector.
        """
        return pd.Series(self._leontief.sum(axis=0), index=pd.Index(self.names),
                         name="output_multiplier")

    def required_output(self, final_demand: pd.Series | ArrayLike) -> pd.Series:
        """Gross output ``x = (I − A)^-1 f`` that delivers final demand ``f``.

        Parameters
        ----------
        final_demand : array_like or Series, shape (n,)
            Final demand by commodity; a Series is aligned to the sectors.

        Returns
        -------
        pandas.Series
            Gross output by sector.
        """
        f = np.asarray(align_vector(final_demand, self.names, "final_demand"), dtype=float)
        return pd.Series(self._leontief @ f, index=pd.Index(self.names), name="output")

    def labour_content(self) -> pd.DataFrame:
        """Vertically integrated labour coefficients ``v = l (I − A)^-1`` (kinds × sectors).

        Returns
        -------
        pandas.DataFrame
        """
        if self.labour_coefficients is None:
            raise Rule("be given to compute labour content", None, field="labour_coefficients")
        return self._frame(self.labour_coefficients @ self._leontief, rows=self.labour_kinds)

    def balanced_growth(self, *, method: str = "eigen", closed: bool | None = None,
                        tol: float = 1e-12, max_iter: int = 100_000) -> steady.BalancedGrowth:
        """Maximal balanced growth of the (open or closed) static model.

        Without a wage basket ``M = A``; with one (or ``closed=True``) the model
        is closed through labour, ``M = [[A, h_w], [l, 0]]``. The growth factor
        is ``1/ρ(M)`` and the proportions are the Perron vector of ``M``.

        Parameters
        ----------
        method : {"eigen", "power"}
            A direct eigen-solver (sparse ARPACK above 400 sectors) or the
            damped power iteration.
        closed : bool, optional
            Close the model through labour (default: when a wage basket is given).
        tol, max_iter
            Convergence tolerance and step limit of the power iteration.

        Returns
        -------
        BalancedGrowth
            Growth rate, proportions (with ``households`` last in the closed
            model) and notes on the structure.
        """
        use_closed = self.wage_basket is not None if closed is None else closed
        a = np.asarray(self.input_coefficients)
        names = list(self.names)
        if use_closed:
            if self.wage_basket is None or self.labour_coefficients is None:
                raise Rule("be given for a closed model", None, field="wage_basket")
            labour = self.labour_coefficients.sum(axis=0)
            n = self.n
            m = np.zeros((n + 1, n + 1))
            m[:n, :n] = a
            m[:n, n] = self.wage_basket
            m[n, :n] = labour
            names.append("households")
        else:
            m = a
        irreducible, period = steady.structure(m)
        rho, v, used, it, res, unique = steady.perron(m, method=method, tol=tol,
                                                      max_iter=max_iter)
        notes = []
        if not irreducible:
            notes.append("reducible: some sectors do not feed all others; proportions may "
                         "have zeros")
        if not unique:
            notes.append("not unique: the Perron root is repeated (independent parts grow "
                         "at the same limit); these proportions are one balanced ray of many")
        if period > 1:
            notes.append(f"periodic with period {period}: the plain power iteration "
                         "would oscillate; the damped one converges")
        if rho <= 0:
            raise steady.NoBalancedGrowth("The matrix is nilpotent (spectral radius 0): "
                                          "growth is not limited by inputs.")
        return steady.BalancedGrowth(
            rate=1.0 / rho - 1.0, factor=1.0 / rho,
            proportions=pd.Series(v, index=pd.Index(names), name="proportion"),
            spectral_radius=rho, method=used, iterations=it, residual=res,
            irreducible=irreducible, period=period, notes=notes, unique=unique)

    def dynamic_balanced_growth(self) -> steady.BalancedGrowth:
        """Balanced growth of the dynamic Leontief model with capital replacement.

        Finds the largest ``g`` such that output ``x`` covers current inputs and
        the capital goods for capacity growing at ``g`` and replacing what
        retires: ``x = A x + B K(g) U⁻¹ x``. With geometric retirement and
        one-year lead times this is ``(I − A − BD) x = g B x``, so
        ``g = 1/ρ((I − A − BD)^-1 B)``.

        Returns
        -------
        BalancedGrowth
            Growth rate (method ``"root"``) and output proportions.
        """
        if self.capital is None:
            raise Rule("be given for dynamic balanced growth", None, field="capital")
        specs = [self.capital[s] for s in self.names]
        util = np.array([c.max_utilisation for c in specs])
        # in value terms (p_i m_ij / p_j) the matrices do not depend on the units the
        # sectors are measured in, so neither does the accuracy of the eigen-solver
        p = self.prices
        a_v = p[:, None] * np.asarray(self.input_coefficients) / p[None, :]
        b_v = p[:, None] * np.asarray(self.capital_coefficients) / p[None, :]
        g, v_value = steady.dynamic_growth(a_v, b_v, [c.deliveries_per_capacity for c in specs],
                                           util)
        v = v_value / p
        v = v / v.sum() if v.sum() > 0 else v
        irreducible, period = steady.structure(
            np.asarray(self.input_coefficients) + np.asarray(self.capital_coefficients))
        return steady.BalancedGrowth(
            rate=g, factor=1.0 + g, proportions=pd.Series(v, index=pd.Index(self.names),
                                                           name="proportion"),
            spectral_radius=1.0 / (1.0 + g) if g > -1 else float("inf"), method="root",
            irreducible=irreducible, period=period)

    # -- files ------------------------------------------------------------------
    def to_json(self, **kwargs: Any) -> str:
        """JSON text that :meth:`from_json` reads back to an equal economy.

        Parameters
        ----------
        **kwargs
            Passed to pydantic's ``model_dump_json`` (``indent``, …).

        Returns
        -------
        str
        """
        return self.model_dump_json(**kwargs)

    @classmethod
    def from_json(cls, text: str | bytes) -> Economy:
        """Read an economy from :meth:`to_json` text.

        Parameters
        ----------
        text : str or bytes
            JSON text of an economy.

        Returns
        -------
        Economy
        """
        return cls.model_validate_json(text)

    @classmethod
    def json_schema(cls) -> dict[str, Any]:
        """JSON Schema of the economy description.

        Returns
        -------
        dict
        """
        return cls.model_json_schema()

    @classmethod
    def from_flows(cls, flows: pd.DataFrame | ArrayLike, gross_output: pd.Series | ArrayLike,
                   labour: pd.Series | pd.DataFrame | ArrayLike | None = None, *,
                   final_demand: pd.Series | pd.DataFrame | ArrayLike | None = None,
                   value_added: pd.Series | ArrayLike | None = None,
                   **kwargs: Any) -> Economy:
        """Build an economy from a transactions table in flows.

        ``a_ij = z_ij / x_j`` and ``l_j = labour_j / x_j``; the remaining keywords
        go to :meth:`TransactionsTable.to_economy` (``capital``,
        ``capital_coefficients``, ``capital_stocks``) and to the economy.

        Parameters
        ----------
        flows : DataFrame or array_like, shape (n, n)
            Intermediate use ``z_ij`` of commodity ``i`` by sector ``j``.
        gross_output : Series or array_like
            Gross output ``x_j``; every entry > 0.
        labour : Series, DataFrame (kinds × sectors) or array_like, optional
            Labour input in person-years.
        final_demand : Series or DataFrame, optional
            Final demand by commodity (validated; the economy does not keep it).
        value_added : Series, optional
            Value added by sector (likewise).
        **kwargs
            Capital keywords of :meth:`TransactionsTable.to_economy` and
            further economy fields.

        Returns
        -------
        Economy
        """
        from ..statistics.tables import TransactionsTable

        table = TransactionsTable(flows, gross_output, labour, final_demand=final_demand,
                                  value_added=value_added)
        return table.to_economy(**kwargs)

    @classmethod
    def from_tables(cls, flows: Any, *, capital: Any = None, capital_coefficients: Any = None,
                    capital_stocks: Any = None, **kwargs: Any) -> Economy:
        """Build an economy from table files (CSV or Excel) or DataFrames.

        See :mod:`growthplan.statistics.tables` for the layout of each table.

        Parameters
        ----------
        flows : DataFrame, str or path-like
            The transactions table (flows, ``gross_output`` row, optional
            labour rows and final-demand columns).
        capital : DataFrame, str or path-like, optional
            The capital table, one row per sector.
        capital_coefficients : DataFrame, str or path-like, optional
            ``B``, commodities × sectors.
        capital_stocks : DataFrame, str or path-like, optional
            Capital stocks, commodities × sectors, divided by capacity into ``B``.
        **kwargs
            Further economy fields.

        Returns
        -------
        Economy
        """
        from ..statistics.tables import read_frame, read_transactions

        table = read_transactions(flows)
        return table.to_economy(
            capital=None if capital is None else read_frame(capital, what="capital"),
            capital_coefficients=None if capital_coefficients is None else read_frame(
                capital_coefficients, what="capital_coefficients"),
            capital_stocks=capital_stocks, **kwargs)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Economy):
            return NotImplemented
        return json.loads(self.to_json()) == json.loads(other.to_json())

    def __hash__(self) -> int:
        return hash(self.to_json())

    def __str__(self) -> str:
        return self.__repr__()

    def __repr__(self) -> str:
        return f"Economy({self.n} sectors: {', '.join(self.names[:6])}{'…' if self.n > 6 else ''})"


TINY_COEFFICIENT = 1e-12  # relative to the largest entry of the same column


def _drop_tiny(m: np.ndarray, field: str, rows: list[str], cols: list[str],
               row_prices: np.ndarray | None = None) -> np.ndarray:
    """A read-only copy of ``m`` without entries negligible next to their column.

    With ``row_prices`` (the base-year price of each row's commodity) entries
    are compared as values, ``p_i m_ij``, so the rule does not depend on the
    units commodities are measured in.
    """
    if m.size == 0:
        return m
    valued = m if row_prices is None else m * row_prices[:, None]
    top = valued.max(axis=0)
    tiny = (m > 0) & (valued < TINY_COEFFICIENT * top[None, :])
    if not tiny.any():
        return m
    out = m.copy()
    out[tiny] = 0.0
    out.setflags(write=False)
    cells = np.argwhere(tiny)
    listed = ", ".join(f"[{rows[i]}, {cols[j]}] = {m[i, j]:.3g}" for i, j in cells[:10])
    more = f" and {len(cells) - 10} more" if len(cells) > 10 else ""
    warnings.warn(f"{field}: {len(cells)} entries below {TINY_COEFFICIENT:g} times the "
                  f"largest entry of their column were set to zero (row, sector): {listed}{more}.",
                  TinyCoefficientsWarning, stacklevel=2)
    return out


def _nonneg(m: np.ndarray, field: str, names: list[str],
            rows: list[str] | None = None) -> None:
    """Refuse a negative entry, naming its cell by labels: ``field[row, sector]``.

    ``names`` label the last axis (sectors); ``rows`` the first axis of a
    matrix (commodities, the same names, by default; labour kinds for labour).
    """
    if np.any(m < 0):
        pos = np.argwhere(m < 0)[0]
        labels = [names] if m.ndim == 1 else [names if rows is None else rows, names]
        where = ", ".join(str(lab[p]) if p < len(lab) else str(p)
                          for lab, p in zip(labels, pos, strict=False))
        raise Rule("be >= 0", float(m[tuple(pos)]), field=f"{field}[{where}]")
