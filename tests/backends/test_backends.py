"""One suite, run for every back end: closed forms, objective stages, the fastest horizon,
diagnosis and duals.

Every back end must give the same plan through the same pipeline (objective stages, the
horizon search, the audit and the diagnosis run above the back ends). Values are checked
against closed forms where there is one, and against HiGHS simplex (the reference back
end) where there is none.
"""

from __future__ import annotations

import math

import numpy as np
import pulp
import pytest
from conftest import assert_infeasible, assert_optimal, one_sector
from helpers import two_sector

import growthplan as gp
from growthplan.backends.base import Feature
from growthplan.backends.pulp import cbc_solver

YEARS = range(2030, 2040)
G = 0.15  # one_sector(): (1 − a)/b − δ = 0.4/2 − 1/20 (Harrod–Domar, README)

BACKENDS = {
    "highs-simplex": lambda: gp.HighsBackend("simplex"),
    "highs-ipm": lambda: gp.HighsBackend("ipm"),
    # the state form of capacity must give the same plans, audits, diagnoses and duals
    "highs-ipm-state": lambda: gp.HighsBackend("ipm", formulation="state"),
    "highs-simplex-state": lambda: gp.HighsBackend("simplex", formulation="state"),
    "pulp-cbc": lambda: gp.PulpBackend(cbc_solver()),
    "pulp-cbc-state": lambda: gp.PulpBackend(cbc_solver(), formulation="state"),
    "pulp-highs": lambda: gp.PulpBackend(pulp.HiGHS(msg=False)),
}
if gp.HighsBackend.hipo_available():  # the hipo extra: HiPO, in the state form auto gives it
    BACKENDS["highs-hipo"] = lambda: gp.HighsBackend("hipo")
PULP = ["pulp-cbc", "pulp-highs"]


@pytest.fixture(params=list(BACKENDS))
def backend(request):
    return BACKENDS[request.param]()


def reference(plan: gp.Plan) -> gp.PlanResult:
    """The same plan on HiGHS simplex, the reference back end."""
    return plan.solve(backend=gp.HighsBackend("simplex"))


def accumulation_plan() -> gp.Plan:
    """Maximise K_T with K_{t+1} = K_t + K_t/v − C_t, C_t ≥ (1 − s) K_t / v (as test_plan)."""
    econ = gp.Economy(sectors=["k"], input_coefficients=[[0.88]],
                      capital_coefficients=[[3.0]],
                      capital={"k": gp.CapitalSpec(initial_capacity=100 / 3,
                                                   mean_service_life=1e6,
                                                   declining_balance=1e-9)})
    return gp.Plan(economy=econ, years=range(5))


def lex_plan(objective) -> gp.Plan:
    """Two sectors with a consumption floor and a labour limit (as test_objectives_trade)."""
    return gp.Plan(economy=two_sector(), years=YEARS, consumption=gp.Consumption(floor=10),
                   labour=gp.LabourSupply(start=200), objective=objective)


def fastest_plan(target: float, max_years: int = 30) -> gp.Plan:
    return gp.Plan(economy=one_sector(), years=range(2030, 2031),
                   targets=[gp.Target("goods", year=2031, capacity_at_least=target)],
                   objective=gp.objectives.Fastest(max_years=max_years))


class TestClosedForms:
    def test_harrod_domar_growth(self, backend):
        """C_T = C_0 (1 + (1 − a)/b − δ)^T = 100 · 1.15^T (Harrod–Domar closed form)."""
        r = assert_optimal(gp.Plan(economy=one_sector(), years=YEARS).solve(backend=backend))
        assert r.objective == pytest.approx(100 * (1 + G) ** 10, rel=1e-7)
        np.testing.assert_allclose(r.capacity["goods"], 100 * (1 + G) ** np.arange(11),
                                   rtol=1e-7)

    @pytest.mark.parametrize("T", [1, 4, 7])
    def test_terminal_capacity_after_t_years(self, backend, T):
        """Terminal capacity after T years is 100 · 1.15^T (Harrod–Domar closed form)."""
        r = assert_optimal(gp.Plan(economy=one_sector(), years=range(2030, 2030 + T))
                           .solve(backend=backend))
        assert r.objective == pytest.approx(100 * (1 + G) ** T, rel=1e-7)

    def test_accumulation_reference(self, backend):
        """K_0 = 100, v = 3, s = 0.12, T = 5 gives K_T = 121.665290 (derived from
        Harrod–Domar: K grows at s/v = 4 % a year, 100 · 1.04^5; as test_plan)."""
        r = assert_optimal(accumulation_plan().solve(backend=backend))
        assert 3 * r.objective == pytest.approx(121.665290, abs=1e-5)
        assert 3 * r.objective == pytest.approx(100 * 1.04 ** 5, rel=1e-7)


