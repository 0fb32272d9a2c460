"""Satellite accounts: emissions and natural resources per unit of activity, and their limits.

A :class:`Stressor` is anything an activity puts out or draws on besides
commodities and labour: a gas (tonnes of CO₂), energy (terajoules), water
(cubic metres), land (hectares). Its *intensity* is the amount per unit of
output of a sector or of one technique, and ``households`` the amount per
unit of the consumption level (direct emissions of households). An
:class:`Impact` adds stressors with stated factors (a characterisation:
gases into tonnes of CO₂-equivalent).

Emissions of plan year ``t`` of stressor ``s`` are
``e_st = Σ_k S_skt x_kt + h_s κ_t`` (``k`` the techniques, ``κ_t`` the
consumption level); an impact's are ``Σ_s c_s e_st``. A plan may limit them
(:class:`Cap`, :class:`Budget`, :class:`IntensityCeiling`); a ceiling on a
resource's use is a :class:`Cap` on that stressor.

Intensities may change at a yearly rate by sector (``rate``). With embodied
technical change (``TechnicalChange(embodied=True)``) the intensity goes
with the vintage: capacity started in year ``τ`` keeps the intensity of
year ``τ`` for its whole life, the capacity from before the plan the base
year's; otherwise the change is disembodied (all capacity of a sector emits
at year ``t``'s intensity).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Literal

import numpy as np
from pydantic import Field, field_validator, model_validator

from .validation import Model, Rule, check_distinct, check_label

if TYPE_CHECKING:
    from .technique import TechniqueSet

__all__ = ["Stressor", "Impact", "Satellite", "Cap", "Budget", "IntensityCeiling", "Limit",
           "MAX_AMOUNT", "limits_over"]

MAX_AMOUNT = 1e15  # larger intensities, factors and limits are refused as absurd


def _amounts(v: dict[str, float], what: str) -> dict[str, float]:
    bad = {k: a for k, a in v.items()
           if isinstance(a, bool) or not (np.isfinite(a) and 0 <= a <= MAX_AMOUNT)}
    if bad:
        raise Rule(f"hold finite {what} >= 0 and at most {MAX_AMOUNT:g}", bad)
    return v


def _name(v: str) -> str:
    """A stressor's or an impact's name or unit: non-empty, safe in every export."""
    if not v.strip():
        raise Rule("be a non-empty name", v)
    return check_label(v)


class Stressor(Model):
    """One emission or natural resource, with its unit and intensities.

    Parameters
    ----------
    name : str
        Its name (``"CO2"``, ``"water"``).
    unit : str
        Its unit (``"t"``, ``"kt CO2"``, ``"m3"``); every table and price names it.
    intensities : dict of str to float
        Amount per unit of output, by sector (every technique of it) or by
        technique key (``"energy:solar"``, overriding its sector's); sectors
        not named have none.
    households : float, default 0.0
        Amount per unit of the consumption level (direct emissions of households).
    rate : dict of str to float, optional
        Yearly rate of change of each named sector's intensities (-0.02: 2 %
        less a year), embodied in vintages when technical change is embodied.
    resource : bool, default False
        A natural resource drawn on (water, land) rather than an emission:
        reports speak of its use.
    """

    name: str
    unit: str
    intensities: dict[str, float] = Field(default_factory=dict)
    households: float = Field(default=0.0, ge=0, le=MAX_AMOUNT, allow_inf_nan=False)
    rate: dict[str, float] = Field(default_factory=dict)
    resource: bool = False

    @field_validator("name", "unit")
    @classmethod
    def _text(cls, v: str) -> str:
        return _name(v)

    @field_validator("intensities")
    @classmethod
    def _intensities(cls, v: dict[str, float]) -> dict[str, float]:
        return _amounts(v, "intensities")

    @field_validator("rate")
    @classmethod
    def _rates(cls, v: dict[str, float]) -> dict[str, float]:
        bad = {k: r for k, r in v.items() if not (np.isfinite(r) and -1 < r <= 1)}
        if bad:
            raise Rule("hold yearly rates in (-1, 1] (fractions: -0.02 for 2 % less a year)",
                       bad)
        return v


class Impact(Model):
    """Stressors added with stated factors (a characterisation), e.g. gases into CO₂-eq.

    Parameters
    ----------
    name : str
        Its name (``"GHG"``).
    unit : str
        Its unit (``"t CO2-eq"``).
    factors : dict of str to float
        Units of the impact per unit of each named stressor (e.g. CH₄: 28).
    resource : bool, default False
        An aggregate of resources used rather than of emissions.
    """

    name: str
    unit: str
    factors: dict[str, float]
    resource: bool = False

    @field_validator("name", "unit")
    @classmethod
    def _text(cls, v: str) -> str:
        return _name(v)

    @field_validator("factors")
    @classmethod
    def _factors(cls, v: dict[str, float]) -> dict[str, float]:
        if not v:
            raise Rule("name at least one stressor", v)
        return _amounts(v, "factors")


class Satellite(Model):
    """The satellite accounts of an economy: stressors and their characterisation.

    Parameters
    ----------
    stressors : list of Stressor
        Each emission or resource with its unit and intensities, at least one.
    impacts : list of Impact, optional
        Characterisation: each impact adds stressors with stated factors.
    """

    stressors: list[Stressor]
    impacts: list[Impact] = Field(default_factory=list)

    @model_validator(mode="after")
    def _names(self) -> Satellite:
        names = [s.name for s in self.stressors]
        if not names:
            raise Rule("hold at least one stressor", names, field="stressors")
        every = names + [i.name for i in self.impacts]
        if len(set(every)) != len(every):
            raise Rule("give stressors and impacts distinct names", every, field="stressors")
        check_distinct(every, "stressors")
        for i, imp in enumerate(self.impacts):
            unknown = [k for k in imp.factors if k not in names]
            if unknown:
                raise Rule(f"name stressors ({', '.join(names)})", unknown,
                           field=f"impacts.{i}.factors")
        return self

    @property
    def names(self) -> list[str]:
        """Stressors, then impacts."""
        return [s.name for s in self.stressors] + [i.name for i in self.impacts]

    @property
    def units(self) -> list[str]:
        """Unit of each of :attr:`names`."""
        return [s.unit for s in self.stressors] + [i.unit for i in self.impacts]

    def unit(self, name: str) -> str:
        """Unit of a stressor or impact."""
        return self.units[self.names.index(name)]

    def characterisation(self) -> np.ndarray:
        """``(stressors + impacts) × stressors``: identity on top, the impact factors below."""
        k = len(self.stressors)
        out = np.zeros((len(self.names), k))
        out[:k] = np.eye(k)
        stress = [s.name for s in self.stressors]
        for i, imp in enumerate(self.impacts):
            for s, f in imp.factors.items():
                out[k + i, stress.index(s)] = f
        return out

    def intensities(self, sectors: list[str]) -> np.ndarray:
        """Direct intensities ``S``, stressors × sectors (the base techniques)."""
        out = np.zeros((len(self.stressors), len(sectors)))
        for i, s in enumerate(self.stressors):
            for k, v in s.intensities.items():
                if k in sectors:
                    out[i, sectors.index(k)] = v
        return out

    def households(self) -> np.ndarray:
        """Direct amounts per unit of the consumption level, one per stressor."""
        return np.array([s.households for s in self.stressors], dtype=float)

    def check(self, sectors: list[str], keys: list[str], field: str = "satellite") -> None:
        """Refuse intensities and rates that name neither a sector nor a technique."""
        for i, s in enumerate(self.stressors):
            unknown = [k for k in s.intensities if k not in sectors and k not in keys]
            if unknown:
                raise Rule("name sectors or techniques of the plan", unknown[:5],
                           field=f"{field}.stressors.{i}.intensities")
            unknown = [k for k in s.rate if k not in sectors]
            if unknown:
                raise Rule("name sectors of the economy", unknown[:5],
                           field=f"{field}.stressors.{i}.rate")

    def rates_given(self) -> bool:
        """Whether any intensity changes over time."""
        return any(r for s in self.stressors for r in s.rate.values())

    def factors(self, sectors: list[str], years: int) -> np.ndarray:
        """Multipliers of intensities, stressors × years × sectors: ``(1 + r)^t``."""
        r = np.array([[s.rate.get(k, 0.0) for k in sectors] for s in self.stressors])
        t = np.arange(years, dtype=float)
        return (1.0 + r[:, None, :]) ** t[None, :, None]

    def technique_intensities(self, sectors: list[str], ts: TechniqueSet | None,
                              years: int) -> np.ndarray:
        """Intensities by stressor, year and technique, ``stressors × years × techniques``.

        A vintage technique (embodied change) keeps its start year's intensity
        in every year; the others take year ``t``'s.
        """
        n = len(sectors)
        keys = sectors if ts is None else ts.keys
        sector = np.arange(n) if ts is None else ts.sector
        origin = np.arange(n) if ts is None else ts.origin
        vintage = np.full(n, -1) if ts is None else ts.vintage
        base_keys = [keys[o] for o in origin]  # a vintage's own key is "<key> <year>"
        base = np.zeros((len(self.stressors), len(keys)))
        for i, s in enumerate(self.stressors):
            for k, key in enumerate(base_keys):
                if key in s.intensities:
                    base[i, k] = s.intensities[key]
                else:
                    base[i, k] = s.intensities.get(sectors[sector[k]], 0.0)
        f = self.factors(sectors, years)[:, :, sector]        # stressors × years × techniques
        fixed = vintage >= 0
        if np.any(fixed):
            f[:, :, fixed] = f[:, vintage[fixed], np.flatnonzero(fixed)][:, None, :]
        return base[:, None, :] * f


class _Limit(Model):
    what: str

    def window(self, years: list[int]) -> list[int]:
        """Plan year indices the limit covers."""
        return list(range(len(years)))


class Cap(_Limit):
    """A yearly ceiling on a stressor or impact: ``e_t ≤ E_t`` (a resource's use too).

    Parameters
    ----------
    what : str
        A stressor or impact of the plan's satellite accounts.
    at_most : float, list, dict or Series
        The ceiling per year; a number is the first covered year's, grown at ``rate``.
    rate : float, default 0.0
        Yearly rate of a ceiling given as a number (-0.05: a path falling 5 % a year).
    years : list of int, optional
        Plan years covered (default: every plan year).
    """

    kind: Literal["cap"] = "cap"
    at_most: Any
    rate: float = Field(default=0.0, gt=-1, le=1, allow_inf_nan=False)
    years: list[int] | None = None

    def window(self, years: list[int]) -> list[int]:
        if self.years is None:
            return list(range(len(years)))
        return [years.index(y) for y in self.years]

    def path(self, years: list[int], field: str) -> np.ndarray:
        """The ceiling of each covered year."""
        from .series import series

        covered = [years[t] for t in self.window(years)]
        out = series(self.at_most, covered, f"{field}.at_most", self.rate)
        if np.any(out > MAX_AMOUNT):
            raise Rule(f"be at most {MAX_AMOUNT:g}", float(out.max()), field=f"{field}.at_most")
        return out


class Budget(_Limit):
    """A cumulative budget over the plan or a window: ``Σ_{t∈W} e_t ≤ E_W``.

    Parameters
    ----------
    what : str
        A stressor or impact.
    total : float
        The most that may be emitted (used) over the window.
    first, last : int, optional
        First and last calendar years of the window (default: the whole plan).
    """

    kind: Literal["budget"] = "budget"
    total: float = Field(ge=0, le=MAX_AMOUNT, allow_inf_nan=False)
    first: int | None = None
    last: int | None = None

    def window(self, years: list[int]) -> list[int]:
        lo = years[0] if self.first is None else self.first
        hi = years[-1] if self.last is None else self.last
        return [t for t, y in enumerate(years) if lo <= y <= hi]


class IntensityCeiling(_Limit):
    """Emissions per unit of GDP at base-year prices at most ``ι_t``: ``e_t ≤ ι_t GDP_t``.

    Parameters
    ----------
    what : str
        A stressor or impact.
    per_gdp : float, list, dict or Series
        Units of ``what`` per unit of value added (base-year money); a number
        is grown at ``rate``.
    rate : float, default 0.0
        Yearly rate of a ``per_gdp`` given as a number.
    """

    kind: Literal["intensity"] = "intensity"
    per_gdp: Any
    rate: float = Field(default=0.0, gt=-1, le=1, allow_inf_nan=False)

    def path(self, years: list[int], field: str) -> np.ndarray:
        """The ceiling per unit of GDP of each plan year."""
        from .series import series

        out = series(self.per_gdp, years, f"{field}.per_gdp", self.rate)
        if np.any(out > MAX_AMOUNT):
            raise Rule(f"be at most {MAX_AMOUNT:g}", float(out.max()), field=f"{field}.per_gdp")
        return out


Limit = Cap | Budget | IntensityCeiling
"""One limit on a stressor or impact, chosen by ``kind`` in a mapping."""


def limits_over(limits: list[Any], years: list[int], new_years: list[int]) -> list[Any]:
    """The limits of a plan over ``years`` restated for a plan over ``new_years``.

    A cap or ceiling given as a number and a rate over every year is kept as
    it is; otherwise its path is written out for the new years that it
    covered (a new year after the old last one holds the last year's
    ceiling). A budget keeps its total and window, cut to the new years; a
    limit that covers none of them is dropped.
    """
    out: list[Any] = []
    for i, lim in enumerate(limits):
        if isinstance(lim, Budget):
            if lim.window(new_years):
                out.append(lim)
            continue
        plain = isinstance(lim, IntensityCeiling) or lim.years is None
        value = lim.per_gdp if isinstance(lim, IntensityCeiling) else lim.at_most
        if plain and isinstance(value, int | float) and not isinstance(value, bool):
            out.append(lim)
            continue
        covered = [years[t] for t in lim.window(years)]
        path = dict(zip(covered, lim.path(years, f"limits.{i}").tolist(), strict=True))
        keep = [y for y in new_years if y in path or (y > years[-1] and years[-1] in path)]
        if not keep:
            continue
        values = [path.get(y, path[years[-1]]) for y in keep]
        if isinstance(lim, IntensityCeiling):
            if len(keep) == len(new_years):
                out.append(lim.model_copy(update={"per_gdp": values, "rate": 0.0}))
            continue
        out.append(Cap(what=lim.what, at_most=values, years=keep))
    return out
