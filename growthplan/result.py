"""PlanResult: the solved plan as labelled schedules, shadow prices and an audit.

numpy inside, pandas here at the edge: every table has years as rows and
sectors (or commodities, labour kinds) as columns; :meth:`PlanResult.tidy`
gives the long form.

Shadow prices are reported as *values*: the improvement of the objective per
unit by which a condition is relaxed (one more unit of a commodity available
in a year, one more unit of capacity, one more person-year). They are
non-negative at an optimum, whatever the objective's sense.
"""

from __future__ import annotations

import contextlib
import html
import os
import shutil
import tempfile
import time
import warnings
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from . import audit as audit_mod
from .errors import (
    EndEffectsWarning,
    PlanInfeasible,
    PlanNotOptimal,
    PlanUnbounded,
    SolverFailure,
    invalid,
)
from .solvers import Status

if TYPE_CHECKING:
    from .diagnose import Diagnosis

__all__ = ["PlanResult", "CAUTION"]

CAUTION = ("Planning estimates: results rest on the coefficients and assumptions supplied "
           "and do not replace professional judgement or the decisions of the responsible "
           "authorities.")

SCHEDULES = ("output", "capacity", "utilisation", "starts", "capital_deliveries",
             "retirements", "labour", "consumption", "surplus", "shadow_prices",
             "shadow_prices_current", "labour_values", "quasi_rents")


