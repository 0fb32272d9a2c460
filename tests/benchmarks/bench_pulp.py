"""Benchmark: building the PuLP problem, library route vs naive term-by-term route.

Run: python tests/benchmarks/bench_pulp.py [--sizes 30x20,100x30]

Prints, from one run each, the seconds to build a ``pulp.LpProblem`` of the
same plan with ``plan.to_pulp()`` (from the compiled sparse matrix, rows from
coefficient pairs) and with the naive route of ``bench_plan.naive`` (lpSum of
products, constraint by constraint), and their ratio.
"""

from __future__ import annotations

import argparse
import time
import warnings

import pulp
from bench_plan import economy, make_plan


def naive_build(plan) -> float:
    import numpy as np

    t0 = time.perf_counter()
    econ = plan.economy
    n, T = econ.n, plan.horizon
    a, b = np.asarray(econ.input_coefficients), np.asarray(econ.capital_coefficients)
    lab = np.asarray(econ.labour_coefficients)[0]
    c0 = [econ.capital[s].initial_capacity for s in econ.names]
    supply = plan.labour_supply()[0]
    prob = pulp.LpProblem("naive", pulp.LpMaximize)
    x = [[prob.add_variable(f"x_{t}_{j}", lowBound=0) for j in range(n)] for t in range(T)]
    z = [[prob.add_variable(f"z_{t}_{j}", lowBound=0) for j in range(n)] for t in range(T)]
    lam = prob.add_variable("lam")
    prob += lam
    for t in range(T):
        for i in range(n):
            prob += (x[t][i] - pulp.lpSum(a[i, j] * x[t][j] for j in range(n))
                     - pulp.lpSum(b[i, j] * z[t][j] for j in range(n)) >= 0)
        for j in range(n):
            prob += x[t][j] <= c0[j] * 0.95 ** t + pulp.lpSum(
                0.95 ** (t - tau - 1) * z[tau][j] for tau in range(t))
        prob += pulp.lpSum(lab[j] * x[t][j] for j in range(n)) <= supply[t]
    for j in range(n):
        prob += c0[j] * 0.95 ** T + pulp.lpSum(0.95 ** (T - tau - 1) * z[tau][j]
                                               for tau in range(T)) >= lam / n
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
