"""Several regions in one economy: region–sector pairs, interregional coefficients.

A :class:`MultiRegionalEconomy` holds ``R`` regions that share one list of
commodities (``n`` sectors) and an :class:`~growthplan.Economy` over the
``R · n`` region–sector pairs, region by region (pair ``(r, i)`` is entry
``r · n + i``). Each pair is a sector of that economy named ``"region/sector"``
(region names may not hold ``/``, so the names are unique); tables at the edge
label the pairs with a two-level index ``(region, sector)``.

Three ways to state the coefficients:

- :meth:`MultiRegionalEconomy.from_regions`: each region's own economy; the
  pairs' input coefficients are block diagonal (a region's sectors buy from
  its own region) and trade between regions is left to the plan, which
  chooses shipments (:class:`~growthplan.Regions`);
- :meth:`MultiRegionalEconomy.from_chenery_moses`: regional technical
  coefficients ``a^s_ij`` and trade shares ``c^{rs}_i`` (the share of good
  ``i`` used in region ``s`` that comes from region ``r``, summing to 1 over
  ``r``), giving ``a_{ri,sj} = c^{rs}_i a^s_ij``, that is ``A = Ĉ A^reg``
  (Chenery–Moses); capital goods are bought by the same shares;
- :meth:`MultiRegionalEconomy.from_interregional`: one interregional table with
  full region–sector detail (Isard), ``a_{ri,sj} = z_{ri,sj} / x_{sj}``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Literal

import numpy as np
from pydantic import Field, field_validator, model_validator

from ..errors import InvalidInput, invalid
from .economy import Economy, Sector
from .validation import Model, Rule

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["MultiRegionalEconomy", "Corridor", "Regions", "NationalTarget", "pair_names",
           "SEPARATOR"]

SEPARATOR = "/"


def _fail(rule: str, value: Any, *, field: str) -> InvalidInput:
    return invalid(field, rule, value)


def pair_names(regions: list[str], sectors: list[str]) -> list[str]:
    """Sector names of the region–sector pairs, region by region: ``"north/energy"``."""
    return [f"{r}{SEPARATOR}{s}" for r in regions for s in sectors]


def _names(v: list[str], what: str) -> list[str]:
    if not v:
        raise Rule(f"name at least one {what}", v)
    if any(not isinstance(x, str) or not x.strip() for x in v):
        raise Rule("be non-empty names", v)
    dup = sorted({x for x in v if v.count(x) > 1})
    if dup:
        raise Rule("be unique", dup)
    return v


def _region_names(v: list[str]) -> list[str]:
    _names(v, "region")
    bad = [r for r in v if SEPARATOR in r]
    if bad:
        raise Rule(f"not hold '{SEPARATOR}' (it joins region and sector)", bad)
    return v


class MultiRegionalEconomy(Model):
    """Regions × sectors: an economy over region–sector pairs.

    Parameters
    ----------
    regions : list of str
        Unique region names (without ``/``).
    sectors : list of str
        The commodities every region may make, in order.
    economy : Economy
        The economy of the pairs, named by :func:`pair_names` (region by
        region); units per pair come from its sectors.

    Examples
    --------
    >>> north = Economy(sectors=["farm", "mill"], input_coefficients=[[0.1, 0.2], [0.1, 0.1]])
    >>> south = Economy(sectors=["farm", "mill"], input_coefficients=[[0.2, 0.1], [0.0, 0.2]])
    >>> mre = MultiRegionalEconomy.from_regions({"north": north, "south": south})
    >>> mre.economy.names
    ['north/farm', 'north/mill', 'south/farm', 'south/mill']
    """

    regions: list[str]
    sectors: list[str]
    economy: Economy

    @field_validator("regions")
    @classmethod
    def _regions(cls, v: list[str]) -> list[str]:
        return _region_names(v)

    @field_validator("sectors")
    @classmethod
    def _sectors(cls, v: list[str]) -> list[str]:
        return _names(v, "sector")

    @model_validator(mode="after")
    def _pairs(self) -> MultiRegionalEconomy:
        want = pair_names(self.regions, self.sectors)
        if self.economy.names != want:
            raise Rule(f"have the sectors {want[:4]}… (every region's sectors, region by "
                       "region)", self.economy.names[:4], field="economy.sectors")
        return self

    # -- sizes and labels ----------------------------------------------------------------

    @property
    def R(self) -> int:  # noqa: N802 - the trade's symbol
        """Number of regions."""
        return len(self.regions)

    @property
    def n(self) -> int:
        """Number of sectors in each region."""
        return len(self.sectors)

    def index(self) -> pd.MultiIndex:
        """The pairs as a two-level index ``(region, sector)``."""
        import pandas as pd

        return pd.MultiIndex.from_product([self.regions, self.sectors],
                                          names=["region", "sector"])

    def region_of(self) -> np.ndarray:
        """Region index of each pair."""
        return np.repeat(np.arange(self.R), self.n)

    # -- constructors ----------------------------------------------------------------------

    @classmethod
    def from_regions(cls, economies: dict[str, Economy], *,
                     trade_shares: Any = None, **kwargs: Any) -> MultiRegionalEconomy:
        """Join regional economies that share their sectors.

        Parameters
        ----------
        economies : dict of str to Economy
            Each region's own economy (same sectors in the same order).
        trade_shares : array_like (R × R × n) or DataFrame, optional
            Chenery–Moses trade shares ``c^{rs}_i`` (see
            :meth:`from_chenery_moses`); without them each region buys from
            itself only and trade is left to the plan's shipments.
        **kwargs
            Further fields of the pairs' economy (``consumption_basket`` …).
        """
        if not isinstance(economies, dict) or not economies:
            raise _fail("be a mapping of region names to economies", economies,
                       field="economies")
        regions = [str(r) for r in economies]
        first = next(iter(economies.values()))
        sectors = first.names
        for r, e in economies.items():
            if not isinstance(e, Economy):
                raise _fail("be an Economy", type(e).__name__, field=f"economies.{r}")
            if e.names != sectors:
                raise _fail(f"have the sectors {sectors} in this order", e.names,
                           field=f"economies.{r}.sectors")
        kinds = first.labour_kinds
        for r, e in economies.items():
            if e.labour_kinds != kinds:
                raise _fail(f"have the labour kinds {kinds}", e.labour_kinds,
                           field=f"economies.{r}.labour_kinds")
        R, n = len(regions), len(sectors)
        econs = list(economies.values())
        a = np.zeros((R * n, R * n))
        b = np.zeros((R * n, R * n))
        for k, e in enumerate(econs):
            blk = slice(k * n, (k + 1) * n)
            a[blk, blk] = e.input_coefficients
            b[blk, blk] = np.asarray(e.capital_coefficients)
        if trade_shares is not None:
            c = _shares(trade_shares, regions, sectors)
            a = _mix(a, c, R, n)
            b = _mix(b, c, R, n)
        names = pair_names(regions, sectors)
        fields: dict[str, Any] = {
            "sectors": [Sector(name=p, unit=s.unit, price=s.price)
                        for p, s in zip(names, [s for e in econs for s in e.sectors],
                                        strict=True)],
            "input_coefficients": a, "capital_coefficients": b,
            "value_unit": first.value_unit}
        if kinds is not None:
            fields["labour_coefficients"] = np.hstack(
                [np.asarray(e.labour_coefficients) for e in econs])
            fields["labour_kinds"] = list(kinds)
            if first.labour_units is not None:
                fields["labour_units"] = first.labour_units
        if all(e.capital is not None for e in econs):
            fields["capital"] = {f"{r}{SEPARATOR}{s}": spec for r, e in economies.items()
                                 for s, spec in (e.capital or {}).items()}
        for key in ("consumption_basket", "base_output"):
            if all(getattr(e, key) is not None for e in econs):
                fields[key] = np.concatenate([getattr(e, key) for e in econs])
        fields.update(kwargs)
        return cls(regions=regions, sectors=list(sectors), economy=Economy(**fields))

    @classmethod
    def from_chenery_moses(cls, economies: dict[str, Economy], trade_shares: Any,
                           **kwargs: Any) -> MultiRegionalEconomy:
        """Regional technical coefficients and trade shares: ``A = Ĉ A^reg`` (Chenery–Moses).

        Parameters
        ----------
        economies : dict of str to Economy
            Each region's technical coefficients ``a^s_ij`` (what its sectors use,
            wherever it comes from), same sectors in every region.
        trade_shares : array_like (R × R × n) or DataFrame
            ``c[r, s, i]``: share of good ``i`` used in region ``s`` that comes
            from region ``r``; each ``(s, i)`` sums to 1 over ``r``. A DataFrame
            is long: ``commodity, from_region, to_region, share`` (pairs not
            given are 0).
        **kwargs
            Further fields of the pairs' economy.
        """
        return cls.from_regions(economies, trade_shares=trade_shares, **kwargs)

    @classmethod
    def from_interregional(cls, regions: list[str], sectors: list[str],
                           input_coefficients: Any, **kwargs: Any) -> MultiRegionalEconomy:
        """One interregional table of coefficients with full region–sector detail (Isard).

        Parameters
        ----------
        regions, sectors : list of str
        input_coefficients : array_like or DataFrame, shape (R·n, R·n)
            ``a_{ri,sj}``; a DataFrame with a two-level ``(region, sector)``
            index on both axes is aligned by its labels.
        **kwargs
            Further fields of the pairs' economy (``capital`` keyed by
            ``"region/sector"``, ``labour_coefficients`` …).
        """
        try:
            _names(list(regions), "region")
        except Rule as exc:
            raise _fail(exc.rule, exc.value, field="regions") from None
        names = pair_names(list(regions), list(sectors))
        a = _flat(input_coefficients, names, "input_coefficients")
        for key in ("capital_coefficients",):
            if key in kwargs:
                kwargs[key] = _flat(kwargs[key], names, key)
        capital = kwargs.get("capital")
        if isinstance(capital, dict):
            kwargs["capital"] = {_key(k): v for k, v in capital.items()}
        return cls(regions=list(regions), sectors=list(sectors),
                   economy=Economy(sectors=[Sector(name=x) for x in names],
                                   input_coefficients=a, **kwargs))

    # -- a plan over the regions -------------------------------------------------------------

    def plan(self, years: Any, *, corridors: Any = (), transport_sector: str | None = None,
             transport_paid_by: Literal["origin", "destination"] = "origin",
             regional_labour: dict[str, Any] | None = None, labour_growth: float = 0.0,
             migration: dict[str, float] | None = None,
             consumption_floors: dict[str, Any] | None = None, floor_growth: float = 0.0,
             national_targets: Any = (), **fields: Any) -> Any:
        """A :class:`~growthplan.Plan` over the region–sector pairs with its :class:`Regions`.

        Parameters
        ----------
        years : range or list of int
        corridors, transport_sector, transport_paid_by, labour_growth, migration
        consumption_floors, floor_growth, national_targets
            The fields of :class:`Regions`.
        regional_labour : dict, optional
            :class:`Regions`' ``labour`` (each region's own supply); the plan's
            ``labour`` stays a national condition alongside.
        **fields
            Further fields of the plan (targets name pairs as ``"north/tools"``).

        Returns
        -------
        Plan
        """
        from .plan import Plan

        regions = Regions(regions=self.regions, sectors=self.sectors, corridors=list(corridors),
                          transport_sector=transport_sector,
                          transport_paid_by=transport_paid_by, labour=regional_labour,
                          labour_growth=labour_growth, migration=migration,
                          consumption_floors=consumption_floors, floor_growth=floor_growth,
                          national_targets=list(national_targets))
        return Plan(economy=self.economy, years=years, regions=regions, **fields)

    # -- steady-state figures (analysis.regions) ---------------------------------------------

    def leontief_inverse(self) -> pd.DataFrame:
        """The multiregional Leontief inverse ``(I − A)^-1``, pairs × pairs."""
        from ..analysis import regions as an

        return an.leontief_inverse(self)

    def output_multipliers(self) -> pd.Series:
        """Column sums of the multiregional Leontief inverse, by pair."""
        from ..analysis import regions as an

        return an.output_multipliers(self)

    def multipliers(self) -> pd.DataFrame:
        """Per pair: output multiplier, its intraregional part and its spillover elsewhere."""
        from ..analysis import regions as an

        return an.multiplier_table(self)

    def spillovers(self) -> pd.DataFrame:
        """Output in each region (rows) per unit of final demand for each pair (columns)."""
        from ..analysis import regions as an

        return an.spillovers(self)

    def labour_content(self) -> pd.DataFrame:
        """Labour of each region (rows) embodied in one unit of each pair's final product."""
        from ..analysis import regions as an

        return an.labour_content(self)


