"""Diagnosis of impossible plans: an elastic re-solve and an infeasible subset in words.

The commodity balances and capacity limits are physical and stay hard. Every
condition of an elastic family (targets, consumption floors and falls,
labour, foreign exchange, terminal growth) may fall short by ``m_r s_r``,
``s_r ≥ 0``, where ``m_r`` is the size of what the row asks for; the
re-solve minimises ``Σ w_r s_r``. With the default weight 1 the penalty adds
shortfalls as shares of what was asked; ``weights`` by family set a penalty
per unit of shortfall instead. Shortfalls are measured in shares so that the
re-solve is well scaled, and it runs by simplex at tight tolerances (1e-9);
then each shortfall (up to ``POLISH_LIMIT`` of them) is minimised alone with
the others held, which gives it to the precision of one maximisation of that
condition (on the demo plan, equal to the reachable maximum to 1e-12 relative).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np
import pandas as pd
from scipy import sparse

from ..backends.base import FAILED, Backend, Feature, IisBackend, Status
from ..backends.options import SolveOptions, highs_backend
from ..lp.conditions import CONDITIONS
from ..lp.program import LinearProgram

__all__ = ["Diagnosis", "diagnose", "elastic_program", "POSITIVE_SHARE", "IIS_ROW_LIMIT"]

POSITIVE_SHARE = 1e-7     # a shortfall below this share of its requirement counts as none
IIS_ROW_LIMIT = 20_000    # larger plans skip the (slow) infeasible-subset search by default
COLUMNS = ["condition", "sector", "year", "required", "achievable", "shortfall", "share"]


@dataclass
class Diagnosis:
    """Which conditions of an impossible plan cannot be met, and by how much.

    Attributes
    ----------
    shortfalls : pandas.DataFrame
        One row per condition that falls short: condition, sector, year,
        required, achievable, shortfall, share (shortfall / required), ranked
        by share.
    status : Status
        Status of the elastic re-solve (``infeasible`` when even the hard
        conditions, the balances with their exogenous demand, cannot hold).
    total_penalty : float
        Optimal value of the elastic re-solve, ``Σ w_r s_r`` (NaN when it
        found no plan).
    infeasible_subset : pandas.DataFrame or None
        Conditions that cannot all hold together (HiGHS's irreducible
        infeasible subset), in words: kind, condition, year, name, description.
    notes : list of str
        Further remarks on the diagnosis (empty by default).
    """

    shortfalls: pd.DataFrame
    status: Status
    total_penalty: float
    infeasible_subset: pd.DataFrame | None = None
    notes: list[str] = field(default_factory=list)

    @property
    def confirmed(self) -> bool:
        """True when the re-solve found a positive shortfall (or no plan at all)."""
        return self.status is Status.INFEASIBLE or (
            self.status is Status.OPTIMAL and not self.shortfalls.empty)

    def conflict(self) -> str:
        """The infeasible subset as one sentence ("" without one).

        Returns
        -------
        str
        """
        if self.infeasible_subset is None or self.infeasible_subset.empty:
            return ""
        parts = []
        rows = self.infeasible_subset[self.infeasible_subset["kind"] == "condition"]
        for _, grp in rows.groupby(["condition", "name"], sort=False):
            years = [y for y in grp["year"] if isinstance(y, int | np.integer)]
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

    def headline(self) -> str:
        """One sentence naming the worst conditions.

        Returns
        -------
        str
        """
        if self.status is Status.INFEASIBLE:
            return ("Even with every target, floor and labour limit relaxed the plan is "
                    "impossible: the commodity balances with the exogenous demand and the "
                    "capacity from before the plan cannot hold.")
        if self.status is not Status.OPTIMAL:
            return f"The elastic re-solve did not finish ({self.status.value})."
        if self.shortfalls.empty:
            return "The elastic re-solve found no shortfall: the plan is feasible."
        worst = self.shortfalls.head(3)
        parts = [r.words if isinstance(getattr(r, "words", None), str) and r.words else
                 " ".join(str(p) for p in (r.condition, r.sector, r.year) if p != "")
                 + f" short by {r.shortfall:.6g} ({100 * r.share:.1f} %)"
                 for r in worst.itertuples()]
        return "Cannot be met: " + "; ".join(parts) + "."


def elastic_program(lp: LinearProgram, *, weights: dict[str, float] | None = None
                    ) -> tuple[LinearProgram, list[dict[str, Any]]]:
    """The elastic version of ``lp`` and one record per shortfall column.

    Parameters
    ----------
    lp : LinearProgram
        A plan's programme (objective stages and held rows are ignored).
    weights : dict, optional
        Penalty per unit of shortfall by family (``"targets"``, ``"labour"``, …).
    """
    d = lp.data
    assert d is not None
    held = [b for b in lp.rows if b not in {c.name for c in CONDITIONS}]
    if held:  # drop rows added by objective stages
        first = min(lp.rows[b].start for b in held)
        keep = {k: v for k, v in lp.rows.items() if k not in held}
        lp = lp.replace(matrix=sparse.csc_array(lp.matrix[:first]),
                        row_lower=lp.row_lower[:first], row_upper=lp.row_upper[:first],
                        rows=keep)
    sign = lp.row_sign
    rows, coefs, cost, info = [], [], [], []
    for cond in CONDITIONS:
        if not cond.elastic or cond.name not in lp.rows:
            continue
        b = lp.rows[cond.name]
        lower, upper = lp.row_lower[b.start:b.stop], lp.row_upper[b.start:b.stop]
        required = np.asarray(cond.required(d, b, lower, upper), dtype=float)
        unit = np.asarray(cond.magnitude(d, required), dtype=float)
        unit = np.where(unit > 0, unit, 1.0)
        w = (weights or {}).get(cond.name)
        for i in range(b.size):
            r = b.start + i
            rows.append(r)
            coefs.append(-sign[r] * unit[i])  # ≥ row: + m s on the left; ≤ row: − m s
            cost.append(1.0 if w is None else float(w) * unit[i])
            info.append({"family": cond.name, "label": b.label(i), "required": required[i],
                         "unit": unit[i], "condition": cond})
    k = len(rows)
    m = lp.shape[0]
    el = sparse.csc_array((np.array(coefs, dtype=float), (np.array(rows, dtype=int),
                                                          np.arange(k))), shape=(m, k))
    base = lp.replace(cost=np.zeros(lp.shape[1]), sense="min", stages=[])
    out = base.add_cols("shortfall", el, np.array(cost, dtype=float), np.zeros(k),
                        np.full(k, np.inf), tuple(i["label"] for i in info))
    return out, info


POLISH_LIMIT = 10  # short conditions polished one by one (each one more simplex solve)


def _polished(elastic: LinearProgram, s: np.ndarray, solver: Backend) -> np.ndarray:
    """Each positive shortfall made as small as it can be with the others held.

    The joint re-solve weighs many shortfall columns at once and stops within its
    tolerances; minimising one shortfall alone, the others fixed at their values,
    gives it to the precision of a single maximisation of that condition.
    """
    b = elastic.cols["shortfall"]
    short = np.flatnonzero(s > POSITIVE_SHARE)
    if not 0 < short.size <= POLISH_LIMIT:
        return s
    for k in short:
        lo, up = elastic.col_lower.copy(), elastic.col_upper.copy()
        fixed = np.delete(np.arange(b.size), k)
        lo[b.start + fixed] = up[b.start + fixed] = s[fixed]
        cost = np.zeros(elastic.shape[1])
        cost[b.start + k] = 1.0
        out = solver.solve(elastic.replace(col_lower=lo, col_upper=up, cost=cost))
        if out.status is Status.OPTIMAL and out.x[b.start + k] <= s[k] * (1 + 1e-6):
            s[k] = max(float(out.x[b.start + k]), 0.0)
    return s


def _subset(lp: LinearProgram, backend: IisBackend) -> pd.DataFrame | None:
    found = backend.iis(lp)
    if found is None:
        return None
    rows, cols = found
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


def diagnose(lp: LinearProgram, *, weights: dict[str, float] | None = None,
             subset: bool | None = None, backend: Backend | None = None) -> Diagnosis:
    """Elastic re-solve of a plan's programme (see the module notes).

    Parameters
    ----------
    lp : LinearProgram
    weights : dict, optional
        Penalty per unit of shortfall by family (``"targets"``, ``"labour"``, …).
    subset : bool, optional
        Also ask for an irreducible infeasible subset (default: for plans of
        up to 20,000 rows, when the back end offers one).
    backend : Backend, optional
        The back end the plan was solved with; its infeasible-subset feature
        is used when it has one (default: HiGHS).

    Returns
    -------
    Diagnosis
    """
    elastic, info = elastic_program(lp, weights=weights)
    solver = highs_backend(SolveOptions(method="simplex", tolerance=1e-9))
    out = solver.solve(elastic)
    if out.status in FAILED:
        crossover = SolveOptions(method="ipm-crossover", tolerance=1e-9)
        for alt in [highs_backend(crossover, scale=True), *solver.alternatives()]:
            out = alt.solve(elastic)
            if out.status not in FAILED:
                break
    iis_backend: IisBackend = backend if isinstance(backend, IisBackend) \
        and Feature.IIS in backend.features else highs_backend()
    want = subset if subset is not None else lp.shape[0] <= IIS_ROW_LIMIT
    if out.status is not Status.OPTIMAL:
        iis = _subset(lp, iis_backend) if want and out.status is Status.INFEASIBLE else None
        return Diagnosis(pd.DataFrame(columns=COLUMNS), out.status, float("nan"), iis)
    s = _polished(elastic, elastic.cols["shortfall"].take(out.x).copy(), solver)
    recs = []
    for rec, share in zip(info, s, strict=True):
        if not share > POSITIVE_SHARE:
            continue
        short = float(share * rec["unit"])
        cond_name, sector, year = rec["condition"].shortfall_label(rec["label"])
        required = float(rec["required"])
        words = rec["condition"].excess_words(lp.data, rec["label"], short)
        if rec["family"] in ("labour", "foreign_exchange", "emissions"):
            need = required + short  # a limit exceeded: what is needed
            recs.append((cond_name, sector, year, need, required, short,
                         short / need if need else np.inf, words))
        else:
            recs.append((cond_name, sector, year, required, required - short, short,
                         short / required if required else np.inf, words))
    table = pd.DataFrame(recs, columns=[*COLUMNS, "words"])
    if table["words"].isna().all():
        table = table.drop(columns="words")  # only limits with a unit of their own have words
    table = table.sort_values(
        ["share", "shortfall"], ascending=False).reset_index(drop=True)
    iis = _subset(lp, iis_backend) if want and not table.empty else None
    return Diagnosis(table, out.status, float(out.objective), iis)
