"""Fuzzed bad input: every malformed economy, plan or plan file ends in a growthplan
error (a ValueError) naming the field; never another exception, a hang or a result."""

from __future__ import annotations

import copy
import shutil
from collections import Counter

import numpy as np
import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import growthplan as gp
from growthplan.demo import DEMO_DIR
from growthplan.io.planfile import load_plan_file

CASES: Counter = Counter()  # reported at the end of the run (conftest)

NAMES = ["a", "b", "c"]


def base_economy() -> dict:
    return {
        "sectors": list(NAMES),
        "input_coefficients": [[0.1, 0.2, 0.0], [0.1, 0.1, 0.2], [0.0, 0.1, 0.1]],
        "capital_coefficients": [[0.5, 0.3, 0.2], [0.1, 0.2, 0.1], [0.0, 0.0, 0.0]],
        "labour_coefficients": [[0.3, 0.2, 0.4]],
        "consumption_basket": [1.0, 0.5, 0.2],
        "capital": {s: {"initial_capacity": 100.0, "mean_service_life": 15.0} for s in NAMES},
    }


BAD_NUMBERS = st.sampled_from([float("nan"), float("inf"), -float("inf"), -1.0, -1e-9,
                               "12,5", "n/a", "", None, [1.0], {"x": 1}])


@st.composite
def broken_economy(draw):
    e = base_economy()
    kind = draw(st.sampled_from([
        "cell", "shape", "names_dup", "names_empty", "names_type", "capital_missing",
        "capital_unknown", "life", "lead", "spending", "util", "basket", "labour_shape",
        "unproductive", "capital_cell", "retirement", "shape_param"]))
    i, j = draw(st.integers(0, 2)), draw(st.integers(0, 2))
    s = NAMES[i]
    if kind == "cell":
        field = draw(st.sampled_from(["input_coefficients", "capital_coefficients"]))
        e[field][i][j] = draw(BAD_NUMBERS)
    elif kind == "shape":
        field = draw(st.sampled_from(["input_coefficients", "capital_coefficients"]))
        e[field] = draw(st.sampled_from([[[0.1, 0.1]], [[0.1] * 4] * 3, [0.1, 0.2, 0.3], []]))
    elif kind == "names_dup":
        e["sectors"][j] = e["sectors"][(j + 1) % 3]
        field = "sectors"
    elif kind == "names_empty":
        e["sectors"][j] = draw(st.sampled_from(["", "   ", "\t"]))
        field = "sectors"
    elif kind == "names_type":
        e["sectors"] = draw(st.sampled_from(["abc", 3, [1, 2, 3], None]))
        field = "sectors"
    elif kind == "capital_missing":
        del e["capital"][s]
        field = "capital"
    elif kind == "capital_unknown":
        e["capital"]["zz"] = {"initial_capacity": 1.0, "mean_service_life": 5.0}
        field = "capital"
    elif kind == "life":
        e["capital"][s]["mean_service_life"] = draw(st.sampled_from(
            [0, -5, 0.5, float("nan"), float("inf"), "ten", None]))
        field = f"capital.{s}.mean_service_life"
    elif kind == "lead":
        e["capital"][s]["lead_time"] = draw(st.sampled_from([-1, 1.5, "2", float("nan"), True]))
        field = f"capital.{s}.lead_time"
    elif kind == "spending":
        e["capital"][s]["lead_time"] = 2
        e["capital"][s]["spending_profile"] = draw(st.sampled_from(
            [[0.5, 0.4], [1.0], [0.7, 0.7], [-0.5, 1.5], [float("nan"), 1.0]]))
        field = f"capital.{s}.spending_profile"
    elif kind == "util":
        e["capital"][s]["max_utilisation"] = draw(st.sampled_from([0, -0.2, 1.01, 5, "x"]))
        field = f"capital.{s}.max_utilisation"
    elif kind == "basket":
        e["consumption_basket"] = draw(st.sampled_from(
            [[1.0, 2.0], {"zz": 1.0}, [1.0, -1.0, 0.0], [1.0, float("nan"), 0.0]]))
        field = "consumption_basket"
    elif kind == "labour_shape":
        e["labour_coefficients"] = draw(st.sampled_from([[[0.1, 0.2]], [[0.1, -0.2, 0.3]]]))
        field = "labour_coefficients"
    elif kind == "unproductive":
        e["input_coefficients"][i][i] = draw(st.floats(1.0, 1e6))  # rho >= a_ii >= 1
        field = "input_coefficients"
    elif kind == "capital_cell":
        e["capital"][s]["initial_capacity"] = draw(st.sampled_from([-1.0, float("nan"), "x"]))
        field = f"capital.{s}.initial_capacity"
    elif kind == "retirement":
        e["capital"][s]["retirement"] = draw(st.sampled_from(["exp", "", "Weibull", 3]))
        field = f"capital.{s}.retirement"
    else:
        e["capital"][s]["retirement"] = "weibull"
        e["capital"][s]["shape"] = draw(st.sampled_from([0.0, -1.0, float("nan")]))
        field = f"capital.{s}.shape"
    return kind, field, e