def _key(k: Any) -> str:
    return f"{k[0]}{SEPARATOR}{k[1]}" if isinstance(k, tuple) else str(k)


def _flat(value: Any, names: list[str], field: str) -> Any:
    """A pairs × pairs table with a two-level index, or an array, as a matrix in pair order."""
    import pandas as pd

    if isinstance(value, pd.DataFrame):
        frame = value.copy()
        frame.index = [_key(k) for k in frame.index]
        frame.columns = [_key(k) for k in frame.columns]
        for axis, labels in (("rows", list(frame.index)), ("columns", list(frame.columns))):
            unknown = [x for x in labels if x not in names]
            missing = [x for x in names if x not in labels]
            if unknown or missing:
                raise _fail(f"have one {axis[:-1]} per (region, sector) pair (missing "
                           f"{missing[:3]}; unknown {unknown[:3]})", len(labels), field=field)
            if len(set(labels)) != len(labels):
                dup = sorted({x for x in labels if labels.count(x) > 1})
                raise _fail(f"have each (region, sector) pair once in its {axis}", dup,
                           field=field)
        return frame.loc[names, names].to_numpy(dtype=float)
    return value


def _shares(value: Any, regions: list[str], sectors: list[str]) -> np.ndarray:
    """Trade shares as ``c[r, s, i]``, checked to sum to 1 over origins."""
    import pandas as pd

    R, n = len(regions), len(sectors)
    if isinstance(value, pd.DataFrame):
        need = ["commodity", "from_region", "to_region", "share"]
        if list(value.columns) != need:
            raise _fail(f"have the columns {need}", list(value.columns), field="trade_shares")
        c = np.zeros((R, R, n))
        seen: set[tuple[str, str, str]] = set()
        for row in value.itertuples(index=False):
            i, r, s, v = (str(row[0]), str(row[1]), str(row[2]), row[3])
            for name, known, what in ((i, sectors, "commodity"), (r, regions, "from_region"),
                                      (s, regions, "to_region")):
                if name not in known:
                    raise _fail(f"name a known {what.split('_')[-1]} ({', '.join(known)})",
                               name, field=f"trade_shares.{what}")
            if (i, r, s) in seen:
                raise _fail("give each (commodity, from_region, to_region) once", (i, r, s),
                           field="trade_shares")
            seen.add((i, r, s))
            c[regions.index(r), regions.index(s), sectors.index(i)] = float(v)
    else:
        c = np.asarray(value, dtype=float)
        if c.shape != (R, R, n):
            raise _fail(f"have the shape regions × regions × sectors ({R}×{R}×{n})",
                       f"shape {c.shape}", field="trade_shares")
    if not np.all(np.isfinite(c)) or np.any(c < 0):
        raise _fail("hold finite shares >= 0", "a negative or non-finite share",
                   field="trade_shares")
    total = c.sum(axis=0)
    bad = np.argwhere(np.abs(total - 1.0) > 1e-9)
    if bad.size:
        s, i = bad[0]
        raise _fail(f"sum to 1 over origins for every destination and commodity (to "
                   f"{regions[s]}, {sectors[i]})", float(total[s, i]), field="trade_shares")
    return c


