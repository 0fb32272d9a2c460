"""Alternative techniques: several ways of making a commodity, chosen by the plan.

A :class:`Technique` makes one commodity (its ``sector``) with its own input,
capital and labour coefficients, its own capital spec (service life,
retirement profile, lead time) and the years in which new capacity of it may
be started. It may also yield by-products (joint production). Each sector's
own coefficients in the economy form its *base* technique, labelled
``"base"``, which holds the economy's initial capacity; ``Plan(techniques=[…])``
adds alternatives. A technique labelled ``"base"`` may only set
``first_year`` and ``last_start`` of the base technique (to phase it out).

The plan's LP then works on techniques (activities) instead of sectors:
output ``x_kt``, capacity ``C_kt`` and starts ``z_kt`` are held per technique
``k``; the balance of commodity ``i`` counts the output of every technique of
``i`` and the by-products of the others,
``Σ_k q_ik x_kt + m_it ≥ Σ_k a_ik x_kt + Σ_k b_ik (deliveries of z_k)_t + …``,
each technique's output is within its own capacity, and labour use is
``Σ_k l_k x_kt``. Starts outside ``[first_year, last_start]`` are bounded to
zero. A plan without techniques has exactly one technique per sector and the
same LP as before.

The yearly rates of a :class:`~growthplan.TechnicalChange` apply to every
technique of the sector they name. Starts ceilings of a sector bound the
starts of each of its techniques.

Embodied technical change (``TechnicalChange(embodied=True)``) is written as
vintage techniques: every technique of a sector whose coefficients change is
split into one technique per plan year ``τ``, whose coefficients are those of
year ``τ`` and whose capacity may only be started in year ``τ``; the vintage
of the first plan year also holds the capacity from before the plan (and the
capacity under construction), at the base year's coefficients. Output is so
split by vintage and the LP stays linear; capacity of vintage ``τ`` uses the
coefficients of ``τ`` for its whole life.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from pydantic import Field, field_validator, model_validator

from .validation import Model, Rule, check_label

if TYPE_CHECKING:
    from .economy import CapitalSpec, Economy
    from .plan import Plan

__all__ = ["Technique", "TechniqueSet", "technique_arrays", "refuse_techniques"]

# former spelling -> the name the capital spec uses (read with a warning for one release)
RENAMED = {"service_life": "mean_service_life", "profile": "retirement"}

BASE = "base"


class Technique(Model):
    """One way of making a commodity.

    Parameters
    ----------
    sector : str
        The commodity it makes (a sector of the economy).
    label : str
        Its name, unique within the sector (``"base"`` is the economy's own).
    inputs : dict of str to float, optional
        Units of each commodity used per unit of output (default: the sector's
        column of input coefficients; commodities not named use none).
    capital : dict of str to float, optional
        Capital goods per unit of new capacity (default: the sector's own).
    labour : float or dict of str to float, optional
        Labour per unit of output, one number for the first labour kind or a
        mapping of kinds (default: the sector's own).
    mean_service_life : float, optional
        Mean service life in years (default: the sector's). The former
        spelling ``service_life`` is read with a ``DeprecationWarning``.
    retirement : str, optional
        Retirement profile family (default: the sector's). The former
        spelling ``profile`` is read with a ``DeprecationWarning``.
    lead_time : int, optional
        Years from a start to service (default: the sector's; a different
        lead time spreads the capital deliveries evenly).
    first_year : int, optional
        First calendar year in which its capacity may be started (None: any).
    last_start : int, optional
        Last calendar year in which its capacity may be started (None: no limit).
    initial_capacity : float, default 0.0
        Capacity of this technique in service in the first plan year.
    by_products : dict of str to float, optional
        Units of other commodities produced per unit of its output.
    """

    sector: str
    label: str
    inputs: dict[str, float] | None = None
    capital: dict[str, float] | None = None
    labour: float | dict[str, float] | None = None
    mean_service_life: float | None = None
    retirement: str | None = None
    lead_time: int | None = Field(default=None, ge=0, le=100)
    first_year: int | None = None
    last_start: int | None = None
    initial_capacity: float = Field(default=0.0, ge=0, allow_inf_nan=False)
    by_products: dict[str, float] = Field(default_factory=dict)

    @field_validator("label")
    @classmethod
    def _label(cls, v: str) -> str:
        if not v.strip():
            raise Rule("be a non-empty name", v)
        return check_label(v)

    @field_validator("inputs", "capital", "by_products")
    @classmethod
    def _amounts(cls, v: dict[str, float] | None) -> dict[str, float] | None:
        if v is not None:
            bad = {k: a for k, a in v.items() if not (np.isfinite(a) and a >= 0)}
            if bad:
                raise Rule("hold finite coefficients >= 0", bad)
        return v

    @field_validator("labour")
    @classmethod
    def _labour(cls, v: float | dict[str, float] | None) -> float | dict[str, float] | None:
        values = [] if v is None else (list(v.values()) if isinstance(v, dict) else [v])
        if any(not (np.isfinite(a) and a >= 0) for a in values):
            raise Rule("hold finite coefficients >= 0", v)
        return v

    @model_validator(mode="before")
    @classmethod
    def _former_names(cls, data: Any) -> Any:
        """Read the former spellings of two fields, with a warning (one release)."""
        if isinstance(data, dict) and any(old in data for old in RENAMED):
            data = dict(data)
            for old, new in RENAMED.items():
                if old in data:
                    warnings.warn(f"Technique's {old!r} is now {new!r} (the name "
                                  f"CapitalSpec uses); {old!r} will be refused in a later "
                                  "release", DeprecationWarning, stacklevel=4)
                    if new in data:
                        raise Rule(f"be given once (as {new!r}, not also as {old!r})",
                                   data[new], field=new)
                    data[new] = data.pop(old)
        return data

    @property
    def service_life(self) -> float | None:
        """Former name of :attr:`mean_service_life` (deprecated)."""
        warnings.warn("Technique.service_life is now Technique.mean_service_life",
                      DeprecationWarning, stacklevel=2)
        return self.mean_service_life

    @property
    def profile(self) -> str | None:
        """Former name of :attr:`retirement` (deprecated)."""
        warnings.warn("Technique.profile is now Technique.retirement", DeprecationWarning,
                      stacklevel=2)
        return self.retirement

    @model_validator(mode="after")
    def _years(self) -> Technique:
        if self.first_year is not None and self.last_start is not None \
                and self.first_year > self.last_start:
            raise Rule("be at most last_start", self.first_year, field="first_year")
        if self.label == BASE:
            given = [k for k in ("inputs", "capital", "labour", "mean_service_life", "retirement",
                                 "lead_time") if getattr(self, k) is not None]
            if given or self.by_products or self.initial_capacity:
                raise Rule("set only first_year and last_start of a base technique (the "
                           "economy holds its coefficients)", given or "by_products",
                           field="label")
        return self

    @property
    def key(self) -> str:
        """Column label of the technique: the sector's name for its base technique."""
        return self.sector if self.label == BASE else f"{self.sector}:{self.label}"


@dataclass(frozen=True)
class TechniqueSet:
    """The techniques of an economy as arrays (``n`` commodities, ``m`` techniques).

    Attributes
    ----------
    keys : list of str
        Column label of each technique (the sector's name for a base technique).
    labels : list of str
        Each technique's own label (``"base"`` …).
    sector : numpy.ndarray
        Index of the commodity each technique makes, ``m``.
    inputs, outputs, capital : numpy.ndarray
        ``n × m``: units used per unit of output; units produced per unit of
        output (the main product 1, by-products); capital goods per unit of
        new capacity.
    labour : numpy.ndarray
        ``kinds × m``, the economy's labour kinds.
    specs : list of CapitalSpec
        Capital spec of each technique (its initial capacity included).
    first_year, last_start : list of int or None
        Availability of new starts, calendar years.
    vintage : numpy.ndarray
        Plan year index whose coefficients a vintage technique carries
        (embodied change), −1 for the others.
    origin : numpy.ndarray
        Index of the technique a vintage was split from (itself otherwise).
    """

    keys: list[str]
    labels: list[str]
    sector: np.ndarray
    inputs: np.ndarray
    outputs: np.ndarray
    capital: np.ndarray
    labour: np.ndarray
    specs: list[CapitalSpec]
    first_year: list[int | None]
    last_start: list[int | None]
    vintage: np.ndarray
    origin: np.ndarray

    @property
    def m(self) -> int:
        """Number of techniques."""
        return len(self.keys)

    def simple(self) -> bool:
        """One technique per sector, in the sectors' order, without by-products."""
        n = self.outputs.shape[0]
        return self.m == n and bool(np.array_equal(self.outputs, np.eye(n)))


def refuse_techniques(plan: Plan, what: str) -> None:
    """Refuse a plan with alternative techniques or embodied change where they are not handled.

    Raises
    ------
    InvalidInput
        Naming ``techniques`` (or ``technical_change.embodied``).
    """
    from ..errors import invalid

    if getattr(plan, "techniques", None):
        raise invalid("techniques", f"be left out for {what} (not available with "
                      "alternative techniques yet)", len(plan.techniques))
    tc = getattr(plan, "technical_change", None)
    if tc is not None and tc.embodied:
        raise invalid("technical_change.embodied", f"be false for {what} (not available "
                      "with embodied change yet)", True)


def check_techniques(economy: Economy, techniques: list[Technique]) -> None:
    """Refuse techniques that name unknown sectors, commodities or kinds, or repeat a label.

    Raises
    ------
    Rule
        With the field of the offending technique.
    """
    names = economy.names
    kinds = list(economy.labour_kinds or [])
    seen: set[tuple[str, str]] = set()
    for i, tq in enumerate(techniques):
        where = f"techniques.{i}"
        if tq.sector not in names:
            raise Rule(f"name a sector of the economy ({', '.join(names[:8])})", tq.sector,
                       field=f"{where}.sector")
        if (tq.sector, tq.label) in seen:
            raise Rule("be unique within its sector", tq.label, field=f"{where}.label")
        seen.add((tq.sector, tq.label))
        for fld in ("inputs", "capital", "by_products"):
            unknown = [k for k in (getattr(tq, fld) or {}) if k not in names]
            if unknown:
                raise Rule("name commodities of the economy", unknown[:5],
                           field=f"{where}.{fld}")
        if tq.sector in tq.by_products:
            raise Rule("name commodities other than the technique's own", tq.sector,
                       field=f"{where}.by_products")
        if isinstance(tq.labour, dict):
            unknown = [k for k in tq.labour if k not in kinds]
            if unknown:
                raise Rule(f"name labour kinds of the economy ({', '.join(kinds)})",
                           unknown[:5], field=f"{where}.labour")
        elif tq.labour is not None and not kinds:
            raise Rule("come with labour coefficients in the economy", tq.labour,
                       field=f"{where}.labour")
        if tq.label != "base":
            _spec(economy, tq, where)  # refuses a bad life, profile or lead time


def _spec(economy: Economy, tq: Technique, where: str) -> CapitalSpec:
    from ..errors import InvalidInput
    from .economy import CapitalSpec

    assert economy.capital is not None
    own = economy.capital[tq.sector]
    fields = own.model_dump()
    fields.update(initial_capacity=tq.initial_capacity, investment_history=None)
    if tq.mean_service_life is not None:
        fields["mean_service_life"] = tq.mean_service_life
    if tq.retirement is not None:
        fields["retirement"] = tq.retirement
    if tq.lead_time is not None and tq.lead_time != own.lead_time:
        fields.update(lead_time=tq.lead_time, spending_profile=None)
    try:
        return CapitalSpec(**fields)
    except InvalidInput as exc:  # name the technique's own field and value
        # the technique's fields have the capital spec's names
        name = (exc.field or "").rsplit(".", 1)[-1]
        if name not in ("mean_service_life", "retirement", "lead_time"):
            name = "mean_service_life"
        text = str(exc)
        rule = text.split(" must ", 1)[-1].rsplit(". Got ", 1)[0]
        raise Rule(rule, getattr(tq, name), field=f"{where}.{name}") from None


def technique_arrays(economy: Economy, techniques: list[Technique] | None = None,
                     ) -> TechniqueSet:
    """An economy's techniques as arrays: the base techniques first, then the alternatives.

    Parameters
    ----------
    economy : Economy
        With capital for every sector.
    techniques : list of Technique, optional
        Alternatives (and phase-outs of base techniques); validated against
        the economy.

    Returns
    -------
    TechniqueSet
        Base technique ``j`` is column ``j`` (sector ``j``); alternatives follow
        in the order given.
    """
    techniques = list(techniques or [])
    check_techniques(economy, techniques)
    names = economy.names
    n = economy.n
    assert economy.capital is not None
    a = np.asarray(economy.input_coefficients, dtype=float)
    b = np.asarray(economy.capital_coefficients, dtype=float)
    kinds = list(economy.labour_kinds or [])
    lab = (np.asarray(economy.labour_coefficients, dtype=float)
           if economy.labour_coefficients is not None else np.zeros((0, n)))
    phase = {tq.sector: tq for tq in techniques if tq.label == BASE}
    alts = [tq for tq in techniques if tq.label != BASE]
    m = n + len(alts)
    inputs, capital = np.zeros((n, m)), np.zeros((n, m))
    outputs = np.zeros((n, m))
    labour = np.zeros((len(kinds), m))
    inputs[:, :n], capital[:, :n], labour[:, :n] = a, b, lab
    outputs[:, :n] = np.eye(n)
    specs = [economy.capital[k] for k in names]
    first: list[int | None] = [phase[k].first_year if k in phase else None for k in names]
    last: list[int | None] = [phase[k].last_start if k in phase else None for k in names]
    keys, labels = list(names), [BASE] * n
    sector = list(range(n))
    for c, tq in enumerate(alts, start=n):
        j = names.index(tq.sector)
        where = f"techniques.{techniques.index(tq)}"
        sector.append(j)
        keys.append(tq.key)
        labels.append(tq.label)
        inputs[:, c] = a[:, j] if tq.inputs is None else [tq.inputs.get(k, 0.0) for k in names]
        capital[:, c] = b[:, j] if tq.capital is None else [tq.capital.get(k, 0.0)
                                                            for k in names]
        if tq.labour is None:
            labour[:, c] = lab[:, j]
        elif isinstance(tq.labour, dict):
            labour[:, c] = [tq.labour.get(k, 0.0) for k in kinds]
        else:
            labour[:, c] = 0.0
            labour[0, c] = tq.labour
        outputs[j, c] = 1.0
        for k, v in tq.by_products.items():
            outputs[names.index(k), c] = v
        specs.append(_spec(economy, tq, where))
        first.append(tq.first_year)
        last.append(tq.last_start)
    return TechniqueSet(keys=keys, labels=labels, sector=np.array(sector, dtype=int),
                        inputs=inputs, outputs=outputs, capital=capital, labour=labour,
                        specs=specs, first_year=first, last_start=last,
                        vintage=np.full(m, -1, dtype=int), origin=np.arange(m))


def split_vintages(ts: TechniqueSet, years: list[int], factors: dict[str, np.ndarray],
                   ) -> TechniqueSet:
    """Embodied change: each changing technique becomes one technique per start year.

    Parameters
    ----------
    ts : TechniqueSet
    years : list of int
        The plan years.
    factors : dict
        ``input``, ``capital`` and ``labour`` multipliers, years × sectors; any
        further entry (such as changing emission intensities) only marks the
        sectors to split.

    Returns
    -------
    TechniqueSet
        Vintage ``τ`` of technique ``k`` carries ``k``'s coefficients times the
        factors of year ``τ`` and may be started only in year ``τ``; vintage 0
        keeps ``k``'s place, label and capital from before the plan, the
        others follow all techniques, labelled ``"<label> <year>"``, with no
        initial capacity.
    """
    T = len(years)
    fa, fb, fl = factors["input"], factors["capital"], factors["labour"]
    changing = [k for k in range(ts.m)
                if any(np.any(f[:, ts.sector[k]] != 1.0) for f in factors.values())]
    keys, labels = list(ts.keys), list(ts.labels)
    sector, origin, vintage = list(ts.sector), list(ts.origin), list(ts.vintage)
    cols_a, cols_b, cols_l = [ts.inputs], [ts.capital], [ts.labour]
    specs, first, last = list(ts.specs), list(ts.first_year), list(ts.last_start)
    outputs = [ts.outputs]
    for k in changing:
        vintage[k] = 0
        lo, hi = ts.first_year[k], ts.last_start[k]
        last[k] = years[0] if hi is None else min(hi, years[0])
        first[k] = lo
        j = ts.sector[k]
        for tau in range(1, T):
            y = years[tau]
            keys.append(f"{ts.keys[k]} {y}")
            labels.append(f"{ts.labels[k]} {y}")
            sector.append(j)
            origin.append(k)
            vintage.append(tau)
            cols_a.append(ts.inputs[:, [k]] * fa[tau, j])
            cols_b.append(ts.capital[:, [k]] * fb[tau, j])
            cols_l.append(ts.labour[:, [k]] * fl[tau, j])
            outputs.append(ts.outputs[:, [k]])
            specs.append(ts.specs[k].model_copy(update={"initial_capacity": 0.0,
                                                        "investment_history": None}))
            ok = (lo is None or lo <= y) and (hi is None or y <= hi)
            first.append(y if ok else years[-1] + 1)
            last.append(y)
    return TechniqueSet(keys=keys, labels=labels, sector=np.array(sector, dtype=int),
                        inputs=np.hstack(cols_a), outputs=np.hstack(outputs),
                        capital=np.hstack(cols_b), labour=np.hstack(cols_l), specs=specs,
                        first_year=first, last_start=last,
                        vintage=np.array(vintage, dtype=int), origin=np.array(origin))
