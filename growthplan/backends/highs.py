"""HiGHS through highspy: the default back end.

The matrix is passed column-wise (CSC) in one ``passModel`` call; HiGHS's
model status is mapped to :class:`~growthplan.backends.base.Status` by one
table and its raw text kept.
"""

from __future__ import annotations

import functools
import math
import os
import sys
import threading
import time
import warnings
from typing import Any

import highspy
import numpy as np

from ..errors import GrowthplanWarning, InvalidInput, SolverFailure, invalid
from ..lp.program import LinearProgram
from .base import Backend, Feature, SolverOutcome, Status
from .certificate import (
    GAP_TOLERANCE,
    SCALE_RANGE,
    entry_range,
    equilibrate,
    optimality_gap,
    scaled,
    valid_ray,
)
from .methods import (
    AUTO_IPM_NONZEROS,
    HIPO_INSTALL,
    METHODS,
    SLOW_METHOD_NONZEROS,
    SLOW_METHODS,
    Rule,
    choose,
)

__all__ = ["HighsBackend", "HighsSession", "STATUS_TABLE", "METHODS", "choose_method",
           "highs_version", "AUTO_IPM_NONZEROS", "SLOW_METHOD_NONZEROS", "SlowMethodWarning",
           "hipo_available"]

_MS = highspy.HighsModelStatus
STATUS_TABLE: dict[object, Status] = {
    _MS.kOptimal: Status.OPTIMAL,
    _MS.kInfeasible: Status.INFEASIBLE,
    _MS.kUnbounded: Status.UNBOUNDED,
    _MS.kUnboundedOrInfeasible: Status.INFEASIBLE_OR_UNBOUNDED,
    _MS.kTimeLimit: Status.TIME_LIMIT,
    _MS.kIterationLimit: Status.ITERATION_LIMIT,
    _MS.kInterrupt: Status.INTERRUPTED,
    _MS.kUnknown: Status.UNKNOWN,
    _MS.kNotset: Status.UNKNOWN,
    _MS.kModelEmpty: Status.OPTIMAL,
    _MS.kSolveError: Status.ERROR,
    _MS.kLoadError: Status.ERROR,
    _MS.kModelError: Status.ERROR,
    _MS.kPresolveError: Status.ERROR,
    _MS.kPostsolveError: Status.ERROR,
    _MS.kObjectiveBound: Status.UNKNOWN,
    _MS.kObjectiveTarget: Status.UNKNOWN,
    _MS.kSolutionLimit: Status.UNKNOWN,
}
if hasattr(_MS, "kMemoryLimit"):
    STATUS_TABLE[_MS.kMemoryLimit] = Status.ERROR

_SLOW_METHODS = SLOW_METHODS


class SlowMethodWarning(GrowthplanWarning):
    """A method much slower than interior point was asked for on a large plan.

    On the dense benchmark plans simplex (also HiGHS's default choice there)
    took about 40 times as long as interior point without crossover at
    60 × 25 (202,560 nonzeros), and interior point with crossover twice as
    long at 60 × 25 and more than 6 times at 100 × 30; ``method="auto"``
    picks interior point without crossover.
    """


@functools.cache
def hipo_available() -> bool:
    """Whether this HiGHS has HiPO (highspy-extras of the same version installed).

    Asked once per process: the plain highspy wheel refuses ``solver="hipo"``.
    """
    h = _new_highs(_STATE["threads"])
    h.setOptionValue("output_flag", False)
    return bool(h.setOptionValue("solver", "hipo") == highspy.HighsStatus.kOk)


def choose_method(nonzeros: int) -> str:
    """HiGHS method for a plan with this many nonzeros (``choose``'s, on this install).

    Multi-year plans have dense input and capital blocks repeated over years;
    on them the interior point method without crossover was many times faster
    than simplex above about 4,000 nonzeros, while the smallest plans solve
    fastest by simplex, which also returns a vertex. Measured end to end on
    the dense random plans of ``tests/benchmarks/bench_scale.py --crossover``
    (two interleaved runs; simplex time over interior point time): 0.65–0.71
    at 10 × 10 (2,760 nonzeros), 0.71 at 10 × 12 (3,430), 1.09 at 12 × 10
    (3,792), 1.00–1.46 at 10 × 15 (4,510), 2.2 at 15 × 15 and 15 at 25 × 20.
    """
    return choose(nonzeros, hipo=hipo_available()).method


_LOCK = threading.Lock()
_STATE: dict[str, Any] = {"banner": False, "threads": None}


