"""The multi-year plan: closed forms, duality, an independent solver, turnpike, audit."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pulp
import pytest
from conftest import assert_optimal, one_sector
from helpers import random_plan
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import linprog

import growthplan as gp
from growthplan.backends.pulp import cbc_solver, to_pulp
from growthplan.lp.conditions import Schedules
from growthplan.results.audit import audit

YEARS = range(2030, 2040)


class TestClosedForms:
    def test_terminal_capacity_grows_at_harrod_domar_rate(self):
        """One sector, geometric retirement: C_T = C_0 (1 + (1 − a)/b − δ)^T (Harrod–Domar)."""
        plan = gp.Plan(economy=one_sector(), years=YEARS)
        r = assert_optimal(plan.solve())
        assert r.objective == pytest.approx(100 * 1.15 ** 10, rel=1e-9)
        np.testing.assert_allclose(r.capacity["goods"], 100 * 1.15 ** np.arange(11), rtol=1e-9)
        np.testing.assert_allclose(r.utilisation["goods"], 1.0)

    @pytest.mark.parametrize("method", ["simplex", "ipm", "ipm-crossover"])
    def test_accumulation_reference(self, method):
        """Maximise K_T with K_{t+1} = K_t + K_t/v − C_t, C_t ≥ (1 − s) K_t / v.

        K_0 = 100, v = 3, s = 0.12, T = 5 gives K_T = 121.665290 and a shadow price of
        K_0 of 1.04^5 = 1.216653 (derived from Harrod–Domar and LP duality). Here the
        consumption share is an input coefficient a = 1 − s and capacity is K / v.
        """
        econ = gp.Economy(sectors=["k"], input_coefficients=[[0.88]],
                          capital_coefficients=[[3.0]],
                          capital={"k": gp.CapitalSpec(initial_capacity=100 / 3,
                                                       mean_service_life=1e6,
                                                       declining_balance=1e-9)})
        plan = gp.Plan(economy=econ, years=range(5))
        r = assert_optimal(plan.solve(method=method))
        assert 3 * r.objective == pytest.approx(121.665290, abs=1e-5)
        # shadow price of initial capital from the duals: one more unit of C0 raises the
        # bound of every capacity row by R(t) = 1 and lowers the objective row's bound
        # (−C0 R(T)) by 1; K_T / K_0 = C_T / C_0, so the price is the same in K units
        lp, out = r.lp, r.outcome
        cap = lp.rows["capacity"]
        level = lp.rows["terminal_level"]
        d_c0 = out.row_dual[cap.start:cap.stop].sum() - out.row_dual[level.start]
        assert d_c0 == pytest.approx(1.216653, abs=1e-5)
        bumped = gp.Plan(economy=gp.Economy.model_validate(
            {**econ.model_dump(), "capital": {"k": {**econ.capital["k"].model_dump(),
                                                    "initial_capacity": 100 / 3 + 1}}}),
            years=range(5)).solve()
        assert bumped.objective - r.objective == pytest.approx(1.04 ** 5, abs=1e-6)

    def test_shadow_prices_fall_at_the_growth_rate(self):
        r = assert_optimal(gp.Plan(economy=one_sector(), years=YEARS).solve())
        p = r.shadow_prices["goods"].to_numpy()
        np.testing.assert_allclose(p[:-1] / p[1:], 1.15, rtol=1e-8)
        cur = r.shadow_prices_current["goods"].to_numpy()
        np.testing.assert_allclose(cur, cur[0], rtol=1e-8)

    def test_least_labour_closed_form(self):
        # Exogenous demand f = 10 each year, plenty of capacity: x = f / (1 − a)
        econ = one_sector(a=0.6, c0=100)
        plan = gp.Plan(economy=econ, years=YEARS, final_demand={"goods": 10.0},
                       objective=gp.objectives.LeastLabour())
        r = assert_optimal(plan.solve())
        np.testing.assert_allclose(r.output["goods"], 25.0)
        assert r.objective == pytest.approx(0.5 * 25 * 10)

    def test_discounted_consumption(self):
        econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                          capital_coefficients=[[2.0]], consumption_basket=[1.0],
                          capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                           mean_service_life=20)})
        plan = gp.Plan(economy=econ, years=YEARS, consumption=gp.Consumption(floor=5.0),
                       objective=gp.objectives.DiscountedConsumption(rate=0.05),
                       terminal=gp.TerminalGrowth(rate=0.02))
        r = assert_optimal(plan.solve())
        k = r.consumption["level"].to_numpy()
        assert (k >= 5 - 1e-9).all()
        assert r.objective == pytest.approx(np.sum(k * 1.05 ** -np.arange(10)), rel=1e-9)
        # current-year prices undo the discounting
        np.testing.assert_allclose(r.shadow_prices_current["goods"],
                                   r.shadow_prices["goods"] * 1.05 ** np.arange(10))


class TestConditions:
    def test_targets_ceilings_labour_are_kept(self):
        econ = one_sector()
        plan = gp.Plan(economy=econ, years=YEARS,
                       labour=gp.LabourSupply(start=60, growth=0.02),
                       targets=[gp.Target("goods", year=2035, output_at_least=120)],
                       starts_ceilings=[gp.StartsCeiling("goods", at_most=20)])
        r = assert_optimal(plan.solve())
        assert (r.starts["goods"] <= 20 + 1e-9).all()
        lab = r.labour[("labour", "used")]
        np.testing.assert_allclose(r.labour[("labour", "available")], 60 * 1.02 ** np.arange(10))
        assert (lab <= r.labour[("labour", "available")] + 1e-9).all()
        assert r.output.loc[2035, "goods"] >= 120 - 1e-9

    def test_infeasible_target_is_a_status(self):
        plan = gp.Plan(economy=one_sector(), years=YEARS,
                       targets=[gp.Target("goods", year=2033, capacity_at_least=1e5)])
        r = plan.solve()
        assert r.status is gp.Status.INFEASIBLE and not r.ok
        with pytest.raises(gp.PlanNotOptimal):
            _ = r.output
        with pytest.raises(gp.PlanInfeasible):
            r.raise_for_status()

    def test_lead_time_and_spending_profile(self):
        econ = one_sector(lead_time=2, spending_profile=[0.3, 0.7])
        plan = gp.Plan(economy=econ, years=YEARS, under_construction={"goods": [4.0, 6.0]},
                       terminal=gp.TerminalGrowth(rate=0.03))
        r = assert_optimal(plan.solve())
        z = r.starts["goods"].to_numpy()
        cap = r.capacity["goods"].to_numpy()
        # starts of year t serve from t + 2; pipeline of years -2, -1 serve from 0 and 1
        assert cap[1] == pytest.approx(0.95 * cap[0] + 6.0)
        assert cap[2] == pytest.approx(0.95 * cap[1] + z[0])
        deliv = r.capital_deliveries["goods"].to_numpy()
        assert deliv[0] == pytest.approx(2.0 * (0.3 * z[0] + 0.7 * 6.0))
        assert deliv[1] == pytest.approx(2.0 * (0.3 * z[1] + 0.7 * z[0]))
        # terminal growth: the final window's starts keep capacity growing at 3 %
        psi = (1.03 ** 2) / (1.03 / (0.03 + 0.05))
        assert z[-1] >= psi * cap[9] - 1e-7 and z[-2] >= psi * cap[8] - 1e-7

    def test_consumption_floor_and_fall(self):
        econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                          capital_coefficients=[[2.0]], consumption_basket=[1.0],
                          capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                           mean_service_life=20)})
        plan = gp.Plan(economy=econ, years=YEARS,
                       consumption=gp.Consumption(floor=10.0, floor_growth=0.01, max_fall=0.0),
                       objective=gp.objectives.DiscountedConsumption(rate=0.1))
        r = assert_optimal(plan.solve())
        k = r.consumption["level"].to_numpy()
        assert (np.diff(k) >= -1e-9).all()
        assert (k >= 10 * 1.01 ** np.arange(10) - 1e-9).all()

    def test_bad_plans_name_the_field(self):
        econ = one_sector()
        cases = [
            (dict(years=[]), "years"),
            (dict(years=[2030, 2032]), "years"),
            (dict(years=YEARS, targets=[gp.Target("nope", year=2031, output_at_least=1)]),
             "targets.0.sector"),
            (dict(years=YEARS, targets=[gp.Target("goods", year=2029, output_at_least=1)]),
             "targets.0.year"),
            (dict(years=YEARS, final_demand={"goods": [1.0, 2.0]}), "final_demand"),
            (dict(years=YEARS, labour=gp.LabourSupply(start=1, kind="robots")), "labour.0"),
            (dict(years=YEARS, objective=gp.objectives.DiscountedConsumption(rate=0.1)),
             "consumption"),
        ]
        for kwargs, field in cases:
            with pytest.raises(gp.InvalidInput) as err:
                gp.Plan(economy=econ, **kwargs)
            assert field in str(err.value), (field, str(err.value))

    def test_plan_inputs_unchanged(self):
        fd = {"goods": [1.0] * 10}
        gp.Plan(economy=one_sector(), years=YEARS, final_demand=fd).solve()
        assert fd == {"goods": [1.0] * 10}


_plan = random_plan


class TestDuality:
    @settings(max_examples=15)
    @given(st.integers(0, 10_000), st.integers(2, 5), st.integers(3, 8),
           st.sampled_from(["geometric", "sudden_exit", "weibull"]), st.integers(0, 2))
    def test_strong_duality_and_complementary_slackness(self, seed, n, T, profile, lead):
        plan, _ = _plan(seed, n, T, profile, lead)
        r = plan.solve(method="simplex")
        if r.status is gp.Status.INFEASIBLE:
            return
        assert_optimal(r)
        lp, out = r.lp, r.outcome
        y, rc, x = out.row_dual, out.col_dual, out.x
        m = lp.matrix
        # dual constraints: c − Aᵀy = reduced costs
        np.testing.assert_allclose(lp.cost - m.T @ y, rc, atol=1e-7)
        # strong duality: objective = Σ rhs·y + Σ bounds·rc
        rhs = np.where(lp.row_sign > 0, lp.row_upper, lp.row_lower)
        bound = np.where(np.abs(rc) > 1e-12,
                         np.where(np.isfinite(lp.col_upper) & (x > lp.col_lower + 1e-9),
                                  lp.col_upper, lp.col_lower), 0.0)
        dual_obj = float(rhs @ y + np.nansum(np.where(np.isfinite(bound), bound, 0.0) * rc))
        assert dual_obj == pytest.approx(r.objective, rel=1e-7, abs=1e-7)
        # complementary slackness: a priced row is binding
        slack = np.where(lp.row_sign > 0, lp.row_upper - m @ x, m @ x - lp.row_lower)
        assert np.max(np.abs(y * slack)) < 1e-6 * max(1.0, abs(r.objective))
        # the reported values are non-negative (maximisation)
        assert (r.shadow_prices.to_numpy() >= -1e-9).all()
        assert (r.quasi_rents.to_numpy() >= -1e-9).all()


class TestIndependentSolvers:
    @settings(max_examples=8)
    @given(st.integers(0, 10_000), st.integers(2, 4), st.integers(3, 6))
    def test_cbc_through_pulp_agrees(self, seed, n, T):
        """The same LP solved by PuLP's bundled CBC gives the same objective."""
        plan, _ = _plan(seed, n, T)
        r = plan.solve()
        prob, _ = to_pulp(plan.compile())
        prob.solve(cbc_solver())
        if r.status is gp.Status.INFEASIBLE:
            assert prob.sol_status != pulp.LpSolutionOptimal
            return
        assert prob.sol_status == pulp.LpSolutionOptimal
        assert pulp.value(prob.objective) == pytest.approx(r.objective, rel=1e-6, abs=1e-6)

    def test_scipy_linprog_agrees(self):
        plan, _ = _plan(7, 4, 6)
        r = assert_optimal(plan.solve())
        lp = plan.compile()
        m = lp.matrix.tocsr()
        le = lp.row_sign > 0
        a_ub = np.vstack([m[le].toarray(), -m[~le].toarray()])
        b_ub = np.concatenate([lp.row_upper[le], -lp.row_lower[~le]])
        bounds = list(zip(lp.col_lower, np.where(np.isfinite(lp.col_upper), lp.col_upper,
                                                 None), strict=True))
        bounds = [(None if not np.isfinite(lo) else lo, up) for lo, up in bounds]
        res = linprog(-lp.cost, A_ub=a_ub, b_ub=b_ub, bounds=bounds, method="highs")
        assert -res.fun == pytest.approx(r.objective, rel=1e-8)