class TestObjectiveStages:
    def test_lexicographic_reports_stage_two_and_holds_stage_one(self, backend):
        """Regression: plan.solve_pulp ignored objective stages (it reported stage 1).

        Stage 1 maximises terminal capacity; stage 2 minimises labour with that level
        held (definition of a lexicographic optimum, common practice).
        """
        tc, ll = gp.objectives.TerminalCapacity(), gp.objectives.LeastLabour()
        first = assert_optimal(lex_plan(tc).solve(backend=backend))
        lex = assert_optimal(lex_plan(gp.objectives.Lexicographic([tc, ll]))
                             .solve(backend=backend))
        used = float(lex.labour[("labour", "used")].sum())
        # the reported objective is the stage-2 labour total, not the stage-1 level
        assert lex.objective == pytest.approx(used, rel=1e-7)
        assert lex.objective != pytest.approx(first.objective, rel=1e-3)  # not the level
        # stage 1 is held: the level is the one of stage 1 solved alone, less at most the
        # stage tolerance (1e-6 relative) and the solver's feasibility tolerance (1e-7)
        held = lex.solver["options"]["held_optima"][0]
        assert held == pytest.approx(first.objective, rel=1e-7)
        assert lex.level >= first.level * (1 - 1e-6 - 1e-7)
        # stage 2 does what it says: no more labour than stage 1 alone used
        assert used <= float(first.labour[("labour", "used")].sum()) * (1 + 1e-7)
        # and the same labour total on every back end
        ref = reference(lex_plan(gp.objectives.Lexicographic([tc, ll])))
        assert lex.objective == pytest.approx(ref.objective, rel=1e-6)

    def test_weighted_closed_form(self, backend):
        """Weighted([(TerminalCapacity, 2)]) on one sector is 2 · 100 · 1.15^T
        (Harrod–Domar closed form times the weight)."""
        w = gp.objectives.Weighted([(gp.objectives.TerminalCapacity(), 2.0)])
        r = assert_optimal(gp.Plan(economy=one_sector(), years=YEARS, objective=w)
                           .solve(backend=backend))
        assert r.objective == pytest.approx(2 * 100 * (1 + G) ** 10, rel=1e-7)

    def test_weighted_sum_of_its_terms(self, backend):
        """The reported objective is Σ w_k f_k evaluated on the plan (definition of the
        weighted objective), and the same optimum on every back end."""
        tc = gp.objectives.TerminalCapacity()
        dc = gp.objectives.DiscountedConsumption(rate=0.05)
        plan = lex_plan(gp.objectives.Weighted([(tc, 1.0), (dc, 3.0)]))
        r = assert_optimal(plan.solve(backend=backend))
        kappa = r.consumption["level"].to_numpy()
        value = r.level + 3.0 * float(np.sum(kappa * 1.05 ** -np.arange(len(kappa))))
        assert r.objective == pytest.approx(value, rel=1e-7)
        assert r.objective == pytest.approx(reference(plan).objective, rel=1e-6)


