"""Benchmark: the library's time split, its overhead, and a naive PuLP route.

Run: python tests/benchmarks/bench_plan.py [--sizes 30x20,60x25,100x30] [--methods]

For dense random productive economies (sectors × years) it prints, from one
run each: seconds for validate, compile, solve, post-process and audit; the
overhead ratio (everything but the solve, over the solve); and the ratio of
the library's end-to-end time to a naive route that builds the same LP term
by term in PuLP and solves it with PuLP's default HiGHS call. With
``--methods`` it also times each HiGHS method on the same plan.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np
import pulp

import growthplan as gp

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402


def naive(plan: gp.Plan) -> tuple[float, float, float]:
    """Build the same LP term by term in PuLP and solve it with PuLP's HiGHS class."""
    t0 = time.perf_counter()
    prob = naive_problem(plan)
    t1 = time.perf_counter()
    prob.solve(pulp.HiGHS(msg=False))
    t2 = time.perf_counter()
    return t1 - t0, t2 - t1, pulp.value(prob.objective)


def naive_problem(plan: gp.Plan) -> pulp.LpProblem:
    """The plan's LP written the way a first PuLP model usually is: lpSum of products."""
    econ = plan.economy
    n, T = econ.n, plan.horizon
    a, b = np.asarray(econ.input_coefficients), np.asarray(econ.capital_coefficients)
    lab = np.asarray(econ.labour_coefficients)[0]
    c0 = [econ.capital[s].initial_capacity for s in econ.names]
    delta = 1 / 20.0
    supply = plan.lowered().supply[0]
    prob = pulp.LpProblem("naive", pulp.LpMaximize)
    x = [[prob.add_variable(f"x_{t}_{j}", lowBound=0) for j in range(n)] for t in range(T)]
    z = [[prob.add_variable(f"z_{t}_{j}", lowBound=0) for j in range(n)] for t in range(T)]
    lam = prob.add_variable("lam")
    prob += lam

    def capacity(t, j):
        return c0[j] * (1 - delta) ** t + pulp.lpSum(
            (1 - delta) ** (t - tau - 1) * z[tau][j] for tau in range(t))

    for t in range(T):
        for i in range(n):
            prob += (x[t][i] - pulp.lpSum(a[i, j] * x[t][j] for j in range(n))
                     - pulp.lpSum(b[i, j] * z[t][j] for j in range(n)) >= 0)
        for j in range(n):
            prob += x[t][j] <= capacity(t, j)
        prob += pulp.lpSum(lab[j] * x[t][j] for j in range(n)) <= supply[t]
    pi = 1.0 / n
    for j in range(n):
        prob += capacity(T, j) >= pi * lam
    return prob


def run(n: int, years: int, methods: bool, with_naive: bool = True) -> None:
    econ = economy(n)
    t0 = time.perf_counter()
    plan = make_plan(econ, years)
    t_val = time.perf_counter() - t0
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        t1 = time.perf_counter()
        r = plan.solve()
        total = time.perf_counter() - t1 + t_val
    tm = dict(r.timings, validate=t_val)
    overhead = total - tm["solve"]
    lp = r.lp
    print(f"\n{n} sectors x {years} years: {lp.shape[0]} rows, {lp.shape[1]} columns, "
          f"{lp.nnz} nonzeros; status {r.status.value}, method {r.solver['method']}")
    print("  " + ", ".join(f"{k} {v:.3f} s" for k, v in tm.items()))
    print(f"  overhead / solve = {overhead / tm['solve']:.3f}")
    if with_naive:
        build, solve, obj = naive(plan)
        print(f"  naive PuLP route: build {build:.3f} s, solve {solve:.3f} s "
              f"(objective {obj:.6g} vs {r.objective:.6g})")
        print(f"  library end-to-end / naive = {total / (build + solve):.3f}")
    if methods:
        for m in ("simplex", "ipm", "ipm-crossover"):
            out = gp.HighsBackend(m).solve(lp)
            print(f"  method {m:>13}: {out.seconds:.3f} s, objective {out.objective:.8g}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="30x20,60x25,100x30")
    ap.add_argument("--methods", action="store_true")
    ap.add_argument("--no-naive", action="store_true",
                    help="Skip the naive route (about 17 minutes at 100x30).")
    args = ap.parse_args()
    for size in args.sizes.split(","):
        n, years = map(int, size.split("x"))
        run(n, years, args.methods, not args.no_naive)


if __name__ == "__main__":
    main()
