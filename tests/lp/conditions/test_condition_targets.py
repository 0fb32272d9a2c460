"""Targets: at least a given output, capacity or consumption in a named year. Elastic."""

from __future__ import annotations

import pytest
from conftest import one_sector
from helpers import check_family

import growthplan as gp

YEARS = range(2030, 2036)


def _plan(need: float = 120.0) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, terminal=gp.TerminalGrowth(rate=0.02),
                   targets=[gp.Target("goods", year=2033, output_at_least=need),
                            gp.Target("goods", year=2036, capacity_at_least=need)])


def _short(s, d):
    s.output *= 0.01


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "targets", _short, "target")
    assert out["block"].size == 2
    words = out["condition"].describe(out["block"].label(0))
    assert "2033" in words and "goods" in words


def test_a_target_beyond_reach_is_diagnosed_by_its_shortfall():
    # capacity can grow at most 15 % a year from 100 (Harrod–Domar, from memory), so
    # output of 1e4 in 2033 falls short by 1e4 − 100 · 1.15³
    r = _plan(1e4).solve()
    assert not r.ok
    short = r.diagnosis.shortfalls.set_index(["condition", "year"])
    got = short.loc[("output target", 2033), "shortfall"]
    assert float(got) == pytest.approx(1e4 - 100 * 1.15 ** 3, rel=1e-6)
