"""Uncertain coefficients: draws, stress tests, re-optimisation and the robust plan."""

from __future__ import annotations

import math
import warnings
from concurrent.futures import ProcessPoolExecutor

import numpy as np
import pandas as pd
import pytest
from conftest import one_sector
from helpers import economy, make_plan
from scipy import stats

import growthplan as gp
from growthplan.lp.build import build
from growthplan.results.charts import plot_fan, plot_probabilities
from growthplan.scenarios.uncertainty import (
    Empirical,
    LogNormal,
    Normal,
    Triangular,
    Uncertain,
    UncertaintySpec,
    Uniform,
    fix_starts,
    reoptimise,
    robust_plan,
    stress_test,
)

SERIAL = gp.SerialExecutor()


@pytest.fixture(scope="module")
def small():
    plan = make_plan(economy(3), 6)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", gp.EndEffectsWarning)
        return plan, plan.solve()


def test_zero_variance_reproduces_the_deterministic_plan_exactly(small):
    plan, nominal = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Normal(mean=1.0, sd=0.0),
                  correlation="independent"),
        Uncertain(what="input_coefficients", rows="s0", distribution=Uniform(low=1, high=1)),
        Uncertain(what="labour_coefficients", distribution=LogNormal(mean=1.0, sd=0.0)),
        Uncertain(what="mean_service_life", distribution=Triangular(low=1, mode=1, high=1)),
        Uncertain(what="labour_growth", relative=False,
                  distribution=Empirical(sample=[0.01])),
        Uncertain(what="final_demand", distribution=Uniform(low=1, high=1))], seed=5)
    drawn = spec.draw(plan, 3)
    for block in ("input_coefficients", "capital_coefficients", "labour_coefficients"):
        assert np.array_equal(getattr(drawn.economy, block), getattr(plan.economy, block))
    re = reoptimise(plan, spec, 3, executor=SERIAL)
    obj = re.table[re.table.quantity == "objective"]["value"]
    assert len(obj) == 3 and (obj == nominal.objective).all()  # exactly, not approximately
    st = stress_test(plan, spec, 3, nominal=nominal, executor=SERIAL)
    p = st.probability()
    assert (p["probability"] == 1.0).all()
    got = st.table[st.table.quantity == "objective"]["value"].to_numpy()
    np.testing.assert_allclose(got, nominal.objective, rtol=1e-7)


def test_harrod_domar_probability_within_the_monte_carlo_interval():
    # Closed form (Harrod–Domar, one sector, geometric retirement, lead time 1): the
    # optimal plan grows capacity by g(b) = 1 + (1 − a)/b − δ a year, so C_T = C0 g(b)^T.
    # With b ~ U(lo, hi): C_T > c ⇔ g(b) > (c/C0)^(1/T) ⇔ b < b* = (1 − a)/((c/C0)^(1/T) − 1 + δ),
    # hence P(C_T > c) = clip((b* − lo)/(hi − lo), 0, 1).
    a, delta, c0, T, lo, hi = 0.6, 1 / 20, 100.0, 5, 1.5, 2.5
    plan = gp.Plan(economy=one_sector(a=a, b=2.0, life=20.0, c0=c0),
                   years=range(2030, 2030 + T))
    c = c0 * (1 + (1 - a) / 1.8 - delta) ** T
    b_star = (1 - a) / ((c / c0) ** (1 / T) - 1 + delta)
    p = min(max((b_star - lo) / (hi - lo), 0.0), 1.0)
    assert p == pytest.approx(0.3)
    spec = UncertaintySpec(items=[Uncertain(what="capital_coefficients", relative=False,
                                            distribution=Uniform(low=lo, high=hi))], seed=11)
    n = 150
    res = reoptimise(plan, spec, n, executor=SERIAL)
    fig = res.figures()
    b = fig["0: capital_coefficients"].to_numpy()
    cap = fig["terminal_capacity"].to_numpy()
    np.testing.assert_allclose(cap, c0 * (1 + (1 - a) / b - delta) ** T, rtol=1e-7)
    est = float(np.mean(cap > c))
    half = 2.576 * math.sqrt(est * (1 - est) / n)  # 99 % normal-approximation interval
    assert abs(est - p) <= half, (est, p, half)