def _mix(a_reg: np.ndarray, c: np.ndarray, R: int, n: int) -> np.ndarray:  # noqa: N803
    """``A = Ĉ A^reg``: ``a_{ri,sj} = c^{rs}_i a^s_ij`` from block-diagonal ``A^reg``."""
    out = np.zeros_like(a_reg)
    for s in range(R):
        cols = slice(s * n, (s + 1) * n)
        tech = a_reg[cols, cols]  # region s's technical coefficients
        for r in range(R):
            out[r * n:(r + 1) * n, cols] = c[r, s][:, None] * tech
    return out



# -- the plan over regions ---------------------------------------------------------------------


class Corridor(Model):
    """Shipments of goods from one region to another, chosen by the plan.

    Parameters
    ----------
    origin : str
        The region the goods leave.
    destination : str
        The region they arrive in (another region).
    goods : list of str, optional
        Commodities that may be shipped (default: every sector).
    transport : float or dict of str to float, default 0.0
        Units of the transport sector's product used per unit shipped (one
        number for every good, or per good), >= 0.
    ceiling : float or dict of str to float, optional
        Most units of each good shipped per year (one number for every good,
        or per good); none: no limit.
    both_ways : bool, default False
        Also ship from the destination to the origin on the same terms.
    shares : float or dict of str to float, optional
        Fixed trade shares (Chenery–Moses): the share of the destination's
        use of each good (intermediate, capital goods, consumption and other
        final demand) that comes along this corridor, in [0, 1], one number for
        every good or per good; none: the plan chooses the amount.
    """

    origin: str
    destination: str
    goods: list[str] | None = None
    transport: float | dict[str, float] = 0.0
    ceiling: float | dict[str, float] | None = None
    both_ways: bool = False
    shares: float | dict[str, float] | None = None

    @field_validator("transport", "ceiling")
    @classmethod
    def _amounts(cls, v: Any) -> Any:
        values = [] if v is None else (list(v.values()) if isinstance(v, dict) else [v])
        if any(isinstance(a, bool) or not (np.isfinite(a) and a >= 0) for a in values):
            raise Rule("be finite amounts >= 0", v)
        return v

    @field_validator("shares")
    @classmethod
    def _shares(cls, v: Any) -> Any:
        values = [] if v is None else (list(v.values()) if isinstance(v, dict) else [v])
        if any(isinstance(a, bool) or not (np.isfinite(a) and 0 <= a <= 1) for a in values):
            raise Rule("be shares in [0, 1]", v)
        return v

    @model_validator(mode="after")
    def _ends(self) -> Corridor:
        if self.origin == self.destination:
            raise Rule("differ from origin (a corridor joins two regions)", self.destination,
                       field="destination")
        return self

    def amount(self, value: float | dict[str, float] | None, good: str,
               default: float) -> float:
        """The corridor's number for one good."""
        if value is None:
            return default
        if isinstance(value, dict):
            return float(value.get(good, default))
        return float(value)


