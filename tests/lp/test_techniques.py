"""Alternative techniques and embodied technical change in the plan LP."""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import assert_optimal, one_sector, random_economy
from helpers import economy, make_plan, switch_plan
from hypothesis import given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.backends.pulp import cbc_solver
from growthplan.errors import InvalidInput


def _random_techniques(rng: np.random.Generator, econ: gp.Economy, years: list[int],
                       ) -> list[gp.Technique]:
    """One to three alternatives per sector: scaled coefficients, some late, some joint."""
    out = []
    names = econ.names
    a = np.asarray(econ.input_coefficients)
    b = np.asarray(econ.capital_coefficients)
    for j, s in enumerate(names):
        for k in range(int(rng.integers(0, 3))):
            fa, fb = rng.uniform(0.6, 1.2), rng.uniform(0.8, 1.6)
            first = int(rng.choice([years[0], years[len(years) // 2]]))
            joint = {names[(j + 1) % len(names)]: 0.1} if len(names) > 1 and k == 1 else {}
            out.append(gp.Technique(
                sector=s, label=f"alt{k}", inputs=dict(zip(names, a[:, j] * fa, strict=True)),
                capital=dict(zip(names, b[:, j] * fb, strict=True)),
                labour=float(rng.uniform(0.05, 1.0)), first_year=first, by_products=joint,
                mean_service_life=float(rng.integers(5, 30))))
    return out


def _random_plan(seed: int, n: int, years: int, *, lead: int = 1) -> gp.Plan:
    rng = np.random.default_rng(seed)
    econ = random_economy(rng, n, lead=lead, basket=False)
    ys = list(range(2030, 2030 + years))
    supply = float(np.asarray(econ.labour_coefficients)[0] @ np.full(n, 150.0))
    return gp.Plan(economy=econ, years=ys, labour=gp.LabourSupply(start=supply, growth=0.01),
                   techniques=_random_techniques(rng, econ, ys),
                   terminal=gp.TerminalGrowth(rate=0.02) if seed % 2 else None)


# -- the one-technique case is the old LP --------------------------------------------------

def test_base_techniques_only_give_the_same_lp():
    """A plan whose techniques only restate the base ones builds the identical LP.

    Going through the technique arrays (a phase-out entry that restricts
    nothing) must reproduce the sector LP: same rows, columns, labels, matrix,
    bounds and costs.
    """
    plan = make_plan(economy(5, seed=2), 6)
    plan = plan.model_copy(update={"terminal": gp.TerminalGrowth(rate=0.03),
                                   "targets": [gp.Target("s1", year=2033, output_at_least=1),
                                               gp.Target("s2", year=2036, capacity_at_least=1)]})
    same = plan.model_copy(update={"techniques": [gp.Technique(sector="s0", label="base")]})
    assert same.lowered().tech is not None and plan.lowered().tech is None
    lp0, lp1 = plan.compile(), same.compile()
    assert lp0.shape == lp1.shape and lp0.nnz == lp1.nnz
    assert lp0.rows == lp1.rows and lp0.cols == lp1.cols
    assert (lp0.matrix != lp1.matrix).nnz == 0
    for f in ("row_lower", "row_upper", "col_lower", "col_upper", "cost"):
        np.testing.assert_array_equal(getattr(lp0, f), getattr(lp1, f))
    assert same.estimate_size() == plan.estimate_size()


def test_a_copy_of_base_never_cheaper_changes_nothing():
    """A copy of a base technique that needs more capital is never started (dominated).

    Same inputs and labour, 10 % more capital goods per unit of capacity: any
    start of it could be a start of the base technique with capital goods to
    spare, so the optimum is the one-technique plan's (closed-form argument;
    an exact copy gives the same objective as well).
    """
    econ = economy(4, seed=3)
    plan = make_plan(econ, 8)
    r0 = assert_optimal(plan.solve())
    b = np.asarray(econ.capital_coefficients)
    dear = [gp.Technique(sector=s, label="dear",
                         capital=dict(zip(econ.names, 1.1 * b[:, j], strict=True)))
            for j, s in enumerate(econ.names)]
    r1 = assert_optimal(plan.model_copy(update={"techniques": dear}).solve())
    assert r1.objective == pytest.approx(r0.objective, rel=1e-9)
    starts = r1.techniques
    assert starts.loc[starts["label"] == "dear", "starts"].max() < 1e-7 * r0.objective
    copies = [gp.Technique(sector=s, label="copy") for s in econ.names]
    r2 = assert_optimal(plan.model_copy(update={"techniques": copies}).solve())
    assert r2.objective == pytest.approx(r0.objective, rel=1e-9)


def test_switch_year_follows_from_labour_growth():
    """A labour-saving technique with more capital is first started the year before labour binds.

    Closed form (derived here). One sector, a = 0.5, capacity lasting exactly
    one year (sudden exit, life 1, lead time 1), so capacity in year t + 1 is
    the starts of year t and no capital carries over. The base technique has
    b0 = 0.4, l0 = 1; the alternative b1 = 0.45, l1 = 0.5. Capacity C0 = 100,
    labour L_t = 150 · 1.05^t.

    Each year's starts only serve the next year, and terminal capacity grows
    with every year's surplus, so the plan maximises each year's output. While
    labour is slack the base technique gives more capacity per unit of
    surplus (1/b0 > 1/b1) and output grows by G0 = (1 − a)/b0 = 1.25 a year,
    C_t = 100 · 1.25^t. Once the all-base capacity would need more labour than
    there is, l0 · 100 · 1.25^t > 150 · 1.05^t, the best use of the surplus is
    the mix where both the surplus and labour bind, which has the alternative
    in it. That first happens at t* = ⌊ln 1.5 / ln(1.25/1.05)⌋ + 1 = 3
    (ln 1.5 / ln 1.190476 = 2.3255), so the alternative is first started in
    year t* − 1 = 2 (2032), never before. The final year's starts are all base
    (terminal capacity counts capacity, and base capacity is cheaper).
    """
    plan = switch_plan()
    r = assert_optimal(plan.solve())
    t_star = math.floor(math.log(1.5) / math.log(1.25 / 1.05)) + 1
    assert t_star == 3
    years = r.technique_years
    assert years.loc["goods:saving", "first_start"] == 2030 + t_star - 1
    tech = r.techniques
    base = tech[tech["label"] == "base"].set_index("year")
    # before the switch output grows at (1 − a)/b0 on the base technique alone
    assert base.loc[2030:2032, "output"].to_numpy() == pytest.approx(
        [100, 125, 156.25], rel=1e-9)
    saving = tech[tech["label"] == "saving"].set_index("year")
    assert saving.loc[2037, "starts"] == pytest.approx(0, abs=1e-7)


def test_availability_years_bound_the_starts():
    """A technique is never started outside [first_year, last_start]; the base may be phased out."""
    econ = one_sector()
    techs = [gp.Technique(sector="goods", label="base", last_start=2032),
             gp.Technique(sector="goods", label="new", first_year=2033,
                          capital={"goods": 2.2})]
    plan = gp.Plan(economy=econ, years=range(2030, 2040), techniques=techs)
    lp = plan.compile()
    z = lp.cols["starts"]
    upper = lp.col_upper[z.start:z.stop].reshape(10, 2)
    assert np.all(upper[3:, 0] == 0) and np.all(upper[:3, 1] == 0)
    r = assert_optimal(plan.solve())
    t = r.techniques.set_index(["label", "year"])["starts"]
    assert t.loc["base"].loc[2033:].max() == 0 and t.loc["new"].loc[:2032].max() == 0
    assert "technique availability" in r.audit.checks.index
    assert t.loc["new"].sum() > 0


def test_by_products_enter_the_balances():
    """Joint production: a by-product supplies its commodity (closed form, two sectors).

    Sector "ore" needs 0.2 units of "fuel" per unit; fuel's only alternative
    technique yields 0.5 units of ore per unit of fuel. With ore's own
    capacity at zero and no way to build it (ore has no starts: last_start
    before the plan), all ore comes from fuel: ore output 0, and the balance of
    ore is met by 0.5 x_fuel:joint ≥ ore's use.
    """
    econ = gp.Economy(sectors=["fuel", "ore"], input_coefficients=[[0.1, 0.2], [0.3, 0.0]],
                      capital_coefficients=[[1.0, 1.0], [0.0, 0.0]],
                      capital={"fuel": gp.CapitalSpec(initial_capacity=100,
                                                      mean_service_life=20),
                               "ore": gp.CapitalSpec(initial_capacity=0,
                                                     mean_service_life=20)})
    techs = [gp.Technique(sector="ore", label="base", last_start=2000),
             gp.Technique(sector="fuel", label="joint", by_products={"ore": 0.5},
                          initial_capacity=50, inputs={"fuel": 0.1})]
    plan = gp.Plan(economy=econ, years=range(2030, 2034), techniques=techs)
    r = assert_optimal(plan.solve())
    tech = r.techniques.set_index(["technique", "year"])
    x_joint = tech.xs("fuel:joint", level="technique")["output"]
    x_base = tech.xs("fuel", level="technique")["output"]
    # the base fuel technique uses 0.3 ore per unit: ore's only supply is the by-product
    assert np.all(0.5 * x_joint.to_numpy() >= 0.3 * x_base.to_numpy() - 1e-7)
    assert x_base.sum() > 0
    assert "by-product balance" in r.audit.checks.index


# -- embodied change ---------------------------------------------------------------------

def test_embodied_vintages_carry_their_start_years_coefficients():
    """Capacity started in year τ uses year-τ input and labour coefficients for its whole life.

    Recomputed from the technique schedules: the input use of every vintage at
    a_0 (1 + r_a)^τ and its labour at l_0 (1 + r_l)^τ (the rates of the
    plan), summed, equals what the plan's balances and labour table report;
    capacity from before the plan keeps the base year's coefficients, so
    embodied labour use is above the disembodied plan's for the same output.
    """
    econ = one_sector(a=0.5, b=2.0)
    tc = gp.TechnicalChange(input_rate={"goods": -0.04}, labour_rate={"goods": -0.05},
                            embodied=True)
    plan = gp.Plan(economy=econ, years=range(2030, 2038), technical_change=tc,
                   labour=gp.LabourSupply(start=1e6))
    r = assert_optimal(plan.solve())
    tech = r.techniques
    x = tech.pivot(index="year", columns="technique", values="output")
    z = tech.pivot(index="year", columns="technique", values="starts")
    vintage = {"goods": 0, **{f"goods {y}": y - 2030 for y in range(2031, 2038)}}
    for key, tau in vintage.items():  # vintage τ is started in year τ only
        others = z[key].drop(index=2030 + tau)
        assert others.abs().max() == 0
    inputs = sum(x[k] * 0.5 * 0.96 ** tau for k, tau in vintage.items())
    labour = sum(x[k] * 0.5 * 0.95 ** tau for k, tau in vintage.items())
    acc = r.accounts
    assert acc["intermediate_use"].to_numpy() == pytest.approx(inputs.to_numpy(), rel=1e-9)
    assert r.labour[("labour", "used")].to_numpy() == pytest.approx(labour.to_numpy(),
                                                                    rel=1e-9)
    assert "vintage inputs" in r.audit.checks.index
    dis = plan.model_copy(update={"technical_change": tc.model_copy(update={"embodied": False})})
    rd = assert_optimal(dis.solve())
    assert rd.objective >= r.objective * (1 - 1e-9)  # disembodied change is free for old capacity


def test_the_audit_rebuilds_each_vintages_capital_goods():
    """Capital goods per unit of capacity of vintage τ are b_0 (1 + r_b)^τ; the audit
    rebuilds them from the base coefficients, so an LP column that charged a vintage
    the wrong capital (here the base year's) is caught, not certified."""
    import dataclasses

    from growthplan.results.audit import audit

    tc = gp.TechnicalChange(capital_rate={"goods": -0.05}, embodied=True)
    plan = gp.Plan(economy=one_sector(a=0.5, b=2.0), years=range(2030, 2036),
                   technical_change=tc, labour=gp.LabourSupply(start=1e6))
    r = assert_optimal(plan.solve())
    assert "vintage capital" in r.audit.checks.index
    d = r.data
    wrong = dataclasses.replace(d, b=np.repeat(d.b[:, :1], d.b.shape[1], axis=1))
    checks = audit(wrong, r._schedules).checks
    assert checks.loc["vintage capital", "max_relative"] > 0.1  # 5 % a year, 5 years
    assert r.audit.checks.loc["vintage capital", "max_relative"] < 1e-12


# -- validation ----------------------------------------------------------------------------

@pytest.mark.parametrize("bad, field", [
    ({"sector": "gold", "label": "x"}, "techniques.0.sector"),
    ({"sector": "goods", "label": "x", "inputs": {"gold": 0.1}}, "techniques.0.inputs"),
    ({"sector": "goods", "label": "x", "inputs": {"goods": -0.1}}, "techniques.0.inputs"),
    ({"sector": "goods", "label": "x", "first_year": 2035, "last_start": 2031},
     "techniques.0.first_year"),
    ({"sector": "goods", "label": "base", "labour": 0.3}, "techniques.0.label"),
    ({"sector": "goods", "label": "x", "labour": {"skilled": 1.0}}, "techniques.0.labour"),
    ({"sector": "goods", "label": "x", "retirement": "bogus"}, "techniques.0.retirement"),
    ({"sector": "goods", "label": "x", "mean_service_life": 0.5},
     "techniques.0.mean_service_life"),
    ({"sector": "goods", "label": "x", "by_products": {"goods": 0.5}},
     "techniques.0.by_products"),
])
def test_bad_techniques_are_refused_with_the_template(bad, field):
    with pytest.raises(InvalidInput) as info:
        gp.Plan(economy=one_sector(), years=range(2030, 2033), techniques=[bad])
    assert info.value.field == field
    assert f"{field} must " in str(info.value) and ". Got " in str(info.value)


def test_duplicate_techniques_are_refused():
    t = {"sector": "goods", "label": "x"}
    with pytest.raises(InvalidInput, match=r"techniques\.1\.label must be unique"):
        gp.Plan(economy=one_sector(), years=range(2030, 2033), techniques=[t, t])


# -- sizes, profits and a second solver on random plans ------------------------------------

@settings(max_examples=15)
@given(st.integers(0, 10_000), st.integers(1, 4), st.integers(2, 6), st.sampled_from([0, 1, 2]))
def test_estimate_size_equals_the_built_matrix_with_techniques(seed, n, years, lead):
    plan = _random_plan(seed, n, years, lead=lead)
    tc = gp.TechnicalChange(input_rate={"s0": -0.02}, embodied=bool(seed % 3 == 0))
    plan = plan.model_copy(update={"technical_change": tc,
                                   "targets": [gp.Target("s0", year=2030 + years - 1,
                                                         output_at_least=1.0)]})
    est = plan.estimate_size()
    lp = plan.compile(size_limit=None)
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)


@settings(max_examples=12)
@given(st.integers(0, 10_000), st.integers(1, 4), st.integers(2, 6))
def test_profits_at_shadow_prices_are_complementary(seed, n, years):
    """Profits are the reduced costs of the technique columns: ≤ 0, and 0 where in use.

    Source: LP duality (complementary slackness); the expression is checked
    against HiGHS's own column duals.
    """
    plan = _random_plan(seed, n, years)
    r = plan.solve()
    if not r.ok:
        return  # a random plan may be infeasible: nothing to price
    prof = r.technique_profits
    lp = r.lp
    m = r.data.m
    for col, block in (("profit", lp.cols["starts"]), ("operating", lp.cols["output"])):
        highs = r.outcome.col_dual[block.start:block.stop].reshape(years, m).T.ravel()
        scale = 1.0 + np.abs(prof[col]).max()
        assert np.abs(prof[col].to_numpy() - highs).max() <= 1e-7 * scale
    scale = 1.0 + np.abs(prof["capital_charge"]).max()
    avail = prof[prof["available"]]
    assert avail["profit"].max() <= 1e-7 * scale
    big = prof["starts"].abs().max()
    used = avail.loc[avail["starts"] > 1e-6 * big, "profit"].to_numpy()
    assert np.all(np.abs(used) <= 1e-7 * scale)
    running = prof.loc[prof["output"] > 1e-6 * prof["output"].max(), "operating"].to_numpy()
    assert np.all(np.abs(running) <= 1e-7 * scale)
    assert prof["operating"].max() <= 1e-7 * scale


@settings(max_examples=6)
@given(st.integers(0, 10_000), st.integers(1, 3), st.integers(2, 5))
def test_cbc_gives_the_same_objective_with_techniques(seed, n, years):
    """PuLP's CBC reaches the HiGHS optimum on plans with techniques (1e-6 relative)."""
    plan = _random_plan(seed, n, years)
    r = plan.solve()
    if not r.ok:
        return
    c = assert_optimal(plan.solve_pulp(cbc_solver()))
    assert c.objective == pytest.approx(r.objective, rel=1e-6)


def test_revision_and_uncertainty_refuse_techniques():
    """Not yet available with techniques: a clear refusal, never a wrong answer."""
    plan = gp.Plan(economy=one_sector(), years=range(2030, 2034),
                   techniques=[gp.Technique(sector="goods", label="x")])
    with pytest.raises(InvalidInput, match="techniques must be left out for revision"):
        gp.revise(plan, {"goods": [1.0]}, 2031)
    spec = gp.UncertaintySpec(items=[gp.Uncertain(what="capital_coefficients",
                                                  distribution=gp.Uniform(low=0.9, high=1.1))])
    with pytest.raises(InvalidInput, match="techniques must be left out for stress tests"):
        gp.stress_test(plan, spec, draws=2)


@pytest.mark.parametrize("objective, sign", [
    (gp.objectives.LeastLabour(), -1.0),
    (gp.objectives.DiscountedConsumption(rate=0.03), 1.0)])
def test_profits_follow_the_objectives_sense(objective, sign):
    """For a minimised objective the profit is minus HiGHS's reduced cost (LP duality).

    HiGHS reports ``c − Mᵀy``, ≥ 0 at a lower bound when minimising; a profit
    is an improvement of the objective, so ≤ 0 in both senses.
    """
    econ = economy(3, seed=5)
    plan = make_plan(econ, 5).model_copy(update={
        "techniques": [gp.Technique(sector="s1", label="lean", labour=0.05,
                                    capital={"s0": 2.0})],
        "objective": objective, "consumption": gp.Consumption(basket={"s2": 1.0}, floor=5.0),
        "targets": [gp.Target("s1", year=2034, output_at_least=150.0)]})
    r = assert_optimal(plan.solve(method="simplex"))
    prof = r.technique_profits
    z = r.lp.cols["starts"]
    highs = r.outcome.col_dual[z.start:z.stop].reshape(5, r.data.m).T.ravel()
    assert prof["profit"].to_numpy() == pytest.approx(sign * highs, abs=1e-9)
    assert prof.loc[prof["available"], "profit"].max() <= 1e-9
