"""Foreign trade: imports paid for by exports and the inflow (elastic); trade ceilings."""

from __future__ import annotations

import numpy as np
from helpers import check_family, two_sector

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=20),
                   trade=gp.Trade(import_prices={"machinery": 1.0}, export_prices={"food": 0.8},
                                  export_ceilings={"food": 30.0}, inflow=5.0),
                   terminal=gp.TerminalGrowth(rate=0.02))


def _overspent(s, d):
    s.imports += 1000.0


def _over_the_ceiling(s, d):
    s.exports += 1000.0


def test_foreign_exchange_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "foreign_exchange", _overspent, "foreign exchange")
    assert out["block"].size == len(YEARS)
    assert out["condition"].elastic


def test_trade_bounds_are_column_bounds_audited_from_the_schedules():
    out = check_family(_plan(), "trade_bounds", _over_the_ceiling, "export ceiling")
    assert out["block"] is None  # bounds on the columns, no rows


def test_imports_are_paid_for():
    # p^m m_t − p^e e_t ≤ F_t (the foreign-exchange constraint, common practice)
    r = _plan().solve()
    spend = 1.0 * r.imports["machinery"].to_numpy() - 0.8 * r.exports["food"].to_numpy()
    assert (spend <= 5.0 + 1e-7).all()
    assert (r.exports["food"].to_numpy() <= 30.0 + 1e-9).all()
    assert np.isfinite(r.shadow_exchange_rate.to_numpy()).all()