def _new_highs(threads: int | None = None) -> highspy.Highs:
    """A Highs object, with the licence banner muted and the thread pool matched.

    HiGHS prints a banner on stdout when its first object is made, which would
    land in the middle of command-line output and notebooks. Its thread pool
    is global and keeps the size of the first solve: a later solve asking for
    another number of threads must reset it first, or HiGHS returns "Not Set".
    """
    with _LOCK:
        if _STATE["threads"] != threads and _STATE["banner"]:
            highspy.Highs.resetGlobalScheduler(True)
        _STATE["threads"] = threads
        if _STATE["banner"]:
            return highspy.Highs()
        _STATE["banner"] = True
        try:
            sys.stdout.flush()
            saved = os.dup(1)
        except (OSError, ValueError):  # no real stdout (some notebook front ends)
            return highspy.Highs()
        try:
            with open(os.devnull, "w") as null:
                os.dup2(null.fileno(), 1)
                h = highspy.Highs()
        finally:
            os.dup2(saved, 1)
            os.close(saved)
        return h


@functools.cache
def highs_version() -> str:
    """HiGHS's version, asked once per process."""
    h = _new_highs(_STATE["threads"])
    try:
        return f"{h.versionMajor()}.{h.versionMinor()}.{h.versionPatch()}"
    except Exception:  # pragma: no cover - older highspy
        return "unknown"


def _set(h: highspy.Highs, name: str, value: Any) -> None:
    st = h.setOptionValue(name, value)
    if st != highspy.HighsStatus.kOk:
        raise invalid(f"options.{name}", "be a HiGHS option with a valid value", value)


def _bounds(v: np.ndarray, missing: float) -> np.ndarray:
    return np.where(np.isfinite(v), v, missing).astype(np.float64)


def load(h: highspy.Highs, lp: LinearProgram) -> float:
    """Pass ``lp`` to ``h`` column-wise (CSC) in one ``passModel`` call.

    Uses highspy's overload that takes the arrays themselves: it was 6 to 8
    times faster than filling a ``HighsLp`` field by field on 100 × 30 and
    200 × 30 plans (0.65 and 2.5 million nonzeros) and gives HiGHS the same
    model. An integrality array must be given (all continuous): an empty
    one is read as garbage. The matrix arrays are passed without copying
    when they already have HiGHS's types (HiGHS makes its own copy).

    Returns
    -------
    float
        Seconds the transfer took.
    """
    t0 = time.perf_counter()
    m = lp.matrix.tocsc()
    inf = highspy.kHighsInf
    nrow, ncol = m.shape
    sense = highspy.ObjSense.kMaximize if lp.sense == "max" else highspy.ObjSense.kMinimize
    st = h.passModel(int(ncol), int(nrow), int(m.nnz), int(highspy.MatrixFormat.kColwise),
                     int(sense), 0.0, np.ascontiguousarray(lp.cost, dtype=np.float64),
                     _bounds(lp.col_lower, -inf), _bounds(lp.col_upper, inf),
                     _bounds(lp.row_lower, -inf), _bounds(lp.row_upper, inf),
                     m.indptr.astype(np.int32, copy=False),
                     m.indices.astype(np.int32, copy=False),
                     m.data.astype(np.float64, copy=False), np.zeros(ncol, dtype=np.int32))
    if st == highspy.HighsStatus.kError:
        raise SolverFailure("HiGHS refused the model (passModel returned an error)")
    return time.perf_counter() - t0


CERTIFY_TOLERANCE = 1e-6  # relative duality gap above which an "optimal" is not believed


def _certified(lp: LinearProgram, out: SolverOutcome, strict: bool = False) -> SolverOutcome:
    """Demote an optimum whose duals do not certify it (so another method is tried)."""
    if out.status is Status.OPTIMAL and out.row_dual is not None:
        gap = optimality_gap(lp, out.x, out.row_dual, strict=strict)
        out.options["gap"] = gap
        if gap > CERTIFY_TOLERANCE:
            out.status = Status.NOT_VERIFIED
            out.message += f" (duality gap {gap:.3g}: not certified)"
    return out