class TestFastest:
    def test_closed_form_horizon(self, backend):
        """Regression: plan.solve_pulp ignored the horizon search.

        Shortest horizon = ceil(log(target / C0) / log(1.15)) (Harrod–Domar closed form):
        150 → 3 years, as in test_objectives_trade.
        """
        r = assert_optimal(fastest_plan(150.0).solve(backend=backend))
        expect = math.ceil(math.log(150 / 100) / math.log(1 + G))
        assert expect == 3
        assert r.plan.horizon == expect
        assert r.horizons[expect] == "optimal"
        assert r.horizons.get(expect - 1, "infeasible") != "optimal"
        assert r.capacity.iloc[-1]["goods"] >= 150 * (1 - 1e-9)

    @pytest.mark.parametrize("target", [400.0, 1000.0])
    def test_same_horizon_as_highs(self, backend, target):
        r = assert_optimal(fastest_plan(target).solve(backend=backend))
        expect = math.ceil(math.log(target / 100) / math.log(1 + G))
        assert r.plan.horizon == expect == reference(fastest_plan(target)).plan.horizon

    def test_out_of_reach(self, backend):
        # 100 · 1.15^5 ≈ 201 < 1000: no horizon up to 5 years reaches it
        r = assert_infeasible(fastest_plan(1000.0, max_years=5).solve(backend=backend))
        assert r.horizons == {5: "infeasible"}
        row = r.diagnosis.shortfalls.iloc[0]
        assert row["shortfall"] == pytest.approx(1000 - 100 * (1 + G) ** 5, rel=1e-6)


class TestDiagnosis:
    @pytest.mark.parametrize(("k", "required"), [(3, 200.0), (5, 500.0), (10, 1e4)])
    def test_shortfall_is_the_exact_gap(self, backend, k, required):
        """One sector: the most capacity reachable in year 2030 + k is 100 · 1.15^k
        (Harrod–Domar closed form), so a target R falls short by R − 100 · 1.15^k."""
        plan = gp.Plan(economy=one_sector(), years=YEARS,
                       targets=[gp.Target("goods", year=2030 + k, capacity_at_least=required)])
        r = assert_infeasible(plan.solve(backend=backend))
        d = r.diagnosis
        assert d is not None and d.confirmed
        short = d.shortfalls
        assert list(short["condition"]) == ["capacity target"]
        assert short["sector"].iloc[0] == "goods" and short["year"].iloc[0] == 2030 + k
        gap = required - 100 * (1 + G) ** k
        assert short["shortfall"].iloc[0] == pytest.approx(gap, rel=1e-6)
        assert short["achievable"].iloc[0] == pytest.approx(100 * (1 + G) ** k, rel=1e-6)
        assert short["shortfall"].iloc[0] == pytest.approx(
            reference(plan).diagnosis.shortfalls["shortfall"].iloc[0], rel=1e-6)
        assert "capacity" in d.conflict()


class TestDuals:
    def test_shadow_prices(self, backend):
        """Shadow prices are non-negative (a balance row of a maximisation can only gain
        from more supply: LP duality) and fall at the growth rate, p_t / p_{t+1} = 1.15
        (Harrod–Domar prices: the README's Conventions); equal across back ends."""
        if Feature.DUALS not in backend.features:
            pytest.skip("back end gives no duals")
        plan = gp.Plan(economy=one_sector(), years=YEARS)
        r = assert_optimal(plan.solve(backend=backend))
        assert r.outcome.row_dual is not None
        p = r.shadow_prices["goods"].to_numpy()
        assert (p >= 0).all() and (p > 0).all()
        np.testing.assert_allclose(p[:-1] / p[1:], 1 + G, rtol=1e-6)
        ref = reference(plan).shadow_prices["goods"].to_numpy()
        np.testing.assert_allclose(p, ref, rtol=1e-6)

    def test_shadow_price_of_initial_capital(self, backend):
        """The accumulation LP: d K_T / d K_0 = 1.04^5 = 1.216653 (LP duality on the
        Harrod–Domar closed form, as test_plan)."""
        if Feature.DUALS not in backend.features:
            pytest.skip("back end gives no duals")
        r = assert_optimal(accumulation_plan().solve(backend=backend))
        lp, out = r.lp, r.outcome
        cap, level = lp.rows["capacity"], lp.rows["terminal_level"]
        d_c0 = out.row_dual[cap.start:cap.stop].sum() - out.row_dual[level.start]
        assert d_c0 == pytest.approx(1.04 ** 5, rel=1e-6)


