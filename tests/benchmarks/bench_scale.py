"""Benchmark: plans at the size of real statistical tables, library against bare HiGHS.

Run: python tests/benchmarks/bench_scale.py [30x20,100x30,200x30] [--methods ...]
     [--time-limit 60] [--repeats 3] [--cheap-nonzeros 1000000]

For each size (sectors × years) of the dense random plans of
``tests/helpers.py`` a child process is started, so that its peak resident
memory belongs to that size alone. The child prints rows, columns and
nonzeros, then times, interleaved and repeated (median of ``--repeats`` when
the LP has fewer than ``--cheap-nonzeros`` nonzeros, once otherwise):

- the library end to end: the plan built (validated) and ``plan.solve()``,
  wall clock, with the library's own split (``result.timings``);
- the bare solve of the same LP (``plan.compile()``) by the method the
  library chose, with highspy directly: ``passModel`` with numpy arrays and
  ``run``, timed separately.

Then once each, with ``--time-limit`` seconds, the bare solve by every other
HiGHS method, and the model transfer by filling ``HighsLp`` field by field
(the route the library took before) against the numpy ``passModel``.

overhead/solve is (end to end − bare run) / bare run, for the same method;
it is also given in process CPU time, which other work on a shared machine
disturbs far less than the wall clock.
The growth exponent in sectors is the least-squares slope of log time on log
sectors over the sizes of one horizon. The wall clock left out of the
library's ``result.timings`` is printed, and the peak-memory and solve-time
estimates of ``plan.estimate_size()`` beside the measured figures.

``--forms SIZES`` times the bare solve of each capacity formulation × method
(expression and state form; IPX, and HiPO when the ``hipo`` extra is
installed) in interleaved rounds, as ratios to the expression form by IPX, with
HiPO's factorisation counts; the measurements behind ``auto``
(``growthplan.backends.methods.MEASUREMENTS``).

``--crossover SIZES`` compares only simplex and interior point on small
plans (where ``auto`` switches); ``--memory SIZES`` only measures the peak
memory of a fresh process per size (``--stages``: after build, passModel and
run).
Peak memory is ``resource.getrusage(RUSAGE_SELF).ru_maxrss`` of the child
process taken right after its first end-to-end solve (before any bare solve):
the whole process (Python, imports, plan, LP, HiGHS), not the Python heap.
Times on a shared machine vary; compare ratios from one run.
"""

from __future__ import annotations

import argparse
import json
import resource
import statistics
import subprocess
import sys
import time
import warnings
from pathlib import Path
from typing import Any

import highspy
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402

from growthplan.backends.highs import AUTO_IPM_NONZEROS, METHODS, choose_method  # noqa: E402

DEFAULT_SIZES = "30x20,100x30,200x30"


def _highs(method: str, time_limit: float | None,
           extra: dict[str, Any] | None = None) -> highspy.Highs:
    h = highspy.Highs()
    opts: dict[str, Any] = {"output_flag": False, "random_seed": 0, **METHODS[method],
                            **(extra or {})}
    if time_limit is not None:
        opts["time_limit"] = float(time_limit)
    for k, v in opts.items():
        if h.setOptionValue(k, v) != highspy.HighsStatus.kOk:
            raise SystemExit(f"HiGHS refused option {k}={v!r}")
    return h


def _arrays(lp: Any) -> tuple[Any, ...]:
    m = lp.matrix.tocsc()
    inf = highspy.kHighsInf

    def bound(v: np.ndarray, missing: float) -> np.ndarray:
        return np.where(np.isfinite(v), v, missing).astype(np.float64)

    sense = highspy.ObjSense.kMaximize if lp.sense == "max" else highspy.ObjSense.kMinimize
    return (int(m.shape[1]), int(m.shape[0]), int(m.nnz), int(highspy.MatrixFormat.kColwise),
            int(sense), 0.0, np.ascontiguousarray(lp.cost, dtype=np.float64),
            bound(lp.col_lower, -inf), bound(lp.col_upper, inf),
            bound(lp.row_lower, -inf), bound(lp.row_upper, inf),
            m.indptr.astype(np.int32), m.indices.astype(np.int32), m.data.astype(np.float64),
            np.zeros(m.shape[1], dtype=np.int32))


