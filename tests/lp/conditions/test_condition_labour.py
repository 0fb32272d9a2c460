"""The labour condition: labour used l·x_t at most the supply L_t, by kind. Elastic."""

from __future__ import annotations

import numpy as np
from conftest import one_sector
from helpers import check_family

import growthplan as gp

YEARS = range(2030, 2036)


def _plan(start: float = 60.0) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=YEARS,
                   labour=gp.LabourSupply(start=start, growth=0.01),
                   terminal=gp.TerminalGrowth(rate=0.02))


def _more_work(s, d):
    s.output *= 10.0  # ten times the output needs ten times the labour


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "labour", _more_work, "labour")
    block = out["block"]
    assert block.size == len(YEARS)  # one row a year for the one kind
    assert out["condition"].describe(block.label(0)) == "the labour supply in 2030"


def test_labour_used_is_coefficient_times_output():
    # labour used = labour coefficient × output (common practice); 0.5 in one_sector
    r = _plan().solve()
    used = r.labour[(r.labour.columns[0][0], "used")].to_numpy()
    np.testing.assert_allclose(used, 0.5 * r.output["goods"].to_numpy(), rtol=1e-9)
    available = r.labour[(r.labour.columns[0][0], "available")].to_numpy()
    np.testing.assert_allclose(available, 60.0 * 1.01 ** np.arange(len(YEARS)), rtol=1e-12)
    assert (used <= available * (1 + 1e-9)).all()