def emission_plan(limit, **kw) -> gp.Plan:
    """One sector emitting 0.5 t per unit of output, with one limit on it."""
    sat = gp.Satellite(stressors=[gp.Stressor(name="CO2", unit="t", intensities={"goods": 0.5})])
    return gp.Plan(economy=one_sector(), years=range(2030, 2036), satellite=sat,
                   limits=[limit], **kw)


class TestEmissions:
    def test_cap_binds_at_cap_over_intensity(self, backend):
        """Output at most E/e = 60/0.5 = 120 once capacity allows it (closed form); the
        objective and the cap's prices equal the reference back end's."""
        plan = emission_plan(gp.Cap(what="CO2", at_most=60.0))
        r = assert_optimal(plan.solve(backend=backend))
        np.testing.assert_allclose(r.output["goods"].to_numpy()[2:], 120.0, rtol=1e-7)
        ref = reference(plan)
        assert r.objective == pytest.approx(ref.objective, rel=1e-7)
        if Feature.DUALS in backend.features:
            np.testing.assert_allclose(r.emission_prices["value"],
                                       ref.emission_prices["value"], rtol=1e-6, atol=1e-9)

    def test_budget_price_is_the_derivative(self, backend):
        """A budget's one dual equals dV/dB by central difference (LP duality; the
        difference taken on the reference back end, whose objective is exact to rounding)."""
        if Feature.DUALS not in backend.features:
            pytest.skip("back end gives no duals")
        r = assert_optimal(emission_plan(gp.Budget(what="CO2", total=330.0))
                           .solve(backend=backend))
        h = 1e-2
        v = [assert_optimal(reference(emission_plan(gp.Budget(what="CO2",
                                                              total=330.0 + s * h)))).objective
             for s in (1, -1)]
        assert r.emission_prices["value"].iloc[0] == pytest.approx((v[0] - v[1]) / (2 * h),
                                                                   rel=1e-6)

    def test_impossible_budget_is_diagnosed_in_tonnes(self, backend):
        """Demand 30 needs output 30/(1 − 0.6) = 75 and 37.5 t a year: 187.5 t over
        2031–2035 against a budget of 150 t, an excess of 37.5 t (by hand)."""
        plan = emission_plan(gp.Budget(what="CO2", total=150.0, first=2031, last=2035),
                             final_demand={"goods": 30.0})
        r = assert_infeasible(plan.solve(backend=backend))
        short = r.diagnosis.shortfalls
        assert list(short["condition"]) == ["emissions budget"]
        assert short["shortfall"].iloc[0] == pytest.approx(37.5, rel=1e-6)
        assert r.diagnosis.headline() == ("Cannot be met: emissions of CO2 in 2031–2035 "
                                          "exceed the budget by 37.5 t.")


@pytest.mark.parametrize("name", PULP)
class TestSolvePulpRegression:
    """Regression: plan.solve_pulp ignored objective stages and the horizon search."""

    def solver(self, name):
        return cbc_solver() if name == "pulp-cbc" else pulp.HiGHS(msg=False)

    def test_lexicographic_through_solve_pulp(self, name):
        tc, ll = gp.objectives.TerminalCapacity(), gp.objectives.LeastLabour()
        plan = lex_plan(gp.objectives.Lexicographic([tc, ll]))
        r = assert_optimal(plan.solve_pulp(self.solver(name)))
        ref = reference(plan)
        first = reference(lex_plan(tc))
        assert r.objective == pytest.approx(ref.objective, rel=1e-6)
        assert r.objective == pytest.approx(float(r.labour[("labour", "used")].sum()),
                                            rel=1e-7)
        assert r.objective != pytest.approx(first.objective, rel=1e-3)
        assert r.level >= first.level * (1 - 1e-6 - 1e-7)

    def test_fastest_through_solve_pulp(self, name):
        r = assert_optimal(fastest_plan(150.0).solve_pulp(self.solver(name)))
        assert r.plan.horizon == reference(fastest_plan(150.0)).plan.horizon == 3
        assert r.horizons[3] == "optimal"
