"""Benchmark: a plan over several regions against a one-region plan of as many sectors.

Run: python tests/benchmarks/bench_regions.py [--sizes 6x8x30,3x8x20]

Each size is regions × sectors × years: dense random regions (the last
sector, "haul", carries shipments), corridors both ways between every two
regions for every good at a transport cost of 0.05, each region's own labour,
a consumption floor, terminal growth and discounted consumption. The
comparison is one region with regions × sectors dense random sectors, the
same horizon and objective. Prints, from one run each, the LP's size (and
whether the size estimate equals the built matrix), the seconds to compile,
to solve and in all, and the ratio of the regional plan's time to the
comparison's. Timings on a shared machine vary from run to run.
"""

from __future__ import annotations

import argparse
import itertools
import sys
import time
import warnings
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, regional_economy  # noqa: E402

import growthplan as gp  # noqa: E402


def regional(r: int, n: int, years: int) -> gp.Plan:
    names = [f"r{k}" for k in range(r)]
    mre = regional_economy(names, n, seed=11)
    corridors = [gp.Corridor(origin=a, destination=b, transport=0.05, both_ways=True)
                 for a, b in itertools.combinations(names, 2)]
    return mre.plan(range(2030, 2030 + years), corridors=corridors, transport_sector="haul",
                    regional_labour={k: 60.0 * n for k in names}, labour_growth=0.01,
                    consumption=gp.Consumption(floor=1.0), terminal=gp.TerminalGrowth(rate=0.02),
                    objective=gp.objectives.DiscountedConsumption(rate=0.03))


def single(m: int, years: int) -> gp.Plan:
    econ = economy(m, seed=11)
    return gp.Plan(economy=econ, years=range(2030, 2030 + years),
                   labour=gp.LabourSupply(start=60.0 * m, growth=0.01),
                   consumption=gp.Consumption(floor=1.0, basket={s: 1.0 for s in econ.names}),
                   terminal=gp.TerminalGrowth(rate=0.02),
                   objective=gp.objectives.DiscountedConsumption(rate=0.03))


def run(plan: gp.Plan) -> tuple[dict[str, float], float, float, float, bool]:
    t0 = time.perf_counter()
    lp = plan.compile(size_limit=None)
    t1 = time.perf_counter()
    est = plan.estimate_size()
    exact = (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
    result = plan.solve()
    t2 = time.perf_counter()
    assert result.ok, result.status
    return est, t1 - t0, t2 - t1, t2 - t0, exact


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--sizes", default="6x8x30")
    args = parser.parse_args()
    warnings.simplefilter("ignore")
    print("regions × sectors × years | rows × columns, nonzeros | estimate exact | compile s "
          "| solve s | all s | all / one region of as many sectors")
    for size in args.sizes.split(","):
        r, n, years = (int(v) for v in size.split("x"))
        est, comp, solve, total, exact = run(regional(r, n, years))
        _, _, _, base, _ = run(single(r * n, years))
        print(f"{r} × {n} × {years} | {est['rows']:,} × {est['columns']:,}, "
              f"{est['nonzeros']:,} | {exact} | {comp:.2f} | {solve:.2f} | {total:.2f} | "
              f"{total / base:.2f}")


if __name__ == "__main__":
    main()
