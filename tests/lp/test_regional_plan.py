"""Plans over several regions: the LP, its prices, an independent LP and hostile inputs."""

from __future__ import annotations

import numpy as np
import pytest
from conftest import assert_optimal
from helpers import economy, regional_economy
from scipy.optimize import linprog

import growthplan as gp
from growthplan.backends.pulp import cbc_solver
from growthplan.lp.build import build, build_plan, estimate_size

YEARS = range(2030, 2036)


def _same_lp(a: gp.LinearProgram, b: gp.LinearProgram) -> None:
    assert a.shape == b.shape
    assert abs(a.matrix - b.matrix).max() == 0
    for key in ("row_lower", "row_upper", "col_lower", "col_upper", "cost"):
        np.testing.assert_array_equal(getattr(a, key), getattr(b, key))


def test_one_region_is_todays_single_region_plan() -> None:
    econ = economy(3, seed=4)
    basket = {"s0": 1.0, "s1": 0.5, "s2": 0.2}
    common = dict(years=YEARS, labour=gp.LabourSupply(start=150.0, growth=0.01),
                  terminal=gp.TerminalGrowth(rate=0.02),
                  objective=gp.objectives.DiscountedConsumption(rate=0.03))
    single = gp.Plan(economy=econ, consumption=gp.Consumption(basket=basket, floor=5.0),
                     targets=[gp.Target("s1", year=2035, output_at_least=60.0)], **common)
    mre = gp.MultiRegionalEconomy.from_regions({"only": econ})
    regional = mre.plan(consumption=gp.Consumption(
        basket={f"only/{k}": v for k, v in basket.items()}, floor=5.0),
        targets=[gp.Target("only/s1", year=2035, output_at_least=60.0)], **common)
    _same_lp(single.compile(), regional.compile())
    a, b = assert_optimal(single.solve()), assert_optimal(regional.solve())
    assert b.objective == a.objective
    # the region's own labour supply in place of the plan's is the same condition
    own = mre.plan(consumption=gp.Consumption(
        basket={f"only/{k}": v for k, v in basket.items()}, floor=5.0),
        regional_labour={"only": 150.0}, labour_growth=0.01,
        targets=[gp.Target("only/s1", year=2035, output_at_least=60.0)],
        **{k: v for k, v in common.items() if k != "labour"})
    assert assert_optimal(own.solve()).objective == pytest.approx(a.objective, rel=1e-9)


def _pair(transport: float, *, identical: bool = True, **kw: object) -> gp.Plan:
    mre = regional_economy(["north", "south"], 3, seed=7, identical=identical)
    corridor = gp.Corridor(origin="north", destination="south", transport=transport,
                           both_ways=True)
    return mre.plan(YEARS, corridors=[corridor], transport_sector="haul",
                    consumption=gp.Consumption(floor=1.0), terminal=gp.TerminalGrowth(rate=0.02),
                    objective=gp.objectives.DiscountedConsumption(rate=0.03), **kw)


def test_identical_regions_without_transport_cost_give_symmetric_plans() -> None:
    plan = _pair(0.0, regional_labour={"north": 120.0, "south": 120.0})
    res = assert_optimal(plan.solve())
    # mirror symmetry: the two regions together are the one region (closed form: with free
    # shipments and identical data, averaging a plan with its mirror image is optimal)
    one = regional_economy(["north"], 3, seed=7).plan(
        YEARS, regional_labour={"north": 120.0}, consumption=gp.Consumption(floor=1.0),
        terminal=gp.TerminalGrowth(rate=0.02),
        objective=gp.objectives.DiscountedConsumption(rate=0.03))
    assert res.objective == pytest.approx(assert_optimal(one.solve()).objective, rel=1e-8)
    prices = res.shadow_prices.to_numpy()
    # shipments both ways at no cost: p_north ≤ p_south and p_south ≤ p_north (dual feasibility)
    np.testing.assert_allclose(prices[:, :3], prices[:, 3:], atol=1e-8 * np.abs(prices).max())