def expect_invalid(fn, field: str):
    try:
        fn()
    except gp.InvalidInput as exc:
        assert isinstance(exc, ValueError)
        assert field in str(exc), (field, str(exc))
        return
    except Exception as exc:  # noqa: BLE001 - the point of the test
        pytest.fail(f"unexpected {type(exc).__name__}: {exc}")
    pytest.fail(f"accepted a malformed input (expected an error naming {field})")


@settings(max_examples=300, suppress_health_check=[HealthCheck.too_slow])
@given(broken_economy())
def test_malformed_economies(case):
    kind, field, data = case
    CASES["economies"] += 1
    expect_invalid(lambda: gp.Economy(**data), field)


def good_economy() -> gp.Economy:
    return gp.Economy(**base_economy())


ECON = None


def econ() -> gp.Economy:
    global ECON
    ECON = ECON or good_economy()
    return ECON


@st.composite
def broken_plan(draw):
    years = list(range(2030, 2036))
    p: dict = {"years": years, "labour": {"start": 100.0, "growth": 0.01},
               "consumption": {"floor": 1.0}, "targets": [], "terminal": {"rate": 0.02}}
    kind = draw(st.sampled_from(["years_order", "years_empty", "years_type", "target_early",
                                 "target_late", "target_sector", "target_value", "target_none",
                                 "labour", "floor", "final_demand", "ceiling", "rate",
                                 "terminal", "fall", "labour_kind", "unknown_field"]))
    if kind == "years_order":
        p["years"] = draw(st.sampled_from([[2031, 2030], [2030, 2032], [2030, 2030]]))
        field = "years"
    elif kind == "years_empty":
        p["years"] = []
        field = "years"
    elif kind == "years_type":
        p["years"] = draw(st.sampled_from(["2030", [2030.5, 2031.5], None, [True, False]]))
        field = "years"
    elif kind == "target_early":
        p["targets"] = [{"sector": "a", "year": draw(st.integers(1900, 2029)),
                         "output_at_least": 1.0}]
        field = "targets.0.year"
    elif kind == "target_late":
        p["targets"] = [{"sector": "a", "year": draw(st.integers(2036, 2100)),
                         "output_at_least": 1.0}]
        field = "targets.0.year"
    elif kind == "target_sector":
        p["targets"] = [{"sector": draw(st.sampled_from(["zz", "", "A"])), "year": 2031,
                         "output_at_least": 1.0}]
        field = "targets.0.sector"
    elif kind == "target_value":
        p["targets"] = [{"sector": "a", "year": 2031,
                         "capacity_at_least": draw(st.sampled_from([-1.0, float("nan"), "x"]))}]
        field = "targets.0"
    elif kind == "target_none":
        p["targets"] = [{"sector": "a", "year": 2031}]
        field = "targets.0"
    elif kind == "labour":
        p["labour"] = {"start": draw(st.sampled_from([-1.0, float("nan"), "x"]))}
        field = "labour"
    elif kind == "floor":
        p["consumption"] = {"floor": draw(st.sampled_from([-1.0, [1.0, 2.0], "x",
                                                           {1999: 1.0}]))}
        field = "consumption.floor"
    elif kind == "final_demand":
        p["final_demand"] = draw(st.sampled_from([{"zz": 1.0}, {"a": -1.0}, {"a": [1.0]},
                                                  [1.0, 2.0]]))
        field = "final_demand"
    elif kind == "ceiling":
        p["starts_ceilings"] = [draw(st.sampled_from([{"sector": "zz", "at_most": 1.0},
                                                      {"sector": "a", "at_most": -1.0}]))]
        field = "starts_ceilings.0"
    elif kind == "rate":
        p["objective"] = {"kind": "discounted_consumption",
                          "rate": draw(st.sampled_from([-1.0, -2.0, float("nan"), "x"]))}
        field = "objective"
    elif kind == "terminal":
        p["terminal"] = {"rate": draw(st.sampled_from([-1.0, float("inf"), "x"]))}
        field = "terminal.rate"
    elif kind == "fall":
        p["consumption"] = {"floor": 1.0, "max_fall": draw(st.sampled_from([-0.1, 1.5]))}
        field = "consumption.max_fall"
    elif kind == "labour_kind":
        p["labour"] = {"start": 1.0, "kind": "robots"}
        field = "labour.0.kind"
    else:
        p["horizon_years"] = 10
        field = "horizon_years"
    return kind, field, p


