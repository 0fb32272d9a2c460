"""Retirement profiles, replacement rates and the perpetual inventory."""

from __future__ import annotations

import math
from decimal import ROUND_HALF_UP, Decimal

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import stats

from growthplan.model import capital as cap

# OECD, Measuring Capital, 2nd ed. (2009); the formulas are standard probability.


class TestContinuousLifetimes:
    def test_weibull_reference(self):
        d = cap.lifetime_distribution("weibull", 20, 2.0)
        assert d.kwds["scale"] == pytest.approx(22.567583, abs=1e-6)
        assert d.sf(20) == pytest.approx(math.exp(-math.pi / 4), abs=1e-9)
        assert d.sf(20) == pytest.approx(0.455938, abs=1e-6)
        assert d.median() == pytest.approx(18.788746, abs=1e-6)
        assert d.mean() == pytest.approx(20.0)

    def test_lognormal_reference(self):
        d = cap.lifetime_distribution("lognormal", 20, 0.5)
        assert math.log(d.kwds["scale"]) == pytest.approx(2.870732, abs=1e-6)
        assert d.median() == pytest.approx(17.649938, abs=1e-6)
        assert d.mean() == pytest.approx(20.0)

    def test_agrees_with_scipy_stats(self):
        w = stats.weibull_min(1.7, scale=10 / math.gamma(1 + 1 / 1.7))
        assert cap.lifetime_distribution("weibull", 10, 1.7).sf(7.3) == pytest.approx(w.sf(7.3))


class TestDiscreteProfiles:
    @pytest.mark.parametrize("profile", cap.PROFILES)
    @pytest.mark.parametrize("life", [1.0, 4.0, 12.5, 30.0])
    def test_mean_is_kept(self, profile, life):
        s = cap.survival(profile, life)
        assert s[0] == 1.0
        assert s.sum() == pytest.approx(life, rel=1e-9, abs=1e-9)
        assert np.all(np.diff(s) <= 1e-15)

    def test_sudden_exit(self):
        np.testing.assert_array_equal(cap.survival("sudden_exit", 3), [1, 1, 1])
        np.testing.assert_allclose(cap.survival("sudden_exit", 2.5), [1, 1, 0.5])

    def test_linear_whole_life_spreads_evenly(self):
        s = cap.survival("linear", 5)
        np.testing.assert_allclose(s, 1 - np.arange(9) / 9)  # W = 2L - 1, ages 0..8

    def test_geometric_rate_and_declining_balance(self):
        s = cap.survival("geometric", 10, declining_balance=2.0)
        assert s[1] == pytest.approx(0.8)
        assert s.sum() == pytest.approx(5.0)  # L / R

    @given(st.sampled_from(cap.PROFILES), st.floats(1.0, 60.0), st.floats(0.5, 2.0))
    def test_property_non_increasing_with_requested_mean(self, profile, life, shape):
        s = cap.survival(profile, life, shape=shape if profile in ("weibull", "lognormal")
                         else None)
        assert np.all(np.diff(s) <= 1e-12)
        assert s.sum() == pytest.approx(life, rel=1e-8)

    def test_bad_arguments(self):
        with pytest.raises(ValueError, match="mean_service_life"):
            cap.survival("geometric", 0.5)
        with pytest.raises(ValueError, match="retirement"):
            cap.survival("gamma", 10)
        with pytest.raises(ValueError, match="shape"):
            cap.survival("weibull", 10, shape=-1)


class TestGeometricRates:
    """Declining-balance rates delta = R / L (national accounts practice).

    Published rates are rounded half up to four decimals, hence abs=5e-5.
    From memory: R = 1.65 for machinery and equipment, 0.91 for structures
    (Fraumeni, 'The Measurement of Depreciation in the U.S. National Income
    and Product Accounts', Survey of Current Business, July 1997).
    """

    @pytest.mark.parametrize(("life", "r", "published"), [
        (10, 1.65, 0.1650), (15, 1.65, 0.1100), (40, 0.91, 0.0228), (30, 0.91, 0.0303)])
    def test_published(self, life, r, published):
        rate = cap.geometric_rate(life, r)
        rounded = Decimal(repr(rate)).quantize(Decimal("0.0001"), rounding=ROUND_HALF_UP)
        assert float(rounded) == published
        assert abs(rate - published) <= 5e-5 + 1e-15