class PlanResult:
    """The outcome of :meth:`growthplan.Plan.solve`.

    Attributes
    ----------
    plan : Plan
        The plan that was solved.
    status : Status
    ok : bool
        True only for an optimal solve that passed the audit.
    objective : float
    message : str
        The solver's own status text.
    audit : Audit or None
    timings : dict of str to float
        Seconds for validate, compile, solve, post-process and audit.
    solver : dict
        Method, iterations, options and versions.
    warnings : list of str

    Notes
    -----
    The schedule tables (``output``, ``starts``, ``shadow_prices``, …) are
    available only when ``ok`` is true; on any other result they raise
    :class:`~growthplan.PlanNotOptimal`, so a stopped or unverified solve
    cannot be mistaken for a plan. ``raw_solution`` still holds the solver's
    numbers for inspection.
    """

    def __init__(self, plan, lp, outcome, *, timings: dict, audit, frames: dict,
                 status: Status, notes: list[str]) -> None:
        self.plan = plan
        self.lp = lp
        self.outcome = outcome
        self.status = status
        self.objective = outcome.objective
        self.message = outcome.message
        self.audit = audit
        self.timings = timings
        self.warnings = notes
        self._frames = frames
        self.diagnosis: Diagnosis | None = None
        self.horizons: dict[int, str] | None = None
        self.runaway: list[str] = []
        import highspy
        import pulp

        from . import __version__
        self.solver = {"method": outcome.method, "iterations": outcome.iterations,
                       "seconds": outcome.seconds, "options": dict(outcome.options),
                       "versions": {"growthplan": __version__,
                                    "highs": outcome.highs_version,
                                    "highspy": getattr(highspy, "__version__", ""),
                                    "pulp": pulp.__version__}}

    # -- construction ---------------------------------------------------------
    @classmethod
    def from_outcome(cls, plan, lp, outcome, *, timings: dict,
                     audit_tolerance: float = 1e-6) -> PlanResult:
        t0 = time.perf_counter()
        status = outcome.status
        frames: dict = {}
        audit = None
        notes: list[str] = []
        if status is Status.OPTIMAL:
            frames, arrays = _frames(plan, lp, outcome)
            t1 = time.perf_counter()
            audit = audit_mod.audit_schedules(
                plan, arrays["output"], arrays["starts"], arrays["consumption"],
                reported_capacity=arrays["capacity"], reported_deliveries=arrays["deliveries"],
                level=arrays["level"], imports=arrays["imports"], exports=arrays["exports"],
                tolerance=audit_tolerance)
            t2 = time.perf_counter()
            if not audit.ok:
                status = Status.NOT_VERIFIED
                notes.append(f"The solver said optimal but the audit found a violation of "
                             f"{audit.max_violation:.3g} (relative) at {audit.worst}; the "
                             "plan is not returned as optimal.")
        else:
            t1 = t2 = time.perf_counter()
        timings = {**timings, "solve": outcome.seconds, "post_process": t1 - t0,
                   "audit": t2 - t1}
        if plan.terminal is None and status is Status.OPTIMAL:
            text = ("No terminal condition: investment in the last years only serves the "
                    "objective, so end-of-plan starts may be too low (end effects). Give "
                    "terminal=TerminalGrowth(rate=...) to value the years after the plan.")
            notes.append(text)
            warnings.warn(text, EndEffectsWarning, stacklevel=3)
        result = cls(plan, lp, outcome, timings=timings, audit=audit, frames=frames,
                     status=status, notes=notes)
        if status is Status.UNBOUNDED:
            from .solvers import unbounded_ray

            ray = unbounded_ray(lp)
            if ray is not None:
                names = lp.col_names()
                big = np.argsort(-np.abs(ray))[:10]
                result.runaway = [names[i] for i in big if abs(ray[i]) > 1e-9]
                result.warnings.append("Unbounded: these columns can grow without limit: "
                                       + ", ".join(result.runaway) + ". Check for a sector "
                                       "whose capacity needs no capital goods.")
        if status in (Status.INFEASIBLE, Status.INFEASIBLE_OR_UNBOUNDED):
            from .diagnose import diagnose

            t3 = time.perf_counter()
            result.diagnosis = diagnose(lp)
            result.timings["diagnose"] = time.perf_counter() - t3
        return result

    # -- status -----------------------------------------------------------------
    @property
    def ok(self) -> bool:
        """True for an optimal, audited plan."""
        return self.status is Status.OPTIMAL

    def raise_for_status(self) -> PlanResult:
        """Raise the matching growthplan error unless the plan is optimal and audited."""
        if self.ok:
            return self
        if self.status is Status.INFEASIBLE:
            detail = ""
            if self.diagnosis is not None:
                detail = " " + self.diagnosis.headline()
            raise PlanInfeasible(f"The plan cannot meet all its conditions ({self.message})."
                                 + detail)
        if self.status is Status.UNBOUNDED:
            cols = f" Runaway columns: {', '.join(self.runaway)}." if self.runaway else ""
            raise PlanUnbounded(f"The plan's objective is unbounded ({self.message}).{cols}")
        raise SolverFailure(f"No verified optimal plan: status {self.status.value} "
                            f"({self.message}). {' '.join(self.warnings)}".strip())

    @property
    def raw_solution(self) -> np.ndarray:
        """The solver's column values, whatever the status."""
        return self.outcome.x

    def _get(self, name: str):
        if not self.ok:
            raise PlanNotOptimal(
                f"{name} is only available for an optimal, audited plan; this result has "
                f"status {self.status.value!r} ({self.message}). See result.status, "
                "result.diagnosis or result.raw_solution.")
        return self._frames[name]

    # -- schedules --------------------------------------------------------------
    output = property(lambda self: self._get("output"), doc="Output, years × sectors.")
    capacity = property(lambda self: self._get("capacity"),
                        doc="Capacity in service, years (and the year after) × sectors.")
    utilisation = property(lambda self: self._get("utilisation"),
                           doc="Output over capacity in service.")
    starts = property(lambda self: self._get("starts"), doc="Capacity starts, years × sectors.")
    capital_deliveries = property(lambda self: self._get("capital_deliveries"),
                                  doc="Capital goods delivered, years × commodities.")
    retirements = property(lambda self: self._get("retirements"),
                           doc="Capacity retired during each year, years × sectors.")
    labour = property(lambda self: self._get("labour"),
                      doc="Labour used and available, years × (kind, used/available).")
    consumption = property(lambda self: self._get("consumption"),
                           doc="Consumption level and commodities consumed, years × columns.")
    surplus = property(lambda self: self._get("surplus"),
                       doc="Free-disposal slack of each commodity balance.")
    shadow_prices = property(lambda self: self._get("shadow_prices"),
                             doc="Value of one more unit of each commodity per year, as solved.")
    shadow_prices_current = property(
        lambda self: self._get("shadow_prices_current"),
        doc="Shadow prices undiscounted to current-year terms (see the README).")
    labour_values = property(lambda self: self._get("labour_values"),
                             doc="Value of one more person-year, years × kinds.")
    quasi_rents = property(lambda self: self._get("quasi_rents"),
                           doc="Value of one more unit of capacity, years × sectors.")
    target_values = property(lambda self: self._get("target_values"),
                             doc="Each target with its value (cost of the requirement).")
    imports = property(lambda self: self._get("imports"), doc="Imports, years × commodities.")
    exports = property(lambda self: self._get("exports"), doc="Exports, years × commodities.")
    shadow_exchange_rate = property(
        lambda self: self._get("shadow_exchange_rate"),
        doc="Value of one more unit of foreign exchange per year (0 when the balance is slack).")

    @property
    def level(self) -> float | None:
        """Terminal-capacity level ``λ`` (terminal-capacity objective only)."""
        return self._get("level")

    def tidy(self) -> pd.DataFrame:
        """All year × sector schedules in long form: year, sector, quantity, value."""
        parts = []
        for name in ("output", "capacity", "utilisation", "starts", "capital_deliveries",
                     "retirements", "surplus", "shadow_prices", "shadow_prices_current",
                     "quasi_rents"):
            f = self._get(name)
            long = f.rename_axis(index="year", columns="sector").stack().rename("value")
            parts.append(long.reset_index().assign(quantity=name))
        out = pd.concat(parts, ignore_index=True)
        return out[["year", "sector", "quantity", "value"]]

    # -- analysis ---------------------------------------------------------------
    def bottlenecks(self, *, top: int | None = 20, threshold: float = 1e-9) -> pd.DataFrame:
        """Binding conditions ranked by their value (shadow price) per year.

        Returns
        -------
        DataFrame with columns condition, year, name, value, ranked by value
        within each year, years in order (``top`` rows per year at most).
        """
        rows = []
        for cond, frame in (("commodity", self.shadow_prices), ("capacity", self.quasi_rents),
                            ("labour", self.labour_values)):
            for year, series in frame.iterrows():
                for name, v in series.items():
                    if v > threshold:
                        rows.append({"condition": cond, "year": year, "name": name,
                                     "value": float(v)})
        out = pd.DataFrame(rows, columns=["condition", "year", "name", "value"])
        if out.empty:
            return out
        out = out.sort_values(["year", "value"], ascending=[True, False])
        if top is not None:
            out = out.groupby("year", sort=True).head(top)
        return out.reset_index(drop=True)

    def summary(self) -> Summary:
        """A short report: text in a terminal (``print``), a table in a notebook."""
        return Summary(self)

    def __repr__(self) -> str:
        return (f"PlanResult(status={self.status.value!r}, objective={self.objective:.6g}, "
                f"years={self.plan.years[0]}..{self.plan.years[-1]}, "
                f"sectors={self.plan.economy.n})")

    # -- export -----------------------------------------------------------------
    def _tables(self) -> dict[str, pd.DataFrame]:
        names = ["output", "capacity", "utilisation", "starts", "capital_deliveries",
                 "retirements", "labour", "consumption", "surplus", "shadow_prices",
                 "shadow_prices_current", "labour_values", "quasi_rents", "target_values",
                 "imports", "exports"]
        out = {n: self._get(n) for n in names}
        fx = self._get("shadow_exchange_rate")
        if not fx.isna().all():
            out["shadow_exchange_rate"] = fx.to_frame()
        out["audit"] = self.audit.checks.reset_index()
        return {k: v for k, v in out.items() if v is not None and not v.empty}

    def to_csv(self, folder: str | os.PathLike, *, overwrite: bool = False) -> Path:
        """Write every table as ``<name>.csv`` into a new folder.

        The folder is written beside its final place and renamed into it, so
        an interrupted export never leaves a half-written folder; an existing
        folder is replaced only with ``overwrite=True``.
        """
        target = Path(folder)
        if target.exists() and not overwrite:
            raise invalid("folder", "not exist yet (pass overwrite=True to replace it)",
                          str(target))
        tables = self._tables()
        target.parent.mkdir(parents=True, exist_ok=True)
        tmp = Path(tempfile.mkdtemp(prefix=f".{target.name}.", dir=target.parent))
        try:
            for name, frame in tables.items():
                frame.to_csv(tmp / f"{name}.csv")
            (tmp / "summary.txt").write_text(str(self.summary()), encoding="utf-8")
            if target.exists():
                old = target.with_name(f".{target.name}.old-{os.getpid()}")
                target.rename(old)
                tmp.rename(target)
                shutil.rmtree(old, ignore_errors=True)
            else:
                tmp.rename(target)
        except BaseException:
            shutil.rmtree(tmp, ignore_errors=True)
            raise
        return target

    def to_excel(self, path: str | os.PathLike, *, overwrite: bool = False) -> Path:
        """Write every table as a sheet of one workbook (written aside, then renamed)."""
        target = Path(path)
        if target.exists() and not overwrite:
            raise invalid("path", "not exist yet (pass overwrite=True to replace it)",
                          str(target))
        tables = self._tables()
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".xlsx",
                                        dir=target.parent)
        os.close(fd)
        tmp = Path(tmp_name)
        try:
            writer = pd.ExcelWriter(tmp, engine="openpyxl")
            try:
                for name, frame in tables.items():
                    frame.to_excel(writer, sheet_name=name[:31])
            except BaseException:
                with contextlib.suppress(Exception):  # keep the first error, not close()'s
                    writer.close()
                raise
            writer.close()
            os.replace(tmp, target)
        except BaseException:
            tmp.unlink(missing_ok=True)
            raise
        return target


