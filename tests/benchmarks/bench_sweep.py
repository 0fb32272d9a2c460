"""Benchmark: sweeps of 16 and 200 (and, with --full, 1,000) scenarios on a local Dask cluster.

Run: python tests/benchmarks/bench_sweep.py [--sectors 10 --years 10 --workers 2 --full]

Each sweep runs on a ``dask.distributed.LocalCluster`` (worker processes,
one thread each) through ``client.get_executor()``, with at most
``--in-flight`` scenarios sent and not yet collected, and streams its rows to
a CSV file. Prints scenarios per second and the peak growth of this
process's resident memory (it holds the client and the cluster's scheduler)
while the sweep ran and the most tasks the scheduler held at once, sampled
every 20 ms (the scheduler's own logs of finished tasks, bounded by Dask's
log length, grow with the count); then, for comparison, the 200
sweep with every scenario sent at once. The 16-scenario sweep is checked
against a serial run (identical objectives). Timings and memory on a shared
machine vary from run to run.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import threading
import time
from pathlib import Path

import pandas as pd
import psutil

import growthplan as gp

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402


def grid_of(n: int) -> dict[str, list[float]]:
    """A grid of ``n`` scenarios (n a multiple of 8): labour growth × terminal rate."""
    per = n // 8
    return {"labour.growth": [0.002 * k for k in range(8)],
            "terminal.rate": [0.01 + 0.03 * k / max(per - 1, 1) for k in range(per)]}


class Peak:
    """Largest resident-memory growth of this process, and most tasks the cluster's
    scheduler held at once, while the block runs."""

    def __init__(self, scheduler: object) -> None:
        self.proc = psutil.Process()
        self.scheduler = scheduler
        self.base = self.peak = self.tasks = 0
        self.done = threading.Event()

    def __enter__(self) -> Peak:
        self.base = self.peak = self.proc.memory_info().rss
        self.thread = threading.Thread(target=self._sample, daemon=True)
        self.thread.start()
        return self

    def _sample(self) -> None:
        while not self.done.wait(0.02):
            self.peak = max(self.peak, self.proc.memory_info().rss)
            self.tasks = max(self.tasks, len(getattr(self.scheduler, "tasks", ())))

    def __exit__(self, *exc: object) -> None:
        self.done.set()
        self.thread.join()
        self.peak = max(self.peak, self.proc.memory_info().rss)

    @property
    def grown_mb(self) -> float:
        return (self.peak - self.base) / 2**20


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sectors", type=int, default=10)
    ap.add_argument("--years", type=int, default=10)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--in-flight", type=int, default=8)
    ap.add_argument("--full", action="store_true", help="add the 1,000-scenario sweep")
    args = ap.parse_args()
    import distributed

    base = make_plan(economy(args.sectors), args.years)
    plan = gp.Plan(**{**{f: getattr(base, f) for f in type(base).model_fields},
                      "terminal": gp.TerminalGrowth(rate=0.02)})
    sizes = [16, 200] + ([1000] if args.full else [])
    print(f"plans of {args.sectors} sectors x {args.years} years on a local Dask cluster of "
          f"{args.workers} worker processes; at most {args.in_flight} scenarios in flight")
    with tempfile.TemporaryDirectory() as tmp, \
            distributed.LocalCluster(n_workers=args.workers, threads_per_worker=1,
                                     processes=True, dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        ex = client.get_executor()
        gp.sweep(plan, {"labour.growth": [0.0]}, executor=ex, keep_results=False)  # warm up
        for n, flight in [(s, args.in_flight) for s in sizes] + [(200, 200)]:
            out = Path(tmp) / f"sweep-{n}-{flight}.csv"
            with Peak(cluster.scheduler) as peak:
                t0 = time.perf_counter()
                s = gp.sweep(plan, grid_of(n), executor=ex, keep_results=False, out=out,
                             in_flight=flight)
                seconds = time.perf_counter() - t0
            rows = len(pd.read_csv(out))
            label = "every scenario at once" if flight == n and n > args.in_flight else \
                f"{flight} in flight"
            print(f"  {n:5d} scenarios ({label}): {n / seconds:.2f} scenarios/s, "
                  f"{seconds:.1f} s, peak memory growth {peak.grown_mb:.1f} MB, at most "
                  f"{peak.tasks} tasks in the scheduler, {rows} rows streamed, "
                  f"{len(s.failed)} failed")
            if n == 16:
                serial = gp.sweep(plan, grid_of(16), executor=gp.SerialExecutor(),
                                  keep_results=False)
                same = serial.table["objective"].equals(s.table["objective"])
                print(f"        identical objectives to a serial run: {same}")


if __name__ == "__main__":
    main()
