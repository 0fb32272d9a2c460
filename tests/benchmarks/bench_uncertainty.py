"""Benchmark: draws per second of the stress test and the re-optimisation.

Run: python tests/benchmarks/bench_uncertainty.py [--sectors 30 --years 20 --draws 40
--workers 2]

Prints draws per second from one run of each route:

* serial: every draw in this process;
* plain pool (the earlier route): a process pool handed in by the caller,
  so every chunk of draws carries the plan and the spec with it;
* warm pool (the default): the analysis's own pool, whose workers receive
  the plan and the spec once, when they start, and tasks only draw numbers;

and whether all routes gave identical tables. Pool start-up is included for
the warm pool (it is part of the analysis) and excluded for the plain pool
(the caller made it). Timings on a shared machine vary from run to run.

``--warm K`` instead times, on the LPs of K re-optimised draws, the solve
from scratch as ``auto`` runs it against simplex started from the nominal
plan's optimal basis (HiGHS's interior points take no starting point), and
cold simplex; medians and per-draw ratios, iterations, same optimum.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import growthplan as gp

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402


def _same(a: gp.UncertaintyResult, b: gp.UncertaintyResult) -> bool:
    keep_a = a.table[a.table.quantity != "solve_seconds"].reset_index(drop=True)
    keep_b = b.table[b.table.quantity != "solve_seconds"].reset_index(drop=True)
    return keep_a.equals(keep_b)


def warm_starts(plan: gp.Plan, spec: gp.UncertaintySpec, k: int) -> None:
    """Each draw's LP: auto from scratch, simplex from the nominal basis, cold simplex."""
    import statistics

    import highspy

    from growthplan.backends.highs import METHODS, HighsBackend, _new_highs, load
    from growthplan.lp.build import build

    def run(lp, options, basis=None):
        h = _new_highs()
        for name, value in {"output_flag": False, "random_seed": 0, **options}.items():
            h.setOptionValue(name, value)
        load(h, lp)
        if basis is not None:
            h.setBasis(basis)
        t0 = time.perf_counter()
        h.run()
        info = h.getInfo()
        return (h, time.perf_counter() - t0, float(info.objective_function_value),
                int(info.simplex_iteration_count) + int(info.ipm_iteration_count))

    d = plan.lowered()
    rule = HighsBackend().rule(build(d).nnz)
    auto = {**METHODS[rule.method], **rule.options}
    simplex = {"solver": "simplex"}
    h, t_nom, _, it_nom = run(build(d, formulation=rule.formulation), simplex)
    basis = h.getBasis()
    print(f"highspy {highspy.Highs().version()}; auto: {rule.describe()}; nominal plan by "
          f"simplex {t_nom:.2f} s, {it_nom} iterations")
    rows = []
    for i in range(k):
        lp = build(spec.draw(plan, i).lowered(), formulation=rule.formulation)
        _, t_auto, f_auto, it_auto = run(lp, auto)
        _, t_warm, f_warm, it_warm = run(lp, simplex, basis)
        _, t_cold, _, it_cold = run(lp, simplex)
        rows.append((t_auto, t_warm, t_cold))
        print(f"  draw {i}: auto {t_auto:.3f} s ({it_auto} it.), warm simplex {t_warm:.3f} s "
              f"({it_warm} it.), cold simplex {t_cold:.3f} s ({it_cold} it.); optima differ "
              f"{abs(f_warm - f_auto) / abs(f_auto):.1e}", flush=True)
    warm_over_auto = [w / a for a, w, _ in rows]
    warm_over_cold = [w / c for _, w, c in rows]
    print(f"warm simplex / auto: min {min(warm_over_auto):.2f}, median "
          f"{statistics.median(warm_over_auto):.2f}; warm / cold simplex: min "
          f"{min(warm_over_cold):.2f}, median {statistics.median(warm_over_cold):.2f}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sectors", type=int, default=30)
    ap.add_argument("--years", type=int, default=20)
    ap.add_argument("--draws", type=int, default=40)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--warm", type=int, metavar="K", default=0,
                    help="only compare warm-started simplex with auto on K draws' LPs")
    args = ap.parse_args()
    warnings.simplefilter("ignore")
    plan = make_plan(economy(args.sectors), args.years)
    spec = gp.UncertaintySpec(items=[
        gp.Uncertain(what="capital_coefficients", correlation="independent",
                     distribution=gp.Uniform(low=0.9, high=1.1)),
        gp.Uncertain(what="mean_service_life", distribution=gp.Triangular(
            low=0.8, mode=1.0, high=1.2))], seed=1)
    if args.warm:
        warm_starts(plan, spec, args.warm)
        return
    nominal = plan.solve()
    n = args.draws
    print(f"{n} draws of {args.sectors} sectors x {args.years} years, {args.workers} workers")
    for name, fn, kw in (("stress test", gp.stress_test, {"nominal": nominal}),
                         ("re-optimisation", gp.reoptimise, {})):
        t0 = time.perf_counter()
        serial = fn(plan, spec, n, executor=gp.SerialExecutor(), **kw)
        t1 = time.perf_counter()
        with ProcessPoolExecutor(max_workers=args.workers) as pool:
            t2 = time.perf_counter()
            plain = fn(plan, spec, n, executor=pool, **kw)
            t3 = time.perf_counter()
        t4 = time.perf_counter()
        warm = fn(plan, spec, n, max_workers=args.workers, **kw)
        t5 = time.perf_counter()
        same = _same(serial, plain) and _same(serial, warm)
        print(f"  {name}: serial {n / (t1 - t0):.2f} draws/s; plain pool (before) "
              f"{n / (t3 - t2):.2f} draws/s; warm pool (after) {n / (t5 - t4):.2f} draws/s "
              f"(after/before {(t3 - t2) / (t5 - t4):.2f}); identical tables: {same}; "
              f"failed draws: {len(serial.failed)}")


if __name__ == "__main__":
    main()
