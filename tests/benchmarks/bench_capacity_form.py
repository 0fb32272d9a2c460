"""Benchmark: capacity as an expression in past starts vs as state variables.

Run: python tests/benchmarks/bench_capacity_form.py [--sizes 30x20,60x25]
     [--methods simplex,ipm] [--rounds 1]

For geometric retirement and one-year lead times capacity can also be a
state variable, ``C_{t+1} = (1 − δ) C_t + z_t``. This script builds that
state form from the same plan (same balance and labour rows) and prints
HiGHS's run time of both forms (``passModel`` excluded), their ratio and
both objectives, which must agree to 1e-6 relative, and the process CPU
time of each solve (less disturbed by other work than the wall clock). With ``--rounds`` the
two forms are solved in turn, the state form first on every other round, so
that load from other work on the machine falls on both alike.
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


def _solve(lp, method: str) -> tuple[float, float, float, str]:
    """HiGHS run time (passModel and the certificate excluded), CPU time, objective, status.

    The process CPU time of the whole solve (all threads) is far less
    disturbed than the wall clock when other work shares the machine.
    """
    c0 = time.process_time()
    out = gp.HighsBackend(method, scale=False).solve(lp)
    return out.seconds, time.process_time() - c0, float(out.objective), out.status.value


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", default="30x20,60x25")
    ap.add_argument("--methods", default="simplex,ipm",
                    help="HiGHS methods (ipm: interior point without crossover)")
    ap.add_argument("--rounds", type=int, default=1,
                    help="interleaved rounds; odd rounds solve the state form first")
    args = ap.parse_args()
    worst = 0.0
    for size in args.sizes.split(","):
        n, years = map(int, size.split("x"))
        plan = make_plan(economy(n), years)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            lp = plan.compile()
        st = state_form(lp, 1 / 20.0)
        print(f"\n{n} sectors x {years} years: expression form {lp.shape[0]:,} rows, "
              f"{lp.shape[1]:,} columns, {lp.nnz:,} nonzeros; state form {st.shape[0]:,} rows, "
              f"{st.shape[1]:,} columns, {st.nnz:,} nonzeros", flush=True)
        for method in args.methods.split(","):
            ratios, cpu_ratios = [], []
            for k in range(args.rounds):
                order = [("expression", lp), ("state", st)]
                if k % 2:  # interleave: the state form first on odd rounds
                    order.reverse()
                got = {name: _solve(prog, method) for name, prog in order}
                (te, ce, fe, se), (ts, cs, fs, ss) = got["expression"], got["state"]
                rel = abs(fe - fs) / max(1.0, abs(fe))
                worst = max(worst, rel)
                ratios.append(ts / te)
                cpu_ratios.append(cs / ce)
                print(f"  {method:>7} round {k + 1}: expression {te:8.3f} s ({se}), "
                      f"state {ts:8.3f} s ({ss}), state / expression = {ts / te:.2f} "
                      f"(CPU {ce:.2f} s, {cs:.2f} s: {cs / ce:.2f}); objectives {fe:.10g}, "
                      f"{fs:.10g} (relative difference {rel:.1e})", flush=True)
            print(f"  {method:>7}: state / expression {min(ratios):.2f}-{max(ratios):.2f} "
                  f"wall clock, {min(cpu_ratios):.2f}-{max(cpu_ratios):.2f} CPU time, over "
                  f"{len(ratios)} rounds", flush=True)
    print(f"\nlargest relative difference of the objectives: {worst:.1e} "
          f"({'within' if worst <= 1e-6 else 'NOT within'} 1e-6)")


if __name__ == "__main__":
    main()
