"""The commodity balance: supply x_t + m_t − e_t at least every use of each commodity."""

from __future__ import annotations

import numpy as np
from helpers import check_family, two_sector

import growthplan as gp

YEARS = range(2030, 2036)


def _plan() -> gp.Plan:
    return gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=20),
                   labour=gp.LabourSupply(start=80, growth=0.01),
                   terminal=gp.TerminalGrowth(rate=0.02))


def _less_output(s, d):
    s.output *= 0.1  # a tenth of the output cannot cover consumption and investment


def test_rows_count_audit_elastic_and_words():
    out = check_family(_plan(), "balance", _less_output, "balance")
    assert out["block"].size == len(YEARS) * 2  # a row per year and commodity
    assert not out["condition"].elastic  # a balance is never relaxed: it is accounting


def test_supply_covers_use_at_the_optimum():
    # x ≥ A x + deliveries + h κ (the Leontief balance with investment, common practice)
    r = _plan().solve()
    econ = two_sector()
    x = r.output.to_numpy()
    use = x @ np.asarray(econ.input_coefficients).T + r.capital_deliveries.to_numpy() \
        + r.consumption[["food", "machinery"]].to_numpy()
    np.testing.assert_allclose(x - use, r.surplus.to_numpy(), atol=1e-7)
    assert (r.surplus.to_numpy() >= -1e-7).all()