def test_process_pool_and_serial_give_identical_tables(small):
    plan, nominal = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Uniform(low=0.9, high=1.1),
                  correlation="independent"),
        Uncertain(what="mean_service_life", cols=["s1"],
                  distribution=Triangular(low=0.8, mode=1.0, high=1.1))], seed=2)
    serial = stress_test(plan, spec, 6, nominal=nominal, executor=SERIAL)
    with ProcessPoolExecutor(max_workers=2) as pool:
        pooled = stress_test(plan, spec, 6, nominal=nominal, executor=pool, chunk=2)
    pd.testing.assert_frame_equal(serial.table, pooled.table)
    serial_r = reoptimise(plan, spec, 4, executor=SERIAL, chunk=3)
    with ProcessPoolExecutor(max_workers=2) as pool:
        pooled_r = reoptimise(plan, spec, 4, executor=pool, chunk=1)
    a = serial_r.table.drop(serial_r.table.index[serial_r.table.quantity == "solve_seconds"])
    b = pooled_r.table.drop(pooled_r.table.index[pooled_r.table.quantity == "solve_seconds"])
    pd.testing.assert_frame_equal(a.reset_index(drop=True), b.reset_index(drop=True))


def test_draws_do_not_depend_on_order_and_correlation_is_honoured(small):
    plan, _ = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Uniform(low=0.5, high=1.5)),
        Uncertain(what="input_coefficients", rows="s0", cols=["s0", "s1"],
                  distribution=Normal(mean=1.0, sd=0.2), correlation=[[1, 0.8], [0.8, 1]])],
        seed=9)
    alone = spec.values(plan, 40)
    for i in range(5):
        spec.values(plan, i)
    assert all(np.array_equal(x, y) for x, y in zip(alone, spec.values(plan, 40), strict=True))
    shared = alone[0]
    assert np.all(shared == shared.flat[0])  # one shared draw: perfect correlation
    pairs = np.array([spec.values(plan, i)[1].ravel() for i in range(1500)])
    rho_s = stats.spearmanr(pairs[:, 0], pairs[:, 1]).statistic
    # Gaussian copula: Spearman's rho = (6/π) arcsin(ρ/2) (closed form, from memory)
    assert rho_s == pytest.approx(6 / math.pi * math.asin(0.4), abs=0.04)


def test_stress_test_finds_shortfalls_and_reports_failed_draws(small):
    plan, nominal = small
    target = float(nominal.capacity.iloc[-1]["s0"])
    plan_t = plan.model_copy(update={"targets": [gp.Target("s0", year=2036,
                                                           capacity_at_least=0.99 * target)]})
    nom = plan_t.solve()
    spec = UncertaintySpec(items=[Uncertain(what="mean_service_life", relative=False,
                                            distribution=Uniform(low=0.5, high=12.0))], seed=1)
    res = stress_test(plan_t, spec, 8, nominal=nom, executor=SERIAL, progress=False)
    failed = res.failed
    fig = res.figures()
    lives = fig["0: mean_service_life"]
    assert set(failed.draw) == set(fig.index[fig.status == "error"])
    assert failed["error"].str.contains("mean_service_life").all()
    ok = fig[fig.status != "error"]
    assert len(ok) and (lives.loc[ok.index] >= 1).all()
    p = res.probability().set_index("condition")
    # service lives of 1–12 years against the nominal 20: capacity retires faster, so the
    # terminal target is missed in every surviving draw
    assert p.loc["capacity target s0", "probability"] == 0.0
    assert p.loc["capacity target s0", "mean_shortfall"] > 0
    assert plot_fan(res, "capacity") is not None
    assert plot_probabilities(res) is not None


def test_robust_plan_is_feasible_in_every_scenario_and_costs_something(small):
    plan, nominal = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Uniform(low=0.85, high=1.15),
                  correlation="independent"),
        Uncertain(what="labour_coefficients", distribution=LogNormal(mean=1.0, sd=0.1))],
        seed=4)
    rob = robust_plan(plan, spec, 4, nominal=nominal)
    assert rob.status is gp.Status.OPTIMAL
    assert rob.objective <= nominal.objective * (1 + 1e-9)
    assert rob.cost >= -1e-9 * nominal.objective
    assert rob.scenario_objectives.min() == pytest.approx(rob.objective, rel=1e-7)
    # recomputation: each scenario alone, starts fixed to the robust ones, must be feasible
    # with no shortfall (HiGHS solves it, the elastic re-solve finds nothing short)
    z = rob.starts.to_numpy()
    for p in rob.plans:
        lp = fix_starts(build(p.lowered()), z)
        out = gp.HighsBackend().solve(lp)
        assert out.status is gp.Status.OPTIMAL
        assert gp.results.diagnosis.diagnose(lp, subset=False).shortfalls.empty
    assert (rob.check()["max_shortfall_share"] == 0).all()
    mean = robust_plan(plan, spec, 4, nominal=nominal, criterion="mean")
    assert mean.objective >= rob.objective * (1 - 1e-9)  # the mean of scenarios ≥ their worst