@settings(max_examples=300, suppress_health_check=[HealthCheck.too_slow])
@given(broken_plan())
def test_malformed_plans(case):
    kind, field, data = case
    CASES["plans"] += 1
    expect_invalid(lambda: gp.Plan(economy=econ(), **data), field)


@pytest.fixture(scope="module")
def plan_folder(tmp_path_factory):
    d = tmp_path_factory.mktemp("fuzz")
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, d / f)
    return d


DEMO = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())


def _paths(node, prefix=()):
    if isinstance(node, dict):
        for k, v in node.items():
            yield (*prefix, k)
            yield from _paths(v, (*prefix, k))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield (*prefix, i)
            yield from _paths(v, (*prefix, i))


PATHS = list(_paths(DEMO))
JUNK = st.one_of(st.text(max_size=8), st.integers(-10**6, 10**6), st.floats(allow_nan=True),
                 st.none(), st.lists(st.integers(), max_size=3), st.booleans(),
                 st.dictionaries(st.text(max_size=3), st.integers(), max_size=2))


@settings(max_examples=200, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(st.lists(st.tuples(st.sampled_from(PATHS), st.one_of(st.just("__delete__"), JUNK)),
                min_size=1, max_size=3))
def test_malformed_plan_files(plan_folder, edits):
    """Random edits of the demo plan file: a Plan or one InvalidInput, nothing else."""
    CASES["plan files"] += 1
    data = copy.deepcopy(DEMO)
    for path, value in edits:
        node = data
        try:
            for part in path[:-1]:
                node = node[part]
            if value == "__delete__":
                del node[path[-1]]
            else:
                node[path[-1]] = value
        except (KeyError, IndexError, TypeError):
            continue
    target = plan_folder / "fuzz.yaml"
    target.write_text(yaml.safe_dump(data), encoding="utf-8")
    try:
        plan = load_plan_file(target)
    except gp.InvalidInput as exc:
        assert "fuzz.yaml" in str(exc) or "economy tables" in str(exc) or "flows" in str(exc)
        return
    assert isinstance(plan, gp.Plan)


@settings(max_examples=100, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.binary(max_size=200))
def test_random_bytes_as_plan_file(plan_folder, blob):
    CASES["byte files"] += 1
    target = plan_folder / "bytes.yaml"
    target.write_bytes(blob)
    with pytest.raises(gp.InvalidInput):
        load_plan_file(target)


@settings(max_examples=100, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.lists(st.lists(st.one_of(st.floats(allow_nan=True, allow_infinity=True),
                                   st.text(max_size=4), st.none()),
                         min_size=2, max_size=2), min_size=2, max_size=2))
def test_malformed_tables(tmp_path, cells):
    """Tables typed by hand or exported with stray text and blanks."""
    CASES["tables"] += 1
    import pandas as pd

    z = pd.DataFrame(cells, index=["x", "y"], columns=["x", "y"], dtype=object)
    out = pd.Series({"x": 100.0, "y": 100.0})
    try:
        econ = gp.Economy.from_flows(z, out)
    except gp.InvalidInput:
        return
    assert np.all(np.isfinite(econ.input_coefficients))


@given(st.lists(st.text(min_size=1, max_size=12), min_size=2, max_size=2))
@settings(max_examples=100)
def test_random_sector_names_are_safe_for_every_file(names):
    """Any text as sector names: refused in the message template, or accepted and then
    free of control characters, distinct beyond case and normal form."""
    import unicodedata

    from growthplan.model.validation import name_key

    CASES["names"] += 1
    try:
        econ = gp.Economy(sectors=names, input_coefficients=[[0.1, 0.1], [0.1, 0.1]])
    except gp.InvalidInput as exc:
        assert " must " in str(exc) and ". Got " in str(exc)
        return
    for name in econ.names:
        assert not any(unicodedata.category(c) in ("Cc", "Cs") for c in name)
    assert len({name_key(n) for n in econ.names}) == 2
