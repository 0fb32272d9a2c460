"""Benchmark: balanced growth of a 2,000-sector sparse economy.

Run: python tests/benchmarks/bench_balanced.py [--n 2000]

Prints the seconds of the sparse eigen-solver and of the damped power
iteration, their ratio, and the agreement of the two growth rates.
"""

from __future__ import annotations

import argparse
import time

import numpy as np
from scipy import sparse

import growthplan as gp


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=2000)
    ap.add_argument("--density", type=float, default=0.005)
    args = ap.parse_args()
    rng = np.random.default_rng(0)
    a = sparse.random_array((args.n, args.n), density=args.density, rng=rng).toarray()
    a += np.eye(args.n, k=1) * 0.01 + np.eye(args.n, k=1 - args.n) * 0.01  # irreducible
    a *= 0.8 / a.sum(axis=0).max()
    t0 = time.perf_counter()
    econ = gp.Economy(sectors=[f"s{i}" for i in range(args.n)], input_coefficients=a)
    t1 = time.perf_counter()
    eig = econ.balanced_growth()
    t2 = time.perf_counter()
    pw = econ.balanced_growth(method="power", tol=1e-10)
    t3 = time.perf_counter()
    print(f"{args.n} sectors, {np.count_nonzero(a)} nonzeros: validate {t1 - t0:.3f} s")
    print(f"  {eig.method}: {t2 - t1:.3f} s, rate {eig.rate:.10f}, residual {eig.residual:.2e}")
    print(f"  power: {t3 - t2:.3f} s, {pw.iterations} iterations, rate {pw.rate:.10f}")
    print(f"  power / eigen time = {(t3 - t2) / (t2 - t1):.2f}; "
          f"rate difference {abs(eig.rate - pw.rate):.2e}")


if __name__ == "__main__":
    main()