def test_shadow_prices_differ_by_the_transport_cost() -> None:
    tau = 0.15
    plan = _pair(tau, identical=False, regional_labour={"north": 150.0, "south": 90.0})
    res = assert_optimal(plan.solve())
    d = plan.lowered()
    reg = d.regions
    p = res.shadow_prices.to_numpy()          # years × pairs, values per unit
    y = res.lp.cols["shipments"].take(res.raw_solution)
    n = len(reg.sectors)
    assert (y > 1e-6).any()
    for k in range(reg.K):
        dest = p[:, reg.destination[k] * n + reg.good[k]]
        orig = p[:, reg.origin[k] * n + reg.good[k]]
        haul = p[:, reg.payer[k]]
        gap = dest - orig - tau * haul
        # complementary slackness of the shipment column (LP duality, common practice)
        assert np.all(gap <= 1e-7 * np.abs(p).max())
        moved = y[:, k] > 1e-7
        np.testing.assert_allclose(gap[moved], 0.0, atol=1e-7 * np.abs(p).max())


def test_regional_plan_on_pulp_equals_highs() -> None:
    plan = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                 migration={"south": 10.0})
    a = assert_optimal(plan.solve())
    b = assert_optimal(plan.solve(backend=gp.PulpBackend(cbc_solver())))  # PuLP's CBC
    assert b.objective == pytest.approx(a.objective, rel=1e-7)


def test_independent_lp_of_two_regions_two_sectors() -> None:
    """The plan's LP against scipy's linprog on the equations written out here."""
    T, delta, r, tau = 3, 0.05, 0.03, 0.2
    a = {"north": np.array([[0.2, 0.1], [0.1, 0.1]]), "south": np.array([[0.1, 0.2], [0.2, 0.1]])}
    b = {"north": np.array([[1.0, 0.5], [0.2, 0.3]]), "south": np.array([[0.8, 0.6], [0.3, 0.2]])}
    lab = {"north": np.array([0.5, 0.4]), "south": np.array([0.3, 0.7])}
    cap0 = {"north": np.array([100.0, 30.0]), "south": np.array([40.0, 60.0])}
    h = np.array([1.0, 0.1])
    supply = {"north": 70.0, "south": 60.0}
    names = ["grain", "haul"]
    econs = {k: gp.Economy(sectors=names, input_coefficients=a[k], capital_coefficients=b[k],
                           labour_coefficients=[lab[k]], consumption_basket=h,
                           capital={s: gp.CapitalSpec(initial_capacity=float(c),
                                                      mean_service_life=1 / delta)
                                    for s, c in zip(names, cap0[k], strict=True)})
             for k in ("north", "south")}
    mre = gp.MultiRegionalEconomy.from_regions(econs)
    plan = mre.plan(range(2030, 2030 + T), corridors=[gp.Corridor(
        origin="north", destination="south", transport=tau, both_ways=True, goods=["grain"])],
        transport_sector="haul", regional_labour=supply, consumption=gp.Consumption(),
        objective=gp.objectives.DiscountedConsumption(rate=r))
    res = assert_optimal(plan.solve())
    # columns per year: x (4 pairs), z (4), κ (1), y (north→south grain, south→north grain)
    nv = 11
    cost = np.zeros(nv * T)
    a_ub, b_ub = [], []
    for t in range(T):
        cost[t * nv + 8] = -(1 + r) ** -t
        for reg_i, reg in enumerate(("north", "south")):
            for i in range(2):
                # balance of (reg, i): x − A x − B z − h κ + inbound − outbound − transport ≥ 0
                row = np.zeros(nv * T)
                row[t * nv + 2 * reg_i:t * nv + 2 * reg_i + 2] -= a[reg][i]
                row[t * nv + 2 * reg_i + i] += 1.0
                row[t * nv + 4 + 2 * reg_i:t * nv + 4 + 2 * reg_i + 2] -= b[reg][i]
                row[t * nv + 8] -= h[i]
                inbound, outbound = (10, 9) if reg_i == 0 else (9, 10)
                if i == 0:
                    row[t * nv + inbound] += 1.0
                    row[t * nv + outbound] -= 1.0
                else:  # haul of the shipping region: τ per unit shipped out
                    row[t * nv + outbound] -= tau
                a_ub.append(-row)
                b_ub.append(0.0)
                # capacity: x_t ≤ C0 (1 − δ)^t + Σ_{τ < t} (1 − δ)^(t − 1 − τ) z_τ (geometric
                # retirement, one-year lead time)
                row = np.zeros(nv * T)
                row[t * nv + 2 * reg_i + i] = 1.0
                for s in range(t):
                    row[s * nv + 4 + 2 * reg_i + i] = -(1 - delta) ** (t - 1 - s)
                a_ub.append(row)
                b_ub.append(cap0[reg][i] * (1 - delta) ** t)
            row = np.zeros(nv * T)
            row[t * nv + 2 * reg_i:t * nv + 2 * reg_i + 2] = lab[reg]
            a_ub.append(row)
            b_ub.append(supply[reg])
    ref = linprog(cost, A_ub=np.array(a_ub), b_ub=np.array(b_ub), bounds=(0, None),
                  method="highs")
    assert ref.status == 0
    assert res.objective == pytest.approx(-ref.fun, rel=1e-8, abs=1e-8)
    kappa = ref.x[8::nv]
    np.testing.assert_allclose(res.consumption["level"].to_numpy(), kappa, rtol=1e-6, atol=1e-6)


