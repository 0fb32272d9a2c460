"""LinearProgram → HiGHS (through highspy), and the status mapping.

Solver outcomes are data: HiGHS's model status is mapped to
:class:`Status` by one table, the raw message is kept, and nothing here
raises for an infeasible or stopped solve.
"""

from __future__ import annotations

import enum
import functools
import time
from dataclasses import dataclass, field
from typing import Any

import highspy
import numpy as np

from .errors import SolverFailure, invalid

__all__ = ["Status", "SolverOutcome", "solve_highs", "choose_method", "METHODS", "to_pulp",
           "cbc_solver"]


class Status(enum.StrEnum):
    """Outcome of a plan solve."""

    OPTIMAL = "optimal"
    INFEASIBLE = "infeasible"
    UNBOUNDED = "unbounded"
    INFEASIBLE_OR_UNBOUNDED = "infeasible_or_unbounded"
    TIME_LIMIT = "time_limit"
    ITERATION_LIMIT = "iteration_limit"
    INTERRUPTED = "interrupted"
    IMPRECISE = "imprecise"
    NOT_VERIFIED = "not_verified"
    UNKNOWN = "unknown"
    ERROR = "error"


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

# method name -> HiGHS options
METHODS: dict[str, dict[str, object]] = {
    "simplex": {"solver": "simplex"},
    "ipm": {"solver": "ipm", "run_crossover": "off"},
    "ipm-crossover": {"solver": "ipm", "run_crossover": "on"},
    "pdlp": {"solver": "pdlp"},
    "highs-default": {"solver": "choose"},
}
AUTO_IPM_NONZEROS = 40_000


@dataclass
class SolverOutcome:
    """What the solver returned, in the LP's own terms."""

    status: Status
    message: str
    objective: float
    x: np.ndarray
    row_dual: np.ndarray | None
    col_dual: np.ndarray | None
    method: str
    iterations: dict[str, int]
    seconds: float
    options: dict[str, object] = field(default_factory=dict)
    highs_version: str = ""


def choose_method(nonzeros: int) -> str:
    """HiGHS method for a plan with this many nonzeros.

    Multi-year plans have dense input and capital blocks repeated over years;
    on them the interior point method without crossover was many times faster
    than simplex once a plan has more than about 40,000 nonzeros (measured in
    ``tests/benchmarks/bench_plan.py``), while small plans solve fastest by
    simplex, which also returns a vertex and exact duals.
    """
    return "ipm" if nonzeros > AUTO_IPM_NONZEROS else "simplex"


def _set(h: highspy.Highs, name: str, value: Any) -> None:
    st = h.setOptionValue(name, value)
    if st != highspy.HighsStatus.kOk:
        raise invalid(f"options.{name}", "be a HiGHS option with a valid value", value)


_BANNER_SHOWN = False


def _new_highs() -> highspy.Highs:
    """A Highs object; the first one in a process is made with stdout muted.

    HiGHS prints a licence banner on stdout when its first object is made,
    which would land in the middle of command-line output and notebooks.
    """
    global _BANNER_SHOWN
    if _BANNER_SHOWN:
        return highspy.Highs()
    import os
    import sys

    _BANNER_SHOWN = True
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
    h = _new_highs()
    try:
        return f"{h.versionMajor()}.{h.versionMinor()}.{h.versionPatch()}"
    except Exception:  # pragma: no cover - older highspy
        return "unknown"