@pytest.mark.parametrize("make, field", [
    (lambda: Uniform(low=2, high=1), "high"),
    (lambda: Normal(mean=-1, sd=0), "mean"),
    (lambda: Triangular(low=0, mode=2, high=1), "mode"),
    (lambda: Empirical(sample=[]), "sample"),
    (lambda: Uncertain(what="capital_coefficients", distribution=Uniform(low=1, high=1),
                       correlation=[[1, 2], [2, 1]]), "correlation"),
    (lambda: Uncertain(what="mean_service_life", rows=["s0"],
                       distribution=Uniform(low=1, high=1)), "rows"),
])
def test_bad_specifications_use_the_message_template(make, field):
    with pytest.raises(gp.InvalidInput, match=rf"{field}\S* must .*\. Got "):
        make()


def test_selection_is_checked_against_the_plan(small):
    plan, _ = small
    spec = UncertaintySpec(items=[Uncertain(what="capital_coefficients", cols=["nowhere"],
                                            distribution=Uniform(low=1, high=1))])
    with pytest.raises(gp.InvalidInput, match=r"items\.0\.cols must name .* Got \['nowhere'\]"):
        reoptimise(plan, spec, 2, executor=SERIAL)
    with pytest.raises(gp.InvalidInput, match="draws must"):
        reoptimise(plan, UncertaintySpec(items=spec.items[:0] + [Uncertain(
            what="capital_coefficients", distribution=Uniform(low=1, high=1))]), 0)


# -- the plan file's uncertainty section ----------------------------------------------------

SECTION = """
uncertainty:
  seed: 7
  draws: 12
  items:
    - what: capital_coefficients
      correlation: independent
      distribution: {kind: uniform, low: 0.9, high: 1.1}
    - what: mean_service_life
      cols: [energy]
      distribution: {kind: triangular, low: 0.8, mode: 1.0, high: 1.1}
    - what: final_demand
      distribution: {kind: lognormal, mean: 1.0, sd: 0.05}
"""


def _demo_copy(tmp_path, section):
    import shutil

    from growthplan.demo import DEMO_DIR, PLAN_FILE

    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    path = tmp_path / "plan.yaml"
    path.write_text((DEMO_DIR / PLAN_FILE).read_text() + section)
    return path


def test_plan_file_section_is_read_checked_and_in_the_schema(tmp_path):
    path = _demo_copy(tmp_path, SECTION)
    plan = gp.load_plan_file(path)
    spec = gp.load_uncertainty(path)
    assert spec.seed == 7 and spec.draws == 12 and len(spec.items) == 3
    assert spec.items[1].cols == ["energy"] and spec.items[1].distribution.mode == 1.0
    assert spec == UncertaintySpec(seed=7, draws=12, items=[
        Uncertain(what="capital_coefficients", correlation="independent",
                  distribution=Uniform(low=0.9, high=1.1)),
        Uncertain(what="mean_service_life", cols=["energy"],
                  distribution=Triangular(low=0.8, mode=1.0, high=1.1)),
        Uncertain(what="final_demand", distribution=LogNormal(mean=1.0, sd=0.05))])
    spec.check(plan)
    assert gp.load_uncertainty(_demo_copy(tmp_path, "")) is None
    schema = gp.plan_file_schema()
    assert "uncertainty" in schema["properties"]
    assert schema["properties"]["uncertainty"]["description"]
    props = schema["$defs"]["Uncertain"]["properties"]
    assert all(props[k].get("description") for k in ("what", "rows", "cols", "distribution",
                                                     "relative", "correlation"))
    assert schema["$defs"]["UncertaintySpec"]["properties"]["draws"]["description"]


@pytest.mark.parametrize("section, match", [
    (SECTION.replace("cols: [energy]", "cols: [enrgy]"),
     r"plan.yaml, line \d+: uncertainty.items.1.cols must name entries of mean_service_life"),
    (SECTION.replace("high: 1.1}\n    - what: mean", "high: 0.5}\n    - what: mean"),
     r"plan.yaml, line \d+: .*high must be >= low"),
    (SECTION.replace("draws: 12", "draws: 0"), r"line \d+: .*draws must"),
    (SECTION.replace("what: final_demand", "what: import_prices"),
     r"line \d+: uncertainty.items.2.what must name a block the plan has"),
])
def test_plan_file_section_errors_name_file_field_and_line(tmp_path, section, match):
    path = _demo_copy(tmp_path, section)
    with pytest.raises(gp.InvalidInput, match=match):
        gp.load_plan_file(path)


