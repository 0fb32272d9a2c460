"""The whole pipeline, top to bottom.

1. lower the validated plan to arrays, once (:func:`growthplan.lp.data.lower`);
2. build the LP from the condition families (:func:`growthplan.lp.build.build`);
3. optimise each objective stage on a back end, falling back to another
   method when a solve fails (:func:`optimise`; a large interior-point solve
   that ends without a verdict goes to step 5 first, which decides faster);
   the horizon search of :class:`~growthplan.model.objectives.Fastest` runs
   here too, above any back end;
4. read the schedules from the solution and audit them independently;
5. diagnose a plan that is impossible (an elastic re-solve, which always has
   a solution), and confirm every verdict of infeasibility by it.

``Plan.solve``, ``Plan.solve_pulp``, ``Plan.to_pulp`` and ``Plan.write_mps``
delegate here.
"""

from __future__ import annotations

import time
import warnings
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from .backends.base import FAILED, Backend, Feature, RayBackend, SolverOutcome, Status
from .backends.options import SolveOptions, default_backend, highs_backend
from .backends.pulp import PulpBackend, to_pulp
from .errors import EndEffectsWarning, InvalidInput, invalid
from .lp.build import FORMULATIONS, SIZE_LIMIT, build, estimate_size, guard_size
from .lp.data import lower, terminal_proportions
from .lp.program import LinearProgram
from .results.audit import audit
from .results.diagnosis import diagnose
from .results.result import PlanResult
from .results.tables import schedules

if TYPE_CHECKING:
    from .model.plan import Plan

__all__ = ["solve", "solve_pulp", "program", "optimise", "write_program"]

END_EFFECTS = ("No terminal condition: investment in the last years only serves the "
               "objective, so end-of-plan starts may be too low (end effects). Give "
               "a terminal growth rate (plan file: terminal: {rate: ...}) to value the "
               "years after the plan.")


def _check_formulation(formulation: Any, *, auto: bool = True) -> str:
    allowed = (("auto",) if auto else ()) + FORMULATIONS
    if formulation not in allowed:
        raise invalid("formulation", f"be one of {', '.join(allowed)}", formulation)
    return str(formulation)


def program(plan: Plan, *, size_limit: int | None = SIZE_LIMIT,
            formulation: str = "expression") -> LinearProgram:
    """The plan's LP (size guarded; the plan is lowered once and the arrays cached)."""
    guard_size(plan, size_limit)
    return build(plan.lowered(), formulation=_check_formulation(formulation, auto=False))


def formulation_for(d: Any, backend: Any, formulation: str = "auto") -> tuple[str, str]:
    """The capacity formulation a back end will solve a lowered plan in, and why.

    A back end with a ``rule`` (HiGHS) decides from the plan's size
    (:func:`growthplan.backends.methods.choose`); any other gets the
    expression form unless told.

    Returns
    -------
    (formulation, description) : the formulation and the rule in words
    """
    rule_of = getattr(backend, "rule", None)
    if rule_of is None:
        if formulation == "auto":
            formulation = getattr(backend, "formulation", "auto")
        form = "expression" if formulation == "auto" else formulation
        return form, f"{form} form"
    rule = rule_of(int(estimate_size(d)["nonzeros"]), formulation)
    return rule.formulation, rule.describe()


def run(lp: LinearProgram, backend: Backend, *, stop: Any = None, callback: Any = None
        ) -> SolverOutcome:
    """One solve of ``lp``; when it fails, the back end's alternatives are tried in turn."""
    out = backend.solve(lp, stop=stop, callback=callback)
    if out.status not in FAILED:
        return out
    undecided = getattr(backend, "undecided_at_size", None)
    if undecided is not None and undecided(lp, out):
        # the elastic re-solve decides (diagnosis); the alternatives come after it
        # only when it finds the plan possible
        out.options["fallback_from"] = []
        out.options["deferred"] = "the elastic re-solve decides before the alternatives"
        return out
    tried = [f"{out.method}: {out.status.value} ({out.message})"]
    for alt in backend.alternatives():
        again = alt.solve(lp, stop=stop, callback=callback)
        if again.status not in FAILED:
            again.options["fallback_from"] = tried
            return again
        tried.append(f"{again.method}: {again.status.value} ({again.message})")
    out.options["fallback_from"] = tried[1:]
    return out


