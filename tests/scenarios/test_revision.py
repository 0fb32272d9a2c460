"""Rolling re-planning: revise a plan from a later year; compare two results."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from conftest import one_sector
from helpers import economy, make_plan

import growthplan as gp
from growthplan.results.charts import plot_compare
from growthplan.scenarios.revision import compare, revise


def _with_capital(econ: gp.Economy, **spec) -> gp.Economy:
    cap = {k: gp.CapitalSpec(initial_capacity=v.initial_capacity, **spec)
           for k, v in econ.capital.items()}
    return gp.Economy(**{**{f: getattr(econ, f) for f in type(econ).model_fields},
                         "capital": cap})


@pytest.mark.parametrize("plan, k", [
    # one sector: the terminal-capacity optimum is unique (invest all that can be spared)
    (gp.Plan(economy=one_sector(lead_time=2), years=range(2030, 2040)), 4),
    (gp.Plan(economy=one_sector(retirement="linear", life=8.0, past_growth=0.02),
             years=range(2030, 2040)), 5),
    # four sectors, Weibull lives, lead time 3: a unique optimum on this plan
    (make_plan(_with_capital(economy(4), mean_service_life=12.0, retirement="weibull",
                             shape=2.0, lead_time=3, past_growth=0.03), 10), 6),
])
def test_bellman_revising_with_own_starts_returns_the_remaining_schedules(plan, k):
    # Bellman's principle of optimality: the tail of an optimal plan is optimal for the
    # plan that starts where it left off (with a unique optimum, it is *the* optimum)
    r = plan.solve()
    revised = revise(plan, r.starts, plan.years[k])
    r2 = revised.solve()
    assert r.ok and r2.ok
    assert r2.objective == pytest.approx(r.objective, rel=1e-9)
    scale = float(r.capacity.to_numpy().max())
    for q in ("starts", "capacity", "output"):
        a = getattr(r, q).loc[r2.starts.index[0]:]
        np.testing.assert_allclose(getattr(r2, q).to_numpy(), a.to_numpy(), rtol=1e-7,
                                   atol=1e-7 * scale, err_msg=q)


@pytest.mark.parametrize("profile, lead", [("geometric", 1), ("linear", 2),
                                           ("sudden_exit", 0), ("lognormal", 2)])
def test_revised_plan_reaches_the_same_objective_for_every_profile(profile, lead):
    # the value of the revised plan equals the original's (Bellman), even where the optimal
    # schedules are not unique; this checks the initial capacity and its retirement exactly
    econ = _with_capital(economy(3), mean_service_life=10.0, retirement=profile,
                         lead_time=lead, shape=0.5 if profile == "lognormal" else None,
                         past_growth=0.04)
    plan = make_plan(econ, 9)
    r = plan.solve()
    for k in (2, 5):
        r2 = revise(plan, r.starts, plan.years[k]).solve()
        assert r2.objective == pytest.approx(r.objective, rel=1e-8), (profile, k)


def test_pipeline_and_latest_figures_come_from_the_actuals():
    econ = _with_capital(economy(2), mean_service_life=15.0, lead_time=2)
    plan = make_plan(econ, 8)
    actual = {"s0": [5.0, 6.0, 7.0, 8.0], "s1": [1.0, 2.0, 3.0, 4.0]}
    rv = revise(plan, actual, 2034, capacity={"s1": 42.0}, labour={"labour": 77.0})
    assert rv.years == list(range(2034, 2038))
    assert rv.under_construction == {"s0": [7.0, 8.0], "s1": [3.0, 4.0]}
    assert rv.economy.capital["s1"].initial_capacity == 42.0
    # s0: the initial capacity retired geometrically for 4 years plus the starts of 2030 and
    # 2031, which entered service in 2032 and 2033 (lead time 2)
    d = 1 / 15
    c0 = plan.economy.capital["s0"].initial_capacity
    expect = c0 * (1 - d) ** 4 + 5.0 * (1 - d) ** 2 + 6.0 * (1 - d)
    assert rv.economy.capital["s0"].initial_capacity == pytest.approx(expect, rel=1e-12)
    assert rv.labour[0].start == 77.0 and rv.labour[0].growth == plan.labour[0].growth


def test_compare_and_its_chart():
    plan = make_plan(economy(2), 6)
    r = plan.solve()
    r2 = revise(plan, r.starts * 0.9, 2033).solve()
    table = compare(r, r2)
    assert list(table.columns) == ["year", "sector", "quantity", "a", "b", "difference",
                                   "relative"]
    assert set(table.year) == set(range(2033, 2037))  # capacity includes the year after
    np.testing.assert_allclose(table.difference, table.b - table.a)
    assert plot_compare(table, "capacity") is not None


@pytest.mark.parametrize("kwargs, match", [
    ({"from_year": 2030}, "from_year must be a plan year after the first"),
    ({"from_year": 2033, "actuals": {"nowhere": [1, 2, 3]}}, "actuals must name sectors"),
    ({"from_year": 2033, "actuals": {"s0": [1, 2]}}, "actuals.s0 must give one start"),
    ({"from_year": 2033, "actuals": pd.DataFrame({"s0": [1.0]}, index=[2030])},
     "actuals must give a row for every year"),
    ({"from_year": 2033, "actuals": {"s0": [1, -2, 3]}}, "actuals must hold finite starts"),
])
def test_bad_revisions_use_the_message_template(kwargs, match):
    plan = make_plan(economy(2), 6)
    kwargs = {"actuals": {"s0": [1.0, 1.0, 1.0]}, **kwargs}
    with pytest.raises(gp.InvalidInput, match=match):
        revise(plan, kwargs.pop("actuals"), **kwargs)


@pytest.mark.parametrize("text, match", [
    ("year,sector\n2027,s0\n", "must have the columns year, sector, starts"),
    ("year,sector,starts\n2027.5,s0,1\n", "year must hold whole years. Got '2027.5'"),
    ("year,sector,starts\n2027,s0,x\n", "starts must hold finite numbers >= 0. Got 'x'"),
    ("year,sector,starts\n2027,s0,1\n2027,s0,2\n", "give each year and sector once"),
    ("year,sector,starts\n", "hold at least one row"),
])
def test_read_actuals_refuses_malformed_files(tmp_path, text, match):
    (tmp_path / "a.csv").write_text(text)
    with pytest.raises(gp.InvalidInput, match=match):
        gp.read_actuals(tmp_path / "a.csv")


@pytest.mark.parametrize("raw, match", [
    # the place of the bad byte counted by hand: the header line is 19 bytes, "2027," 5 more
    (b"year,sector,starts\n2027,\xff,1\n",
     r"a.csv must be UTF-8 text\. Got 'byte 24 \(0xff\) is not UTF-8'\.$"),
    (b"\xef\xbb\xbfyear,sector,starts\n2027,\xe9t\xe9,1\n",
     r"a.csv must be UTF-8 text\. Got 'byte 27 \(0xe9\) is not UTF-8'\.$"),
    (b'year,sector,starts\n"2027,s0,1\n',
     r"a.csv must be a CSV table with columns year, sector, starts\. Got 'EOF inside string "
     r"starting at row 1'\.$"),
    (b"", r"a.csv must be a CSV table with columns year, sector, starts\. Got 'no columns to "
     r"parse from file'\.$"),
])
def test_read_actuals_says_in_words_why_a_file_is_not_read(tmp_path, raw, match):
    (tmp_path / "a.csv").write_bytes(raw)
    with pytest.raises(gp.InvalidInput, match=match) as info:
        gp.read_actuals(tmp_path / "a.csv")
    assert str(tmp_path / "a.csv") in str(info.value)
    assert "Error" not in str(info.value) and "\n" not in str(info.value)


def test_read_actuals_gives_years_by_sectors_and_revise_takes_it(tmp_path):
    (tmp_path / "a.csv").write_text("year,sector,starts\n2031,s1,2.5\n2030,s0,1\n"
                                    "2031,s0,1.5\n2032,s0,0\n")
    frame = gp.read_actuals(tmp_path / "a.csv")
    assert frame.index.tolist() == [2030, 2031, 2032]
    assert frame.loc[2030, "s1"] == 0.0 and frame.loc[2031, "s1"] == 2.5
    plan = make_plan(economy(2), 6)
    from_dict = revise(plan, {"s0": [1.0, 1.5, 0.0], "s1": [0.0, 2.5, 0.0]}, 2033)
    from_file = revise(plan, frame, 2033)
    for name in ("s0", "s1"):
        assert from_file.economy.capital[name].initial_capacity == \
            from_dict.economy.capital[name].initial_capacity
    assert from_file.under_construction == from_dict.under_construction
    with pytest.raises(gp.InvalidInput, match="actuals must name sectors"):
        revise(plan, frame.rename(columns={"s1": "nowhere"}), 2033)


def test_bellman_holds_with_a_first_year_condition():
    # Bellman's principle again, on the demo plan of Arvenna: its first-year condition
    # (output near the base year) concerns 2027 alone and is not imposed on 2031
    plan = gp.demo_plan()
    r = plan.solve()
    r2 = revise(plan, r.starts, 2031).solve()
    assert r.ok and r2.ok
    assert r2.objective == pytest.approx(r.objective, rel=1e-7)