def _load(h: highspy.Highs, lp) -> None:
    """Pass ``lp`` to ``h`` column-wise (CSC) in one ``passModel`` call."""
    m = lp.matrix
    model = highspy.HighsLp()
    model.num_col_ = m.shape[1]
    model.num_row_ = m.shape[0]
    inf = highspy.kHighsInf
    model.col_cost_ = np.ascontiguousarray(lp.cost, dtype=np.float64)
    model.col_lower_ = np.where(np.isfinite(lp.col_lower), lp.col_lower, -inf)
    model.col_upper_ = np.where(np.isfinite(lp.col_upper), lp.col_upper, inf)
    model.row_lower_ = np.where(np.isfinite(lp.row_lower), lp.row_lower, -inf)
    model.row_upper_ = np.where(np.isfinite(lp.row_upper), lp.row_upper, inf)
    model.sense_ = highspy.ObjSense.kMaximize if lp.sense == "max" else \
        highspy.ObjSense.kMinimize
    model.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    model.a_matrix_.start_ = m.indptr.astype(np.int32)
    model.a_matrix_.index_ = m.indices.astype(np.int32)
    model.a_matrix_.value_ = m.data.astype(np.float64)
    model.a_matrix_.num_col_ = m.shape[1]
    model.a_matrix_.num_row_ = m.shape[0]
    if h.passModel(model) == highspy.HighsStatus.kError:
        raise SolverFailure("HiGHS refused the model (passModel returned an error)")


def equilibrate(lp, passes: int = 3):
    """Row and column factors (powers of two) that bring the matrix entries near 1.

    Alternating geometric-mean scaling: each pass divides every row, then
    every column, by the square root of its largest times its smallest
    absolute entry, rounded to a power of two so the scaling itself adds no
    rounding error. Returns ``(r, c)`` with the scaled matrix ``diag(r) M diag(c)``.
    The work is on base-2 exponents of the entries, so each pass is two
    grouped max/min reductions (0.09 s for 650,000 nonzeros).
    """
    from scipy import sparse

    m = sparse.csr_array(abs(lp.matrix))
    m.data = np.log2(m.data)  # work on exponents: max and min per line are then cheap
    r = np.zeros(m.shape[0])
    c = np.zeros(m.shape[1])
    rows = np.repeat(np.arange(m.shape[0]), np.diff(m.indptr))
    cols = m.indices
    base = m.data
    for _ in range(passes):
        e = base + r[rows] + c[cols]
        r -= np.round(_mid(e, rows, m.shape[0]))
        e = base + r[rows] + c[cols]
        c -= np.round(_mid(e, cols, m.shape[1]))
    return np.exp2(r), np.exp2(c)


def _mid(e: np.ndarray, index: np.ndarray, size: int) -> np.ndarray:
    """(max + min) / 2 of the exponents ``e`` grouped by ``index`` (0 for empty lines)."""
    hi = np.full(size, -np.inf)
    lo = np.full(size, np.inf)
    np.maximum.at(hi, index, e)
    np.minimum.at(lo, index, e)
    return np.where(np.isfinite(hi), (hi + lo) / 2.0, 0.0)


def _scaled(lp, r: np.ndarray, c: np.ndarray):
    from types import SimpleNamespace

    from scipy import sparse

    m = sparse.csc_array(sparse.diags_array(r) @ lp.matrix @ sparse.diags_array(c))
    with np.errstate(invalid="ignore"):
        return SimpleNamespace(
            matrix=m, cost=lp.cost * c, sense=lp.sense,
            row_lower=lp.row_lower * r, row_upper=lp.row_upper * r,
            col_lower=lp.col_lower / c, col_upper=lp.col_upper / c, nnz=m.nnz)