class HighsBackend:
    """HiGHS through highspy.

    Parameters
    ----------
    method : {"auto", "simplex", "ipm", "ipm-crossover", "pdlp", "highs-default", "hipo"}
        ``"auto"`` picks by problem size (:func:`~growthplan.backends.methods.choose`);
        ``"hipo"`` needs the ``hipo`` extra (refused with the line to install it).
    time_limit : float, optional
        Seconds per solve.
    threads : int, optional
        HiGHS threads (its global thread pool is reset when this changes).
    tolerance : float, optional
        Primal and dual feasibility tolerance.
    options : dict, optional
        Further HiGHS options by name (a bad name or value is an error).
    scale : {"auto", True, False}
        Equilibrate rows and columns before HiGHS's own scaling
        (:func:`~growthplan.backends.certificate.equilibrate`); ``"auto"``
        does so when the entries span more than ``SCALE_RANGE``. A scaled
        optimum that the unscaled duals do not certify is solved again unscaled.
    presolve : bool, default True
        Let HiGHS presolve the LP.
    formulation : {"auto", "expression", "state"}
        How capacity in service is written in the LP; ``"auto"`` goes with the
        method (:func:`growthplan.backends.methods.choose`).
    """

    name = "highs"
    features = frozenset({Feature.DUALS, Feature.IIS, Feature.RAY, Feature.INTERRUPT,
                          Feature.TIME_LIMIT})

    def __init__(self, method: str = "auto", *, time_limit: float | None = None,
                 threads: int | None = None, tolerance: float | None = None,
                 options: dict[str, Any] | None = None, scale: bool | str = "auto",
                 presolve: bool = True, formulation: str = "auto") -> None:
        from .options import SolveOptions

        # the settings are checked where every solve's are (plan files and the command line too)
        opts = SolveOptions.of(method=method, time_limit=time_limit, threads=threads,
                               tolerance=tolerance, options=options)
        if opts.method == "hipo" and not hipo_available():
            raise InvalidInput(
                f"method must be one this HiGHS provides: 'hipo' needs HiGHS's HiPO, which "
                f"the plain highspy wheel lacks. Got 'hipo'. Install it with {HIPO_INSTALL} "
                f"(highspy and highspy-extras of the same version; this is HiGHS "
                f"{highs_version()}), or use method='ipm'.", field="method")
        if scale not in ("auto", True, False):
            raise invalid("scale", "be 'auto', True or False", scale)
        if formulation not in ("auto", "expression", "state"):
            raise invalid("formulation", "be one of auto, expression, state", formulation)
        self.formulation = formulation
        self.method = opts.method
        self.time_limit = opts.time_limit
        self.threads = opts.threads
        self.tolerance = opts.tolerance
        self.options = dict(opts.options)
        self.scale = scale
        self.presolve = presolve
        self._warn_slow = True  # off for the stand-ins of alternatives(), and once warned

    def __repr__(self) -> str:
        return f"HighsBackend(method={self.method!r})"

    @staticmethod
    def hipo_available() -> bool:
        """Whether HiPO is installed (:func:`hipo_available`).

        Returns
        -------
        bool
        """
        return hipo_available()

    def rule(self, nonzeros: int, formulation: str = "auto") -> Rule:
        """The formulation, method and options this back end uses for an LP of this size.

        Parameters
        ----------
        nonzeros : int
            The LP's nonzeros (the expression form's, before it is built).
        formulation : {"auto", "expression", "state"}

        Returns
        -------
        Rule
            See :func:`growthplan.backends.methods.choose`.
        """
        return choose(nonzeros, hipo=hipo_available(), method=self.method,
                      formulation=self.formulation if formulation == "auto" else formulation)

    def _variant(self, **changes: Any) -> HighsBackend:
        kw: dict[str, Any] = {"time_limit": self.time_limit, "threads": self.threads,
              "tolerance": self.tolerance, "options": self.options, "scale": self.scale,
              "presolve": self.presolve, "formulation": self.formulation}
        method = changes.pop("method", self.method)
        kw.update(changes)
        variant = HighsBackend(method, **kw)
        variant._warn_slow = False  # the user did not pick this method
        return variant

    def alternatives(self) -> list[Backend]:
        """Interior point and simplex stand in for each other; then simplex without
        presolve; last, simplex on the problem as it is (HiGHS's own scaling only).

        Returns
        -------
        list of Backend
            Copies of this back end with the other method, scaling on, and
            the last with the library's equilibration off: on an elastic
            problem of a 71-industry plan from published tables (entries
            over 16 orders of magnitude) simplex ended "unknown" on the
            equilibrated copy and optimal on the problem as it was.
        """
        # HiPO's stand-in is the other interior point (simplex takes far longer on the
        # large plans HiPO is chosen for); the others stand in for each other
        other = "ipm" if self.method == "hipo" else \
            "simplex" if self.method in ("ipm", "ipm-crossover", "pdlp", "auto") else "ipm"
        return [self._variant(method=other, scale=True),
                self._variant(method="simplex", scale=True, presolve=False),
                self._variant(method="simplex", scale=False)]

    def undecided_at_size(self, lp: LinearProgram, out: SolverOutcome) -> bool:
        """Whether a failed solve should go to the elastic re-solve before the alternatives.

        An interior point often ends an impossible plan with "no progress"
        (status ``unknown``) rather than a verdict of infeasibility; above
        ``SLOW_METHOD_NONZEROS`` the simplex alternatives then take many
        times longer than the elastic re-solve, which always has an optimum
        and decides the question (measured at 200 × 30, 2.5 million
        nonzeros: the interior point stopped after 24 s, dual simplex had
        not decided after 15 minutes, the elastic re-solve took 44 s).

        Parameters
        ----------
        lp : LinearProgram
            The problem solved.
        out : SolverOutcome
            Its outcome.

        Returns
        -------
        bool
        """
        return (out.status in (Status.UNKNOWN, Status.IMPRECISE,
                               Status.INFEASIBLE_OR_UNBOUNDED)
                and out.method in ("ipm", "ipm-crossover", "hipo", "pdlp")
                and lp.nnz > SLOW_METHOD_NONZEROS)

    def solve(self, lp: LinearProgram, *, stop: Any = None,
              callback: Any = None) -> SolverOutcome:
        """Solve ``lp``; see the class notes on scaling.

        An optimum is returned only when its duals certify it (a relative
        duality gap below ``CERTIFY_TOLERANCE``), an unbounded verdict only with
        a valid ray; otherwise the status is ``not_verified`` or ``unknown`` and
        the pipeline tries another method.

        Parameters
        ----------
        lp : LinearProgram
            The problem, its ``cost`` in its ``sense``.
        stop : callable or threading.Event, optional
            Polled during simplex and interior-point iterations; true (or set)
            interrupts the solve, which then has status ``interrupted``.
        callback : callable, optional
            Called with each line of HiGHS's log (the log is off without it).

        Returns
        -------
        SolverOutcome
            Status, primal values, duals and solver details; never raises for
            a failed solve.
        """
        if self._warn_slow and self.method in _SLOW_METHODS and lp.nnz > SLOW_METHOD_NONZEROS:
            self._warn_slow = False
            warnings.warn(f"method {self.method!r} on a plan with {lp.nnz:,} nonzeros may take "
                          "many times longer than method='ipm' (interior point without "
                          "crossover, which 'auto' picks).", SlowMethodWarning, stacklevel=2)
        return self.confirm_unbounded(lp, self._solve(lp, stop, callback))

    def _solve(self, lp: LinearProgram, stop: Any, callback: Any) -> SolverOutcome:
        wide = entry_range(lp) > SCALE_RANGE
        scale = wide if self.scale == "auto" else self.scale
        if not scale:
            out = self._once(lp, stop, callback, scale=False)
            out.options["scaled"] = False
            return _certified(lp, out, strict=wide)
        first = self._once(lp, stop, callback, scale=True)
        first.options["scaled"] = True
        if first.status is not Status.OPTIMAL or first.row_dual is None:
            return first
        gap = optimality_gap(lp, first.x, first.row_dual, strict=wide)
        first.options["gap"] = gap
        if gap <= GAP_TOLERANCE:
            return first
        second = self._once(lp, stop, callback, scale=False)
        second.options["scaled"] = False
        second.options["scaled_gap"] = gap
        return _certified(lp, second, strict=wide)

    def confirm_unbounded(self, lp: LinearProgram, out: SolverOutcome) -> SolverOutcome:
        """Demote an "unbounded" verdict that no valid ray backs (so another method is tried).

        Parameters
        ----------
        lp : LinearProgram
            The problem solved.
        out : SolverOutcome
            Its outcome; changed in place when demoted.

        Returns
        -------
        SolverOutcome
            ``out``, with status ``unknown`` when it said unbounded but no
            valid primal ray was found.
        """
        if out.status is Status.UNBOUNDED:
            ray = self.ray(lp)
            if ray is None or not valid_ray(lp, ray):
                out.status = Status.UNKNOWN
                out.message += " (no valid unbounded ray: not confirmed)"
        return out

    def _highs(self, rule: Rule, callback: Any, stop: Any
               ) -> tuple[highspy.Highs, dict[str, Any]]:
        h = _new_highs(self.threads)
        chosen: dict[str, object] = {"output_flag": callback is not None,
                                     "log_to_console": False, "random_seed": 0}
        chosen.update(METHODS[rule.method])
        chosen.update(rule.options)
        if not self.presolve:
            chosen["presolve"] = "off"
        if self.time_limit is not None:
            chosen["time_limit"] = float(self.time_limit)
        if self.threads is not None:
            chosen["threads"] = self.threads
        if self.tolerance is not None:
            chosen["primal_feasibility_tolerance"] = float(self.tolerance)
            chosen["dual_feasibility_tolerance"] = float(self.tolerance)
        chosen.update(self.options)
        for k, v in chosen.items():
            _set(h, k, v)
        if callback is not None:
            h.cbLogging.subscribe(lambda e: callback(str(e.message)))
        if stop is not None:
            check = stop.is_set if hasattr(stop, "is_set") else stop

            def poll(e: Any) -> None:
                if check():
                    e.interrupt()

            h.cbSimplexInterrupt.subscribe(poll)
            h.cbIpmInterrupt.subscribe(poll)
        return h, chosen

    def _once(self, lp: LinearProgram, stop: Any, callback: Any, *,
              scale: bool) -> SolverOutcome:
        rule = self.rule(lp.nnz, lp.formulation)
        method = rule.method
        h, chosen = self._highs(rule, callback, stop)
        r = c = None
        t_start = time.perf_counter()
        try:
            if scale:  # the scaled copy is part of getting the model to HiGHS
                r, c = equilibrate(lp)
                load(h, scaled(lp, r, c))
            else:
                load(h, lp)
            transfer = time.perf_counter() - t_start
        except SolverFailure as exc:
            return SolverOutcome(status=Status.ERROR, message=str(exc), objective=float("nan"),
                                 x=np.full(lp.shape[1], np.nan), row_dual=None, method=method,
                                 options=dict(chosen),
                                 solver_version=f"HiGHS {highs_version()}")
        t0 = time.perf_counter()
        h.run()
        seconds = time.perf_counter() - t0
        ms = h.getModelStatus()
        status = STATUS_TABLE.get(ms, Status.UNKNOWN)
        info = h.getInfo()
        sol = h.getSolution()
        ncol = lp.shape[1]
        x = np.array(sol.col_value) if sol.value_valid else np.full(ncol, np.nan)
        row_dual = np.array(sol.row_dual) if sol.dual_valid else None
        col_dual = np.array(sol.col_dual) if sol.dual_valid else None
        if r is not None and c is not None:
            x = x * c
            row_dual = None if row_dual is None else row_dual * r
            col_dual = None if col_dual is None else col_dual / c
        if status is Status.OPTIMAL and not sol.value_valid:
            status = Status.UNKNOWN
        objective = float(lp.cost @ x) if sol.value_valid else float("nan")
        iters = {"simplex": int(info.simplex_iteration_count),
                 "ipm": int(info.ipm_iteration_count),
                 "crossover": int(getattr(info, "crossover_iteration_count", 0)),
                 "pdlp": int(getattr(info, "pdlp_iteration_count", 0))}
        return SolverOutcome(status=status, message=h.modelStatusToString(ms),
                             objective=objective, x=x, row_dual=row_dual, method=method,
                             col_dual=col_dual,
                             iterations=iters, seconds=seconds,
                             options={**chosen, "transfer_seconds": transfer},
                             solver_version=f"HiGHS {highs_version()}")

    def iis(self, lp: LinearProgram) -> tuple[list[int], list[int]] | None:
        """Rows and columns of an irreducible infeasible subset (None when HiGHS finds none).

        Uses ``iis_strategy`` 2 (from the LP) with the irreducibility bit 4: the
        default strategy can return a valid but empty set.

        Parameters
        ----------
        lp : LinearProgram
            An infeasible problem.

        Returns
        -------
        tuple of (list of int, list of int) or None
            Row and column indices of the subset.
        """
        h = _new_highs(self.threads)
        for k, v in {"output_flag": False, "random_seed": 0, "iis_strategy": 2 | 4}.items():
            _set(h, k, v)
        load(h, lp)
        h.run()
        st, iis = h.getIis()
        if st == highspy.HighsStatus.kError:
            return None
        rows, cols = list(iis.row_index_), list(iis.col_index_)
        return (rows, cols) if rows or cols else None

    def ray(self, lp: LinearProgram) -> np.ndarray | None:
        """A primal ray of an unbounded LP (the direction the columns run away in).

        Solved by simplex without presolve, equilibrated first when the
        entries span more than ``SCALE_RANGE``.

        Parameters
        ----------
        lp : LinearProgram
            An unbounded problem.

        Returns
        -------
        numpy.ndarray or None
            One value per column, in the LP's unscaled columns; None when
            HiGHS gives no ray.
        """
        h = _new_highs(self.threads)
        for k, v in {"output_flag": False, "random_seed": 0, "solver": "simplex",
                     "presolve": "off"}.items():
            _set(h, k, v)
        c = None
        try:
            if entry_range(lp) > SCALE_RANGE:
                r, c = equilibrate(lp)
                load(h, scaled(lp, r, c))
            else:
                load(h, lp)
        except SolverFailure:
            return None
        h.run()
        st, has_ray, ray = h.getPrimalRay()  # type: ignore[attr-defined]
        if st == highspy.HighsStatus.kError or not has_ray:
            return None
        out = np.asarray(ray, dtype=float)
        return out * c if c is not None else out


