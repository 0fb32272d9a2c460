"""Benchmark: the BEA 2021 tables (71 industries) from files to a solved 30-year plan.

Run: python tests/benchmarks/bench_real_tables.py [--size 71] [--years 30] [--repeats 1]

Needs the registry package ``quantecon-book-networks`` (the published tables).
Prints, from one run:

- the build: reading the published supply and use tables and building the
  economy (valuation, special cells, transformation, capital and labour),
  median of five, wall clock;
- the plan of ``tests/helpers.py``'s ``bea_plan`` (the skeleton
  ``economy build --plan`` writes) end to end, a fresh ``Plan`` of the built
  economy validated and ``plan.solve()`` (lowering, building the LP, solving,
  the audit and the certificate),
  against the bare HiGHS solve of the same LP (``plan.compile()``, the method
  the library chose, ``passModel`` with numpy arrays and ``run``), interleaved,
  wall clock and process CPU time (which other work on a shared machine
  disturbs far less).

Times on a shared machine vary; compare ratios from one run.
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
import warnings
from pathlib import Path
from typing import Any

import highspy
import numpy as np

import growthplan as gp

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import bea_plan, bea_tables  # noqa: E402

from growthplan.backends.highs import METHODS  # noqa: E402
from growthplan.statistics.published import PublishedTables, published_economy  # noqa: E402


def _arrays(lp: Any) -> tuple[Any, ...]:
    m = lp.matrix.tocsc()
    inf = highspy.kHighsInf

    def bound(v: np.ndarray, missing: float) -> np.ndarray:
        return np.where(np.isfinite(v), v, missing).astype(np.float64)

    sense = highspy.ObjSense.kMaximize if lp.sense == "max" else highspy.ObjSense.kMinimize
    return (int(m.shape[1]), int(m.shape[0]), int(m.nnz), int(highspy.MatrixFormat.kColwise),
            int(sense), 0.0, np.ascontiguousarray(lp.cost, dtype=np.float64),
            bound(lp.col_lower, -inf), bound(lp.col_upper, inf),
            bound(lp.row_lower, -inf), bound(lp.row_upper, inf),
            m.indptr.astype(np.int32), m.indices.astype(np.int32), m.data.astype(np.float64),
            np.zeros(m.shape[1], dtype=np.int32))


def bare(lp: Any, method: str) -> dict[str, float]:
    h = highspy.Highs()
    for k, v in {"output_flag": False, "random_seed": 0, **METHODS[method]}.items():
        h.setOptionValue(k, v)
    t0, c0 = time.perf_counter(), time.process_time()
    h.passModel(*_arrays(lp))
    h.run()
    return {"wall": time.perf_counter() - t0, "cpu": time.process_time() - c0,
            "objective": float(h.getInfo().objective_function_value)}


def build(size: int) -> float:
    found = bea_tables(size)
    assert found is not None
    t0 = time.perf_counter()
    published_economy(PublishedTables.read(*found), value_unit="million dollars",
                      capital_output_ratio=3.0, wage=75.0)
    return time.perf_counter() - t0


def end_to_end(template: gp.Plan) -> dict[str, Any]:
    """A fresh plan of the same economy built (validated) and solved, wall clock and CPU."""
    fields = {k: getattr(template, k) for k in type(template).model_fields}
    t0, c0 = time.perf_counter(), time.process_time()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        plan = gp.Plan(**fields)
        r = plan.solve()
    return {"wall": time.perf_counter() - t0, "cpu": time.process_time() - c0,
            "status": str(r.status), "objective": float(r.objective),
            "method": r.solver["method"], "audit": bool(r.audit is not None and r.audit.ok)}


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--size", type=int, default=71, choices=(15, 71))
    ap.add_argument("--years", type=int, default=30)
    ap.add_argument("--repeats", type=int, default=1)
    args = ap.parse_args()
    if bea_tables(args.size) is None:
        raise SystemExit("quantecon-book-networks is not installed")
    builds = [build(args.size) for _ in range(5)]
    print(f"build of the {args.size}-industry economy: {statistics.median(builds):.3f} s "
          f"(median of 5; goal <= 2 s)")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        template = bea_plan(args.size, args.years)
        lp = gp.Plan(**{k: getattr(template, k)
                        for k in type(template).model_fields}).compile()
    print(f"LP: {lp.shape[0]} rows, {lp.shape[1]} columns, {lp.nnz} nonzeros")
    ours, theirs = [], []
    for i in range(args.repeats):
        if i % 2 == 0:
            ours.append(end_to_end(template))
            theirs.append(bare(lp, ours[-1]["method"]))
        else:
            theirs.append(bare(lp, ours[-1]["method"]))
            ours.append(end_to_end(template))
    e = {k: statistics.median(x[k] for x in ours) for k in ("wall", "cpu")}
    b = {k: statistics.median(x[k] for x in theirs) for k in ("wall", "cpu")}
    o = ours[-1]
    audit = "passed" if o["audit"] else "FAILED"
    print(f"plan {args.size} x {args.years}: {o['status']}, audit {audit}, "
          f"method {o['method']}, objective {o['objective']:.6g} (bare HiGHS "
          f"{theirs[-1]['objective']:.6g})")
    print(f"  end to end {e['wall']:.2f} s wall, {e['cpu']:.2f} s CPU; bare HiGHS "
          f"{b['wall']:.2f} s wall, {b['cpu']:.2f} s CPU")
    print(f"  library / bare HiGHS: {e['wall'] / b['wall']:.3f} wall, "
          f"{e['cpu'] / b['cpu']:.3f} CPU (goal <= 1.1)")


if __name__ == "__main__":
    main()
