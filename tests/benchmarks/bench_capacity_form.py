"""Benchmark: capacity as an expression in past starts vs as state variables.

Run: python tests/benchmarks/bench_capacity_form.py [--sizes 30x20,60x25]

For geometric retirement and one-year lead times capacity can also be a
state variable, ``C_{t+1} = (1 − δ) C_t + z_t``. This script builds that
state form from the same plan (same balance and labour rows) and prints the
HiGHS times of both forms and their ratio, from one run each.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

import numpy as np
from scipy import sparse

import growthplan as gp
from growthplan.lp.program import Block, LinearProgram

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from helpers import economy, make_plan  # noqa: E402


def state_form(lp, delta: float):
    d = lp.data
    T, n = len(d.years), len(d.names)
    m = lp.matrix.tocsr()
    xb, zb = lp.cols["output"], lp.cols["starts"]
    nx = xb.size + zb.size
    ncap = (T + 1) * n
    ncol = nx + ncap + 1
    keep = [lp.rows["balance"], *([lp.rows["labour"]] if "labour" in lp.rows else [])]
    blocks, lo, up = [], [], []
    for b in keep:
        part = m[b.start:b.stop][:, :nx]
        blocks.append(sparse.hstack([part, sparse.csr_array((b.size, ncap + 1))]))
        lo.append(lp.row_lower[b.start:b.stop])
        up.append(lp.row_upper[b.start:b.stop])
    eye = sparse.eye_array(T * n)
    cap_rows = sparse.hstack([eye, sparse.csr_array((T * n, zb.size)),
                              -sparse.hstack([eye, sparse.csr_array((T * n, n))]),
                              sparse.csr_array((T * n, 1))])
    blocks.append(cap_rows)
    lo.append(np.full(T * n, -np.inf))
    up.append(np.zeros(T * n))
    shift_next = sparse.hstack([sparse.csr_array((T * n, n)), eye])
    shift_now = sparse.hstack([eye, sparse.csr_array((T * n, n))])
    state = sparse.hstack([sparse.csr_array((T * n, xb.size)), -eye,
                           shift_next - (1 - delta) * shift_now, sparse.csr_array((T * n, 1))])
    blocks.append(state)
    lo.append(np.zeros(T * n))
    up.append(np.zeros(T * n))
    term = sparse.hstack([sparse.csr_array((n, nx + T * n)), sparse.eye_array(n),
                          sparse.csr_array(-d.proportions[:, None])])
    blocks.append(term)
    lo.append(np.zeros(n))
    up.append(np.full(n, np.inf))
    a = sparse.csc_array(sparse.vstack(blocks))
    col_lo = np.zeros(ncol)
    col_up = np.full(ncol, np.inf)
    col_lo[nx:nx + n] = col_up[nx:nx + n] = d.base[0]
    col_lo[-1] = -np.inf
    cost = np.zeros(ncol)
    cost[-1] = 1.0
    return LinearProgram(matrix=a, row_lower=np.concatenate(lo), row_upper=np.concatenate(up),
                         col_lower=col_lo, col_upper=col_up, cost=cost, sense="max",
                         rows={"all": Block("all", 0, (a.shape[0],), (tuple(range(a.shape[0])),))},
                         cols={"all": Block("all", 0, (ncol,), (tuple(range(ncol)),))})


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="30x20,60x25")
    args = ap.parse_args()
    for size in args.sizes.split(","):
        n, years = map(int, size.split("x"))
        plan = make_plan(economy(n), years)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            lp = plan.compile()
        st = state_form(lp, 1 / 20.0)
        print(f"\n{n} sectors x {years} years: expression form {lp.nnz} nonzeros, "
              f"state form {st.nnz} nonzeros")
        for method in ("simplex", "ipm"):
            t0 = time.perf_counter()
            a = gp.HighsBackend(method).solve(lp)
            t1 = time.perf_counter()
            b = gp.HighsBackend(method).solve(st)
            t2 = time.perf_counter()
            print(f"  {method:>7}: expression {t1 - t0:.3f} s, state {t2 - t1:.3f} s, "
                  f"state / expression = {(t2 - t1) / (t1 - t0):.2f} "
                  f"(objectives {a.objective:.8g}, {b.objective:.8g})")


if __name__ == "__main__":
    main()