def test_trade_prices_can_be_uncertain():
    plan = make_plan(economy(3), 5).model_copy(update={"trade": gp.Trade(
        import_prices={"s0": 1.2}, export_prices={"s1": 0.9, "s2": 0.8},
        import_ceilings={"s0": 5.0}, export_ceilings={"s1": 5.0, "s2": 5.0})})
    spec = UncertaintySpec(items=[
        Uncertain(what="export_prices", cols="s2", relative=False,
                  distribution=Uniform(low=0.5, high=0.6))], seed=3)
    drawn = spec.draw(plan, 0)
    got = drawn.trade.export_prices
    assert got["s1"] == 0.9 and 0.5 <= got["s2"] <= 0.6
    assert got["s2"] == spec.values(plan, 0)[0][0, 0]


def test_stress_draws_of_a_plan_in_large_units_are_certified():
    # the demo's starts are thousands of units: held fixed (or as ceilings) their reduced
    # costs times those values must count in the optimality certificate, or every draw
    # ends "not_verified"
    plan = gp.demo_plan()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        nominal = plan.solve()
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", correlation="independent",
                  distribution=Uniform(low=0.9, high=1.1)),
        Uncertain(what="mean_service_life", cols="energy",
                  distribution=Triangular(low=0.7, mode=1.0, high=1.1))], seed=7)
    res = stress_test(plan, spec, 3, nominal=nominal, executor=SERIAL)
    assert set(res.table["status"]) <= {"met", "short"}, set(res.table["status"])
    assert res.table[res.table.quantity == "starts_cut"]["value"].isin([0.0, 1.0]).all()


def test_warm_pool_and_a_dask_cluster_give_the_serial_table(small):
    # the analysis's own pool sends the plan once per worker; a Dask cluster gets it with
    # every chunk; both must give the serial table exactly (same seed, same draws)
    plan, nominal = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Uniform(low=0.9, high=1.1),
                  correlation="independent"),
        Uncertain(what="labour_growth", relative=False,
                  distribution=Uniform(low=0.0, high=0.02))], seed=12)

    def same(a, b):
        keep_a = a.table[a.table.quantity != "solve_seconds"].reset_index(drop=True)
        keep_b = b.table[b.table.quantity != "solve_seconds"].reset_index(drop=True)
        pd.testing.assert_frame_equal(keep_a, keep_b)

    serial = reoptimise(plan, spec, 5, executor=SERIAL)
    same(serial, reoptimise(plan, spec, 5, max_workers=2, chunk=2))
    stressed = stress_test(plan, spec, 3, nominal=nominal, executor=SERIAL)
    same(stressed, stress_test(plan, spec, 3, nominal=nominal, max_workers=2, chunk=1))
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        same(serial, reoptimise(plan, spec, 5, executor=client.get_executor(), chunk=1,
                                in_flight=2))


def test_draws_in_the_state_form_match_the_expression_form_on_any_executor(small):
    """Re-optimised draws solved in the state form of capacity: the same table serially
    and on a pool, and the same figures as the expression form (the same LP written
    another way, so equal to solver tolerance)."""
    plan, _ = small
    spec = UncertaintySpec(items=[
        Uncertain(what="capital_coefficients", distribution=Uniform(low=0.9, high=1.1),
                  correlation="independent")], seed=4)

    def table(result):
        t = result.table
        return t[t.quantity != "solve_seconds"].reset_index(drop=True)

    state = {"formulation": "state", "method": "ipm"}
    serial = table(reoptimise(plan, spec, 4, executor=SERIAL, solve_options=state))
    with ProcessPoolExecutor(max_workers=2) as pool:
        pooled = table(reoptimise(plan, spec, 4, executor=pool, chunk=1, solve_options=state))
    pd.testing.assert_frame_equal(serial, pooled)
    expression = table(reoptimise(plan, spec, 4, executor=SERIAL,
                                  solve_options={"formulation": "expression", "method": "ipm"}))
    pd.testing.assert_frame_equal(serial.drop(columns="value"), expression.drop(columns="value"))
    objective = serial.quantity == "objective"
    assert objective.sum() == 4
    np.testing.assert_allclose(serial.value[objective], expression.value[objective], rtol=1e-8)