class TestReplacement:
    @pytest.mark.parametrize("g", [0.0, 0.03, 0.1])
    def test_geometric_is_delta_for_every_g(self, g):
        assert cap.replacement_rate("geometric", 20, g) == pytest.approx(0.05)

    @pytest.mark.parametrize("profile", cap.PROFILES)
    def test_zero_growth_is_one_over_life(self, profile):
        assert cap.replacement_rate(profile, 12, 0.0) == pytest.approx(1 / 12, rel=1e-9)

    def test_faster_growth_younger_stock_retires_less(self):
        # sudden exit: a growing stock is younger, so it retires a smaller share
        assert cap.replacement_rate("sudden_exit", 10, 0.05) < 0.1


class TestPerpetualInventory:
    """Harberger's (1978) initial-stock method, from memory."""

    def test_steady_ratio_next_year_timing(self):
        g, delta = 0.05, 0.10
        inv = 100 * (1 + g) ** np.arange(600)
        k = cap.perpetual_inventory(inv, cap.survival("geometric", 1 / delta), lead_time=1)
        assert k[-1] / inv[-1] == pytest.approx(1 / (g + delta), rel=1e-9)
        assert k[-1] / inv[-1] == pytest.approx(6.6667, abs=1e-4)

    def test_steady_ratio_same_year_timing(self):
        g, delta = 0.05, 0.10
        inv = 100 * (1 + g) ** np.arange(600)
        k = cap.perpetual_inventory(inv, cap.survival("geometric", 1 / delta), lead_time=0)
        assert k[-1] / inv[-1] == pytest.approx(7.0, rel=1e-9)

    def test_sudden_exit_gross_stock(self):
        k = cap.perpetual_inventory(np.full(30, 100.0), cap.survival("sudden_exit", 10),
                                    lead_time=0)
        assert k[-1] == pytest.approx(1000.0)

    def test_geometric_recursion(self):
        rng = np.random.default_rng(3)
        inv = rng.uniform(0, 10, 40)
        k = cap.perpetual_inventory(inv, cap.survival("geometric", 8), lead_time=1)
        for t in range(1, 40):
            assert k[t] == pytest.approx(0.875 * k[t - 1] + inv[t - 1])


class TestInitialSurvival:
    def test_geometric_age_structure_is_irrelevant(self):
        s = cap.survival("geometric", 20)
        np.testing.assert_allclose(cap.initial_survival(s, 10, past_growth=0.07),
                                   0.95 ** np.arange(11))

    def test_history_sudden_exit(self):
        s = cap.survival("sudden_exit", 3)
        # vintages entering service in years -2, -1, 0 of 1, 2, 3 units
        r = cap.initial_survival(s, 4, history=[1, 2, 3])
        np.testing.assert_allclose(r * 6, [6, 5, 3, 0, 0])

    def test_steady_structure_sudden_exit(self):
        s = cap.survival("sudden_exit", 4)
        np.testing.assert_allclose(cap.initial_survival(s, 4, past_growth=0.0),
                                   [1, 0.75, 0.5, 0.25, 0])