def test_regional_consumption_floors() -> None:
    free = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                 consumption_floors={})
    base = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0})
    # without floors each region's level is free: the plan can do at least as well as with
    # one level for all (equal levels are one of its choices)
    a, b = assert_optimal(free.solve()), assert_optimal(base.solve())
    assert a.objective >= b.objective - 1e-9 * abs(b.objective)
    own = a.lp.cols["regional_consumption"].take(a.raw_solution)
    floor = float(own.min(axis=1).max()) * 1.5 + 1.0
    lifted = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                   consumption_floors={"south": floor})
    res = assert_optimal(lifted.solve())
    levels = res.lp.cols["regional_consumption"].take(res.raw_solution)
    assert np.all(levels[:, 1] >= floor * (1 - 1e-9))
    weight = lifted.lowered().regions.weight
    np.testing.assert_allclose(res.consumption["level"].to_numpy(), levels @ weight,
                               rtol=1e-9)
    assert res.objective <= a.objective * (1 + 1e-9)  # a floor can only cost
    with pytest.raises(gp.InvalidInput, match="regions.consumption_floors"):
        regional_economy(["north", "south"], 3, seed=7).plan(
            YEARS, consumption_floors={"south": 1.0})


def test_fixed_trade_shares_hold_in_the_plan() -> None:
    mre = regional_economy(["north", "south"], 3, seed=7)
    plan = mre.plan(YEARS, corridors=[
        gp.Corridor(origin="north", destination="south", shares={"s0": 0.3, "s1": 0.2},
                    transport=0.1),
        gp.Corridor(origin="south", destination="north", goods=["s0"])],
        transport_sector="haul", regional_labour={"north": 150.0, "south": 90.0},
        consumption=gp.Consumption(floor=1.0), terminal=gp.TerminalGrowth(rate=0.02),
        final_demand={"south/s0": 5.0}, objective=gp.objectives.DiscountedConsumption(rate=0.03))
    res = assert_optimal(plan.solve())
    d = plan.lowered()
    y = res.lp.cols["shipments"].take(res.raw_solution)
    # the south's use of s0, recomputed here from the published tables (Chenery–Moses:
    # the share of a region's use of a good that comes from another region is fixed)
    use = (res.output.to_numpy() @ d.a.T + res.capital_deliveries.to_numpy()
           + res.consumption.drop(columns="level").to_numpy() + d.demand)
    s0 = d.names.index("south/s0")
    np.testing.assert_allclose(y[:, 0], 0.3 * use[:, s0], rtol=1e-7, atol=1e-7)
    est, lp = plan.estimate_size(), build(d)
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
    three = regional_economy(["a", "b", "c"], 3, seed=7)
    with pytest.raises(gp.InvalidInput, match="sum to at most 1") as err:
        three.plan(YEARS, corridors=[gp.Corridor(origin="a", destination="c", shares=0.7),
                                     gp.Corridor(origin="b", destination="c", shares=0.5)])
    assert err.value.field == "corridors"
    with pytest.raises(gp.InvalidInput, match="shares"):
        gp.Corridor(origin="a", destination="c", shares=1.5)


