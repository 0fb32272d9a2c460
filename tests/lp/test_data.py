"""The plan's arrays, lowered once: what the LP, the audit and the results are built from."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import one_sector
from helpers import switch_plan, two_sector

import growthplan as gp
from growthplan.lp.data import lower

YEARS = range(2030, 2036)


def _plan(**kw) -> gp.Plan:
    return gp.Plan(economy=two_sector(), years=YEARS,
                   labour=gp.LabourSupply(start=80, growth=0.02),
                   consumption=gp.Consumption(floor=20, max_fall=0.1), **kw)


def test_the_arrays_follow_the_plan():
    d = lower(_plan())
    assert (d.T, d.n, d.m) == (len(YEARS), 2, 2)
    assert d.years == list(YEARS) and d.names == ["food", "machinery"]
    np.testing.assert_array_equal(d.a, [[0.2, 0.1], [0.1, 0.2]])
    np.testing.assert_array_equal(d.b, [[0.0, 0.0], [1.5, 2.0]])
    # a supply growing 2 % a year: L_t = 80 · 1.02^t (compound growth)
    np.testing.assert_allclose(d.supply[0], 80 * 1.02 ** np.arange(len(YEARS)), rtol=1e-12)
    np.testing.assert_allclose(d.floor, 20.0)
    assert d.max_fall == pytest.approx(0.1)
    assert d.has_consumption and d.tech is None


def test_geometric_survival_is_one_minus_the_rate_to_the_age():
    # geometric retirement with mean life L: a share (1 − 1/L)^s survives s years
    # (common practice); food's life is 20 years in two_sector
    d = lower(_plan())
    np.testing.assert_allclose(d.geometric_rate[0], 1 / 20)
    ages = np.arange(d.surv.shape[1])
    np.testing.assert_allclose(d.surv[0], (1 - 1 / 20) ** ages, rtol=1e-12)


def test_initial_capacity_retires_along_its_profile():
    d = lower(gp.Plan(economy=one_sector(c0=100.0), years=YEARS))
    np.testing.assert_allclose(d.initial[:, 0], 100 * 0.95 ** np.arange(len(YEARS) + 1),
                               rtol=1e-12)


def test_products_and_uses_by_technique():
    d = lower(switch_plan())
    assert d.m == 2 and d.n == 1 and d.tech is not None
    x = np.array([[3.0, 4.0]] * d.T)
    np.testing.assert_allclose(d.by_sector(x), 7.0)      # a sector sums its techniques
    np.testing.assert_allclose(d.supplied(x), 7.0)       # no by-products
    np.testing.assert_allclose(d.intermediate(x), 0.5 * 7.0)
    # labour per unit: 1 for the base technique, 0.5 for the saving one
    np.testing.assert_allclose(d.labour_used(x)[:, 0], 3.0 * 1.0 + 4.0 * 0.5)


def test_the_plan_keeps_its_lowering():
    plan = _plan()
    assert plan.lowered() is plan.lowered()  # computed once per plan