def solve_highs(lp, *, method: str = "auto", time_limit: float | None = None,
                threads: int | None = None, tolerance: float | None = None,
                options: dict | None = None, callback=None, stop=None,
                scale: bool | str = "auto") -> SolverOutcome:
    """Solve a :class:`~growthplan.compile.LinearProgram` with HiGHS.

    The matrix is passed column-wise (CSC) in one ``passModel`` call.

    Parameters
    ----------
    callback : callable, optional
        Called with each line of HiGHS's log (the console log stays off).
    stop : callable or threading.Event, optional
        Polled during simplex and interior-point iterations; when it returns
        (or is) true the solve stops with status ``interrupted``.
    scale : {"auto", True, False}
        Equilibrate rows and columns (:func:`equilibrate`) before HiGHS's own
        scaling, so sector units that differ by many orders of magnitude do
        not change the plan; values and duals are unscaled on the way back.
        ``"auto"`` does so when the matrix entries span more than
        ``SCALE_RANGE``; a scaled optimum whose duals do not certify optimality
        of the unscaled LP (:func:`optimality_gap`) is solved again unscaled.
    """
    if scale == "auto":
        data = np.abs(lp.matrix.data)
        data = data[data > 0]
        scale = bool(data.size) and float(data.max() / data.min()) > SCALE_RANGE
    if scale:
        first = _solve_once(lp, method=method, time_limit=time_limit, threads=threads,
                            tolerance=tolerance, options=options, callback=callback,
                            stop=stop, scale=True)
        if first.status is not Status.OPTIMAL or first.row_dual is None:
            return first
        gap = optimality_gap(lp, first.x, first.row_dual)
        first.options["scaled"] = True
        if gap <= GAP_TOLERANCE:
            return first
        second = _solve_once(lp, method=method, time_limit=time_limit, threads=threads,
                             tolerance=tolerance, options=options, callback=callback,
                             stop=stop, scale=False)
        second.options["scaled"] = False
        second.options["scaled_gap"] = gap
        return second
    out = _solve_once(lp, method=method, time_limit=time_limit, threads=threads,
                      tolerance=tolerance, options=options, callback=callback, stop=stop,
                      scale=False)
    out.options["scaled"] = False
    return out


SCALE_RANGE = 1e8   # entries spanning more than this get equilibrated first
GAP_TOLERANCE = 1e-7


def _solve_once(lp, *, method: str, time_limit: float | None, threads: int | None,
                tolerance: float | None, options: dict | None, callback, stop,
                scale: bool) -> SolverOutcome:
    """One HiGHS solve of ``lp`` (scaled or not); see :func:`solve_highs`."""
    if method == "auto":
        method = choose_method(lp.nnz)
    if method not in METHODS:
        raise invalid("method", f"be 'auto' or one of {sorted(METHODS)}", method)
    h = _new_highs()
    chosen: dict[str, object] = {"output_flag": callback is not None,
                                 "log_to_console": False, "random_seed": 0}
    chosen.update(METHODS[method])
    if time_limit is not None:
        if not (time_limit > 0):
            raise invalid("time_limit", "be > 0 seconds", time_limit)
        chosen["time_limit"] = float(time_limit)
    if threads is not None:
        chosen["threads"] = int(threads)
    if tolerance is not None:
        if not (0 < tolerance < 1):
            raise invalid("tolerance", "be in (0, 1)", tolerance)
        chosen["primal_feasibility_tolerance"] = float(tolerance)
        chosen["dual_feasibility_tolerance"] = float(tolerance)
    chosen.update(options or {})
    for k, v in chosen.items():
        _set(h, k, v)
    if callback is not None:
        h.cbLogging.subscribe(lambda e: callback(str(e.message)))
    if stop is not None:
        check = stop.is_set if hasattr(stop, "is_set") else stop

        def poll(e) -> None:
            if check():
                e.interrupt()

        h.cbSimplexInterrupt.subscribe(poll)
        h.cbIpmInterrupt.subscribe(poll)

    r = c = None
    if scale:
        r, c = equilibrate(lp)
        _load(h, _scaled(lp, r, c))
    else:
        _load(h, lp)
    m = lp.matrix
    t0 = time.perf_counter()
    h.run()
    seconds = time.perf_counter() - t0
    ms = h.getModelStatus()
    status = STATUS_TABLE.get(ms, Status.UNKNOWN)
    info = h.getInfo()
    sol = h.getSolution()
    x = np.array(sol.col_value) if sol.value_valid else np.full(m.shape[1], np.nan)
    row_dual = np.array(sol.row_dual) if sol.dual_valid else None
    col_dual = np.array(sol.col_dual) if sol.dual_valid else None
    if r is not None:
        x = x * c
        row_dual = None if row_dual is None else row_dual * r
        col_dual = None if col_dual is None else col_dual / c
    if status is Status.OPTIMAL and not sol.value_valid:
        status = Status.UNKNOWN
    objective = float(info.objective_function_value) if sol.value_valid else float("nan")
    iters = {"simplex": int(info.simplex_iteration_count), "ipm": int(info.ipm_iteration_count),
             "crossover": int(getattr(info, "crossover_iteration_count", 0)),
             "pdlp": int(getattr(info, "pdlp_iteration_count", 0))}
    return SolverOutcome(status=status, message=h.modelStatusToString(ms), objective=objective,
                         x=x, row_dual=row_dual, col_dual=col_dual, method=method,
                         iterations=iters, seconds=seconds, options=chosen,
                         highs_version=highs_version())