class HighsSession:
    """One HiGHS model kept loaded while its bounds and costs change between solves.

    HiGHS keeps the simplex basis of the last solve when only bounds or costs
    change, so each further solve starts from it (a warm start): the
    diagnosis's polishing and its deletion filter make many small changes to
    one problem.

    Parameters
    ----------
    lp : LinearProgram
        The problem, loaded once (minimised or maximised as its ``sense`` says).
    method : str, default "simplex"
        A name of :data:`METHODS`.
    tolerance : float, optional
        Primal and dual feasibility tolerance.
    threads : int, optional
        HiGHS threads.
    """

    def __init__(self, lp: LinearProgram, *, method: str = "simplex",
                 tolerance: float | None = None, threads: int | None = None) -> None:
        backend = HighsBackend(method, tolerance=tolerance, threads=threads)
        self.h, _ = backend._highs(Rule(formulation=lp.formulation, method=method), None, None)
        # equilibrated as the back end does it when the entries span a wide range
        self.r: np.ndarray = np.ones(lp.shape[0])
        self.c: np.ndarray = np.ones(lp.shape[1])
        if entry_range(lp) > SCALE_RANGE:
            self.r, self.c = equilibrate(lp)
        load(self.h, scaled(lp, self.r, self.c))
        self.method = method
        self.ncol = lp.shape[1]

    def row_bounds(self, rows: np.ndarray, lower: np.ndarray, upper: np.ndarray) -> None:
        """Change the bounds of some rows (``±inf`` for none)."""
        inf = highspy.kHighsInf
        rows = np.asarray(rows, dtype=np.int32)
        r = self.r[rows]
        self.h.changeRowsBounds(int(rows.size), rows,  # type: ignore[attr-defined]
                                _bounds(np.asarray(lower, float) * r, -inf),
                                _bounds(np.asarray(upper, float) * r, inf))

    def col_bounds(self, cols: np.ndarray, lower: np.ndarray, upper: np.ndarray) -> None:
        """Change the bounds of some columns (``±inf`` for none)."""
        inf = highspy.kHighsInf
        cols = np.asarray(cols, dtype=np.int32)
        c = self.c[cols]
        self.h.changeColsBounds(int(cols.size), cols,
                                _bounds(np.asarray(lower, float) / c, -inf),
                                _bounds(np.asarray(upper, float) / c, inf))

    def costs(self, cost: np.ndarray) -> None:
        """Replace the whole cost vector."""
        idx = np.arange(self.ncol, dtype=np.int32)
        self.h.changeColsCost(int(self.ncol), idx,
                              np.ascontiguousarray(np.asarray(cost, float) * self.c))

    def run(self, time_limit: float | None = None) -> tuple[Status, np.ndarray | None, float]:
        """Solve from the last basis.

        Parameters
        ----------
        time_limit : float, optional
            Seconds for this solve.

        Returns
        -------
        (Status, numpy.ndarray or None, float)
            The status, the column values (None without a solution) and the
            seconds taken.
        """
        _set(self.h, "time_limit", float(time_limit) if time_limit is not None else math.inf)
        t0 = time.perf_counter()
        self.h.run()
        seconds = time.perf_counter() - t0
        status = STATUS_TABLE.get(self.h.getModelStatus(), Status.UNKNOWN)
        sol = self.h.getSolution()
        x = np.array(sol.col_value) * self.c if sol.value_valid else None
        return status, x, seconds
