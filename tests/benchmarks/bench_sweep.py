"""Benchmark: a sweep of 16 plans serially, on a process pool and on a local Dask cluster.

Run: python tests/benchmarks/bench_sweep.py [--sectors 40 --years 20 --workers 2]

Prints wall-clock seconds of each route from one run and the speed-ups over
the serial run; the figures of all three must agree.
"""

from __future__ import annotations

import argparse
import sys
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import growthplan as gp

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sectors", type=int, default=40)
    ap.add_argument("--years", type=int, default=20)
    ap.add_argument("--workers", type=int, default=2)
    args = ap.parse_args()
    plan = make_plan(economy(args.sectors), args.years)
    grid = {"labour.0.growth": [0.0, 0.01, 0.02, 0.03],
            "economy.capital.s0.mean_service_life": [10.0, 15.0, 20.0, 30.0]}
    opts = {"method": "ipm"}
    t0 = time.perf_counter()
    serial = gp.sweep(plan, grid, executor=gp.SerialExecutor(), keep_results=False,
                      solve_options=opts)
    t1 = time.perf_counter()
    with ProcessPoolExecutor(max_workers=args.workers) as pool:
        pooled = gp.sweep(plan, grid, executor=pool, keep_results=False, solve_options=opts)
    t2 = time.perf_counter()
    import distributed

    with distributed.LocalCluster(n_workers=args.workers, threads_per_worker=1,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        t3 = time.perf_counter()
        dasked = gp.sweep(plan, grid, executor=client.get_executor(), keep_results=False,
                          solve_options=opts)
        t4 = time.perf_counter()
    same = (serial.table.objective.equals(pooled.table.objective)
            and serial.table.objective.equals(dasked.table.objective))
    print(f"16 plans of {args.sectors} sectors x {args.years} years, {args.workers} workers")
    print(f"  serial {t1 - t0:.2f} s, process pool {t2 - t1:.2f} s "
          f"(speed-up {(t1 - t0) / (t2 - t1):.2f}), Dask {t4 - t3:.2f} s "
          f"(speed-up {(t1 - t0) / (t4 - t3):.2f}, cluster start excluded)")
    print(f"  identical objectives on all three: {same}")


if __name__ == "__main__":
    main()