def _sanitise(names: list[str]) -> list[str]:
    import re

    bad = re.compile(r"[^A-Za-z0-9_]")
    return [bad.sub("_", s) for s in names]


def to_pulp(lp, name: str = "growthplan"):
    """A ``pulp.LpProblem`` with the same rows, columns, bounds and costs as ``lp``.

    Variable and constraint names carry the block, year and sector
    (``output_2030_energy``), sanitised to letters, digits and underscores.
    Rows are built from (variable, coefficient) pairs with
    ``LpAffineExpression``, not term by term.

    Returns
    -------
    (problem, variables) : tuple of pulp.LpProblem and list of pulp.LpVariable
    """
    import pulp

    sense = pulp.LpMaximize if lp.sense == "max" else pulp.LpMinimize
    prob = pulp.LpProblem(name, sense)
    cols = _sanitise(lp.col_names())
    lo = [None if not np.isfinite(v) else float(v) for v in lp.col_lower]
    up = [None if not np.isfinite(v) else float(v) for v in lp.col_upper]
    variables = [prob.add_variable(c, lowBound=lo[i], upBound=up[i])
                 for i, c in enumerate(cols)]
    nz = np.nonzero(lp.cost)[0]
    prob.setObjective(pulp.LpAffineExpression([(variables[i], float(lp.cost[i])) for i in nz]))
    csr = lp.matrix.tocsr()
    rows = _sanitise(lp.row_names())
    indptr, indices, data = csr.indptr, csr.indices, csr.data
    for r, rname in enumerate(rows):
        sl = slice(indptr[r], indptr[r + 1])
        expr = pulp.LpAffineExpression(
            list(zip([variables[i] for i in indices[sl]], data[sl].tolist(), strict=True)))
        lo_r, up_r = lp.row_lower[r], lp.row_upper[r]
        if np.isfinite(lo_r) and np.isfinite(up_r) and lo_r == up_r:
            prob.addConstraint(pulp.LpConstraint(expr, pulp.LpConstraintEQ, rname, float(lo_r)))
            continue
        if np.isfinite(lo_r):
            prob.addConstraint(pulp.LpConstraint(expr, pulp.LpConstraintGE,
                                                 rname if not np.isfinite(up_r) else rname + "_lo",
                                                 float(lo_r)))
        if np.isfinite(up_r):
            prob.addConstraint(pulp.LpConstraint(expr, pulp.LpConstraintLE,
                                                 rname if not np.isfinite(lo_r) else rname + "_up",
                                                 float(up_r)))
    return prob, variables


def cbc_solver(msg: bool = False, time_limit: float | None = None):
    """PuLP's bundled CBC through the non-deprecated ``COIN_CMD`` class."""
    import pulp
    from pulp.apis import coin_api

    path = coin_api.COIN_CMD.executableExtension(coin_api.pulp_cbc_path)
    kwargs = {"msg": msg, "path": path}
    if time_limit is not None:
        kwargs["timeLimit"] = time_limit
    return pulp.COIN_CMD(**kwargs)


