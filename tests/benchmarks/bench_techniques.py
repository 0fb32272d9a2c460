"""Benchmark: a plan with three techniques per sector against the one-technique plan.

Run: python tests/benchmarks/bench_techniques.py [--sizes 60x25] [--method auto]

Each sector gets two alternatives besides its base technique (one saving
labour with 40 % more capital, one saving inputs with 20 % more capital,
available from the plan's third year), and, for comparison, the same plan
with embodied labour-saving change in every sector. Prints, from one run each,
the LP's size, the seconds to compile, to solve and in all, and the ratio to
the one-technique plan. Timings on a shared machine vary from run to run.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402

import growthplan as gp  # noqa: E402


def alternatives(econ: gp.Economy, first: int) -> list[gp.Technique]:
    a = np.asarray(econ.input_coefficients)
    b = np.asarray(econ.capital_coefficients)
    lab = np.asarray(econ.labour_coefficients)[0]
    out = []
    for j, s in enumerate(econ.names):
        out.append(gp.Technique(sector=s, label="lean", labour=float(0.5 * lab[j]),
                                capital=dict(zip(econ.names, 1.4 * b[:, j], strict=True))))
        out.append(gp.Technique(sector=s, label="frugal", first_year=first,
                                inputs=dict(zip(econ.names, 0.85 * a[:, j], strict=True)),
                                capital=dict(zip(econ.names, 1.2 * b[:, j], strict=True))))
    return out


def run(name: str, plan: gp.Plan, method: str, ref: float | None) -> float:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        t0 = time.perf_counter()
        lp = plan.compile(size_limit=None)
        compiled = time.perf_counter() - t0
        result = plan.solve(method=method, size_limit=None)
        total = time.perf_counter() - t0
    ratio = "" if ref is None else f", {total / ref:.2f} x the one-technique plan"
    print(f"  {name:<22} {lp.shape[0]:>7} rows {lp.shape[1]:>7} columns {lp.nnz:>9} nonzeros; "
          f"{result.status.value}, objective {result.objective:.6g}; compile {compiled:.2f} s, "
          f"solve {result.timings.get('solve', float('nan')):.2f} s, in all {total:.2f} s{ratio}")
    return total


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="60x25")
    ap.add_argument("--method", default="auto")
    args = ap.parse_args()
    for size in args.sizes.split(","):
        n, years = map(int, size.split("x"))
        econ = economy(n)
        plan = make_plan(econ, years)
        print(f"{n} sectors x {years} years (method {args.method}):")
        ref = run("one technique", plan, args.method, None)
        run("three techniques", plan.model_copy(
            update={"techniques": alternatives(econ, plan.years[2])}), args.method, ref)
        change = gp.TechnicalChange(labour_rate={s: -0.02 for s in econ.names}, embodied=True)
        run("embodied change", plan.model_copy(update={"technical_change": change}),
            args.method, ref)


if __name__ == "__main__":
    main()
