"""Benchmark: the diagnosis of impossible plans at the size of real tables.

Run: python tests/benchmarks/bench_diagnosis.py [71x30,200x30] [--rounds 3] [--check]

For each size (sectors × years) the dense random plan of ``tests/helpers.py``
(the plan of the other benchmarks: terminal capacity, labour growing 1 % a
year) is solved as it is (feasible), and then with a capacity target on its
first sector in the plan's third year at a hundred times its initial capacity,
beyond reach. Each round times both, interleaved; the figure is the diagnosis's time
(``result.timings["diagnose"]``) over the feasible plan's solve time
(``result.timings["solve"]``), given as min and median over the rounds
(the goal is at most 3); the impossible plan's whole ``solve()`` over the
same is printed too.

``--check`` also maximises the target's capacity alone (the plan's programme,
the target's bound dropped, interior point at tight tolerances) and prints
the relative difference between the reported shortfall and the gap to that
maximum, and whether the audit of the elastic solution passed.
Times on a shared machine vary; compare ratios from one run.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402

import growthplan as gp  # noqa: E402


def plans(n: int, years: int) -> tuple[gp.Plan, gp.Plan]:
    econ = economy(n)
    feasible = make_plan(econ, years)
    first = econ.names[0]
    cap = econ.capital[first].initial_capacity
    target = gp.Target(first, year=2032, capacity_at_least=100 * cap)
    fields = {k: getattr(feasible, k) for k in type(feasible).model_fields}
    return feasible, gp.Plan(**{**fields, "targets": [target]})


def check(plan: gp.Plan, result: gp.PlanResult) -> str:
    """Shortfall against the gap to the target's maximum, computed alone."""
    lp = plan.compile()
    r = lp.rows["targets"].start
    required = plan.targets[0].required
    offset = required - lp.row_lower[r]
    lower = lp.row_lower.copy()
    lower[r] = -np.inf
    cost = lp.matrix.tocsr()[[r]].toarray().ravel()
    out = gp.HighsBackend("ipm", tolerance=1e-9,
                          options={"ipm_optimality_tolerance": 1e-10}).solve(
        lp.replace(cost=cost, sense="max", row_lower=lower, stages=[]))
    m = float(out.objective + offset)
    short = result.diagnosis.shortfalls
    got = float(short["shortfall"].iloc[0])
    gap = required - m
    return (f"maximum alone {m:,.8g} ({out.status.value}); shortfall {got:,.8g}, gap "
            f"{gap:,.8g}, relative difference {abs(got - gap) / required:.2g}; "
            f"conditions short {len(short)}; audit of the elastic solution "
            f"{'passed' if result.diagnosis.audit_ok else 'FAILED'}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("sizes", nargs="?", default="71x30,200x30")
    ap.add_argument("--rounds", type=int, default=3)
    ap.add_argument("--check", action="store_true")
    args = ap.parse_args()
    warnings.simplefilter("ignore")
    for size in args.sizes.split(","):
        n, years = (int(v) for v in size.split("x"))
        feasible, impossible = plans(n, years)
        ratios, solves, diags, whole = [], [], [], []
        last = None
        for _ in range(args.rounds):
            a = feasible.solve()
            assert a.status is gp.Status.OPTIMAL, a.status
            t0 = time.perf_counter()
            b = impossible.solve()
            wall = time.perf_counter() - t0
            assert b.status is gp.Status.INFEASIBLE, (b.status, b.message)
            solves.append(a.timings["solve"])
            diags.append(b.timings["diagnose"])
            ratios.append(b.timings["diagnose"] / a.timings["solve"])
            whole.append(wall / a.timings["solve"])
            last = b
            print(f"  {size}: feasible solve {a.timings['solve']:.2f} s ({a.solver['method']}),"
                  f" impossible plan {wall:.2f} s (its solve {b.timings['solve']:.2f} s, "
                  f"diagnosis {b.timings['diagnose']:.2f} s)", flush=True)
        assert last is not None and last.diagnosis is not None
        d = last.diagnosis
        print(f"{size}: {feasible.compile().nnz:,} nonzeros; diagnosis / feasible solve: "
              f"min {min(ratios):.2f}, median {statistics.median(ratios):.2f} over "
              f"{args.rounds} rounds (solve median {statistics.median(solves):.2f} s, "
              f"diagnosis median {statistics.median(diags):.2f} s); method {d.method}")
        print(f"  the impossible plan end to end (its own solve, the diagnosis, the rest) / "
              f"feasible solve: min {min(whole):.2f}, median {statistics.median(whole):.2f}")
        print("  " + d.headline())
        print("  conflict: " + (d.conflict()[:160] or d.subset_source))
        for step in d.steps:
            print(f"    {step}")
        for note in d.notes:
            print(f"    note: {note}")
        if args.check:
            print("  check: " + check(impossible, last), flush=True)


if __name__ == "__main__":
    main()