class TestTurnpike:
    def test_middle_years_near_balanced_ray(self):
        """Turnpike: with terminal proportions on the balanced ray, a long plan's middle
        years lie close to the ray (Dorfman, Samuelson & Solow, 1958, ch. 12; the
        property, not a number). Tolerance: 1 degree between capacity vectors and the ray in
        years 12-28, where the first year's capacity is off by more than 30 degrees; a
        degree is far above solver noise and far below the initial distance."""
        econ = gp.Economy(sectors=["s0", "s1", "s2"],
                          input_coefficients=[[0.1, 0.2, 0.1], [0.2, 0.1, 0.2], [0.1, 0.1, 0.1]],
                          capital_coefficients=[[0.8, 0.6, 1.0], [0.2, 0.5, 0.3],
                                                [0.1, 0.1, 0.2]],
                          capital={s: gp.CapitalSpec(initial_capacity=c, mean_service_life=20)
                                   for s, c in zip(("s0", "s1", "s2"), (10.0, 100.0, 30.0),
                                                   strict=True)})
        ray = econ.dynamic_balanced_growth().proportions.to_numpy()
        r = assert_optimal(gp.Plan(economy=econ, years=range(2030, 2070)).solve())
        out = r.capacity.to_numpy()

        def angle(v):
            c = v @ ray / (np.linalg.norm(v) * np.linalg.norm(ray))
            return np.degrees(np.arccos(np.clip(c, -1, 1)))

        assert angle(out[0]) > 30
        middle = [angle(out[t]) for t in range(12, 28)]
        assert max(middle) < 1.0, middle