def optimise(lp: LinearProgram, backend: Backend, *, stop: Any = None, callback: Any = None
             ) -> tuple[LinearProgram, SolverOutcome]:
    """Solve ``lp`` through its objective stages.

    After each stage but the last its optimum ``f*`` is held by an added row
    (``c·v ≥ f* − tol·Σ|c_j v_j|`` when maximising, the mirror when
    minimising; ``Σ|c_j v_j|`` is ``|f*|`` when the terms share a sign) and
    the next stage's cost is optimised.

    Returns
    -------
    (lp, outcome) : the LP of the last stage and its outcome
    """
    from scipy import sparse

    stages = lp.stages or []
    outcome = run(lp, backend, stop=stop, callback=callback)
    held: list[float] = []
    for i, stage in enumerate(stages[1:], start=1):
        if outcome.status is not Status.OPTIMAL:
            break
        prev = stages[i - 1]
        f = float(prev.cost @ outcome.x)
        # relative to the stage's own terms, never to a fixed 1 (an objective in small
        # units would otherwise be released by far more than its tolerance)
        slack = prev.tolerance * max(abs(f), float(np.abs(prev.cost * outcome.x).sum()))
        held.append(f)
        lo, up = (f - slack, np.inf) if prev.sense == "max" else (-np.inf, f + slack)
        lp = lp.add_rows("held_objective", sparse.csr_array(prev.cost[None, :]),
                         np.array([lo]), np.array([up]), (f"stage_{i}",))
        lp = lp.replace(cost=stage.cost, sense=stage.sense)
        outcome = run(lp, backend, stop=stop, callback=callback)
    outcome.options["held_optima"] = held
    return lp, outcome


def solve(plan: Plan, *, backend: Backend | None = None, method: str = "auto",
          time_limit: float | None = None, threads: int | None = None,
          tolerance: float | None = None, audit_tolerance: float = 1e-6,
          options: dict[str, Any] | None = None, progress: bool = False, stop: Any = None,
          size_limit: int | None = SIZE_LIMIT, formulation: str = "auto",
          solver: SolveOptions | None = None) -> PlanResult:
    """Solve a plan on a back end (default HiGHS) and audit the result.

    See :meth:`growthplan.Plan.solve` for the parameters; the settings are
    one :class:`~growthplan.backends.options.SolveOptions` (``solver``) or
    its fields as keywords; ``backend`` is any
    :class:`~growthplan.backends.base.Backend` (then ``method``,
    ``time_limit``, ``threads``, ``tolerance`` and ``options`` are the back
    end's business).
    """
    settings = SolveOptions.of(solver, backend=backend, method=method, time_limit=time_limit,
                               threads=threads, tolerance=tolerance,
                               audit_tolerance=audit_tolerance, options=options)
    tol = settings.audit_tolerance
    be = default_backend(settings)
    form = _check_formulation(formulation)
    search = plan.objective.horizon_search()
    if search is not None:
        return _fastest(plan, be, search.max_years, tol, progress, stop, size_limit, form)
    return _fixed(plan, be, tol, progress, stop, size_limit, formulation=form)


def solve_pulp(plan: Plan, solver: Any = None, *, problem: Any = None,
               audit_tolerance: float = 1e-6) -> PlanResult:
    """Solve with a PuLP solver through the same pipeline (stages, horizon search, audit)."""
    if problem is not None and plan.objective.horizon_search() is not None:
        raise InvalidInput("problem must not be given with a Fastest objective: the horizon "
                           "search builds a problem per horizon. Got a problem.",
                           field="problem")
    return solve(plan, backend=PulpBackend(solver, problem=problem),
                 audit_tolerance=audit_tolerance)


def _fixed(plan: Plan, backend: Backend, tol: float, progress: bool, stop: Any,
           size_limit: int | None, data: Any = None, formulation: str = "auto") -> PlanResult:
    from .progress import solve_progress

    t0 = time.perf_counter()
    guard_size(plan, size_limit)
    d = data if data is not None else plan.lowered()
    form, words = formulation_for(d, backend, formulation)
    lp = build(d, formulation=form)
    t1 = time.perf_counter()
    with solve_progress(progress, f"{d.n} sectors × {d.T} years, {words}") as cb:
        final_lp, outcome = optimise(lp, backend, stop=stop, callback=cb)
    timings = {"validate": plan.validation_seconds(), "compile": t1 - t0}
    return _finish(plan, lp, final_lp, outcome, backend, tol, timings, stop, progress)


