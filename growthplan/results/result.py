"""PlanResult: the solved plan as labelled schedules, shadow prices, audit and diagnosis.

numpy inside, pandas at the edge: tables are built lazily from the solution's
arrays in :mod:`growthplan.results.tables` (years as rows, sectors,
commodities or kinds as columns); :meth:`PlanResult.tidy` gives the long form.
Every table is returned as a copy, so editing one never changes the audited
plan or what its exports write.
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..backends.base import SolverOutcome, Status
from ..errors import PlanInfeasible, PlanNotOptimal, PlanUnbounded, SolverFailure
from ..lp.conditions import Schedules
from ..lp.program import LinearProgram
from . import tables
from .audit import Audit
from .summary import CAUTION, Summary, key_figures

if TYPE_CHECKING:
    from .diagnosis import Diagnosis

__all__ = ["PlanResult", "CAUTION"]


class PlanResult:
    """The outcome of :meth:`growthplan.Plan.solve`.

    Made by the solve pipeline, not by hand.

    Parameters
    ----------
    plan : Plan
        The plan that was solved.
    lp : LinearProgram
        The programme solved (with the arrays it was built from).
    outcome : SolverOutcome
        What the back end returned.
    status : Status
        The final status (after the audit and any re-solve).
    timings : dict of str to float
        Seconds per pipeline step.
    audit : Audit, optional
        The audit of an optimal solution.
    schedules : Schedules, optional
        The accounting operators the tables are built from.
    notes : list of str, optional
        Warnings gathered on the way (kept as ``warnings``).
    diagnosis : Diagnosis, optional
        What an infeasible plan falls short of.
    backend : str, default "highs"
        Name of the back end.

    Attributes
    ----------
    plan : Plan
        The plan that was solved.
    lp : LinearProgram
        The programme solved.
    status : Status
        Outcome of the solve.
    ok : bool
        True only for an optimal solve that passed the audit.
    objective : float
        Value of the objective (NaN without a solution).
    message : str
        The solver's own status text.
    audit : Audit or None
        Every condition rechecked from the schedules, independently of the LP.
    diagnosis : Diagnosis or None
        Shortfalls of an infeasible plan.
    timings : dict of str to float
        Seconds for validate, compile, transfer (the model handed to the
        solver, when the back end times it), solve, post-process and audit.
    solver : dict
        Method, iterations, options and versions.
    warnings : list of str
        Notes on the solve, such as an audit violation, a solver verdict the
        elastic re-solve confirmed or overturned, or the end effects of a
        plan without a terminal condition.

    Notes
    -----
    The schedule tables (``output``, ``starts``, ``shadow_prices``, …) are
    available only when ``ok`` is true; on any other result they raise
    :class:`~growthplan.PlanNotOptimal`, so a stopped or unverified solve
    cannot be mistaken for a plan. ``raw_solution`` still holds the solver's
    numbers for inspection.
    """

    def __init__(self, plan: Any, lp: LinearProgram, outcome: SolverOutcome, *,
                 status: Status, timings: dict[str, float], audit: Audit | None = None,
                 schedules: Schedules | None = None, notes: list[str] | None = None,
                 diagnosis: Diagnosis | None = None, backend: str = "highs") -> None:
        self.plan = plan
        self.lp = lp
        self.data = lp.data
        self.outcome = outcome
        self.status = status
        self.objective = outcome.objective
        self.message = outcome.message
        if status is not Status.OPTIMAL and "optimal" in self.message.lower():
            # only a verified optimum is ever called optimal, in any case or form
            self.message = "the solver's answer was not verified"
        self.audit = audit
        self.timings = timings
        self.warnings = list(notes or [])
        self.diagnosis = diagnosis
        self.horizons: dict[int, str] | None = None
        self.runaway: list[str] = []
        self._schedules = schedules
        self._frames: dict[str, Any] | None = None
        import highspy
        import pulp

        from .. import __version__
        from ..backends.highs import highs_version
        self.solver = {"backend": backend, "method": outcome.method,
                       "iterations": outcome.iterations, "seconds": outcome.seconds,
                       "options": dict(outcome.options),
                       "versions": {"growthplan": __version__, "highs": highs_version(),
                                    "highspy": getattr(highspy, "__version__", ""),
                                    "pulp": pulp.__version__}}

    # -- status -----------------------------------------------------------------
    @property
    def ok(self) -> bool:
        """True for an optimal, audited plan."""
        return self.status is Status.OPTIMAL

    def raise_for_status(self) -> PlanResult:
        """Raise the matching growthplan error unless the plan is optimal and audited.

        Returns
        -------
        PlanResult
            This result, when it is optimal and audited.

        Raises
        ------
        PlanInfeasible
            For an infeasible plan (with the diagnosis's headline when there is one).
        PlanUnbounded
            For an unbounded plan (naming the runaway columns).
        SolverFailure
            For any other status.
        """
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
        raise SolverFailure(f"No verified plan: status {self.status.value} "
                            f"({self.message}). {' '.join(self.warnings)}".strip())

    @property
    def raw_solution(self) -> np.ndarray:
        """The solver's column values, whatever the status."""
        return self.outcome.x

    def _get(self, name: str) -> Any:
        if not self.ok:
            raise PlanNotOptimal(
                f"{name} is only available for an optimal, audited plan; this result has "
                f"status {self.status.value!r} ({self.message}). See result.status, "
                "result.diagnosis or result.raw_solution.")
        if self._frames is None:
            assert self._schedules is not None and self.data is not None
            self._frames = tables.frames(self.data, self.lp, self.outcome, self._schedules,
                                         self.plan.objective.discount_rate())
        value = self._frames[name]
        # a copy: editing a returned table never changes the audited plan (cheap with
        # pandas' copy-on-write)
        return value.copy() if isinstance(value, pd.DataFrame | pd.Series) else value

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

    accounts = property(
        lambda self: self._get("accounts"),
        doc="The plan in national-accounts terms at base-year prices, by year "
            "(see growthplan.results.accounts).")
    employment = property(lambda self: self._get("employment"),
                          doc="Labour used by kind and sector, years × (kind, sector).")
    shadow_prices_money = property(
        lambda self: self._get("shadow_prices_money"),
        doc="Shadow prices in base-year money per unit: each year scaled so the first "
            "year's output bundle is worth the same at shadow and at base-year prices.")
    quasi_rents_money = property(lambda self: self._get("quasi_rents_money"),
                                 doc="Quasi-rents in base-year money (same numeraire).")
    labour_values_money = property(lambda self: self._get("labour_values_money"),
                                   doc="Labour values in base-year money (same numeraire).")
    calibration = property(
        lambda self: self._get("calibration"),
        doc="The first plan year against the base year by sector: output, its change, "
            "employment (empty when the economy has no base-year output).")
    # several regions (empty tables for a plan of one region)
    regional_accounts = property(
        lambda self: self._get("regional_accounts"),
        doc="Each region's product, investment and its share, consumption and employment, "
            "(year, region) × items, at base-year prices.")
    regional_gap = property(lambda self: self._get("regional_gap"),
                            doc="Regional product per person-year by region, and the ratio "
                                "of the highest to the lowest, by year.")
    flows = property(lambda self: self._get("flows"),
                     doc="Shipments by year, origin, destination and good: units, transport "
                         "used, value at base-year prices.")
    spatial_prices = property(lambda self: self._get("spatial_prices"),
                              doc="Shadow prices by (year, commodity) × region, with the spread.")
    regional_output = property(lambda self: self._get("regional_output"),
                               doc="Output, years × (region, sector).")
    floor_values = property(lambda self: self._get("floor_values"),
                            doc="Value of relaxing the consumption floor by one unit, per year.")

    emissions = property(
        lambda self: self._get("emissions"),
        doc="Emissions and resource use in long form: year, stressor (or impact), sector, "
            "technique (households for their direct emissions), amount, unit.")
    emission_totals = property(
        lambda self: self._get("emission_totals"),
        doc="Emissions of each stressor and impact by year (units in attrs['units']).")
    emission_prices = property(
        lambda self: self._get("emission_prices"),
        doc="Every emission limit's row with its shadow price: value (objective gained per "
            "unit relaxed) and price (base-year money per unit); one row for a budget.")

    @property
    def terminal_value(self) -> float:
        """Value at base-year prices of the capacity in service after the plan."""
        return float(self._get("terminal_value"))

    @property
    def level(self) -> float | None:
        """Terminal-capacity level ``λ`` (terminal-capacity objective only)."""
        return self._get("level")

    def tidy(self) -> pd.DataFrame:
        """All year × sector schedules in long form: year, sector, quantity, value.

        Returns
        -------
        pandas.DataFrame
        """
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
        """Binding conditions ranked by their value per year.

        Parameters
        ----------
        top : int or None, default 20
            Most rows per year (None: all).
        threshold : float, default 1e-9
            Smallest value (per unit of base-year value) that counts as binding.

        Commodity balances (shadow prices), capacities (quasi-rents) and
        labour supplies (labour values) are ranked together.

        Parameters
        ----------
        top : int or None, default 20
            Rows kept per year; None keeps every binding condition.
        threshold : float, default 1e-9
            Least value of a condition counted as binding.

        Returns
        -------
        pandas.DataFrame
            Columns condition, year, name, value (the shadow price per unit) and
            per_value (per unit of base-year value: a commodity's or a capacity's
            shadow price over its base-year price; labour per unit of labour),
            ranked by per_value within each year, years in order. The ranking
            does not change with the units sectors are measured in.
        """
        assert self.data is not None
        price = dict(zip(self.data.names, self.data.prices, strict=True))
        rows = []
        for cond, frame in (("commodity", self.shadow_prices), ("capacity", self.quasi_rents),
                            ("labour", self.labour_values)):
            for year, series in frame.iterrows():
                for name, v in series.items():
                    per = float(v) / price[name] if cond != "labour" else float(v)
                    if per > threshold:
                        rows.append({"condition": cond, "year": year, "name": name,
                                     "value": float(v), "per_value": per})
        out = pd.DataFrame(rows, columns=["condition", "year", "name", "value", "per_value"])
        if out.empty:
            return out
        out = out.sort_values(["year", "per_value"], ascending=[True, False])
        if top is not None:
            out = out.groupby("year", sort=True).head(top)
        return out.reset_index(drop=True)

    # -- techniques -------------------------------------------------------------
    @property
    def techniques(self) -> pd.DataFrame:
        """Output, capacity and starts of every technique by year (tidy).

        Columns technique, sector, label, year, output, capacity, starts
        (see :mod:`growthplan.results.techniques`).
        """
        from .techniques import technique_table

        return technique_table(self)

    @property
    def technique_years(self) -> pd.DataFrame:
        """First year each technique is started and last year it is used."""
        from .techniques import technique_years

        return technique_years(self)

    @property
    def technique_profits(self) -> pd.DataFrame:
        """Profit of every technique and year at the shadow prices (≤ 0, = 0 when in use).

        See :mod:`growthplan.results.techniques` for the expressions.
        """
        from .techniques import technique_profits

        return technique_profits(self)

    def explain_technique(self, sector: str, year: int) -> str:
        """A short text table comparing a sector's techniques in one year.

        Parameters
        ----------
        sector : str
        year : int

        Returns
        -------
        str
        """
        from .techniques import explain_technique

        return explain_technique(self, sector, year)

    def summary(self) -> Summary:
        """A short report: text in a terminal (``print``), a table in a notebook.

        Returns
        -------
        Summary
        """
        return Summary(self)

    def key_figures(self) -> dict[str, Any]:
        """The figures the summary and scenario tables share (status, objective, totals).

        Returns
        -------
        dict of str to object
        """
        return key_figures(self)

    def __repr__(self) -> str:
        return (f"PlanResult(status={self.status.value!r}, objective={self.objective:.6g}, "
                f"years={self.plan.years[0]}..{self.plan.years[-1]}, "
                f"sectors={self.plan.economy.n})")

    # -- export -----------------------------------------------------------------
    def _tables(self) -> dict[str, pd.DataFrame]:
        names = ["accounts", "output", "capacity", "utilisation", "starts",
                 "capital_deliveries", "retirements", "labour", "employment", "consumption",
                 "surplus", "shadow_prices", "shadow_prices_money", "shadow_prices_current",
                 "labour_values", "labour_values_money", "quasi_rents", "quasi_rents_money",
                 "target_values", "imports", "exports"]
        out = {n: _with_units(self._get(n)) for n in names}
        fx = self._get("shadow_exchange_rate")
        if not fx.isna().all():
            out["shadow_exchange_rate"] = fx.to_frame()
        from .regions import REGIONAL_TABLES, flat_table

        for name in REGIONAL_TABLES:  # several regions only (empty otherwise)
            out[name] = flat_table(self._get(name))
        if self.data is not None and self.data.tech is not None:
            from .techniques import technique_export

            out["techniques"] = technique_export(self)
        if self.data is not None and self.data.satellite is not None:
            out["emissions"] = self._get("emissions")
            out["emission_totals"] = _with_units(self._get("emission_totals"))
            out["emission_prices"] = self._get("emission_prices")
        assert self.audit is not None
        out["audit"] = self.audit.checks.reset_index()
        return {k: v for k, v in out.items() if v is not None and not v.empty}

    def _diagnosis_tables(self) -> dict[str, pd.DataFrame]:
        """The diagnosis of a result that is not a plan, as tables (empty without one)."""
        if self.diagnosis is None:
            return {}
        from .report import shortfall_table

        out = {"shortfalls": shortfall_table(self)}
        subset = self.diagnosis.infeasible_subset
        if subset is not None and not subset.empty:
            out["conflict"] = subset
        return {k: v for k, v in out.items() if not v.empty}

    def to_csv(self, folder: str | os.PathLike[str], *, overwrite: bool = False,
               protect: Iterable[str | os.PathLike[str]] = ()) -> Path:
        """Write every table as ``<name>.csv``, with ``summary.txt``, into a folder.

        A result that is not an optimal, audited plan writes what it has
        instead: the summary and, for an impossible plan, the diagnosis
        (``shortfalls.csv`` and ``conflict.csv``, the conditions that cannot
        hold together, in words).

        Parameters
        ----------
        folder : str or path-like
            A new folder, written aside and renamed into place, so an
            interrupted export never leaves half a folder.
        overwrite : bool, default False
            Write into an existing folder: only files an earlier export of the
            library wrote there are replaced; other files are never touched.
        protect : iterable of paths
            Input files (the plan file and its tables); a folder holding one is
            refused.

        Returns
        -------
        pathlib.Path
            The folder.
        """
        from ..io.atomic import atomic_folder
        from .workbook import flat_table

        tables = self._tables() if self.ok else self._diagnosis_tables()
        with atomic_folder(folder, overwrite=overwrite, protect=protect, kind="tables") as tmp:
            for name, frame in tables.items():
                # the workbook's headers: one row, units, the key as a named column
                flat_table(name, frame, self).to_csv(tmp / f"{name}.csv", index=False)
            (tmp / "summary.txt").write_text(str(self.summary()), encoding="utf-8")
        return Path(folder)

    def report(self, path: str | os.PathLike[str], *, overwrite: bool = False,
               protect: Iterable[str | os.PathLike[str]] = (), force: bool = False) -> Path:
        """Write a self-contained HTML report a colleague opens in a browser.

        The report holds the caution, the inputs and assumptions, the targets
        with their margins, the national accounts, the bottlenecks, charts
        (with matplotlib installed), the shadow prices in base-year money and,
        for an impossible plan, the diagnosis in words (see
        :mod:`growthplan.results.report`).

        Parameters
        ----------
        path : str or path-like
            The HTML file, written aside and renamed into place.
        overwrite : bool, default False
            Replace an existing report the library wrote.
        protect : iterable of paths
            Input files that must never be overwritten.
        force : bool, default False
            With ``overwrite``, replace a file the library did not write (one
            without its mark, see :mod:`growthplan.io.marks`); without it such
            a file is refused, naming it.

        Returns
        -------
        pathlib.Path
        """
        from .report import write_report

        return write_report(self, path, overwrite=overwrite, protect=protect, force=force)

    def to_excel(self, path: str | os.PathLike[str], *, overwrite: bool = False,
                 protect: Iterable[str | os.PathLike[str]] = (), force: bool = False) -> Path:
        """Write every table as a sheet of one workbook a colleague can read.

        A summary, the inputs and assumptions, the sectors, a glossary and the
        targets come first, then the tables, or for an impossible plan the
        diagnosis (see :mod:`growthplan.results.workbook`).

        Parameters
        ----------
        path : str or path-like
            The workbook, written aside and renamed into place.
        overwrite : bool, default False
            Replace an existing workbook the library wrote.
        protect : iterable of paths
            Input files that must never be overwritten.
        force : bool, default False
            With ``overwrite``, replace a file the library did not write (one
            without its mark, see :mod:`growthplan.io.marks`); without it such
            a file is refused, naming it.

        Returns
        -------
        pathlib.Path
        """
        from .workbook import write_workbook

        # an impossible plan has no schedules: its workbook holds the diagnosis instead
        tables = self._tables() if self.ok else {}
        return write_workbook(self, path, tables, overwrite=overwrite, protect=protect,
                              force=force)


def _with_units(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy whose column headers carry their units, for exports ("energy [GWh]")."""
    units = frame.attrs.get("units")
    unit = frame.attrs.get("unit")
    if isinstance(frame.columns, pd.MultiIndex) or (not units and not unit):
        return frame
    share = ("share", "growth", "per_head")

    def label(c: object) -> object:
        if units and c in units:
            return f"{c} [{units[c]}]"
        if unit and isinstance(c, str) and not c.startswith("employment") \
                and not c.endswith(share):
            return f"{c} [{unit}]"
        return c

    return frame.rename(columns=label)