class TestAudit:
    def _solved(self):
        return assert_optimal(gp.Plan(economy=one_sector(), years=YEARS,
                                      labour=gp.LabourSupply(start=200)).solve())

    def _audit(self, r, output=None, starts=None, capacity=None):
        sched = Schedules(
            output=(r.output if output is None else output).to_numpy(),
            starts=(r.starts if starts is None else starts).to_numpy(), consumption=None,
            level=r.level, imports=None, exports=None,
            capacity=(r.capacity if capacity is None else capacity).to_numpy(),
            deliveries=r.capital_deliveries.to_numpy())
        return audit(r.data, sched)

    def test_clean_result_passes(self):
        r = self._solved()
        assert self._audit(r).ok

    def test_corrupted_output_is_caught(self):
        r = self._solved()
        bad = r.output.copy()
        bad.iloc[3, 0] *= 1.01
        a = self._audit(r, output=bad)
        assert not a.ok and "2033" in a.worst

    def test_corrupted_starts_are_caught(self):
        r = self._solved()
        bad = r.starts.copy()
        bad.iloc[2, 0] += 1.0
        assert not self._audit(r, starts=bad).ok

    def test_corrupted_capacity_is_caught(self):
        r = self._solved()
        bad = r.capacity.copy()
        bad.iloc[5, 0] += 0.5
        a = self._audit(r, capacity=bad)
        assert not a.ok and a.worst.startswith("capacity in service 2035")


