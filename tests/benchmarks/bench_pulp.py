"""Benchmark: building the PuLP problem, library route vs naive term-by-term route.

Run: python tests/benchmarks/bench_pulp.py [--sizes 30x20,100x30]

Prints, from one run each, the seconds to build a ``pulp.LpProblem`` of the
same plan with ``plan.to_pulp()`` (from the compiled sparse matrix, rows from
coefficient pairs) and with the naive route of ``bench_plan.naive_problem`` (lpSum of
products, constraint by constraint), and their ratio.
"""

from __future__ import annotations

import argparse
import time
import warnings

from bench_plan import naive_problem
from helpers import economy, make_plan


def naive_build(plan) -> float:
    t0 = time.perf_counter()
    naive_problem(plan)
    return time.perf_counter() - t0


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="30x20,100x30")
    args = ap.parse_args()
    for size in args.sizes.split(","):
        n, years = map(int, size.split("x"))
        plan = make_plan(economy(n), years)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            t0 = time.perf_counter()
            prob = plan.to_pulp()
            lib = time.perf_counter() - t0
        naive = naive_build(plan)
        print(f"{n} sectors x {years} years: to_pulp {lib:.3f} s "
              f"({len(prob.constraints())} constraints), naive {naive:.3f} s, "
              f"to_pulp / naive = {lib / naive:.3f}")


if __name__ == "__main__":
    main()