def solve_stages(lp, *, tolerance_stage: float = 0.0, **kw):
    """Solve ``lp`` through its objective stages (one for most objectives).

    After each stage but the last, its optimum is held by an added row
    (``c·v ≥ f* − tol·max(1, |f*|)`` when maximising, the mirror when
    minimising) and the next stage's cost is optimised.

    Returns
    -------
    (lp, outcome) : the LP of the last stage and its outcome
    """
    import dataclasses

    from scipy import sparse

    from .compile import Block

    stages = lp.stages or [(lp.cost, lp.sense)]
    outcome = solve_highs(lp, **kw)
    held = []
    for cost, sense in stages[1:]:
        if outcome.status is not Status.OPTIMAL:
            break
        prev_cost, prev_sense = lp.cost, lp.sense
        f = float(prev_cost @ outcome.x)
        slack = tolerance_stage * max(1.0, abs(f))
        held.append(f)
        row = sparse.csr_array(prev_cost[None, :])
        lo, up = (f - slack, np.inf) if prev_sense == "max" else (-np.inf, f + slack)
        rows = dict(lp.rows)
        prev = rows.get("lexicographic")
        start = lp.matrix.shape[0]
        size = (prev.size if prev else 0) + 1
        rows["lexicographic"] = Block("lexicographic", prev.start if prev else start, (size,),
                                      ([f"stage_{i + 1}" for i in range(size)],))
        lp = dataclasses.replace(
            lp, matrix=sparse.csc_array(sparse.vstack([lp.matrix, row])),
            row_lower=np.append(lp.row_lower, lo), row_upper=np.append(lp.row_upper, up),
            row_sign=np.append(lp.row_sign, 1.0 if prev_sense == "min" else -1.0),
            cost=cost, sense=sense, rows=rows)
        outcome = solve_highs(lp, **kw)
    outcome.options["held_optima"] = held
    return lp, outcome


def optimality_gap(lp, x: np.ndarray, y: np.ndarray) -> float:
    """Relative gap between the primal objective and the dual bound of ``(x, y)``.

    ``y`` are row duals in the model's own sense (d objective / d row bound).
    Duals of the wrong sign for their row, or reduced costs that point at a
    missing bound, make the dual bound infinite. Zero (to rounding) certifies
    that ``x`` is optimal; anything else means it is not, whatever a solver's
    status text says.
    """
    sigma = 1.0 if lp.sense == "max" else -1.0
    value = sigma * lp.row_sign * y  # ≥ 0 for a dual-feasible y
    # duals read back from text files carry about 8 significant digits: a relative slack
    scale = max(1.0, float(np.abs(y).max(initial=0.0)) * float(np.abs(lp.matrix.data).max(
        initial=0.0)), float(np.abs(lp.cost).max(initial=0.0)))
    tol = 1e-6 * scale
    if np.any(value < -tol):
        return float("inf")
    rhs = np.where(lp.row_sign > 0, lp.row_upper, lp.row_lower)
    rc = lp.cost - lp.matrix.T @ y
    bound = np.zeros_like(rc)
    up = sigma * rc > tol   # would gain by raising the column: needs an upper bound
    lo = sigma * rc < -tol  # would gain by lowering it: needs a lower bound
    if np.any(up & ~np.isfinite(lp.col_upper)) or np.any(lo & ~np.isfinite(lp.col_lower)):
        return float("inf")
    bound[up] = lp.col_upper[up]
    bound[lo] = lp.col_lower[lo]
    dual = float(np.sum(np.where(np.isfinite(rhs), rhs, 0.0) * y) + np.sum(rc * bound))
    primal = float(lp.cost @ x)
    return abs(dual - primal) / max(1.0, abs(primal))


_PULP_STATUS = {1: Status.OPTIMAL, 0: Status.UNKNOWN, -1: Status.INFEASIBLE,
                -2: Status.UNBOUNDED, 2: Status.UNKNOWN}