class TestSolverOutcomes:
    def test_iteration_limit_is_not_a_plan(self):
        plan, _ = _plan(3, 5, 8)
        r = plan.solve(method="simplex", options={"simplex_iteration_limit": 1})
        assert r.status is gp.Status.ITERATION_LIMIT and not r.ok
        with pytest.raises(gp.PlanNotOptimal):
            _ = r.shadow_prices
        with pytest.raises(gp.SolverFailure):
            r.raise_for_status()

    def test_time_limit_is_not_a_plan(self):

        from helpers import economy, make_plan

        r = make_plan(economy(30), 20).solve(method="simplex", time_limit=0.01)
        assert r.status is gp.Status.TIME_LIMIT and r.message == "Time limit reached"
        assert not r.ok
        with pytest.raises(gp.PlanNotOptimal, match="time_limit"):
            _ = r.output

    def test_bad_option_is_an_error(self):
        plan = gp.Plan(economy=one_sector(), years=YEARS)
        with pytest.raises(gp.InvalidInput, match="options.no_such_option"):
            plan.solve(options={"no_such_option": 1})
        with pytest.raises(gp.InvalidInput, match="method"):
            plan.solve(method="magic")

    def test_methods_agree(self):
        plan, _ = _plan(11, 4, 6)
        objs = [plan.solve(method=m).objective for m in ("simplex", "ipm", "ipm-crossover")]
        assert objs[1] == pytest.approx(objs[0], rel=1e-6)
        assert objs[2] == pytest.approx(objs[0], rel=1e-8)

    def test_result_records_versions_and_timings(self):
        r = gp.Plan(economy=one_sector(), years=YEARS).solve()
        assert set(r.timings) == {"validate", "compile", "transfer", "solve", "post_process",
                                  "audit"}
        assert r.timings["transfer"] == r.solver["options"]["transfer_seconds"] >= 0
        assert r.solver["versions"]["pulp"] == pulp.__version__
        assert r.solver["method"] in ("simplex", "ipm")