class NationalTarget(Model):
    """An at-least condition on a good's output or capacity summed over every region.

    Parameters
    ----------
    sector : str
        The commodity (a sector of the regions, not a region–sector pair).
    year : int
        The calendar year (a capacity target may name the year after the plan).
    output_at_least : float, optional
        Least output of the good in all regions together that year.
    capacity_at_least : float, optional
        Least capacity in service in all regions together that year.
    """

    sector: str
    year: int
    output_at_least: float | None = Field(default=None, ge=0, allow_inf_nan=False)
    capacity_at_least: float | None = Field(default=None, ge=0, allow_inf_nan=False)

    @model_validator(mode="after")
    def _one(self) -> NationalTarget:
        if (self.output_at_least is None) == (self.capacity_at_least is None):
            raise Rule("give output_at_least or capacity_at_least, exactly one", None,
                       field="output_at_least")
        return self

    @property
    def quantity(self) -> str:
        """``"output"`` or ``"capacity"``."""
        return "output" if self.output_at_least is not None else "capacity"

    @property
    def required(self) -> float:
        """The least amount."""
        v = self.output_at_least if self.output_at_least is not None else self.capacity_at_least
        return float(v or 0.0)


class Regions(Model):
    """The regional side of a plan over region–sector pairs.

    The plan's economy is a :class:`MultiRegionalEconomy`'s ``economy`` (its
    sectors are the pairs). Each region has its own output, capacity, starts
    and labour; shipments along the corridors move goods between regions (the
    plan chooses who supplies whom), and each unit shipped uses ``transport``
    units of the transport sector's product of the region named by
    ``transport_paid_by``.

    Parameters
    ----------
    regions : list of str
        The regions, as in the economy.
    sectors : list of str
        The commodities, as in the economy.
    corridors : list of Corridor
        Where goods may be shipped (none: the regions are self-sufficient).
    transport_sector : str, optional
        The commodity that carries shipments (needed when a corridor has a
        transport cost).
    transport_paid_by : {"origin", "destination"}, default "origin"
        Whose transport sector carries a shipment: the shipping region's or
        the receiving region's.
    labour : dict of str to number, list, dict or Series, optional
        Labour available in each region per year (person-years of the
        economy's first labour kind): a number (grown at ``labour_growth``) or
        a series; every region named once.
    labour_growth : float, default 0.0
        Yearly growth of the regional supplies given as numbers.
    consumption_floors : dict of str to number, list, dict or Series, optional
        Least consumption level of each region per year (a number grown at
        floor_growth, or a series), in units of the plan's consumption level.
        When given, each region has its own consumption level (its part of the
        basket times its level) and the plan's level is their average weighted
        by each region's share of the basket's value; the plan needs a
        consumption part. Regions not named have no floor.
    floor_growth : float, default 0.0
        Yearly growth of the regional floors given as numbers.
    national_targets : list of NationalTarget, optional
        Targets on a good's output or capacity summed over the regions (the
        plan's own targets name one region's sector).
    migration : dict of str to float, optional
        Most person-years by which each region's labour may exceed its own
        supply by people moving in from the others (a ceiling on net inflow
        per year); when given, labour may move within these ceilings and the
        whole country's supply bounds the total. Regions not named take none.
    """

    regions: list[str]
    sectors: list[str]
    corridors: list[Corridor] = Field(default_factory=list)
    transport_sector: str | None = None
    transport_paid_by: Literal["origin", "destination"] = "origin"
    labour: dict[str, Any] | None = None
    labour_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    migration: dict[str, float] | None = None
    consumption_floors: dict[str, Any] | None = None
    floor_growth: float = Field(default=0.0, gt=-1, allow_inf_nan=False)
    national_targets: list[NationalTarget] = Field(default_factory=list)

    @field_validator("regions")
    @classmethod
    def _regions(cls, v: list[str]) -> list[str]:
        return _region_names(v)

    @field_validator("sectors")
    @classmethod
    def _sectors(cls, v: list[str]) -> list[str]:
        return _names(v, "sector")

    @field_validator("migration")
    @classmethod
    def _migration(cls, v: dict[str, float] | None) -> dict[str, float] | None:
        if v is not None and any(isinstance(a, bool) or not (np.isfinite(a) and a >= 0)
                                 for a in v.values()):
            raise Rule("hold finite ceilings >= 0", v)
        return v

    @model_validator(mode="after")
    def _check(self) -> Regions:
        known = self.regions
        for k, c in enumerate(self.corridors):
            for end in ("origin", "destination"):
                if getattr(c, end) not in known:
                    raise Rule(f"name a region of the plan ({', '.join(known)})",
                               getattr(c, end), field=f"corridors.{k}.{end}")
            for g in [*(c.goods or []), *(c.transport if isinstance(c.transport, dict)
                                          else {}),
                      *(c.ceiling if isinstance(c.ceiling, dict) else {}),
                      *(c.shares if isinstance(c.shares, dict) else {})]:
                if g not in self.sectors:
                    raise Rule(f"name sectors ({', '.join(self.sectors)})", g,
                               field=f"corridors.{k}.goods")
            costly = (any(c.transport.values()) if isinstance(c.transport, dict)
                      else c.transport > 0)
            if costly and self.transport_sector is None:
                raise Rule("be given when a corridor has a transport cost", None,
                           field="transport_sector")
        pairs = [(o, d) for o, d, _ in self.links()]
        dup = sorted({p for p in pairs if pairs.count(p) > 1})
        if dup:
            raise Rule("join each (origin, destination) once", dup[0], field="corridors")
        if self.transport_sector is not None and self.transport_sector not in self.sectors:
            raise Rule(f"name a sector ({', '.join(self.sectors)})", self.transport_sector,
                       field="transport_sector")
        for key, given in (("labour", self.labour), ("migration", self.migration),
                           ("consumption_floors", self.consumption_floors)):
            unknown = [r for r in (given or {}) if r not in known]
            if unknown:
                raise Rule(f"name regions of the plan ({', '.join(known)})", unknown[0],
                           field=key)
        if self.labour is not None:
            missing = [r for r in known if r not in self.labour]
            if missing:
                raise Rule("give every region a labour supply (a region without labour "
                           "cannot produce)", f"none for {', '.join(missing)}",
                           field="labour")
        into: dict[tuple[str, str], float] = {}
        for _origin, dst, c in self.links():
            for g in (c.goods if c.goods is not None else self.sectors):
                share = c.amount(c.shares, g, 0.0)
                into[(dst, g)] = into.get((dst, g), 0.0) + share
        over = [k for k, v in into.items() if v > 1 + 1e-12]
        if over:
            raise Rule("give trade shares into each region that sum to at most 1 for each "
                       f"good (into {over[0][0]}, {over[0][1]}: {into[over[0]]:g})",
                       into[over[0]], field="corridors")
        for k, tg in enumerate(self.national_targets):
            if tg.sector not in self.sectors:
                raise Rule(f"name a sector of the regions ({', '.join(self.sectors)})",
                           tg.sector, field=f"national_targets.{k}.sector")
        if self.migration is not None and self.labour is None:
            raise Rule("come with regional labour supplies", self.migration,
                       field="migration")
        return self

    def links(self) -> list[tuple[str, str, Corridor]]:
        """Directed corridors ``(origin, destination, corridor)``, both ways expanded."""
        out = []
        for c in self.corridors:
            out.append((c.origin, c.destination, c))
            if c.both_ways:
                out.append((c.destination, c.origin, c))
        return out