def _highs_lp(lp: Any) -> highspy.HighsLp:
    """The model filled field by field (the older route), for the transfer comparison."""
    m = lp.matrix.tocsc()
    inf = highspy.kHighsInf
    model = highspy.HighsLp()
    model.num_col_, model.num_row_ = m.shape[1], m.shape[0]
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
    model.a_matrix_.num_col_, model.a_matrix_.num_row_ = m.shape[1], m.shape[0]
    return model


def bare(lp: Any, method: str, time_limit: float | None = None,
         extra: dict[str, Any] | None = None) -> dict[str, Any]:
    """passModel (numpy arrays) and run, timed apart."""
    h = _highs(method, time_limit, extra)
    t0 = time.perf_counter()
    if h.passModel(*_arrays(lp)) == highspy.HighsStatus.kError:
        raise SystemExit("HiGHS refused the model")
    t1 = time.perf_counter()
    c1 = time.process_time()
    h.run()
    t2 = time.perf_counter()
    info = h.getInfo()
    return {"transfer": t1 - t0, "run": t2 - t1, "cpu": time.process_time() - c1,
            "status": h.modelStatusToString(h.getModelStatus()),
            "objective": float(info.objective_function_value),
            "iterations": int(info.ipm_iteration_count) + int(info.simplex_iteration_count)}


def forms(sizes: str, rounds: int) -> None:
    """Bare solve time of each formulation × method over expression form × IPX (as auto).

    Each round runs every combination once, in an order rotated from round to
    round; min and median of the ratios taken within a round, and of each
    solve's process CPU time (disturbed far less than the wall clock on a loaded
    machine; HiGHS's own threads count in it). On the ``hipo`` install (highspy
    1.15.1) IPX runs with presolve off too, as ``auto`` does.
    """
    from growthplan.backends.highs import hipo_available
    from growthplan.backends.methods import choose

    hipo = hipo_available()
    # (formulation, method, presolve); "rule" is what auto sets on this install
    combos = [("expression", "ipm", "rule"), ("state", "ipm", "rule"),
              ("expression", "ipm", "off"), ("state", "ipm", "off")]
    if hipo:  # the hipo install's rule already turns presolve off
        combos = [("expression", "ipm", "rule"), ("state", "ipm", "rule"),
                  ("state", "hipo", "rule")]
    print(f"highspy {highspy.Highs().version()}; HiPO {'installed' if hipo else 'absent'}; "
          f"{rounds} interleaved rounds; ratios to expression form × ipm (min / median)")
    for size in sizes.split(","):
        n, years = (int(v) for v in size.lower().split("x"))
        plan = make_plan(economy(n), years)
        lps = {f: plan.compile(formulation=f, size_limit=None) for f in ("expression", "state")}
        times: dict[tuple[str, str, str], list[float]] = {c: [] for c in combos}
        cpus: dict[tuple[str, str, str], list[float]] = {c: [] for c in combos}
        ratios: dict[tuple[str, str, str], list[float]] = {c: [] for c in combos}
        last: dict[tuple[str, str, str], dict[str, Any]] = {}
        first = combos[0]
        for k in range(rounds):
            order = combos[k % len(combos):] + combos[:k % len(combos)]
            got = {}
            for c in order:
                f, m, pre = c
                extra = dict(choose(lps[f].nnz, hipo=hipo, method=m).options)
                if pre != "rule":
                    extra["presolve"] = pre
                got[c] = last[c] = bare(lps[f], m, extra=extra)
                times[c].append(got[c]["run"])
                cpus[c].append(got[c]["cpu"])
            for c in combos:
                ratios[c].append(got[c]["run"] / got[first]["run"])
        ref = last[first]["objective"]
        print(f"  {size}: expression {lps['expression'].nnz:,} nonzeros, state "
              f"{lps['state'].nnz:,}", flush=True)
        for c in combos:
            r, t = ratios[c], times[c]
            gap = abs(last[c]["objective"] - ref) / max(1.0, abs(ref))
            pre = "" if c[2] == "rule" else f", presolve {c[2]}"
            print(f"    {c[0]:>10} × {c[1]:<5}{pre:<14} run {min(t):8.3f} / "
                  f"{statistics.median(t):8.3f} s"
                  f"  ratio {min(r):.2f} / {statistics.median(r):.2f}  CPU "
                  f"{min(cpus[c]):.3f} / {statistics.median(cpus[c]):.3f} s  "
                  f"{last[c]['iterations']} iterations, {last[c]['status']}, "
                  f"objective differs {gap:.1e}", flush=True)