def _audited(final_lp: LinearProgram, outcome: SolverOutcome, tol: float,
             seconds: dict[str, float] | None = None) -> tuple[Any, Any]:
    """The schedules of a solution and their audit (reading them timed into ``seconds``)."""
    d = final_lp.data
    assert d is not None
    t0 = time.perf_counter()
    sched = schedules(d, final_lp, outcome.x)
    if seconds is not None:
        seconds["post_process"] = time.perf_counter() - t0
    return sched, audit(d, sched, tolerance=tol)


def _another_method(final_lp: LinearProgram, backend: Backend, stop: Any, tol: float, reason: str,
                    *, unbounded: bool = False) -> tuple[SolverOutcome, Any, Any] | None:
    """The first of the back end's alternatives that gives an audited optimum.

    With ``unbounded`` an alternative's verdict of unboundedness is taken too
    (its schedules and audit are then None). None when no alternative helps.
    """
    for alt in backend.alternatives():
        again = alt.solve(final_lp, stop=stop)
        if again.status is Status.OPTIMAL:
            sched, rep = _audited(final_lp, again, tol)
            if rep.ok:
                again.options["fallback_from"] = [reason]
                return again, sched, rep
        elif unbounded and again.status is Status.UNBOUNDED:
            return again, None, None
    return None


def _finish(plan: Plan, lp: LinearProgram, final_lp: LinearProgram, outcome: SolverOutcome,
            backend: Backend, tol: float, timings: dict[str, float], stop: Any,
            progress: bool = False) -> PlanResult:
    t0 = time.perf_counter()
    status = outcome.status
    notes: list[str] = []
    sched = rep = None
    post: dict[str, float] = {"post_process": 0.0}
    if status is Status.OPTIMAL:
        sched, rep = _audited(final_lp, outcome, tol, post)
        if not rep.ok:
            # another method may get it right (interior point on badly scaled plans)
            found = _another_method(final_lp, backend, stop, tol,
                                    f"{outcome.method}: audit violation {rep.max_violation:.3g}")
            if found is not None and found[0].status is Status.OPTIMAL:
                outcome, sched, rep = found
        if not rep.ok:
            status = Status.NOT_VERIFIED
            notes.append(f"The solver said optimal but the audit found a violation of "
                         f"{rep.max_violation:.3g} (relative) at {rep.worst}; the plan is "
                         "not returned as optimal.")
    t1 = time.perf_counter()
    # the model transfer into the solver, when the back end times it apart from the solve
    transfer = outcome.options.get("transfer_seconds")
    timings = {**timings, **({} if transfer is None else {"transfer": float(transfer)}),
               "solve": outcome.seconds, "post_process": post["post_process"],
               "audit": t1 - t0 - post["post_process"]}
    diagnosis = None
    stopped = stop is not None and (stop.is_set() if hasattr(stop, "is_set") else stop())
    if status in (FAILED - {Status.NOT_VERIFIED}) | {Status.INFEASIBLE} and not stopped:
        t2 = time.perf_counter()
        diagnosis = diagnose(lp, backend=backend, plan_seconds=outcome.seconds,
                             progress=progress, stop=stop,
                             threads=getattr(backend, "threads", None))
        timings["diagnose"] = time.perf_counter() - t2
        if diagnosis.confirmed:
            if status is not Status.INFEASIBLE:
                # HiGHS's presolve often stops at "unknown" on an impossible plan: say what
                # was shown, not what the solver could not decide
                notes.append("The elastic re-solve shows that no plan meets every condition "
                             f"(the first solve ended without a verdict: {status.value}, "
                             f"HiGHS's '{outcome.message}').")
            status = Status.INFEASIBLE
        elif diagnosis.status is Status.OPTIMAL:
            # the plan is feasible: the solver's verdict was wrong or it gave up
            notes.append(f"The solver reported {status.value} ({outcome.message}) but the "
                         "elastic re-solve found a plan meeting every condition.")
            found = _another_method(final_lp, backend, stop, tol,
                                    f"{outcome.method}: {status.value}", unbounded=True)
            if found is not None:
                outcome, sched, rep = found
                status, diagnosis = outcome.status, None
            if status is Status.INFEASIBLE:
                status = Status.UNKNOWN
    if plan.terminal is None and status is Status.OPTIMAL:
        notes.append(END_EFFECTS)
        warnings.warn(END_EFFECTS, EndEffectsWarning, stacklevel=4)
    result = PlanResult(plan, final_lp, outcome, status=status, timings=timings, audit=rep,
                        schedules=sched, notes=notes, diagnosis=diagnosis,
                        backend=getattr(backend, "name", type(backend).__name__))
    if status is Status.UNBOUNDED:
        ray_backend: RayBackend = backend if isinstance(backend, RayBackend) \
            and Feature.RAY in backend.features else highs_backend()
        ray = ray_backend.ray(final_lp)
        if ray is not None:
            labels = final_lp.col_labels()
            big = np.argsort(-np.abs(ray))[:10]
            result.runaway = [" ".join(map(str, labels[i])) for i in big if abs(ray[i]) > 1e-9]
            result.warnings.append("Unbounded: these columns can grow without limit: "
                                   + ", ".join(result.runaway) + ". Check for a sector "
                                   "whose capacity needs no capital goods.")
    return result


