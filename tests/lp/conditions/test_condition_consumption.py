"""Consumption: a floor on the level κ_t and a limit on its fall κ_{t+1} ≥ (1 − f) κ_t."""

from __future__ import annotations

import numpy as np
from helpers import check_family, two_sector

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=two_sector(), years=YEARS,
                   consumption=gp.Consumption(floor=20, max_fall=0.0),
                   labour=gp.LabourSupply(start=80, growth=0.01),
                   terminal=gp.TerminalGrowth(rate=0.02))


def _below_the_floor(s, d):
    s.consumption *= 0.0


def _falling(s, d):
    s.consumption[1:] = s.consumption[0] * 0.5


def test_floor_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "consumption_floor", _below_the_floor, "consumption floor")
    assert out["block"].size == len(YEARS)
    assert out["condition"].elastic


def test_fall_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "consumption_fall", _falling, "consumption fall")
    assert out["block"].size == len(YEARS) - 1  # between consecutive years


def test_the_level_never_falls_and_meets_the_floor():
    r = _plan().solve()
    level = r.consumption["level"].to_numpy()
    assert (level >= 20 - 1e-9).all()
    assert (np.diff(level) >= -1e-9 * level[:-1]).all()