class TestResultTables:
    def test_frames_summary_bottlenecks_exports(self, tmp_path):
        plan, _ = _plan(5, 3, 5)
        r = assert_optimal(plan.solve())
        assert list(r.output.index) == list(range(2030, 2035))
        assert list(r.capacity.index) == list(range(2030, 2036))
        tidy = r.tidy()
        assert {"year", "sector", "quantity", "value"} == set(tidy.columns)
        text = str(r.summary())
        assert "optimal" in text and "professional judgement" in text
        assert "<table>" in r.summary()._repr_html_()
        b = r.bottlenecks()
        assert (b.groupby("year")["value"].apply(lambda s: s.is_monotonic_decreasing)).all()
        folder = r.to_csv(tmp_path / "out")
        assert (folder / "output.csv").exists()
        back = pd.read_csv(folder / "output.csv", index_col=0)
        np.testing.assert_allclose(back.to_numpy(), r.output.to_numpy())
        with pytest.raises(gp.InvalidInput, match="overwrite"):
            r.to_csv(tmp_path / "out")
        book = r.to_excel(tmp_path / "plan.xlsx")
        sheets = pd.read_excel(book, sheet_name=None, index_col=0)
        assert "shadow_prices" in sheets and "output" in sheets
        with pytest.raises(gp.InvalidInput, match="overwrite"):
            r.to_excel(book)

    def test_retirements_geometric(self):
        r = assert_optimal(gp.Plan(economy=one_sector(), years=YEARS).solve())
        np.testing.assert_allclose(r.retirements["goods"], 0.05 * r.capacity["goods"][:-1])

    def test_end_effects_warning(self):
        import warnings

        with warnings.catch_warnings(record=True) as w:
            warnings.simplefilter("always")
            r = gp.Plan(economy=one_sector(), years=YEARS).solve()
        assert any(issubclass(x.category, gp.EndEffectsWarning) for x in w)
        assert any("end effects" in n for n in r.warnings)


@pytest.mark.slow
@settings(max_examples=150)
@given(st.integers(0, 10**6), st.integers(2, 12), st.integers(3, 20),
       st.sampled_from(["geometric", "sudden_exit", "weibull", "linear", "lognormal"]),
       st.integers(0, 3))
def test_slow_sweep_cbc_agrees_on_larger_plans(seed, n, T, profile, lead):
    """A longer sweep of the CBC cross-check over every retirement profile."""
    plan, _ = _plan(seed, n, T, profile, lead)
    r = plan.solve()
    prob, _ = to_pulp(plan.compile())
    prob.solve(cbc_solver())
    if r.status is gp.Status.OPTIMAL:
        assert_optimal(r)
        assert pulp.value(prob.objective) == pytest.approx(r.objective, rel=1e-6, abs=1e-6)


def test_dual_signs_on_the_wyndor_example():
    """Hillier & Lieberman, Introduction to Operations Research, the Wyndor Glass example:
    maximise 3x1 + 5x2 s.t. x1 <= 4, 2x2 <= 12, 3x1 + 2x2 <= 18 -> x = (2, 6), Z = 36,
    shadow prices (0, 1.5, 1). Checks the one place where HiGHS duals are read."""
    from scipy import sparse

    from growthplan.backends.certificate import optimality_gap
    from growthplan.lp.program import Block, LinearProgram

    m = sparse.csc_array(np.array([[1.0, 0.0], [0.0, 2.0], [3.0, 2.0]]))
    lp = LinearProgram(matrix=m, cost=np.array([3.0, 5.0]), sense="max",
                       row_lower=np.full(3, -np.inf), row_upper=np.array([4.0, 12.0, 18.0]),
                       col_lower=np.zeros(2), col_upper=np.full(2, np.inf),
                       rows={"r": Block("r", 0, (3,), ((1, 2, 3),))},
                       cols={"x": Block("x", 0, (2,), ((1, 2),))})
    for method in ("simplex", "ipm-crossover"):
        out = gp.HighsBackend(method).solve(lp)
        np.testing.assert_allclose(out.x, [2.0, 6.0], atol=1e-9)
        assert out.objective == pytest.approx(36.0)
        np.testing.assert_allclose(out.row_dual, [0.0, 1.5, 1.0], atol=1e-9)
        assert optimality_gap(lp, out.x, out.row_dual) < 1e-12