def transfer_field_by_field(lp: Any) -> float:
    h = _highs("ipm", None)
    t0 = time.perf_counter()
    h.passModel(_highs_lp(lp))
    return time.perf_counter() - t0


def end_to_end(econ: Any, years: int) -> dict[str, Any]:
    """The plan built (validated) and solved by the library, wall clock."""
    t0 = time.perf_counter()
    c0 = time.process_time()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        plan = make_plan(econ, years)
        r = plan.solve()
    wall = time.perf_counter() - t0
    return {"wall": wall, "cpu": time.process_time() - c0, "status": str(r.status),
            "objective": float(r.objective),
            "method": r.solver["method"], "scaled": r.solver["options"].get("scaled"),
            "timings": dict(r.timings)}


def child(size: str, methods: list[str], time_limit: float, repeats: int,
          cheap: int) -> dict[str, Any]:
    n, years = (int(v) for v in size.lower().split("x"))
    econ = economy(n)
    plan = make_plan(econ, years)
    est = plan.estimate_size()
    from growthplan.backends.highs import HighsBackend

    rule = HighsBackend().rule(int(est["nonzeros"]))  # what auto solves: the same LP bare
    lp = plan.compile(formulation=rule.formulation, size_limit=None)
    del plan
    out: dict[str, Any] = {"size": size, "rows": lp.shape[0], "cols": lp.shape[1],
                           "nonzeros": int(lp.nnz), "estimate_mb": est["peak_bytes"] / 2**20,
                           "estimate_seconds": est["seconds"], "rule": rule.describe()}
    reps = repeats if lp.nnz < cheap else 1
    e2e: list[dict[str, Any]] = []
    own: list[dict[str, Any]] = []
    for i in range(reps):
        first = i % 2 == 0  # interleave: end to end first on even rounds
        if first:
            e2e.append(end_to_end(econ, years))
        if i == 0:
            out["peak_rss_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
            out["method"] = e2e[0]["method"]
        own.append(bare(lp, out["method"], extra=rule.options))
        if not first:
            e2e.append(end_to_end(econ, years))
    out["repeats"] = reps
    out["e2e"] = statistics.median(r["wall"] for r in e2e)
    out["e2e_all"] = [round(r["wall"], 3) for r in e2e]
    out["e2e_status"] = e2e[0]["status"]
    out["e2e_objective"] = e2e[0]["objective"]
    out["scaled"] = e2e[0]["scaled"]
    out["timings"] = {k: statistics.median(r["timings"].get(k, 0.0) for r in e2e)
                      for k in e2e[0]["timings"]}
    # what the library's own timings leave out of the wall clock
    out["unaccounted"] = statistics.median(r["wall"] - sum(r["timings"].values()) for r in e2e)
    out["e2e_cpu"] = statistics.median(r["cpu"] for r in e2e)
    out["bare_cpu"] = statistics.median(r["cpu"] for r in own)
    out["bare_run"] = statistics.median(r["run"] for r in own)
    out["bare_run_all"] = [round(r["run"], 3) for r in own]
    out["bare_transfer"] = statistics.median(r["transfer"] for r in own)
    out["bare_objective"] = own[0]["objective"]
    out["bare_status"] = own[0]["status"]
    out["transfer_field_by_field"] = statistics.median(
        transfer_field_by_field(lp) for _ in range(reps))
    out["others"] = {}
    for m in methods:
        if m != out["method"]:
            out["others"][m] = bare(lp, m, time_limit, extra=rule.options)
    return out


def crossover(sizes: str, rounds: int) -> None:
    """Simplex against interior point on small plans, where ``auto`` switches.

    Each round solves the plan by both methods, end to end (``plan.solve``)
    and bare (HiGHS's run time), simplex first on even rounds; medians.
    """
    print(f"simplex / interior point (no crossover), median of {rounds} interleaved rounds; "
          f"auto switches above {AUTO_IPM_NONZEROS:,} nonzeros")
    for size in sizes.split(","):
        n, years = (int(v) for v in size.lower().split("x"))
        econ = economy(n)
        lp = make_plan(econ, years).compile()
        e2e: dict[str, list[float]] = {"simplex": [], "ipm": []}
        run: dict[str, list[float]] = {"simplex": [], "ipm": []}
        for k in range(rounds):
            for m in (("simplex", "ipm") if k % 2 == 0 else ("ipm", "simplex")):
                t0 = time.perf_counter()
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore")
                    make_plan(econ, years).solve(method=m)
                e2e[m].append(time.perf_counter() - t0)
                run[m].append(bare(lp, m)["run"])
        es = statistics.median(e2e["simplex"]) / statistics.median(e2e["ipm"])
        rs = statistics.median(run["simplex"]) / statistics.median(run["ipm"])
        es_s, es_i = statistics.median(e2e["simplex"]), statistics.median(e2e["ipm"])
        print(f"  {size:>6}: {lp.nnz:>7,} nonzeros; end to end simplex "
              f"{es_s:.4f} s, ipm {es_i:.4f} s"
              f" (ratio {es:.2f}); bare run ratio {rs:.2f}; auto picks {choose_method(lp.nnz)}",
              flush=True)


def _rss_mb() -> float:
    """Resident memory now (Linux /proc), MB."""
    try:
        with open("/proc/self/statm") as f:
            return int(f.read().split()[1]) * resource.getpagesize() / 2**20
    except OSError:  # pragma: no cover - not Linux
        return float("nan")


def _peak_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def memory_child(size: str, stages: bool) -> dict[str, Any]:
    """Peak resident memory of a fresh process that builds and solves one plan.

    With ``stages`` the LP is built and solved by hand (``plan.compile``,
    ``passModel``, ``run``) and the resident memory taken after each step;
    otherwise ``plan.solve()`` runs once, as a user would.
    """
    from growthplan.backends import highs as hb

    n, years = (int(v) for v in size.lower().split("x"))
    out: dict[str, Any] = {"size": size, "imports_mb": _rss_mb()}
    plan = make_plan(economy(n), years)
    est = plan.estimate_size()
    out.update(nonzeros=int(est["nonzeros"]), estimate_mb=est["peak_bytes"] / 2**20)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        if not stages:
            t0 = time.perf_counter()
            c0 = time.process_time()
            r = plan.solve()
            out.update(status=str(r.status), peak_mb=_peak_mb(), wall=time.perf_counter() - t0,
                       cpu=time.process_time() - c0,
                       timings=dict(r.timings), estimate_seconds=est["seconds"],
                       objective=float(r.objective), method=r.solver["method"],
                       formulation=r.lp.formulation,
                       iterations=r.outcome.iterations)
            return out
        lp = plan.compile()
    m = lp.matrix
    out["lp_mb"] = (m.data.nbytes + m.indices.nbytes + m.indptr.nbytes
                    + sum(o.data.nbytes + o.indices.nbytes + o.indptr.nbytes
                          for o in (lp.operators or {}).values())) / 2**20
    out["built"] = (_rss_mb(), _peak_mb())
    h = hb._new_highs()
    for k, v in {"output_flag": False, **METHODS["ipm"]}.items():
        h.setOptionValue(k, v)
    hb.load(h, lp)
    out["passed"] = (_rss_mb(), _peak_mb())
    h.run()
    out["run"] = (_rss_mb(), _peak_mb())
    out["status"] = h.modelStatusToString(h.getModelStatus())
    out["peak_mb"] = _peak_mb()
    return out


def _spawn(args: list[str]) -> dict[str, Any] | str:
    proc = subprocess.run([sys.executable, __file__, *args], capture_output=True, text=True,
                          check=False)
    lines = [ln for ln in proc.stdout.splitlines() if ln.startswith("RESULT ")]
    if proc.returncode != 0 or not lines:
        return f"failed (exit {proc.returncode})\n{proc.stderr[-2000:]}"
    out: dict[str, Any] = json.loads(lines[-1][len("RESULT "):])
    return out


def memory(sizes: str, stages: bool) -> None:
    """Measured peak memory against ``estimate_size()["peak_bytes"]``, a fresh process each."""
    print("peak resident memory (ru_maxrss) of a fresh process that builds and solves the "
          "plan" + (" by hand, step by step" if stages else " (plan.solve())"))
    for size in sizes.split(","):
        r = _spawn(["--memory-child", size] + (["--stages"] if stages else []))
        if isinstance(r, str):
            print(f"  {size}: {r}")
            continue
        err = r["estimate_mb"] / r["peak_mb"] - 1
        print(f"  {size:>6}: {r['nonzeros']:>10,} nonzeros; measured {r['peak_mb']:7.0f} MB, "
              f"estimate {r['estimate_mb']:7.0f} MB ({err:+.1%}); after imports "
              f"{r['imports_mb']:.0f} MB; {r['status']}", flush=True)
        if not stages:
            tm = ", ".join(f"{k} {v:.3f}" for k, v in r["timings"].items())
            print(f"          end to end {r['wall']:.1f} s, process CPU {r['cpu']:.1f} s "
                  f"(rough estimate of the solve {r['estimate_seconds']:.1f} s); "
                  f"{r['formulation']} form, {r['method']}, iterations {r['iterations']}; "
                  f"timings: {tm}; objective {r['objective']:.10g}", flush=True)
        if stages:
            print(f"          the LP's own arrays {r['lp_mb']:.0f} MB; resident / peak after "
                  f"build {r['built'][0]:.0f} / {r['built'][1]:.0f} MB, after passModel "
                  f"{r['passed'][0]:.0f} / {r['passed'][1]:.0f} MB, after run "
                  f"{r['run'][0]:.0f} / {r['run'][1]:.0f} MB", flush=True)


def show(r: dict[str, Any]) -> None:
    overhead = (r["e2e"] - r["bare_run"]) / r["bare_run"]
    tm = ", ".join(f"{k} {v:.3f}" for k, v in r["timings"].items())
    print(f"\n== {r['size']}: {r['rows']:,} rows, {r['cols']:,} columns, "
          f"{r['nonzeros']:,} nonzeros (median of {r['repeats']})")
    print(f"  auto: {r['rule']}")
    print(f"  library end to end     {r['e2e']:8.2f} s  {r['e2e_all']}  "
          f"({r['e2e_status']}, {r['method']}, scaled={r['scaled']}, "
          f"objective {r['e2e_objective']:.10g})")
    print(f"    its timings: {tm}; wall clock not in them {r['unaccounted']:.3f} s "
          f"(first-call imports, the certificate, reading the solution)")
    print(f"    rough estimate of the solve from estimate_size(): {r['estimate_seconds']:.2f} s")
    print(f"  bare {r['method']:<17} {r['bare_run']:8.2f} s  {r['bare_run_all']}  "
          f"({r['bare_status']}, objective {r['bare_objective']:.10g}); "
          f"transfer {r['bare_transfer']:.3f} s (numpy passModel)")
    print(f"  overhead/solve          {overhead:8.3f}   (end to end / bare run "
          f"{r['e2e'] / r['bare_run']:.3f}); in CPU time {r['e2e_cpu']:.2f} s / "
          f"{r['bare_cpu']:.2f} s, overhead {(r['e2e_cpu'] - r['bare_cpu']) / r['bare_cpu']:.3f}")
    print(f"  transfer HighsLp field by field {r['transfer_field_by_field']:.3f} s = "
          f"{r['transfer_field_by_field'] / r['bare_transfer']:.1f} × the numpy passModel")
    print(f"  peak RSS of the process after the first end-to-end solve "
          f"{r['peak_rss_mb']:.0f} MB; estimate_size() said {r['estimate_mb']:.0f} MB "
          f"({r['estimate_mb'] / r['peak_rss_mb'] - 1:+.1%})")
    for m, o in r["others"].items():
        print(f"  bare {m:<17} {o['run']:8.2f} s  ({o['status']}, objective "
              f"{o['objective']:.10g}); transfer {o['transfer']:.3f} s")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("sizes", nargs="?", default=DEFAULT_SIZES,
                    help="comma-separated SECTORSxYEARS (default %(default)s)")
    from growthplan.backends.highs import hipo_available

    ap.add_argument("--methods", default=",".join(m for m in METHODS
                                                  if m != "hipo" or hipo_available()),
                    help="HiGHS methods for the bare solves (default: all installed)")
    ap.add_argument("--time-limit", type=float, default=60.0,
                    help="seconds for each method other than the library's")
    ap.add_argument("--repeats", type=int, default=3)
    ap.add_argument("--cheap-nonzeros", type=int, default=1_000_000,
                    help="repeat only LPs with fewer nonzeros")
    ap.add_argument("--forms", metavar="SIZES",
                    help="only compare the capacity formulations × methods on these sizes")
    ap.add_argument("--crossover", metavar="SIZES",
                    help="only compare simplex and interior point on these small sizes "
                         "(e.g. 5x10,10x15,15x15,25x20), where auto switches")
    ap.add_argument("--memory", metavar="SIZES",
                    help="only measure peak memory (a fresh process per size) against "
                         "the estimate")
    ap.add_argument("--stages", action="store_true",
                    help="with --memory: resident memory after build, passModel and run")
    ap.add_argument("--memory-child", help=argparse.SUPPRESS)
    ap.add_argument("--child", help=argparse.SUPPRESS)
    a = ap.parse_args()
    methods = [m for m in a.methods.split(",") if m]
    for m in methods:
        if m not in METHODS:
            raise SystemExit(f"unknown method {m!r}; known: {', '.join(METHODS)}")
    if a.memory_child:
        print("RESULT " + json.dumps(memory_child(a.memory_child, a.stages)), flush=True)
        return
    if a.memory:
        memory(a.memory, a.stages)
        return
    if a.forms:
        forms(a.forms, a.repeats)
        return
    if a.crossover:
        crossover(a.crossover, a.repeats)
        return
    if a.child:
        print("RESULT " + json.dumps(child(a.child, methods, a.time_limit, a.repeats,
                                            a.cheap_nonzeros)), flush=True)
        return
    print(f"highspy {highspy.Highs().version()}; methods {', '.join(methods)}; "
          f"others limited to {a.time_limit:g} s")
    done: list[dict[str, Any]] = []
    for size in a.sizes.split(","):
        r = _spawn(["--child", size, "--methods", ",".join(methods), "--time-limit",
                    str(a.time_limit), "--repeats", str(a.repeats), "--cheap-nonzeros",
                    str(a.cheap_nonzeros)])
        if isinstance(r, str):
            print(f"\n== {size}: {r}")
            continue
        show(r)
        done.append(r)
    summary(done, methods)


def _exponent(xs: list[float], ys: list[float]) -> float:
    """Least-squares slope of log y on log x."""
    return float(np.polyfit(np.log(xs), np.log(ys), 1)[0])


def summary(done: list[dict[str, Any]], methods: list[str]) -> None:
    """One table of every size, and the growth of the solve time fitted across sizes."""
    if not done:
        return
    print("\n| size | rows | columns | nonzeros | end to end | "
          + " | ".join(f"bare {m}" for m in methods)
          + " | overhead / solve | peak memory | estimated |")
    print("|---" * (8 + len(methods)) + "|")
    for r in done:
        bare_by = {r["method"]: f"{r['bare_run']:.2f} s ({r['bare_status']})"}
        bare_by.update({m: f"{o['run']:.2f} s ({o['status']})" for m, o in r["others"].items()})
        cells = [bare_by.get(m, "-") for m in methods]
        print(f"| {r['size']} | {r['rows']:,} | {r['cols']:,} | {r['nonzeros']:,} | "
              f"{r['e2e']:.2f} s | " + " | ".join(cells)
              + f" | {(r['e2e'] - r['bare_run']) / r['bare_run']:.3f} | "
              f"{r['peak_rss_mb']:.0f} MB | {r['estimate_mb']:.0f} MB |")
    by_years: dict[int, list[dict[str, Any]]] = {}
    for r in done:
        by_years.setdefault(int(r["size"].lower().split("x")[1]), []).append(r)
    for years, rs in by_years.items():
        if len(rs) < 2:
            continue
        n = [float(r["size"].lower().split("x")[0]) for r in rs]
        for key, what in (("bare_run", "bare solve"), ("e2e", "end to end")):
            t = [r[key] for r in rs]
            print(f"{what} at {years} years grows as sectors^{_exponent(n, t):.2f} "
                  f"(nonzeros^{_exponent([r['nonzeros'] for r in rs], t):.2f}), least squares "
                  f"over {', '.join(r['size'] for r in rs)}")


if __name__ == "__main__":
    main()
