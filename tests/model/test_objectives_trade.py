"""Foreign trade, combined objectives and the fastest horizon."""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import assert_optimal, one_sector
from helpers import two_sector
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp

YEARS = range(2030, 2040)


def trade_plan(inflow: float, *, exports: bool = True) -> gp.Plan:
    trade = gp.Trade(import_prices={"machinery": 1.0},
                     export_prices={"food": 0.8} if exports else {},
                     export_ceilings={"food": 30.0} if exports else {}, inflow=inflow)
    return gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=20),
                   trade=trade, terminal=gp.TerminalGrowth(rate=0.02))


class TestTrade:
    def test_no_inflow_no_exports_means_no_imports(self):
        r = assert_optimal(trade_plan(0.0, exports=False).solve())
        np.testing.assert_allclose(r.imports.to_numpy(), 0.0, atol=1e-9)

    def test_exports_pay_for_imports(self):
        r = assert_optimal(trade_plan(0.0).solve())
        spend = r.imports["machinery"] * 1.0 - r.exports["food"] * 0.8
        assert (spend <= 1e-7).all()
        assert (r.exports["food"] <= 30 + 1e-9).all()

    @settings(max_examples=10)
    @given(st.floats(0, 20), st.floats(0, 20))
    def test_more_inflow_never_lowers_the_objective(self, f1, df):
        a = trade_plan(f1).solve()
        b = trade_plan(f1 + df).solve()
        assert b.objective >= a.objective - 1e-7 * max(1, abs(a.objective))

    def test_shadow_exchange_rate(self):
        tight = assert_optimal(trade_plan(1.0).solve())
        assert (tight.shadow_exchange_rate > 0).any()
        # an inflow far larger than any use leaves the balance slack: zero rate
        big = trade_plan(1e6)
        plan = gp.Plan(**{**{k: getattr(big, k) for k in type(big).model_fields},
                          "trade": gp.Trade(import_prices={"machinery": 1.0},
                                            import_ceilings={"machinery": 5.0}, inflow=1e6)})
        slack = assert_optimal(plan.solve())
        np.testing.assert_allclose(slack.shadow_exchange_rate, 0.0, atol=1e-12)

    def test_bad_trade_names_the_field(self):
        with pytest.raises(gp.InvalidInput, match="trade.import_prices"):
            gp.Plan(economy=two_sector(), years=YEARS,
                    trade=gp.Trade(import_prices={"gold": 1.0}))
        with pytest.raises(gp.InvalidInput, match="trade.export_ceilings"):
            gp.Plan(economy=two_sector(), years=YEARS,
                    trade=gp.Trade(export_ceilings={"food": 1.0}))

    def test_least_foreign_exchange(self):
        plan = gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=20),
                       trade=gp.Trade(import_prices={"machinery": 1.0}, inflow=50),
                       targets=[gp.Target("machinery", year=2035, capacity_at_least=60)],
                       objective=gp.objectives.LeastForeignExchange())
        r = assert_optimal(plan.solve())
        assert r.objective == pytest.approx(float(r.imports["machinery"].sum()), rel=1e-9)


class TestCombined:
    def base(self, objective) -> gp.Plan:
        return gp.Plan(economy=two_sector(), years=YEARS,
                       consumption=gp.Consumption(floor=10),
                       labour=gp.LabourSupply(start=200), objective=objective)

    def test_weighted_is_between_its_parts(self):
        tc = gp.objectives.TerminalCapacity()
        dc = gp.objectives.DiscountedConsumption(rate=0.05)
        a = assert_optimal(self.base(tc).solve())
        b = assert_optimal(self.base(dc).solve())
        w = assert_optimal(self.base(gp.objectives.Weighted([(tc, 1.0), (dc, 1.0)])).solve())
        assert w.objective >= a.objective - 1e-7 and w.objective >= b.objective - 1e-7
        assert w.level <= a.level + 1e-7

    def test_lexicographic_holds_the_first_optimum(self):
        tc = gp.objectives.TerminalCapacity()
        ll = gp.objectives.LeastLabour()
        first = assert_optimal(self.base(tc).solve())
        lex = assert_optimal(self.base(gp.objectives.Lexicographic([tc, ll], tolerance=1e-6))
                             .solve())
        assert lex.level >= first.level * (1 - 1e-6) - 1e-6
        only_labour = assert_optimal(self.base(ll).solve())
        used = lex.labour[("labour", "used")].sum()
        assert used <= first.labour[("labour", "used")].sum() + 1e-6
        assert used >= only_labour.objective - 1e-6
        assert lex.objective == pytest.approx(used, rel=1e-9)
        assert lex.solver["options"]["held_optima"][0] == pytest.approx(first.objective)


class TestFastest:
    @pytest.mark.parametrize("target", [150.0, 400.0, 1000.0])
    def test_one_sector_closed_form(self, target):
        """Shortest horizon = ceil(log(target / C0) / log(1 + g)), g = (1 − a)/b − δ."""
        plan = gp.Plan(economy=one_sector(), years=range(2030, 2031),
                       targets=[gp.Target("goods", year=2031, capacity_at_least=target)],
                       objective=gp.objectives.Fastest(max_years=40))
        r = assert_optimal(plan.solve())
        expect = math.ceil(math.log(target / 100) / math.log(1.15))
        assert r.plan.horizon == expect
        assert r.horizons[expect] == "optimal"
        assert r.horizons.get(expect - 1, "infeasible") != "optimal"
        assert r.capacity.iloc[-1]["goods"] >= target - 1e-7

    def test_out_of_reach_reports_infeasible(self):
        plan = gp.Plan(economy=one_sector(), years=range(2030, 2031),
                       targets=[gp.Target("goods", year=2031, capacity_at_least=1e9)],
                       objective=gp.objectives.Fastest(max_years=10))
        r = plan.solve()
        assert r.status is gp.Status.INFEASIBLE and r.horizons == {10: "infeasible"}
        assert r.diagnosis is not None and not r.diagnosis.shortfalls.empty
