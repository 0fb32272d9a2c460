"""Benchmark: draws per second of the stress test and the re-optimisation.

Run: python tests/benchmarks/bench_uncertainty.py [--sectors 30 --years 20 --draws 40
--workers 2]

Prints draws per second serially and on a process pool from one run, and
whether both routes gave identical tables.
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


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sectors", type=int, default=30)
    ap.add_argument("--years", type=int, default=20)
    ap.add_argument("--draws", type=int, default=40)
    ap.add_argument("--workers", type=int, default=2)
    args = ap.parse_args()
    warnings.simplefilter("ignore")
    plan = make_plan(economy(args.sectors), args.years)
    nominal = plan.solve()
    spec = gp.UncertaintySpec(items=[
        gp.Uncertain(what="capital_coefficients", correlation="independent",
                     distribution=gp.Uniform(low=0.9, high=1.1)),
        gp.Uncertain(what="mean_service_life", distribution=gp.Triangular(
            low=0.8, mode=1.0, high=1.2))], seed=1)
    print(f"{args.draws} draws of {args.sectors} sectors x {args.years} years, "
          f"{args.workers} workers")
    for name, fn, kw in (("stress test", gp.stress_test, {"nominal": nominal}),
                         ("re-optimisation", gp.reoptimise, {})):
        t0 = time.perf_counter()
        serial = fn(plan, spec, args.draws, executor=gp.SerialExecutor(), **kw)
        t1 = time.perf_counter()
        with ProcessPoolExecutor(max_workers=args.workers) as pool:
            t2 = time.perf_counter()
            pooled = fn(plan, spec, args.draws, executor=pool, **kw)
            t3 = time.perf_counter()
        keep = serial.table.quantity != "solve_seconds"
        same = serial.table[keep].reset_index(drop=True).equals(
            pooled.table[pooled.table.quantity != "solve_seconds"].reset_index(drop=True))
        print(f"  {name}: serial {args.draws / (t1 - t0):.2f} draws/s, pool "
              f"{args.draws / (t3 - t2):.2f} draws/s (speed-up {(t1 - t0) / (t3 - t2):.2f}, "
              f"pool start excluded); identical tables: {same}; failed draws: "
              f"{len(serial.failed)}")


if __name__ == "__main__":
    main()
