"""Terminal growth: starts in the last years enough to keep capacity growing at g. Elastic."""

from __future__ import annotations

from conftest import one_sector
from helpers import check_family

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS, terminal=gp.TerminalGrowth(rate=0.02),
                   objective=gp.objectives.TerminalCapacity())


def _no_late_starts(s, d):
    s.starts *= 0.0


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "terminal", _no_late_starts, "terminal")
    assert out["block"].size >= 1
    assert out["condition"].elastic
    assert "goods" in out["condition"].describe(out["block"].label(0))