class Summary:
    """Printable and notebook-renderable summary of a :class:`PlanResult`."""

    def __init__(self, result: PlanResult) -> None:
        self.result = result

    def _lines(self) -> list[tuple[str, str]]:
        r = self.result
        p = r.plan
        rows = [("status", r.status.value + ("" if r.ok else f" ({r.message})")),
                ("years", f"{p.years[0]}–{p.years[-1]} ({p.horizon})"),
                ("sectors", str(p.economy.n)),
                ("objective", f"{type(p.objective).__name__} = {r.objective:.6g}"
                 + (f" (terminal proportions: {r.lp.data.proportions_source})"
                    if r.lp.data.proportions_source else ""))]
        if r.ok:
            cap = r.capacity
            first, last = cap.iloc[0].sum(), cap.iloc[-1].sum()
            if first > 0 and last > 0:
                g = (last / first) ** (1.0 / p.horizon) - 1
                rows.append(("capacity growth", f"{100 * g:.2f} % a year (sum over sectors)"))
            if r.labour is not None and not r.labour.empty:
                for kind in r.labour.columns.get_level_values(0).unique():
                    if (kind, "available") not in r.labour:
                        continue  # labour is counted but not limited
                    used = r.labour[(kind, "used")]
                    avail = r.labour[(kind, "available")]
                    rows.append((f"labour {kind}", f"up to {100 * (used / avail).max():.1f} % "
                                 "of supply used"))
            b = r.bottlenecks(top=3)
            if not b.empty:
                first_year = b[b.year == b.year.min()]
                rows.append((f"bottlenecks {b.year.min()}",
                             ", ".join(f"{c} {n}" for c, n in
                                       zip(first_year.condition, first_year.name, strict=True))))
            rows.append(("audit", f"largest violation {r.audit.max_violation:.2g} (relative, "
                         f"tolerance {r.audit.tolerance:g})"))
        rows.append(("solver", f"HiGHS {r.solver['versions']['highs']}, method "
                     f"{r.solver['method']}, {r.timings.get('solve', 0):.3f} s"))
        total = sum(r.timings.values())
        rows.append(("time", f"{total:.3f} s in all (" + ", ".join(
            f"{k} {v:.3f}" for k, v in r.timings.items()) + ")"))
        for w in r.warnings:
            rows.append(("note", w))
        if r.diagnosis is not None:
            rows.append(("diagnosis", r.diagnosis.headline()))
        return rows

    def __str__(self) -> str:
        rows = self._lines()
        width = max(len(k) for k, _ in rows)
        body = "\n".join(f"{k:<{width}}  {v}" for k, v in rows)
        return f"growthplan result\n{body}\n\n{CAUTION}"

    def __repr__(self) -> str:
        return str(self)

    def _repr_html_(self) -> str:
        cells = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th>"
                        f"<td style='text-align:left'>{html.escape(v)}</td></tr>"
                        for k, v in self._lines())
        return (f"<table><caption>growthplan result</caption>{cells}</table>"
                f"<p><em>{html.escape(CAUTION)}</em></p>")