def solve_pulp(lp, prob, solver=None, *, gap_tolerance: float = 1e-6) -> SolverOutcome:
    """Solve a problem from :func:`to_pulp` (perhaps extended) with any PuLP solver.

    Guards against three known PuLP 3.3 faults: the HiGHS class returns duals
    with the wrong sign on maximisation problems (flipped back here); both the
    HiGHS class and CBC report a time- or iteration-limited LP as optimal (the
    live HiGHS model status is read, and an optimal status must also pass the
    duality-gap certificate :func:`optimality_gap` when the problem has no
    constraints of the user's own).
    """
    import pulp

    solver = solver or cbc_solver()
    t0 = time.perf_counter()
    prob.solve(solver)
    seconds = time.perf_counter() - t0
    cols = _sanitise(lp.col_names())
    var = prob.variablesDict()
    x = np.array([var[c].varValue if c in var and var[c].varValue is not None else np.nan
                  for c in cols], dtype=float)
    status = _PULP_STATUS.get(prob.sol_status, Status.UNKNOWN)
    message = (f"{pulp.LpStatus.get(prob.status, prob.status)} (solution: "
               f"{pulp.LpSolution.get(prob.sol_status, prob.sol_status)})")
    is_highs = isinstance(solver, pulp.HiGHS)
    if is_highs and getattr(prob, "solverModel", None) is not None:
        ms = prob.solverModel.getModelStatus()
        status = STATUS_TABLE.get(ms, Status.UNKNOWN)
        message = prob.solverModel.modelStatusToString(ms)
    rows = _sanitise(lp.row_names())
    cons = {c.name: c for c in prob.constraints()}
    y = np.array([cons[r].pi if r in cons and cons[r].pi is not None else np.nan
                  for r in rows], dtype=float)
    if is_highs and lp.sense == "max":
        y = -y  # PuLP's HiGHS class negates the costs and never flips the duals back
    extra = len(cons) > len(rows)
    if status is Status.OPTIMAL and not extra:
        if np.any(np.isnan(y)) or np.any(np.isnan(x)):
            status, message = Status.UNKNOWN, message + " (no duals to certify optimality)"
        else:
            gap = optimality_gap(lp, x, y)
            if gap > gap_tolerance:
                status = Status.NOT_VERIFIED
                message += f" (duality gap {gap:.3g}: not optimal)"
    objective = float(lp.cost @ x) if np.all(np.isfinite(x)) else float("nan")
    return SolverOutcome(status=status, message=message, objective=objective, x=x,
                         row_dual=None if np.any(np.isnan(y)) else y, col_dual=None,
                         method=f"pulp:{type(solver).__name__}", iterations={},
                         seconds=seconds, options={"extra_constraints": extra},
                         highs_version=highs_version())


def _quiet(options: dict | None = None) -> highspy.Highs:
    h = _new_highs()
    for k, v in {"output_flag": False, "random_seed": 0, **(options or {})}.items():
        _set(h, k, v)
    return h


def infeasible_subset(lp) -> tuple[list[int], list[int]] | None:
    """Rows and columns of an irreducible infeasible subset, from HiGHS.

    Uses ``iis_strategy`` 2 (from the LP) with the irreducibility bit 4: the
    default strategy can return a valid but empty set. Returns None when
    HiGHS finds none.
    """
    h = _quiet({"iis_strategy": 2 | 4})
    _load(h, lp)
    h.run()
    st, iis = h.getIis()
    if st == highspy.HighsStatus.kError:
        return None
    rows, cols = list(iis.row_index_), list(iis.col_index_)
    return (rows, cols) if rows or cols else None


def unbounded_ray(lp) -> np.ndarray | None:
    """A primal ray of an unbounded LP (the direction the columns run away in)."""
    h = _quiet({"solver": "simplex", "presolve": "off"})
    _load(h, lp)
    h.run()
    st, has_ray, ray = h.getPrimalRay()  # type: ignore[attr-defined]
    if st == highspy.HighsStatus.kError or not has_ray:
        return None
    return np.asarray(ray, dtype=float)
