"""First-year output: each sector's first plan year within a share of its base-year output."""

from __future__ import annotations

import numpy as np
from helpers import check_family

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                      capital_coefficients=[[2.0]], labour_coefficients=[[0.5]],
                      base_output=[90.0],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=20)})
    return gp.Plan(economy=econ, years=YEARS, first_year_within=0.1,
                   terminal=gp.TerminalGrowth(rate=0.02))


def _collapse(s, d):
    s.output[0] *= 0.1


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "first_year", _collapse, "first-year output")
    assert out["block"].size == 1
    assert out["condition"].elastic


def test_first_year_output_stays_within_ten_per_cent():
    r = _plan().solve()
    x0 = float(r.output["goods"].iloc[0])
    assert x0 >= 0.9 * 90.0 - 1e-9
    assert np.isfinite(r.calibration["change"]).all()
