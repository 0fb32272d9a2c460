"""The size estimate's memory and time figures: present, positive, growing with the plan.

The figures are fitted to measurements (tests/benchmarks/bench_scale.py --memory);
here only their shape is checked, never a time.
"""

from __future__ import annotations

import importlib

import pytest
from helpers import economy, make_plan

import growthplan as gp

# the module, not the function growthplan.lp.build that shadows it
lpb = importlib.import_module("growthplan.lp.build")


@pytest.fixture(scope="module")
def estimates():
    return [make_plan(economy(n), years).estimate_size()
            for n, years in [(4, 3), (6, 5), (10, 5), (10, 8)]]


def test_estimates_grow_with_the_plan(estimates):
    for small, large in zip(estimates, estimates[1:], strict=False):
        assert large["nonzeros"] > small["nonzeros"]
        assert large["peak_bytes"] > small["peak_bytes"]
        assert large["seconds"] > small["seconds"] > 0
        assert large["bytes"] > small["bytes"]


def test_peak_memory_counts_the_process_and_exceeds_the_build(estimates):
    for est in estimates:
        assert est["peak_bytes"] == lpb.peak_memory(int(est["nonzeros"]))
        assert est["peak_bytes"] > lpb.PROCESS_BYTES
        assert est["peak_bytes"] - lpb.PROCESS_BYTES > est["bytes"]  # the solve needs more


def test_the_formulas_are_monotone_in_nonzeros():
    sizes = [1, 10, 10**3, 10**5, 10**7]
    mem = [lpb.peak_memory(z) for z in sizes]
    sec = [lpb.solve_seconds(z) for z in sizes]
    assert mem == sorted(mem) and len(set(mem)) == len(mem)
    assert sec == sorted(sec) and len(set(sec)) == len(sec)
    assert lpb.solve_seconds(0) > 0


def test_the_refusal_states_the_peak_memory():
    plan = make_plan(economy(30), 20)
    est = plan.estimate_size()
    with pytest.raises(gp.InvalidInput) as err:
        plan.solve(size_limit=10_000)
    assert f"{est['peak_bytes'] / 2**30:.1f} GiB at peak" in str(err.value)