def check_regions(plan: Any) -> None:
    """Checks of a plan's regions against its economy and years (inside Plan's validation)."""
    from .series import series

    reg: Regions = plan.regions
    econ = plan.economy
    want = pair_names(reg.regions, reg.sectors)
    if econ.names != want:
        raise Rule(f"match the economy's sectors, region by region ({', '.join(want[:3])}…)",
                   econ.names[:3], field="regions.sectors")
    if reg.labour is not None:
        if econ.labour_coefficients is None:
            raise Rule("come with labour coefficients in the economy", "regions.labour",
                       field="regions.labour")
        for r, v in reg.labour.items():
            series(v, list(plan.years), f"regions.labour.{r}", reg.labour_growth)
    first, last = plan.years[0], plan.years[-1]
    for k, tg in enumerate(reg.national_targets):
        limit = last + 1 if tg.quantity == "capacity" else last
        if not first <= tg.year <= limit:
            raise Rule(f"be a plan year {first}..{limit}", tg.year,
                       field=f"regions.national_targets.{k}.year")
    if reg.consumption_floors is not None:
        if plan.consumption is None:
            raise Rule("come with a consumption part in the plan", "regions.consumption_floors",
                       field="regions.consumption_floors")
        for r, v in reg.consumption_floors.items():
            series(v, list(plan.years), f"regions.consumption_floors.{r}", reg.floor_growth)