def test_national_targets_sum_over_regions() -> None:
    free = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0})
    base = assert_optimal(free.solve())
    total = base.output[["north/s1", "south/s1"]].sum(axis=1)
    want = float(total.loc[2033]) * 1.3
    cap = float(base.capacity[["north/s1", "south/s1"]].sum(axis=1).loc[2036]) * 1.2
    plan = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                 national_targets=[gp.NationalTarget(sector="s1", year=2033,
                                                     output_at_least=want),
                                   gp.NationalTarget(sector="s1", year=2036,
                                                     capacity_at_least=cap)])
    res = assert_optimal(plan.solve())
    assert res.output[["north/s1", "south/s1"]].sum(axis=1).loc[2033] >= want * (1 - 1e-9)
    assert res.capacity[["north/s1", "south/s1"]].sum(axis=1).loc[2036] >= cap * (1 - 1e-9)
    est, lp = plan.estimate_size(), build(plan.lowered())
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
    too_much = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                     national_targets=[gp.NationalTarget(sector="s1", year=2031,
                                                         output_at_least=1e5)])
    bad = too_much.solve()
    assert bad.status == "infeasible"
    assert "national output target" in set(bad.diagnosis.shortfalls["condition"])
    with pytest.raises(gp.InvalidInput, match="national_targets.0.sector"):
        _pair(0.0, national_targets=[gp.NationalTarget(sector="north/s1", year=2031,
                                                       output_at_least=1.0)])
    with pytest.raises(gp.InvalidInput, match="national_targets.0.year"):
        _pair(0.0, national_targets=[gp.NationalTarget(sector="s1", year=2050,
                                                       output_at_least=1.0)])


def test_size_estimate_covers_regions() -> None:
    plan = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                 migration={"north": 5.0})
    ceiled = regional_economy(["a", "b", "c"], 4, seed=3).plan(
        YEARS, corridors=[gp.Corridor(origin="a", destination="b", ceiling=3.0, transport=0.1,
                                      both_ways=True),
                          gp.Corridor(origin="c", destination="a", goods=["s1"],
                                      ceiling={"s1": 2.0})],
        transport_sector="haul", transport_paid_by="destination",
        regional_labour={"a": 100.0, "b": 100.0, "c": 80.0})
    floors = _pair(0.1, regional_labour={"north": 150.0, "south": 90.0},
                   consumption_floors={"north": 2.0})
    for p in (plan, ceiled, floors):
        est = p.estimate_size()
        lp = build(p.lowered())
        assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
    assert_optimal(ceiled.solve())
    with pytest.raises(gp.InvalidInput, match="too large"):  # the guard counts shipments too
        build_plan(ceiled, size_limit=int(ceiled.estimate_size()["nonzeros"]) - 1)


