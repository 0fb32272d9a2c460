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
from typing import TYPE_CHECKING, Any, Generic, TypeVar, overload

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
    from ..model.plan import Plan
    from .diagnosis import Diagnosis

__all__ = ["PlanResult", "Table", "CAUTION"]


T = TypeVar("T")


class Table(Generic[T]):
    """A :class:`PlanResult` attribute for a table declared in :mod:`growthplan.results.tables`.

    Its name is the attribute's, its docstring the declaration's; the table is
    computed on first access and a copy returned.
    """

    def __set_name__(self, owner: type, name: str) -> None:
        self.name = name
        self.__doc__ = tables.TABLES[name].doc

    @overload
    def __get__(self, obj: None, objtype: type | None = None) -> Table[T]: ...

    @overload
    def __get__(self, obj: PlanResult, objtype: type | None = None) -> T: ...

    def __get__(self, obj: PlanResult | None, objtype: type | None = None) -> Table[T] | T:
        if obj is None:
            return self
        value: T = obj._get(self.name)
        return value


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
    numbers for inspection. Every table is declared once in
    :mod:`growthplan.results.tables`.

    Examples
    --------
    One sector with a = 0.6, b = 2 and a 20-year geometric life: capacity
    grows at the Harrod–Domar rate (1 − a)/b − δ = 0.15 a year.

    >>> from growthplan import CapitalSpec, Economy, Plan, TerminalGrowth
    >>> econ = Economy(sectors=["goods"], input_coefficients=[[0.6]],
    ...                capital_coefficients=[[2.0]],
    ...                capital={"goods": CapitalSpec(initial_capacity=100,
    ...                                              mean_service_life=20)})
    >>> result = Plan(economy=econ, years=range(2030, 2033),
    ...               terminal=TerminalGrowth(rate=0.02)).solve()
    >>> result.ok
    True
    >>> result.capacity["goods"].round(4).tolist()
    [100.0, 115.0, 132.25, 152.0875]
    >>> float(result.utilisation.loc[2031, "goods"].round(9))
    1.0
    """

    def __init__(self, plan: Plan, lp: LinearProgram, outcome: SolverOutcome, *,
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
        self._solved: tables.Solved | None = None
        self._computed: dict[str, Any] = {}
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
        if name not in self._computed:
            if self._solved is None:
                self._solved = tables.Solved(self)
            self._computed[name] = tables.TABLES[name].compute(self._solved)
        value = self._computed[name]
        # a copy: editing a returned table never changes the audited plan (cheap with
        # pandas' copy-on-write)
        return value.copy() if isinstance(value, pd.DataFrame | pd.Series) else value

    # -- the tables (declared in growthplan.results.tables) ---------------------
    output = Table[pd.DataFrame]()
    capacity = Table[pd.DataFrame]()
    utilisation = Table[pd.DataFrame]()
    starts = Table[pd.DataFrame]()
    capital_deliveries = Table[pd.DataFrame]()
    retirements = Table[pd.DataFrame]()
    labour = Table[pd.DataFrame]()
    consumption = Table[pd.DataFrame]()
    surplus = Table[pd.DataFrame]()
    shadow_prices = Table[pd.DataFrame]()
    shadow_prices_current = Table[pd.DataFrame]()
    labour_values = Table[pd.DataFrame]()
    quasi_rents = Table[pd.DataFrame]()
    target_values = Table[pd.DataFrame]()
    imports = Table[pd.DataFrame]()
    exports = Table[pd.DataFrame]()
    shadow_exchange_rate = Table[pd.Series]()
    accounts = Table[pd.DataFrame]()
    employment = Table[pd.DataFrame]()
    shadow_prices_money = Table[pd.DataFrame]()
    quasi_rents_money = Table[pd.DataFrame]()
    labour_values_money = Table[pd.DataFrame]()
    calibration = Table[pd.DataFrame]()
    floor_values = Table[pd.Series]()
    terminal_value = Table[float]()
    level = Table[float | None]()
    # several regions (empty tables for a plan of one region)
    regional_accounts = Table[pd.DataFrame]()
    regional_gap = Table[pd.DataFrame]()
    flows = Table[pd.DataFrame]()
    spatial_prices = Table[pd.DataFrame]()
    regional_output = Table[pd.DataFrame]()
    # emissions (empty without a satellite account)
    emissions = Table[pd.DataFrame]()
    emission_totals = Table[pd.DataFrame]()
    emission_prices = Table[pd.DataFrame]()

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
        """The exported tables by file name, in order (see growthplan.results.tables)."""
        return tables.exported(self._get)

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

