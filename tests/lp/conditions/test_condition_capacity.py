"""Capacity: output at most the capacity in service, C_t = C0 R(t) + Σ S(t−τ−θ) z_τ."""

from __future__ import annotations

import numpy as np
from conftest import one_sector
from helpers import check_family

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, terminal=gp.TerminalGrowth(rate=0.02))


def _over_capacity(s, d):
    s.output *= 2.0


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "capacity", _over_capacity, "capacity")
    assert out["block"].size == len(YEARS)
    assert out["condition"].describe(out["block"].label(0)) == "the capacity of goods in 2030"


def test_one_sector_grows_at_the_harrod_domar_rate():
    # a = 0.6, b = 2, geometric retirement at 1/20: capacity grows at
    # (1 − a)/b − δ = 0.15 a year (Harrod–Domar, from memory)
    r = _plan().solve()
    np.testing.assert_allclose(r.capacity["goods"].to_numpy(),
                               100 * 1.15 ** np.arange(len(YEARS) + 1), rtol=1e-7)
    np.testing.assert_allclose(r.utilisation.to_numpy(), 1.0, rtol=1e-9)