def _frames(plan, lp, outcome) -> tuple[dict, dict]:
    d = lp.data
    names, years = d.names, d.years
    T, n = len(years), len(names)
    x = outcome.x
    idx = pd.Index(years, name="year")
    cols = pd.Index(names, name="sector")
    output = lp.cols["output"].take(x)
    starts = lp.cols["starts"].take(x)
    kappa = lp.cols["consumption"].take(x) if "consumption" in lp.cols else None
    level = float(x[lp.cols["level"].start]) if "level" in lp.cols else None
    from .compile import capacity_operator, deliveries_operator

    g = lp.capacity_op if lp.capacity_op is not None else capacity_operator(d)
    w = lp.deliveries_op if lp.deliveries_op is not None else deliveries_operator(d)
    cap = (d.base.ravel() + g @ starts.ravel()).reshape(T + 1, n)
    deliv = (w @ starts.ravel()).reshape(T, n) + d.pipe_deliveries
    entering = np.zeros((T + 1, n))  # capacity entering service at age 0 in each year
    for j, name in enumerate(names):
        th = int(d.theta[j])
        for tau in range(T):
            if tau + th <= T:
                entering[tau + th, j] += starts[tau, j]
        past = (plan.under_construction or {}).get(name, [])
        for back, amount in enumerate(reversed(past), start=1):
            if 0 <= th - back <= T:
                entering[th - back, j] += amount
    retire = cap[:-1] + entering[1:] - cap[1:]
    sign = 1.0 if lp.sense == "max" else -1.0
    frames: dict = {}

    def frame(a, index=idx, columns=cols):
        return pd.DataFrame(a, index=index, columns=columns)

    frames["output"] = frame(output)
    frames["starts"] = frame(starts)
    frames["capacity"] = frame(cap, index=pd.Index([*years, years[-1] + 1], name="year"))
    with np.errstate(divide="ignore", invalid="ignore"):
        frames["utilisation"] = frame(np.where(cap[:-1] > 0, output / cap[:-1], np.nan))
    frames["capital_deliveries"] = frame(deliv, columns=pd.Index(names, name="commodity"))
    frames["retirements"] = frame(np.maximum(retire, 0.0) * (np.abs(retire) > 1e-12))
    if d.labour.shape[0]:
        used = output @ d.labour.T
        lab = {}
        for k, kind in enumerate(d.labour_kinds):
            lab[(kind, "used")] = used[:, k]
            lab[(kind, "available")] = d.supply[k]
        frames["labour"] = pd.DataFrame(lab, index=idx)
    elif d.labour_all.shape[0]:
        used = output @ d.labour_all.T
        frames["labour"] = pd.DataFrame(
            {(kind, "used"): used[:, k] for k, kind in enumerate(plan.economy.labour_kinds)},
            index=idx)
    else:
        frames["labour"] = pd.DataFrame(index=idx)
    if kappa is not None:
        cons = pd.DataFrame(kappa[:, None] * d.basket[None, :], index=idx, columns=cols)
        cons.insert(0, "level", kappa)
        frames["consumption"] = cons
    else:
        frames["consumption"] = pd.DataFrame(index=idx)
    use = output @ d.a.T + deliv + (0 if kappa is None else kappa[:, None] * d.basket) + d.demand
    supply = output.copy()
    trade = {"imports": None, "exports": None}
    for key, side, direction in (("imports", "import", 1.0), ("exports", "export", -1.0)):
        goods = d.trade[side][0] if d.trade is not None else []
        if key in lp.cols:
            flows = lp.cols[key].take(x)
            trade[key] = flows
            for i, g in enumerate(goods):
                supply[:, names.index(g)] += direction * flows[:, i]
            frames[key] = pd.DataFrame(flows, index=idx, columns=pd.Index(goods,
                                                                         name="commodity"))
        else:
            frames[key] = pd.DataFrame(index=idx)
    frames["surplus"] = frame(supply - use, columns=pd.Index(names, name="commodity"))
    dual = outcome.row_dual
    if dual is None:
        dual = np.full(lp.matrix.shape[0], np.nan)
    value = sign * lp.row_sign * dual
    value = np.where(np.abs(value) < 1e-12, 0.0, value)
    prices = lp.rows["balance"].take(value)
    frames["shadow_prices"] = frame(prices, columns=pd.Index(names, name="commodity"))
    frames["shadow_prices_current"] = frame(_current(plan, prices, output),
                                            columns=pd.Index(names, name="commodity"))
    frames["quasi_rents"] = frame(lp.rows["capacity"].take(value))
    if "labour" in lp.rows:
        frames["labour_values"] = pd.DataFrame(lp.rows["labour"].take(value), index=idx,
                                               columns=pd.Index(d.labour_kinds, name="kind"))
    else:
        frames["labour_values"] = pd.DataFrame(index=idx)
    tv = pd.DataFrame(lp.target_info, columns=["what", "sector", "year", "required"])
    if "targets" in lp.rows:
        tv["value"] = lp.rows["targets"].take(value)
    frames["target_values"] = tv
    frames["level"] = level
    if "foreign_exchange" in lp.rows:
        frames["shadow_exchange_rate"] = pd.Series(lp.rows["foreign_exchange"].take(value),
                                                   index=idx, name="shadow_exchange_rate")
    else:
        frames["shadow_exchange_rate"] = pd.Series(dtype=float, index=idx,
                                                   name="shadow_exchange_rate")
    arrays = {"output": output, "starts": starts, "consumption": kappa, "capacity": cap,
              "deliveries": deliv, "level": level, **trade}
    return frames, arrays


def _current(plan, prices: np.ndarray, output: np.ndarray) -> np.ndarray:
    """Shadow prices in current-year terms.

    With a discounted objective at rate ``r`` the year-``t`` prices are
    multiplied by ``(1 + r)^t``. Otherwise each year's prices are divided by
    that year's price of the first year's output bundle and multiplied by the
    first year's, so the bundle keeps its first-year value; the ratio between
    years is the plan's implied own rate of interest.
    """
    r = plan.objective.discount_rate()
    t = np.arange(prices.shape[0], dtype=float)
    if r is not None:
        return prices * (1.0 + r) ** t[:, None]
    weights = output[0] if output[0].sum() > 0 else np.ones(prices.shape[1])
    index = prices @ weights
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = np.where(index > 1e-300, index[0] / index, np.nan)
    return prices * scale[:, None]
