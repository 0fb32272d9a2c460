"""Steady states with a choice of techniques.

An *activity table* lists ``m`` techniques over ``n`` commodities: inputs
``A`` (n × m, per unit of activity), outputs ``B`` (n × m; a single-product
technique has one entry 1 in the row of its commodity), labour ``L``
(kinds × m), and optionally capital ``K`` (n × m, capital goods per unit of
capacity) with a depreciation rate ``δ`` per technique. A technique is a
column; the commodity it mainly produces is its *product*.

Conventions
-----------
Capital is advanced for one period: circulating inputs ``A`` and the capital
stock ``K`` earn the profit (interest) rate ``r``; the stock loses ``δ K``
and wages are paid at the end of the period. The unit cost of technique
``j`` at prices ``p`` (a row vector), wage rates ``w`` and profit rate ``r``
is therefore::

    c_j(p) = (1 + r) p a_j + (r + δ_j) p k_j + w · l_j

and with no capital and one labour kind it is Sraffa's
``c_j = (1 + r) p a_j + w l_j``. The same convention makes the von Neumann
system: advances ``P = A + K`` and returns ``Q = B + (1 − δ) K``, so that
``p Q ≤ (1 + r) p P`` is exactly ``p b_j ≤ c_j(p)`` at zero wages.

Three questions are answered on plain arrays or labelled frames:

* :func:`von_neumann_choice` — the maximal balanced growth rate over all
  techniques (the expanding economy of :mod:`growthplan.analysis.expanding`), the
  techniques it runs, its interest rate and prices;
* :func:`cheapest_techniques` — with no joint production, the
  cost-minimising technique for each commodity at a given wage and profit
  rate, by policy iteration;
* :func:`wage_profit_frontier` — the wage as a function of the profit rate
  along the envelope of all technique sets, with switch points and
  reswitching.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike
from scipy.optimize import brentq, linprog

from ..errors import SolverFailure, invalid
from .expanding import ExpandingEconomy, expanding_economy
from .steady import spectral_radius

if TYPE_CHECKING:
    from ..model.economy import Economy
    from ..model.plan import Plan

__all__ = [
    "ActivityTable",
    "activity_table",
    "activity_table_from_economy",
    "activity_table_from_plan",
    "VonNeumannChoice",
    "von_neumann_choice",
    "CheapestTechniques",
    "cheapest_techniques",
    "WageProfitFrontier",
    "wage_profit_frontier",
]

_COST_TOL = 1e-10  # a switch needs a cost saving above this share of the price
_USED = 1e-9  # intensities below this share of the largest count as idle


@dataclass(frozen=True)
class ActivityTable:
    """Techniques (columns) over commodities (rows); build it with :func:`activity_table`.

    Attributes
    ----------
    inputs : pandas.DataFrame
        ``A``, commodities × techniques.
    outputs : pandas.DataFrame
        ``B``, commodities × techniques.
    labour : pandas.DataFrame
        ``L``, labour kinds × techniques.
    capital : pandas.DataFrame
        ``K``, commodities × techniques (zeros when no capital is given).
    depreciation : pandas.Series
        ``δ`` by technique (zeros when not given).
    produces : pandas.Series
        The commodity each technique mainly produces, by technique.
    """

    inputs: pd.DataFrame
    outputs: pd.DataFrame
    labour: pd.DataFrame
    capital: pd.DataFrame
    depreciation: pd.Series
    produces: pd.Series

    @property
    def commodities(self) -> list[str]:
        """Commodity labels in order."""
        return [str(c) for c in self.inputs.index]

    @property
    def techniques(self) -> list[str]:
        """Technique labels in order."""
        return [str(c) for c in self.inputs.columns]

    @property
    def labour_kinds(self) -> list[str]:
        """Labour kinds in order."""
        return [str(c) for c in self.labour.index]

    @property
    def joint_production(self) -> bool:
        """Whether some technique has more than one output."""
        return bool(np.any((self.outputs.to_numpy() > 0).sum(axis=0) != 1))

    def _product_rows(self) -> np.ndarray:
        names = self.commodities
        return np.array([names.index(str(c)) for c in self.produces.to_numpy()])


def _matrix(value: Any, field: str, rows: list[str] | None, cols: list[str] | None,
            shape: tuple[int, int] | None = None) -> tuple[np.ndarray, list[str] | None,
                                                           list[str] | None]:
    """A finite non-negative 2-D array, aligned to the given labels when it is a frame."""
    if isinstance(value, pd.DataFrame):
        if rows is not None and cols is not None:
            missing = [r for r in rows if r not in map(str, value.index)] + \
                      [c for c in cols if c not in map(str, value.columns)]
            if missing:
                raise invalid(field, "have a row for every commodity and a column for every "
                              "technique", missing[:5])
            value = value.set_axis(list(map(str, value.index)), axis=0)
            value = value.set_axis(list(map(str, value.columns)), axis=1).loc[rows, cols]
        rows = rows or [str(r) for r in value.index]
        cols = cols or [str(c) for c in value.columns]
    try:
        m = np.array(value, dtype=float)
    except (TypeError, ValueError) as exc:
        raise invalid(field, "hold numbers", type(value).__name__) from exc
    if m.ndim == 1 and shape is not None and shape[0] == 1:
        m = m[None, :]
    if m.ndim != 2 or (shape is not None and m.shape != shape):
        raise invalid(field, f"have shape {shape or '(commodities, techniques)'}",
                      f"shape {m.shape}")
    if not np.all(np.isfinite(m)) or np.any(m < 0):
        raise invalid(field, "hold finite numbers >= 0", "a negative, infinite or NaN entry")
    return m, rows, cols


def activity_table(inputs: ArrayLike | pd.DataFrame, outputs: ArrayLike | pd.DataFrame | None
                   = None, *, labour: ArrayLike | pd.DataFrame | pd.Series,
                   capital: ArrayLike | pd.DataFrame | None = None,
                   depreciation: ArrayLike | pd.Series | float | None = None,
                   produces: Sequence[str] | pd.Series | None = None,
                   techniques: Sequence[str] | None = None,
                   commodities: Sequence[str] | None = None,
                   labour_kinds: Sequence[str] | None = None) -> ActivityTable:
    """Check and label an activity table.

    Parameters
    ----------
    inputs : array_like or DataFrame, shape (n, m)
        ``A``: commodities used per unit of each technique's activity. A frame
        gives the commodity and technique labels.
    outputs : array_like or DataFrame, shape (n, m), optional
        ``B``: commodities produced per unit of activity (by-products included).
        Default: 1 in the row of each technique's product.
    labour : array_like, Series or DataFrame, shape (m,) or (kinds, m)
        Labour per unit of activity; a 1-D array is one kind.
    capital : array_like or DataFrame, shape (n, m), optional
        ``K``: capital goods per unit of capacity (zeros when omitted).
    depreciation : float or array_like, shape (m,), optional
        ``δ``: the share of the capital stock used up per period (default 0).
    produces : sequence of str or Series, optional
        The commodity each technique mainly produces. Default: the row of each
        column's largest output (required when ``outputs`` is omitted).
    techniques, commodities, labour_kinds : sequence of str, optional
        Labels (default ``technique_1…``, ``commodity_1…``, ``labour``), taken
        from frames when given.

    Returns
    -------
    ActivityTable

    Examples
    --------
    Two ways of making corn, with seed and labour:

    >>> t = activity_table([[0.5, 0.2]], labour=[1.0, 2.0], produces=["corn", "corn"],
    ...                    commodities=["corn"], techniques=["alpha", "beta"])
    >>> t.outputs.to_numpy().tolist()
    [[1.0, 1.0]]
    """
    a, rows, cols = _matrix(inputs, "inputs", None, None)
    n, m = a.shape
    if n == 0 or m == 0:
        raise invalid("inputs", "have at least one commodity and one technique",
                      f"shape {a.shape}")
    rows = rows or (list(map(str, commodities)) if commodities is not None
                    else [f"commodity_{i + 1}" for i in range(n)])
    cols = cols or (list(map(str, techniques)) if techniques is not None
                    else [f"technique_{j + 1}" for j in range(m)])
    if len(rows) != n or len(set(rows)) != n:
        raise invalid("commodities", f"be {n} distinct labels", rows)
    if len(cols) != m or len(set(cols)) != m:
        raise invalid("techniques", f"be {m} distinct labels", cols)
    if isinstance(produces, pd.Series):
        produces = [str(produces[c]) if c in produces.index else "" for c in cols]
    if produces is not None:
        prod = [str(c) for c in produces]
        unknown = [c for c in prod if c not in rows]
        if len(prod) != m or unknown:
            raise invalid("produces", "name one commodity of the table per technique",
                          unknown[:5] or prod)
    if outputs is None:
        if produces is None:
            raise invalid("produces", "be given when outputs are omitted", None)
        b = np.zeros((n, m))
        b[[rows.index(c) for c in prod], np.arange(m)] = 1.0
    else:
        b, _, _ = _matrix(outputs, "outputs", rows, cols, (n, m))
    if np.any(b.sum(axis=0) <= 0):
        raise invalid("outputs", "give every technique some output",
                      [cols[j] for j in np.nonzero(b.sum(axis=0) <= 0)[0]][:5])
    if produces is None:
        prod = [rows[i] for i in np.argmax(b, axis=0)]
    elif np.any(b[[rows.index(c) for c in prod], np.arange(m)] <= 0):
        raise invalid("produces", "name a commodity each technique outputs", prod)
    if isinstance(labour, pd.Series):
        if labour.index.isin(cols).all():
            labour = labour.rename(labour.name or "labour").to_frame().T
    if isinstance(labour, pd.DataFrame):
        lab, kinds, _ = _matrix(labour, "labour", list(map(str, labour.index)), cols)
    else:
        raw = np.asarray(labour, dtype=float)
        lab, _, _ = _matrix(raw[None, :] if raw.ndim == 1 else raw, "labour", None, None)
        kinds = None
    if lab.shape[1] != m:
        raise invalid("labour", f"have one entry per technique ({m})", f"shape {lab.shape}")
    kinds = kinds or (list(map(str, labour_kinds)) if labour_kinds is not None
                      else (["labour"] if lab.shape[0] == 1
                            else [f"labour_{k + 1}" for k in range(lab.shape[0])]))
    if len(kinds) != lab.shape[0]:
        raise invalid("labour_kinds", f"be {lab.shape[0]} labels", kinds)
    k = np.zeros((n, m)) if capital is None else _matrix(capital, "capital", rows, cols,
                                                         (n, m))[0]
    if isinstance(depreciation, pd.Series):
        depreciation = depreciation.reindex(cols).fillna(0.0).to_numpy()
    d = np.asarray(0.0 if depreciation is None else depreciation, dtype=float)
    d = np.full(m, float(d)) if d.ndim == 0 else d
    if d.shape != (m,) or not np.all(np.isfinite(d)) or np.any((d < 0) | (d > 1)):
        raise invalid("depreciation", f"be a number in [0, 1] or {m} of them",
                      depreciation)
    cidx, tidx = pd.Index(rows, name="commodity"), pd.Index(cols, name="technique")
    return ActivityTable(
        inputs=pd.DataFrame(a, index=cidx, columns=tidx),
        outputs=pd.DataFrame(b, index=cidx, columns=tidx),
        labour=pd.DataFrame(lab, index=pd.Index(kinds, name="labour"), columns=tidx),
        capital=pd.DataFrame(k, index=cidx, columns=tidx),
        depreciation=pd.Series(d, index=tidx, name="depreciation"),
        produces=pd.Series(prod, index=tidx, name="produces"))


def activity_table_from_economy(economy: Economy,
                                alternatives: Sequence[Mapping[str, Any]] = ()
                                ) -> ActivityTable:
    """An activity table from an economy's own techniques plus alternative ones.

    Each sector's column of the economy becomes a technique labelled by the
    sector's name; its depreciation is the replacement rate at zero growth,
    ``1 / mean_service_life``, when the economy has capital specs. Each
    alternative is a mapping with the keys ``sector`` (the commodity it
    produces), ``label``, ``inputs`` (commodity → amount), ``labour`` (a
    number for one kind, or kind → amount), and optionally ``capital``
    (commodity → amount), ``by_products`` (commodity → amount) and
    ``depreciation`` (default the sector's own).

    Parameters
    ----------
    economy : Economy
    alternatives : sequence of mappings

    Returns
    -------
    ActivityTable
    """
    names = list(economy.names)
    n = economy.n
    kinds = list(economy.labour_kinds or ["labour"])
    lab0 = (np.zeros((len(kinds), n)) if economy.labour_coefficients is None
            else np.asarray(economy.labour_coefficients, dtype=float))
    cap0 = (np.zeros((n, n)) if economy.capital_coefficients is None
            else np.asarray(economy.capital_coefficients, dtype=float))
    dep0 = np.array([1.0 / economy.capital[s].mean_service_life if economy.capital else 0.0
                     for s in names])
    cols_a, cols_b, cols_k, cols_l = [np.asarray(economy.input_coefficients, float)], \
        [np.eye(n)], [cap0], [lab0]
    labels, prod, dep = list(names), list(names), list(dep0)
    allowed = {"sector", "label", "inputs", "labour", "capital", "by_products", "depreciation"}

    def column(spec: Mapping[str, Any], key: str, where: str) -> np.ndarray:
        v = np.zeros(n)
        for c, x in dict(spec.get(key) or {}).items():
            if c not in names:
                raise invalid(f"{where}.{key}", "name commodities of the economy", c)
            v[names.index(c)] = float(x)
        return v

    for i, alt in enumerate(alternatives):
        where = f"alternatives[{i}]"
        extra = sorted(set(alt) - allowed)
        if extra or "sector" not in alt or "label" not in alt:
            raise invalid(where, f"have keys sector, label and some of {sorted(allowed)}",
                          extra or sorted(alt))
        sector, label = str(alt["sector"]), str(alt["label"])
        if sector not in names:
            raise invalid(f"{where}.sector", "be a sector of the economy", sector)
        if label in labels:
            raise invalid(f"{where}.label", "be a new technique label", label)
        b = column(alt, "by_products", where)
        b[names.index(sector)] += 1.0
        raw = alt.get("labour", 0.0)
        lab = np.zeros(len(kinds))
        if isinstance(raw, Mapping):
            for kind, x in raw.items():
                if kind not in kinds:
                    raise invalid(f"{where}.labour", f"name labour kinds {kinds}", kind)
                lab[kinds.index(kind)] = float(x)
        else:
            if len(kinds) != 1:
                raise invalid(f"{where}.labour", "map labour kinds to amounts", raw)
            lab[0] = float(raw)
        cols_a.append(column(alt, "inputs", where)[:, None])
        cols_b.append(b[:, None])
        cols_k.append(column(alt, "capital", where)[:, None])
        cols_l.append(lab[:, None])
        labels.append(label)
        prod.append(sector)
        dep.append(float(alt.get("depreciation", dep0[names.index(sector)])))
    return activity_table(np.hstack(cols_a), np.hstack(cols_b), labour=np.hstack(cols_l),
                          capital=np.hstack(cols_k), depreciation=np.array(dep),
                          produces=prod, techniques=labels, commodities=names,
                          labour_kinds=kinds)


def activity_table_from_plan(plan: Plan) -> ActivityTable:
    """The activity table of a plan: its economy's techniques plus the plan's ``Technique``s.

    The same description the plan's LP runs on (:func:`growthplan.technique_arrays`),
    seen as a steady state: each technique is a column labelled by its key
    (the sector's name for a base technique, ``"sector:label"`` for an
    alternative), its capital goods are per unit of capacity, its
    depreciation is ``1 / mean service life`` of its own capital spec (the
    replacement rate at zero growth, as in :func:`activity_table_from_economy`),
    and its by-products are outputs. Availability years are a matter of the
    plan's calendar and are left out: every technique is in the table. The
    coefficients are the base year's (technical change is not applied).

    Parameters
    ----------
    plan : Plan
        A plan; with no techniques the table equals
        ``activity_table_from_economy(plan.economy)``.

    Returns
    -------
    ActivityTable

    Examples
    --------
    >>> import growthplan as gp
    >>> plan = gp.demo_plan().model_copy(update={"techniques": [
    ...     gp.Technique(sector="agriculture", label="mechanised", labour=0.1)]})
    >>> gp.activity_table_from_plan(plan).techniques[-1]
    'agriculture:mechanised'
    """
    from ..model.technique import technique_arrays

    economy = plan.economy
    ts = technique_arrays(economy, list(plan.techniques))
    names = list(economy.names)
    kinds = list(economy.labour_kinds or ["labour"])
    labour = ts.labour if ts.labour.shape[0] else np.zeros((1, ts.m))
    depreciation = np.array([1.0 / spec.mean_service_life for spec in ts.specs])
    return activity_table(ts.inputs, ts.outputs, labour=labour, capital=ts.capital,
                          depreciation=depreciation,
                          produces=[names[j] for j in ts.sector], techniques=ts.keys,
                          commodities=names, labour_kinds=kinds)


# -- von Neumann ---------------------------------------------------------------
@dataclass(frozen=True)
class VonNeumannChoice:
    """Result of :func:`von_neumann_choice`.

    Attributes
    ----------
    growth_rate : float
        ``α* − 1``: the maximal balanced growth rate over all techniques.
    interest_rate : float
        ``β* − 1``: the smallest rate at which no technique makes a profit
        (equal to the growth rate for an irreducible system).
    intensities : pandas.Series
        Activity of each technique on the maximal ray (sum 1).
    prices : pandas.Series
        Commodity prices at the interest rate (sum 1).
    techniques : list of str
        The techniques run on the maximal ray (intensity above ``1e-9`` of the largest).
    expanding : ExpandingEconomy
        The underlying expanding-economy result.
    """

    growth_rate: float
    interest_rate: float
    intensities: pd.Series
    prices: pd.Series
    techniques: list[str]
    expanding: ExpandingEconomy


def _von_neumann_system(table: ActivityTable,
                        wage_basket: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    a, k = table.inputs.to_numpy(), table.capital.to_numpy()
    d = table.depreciation.to_numpy()
    p = a + k
    if wage_basket is not None:
        p = p + np.outer(wage_basket, table.labour.to_numpy().sum(axis=0))
    return p, table.outputs.to_numpy() + k * (1.0 - d)[None, :]


def von_neumann_choice(table: ActivityTable, *, wage_basket: ArrayLike | pd.Series | None
                       = None, tol: float = 1e-11) -> VonNeumannChoice:
    """Maximal balanced growth over all techniques and the techniques that attain it.

    Solves the expanding economy with advances ``P = A + K`` (plus
    ``h Σ_k L_k`` when a wage basket ``h`` feeds the workers) and returns
    ``Q = B + (1 − δ) K`` (see the module's conventions), so every technique
    is a process and the expansion chooses among them: techniques with zero
    intensity are not worth running at the maximal rate.

    Parameters
    ----------
    table : ActivityTable
    wage_basket : array_like or Series, shape (n,), optional
        Commodities consumed per unit of labour (all kinds); without it labour
        is not a constraint and the interest rate is the maximal profit rate
        ``R`` of :func:`wage_profit_frontier` (the growth rate too, when the
        system is irreducible).
    tol : float, default 1e-11
        Relative tolerance of the bisection.

    Returns
    -------
    VonNeumannChoice
    """
    h = None
    if wage_basket is not None:
        h = (wage_basket.reindex(table.commodities).fillna(0.0).to_numpy(dtype=float)
             if isinstance(wage_basket, pd.Series) else np.asarray(wage_basket, dtype=float))
        if h.shape != (len(table.commodities),) or not np.all(np.isfinite(h)) or \
                np.any(h < 0):
            raise invalid("wage_basket", "hold one number >= 0 per commodity", wage_basket)
    p, q = _von_neumann_system(table, h)
    res = expanding_economy(pd.DataFrame(p, index=table.inputs.index,
                                         columns=table.inputs.columns),
                            pd.DataFrame(q, index=table.inputs.index,
                                         columns=table.inputs.columns), tol=tol)
    y = res.intensities
    used = [str(t) for t in y.index[y > _USED * float(y.max())]]
    return VonNeumannChoice(growth_rate=res.expansion_factor - 1.0,
                            interest_rate=res.interest_factor - 1.0,
                            intensities=y, prices=res.prices, techniques=used, expanding=res)


# -- cost minimisation ----------------------------------------------------------
@dataclass(frozen=True)
class CheapestTechniques:
    """Result of :func:`cheapest_techniques`.

    Attributes
    ----------
    profit_rate : float
    wage : pandas.Series
        Wage rate of each labour kind.
    prices : pandas.Series
        Commodity prices (in the unit of the wage).
    techniques : pandas.Series
        The chosen technique for each commodity.
    unit_costs : pandas.Series
        Unit cost of every technique at these prices (per unit of its product).
    extra_cost : pandas.Series
        ``unit cost − price of its product`` by technique: 0 for the chosen,
        ``≥ 0`` for the others (0 for an equally cheap alternative).
    iterations : int
        Policy-iteration steps (switches of the whole set).
    """

    profit_rate: float
    wage: pd.Series
    prices: pd.Series
    techniques: pd.Series
    unit_costs: pd.Series
    extra_cost: pd.Series
    iterations: int

    @property
    def ties(self) -> list[str]:
        """Techniques not chosen but as cheap as the chosen one (to ``1e-9`` relative)."""
        chosen = set(self.techniques)
        scale = self.prices.abs().max()
        return [t for t, e in self.extra_cost.items()
                if t not in chosen and e <= 1e-9 * max(scale, 1e-300)]


@dataclass(frozen=True)
class _Single:
    """Arrays of a table without joint production, per unit of each technique's product."""

    product: np.ndarray  # (m,) commodity row of each technique
    a: np.ndarray  # (n, m)
    k: np.ndarray
    d: np.ndarray
    lab: np.ndarray  # (kinds, m)

    def advances(self, r: float) -> np.ndarray:
        """``M(r) = (1 + r) A + (r + δ) K``, per unit of product."""
        return (1.0 + r) * self.a + self.k * (r + self.d)[None, :]


def _single(table: ActivityTable) -> _Single:
    b = table.outputs.to_numpy()
    if table.joint_production:
        bad = [t for t, c in zip(table.techniques, (b > 0).sum(axis=0), strict=True) if c != 1]
        raise invalid("outputs", "have one positive entry per technique (no joint "
                      "production) for cost minimisation; use von_neumann_choice for joint "
                      "production", bad[:5])
    prod = table._product_rows()
    scale = b[prod, np.arange(b.shape[1])]
    missing = sorted(set(table.commodities) - set(table.produces))
    if missing:
        raise invalid("produces", "cover every commodity (each needs a technique)", missing)
    return _Single(product=prod, a=table.inputs.to_numpy() / scale,
                   k=table.capital.to_numpy() / scale, d=table.depreciation.to_numpy(),
                   lab=table.labour.to_numpy() / scale)


def _wage_vector(table: ActivityTable, wage: ArrayLike | pd.Series | float) -> np.ndarray:
    kinds = table.labour_kinds
    if isinstance(wage, pd.Series):
        unknown = [str(k) for k in wage.index if str(k) not in kinds]
        if unknown:
            raise invalid("wage", f"name labour kinds {kinds}", unknown)
        w = wage.reindex(kinds).fillna(0.0).to_numpy(dtype=float)
    else:
        w = np.broadcast_to(np.asarray(wage, dtype=float), (len(kinds),)).copy() \
            if np.ndim(wage) == 0 else np.asarray(wage, dtype=float)
    if w.shape != (len(kinds),) or not np.all(np.isfinite(w)) or np.any(w < 0) or \
            not np.any(w > 0):
        raise invalid("wage", f"be {len(kinds)} finite numbers >= 0, not all 0", wage)
    return w


def _solve_set(s: np.ndarray, m_r: np.ndarray, wl: np.ndarray) -> np.ndarray | None:
    """Prices ``p = p M_s + w l_s`` of the set ``s``, or None when ``M_s`` is not productive."""
    ms = m_r[:, s]
    if spectral_radius(ms) >= 1.0 - 1e-12:
        return None
    p = np.linalg.solve((np.eye(len(s)) - ms).T, wl[s])
    return p if np.all(np.isfinite(p)) else None


def _start(single: _Single, m_r: np.ndarray) -> np.ndarray | None:
    """A productive set: one technique per commodity from a basic solution of
    ``min Σ x`` s.t. ``(B − M(r)) x ≥ 1``, ``x ≥ 0`` (None when infeasible)."""
    n, m = m_r.shape
    b = np.zeros((n, m))
    b[single.product, np.arange(m)] = 1.0
    res = linprog(np.ones(m), A_ub=-(b - m_r), b_ub=-np.ones(n), bounds=(0, None),
                  method="highs-ds")
    if res.status != 0:
        return None
    x = res.x
    s = np.empty(n, dtype=int)
    for i in range(n):
        cand = np.nonzero(single.product == i)[0]
        s[i] = cand[np.argmax(x[cand])]
    return s


def _policy_iteration(single: _Single, r: float, wl: np.ndarray,
                      start: np.ndarray | None = None,
                      max_iter: int = 1000) -> tuple[np.ndarray, np.ndarray, int] | None:
    """Cheapest set, its prices and the steps taken (None when no set is productive)."""
    m_r = single.advances(r)
    n = m_r.shape[0]
    s = start
    p = _solve_set(s, m_r, wl) if s is not None else None
    if p is None:
        s = _start(single, m_r)
        if s is None:
            return None
        p = _solve_set(s, m_r, wl)
        if p is None:
            return None
    assert s is not None
    for step in range(max_iter):
        cost = p @ m_r + wl
        new = s.copy()
        for i in range(n):
            cand = np.nonzero(single.product == i)[0]
            best = cand[np.argmin(cost[cand])]
            if cost[best] < p[i] - _COST_TOL * max(abs(p[i]), float(np.abs(p).max()), 1e-300):
                new[i] = best
        if np.array_equal(new, s):
            return s, p, step
        p_new = _solve_set(new, m_r, wl)
        if p_new is None:  # only when some technique uses no labour at all
            raise SolverFailure("policy iteration reached an unproductive set; a technique "
                               "without labour makes the costs degenerate")
        s, p = new, p_new
    raise SolverFailure(f"policy iteration did not settle in {max_iter} steps")


def _maximal_rate(single: _Single, tol: float = 1e-9) -> float:
    """``R``: the supremum of the profit rates at which some technique set is productive.

    Some set is productive at ``r`` exactly when ``(B − M(r)) x ≥ 1`` has a
    solution ``x ≥ 0`` (see :func:`_start`); by the theorem of the alternative
    it has none exactly when some prices ``p ≥ 0``, ``p ≠ 0`` make no technique
    lose, ``p Q ≤ (1 + r) p P`` in the von Neumann system. So ``R = β* − 1``,
    the interest rate of :func:`von_neumann_choice` at zero wages (equal to its
    growth rate when the system is irreducible; for a decomposable one it is
    the slowest part that limits prices). Found by bisection on that
    feasibility test; at ``r = −1`` every set is productive. ``inf`` when sets
    stay productive beyond ``r = 1e6`` (a chain of techniques without a cycle
    of produced inputs).
    """
    def productive(r: float) -> bool:
        return _start(single, single.advances(r)) is not None

    lo, hi = -1.0, 1.0
    while productive(hi):
        lo, hi = hi, 2.0 * hi
        if hi > 1e6:
            return float("inf")
    while hi - lo > tol * max(1.0, abs(hi)):
        mid = 0.5 * (lo + hi)
        if productive(mid):
            lo = mid
        else:
            hi = mid
    # The solver's feasibility tolerance blurs the test within ~1e-9 of R; the set
    # productive at lo is the one that reaches R, and its own limit, where
    # ρ(M_s(r)) = 1 (the radius rises with r), is exact.
    s = _start(single, single.advances(lo))
    if s is None:
        return lo

    def excess(r: float) -> float:
        return spectral_radius(single.advances(r)[:, s]) - 1.0

    top = hi + 1e-6 * max(1.0, abs(hi))
    if excess(lo) < 0 <= excess(top):
        return max(lo, float(brentq(excess, lo, top, xtol=1e-15,
                                    rtol=4 * np.finfo(float).eps)))
    return lo


def cheapest_techniques(table: ActivityTable, wage: ArrayLike | pd.Series | float = 1.0,
                        profit_rate: float = 0.0) -> CheapestTechniques:
    """The cost-minimising technique for each commodity at a wage and profit rate.

    With no joint production the prices of a set ``s`` (one technique per
    commodity) solve ``p = p M_s(r) + w L_s`` with
    ``M(r) = (1 + r) A + (r + δ) K`` (see the module's conventions).

    Algorithm (policy iteration)
    ----------------------------
    1. Start from a productive set: a basic optimal solution of
       ``min Σ x`` s.t. ``(B − M(r)) x ≥ 1``, ``x ≥ 0`` runs at most ``n``
       techniques and each commodity needs one, so it names one per commodity,
       and ``(I − M_s) x_s ≥ 1`` with ``x_s > 0`` makes ``ρ(M_s) < 1``. When
       this programme is infeasible no set is productive at ``r``.
    2. Price the set: ``p = w L_s (I − M_s)^-1``.
    3. For each commodity switch to any technique whose unit cost at ``p`` is
       lower than ``p_i`` (by more than ``1e-10`` relative); stop when none is.

    Termination: after a switch to ``s'``, ``p ≥ p M_s' + w L_s'`` with strict
    inequality for the switched commodities. When every technique uses some
    labour this makes ``p M_s' < p`` with ``p > 0``, so ``ρ(M_s') < 1`` (the
    new set is productive) and iterating the inequality gives
    ``p_s' = w L_s' (I − M_s')^-1 ≤ p_s``, strictly lower where a switch was
    made. Prices fall at every step, so no set recurs, and the number of
    sets is finite. At the end ``p ≤ c_j(p)`` for every technique: ``p`` is
    the greatest price vector with no technique making a profit, the same
    for every final demand (the non-substitution theorem).

    Parameters
    ----------
    table : ActivityTable
        Without joint production.
    wage : float, array_like or Series, default 1
        Wage rate of each labour kind (a number is the same for all kinds).
    profit_rate : float, default 0
        ``r`` per period.

    Returns
    -------
    CheapestTechniques

    Raises
    ------
    InvalidInput
        For joint production, a commodity no technique makes, or a profit
        rate at which no technique set is productive (``r ≥ R``).

    Examples
    --------
    >>> t = activity_table([[0.5, 0.2]], labour=[1.0, 2.0], produces=["corn", "corn"],
    ...                    commodities=["corn"], techniques=["alpha", "beta"])
    >>> cheapest_techniques(t, wage=1.0, profit_rate=0.0).techniques.tolist()
    ['alpha']
    >>> cheapest_techniques(t, wage=1.0, profit_rate=0.5).techniques.tolist()
    ['beta']
    """
    single = _single(table)
    w = _wage_vector(table, wage)
    r = float(profit_rate)
    if not np.isfinite(r) or r <= -1.0:
        raise invalid("profit_rate", "be a finite number above -1", profit_rate)
    wl = w @ single.lab
    found = _policy_iteration(single, r, wl)
    if found is None:
        rate = _maximal_rate(single)
        raise invalid("profit_rate", f"be below the maximal profit rate R = {rate:.6g} "
                      "(no technique set is productive at it)", r)
    s, p, steps = found
    return _cheapest(table, single, r, w, s, p, steps)


def _cheapest(table: ActivityTable, single: _Single, r: float, w: np.ndarray, s: np.ndarray,
              p: np.ndarray, steps: int) -> CheapestTechniques:
    tidx = table.inputs.columns
    cidx = table.inputs.index
    cost = p @ single.advances(r) + w @ single.lab
    return CheapestTechniques(
        profit_rate=r, wage=pd.Series(w, index=table.labour.index, name="wage"),
        prices=pd.Series(p, index=cidx, name="price"),
        techniques=pd.Series([tidx[j] for j in s], index=cidx, name="technique"),
        unit_costs=pd.Series(cost, index=tidx, name="unit_cost"),
        extra_cost=pd.Series(cost - p[single.product], index=tidx, name="extra_cost"),
        iterations=steps)


# -- wage–profit frontier -------------------------------------------------------
@dataclass(frozen=True)
class WageProfitFrontier:
    """Result of :func:`wage_profit_frontier`.

    Attributes
    ----------
    table : pandas.DataFrame
        Tidy: ``profit_rate``, ``wage`` (wage units per unit of the numeraire),
        ``techniques`` (the cheapest set, ``commodity:technique`` joined by
        ``", "``) and ``switch`` (True on the rows added at switch points,
        where the two sets on either side give the same wage; such a row
        lists the set that takes over).
    switch_points : pandas.DataFrame
        ``profit_rate``, ``wage``, ``before`` and ``after`` (the sets on either side).
    reswitching : list of str
        Sets that are cheapest on two or more separate ranges of profit rates.
    maximal_profit_rate : float
        ``R``: beyond it no technique set is productive and the wage has fallen
        to 0 (``inf`` when the table does not bound it); the interest rate of
        :func:`von_neumann_choice`.
    numeraire : pandas.Series
        The basket whose price is 1.
    """

    table: pd.DataFrame
    switch_points: pd.DataFrame
    reswitching: list[str]
    maximal_profit_rate: float
    numeraire: pd.Series


def _crossing(single: _Single, wl: np.ndarray, u: np.ndarray, s_lo: np.ndarray,
              s_hi: np.ndarray, lo: float, hi: float) -> float:
    """The rate where the sets ``s_lo`` and ``s_hi`` give the same prices, within a bracket.

    The bisection on which set is cheapest leaves the switch point known to the
    cost tolerance of a switch; the root of ``u · (p_lo(r) − p_hi(r))`` (both sets
    price every commodity the same at a switch point) is exact. The bracket is
    widened a little to hold it; without a sign change (the sets touch without
    crossing) the bracket's midpoint is kept.
    """
    def gap(r: float) -> float:
        m_r = single.advances(r)
        a, b = _solve_set(s_lo, m_r, wl), _solve_set(s_hi, m_r, wl)
        if a is None or b is None:
            return float("nan")
        return float((a - b) @ u)

    pad = 1e-6 * max(1.0, abs(hi))
    left, right = lo - pad, hi + pad
    f_left, f_right = gap(left), gap(right)
    if np.isfinite(f_left) and np.isfinite(f_right) and f_left * f_right < 0:
        return float(brentq(gap, left, right, xtol=1e-15, rtol=4 * np.finfo(float).eps))
    return 0.5 * (lo + hi)


def _label(table: ActivityTable, s: np.ndarray) -> str:
    return ", ".join(f"{c}:{table.techniques[j]}" for c, j in zip(table.commodities, s,
                                                                  strict=True))


def wage_profit_frontier(table: ActivityTable, profit_rates: ArrayLike | None = None, *,
                         numeraire: ArrayLike | pd.Series | None = None,
                         wage_relatives: ArrayLike | pd.Series | float = 1.0,
                         points: int = 101, tol: float = 1e-12) -> WageProfitFrontier:
    """The wage as a function of the profit rate along the envelope of technique sets.

    At each profit rate the cheapest set (:func:`cheapest_techniques`) gives
    prices ``π(r)`` per unit wage; the wage in terms of the numeraire ``u`` is
    ``w(r) = 1 / (π(r) · u)``. The cheapest set has the lowest price of every
    commodity, so it has the highest wage whatever the (non-negative)
    numeraire: the frontier is the outer envelope of the sets' own curves.
    Where adjacent profit rates have different sets, the switch point is
    found by bisection on which set is cheapest (to ``tol``), so several
    switches between two grid points are all found.

    Parameters
    ----------
    table : ActivityTable
        Without joint production.
    profit_rates : array_like, optional
        Rates to evaluate, increasing. Default: ``points`` rates from 0 up to
        (not including) the maximal profit rate ``R``; required when ``R``
        is unbounded (techniques without a cycle of produced inputs).
    numeraire : array_like or Series, shape (n,), optional
        The basket whose price is 1 (default one unit of every commodity).
    wage_relatives : float, array_like or Series, default 1
        Relative wages of the labour kinds; the frontier's ``wage`` scales them.
    points : int, default 101
    tol : float, default 1e-12
        Width of the bracket left around each switch point.

    Returns
    -------
    WageProfitFrontier
    """
    single = _single(table)
    w = _wage_vector(table, wage_relatives)
    wl = w @ single.lab
    n = len(table.commodities)
    if numeraire is None:
        u = np.ones(n)
    elif isinstance(numeraire, pd.Series):
        u = numeraire.reindex(table.commodities).fillna(0.0).to_numpy(dtype=float)
    else:
        u = np.asarray(numeraire, dtype=float)
    if u.shape != (n,) or not np.all(np.isfinite(u)) or np.any(u < 0) or not np.any(u > 0):
        raise invalid("numeraire", f"be {n} finite numbers >= 0, not all 0", numeraire)
    big_r = _maximal_rate(single)
    if profit_rates is None:
        if not np.isfinite(big_r):
            raise invalid("profit_rates", "be given when the maximal profit rate is unbounded "
                          "(techniques without a cycle of produced inputs)", None)
        rates = np.linspace(0.0, big_r, max(int(points), 2) + 1)[:-1]
    else:
        rates = np.asarray(profit_rates, dtype=float).ravel()
        if rates.size == 0 or not np.all(np.isfinite(rates)) or np.any(rates <= -1) or \
                np.any(np.diff(rates) <= 0):
            raise invalid("profit_rates", "be increasing finite numbers above -1",
                          profit_rates)

    def solve(r: float, start: np.ndarray | None) -> tuple[np.ndarray, np.ndarray]:
        found = _policy_iteration(single, r, wl, start)
        if found is None:
            raise invalid("profit_rates", f"stay below the maximal profit rate "
                          f"R = {big_r:.6g}", r)
        return found[0], found[1]

    rows: list[tuple[float, float, str, bool]] = []
    switches: list[tuple[float, float, str, str]] = []

    def wage_of(p: np.ndarray) -> float:
        return 1.0 / float(p @ u)

    def bracket(lo: float, s_lo: np.ndarray, hi: float, s_hi: np.ndarray) -> None:
        """Record every switch in (lo, hi] between the sets at its ends."""
        if np.array_equal(s_lo, s_hi):
            return
        if hi - lo <= tol * max(1.0, abs(hi)):
            at = _crossing(single, wl, u, s_lo, s_hi, lo, hi)
            switches.append((at, wage_of(solve(at, s_lo)[1]),
                             _label(table, s_lo), _label(table, s_hi)))
            return
        mid = 0.5 * (lo + hi)
        s_mid, _ = solve(mid, s_lo)
        bracket(lo, s_lo, mid, s_mid)
        bracket(mid, s_mid, hi, s_hi)

    prev: tuple[float, np.ndarray] | None = None
    for r in rates:
        s, p = solve(float(r), prev[1] if prev else None)
        if prev is not None:
            before = len(switches)
            bracket(prev[0], prev[1], float(r), s)
            rows.extend((sr, sw, after, True) for sr, sw, _, after in switches[before:])
        rows.append((float(r), wage_of(p), _label(table, s), False))
        prev = (float(r), s)
    frame = pd.DataFrame(rows, columns=["profit_rate", "wage", "techniques", "switch"])
    # reswitching: a set that is cheapest again after another set took over
    runs = [str(x) for x in frame.loc[~frame["switch"], "techniques"]]
    segments = [t for i, t in enumerate(runs) if i == 0 or t != runs[i - 1]]
    seen: dict[str, int] = {}
    for t in segments:
        seen[t] = seen.get(t, 0) + 1
    return WageProfitFrontier(
        table=frame,
        switch_points=pd.DataFrame(switches,
                                   columns=["profit_rate", "wage", "before", "after"]),
        reswitching=[t for t, c in seen.items() if c > 1],
        maximal_profit_rate=big_r,
        numeraire=pd.Series(u, index=table.inputs.index, name="numeraire"))