def _fastest(plan: Plan, backend: Backend, max_years: int, tol: float, progress: bool,
             stop: Any, size_limit: int | None, formulation: str = "auto") -> PlanResult:
    """Bisection over horizons, each a feasibility LP (no objective).

    A horizon counts as feasible when its LP solves; any other verdict is
    checked by the elastic re-solve. The shortest feasible horizon is then
    solved with the ``then`` objective and audited.
    """
    proportions = terminal_proportions(plan) if plan.objective.needs_level() else None
    tried: dict[int, str] = {}
    cache: dict[int, tuple[Any, Any]] = {}

    def lowered(years: int) -> tuple[Any, Any]:
        if years not in cache:
            sub = plan.with_horizon(years)
            guard_size(sub, size_limit)
            cache[years] = (sub, lower(sub, proportions=proportions))
        return cache[years]

    def feasible(years: int) -> bool:
        _, d = lowered(years)
        probe = build(d, objective=False, formulation=formulation_for(d, backend, formulation)[0])
        out = run(probe, backend, stop=stop)
        if out.status is Status.OPTIMAL:
            tried[years] = Status.OPTIMAL.value
            return True
        if out.status in (Status.INTERRUPTED, Status.TIME_LIMIT):
            raise _Stopped(out)
        verdict = diagnose(probe, subset=False, polish=0, other_view=False)
        ok = verdict.status is Status.OPTIMAL and not verdict.confirmed
        tried[years] = Status.OPTIMAL.value if ok else Status.INFEASIBLE.value
        return ok

    def final(years: int) -> PlanResult:
        sub, d = lowered(years)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", EndEffectsWarning)
            result = _fixed(sub, backend, tol, progress, stop, size_limit, data=d,
                            formulation=formulation)
        if sub.terminal is None and result.ok:
            warnings.warn(END_EFFECTS, EndEffectsWarning, stacklevel=4)
        result.horizons = dict(sorted(tried.items()))
        return result

    try:
        if not feasible(max_years):
            return final(max_years)  # infeasible: the result carries the diagnosis
        lo, hi = 0, max_years  # lo infeasible (or none), hi feasible
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if feasible(mid):
                hi = mid
            else:
                lo = mid
    except _Stopped as exc:
        sub, d = lowered(max_years)
        lp = build(d)
        result = PlanResult(sub, lp, exc.outcome, status=exc.outcome.status,
                            timings={"solve": exc.outcome.seconds},
                            backend=getattr(backend, "name", ""))
        result.horizons = dict(sorted(tried.items()))
        return result
    return final(hi)


class _Stopped(Exception):
    def __init__(self, outcome: SolverOutcome) -> None:
        super().__init__(outcome.status.value)
        self.outcome = outcome


def write_program(plan: Plan, path: Any, *, overwrite: bool, kind: str,
                  force: bool = False) -> Path:
    """Write the plan's LP as an MPS (``kind="mps"``, objective sense included) or LP file,
    its first line a comment with the library's mark."""
    from .io.atomic import atomic_file
    from .io.marks import comment_line

    prob = to_pulp(program(plan))[0]
    with atomic_file(path, overwrite=overwrite, force=force) as tmp:
        if kind == "mps":
            prob.writeMPS(str(tmp), with_objsense=True)
        else:
            prob.writeLP(str(tmp))
        body = tmp.read_bytes()
        tmp.write_bytes(comment_line(f".{kind}").encode() + body)
    return Path(path)
