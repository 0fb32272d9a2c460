"""The terminal level: capacity after the plan at least λ times the proportions bundle."""

from __future__ import annotations

import pytest
from conftest import one_sector
from helpers import check_family

import growthplan as gp


def _plan(years: int = 5) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=range(2030, 2030 + years),
                   objective=gp.objectives.TerminalCapacity())


def _higher_level(s, d):
    s.level *= 2.0


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "terminal_level", _higher_level, "terminal level")
    assert out["block"].size == 1


def test_the_level_is_the_harrod_domar_capacity():
    # one sector, a = 0.6, b = 2, 20-year geometric life: λ = 100 · 1.15^T
    # (Harrod–Domar growth (1 − a)/b − δ, from memory)
    r = _plan(5).solve()
    assert r.level == pytest.approx(100 * 1.15 ** 5, rel=1e-9)
