"""Diagnosis of impossible plans: an elastic re-solve and a conflict in words.

The commodity balances, capacity limits and the capital from before the plan
are physical and stay hard. Every condition of an elastic family may fall
short by ``m_r s_r``, ``s_r ≥ 0``, where ``m_r`` is the size of what the row
asks for (shortfalls are measured as shares, so the re-solve is well scaled).

Aims before facts
    Targets, consumption floors and falls and the terminal growth condition
    are the plan's *aims*: what an analyst negotiates. Labour supply and
    foreign-exchange inflows are *facts*: data. The re-solve is
    lexicographic: it first relaxes aims alone (facts held), minimising
    ``Σ w_r s_r`` over them; only when no relaxation of aims makes the plan
    possible does it find the least relaxation of the facts, hold it, and
    then relax the aims as little as it can. ``relax="facts"`` reverses the
    order (what labour or foreign exchange would make every aim possible),
    ``relax="together"`` weighs all of them in one sum, and a list gives
    any priority (families named first are relaxed first). With the default
    weight 1 the penalty adds shortfalls as shares of what was asked;
    ``weights`` by family set a penalty per unit of shortfall within a level.
    The other order is computed too when the budget allows, from the top
    level down (every problem on the way has a solution); it is not solved
    when the conditions the first order held have zero shadow prices at its
    optimum, for then no relaxation of them lessens the shortfall and the
    other order ends where the first did.

Each positive shortfall is then minimised alone with the others held at their
values (polishing), so ``achievable`` is the most that condition can reach with
every other condition as the re-solve left it: for a single missed condition,
its reachable maximum (every other condition of the plan kept), to the
precision of one maximisation.

Method and budget
    The re-solve chooses its method by the rule the plan's solve uses
    (:meth:`~growthplan.backends.highs.HighsBackend.rule`: simplex on small
    plans, interior point without crossover above it, HiPO where installed)
    at tolerance 1e-9 and interior-point optimality tolerance 1e-10, the
    precision the duality-gap
    certificate and the shortfalls need. The whole diagnosis has a time
    budget, by default ``BUDGET_FACTOR`` times the plan's own solve time (its
    measured time or the size estimate of
    :func:`~growthplan.lp.build.solve_seconds`, whichever is larger, and at
    least ``BUDGET_FLOOR`` seconds). Polishing (at most ``POLISH_LIMIT``
    solves), the conflict and the other view are skipped, each with its
    reason, when the budget would run out; under the default budget the
    re-solve itself always runs to the end, while a ``budget`` given by the
    caller binds it too (an unfinished diagnosis then says what it tried).

The conflict
    A set of conditions that cannot hold together: HiGHS's irreducible
    infeasible subset when it is available and the plan is small enough
    for its search (which no time limit stops), otherwise the library's own
    deletion filter on the conditions that bind at the elastic optimum (the
    rows with a non-zero shadow price: the elastic problem restricted to
    them has the same positive optimum, so they cannot all hold; the filter
    drops rows, groups at a time, while the rest stay infeasible), which
    keeps to the budget. Above ``CONFLICT_NONZERO_LIMIT`` nonzeros no simplex
    solve fits a budget, and the conflict is left to ``subset=True``.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd
from scipy import sparse

from ..backends.base import FAILED, Feature, Status
from ..backends.highs import HighsBackend, HighsSession
from ..backends.methods import METHODS
from ..errors import SolverFailure, invalid
from ..lp.conditions import CONDITIONS
from ..lp.program import LinearProgram

__all__ = ["Diagnosis", "Step", "diagnose", "elastic_program", "deletion_filter",
           "POSITIVE_SHARE", "IIS_ROW_LIMIT", "IIS_NONZERO_LIMIT", "OTHER_VIEW_FACTOR",
           "IDLE_PRICE",
           "CONFLICT_NONZERO_LIMIT", "POLISH_LIMIT", "BUDGET_FACTOR", "BUDGET_FLOOR",
           "RELAX"]

POSITIVE_SHARE = 1e-7     # a shortfall below this share of its requirement counts as none
IIS_ROW_LIMIT = 20_000    # larger plans skip the conflict by default
# HiGHS's own subset search has no time limit of its own: up to 60 × 30 (248,000
# nonzeros) it took 0.4 s on the benchmarks' plans, at 71 × 30 (340,000) its
# elasticity filter failed and its fallback had not ended after 5 minutes, so above
# this size the library's deletion filter (which keeps to the budget) is used instead
IIS_NONZERO_LIMIT = 200_000
# above this size the deletion filter's simplex solves cannot fit any budget (at
# 200 × 30, 2.5 million nonzeros, one dual simplex solve had not ended in 15 minutes)
CONFLICT_NONZERO_LIMIT = 1_000_000
POLISH_LIMIT = 12         # short conditions polished one by one (one solve each)
BUDGET_FACTOR = 4.0       # default budget: this many times the plan's own solve time ...
BUDGET_FLOOR = 10.0       # ... and at least this many seconds
# a level's least penalty is held within this share of itself while the earlier levels
# are minimised: looser than the solver's tolerances (1e-9), or the held problem is
# infeasible within them (HiGHS ended such a problem "unknown" on a 71-industry plan)
HOLD = 1e-7
IDLE_PRICE = 1e-7          # a held condition's shadow price per share below this is zero
OTHER_VIEW_FACTOR = 3.0   # the other view, unasked, may take this many re-solves' time (≥ 1 s)
# weight of the earlier levels' shortfalls while a later level is minimised: the later
# level's least penalty is then found within this share of the earlier levels' penalty
EARLIER_WEIGHT = 1e-9
TOLERANCE = 1e-9          # primal and dual feasibility of the re-solve
IPM_OPTIMALITY = 1e-10    # interior point's relative gap (HiGHS's default is 1e-8)
RELAX = ("aims", "facts", "together")
LIMITS = ("labour", "foreign_exchange", "emissions")  # "at most" rows: a shortfall is an excess
COLUMNS = ["condition", "sector", "year", "required", "achievable", "shortfall", "share",
           "unit", "kind"]


@dataclass
class Step:
    """One step of a diagnosis: what was done, how long it took, what came of it."""

    name: str
    seconds: float
    outcome: str

    def __str__(self) -> str:
        return f"{self.name}: {self.outcome} ({self.seconds:.2f} s)"


def _what(condition: str, sector: str) -> str:
    """ "output target energy", "labour" (a kind called "labour" is not said twice)."""
    return condition if sector in ("", condition) else f"{condition} {sector}"


def _words(table: pd.DataFrame, limit: int = 3) -> list[str]:
    out = []
    for r in table.head(limit).itertuples():
        if isinstance(getattr(r, "words", None), str) and r.words:
            out.append(r.words)  # a limit with a unit of its own says it best
            continue
        what = _what(r.condition, r.sector)
        unit = f" {r.unit}" if r.unit else ""
        if r.kind == "fact":
            out.append(f"{what} in {r.year} would have to be {r.required:,.6g}{unit} instead "
                       f"of {r.achievable:,.6g} (short by {r.shortfall:,.6g}, "
                       f"{100 * r.share:.1f} %)")
        else:
            out.append(f"the {what} in {r.year} cannot be met: at most {r.achievable:,.6g}"
                       f"{unit} can be reached of {r.required:,.6g} asked (short by "
                       f"{r.shortfall:,.6g}, {100 * r.share:.1f} %)")
    return out


@dataclass
class Diagnosis:
    """Which conditions of an impossible plan cannot be met, and by how much.

    Attributes
    ----------
    shortfalls : pandas.DataFrame
        One row per condition that falls short: condition, sector, year,
        required, achievable (its reachable maximum on its own, or for a fact
        what the plan has), shortfall, share (shortfall / required), unit and
        kind (``"aim"`` or ``"fact"``), ranked by share.
    status : Status
        Status of the elastic re-solve (``infeasible`` when even the hard
        conditions, the balances with their exogenous demand, cannot hold;
        ``time_limit`` when the budget ran out before it finished).
    total_penalty : float
        Optimal value of the last elastic re-solve (NaN when it found no plan).
    infeasible_subset : pandas.DataFrame or None
        Conditions that cannot all hold together, in words: kind, condition,
        year, name, description.
    notes : list of str
        What was skipped and why, and further remarks.
    relaxed : str
        The view of ``shortfalls``: ``"aims"``, ``"facts"``, ``"together"``
        or the priority given.
    other_view : pandas.DataFrame or None
        The shortfalls with the other order (facts first when aims came
        first, and the reverse), when it was computed and differs.
    subset_source : str
        Where the conflict came from (HiGHS's irreducible subset or the
        library's deletion filter), or why there is none.
    method : str
        The HiGHS method of the elastic re-solve.
    steps : list of Step
        Every step with its time and outcome.
    budget : float
        Seconds the diagnosis was given.
    audit_ok : bool or None
        Whether the elastic solution's schedules keep every hard condition
        (balances, capacity, signs, ceilings) in the independent audit; None
        when there was no elastic solution.
    """

    shortfalls: pd.DataFrame
    status: Status
    total_penalty: float
    infeasible_subset: pd.DataFrame | None = None
    notes: list[str] = field(default_factory=list)
    relaxed: str = "aims"
    other_view: pd.DataFrame | None = None
    subset_source: str = ""
    method: str = ""
    steps: list[Step] = field(default_factory=list)
    budget: float = float("nan")
    audit_ok: bool | None = None

    @property
    def confirmed(self) -> bool:
        """True when the re-solve found a positive shortfall (or no plan at all)."""
        return self.status is Status.INFEASIBLE or (
            self.status is Status.OPTIMAL and not self.shortfalls.empty)

    @property
    def seconds(self) -> float:
        """Time of all steps together."""
        return float(sum(s.seconds for s in self.steps))

    def conflict(self) -> str:
        """The conditions that cannot hold together, as one sentence.

        Returns
        -------
        str
            ``""`` only when no conflict was computed; then
            :attr:`subset_source` says why.
        """
        if self.infeasible_subset is None or self.infeasible_subset.empty:
            return ""
        parts = []
        rows = self.infeasible_subset[self.infeasible_subset["kind"] == "condition"]
        for _, grp in rows.groupby(["condition", "name"], sort=False):
            years = sorted({y for y in grp["year"] if isinstance(y, int | np.integer)})
            text = str(grp["description"].iloc[0])
            if len(years) > 1:
                span = (f"{min(years)}–{max(years)}" if max(years) - min(years) + 1 == len(years)
                        else ", ".join(map(str, years)))
                text = text.replace(f"in {grp['year'].iloc[0]}", f"in {span}")
            parts.append(text)
        parts = parts or list(dict.fromkeys(self.infeasible_subset["description"]))
        if len(parts) == 1:
            return f"{parts[0][0].upper()}{parts[0][1:]} cannot hold."
        text = ", ".join(parts[:-1]) + " and " + parts[-1]
        return f"{text[0].upper()}{text[1:]} cannot all hold together."

    def status_words(self) -> str:
        """The plan's status in words: "impossible: the energy target in 2034 cannot be met; …".

        Returns
        -------
        str
        """
        if self.status is Status.INFEASIBLE:
            return ("impossible: even with every target, floor, labour and foreign-exchange "
                    "limit relaxed, the commodity balances cannot hold")
        if self.status is not Status.OPTIMAL:
            return "impossible (the diagnosis did not finish)"
        if self.shortfalls.empty:
            return "not shown impossible: the elastic re-solve found no shortfall"
        return "impossible: " + "; ".join(_words(self.shortfalls, 1)) + (
            f"; {len(self.shortfalls) - 1} more condition(s) short"
            if len(self.shortfalls) > 1 else "")

    def headline(self) -> str:
        """One or more sentences naming the worst conditions (or what was tried).

        Returns
        -------
        str
        """
        if self.status is Status.INFEASIBLE:
            return ("Even with every target, floor and labour limit relaxed the plan is "
                    "impossible: the commodity balances with the exogenous demand and the "
                    "capacity from before the plan cannot hold.")
        if self.status is not Status.OPTIMAL:
            tried = "; ".join(map(str, self.steps)) or "nothing"
            return (f"The diagnosis did not finish within its budget of {self.budget:.3g} s "
                    f"(elastic re-solve: {self.status.value}). Tried: {tried}. Try next: "
                    "diagnose(result.lp, budget=<more seconds>), or method='simplex' "
                    "on a small plan, or relax='together'.")
        if self.shortfalls.empty:
            return "The elastic re-solve found no shortfall: the plan is feasible."
        parts = [r.words if isinstance(getattr(r, "words", None), str) and r.words else
                 f"{_what(r.condition, r.sector)} {r.year}"
                 + f" short by {r.shortfall:,.6g}{' ' + r.unit if r.unit else ''}"
                 f" ({100 * r.share:.1f} %)" for r in self.shortfalls.head(3).itertuples()]
        text = "Cannot be met: " + "; ".join(parts) + "."
        if self.relaxed == "aims" and (self.shortfalls["kind"] == "fact").any():
            text += " No relaxation of the targets and floors alone makes the plan possible."
        return text

    def views(self) -> str:
        """Both views in words when they differ (aims first, facts first), else ``""``.

        Returns
        -------
        str
        """
        if self.other_view is None:
            return ""
        first = "the aims" if self.relaxed == "aims" else "the facts"
        other = "the facts (labour, foreign exchange)" if self.relaxed == "aims" \
            else "the aims (targets, floors)"
        if self.other_view.empty:
            return (f"Relaxing {other} instead does not make the plan possible with "
                    f"{first} held.")
        return (f"Relaxing {other} instead: " + "; ".join(_words(self.other_view, 3)) + ".")


# -- the elastic programme ----------------------------------------------------------------

def _base(lp: LinearProgram) -> LinearProgram:
    """``lp`` without the rows added by objective stages."""
    held = [b for b in lp.rows if b not in {c.name for c in CONDITIONS}]
    if not held:
        return lp
    first = min(lp.rows[b].start for b in held)
    keep = {k: v for k, v in lp.rows.items() if k not in held}
    return lp.replace(matrix=sparse.csc_array(lp.matrix[:first]),
                      row_lower=lp.row_lower[:first], row_upper=lp.row_upper[:first], rows=keep)


def elastic_program(lp: LinearProgram, *, weights: dict[str, float] | None = None
                    ) -> tuple[LinearProgram, list[dict[str, Any]]]:
    """The elastic version of ``lp`` and one record per shortfall column.

    Parameters
    ----------
    lp : LinearProgram
        A plan's programme (objective stages and held rows are ignored).
    weights : dict, optional
        Penalty per unit of shortfall by family (``"targets"``, ``"labour"``, …).

    Returns
    -------
    (LinearProgram, list of dict)
        The programme with one shortfall column per elastic row (cost: the
        weight; all shortfalls free) and, per column, its family, role
        (``"aim"`` or ``"fact"``), label, requirement, unit and condition.
    """
    d = lp.data
    assert d is not None
    lp = _base(lp)
    sign = lp.row_sign
    rows: list[np.ndarray] = []
    coefs: list[np.ndarray] = []
    cost: list[np.ndarray] = []
    info: list[dict[str, Any]] = []
    for cond in CONDITIONS:
        if not cond.elastic or cond.name not in lp.rows:
            continue
        b = lp.rows[cond.name]
        lower, upper = lp.row_lower[b.start:b.stop], lp.row_upper[b.start:b.stop]
        required = np.asarray(cond.required(d, b, lower, upper), dtype=float)
        unit = np.asarray(cond.magnitude(d, required), dtype=float)
        unit = np.where(unit > 0, unit, 1.0)
        w = (weights or {}).get(cond.name)
        r = np.arange(b.start, b.stop)
        rows.append(r)
        coefs.append(-sign[r] * unit)  # ≥ row: + m s on the left; ≤ row: − m s
        cost.append(np.ones(b.size) if w is None else float(w) * unit)
        info.extend({"family": cond.name, "role": cond.role or "aim", "label": b.label(i),
                     "required": required[i], "unit": unit[i], "condition": cond}
                    for i in range(b.size))
    k = len(info)
    m = lp.shape[0]
    r_all = np.concatenate(rows) if rows else np.zeros(0, int)
    c_all = np.concatenate(coefs) if coefs else np.zeros(0)
    el = sparse.csc_array((c_all, (r_all, np.arange(k))), shape=(m, k))
    base = lp.replace(cost=np.zeros(lp.shape[1]), sense="min", stages=[])
    out = base.add_cols("shortfall", el,
                        np.concatenate(cost) if cost else np.zeros(0), np.zeros(k),
                        np.full(k, np.inf), tuple(i["label"] for i in info))
    return out, info


def _priority(relax: Any, info: list[dict[str, Any]]) -> tuple[str, list[list[str]]]:
    """(name of the view, groups of families in the order they are relaxed)."""
    families = list(dict.fromkeys(i["family"] for i in info))
    aims = [f for f in families if next(i["role"] for i in info if i["family"] == f) == "aim"]
    facts = [f for f in families if f not in aims]
    if isinstance(relax, str):
        if relax not in RELAX:
            raise invalid("relax", f"be one of {list(RELAX)} or a list of condition families",
                          relax)
        groups = {"aims": [aims, facts], "facts": [facts, aims],
                  "together": [aims + facts]}[relax]
        return relax, [g for g in groups if g]
    if not isinstance(relax, list | tuple) or not relax:
        raise invalid("relax", f"be one of {list(RELAX)} or a list of condition families",
                      relax)
    known = {c.name for c in CONDITIONS if c.elastic}
    groups = []
    for item in relax:
        group = [item] if isinstance(item, str) else list(item)
        for f in group:
            if f not in known:
                raise invalid("relax", f"name condition families among {sorted(known)}", f)
        groups.append([f for f in group if f in families])
    named = {f for g in groups for f in g}
    rest = [f for f in families if f not in named]  # unnamed families come last
    return "priority", [g for g in [*groups, rest] if g]


# -- solving ------------------------------------------------------------------------------

class _Clock:
    def __init__(self, budget: float, hard: bool = False) -> None:
        self.budget = budget
        self.hard = hard  # a budget the caller gave binds the re-solve itself too
        self.t0 = time.perf_counter()
        self.steps: list[Step] = []

    def left(self) -> float:
        return self.budget - (time.perf_counter() - self.t0)

    def log(self, name: str, t0: float, outcome: str) -> None:
        self.steps.append(Step(name, time.perf_counter() - t0, outcome))


def _solver(elastic: LinearProgram, method: str, threads: int | None,
            time_limit: float | None) -> HighsBackend:
    # the plan's own measured rule (HiPO where this install has it), its options kept
    rule = HighsBackend(method).rule(elastic.nnz, elastic.formulation)
    chosen = rule.method
    opts: dict[str, Any] = dict(rule.options)
    if chosen.startswith("ipm"):
        opts["ipm_optimality_tolerance"] = IPM_OPTIMALITY
    solver = HighsBackend(chosen, tolerance=TOLERANCE, threads=threads, options=opts,
                          time_limit=None if time_limit is None else max(time_limit, 1e-3))
    solver._warn_slow = False  # the rule chose it (or the caller did, knowingly)
    return solver


def _run(lp: LinearProgram, solver: HighsBackend, clock: _Clock, name: str,
         callback: Any = None, stop: Any = None, essential: bool = False,
         alternatives: bool = True) -> Any:
    """One solve with the budget left as its time limit; alternatives when it fails.

    An ``essential`` solve (the re-solve itself) has no time limit under the default
    budget: a diagnosis is never given up for a budget the caller did not set.
    Without ``alternatives`` a failed solve is returned as it is.
    """
    t0 = time.perf_counter()
    limit = max(clock.left(), 1e-3) if clock.hard or not essential else None
    s = HighsBackend(solver.method, tolerance=solver.tolerance, threads=solver.threads,
                     options=solver.options, time_limit=limit, scale=solver.scale,
                     presolve=solver.presolve)
    s._warn_slow = False
    out = s.solve(lp, stop=stop, callback=callback)
    if out.status in FAILED and alternatives:
        for alt in s.alternatives():
            if clock.left() <= 0 and (clock.hard or not essential):
                break
            again = alt.solve(lp, stop=stop)
            if again.status not in FAILED:
                again.options["fallback_from"] = f"{out.method}: {out.status.value}"
                out = again
                break
    clock.log(name, t0, f"{out.status.value} by {out.method}")
    return out


@dataclass
class _View:
    status: Status
    s: np.ndarray                      # shares, one per shortfall column
    penalty: float = float("nan")
    final: LinearProgram | None = None  # the last programme solved (held rows, bounds)
    level: int = 0
    duals: np.ndarray | None = None     # row duals of the first feasible level
    seconds: float = 0.0                # of the first feasible level's solve
    method: str = ""
    x: np.ndarray | None = None         # the elastic solution (last level)


def _solve_view(elastic: LinearProgram, info: list[dict[str, Any]], groups: list[list[str]],
                solver: HighsBackend, clock: _Clock, tag: str, callback: Any = None,
                stop: Any = None, essential: bool = False, top_down: bool = False) -> _View:
    """The lexicographic elastic re-solve over ``groups`` (relaxed in that order).

    Bottom-up (the default) it tries the first group alone, then the first two,
    and so on, holding each level's least shortfall on the way back down: one
    solve when the first group suffices. ``top_down`` starts with every group
    relaxed and holds its way down (one solve per group, each problem with a
    solution): the same optimum without solving levels that have no solution,
    which is how the other view (whose first level seldom has one) is found.
    """
    b = elastic.cols["shortfall"]
    k = b.size
    group = np.full(k, len(groups))
    for g, fams in enumerate(groups):
        group[np.isin([i["family"] for i in info], fams)] = g
    weight = elastic.cost[b.start:b.stop].copy()

    def level_cost(g: int) -> tuple[np.ndarray, np.ndarray]:
        # (the level's own penalty, what is minimised): the earlier levels, free at
        # this one, carry EARLIER_WEIGHT of theirs, so that the optimal face is bounded
        # (an interior point does not converge on an unbounded one)
        own = np.zeros(elastic.shape[1])
        own[b.start:b.stop] = np.where(group == g, weight, 0.0)
        tie = own.copy()
        tie[b.start:b.stop] += np.where(group < g, EARLIER_WEIGHT * weight, 0.0)
        return own, tie

    last = Status.UNKNOWN
    for g in range(len(groups) - 1 if top_down else 0, len(groups)):
        up = elastic.col_upper.copy()
        up[b.start:b.stop] = np.where(group <= g, np.inf, 0.0)
        cost, tie = level_cost(g)
        lp = elastic.replace(col_upper=up, cost=tie)
        where = " + ".join(", ".join(x) for x in groups[:g + 1])
        final = g == len(groups) - 1
        # a level before the last may be impossible, and an interior point often ends
        # such a problem undecided; moving on is sound: the next level, with its own
        # least shortfall held, is the same problem whenever this one had a solution
        out = _run(lp, solver, clock, f"{tag}: relax {where}", callback, stop, essential,
                   alternatives=final)
        if not final and out.status in FAILED and lp.nnz <= CONFLICT_NONZERO_LIMIT \
                and solver.method != "simplex":
            # undecided but not shown impossible: where simplex still fits, it decides on
            # the problem as it is (on a 71-industry plan from published tables the
            # interior point and simplex on the equilibrated copy both ended "unknown")
            plain = HighsBackend("simplex", tolerance=solver.tolerance, threads=solver.threads,
                                 scale=False)
            out = _run(lp, plain, clock, f"{tag}: relax {where}", callback, stop, essential,
                       alternatives=False)
        last = out.status
        if out.status is Status.INFEASIBLE or (not final and out.status in FAILED):
            continue
        if out.status is not Status.OPTIMAL:
            return _View(out.status, np.zeros(k), method=out.method)
        view = _View(Status.OPTIMAL, np.zeros(k), level=g, duals=out.row_dual,
                     seconds=out.seconds, method=out.method)
        # lexicographic: hold this level's least shortfall, then relax the earlier levels
        for h in range(g - 1, -1, -1):
            f = float(cost @ out.x)
            row = sparse.csr_array(cost[None, :])
            lp = lp.add_rows("held_shortfall", row, np.array([-np.inf]),
                             np.array([f * (1 + HOLD) + HOLD * 1e-3]), (f"level_{h + 1}",))
            cost, tie = level_cost(h)
            lp = lp.replace(cost=tie)
            again = _run(lp, solver, clock, f"{tag}: hold {', '.join(groups[h + 1])}, "
                         f"relax {', '.join(groups[h])}", callback, stop, essential)
            if again.status is not Status.OPTIMAL:
                # the earlier levels' shortfalls would not be their least: no table
                return _View(again.status, np.zeros(k), method=again.method)
            out = again
        view.s = np.maximum(b.take(out.x), 0.0)
        view.x = out.x
        view.penalty = float(elastic.cost @ out.x)
        view.final = lp
        return view
    return _View(last, np.zeros(k))


def _held_price(elastic: LinearProgram, info: list[dict[str, Any]], view: _View,
                groups: list[list[str]]) -> float | None:
    """Largest shadow price, per share, of the conditions a first-level view held.

    At the first level the later groups' shortfalls are held at zero; the
    reduced cost of such a column, ``m_r |y_r|``, is how fast the penalty
    would fall per share of that condition relaxed. The least penalty is a
    convex function of the held conditions' levels, so when every such price
    is zero no relaxation of them, however large, lessens it: the other order
    of relaxation ends where this one did. None when the view is not at its
    first level or has no duals.
    """
    if view.level != 0 or view.duals is None or len(groups) < 2:
        return None
    b = elastic.cols["shortfall"]
    first = set(groups[0])
    held = [k for k, i in enumerate(info) if i["family"] not in first]
    if not held:
        return None
    cols = sparse.csc_array(elastic.matrix)
    rows = np.array([cols.indices[cols.indptr[b.start + k]] for k in held])
    units = np.array([info[k]["unit"] for k in held])
    return float(np.max(np.abs(view.duals[rows]) * units))


def _polish(view: _View, clock: _Clock, solver: HighsBackend, limit: int,
            notes: list[str], tag: str, stop: Any = None) -> None:
    """Each positive shortfall made as small as it can be, the others held.

    Minimising ``s_k`` with every other shortfall held at its value is maximising
    that condition with every other condition as the re-solve left it: with one
    missed condition, the gap to its reachable maximum. The joint re-solve weighs
    many columns at once and stops within its tolerances; this solve gives the
    shortfall to the precision of one maximisation. With a single positive
    shortfall the joint optimum is already that maximum, so an interior-point
    re-solve (tolerance 1e-10 on the gap) is not polished again.
    """
    final = view.final
    assert final is not None
    b = final.cols["shortfall"]
    s = view.s
    short = np.flatnonzero(s > POSITIVE_SHARE)
    if short.size == 0:
        return
    if short.size == 1 and view.method.startswith(("ipm", "hipo")):
        clock.steps.append(Step(f"{tag}: polish", 0.0, "one shortfall: the re-solve's own"))
        return
    order = short[np.argsort(-s[short], kind="stable")]
    per = max(view.seconds, 1e-3)
    session = None
    for n, k in enumerate(order):
        if n >= limit:
            notes.append(f"{order.size - n} of {order.size} shortfalls are from the joint "
                         f"re-solve, not each minimised alone (polishing is limited to "
                         f"{limit} solves).")
            break
        if clock.left() < 1.5 * per:
            notes.append(f"{order.size - n} of {order.size} shortfalls are from the joint "
                         f"re-solve, not each minimised alone: the time budget "
                         f"({clock.budget:.3g} s) would run out (one solve takes about "
                         f"{per:.3g} s).")
            break
        t0 = time.perf_counter()
        if session is None:  # loaded once: each polish starts from the last basis
            session = HighsSession(final, method=view.method if view.method in METHODS
                                   else solver.method, tolerance=TOLERANCE,
                                   threads=solver.threads)
            if session.method.startswith("ipm"):
                session.h.setOptionValue("ipm_optimality_tolerance", IPM_OPTIMALITY)
        cost = np.zeros(final.shape[1])
        cost[b.start + k] = 1.0
        session.costs(cost)
        cols = b.start + np.arange(b.size)
        lo, up = final.col_lower[cols].copy(), final.col_upper[cols].copy()
        others = np.delete(np.arange(b.size), k)
        lo[others] = up[others] = s[others]
        session.col_bounds(cols, lo, up)
        status, x, _ = session.run(max(clock.left(), 1e-3))
        outcome = status.value
        if status is Status.OPTIMAL and x is not None:
            got = max(float(x[b.start + k]), 0.0)
            if got <= s[k] * (1 + 1e-6) + 1e-12:
                s[k] = got
            outcome += f", share {s[k]:.6g}"
        clock.log(f"{tag}: polish {k}", t0, outcome)
        per = max(per, clock.steps[-1].seconds)


def _table(view: _View, info: list[dict[str, Any]], d: Any) -> pd.DataFrame:
    recs = []
    for rec, share in zip(info, view.s, strict=True):
        if not share > POSITIVE_SHARE:
            continue
        short = float(share * rec["unit"])
        cond = rec["condition"]
        cond_name, sector, year = cond.shortfall_label(rec["label"])
        unit = cond.unit(d, rec["label"]) if d is not None else ""
        required = float(rec["required"])
        words = cond.excess_words(d, rec["label"], short) if d is not None else None
        if rec["family"] in LIMITS:  # a limit exceeded: what would be needed
            need = required + short
            recs.append((cond_name, sector, year, need, required, short,
                         short / need if need else np.inf, unit, rec["role"], words))
        else:
            recs.append((cond_name, sector, year, required, required - short, short,
                         short / required if required else np.inf, unit, rec["role"], words))
    table = pd.DataFrame(recs, columns=[*COLUMNS, "words"])
    if table["words"].isna().all():
        table = table.drop(columns="words")  # only limits with a unit of their own have words
    return table.sort_values(["share", "shortfall"], ascending=False,
                             kind="stable").reset_index(drop=True)


def _audit(lp: LinearProgram, view: _View) -> tuple[bool, str]:
    """Audit the elastic solution's schedules: every hard condition must hold.

    The relaxed families (aims and facts) are not judged here: they fall short
    by the shortfalls reported.
    """
    from .audit import audit
    from .tables import schedules

    d = lp.data
    assert d is not None and view.x is not None
    base = _base(lp)
    sched = schedules(d, base, view.x[:base.shape[1]])
    rep = audit(d, sched)  # fills in the independent recomputation the families read
    soft = {c.kind for cond in CONDITIONS if cond.elastic and cond.applies(d)
            for c in cond.audit(d, sched)}
    hard = rep.checks.drop(index=[k for k in rep.checks.index if k in soft])
    worst = float(hard["max_relative"].max()) if not hard.empty else 0.0
    ok = bool(np.isfinite(worst) and worst <= rep.tolerance)
    where = str(hard["max_relative"].idxmax()) if not hard.empty else ""
    return ok, f"largest violation of a hard condition {worst:.2g} (relative, {where})"


# -- the conflict -------------------------------------------------------------------------

def _describe(lp: LinearProgram, rows: list[int], cols: list[int]) -> pd.DataFrame:
    by_name = {c.name: c for c in CONDITIONS}
    recs = []
    for r in rows:
        b = lp.block_of_row(r)
        label = b.label(r - b.start)
        cond = by_name.get(b.name)
        text = cond.describe(label) if cond is not None else " ".join(map(str, label))
        year, name = _year_name(label)
        recs.append(("condition", b.name, year, name, text))
    for c in cols:
        b = lp.block_of_col(c)
        label = b.label(c - b.start)
        year, name = _year_name(label)
        if b.name == "starts" and np.isfinite(lp.col_upper[c]):
            text = f"the starts ceiling of {name} in {year}"
        else:
            what = {"output": "output", "starts": "capacity starts", "consumption":
                    "consumption", "imports": "imports", "exports": "exports"}.get(b.name, b.name)
            text = f"{what}{' of ' + name if name else ''} in {year} being at least zero" \
                if year != "" else f"the bound on {what}"
        recs.append(("bound", b.name, year, name, text))
    return pd.DataFrame(recs, columns=["kind", "condition", "year", "name", "description"])


def _year_name(label: tuple[Any, ...]) -> tuple[Any, str]:
    parts = list(label[1:])
    if parts and isinstance(parts[0], tuple):
        parts = list(parts[0])
    year = parts[0] if parts else ""
    name = str(parts[1]) if len(parts) > 1 else ""
    if len(parts) > 1 and isinstance(parts[1], tuple) and len(parts[1]) == 3:
        name = "{2} from {0} to {1}".format(*parts[1])  # a shipment: origin, destination, good
    return year, name


def deletion_filter(lp: LinearProgram, candidates: np.ndarray, *,
                    deadline: float | None = None,
                    threads: int | None = None) -> np.ndarray | None:
    """An irreducible infeasible set of rows among ``candidates`` (column bounds kept).

    Rows are dropped a group at a time while the rest stay infeasible; a
    group that cannot go is halved until single rows are tested. Rows early
    in ``candidates`` are dropped first, so put those to keep (the aims) last.
    One HiGHS model is kept loaded and a dropped row only loses its bounds,
    so each test starts from the last basis (dual simplex).

    Parameters
    ----------
    lp : LinearProgram
        The plan's programme.
    candidates : numpy.ndarray
        Row indices whose rows, with every column bound, are infeasible.
    deadline : float, optional
        ``time.perf_counter()`` value after which it gives up (None is returned).
    threads : int, optional
        HiGHS threads.

    Returns
    -------
    numpy.ndarray or None
        The rows of the set, or None when the candidates are not infeasible
        or the deadline passed.
    """
    lp = _base(lp).replace(cost=np.zeros(_base(lp).shape[1]), sense="min", stages=[])
    session = HighsSession(lp, method="simplex", threads=threads)
    lower, upper = lp.row_lower, lp.row_upper
    keep = np.asarray(candidates, dtype=int)

    def drop(rows: np.ndarray) -> None:
        session.row_bounds(rows, np.full(rows.size, -np.inf), np.full(rows.size, np.inf))

    def restore(rows: np.ndarray) -> None:
        session.row_bounds(rows, lower[rows], upper[rows])

    def infeasible() -> bool:
        left = None if deadline is None else deadline - time.perf_counter()
        if left is not None and left <= 0:
            raise TimeoutError
        status, _, _ = session.run(left)
        if status not in (Status.OPTIMAL, Status.INFEASIBLE, Status.TIME_LIMIT):
            # presolve can leave a nearly infeasible problem undecided; without it the
            # simplex decides (a test that stays undecided keeps its rows)
            session.h.setOptionValue("presolve", "off")
            status, _, _ = session.run(None if deadline is None
                                       else deadline - time.perf_counter())
            session.h.setOptionValue("presolve", "on")
        if status is Status.TIME_LIMIT:
            raise TimeoutError
        return status is Status.INFEASIBLE

    try:
        drop(np.setdiff1d(np.arange(lp.shape[0]), keep))
        if not infeasible():
            return None
        start = max(1, keep.size // 8)
        i, c = 0, start
        while i < keep.size:
            c = min(c, keep.size - i)
            chunk = keep[i:i + c]
            drop(chunk)
            if keep.size > c and infeasible():
                keep = np.concatenate([keep[:i], keep[i + c:]])
                c = min(2 * c, start)  # a group went: try a larger one next
                continue
            restore(chunk)
            if c > 1:
                c //= 2
            else:
                i += 1
    except TimeoutError:
        return None
    return keep


def _conflict(lp: LinearProgram, view: _View | None, backend: Any, subset: bool | None,
              clock: _Clock) -> tuple[pd.DataFrame | None, str]:
    base = _base(lp)
    rows = base.shape[0]
    est_iis = None if view is None else max(view.seconds, 1e-3)
    if subset is False:
        return None, "not computed (subset=False)"
    if subset is None and (rows > IIS_ROW_LIMIT or base.nnz > CONFLICT_NONZERO_LIMIT or
                           (est_iis is not None and clock.left() < 2 * est_iis)):
        tests = int(2 * max(1.0, np.log2(max(rows, 2))))
        guess = (est_iis or 1.0) * tests
        return None, (f"not computed: the plan has {rows:,} rows and {base.nnz:,} nonzeros; "
                      f"set subset=True to compute it (about {guess:.0f} s or more: some "
                      f"{tests} simplex solves, each at least as long as the re-solve)")
    reason = ""
    small = rows <= IIS_ROW_LIMIT and base.nnz <= IIS_NONZERO_LIMIT
    if backend is not None and Feature.IIS in getattr(backend, "features", ()) and small:
        t0 = time.perf_counter()
        try:
            found = backend.iis(base)
        except SolverFailure as exc:
            found, reason = None, str(exc)
        clock.log("conflict: HiGHS irreducible subset", t0,
                  "found" if found else f"none ({reason or 'empty'})")
        if found is not None:
            return _describe(base, *found), "HiGHS's irreducible infeasible subset"
        reason = reason or "it returned none"
    elif backend is not None and Feature.IIS not in getattr(backend, "features", ()):
        reason = f"the back end {getattr(backend, 'name', '')!r} has none"
    else:
        reason = (f"skipped above {IIS_ROW_LIMIT:,} rows or {IIS_NONZERO_LIMIT:,} nonzeros, "
                  "where its search has no time limit")
    # the library's own: a deletion filter on the rows that bind at the elastic optimum
    t0 = time.perf_counter()
    cand = np.arange(rows)
    if view is not None and view.duals is not None:
        y = np.abs(view.duals[:rows])
        bind = np.flatnonzero(y > 1e-7 * max(float(y.max(initial=0.0)), 1e-300))
        if bind.size:
            cand = bind
    elastic_names = {c.name for c in CONDITIONS if c.elastic}
    soft = np.array([base.block_of_row(int(r)).name in elastic_names for r in cand], bool)
    cand = np.concatenate([cand[~soft], cand[soft]])  # aims and facts tested last
    deadline = time.perf_counter() + clock.left() if subset is None else None
    found_rows = deletion_filter(base, cand, deadline=deadline)
    if found_rows is None and cand.size < rows:
        found_rows = deletion_filter(base, np.arange(rows), deadline=deadline)
    clock.log("conflict: deletion filter", t0,
              f"{0 if found_rows is None else found_rows.size} conditions")
    if found_rows is None:
        return None, f"not found (HiGHS's subset: {reason}; the deletion filter ran out of " \
                     "time or found the binding conditions feasible)"
    return (_describe(base, sorted(int(r) for r in found_rows), []),
            f"the library's deletion filter on the binding conditions (HiGHS's irreducible "
            f"subset: {reason})")


# -- the diagnosis ------------------------------------------------------------------------

def default_budget(lp: LinearProgram, plan_seconds: float | None = None) -> float:
    """``BUDGET_FACTOR`` × the plan's solve time (measured or estimated), ≥ ``BUDGET_FLOOR``.

    Parameters
    ----------
    lp : LinearProgram
    plan_seconds : float, optional
        The plan's own measured solve time.

    Returns
    -------
    float
        Seconds.
    """
    from ..lp.build import solve_seconds

    ref = max(plan_seconds or 0.0, solve_seconds(lp.nnz))
    return max(BUDGET_FLOOR, BUDGET_FACTOR * ref)


def diagnose(lp: LinearProgram, *, weights: dict[str, float] | None = None,
             subset: bool | None = None, backend: Any = None, relax: Any = "aims",
             budget: float | None = None, method: str = "auto", polish: int = POLISH_LIMIT,
             other_view: bool | None = None, plan_seconds: float | None = None,
             progress: bool = False, threads: int | None = None,
             stop: Any = None) -> Diagnosis:
    """Elastic re-solve of a plan's programme (see the module notes).

    Parameters
    ----------
    lp : LinearProgram
    weights : dict, optional
        Penalty per unit of shortfall by family (``"targets"``, ``"labour"``, …),
        within a level of the priority.
    subset : bool, optional
        Compute the conflict. Default: when the plan has at most
        ``IIS_ROW_LIMIT`` rows and ``CONFLICT_NONZERO_LIMIT`` nonzeros and
        the budget allows; ``True`` always.
    backend : Backend, optional
        The back end the plan was solved with; its infeasible-subset feature
        is used when it has one (default: HiGHS).
    relax : {"aims", "facts", "together"} or list, default "aims"
        The order of relaxation (see the module notes); a list names
        condition families (or lists of them) in the order they are relaxed.
    budget : float, optional
        Seconds for the whole diagnosis, the re-solve included (default
        :func:`default_budget`, which never stops the re-solve itself).
    method : str, default "auto"
        HiGHS method of the elastic re-solve; ``"auto"`` follows the plan's rule.
    polish : int, default POLISH_LIMIT
        At most this many shortfalls are each minimised alone.
    other_view : bool, optional
        Also compute the shortfalls with the other order (facts first when
        aims come first); default: when the budget allows, within
        ``OTHER_VIEW_FACTOR`` times the re-solve's own time (``True``: the
        whole budget left).
    plan_seconds : float, optional
        The plan's own solve time, for the default budget.
    progress : bool, default False
        Show the progress of each solve as a bar (like a plan's solve).
    threads : int, optional
        HiGHS threads.
    stop : callable or threading.Event, optional
        Interrupts the solves.

    Returns
    -------
    Diagnosis
    """
    from ..progress import solve_progress

    if budget is not None and (isinstance(budget, bool) or not isinstance(budget, int | float)
                               or not budget > 0):
        raise invalid("budget", "be a number of seconds > 0", budget)
    clock = _Clock(float(budget) if budget is not None else default_budget(lp, plan_seconds),
                   hard=budget is not None)
    elastic, info = elastic_program(lp, weights=weights)
    name, groups = _priority(relax, info)
    solver = _solver(elastic, method, threads, None)
    notes: list[str] = []
    label = "diagnosis"
    if lp.data is not None:
        label = f"diagnosis, {lp.data.n} sectors × {lp.data.T} years"
    with solve_progress(progress, label) as cb:
        view = _solve_view(elastic, info, groups, solver, clock, name, cb, stop,
                           essential=True)
    diag = Diagnosis(pd.DataFrame(columns=COLUMNS), view.status, view.penalty, notes=notes,
                     relaxed=name, method=view.method or solver.method, steps=clock.steps,
                     budget=clock.budget)
    if view.status is Status.OPTIMAL:
        _polish(view, clock, solver, polish, notes, name, stop)
        diag.shortfalls = _table(view, info, lp.data)
        if lp.data is not None and view.x is not None:
            t0 = time.perf_counter()
            diag.audit_ok, text = _audit(lp, view)
            clock.log("audit of the elastic solution", t0,
                      ("passed: " if diag.audit_ok else "failed: ") + text)
            if not diag.audit_ok:
                notes.append(f"The audit of the elastic solution failed: {text}.")
    if view.status is Status.INFEASIBLE or (view.status is Status.OPTIMAL
                                            and not diag.shortfalls.empty):
        iis_backend = backend if backend is not None else HighsBackend()
        diag.infeasible_subset, diag.subset_source = _conflict(
            lp, view if view.status is Status.OPTIMAL else None, iis_backend, subset, clock)
        if diag.conflict() and "deletion filter" in diag.subset_source:
            notes.append(f"The conflict was found by {diag.subset_source}.")
    if view.status is Status.OPTIMAL and not diag.shortfalls.empty and name in ("aims", "facts"):
        has_other = any(i["role"] != ("aim" if name == "aims" else "fact") for i in info)
        want = other_view if other_view is not None else \
            clock.left() > 2 * max(view.seconds, 1e-3)
        flip = "facts" if name == "aims" else "aims"
        price = _held_price(elastic, info, view, groups) if has_other else None
        weight = float(np.max(elastic.cost[elastic.cols["shortfall"].start:
                                           elastic.cols["shortfall"].stop], initial=1.0))
        if price is not None and price <= IDLE_PRICE * weight and other_view is None:
            # the other order would hold the same shortfalls: nothing to solve
            clock.steps.append(Step(f"{flip}: the same as {name}", 0.0,
                                    f"largest shadow price of the held {flip} {price:.2g} "
                                    "per share"))
            notes.append(f"Relaxing the {flip} first gives the same shortfalls: at the "
                         f"elastic optimum their shadow prices are zero (at most "
                         f"{price:.2g} per share), so no relaxation of the {flip} lessens "
                         f"the shortfall of the {name}.")
        elif has_other and want:
            # unasked, the other view gets a share of the budget of its own: its problems
            # can be far harder for an interior point than the re-solve (a degenerate
            # optimal face: 58 iterations against 30 at 71 × 30)
            allowance = clock.left() if other_view else \
                min(clock.left(), max(OTHER_VIEW_FACTOR * view.seconds, 1.0))
            sub = _Clock(allowance, hard=True)
            other = _solve_view(elastic, info, _priority(flip, info)[1], solver, sub, flip,
                                stop=stop, top_down=True)
            if other.status is Status.OPTIMAL:
                _polish(other, sub, solver, min(polish, 3), [], flip, stop)
                table = _table(other, info, lp.data)
                if not table[["condition", "sector", "year"]].equals(
                        diag.shortfalls[["condition", "sector", "year"]]):
                    diag.other_view = table
            else:
                notes.append(f"The view with the other order of relaxation did not finish "
                             f"within {allowance:.3g} s ({other.status.value}); "
                             f"relax={flip!r} computes it alone.")
            clock.steps.extend(sub.steps)
        elif has_other and other_view is None:
            notes.append("The view with the other order of relaxation was not computed: "
                         "the time budget would run out.")
    return diag