class TestNonFiniteIntermediates:
    """Regression: extreme past growth, lives or histories never give NaN or inf."""

    def spec(self, **kw):
        import growthplan as gp

        return gp.CapitalSpec(initial_capacity=100.0, **kw)

    def test_weibull_with_fast_past_decline_is_refused_not_nan(self):
        # Before: R(t) = [nan, nan, ...] from 10**a overflowing in the age weights.
        with pytest.raises(ValueError, match=r"past_growth must .*Got -0\.9\."):
            self.spec(mean_service_life=60, retirement="weibull", past_growth=-0.9)

    def test_linear_thousand_years_fast_decline_is_finite(self):
        # Before: 2**1998 overflowed to inf and R(t) was NaN. The profile ends, so the sum
        # converges; scaled weights give the exact ratios. Closed form for the oldest-
        # dominated stock: each year the weight doubles with age, so the stock halves
        # every year as the oldest vintages leave (geometric series, ratio 1/2).
        r = self.spec(mean_service_life=1000, retirement="linear",
                      past_growth=-0.5).initial_survival(30)
        assert np.all(np.isfinite(r)) and r[0] == 1.0
        assert np.all(np.diff(r) <= 0)
        np.testing.assert_allclose(r[1:4] / r[:3], 0.5, rtol=1e-2)

    def test_lognormal_negative_past_growth_diverges_and_is_refused(self):
        # Before: accepted silently; the answer depended on where the profile was cut.
        # The lognormal tail falls slower than any geometric rate (S(a+1)/S(a) -> 1), so
        # Σ S(a)(1+g)^-a diverges for every g < 0 (ratio test).
        for g in (-0.3, -0.01):
            with pytest.raises(ValueError, match="past_growth must be >= 0"):
                self.spec(mean_service_life=20, retirement="lognormal", past_growth=g)
        assert self.spec(mean_service_life=20, retirement="lognormal",
                         past_growth=0.0).initial_survival(3)[0] == 1.0

    def test_weibull_shape_one_converges_only_above_tail_rate(self):
        # Shape 1 is geometric in the tail: S(a+1)/S(a) = exp(-1/λ); the sum converges
        # iff exp(-1/λ)/(1+g) < 1 (ratio test on a geometric series).
        tail = cap.tail_ratio("weibull", 10, shape=1.0)
        assert 0 < tail < 1
        with pytest.raises(ValueError, match="past_growth must be >"):
            cap.initial_survival(cap.survival("weibull", 10, shape=1.0), 5,
                                 past_growth=tail - 1 - 1e-3, tail=tail)
        r = cap.initial_survival(cap.survival("weibull", 10, shape=1.0), 5,
                                 past_growth=0.0, tail=tail)
        assert np.all(np.isfinite(r))

    def test_huge_history_is_refused_not_nan(self):
        # Before: the stock 1e308 + 1e308 overflowed and R(t) was NaN.
        with pytest.raises(ValueError, match=r"investment_history must .*finite"):
            self.spec(mean_service_life=10, retirement="sudden_exit",
                      investment_history=[1e308, 1e308])

    def test_survival_of_a_huge_history_is_scaled(self):
        # The shape of R does not depend on the units of the history: scaled sums.
        s = cap.survival("sudden_exit", 3)
        r = cap.initial_survival(s, 4, history=[1e308, 1e308, 1e308])
        np.testing.assert_allclose(r, [1, 2 / 3, 1 / 3, 0, 0])

    def test_perpetual_inventory_overflow_is_refused(self):
        with pytest.raises(ValueError, match="investment must keep"):
            cap.perpetual_inventory([1e308, 1e308, 1e308], cap.survival("sudden_exit", 5))

    def test_discounted_sum_never_nan(self):
        s = cap.survival("weibull", 60)
        start, _ = cap.starts_per_capacity(s, -0.999)
        assert np.isfinite(start)


class TestBounds:
    """Regression: sizes are bounded before arrays are allocated."""

    def test_huge_life_refused_before_allocating(self):
        import growthplan as gp

        # Before: a sudden-exit life of 1e7 allocated (1e7)² cells for the initial survival.
        for profile in ("sudden_exit", "linear", "weibull", "lognormal"):
            with pytest.raises(ValueError, match="at most 1000 years"):
                gp.CapitalSpec(initial_capacity=1, mean_service_life=1e7, retirement=profile)
            with pytest.raises(ValueError, match="at most 1000 years"):
                cap.survival(profile, 1e7)

    def test_geometric_long_life_is_kept_bounded(self):
        # The geometric profile is memoryless and closed-form: any life, bounded arrays.
        assert cap.survival("geometric", 1e7).size <= cap.MAX_AGE + 1

    def test_max_age_and_lead_time_bounded(self):
        import growthplan as gp

        with pytest.raises(ValueError, match="max_age"):
            cap.survival("geometric", 10, max_age=10**9)
        with pytest.raises(ValueError, match="lead_time must be at most 100"):
            gp.CapitalSpec(initial_capacity=1, mean_service_life=10, lead_time=10**9)
        with pytest.raises(ValueError, match="horizon"):
            cap.initial_survival(cap.survival("linear", 5), 10**9)

    def test_thousand_year_profiles_stay_small(self):
        # At the bound every profile fits in memory and keeps its mean (module docstring).
        for profile in ("sudden_exit", "linear", "weibull", "lognormal"):
            s = cap.survival(profile, 1000)
            assert s.sum() == pytest.approx(1000, rel=1e-6)
            assert s.size < 200_000