@pytest.mark.parametrize(("change", "field"), [
    ({"corridors": [{"origin": "north", "destination": "west"}]}, "corridors.0.destination"),
    ({"corridors": [{"origin": "north", "destination": "north"}]}, "destination"),
    ({"corridors": [{"origin": "north", "destination": "south", "transport": -0.1}]},
     "transport"),
    ({"corridors": [{"origin": "north", "destination": "south", "goods": ["gold"]}]},
     "corridors.0.goods"),
    ({"corridors": [{"origin": "north", "destination": "south", "transport": 0.1}],
      "transport_sector": None}, "transport_sector"),
    ({"labour": {"north": 10.0}}, "labour"),
    ({"labour": {"north": 10.0, "south": 10.0, "west": 1.0}}, "labour"),
    ({"migration": {"north": 1.0}, "labour": None}, "migration"),
    ({"regions": ["north", "north"]}, "regions"),
    ({"regions": ["south", "north"]}, "regions.sectors"),
])
def test_hostile_regions_are_refused_with_the_field_named(change, field) -> None:
    mre = regional_economy(["north", "south"], 2, seed=1)
    spec = {"regions": ["north", "south"], "sectors": mre.sectors, "transport_sector": "haul",
            "labour": {"north": 50.0, "south": 50.0}}
    spec.update(change)
    with pytest.raises(gp.InvalidInput) as err:
        gp.Plan(economy=mre.economy, years=YEARS, regions=spec)
    assert field in str(err.value)


def test_duplicated_region_sector_labels_are_refused() -> None:
    econ = economy(2)
    with pytest.raises(gp.InvalidInput, match="regions"):
        gp.MultiRegionalEconomy.from_regions({"a": econ, "b": econ}).model_copy().__class__(
            regions=["a", "a"], sectors=econ.names, economy=econ)
    with pytest.raises(gp.InvalidInput, match="sectors"):
        gp.MultiRegionalEconomy(regions=["a"], sectors=["s0", "s0"], economy=econ)


def test_diagnosis_names_the_region_and_the_corridor() -> None:
    mre = regional_economy(["north", "south"], 3, seed=7)
    plan = mre.plan(YEARS, corridors=[gp.Corridor(origin="north", destination="south",
                                                  ceiling=5.0)],
                    regional_labour={"north": 150.0, "south": 20.0},
                    final_demand={"south/s0": 100.0})
    res = plan.solve()
    assert res.status == "infeasible"
    short = res.diagnosis.shortfalls
    assert {"labour", "shipments north to south"} <= set(short["condition"])
    assert set(short.loc[short["condition"] == "labour", "sector"]) == {"south"}
    subset = list(res.diagnosis.infeasible_subset["description"])
    assert any(t.startswith("labour in south in") for t in subset)
    assert any(t.startswith("shipments of s0 from north to south in") for t in subset)


def test_regional_plans_in_the_state_form_of_capacity() -> None:
    """Every regional family, national capacity targets among them, gives the same optimum
    and the same shadow prices when capacity is carried as a stock (the same LP written
    another way), and the size estimate still equals the built matrix."""
    free = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0})
    base = assert_optimal(free.solve())
    cap = float(base.capacity[["north/s1", "south/s1"]].sum(axis=1).loc[2036]) * 1.2
    plan = _pair(0.1, identical=False, regional_labour={"north": 150.0, "south": 90.0},
                 national_targets=[gp.NationalTarget(sector="s1", year=2036,
                                                     capacity_at_least=cap)])
    expression = assert_optimal(plan.solve(formulation="expression"))
    state = assert_optimal(plan.solve(formulation="state"))
    assert state.objective == pytest.approx(expression.objective, rel=1e-8)
    assert state.capacity[["north/s1", "south/s1"]].sum(axis=1).loc[2036] >= cap * (1 - 1e-9)
    est = estimate_size(plan, formulation="state")
    lp = build(plan.lowered(), formulation="state")
    assert (est["rows"], est["columns"], est["nonzeros"]) == (*lp.shape, lp.nnz)
