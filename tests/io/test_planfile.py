"""Plan files: round trip through the models, schema, one clear message per malformed file."""

from __future__ import annotations

import json
import os
import re
import shutil

import numpy as np
import pytest
import yaml

import growthplan as gp
from growthplan.demo import DEMO_DIR
from growthplan.io.planfile import load_plan_file, plan_file_schema


@pytest.fixture
def folder(tmp_path):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv", "plan.yaml"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    return tmp_path


def write(folder, data, name="plan.yaml"):
    p = folder / name
    p.write_text(yaml.safe_dump(data, sort_keys=False), encoding="utf-8")
    return p


def demo_data():
    return yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())


def test_demo_file_loads_and_matches_the_models(folder):
    plan, opts = load_plan_file(folder / "plan.yaml")
    assert plan.years == list(range(2027, 2042)) and opts.method == "auto"
    assert plan.targets[0] == gp.Target("energy", year=2034, capacity_at_least=3400)
    again = gp.Plan.model_validate({**plan.model_dump(), "economy": plan.economy})
    assert again.model_dump_json() == plan.model_dump_json()


def test_toml_file(folder):
    d = demo_data()
    lines = ['[economy]', 'flows = "flows.csv"', 'capital = "capital.csv"',
             'capital_stocks = "capital_stocks.csv"',
             '[economy.consumption_basket]', 'food = 1.0',
             '[plan]', 'years = [2027, 2028, 2029]',
             '[plan.consumption]', 'floor = 1000.0',
             '[plan.objective]', 'kind = "discounted_consumption"', 'rate = 0.03']
    (folder / "plan.toml").write_text("\n".join(lines), encoding="utf-8")
    plan, _ = load_plan_file(folder / "plan.toml")
    assert plan.horizon == 3 and isinstance(plan.objective, gp.objectives.DiscountedConsumption)
    assert d["plan"]["years"]["first"] == 2027


def test_schema_is_json_and_has_the_sections():
    s = plan_file_schema()
    json.dumps(s)
    assert {"economy", "plan", "solve"} <= set(s["properties"])
    assert "targets" in s["$defs"]["PlanSection"]["properties"]


def test_bad_yaml_gives_the_line(folder):
    p = folder / "plan.yaml"
    p.write_text("economy:\n  flows: flows.csv\nplan: [unclosed\n", encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match=r"line \d+.*not valid YAML"):
        load_plan_file(p)


def test_unknown_field_names_file_field_and_line(folder):
    d = demo_data()
    d["plan"]["labour"]["grwth"] = 0.01
    p = write(folder, d)
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(p)
    msg = str(err.value)
    assert str(p) in msg and "labour" in msg and "grwth" in msg and "line" in msg


def test_wrong_type(folder):
    d = demo_data()
    d["plan"]["targets"][0]["year"] = "soon"
    with pytest.raises(gp.InvalidInput, match="targets.0.year"):
        load_plan_file(write(folder, d))


def test_missing_table_file(folder):
    d = demo_data()
    d["economy"]["capital"] = "missing.csv"
    with pytest.raises(gp.InvalidInput, match="missing.csv"):
        load_plan_file(write(folder, d))


def test_table_with_wrong_labels(folder):
    text = (folder / "capital_stocks.csv").read_text().replace("energy", "power", 1)
    (folder / "capital_stocks.csv").write_text(text)
    with pytest.raises(gp.InvalidInput, match="capital_stocks"):
        load_plan_file(folder / "plan.yaml")


def test_non_utf8_and_unknown_suffix(folder):
    p = folder / "plan.yaml"
    p.write_bytes(b"economy:\n  flows: caf\xe9.csv\n")
    with pytest.raises(gp.InvalidInput, match="UTF-8"):
        load_plan_file(p)
    q = folder / "plan.txt"
    q.write_text("x")
    with pytest.raises(gp.InvalidInput, match="yaml"):
        load_plan_file(q)


def test_yaml_is_loaded_safely(folder):
    p = folder / "plan.yaml"
    p.write_text("economy: !!python/object/apply:os.system ['echo hacked']\n")
    with pytest.raises(gp.InvalidInput, match="not valid YAML"):
        load_plan_file(p)


def test_save_and_load_round_trip(tmp_path):
    from growthplan.demo import demo_plan
    from growthplan.io.planfile import save_plan_file

    plan = demo_plan()
    path = save_plan_file(plan, tmp_path / "saved.yaml")
    assert (tmp_path / "saved_capital.csv").exists()
    again, _ = load_plan_file(path)
    assert again.economy == plan.economy
    assert again.model_dump_json() == plan.model_dump_json()
    a, b = plan.compile(), again.compile()
    assert (a.matrix != b.matrix).nnz == 0 and np.array_equal(a.row_lower, b.row_lower)
    with pytest.raises(gp.InvalidInput, match="overwrite"):
        save_plan_file(plan, path)
    save_plan_file(plan, path, overwrite=True)


def test_coefficient_tables_need_one_source(folder):
    d = demo_data()
    d["economy"]["input_coefficients"] = "a.csv"
    with pytest.raises(gp.InvalidInput, match="exactly one of flows and input_coefficients"):
        load_plan_file(write(folder, d))


# -- hostile plan files (regressions) ------------------------------------------------------

def test_billion_laughs_is_refused_before_expansion(folder):
    # the classic 9-level entity expansion (common practice: "billion laughs"), in YAML
    # aliases; expanded it would be 10**9 strings
    lines = ['l0: &l0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    lines += [f"l{i}: &l{i} [" + ", ".join([f"*l{i - 1}"] * 9) + "]" for i in range(1, 10)]
    text = (folder / "plan.yaml").read_text().replace(
        "  labour: {start: 4900, growth: 0.012}",
        "  labour: {series: *l9}")
    p = folder / "laughs.yaml"
    p.write_text("\n".join(lines) + "\n" + text)
    assert len(p.read_bytes()) < 3000
    with pytest.raises(gp.InvalidInput, match=r"laughs.yaml, line 1: .*anchors or aliases"):
        load_plan_file(p)


def test_duplicate_key_names_key_and_both_lines(folder):
    p = folder / "plan.yaml"
    p.write_text(p.read_text().replace("  final_demand_growth: 0.03\n",
                                       "  final_demand_growth: 0.03\n  terminal: {rate: 0.1}\n"))
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(p)
    msg = str(err.value)
    lines = p.read_text().splitlines()
    first = next(i for i, s in enumerate(lines) if s.startswith("  terminal:")) + 1
    second = max(i for i, s in enumerate(lines) if s.startswith("  terminal:")) + 1
    assert f"line {second}" in msg and f"first on line {first}" in msg and "'terminal'" in msg


@pytest.mark.parametrize("series", ["{2027: 9000, '2027': 9100}",
                                    "{2027.7: 9000}"])
def test_year_keys_must_be_whole_and_once(folder, series):
    p = folder / "plan.yaml"
    p.write_text(p.read_text().replace("    floor: 9000 ", f"    floor: {series} "))
    with pytest.raises(gp.InvalidInput, match="2027"):
        load_plan_file(p)


@pytest.mark.parametrize("years, match", [("{first: on, last: 2041}", "whole years"),
                                          ("{first: 2027, last: yes}", "whole years"),
                                          ("{first: 2027.5, last: 2041}", "whole years"),
                                          ("{first: 2027, last: 9999}", "at most 1000 years"),
                                          ("[2027, true]", "whole years")])
def test_years_refused_at_file_level(folder, years, match):
    p = folder / "plan.yaml"
    p.write_text(p.read_text().replace("{first: 2027, last: 2041}", years))
    with pytest.raises(gp.InvalidInput, match=match):
        load_plan_file(p)


def test_key_yaml_reads_as_false_is_refused(folder):
    # YAML 1.1 reads an unquoted no/off as false (common practice: the "Norway problem")
    p = folder / "plan.yaml"
    p.write_text(p.read_text().replace("    food: 0.32", "    no: 0.32"))
    with pytest.raises(gp.InvalidInput, match="key 'no'.*false"):
        load_plan_file(p)


def test_deep_nesting_and_size_are_refused(folder):
    p = folder / "plan.yaml"
    p.write_text("x: " + "[" * 150 + "]" * 150 + "\n" + p.read_text())
    with pytest.raises(gp.InvalidInput, match="nest at most 100"):
        load_plan_file(p)
    big = folder / "big.yaml"
    with open(big, "wb") as f:
        f.truncate((5 << 20) + 1)
    with pytest.raises(gp.InvalidInput, match="5 MB"):
        load_plan_file(big)


@pytest.mark.parametrize("name", ["../flows.csv", "../../../../../../../etc/passwd",
                                  "/etc/passwd", "outside.csv"])
def test_tables_stay_in_the_plan_folder(folder, name):
    inner = folder / "inner"
    inner.mkdir()
    (inner / "capital.csv").write_text((folder / "capital.csv").read_text())
    (inner / "capital_stocks.csv").write_text((folder / "capital_stocks.csv").read_text())
    os.symlink(folder / "flows.csv", inner / "outside.csv")
    d = demo_data()
    d["economy"]["flows"] = name
    p = write(inner, d)
    with pytest.raises(gp.InvalidInput, match="plan file's folder"):
        load_plan_file(p)
    if name in ("../flows.csv", "outside.csv"):
        plan, _ = load_plan_file(p, allow_outside=True)
        assert plan.economy.n == 10


@pytest.mark.parametrize("kind", ["folder", "fifo", "device", "huge"])
def test_special_table_files_are_not_read(folder, kind, monkeypatch):
    from growthplan.statistics import tables

    d = demo_data()
    target = folder / "special.csv"
    if kind == "folder":
        target.mkdir()
    elif kind == "fifo":
        os.mkfifo(target)  # reading it would block for ever
    elif kind == "device":
        os.symlink("/dev/zero", target)  # reading it would never end
    else:
        monkeypatch.setattr(tables, "TABLE_MAX_BYTES", 500)
        target.write_text((folder / "flows.csv").read_text())
    d["economy"]["flows"] = "special.csv"
    with pytest.raises(gp.InvalidInput, match="special.csv"):
        load_plan_file(write(folder, d), allow_outside=kind == "device")


def test_os_errors_name_the_file_on_one_line(folder):
    (folder / "dir.yaml").mkdir()
    for p in (folder / "dir.yaml", folder / "missing.yaml"):
        with pytest.raises(gp.InvalidInput) as err:
            load_plan_file(p)
        assert p.name in str(err.value) and "\n" not in str(err.value)


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0,
                    reason="permissions do not bind the superuser")
def test_unreadable_plan_file(folder):
    p = folder / "plan.yaml"
    p.chmod(0)
    try:
        with pytest.raises(gp.InvalidInput, match="permission denied"):
            load_plan_file(p)
    finally:
        p.chmod(0o644)


def test_long_values_are_shortened_in_messages(folder):
    d = demo_data()
    d["plan"]["objective"]["kind"] = "x" * 100_000
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(write(folder, d))
    assert len(str(err.value)) < 1000
    d = demo_data()
    d["economy"]["flows"] = "y" * 100_000 + ".csv"
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(write(folder, d))
    assert len(str(err.value)) < 1000


def test_numeric_and_na_sector_names_survive_the_round_trip(tmp_path):
    from growthplan.demo import demo_economy

    econ = demo_economy()
    names = ["NA", "01", "1e3", "null", "None", "nan", "2030", "true", "1.50", "N/A"]
    renamed = gp.Economy(
        sectors=names, input_coefficients=econ.A.to_numpy(),
        capital_coefficients=econ.B.to_numpy(), labour_coefficients=econ.labour_coefficients,
        capital=dict(zip(names, econ.capital.values(), strict=True)),
        consumption_basket=econ.consumption_basket)
    plan = gp.Plan(economy=renamed, years=range(2027, 2031), labour={"start": 4900.0},
                   consumption={"floor": 9000.0}, final_demand={"01": 100.0, "NA": 50.0},
                   targets=[gp.Target("1e3", year=2029, capacity_at_least=10.0)])
    path = gp.save_plan_file(plan, tmp_path / "odd.yaml")
    again, _ = load_plan_file(path)
    assert again.economy.names == names
    assert again.economy == renamed
    assert again.model_dump_json() == plan.model_dump_json()


def test_save_leaves_nothing_when_a_table_fails(tmp_path, monkeypatch):
    from growthplan.demo import demo_plan
    from growthplan.io import planfile

    calls = []

    def failing(key, frame, path):
        calls.append(key)
        if len(calls) == 2:
            raise KeyboardInterrupt
        frame.to_csv(path)

    monkeypatch.setattr(planfile, "_write_csv", failing)
    with pytest.raises(KeyboardInterrupt):
        planfile.save_plan_file(demo_plan(), tmp_path / "p.yaml")
    assert list(tmp_path.iterdir()) == []


def test_plan_file_inputs_protect_them_from_exports(folder):
    from growthplan.io import atomic_folder, plan_file_inputs

    inputs = plan_file_inputs(folder / "plan.yaml")
    assert sorted(p.name for p in inputs) == ["capital.csv", "capital_stocks.csv",
                                              "flows.csv", "plan.yaml"]
    with pytest.raises(gp.InvalidInput, match="input files"):
        with atomic_folder(folder, overwrite=True, protect=inputs):
            pass


def test_table_source_of_the_wrong_type(folder):
    with pytest.raises(gp.InvalidInput, match="capital must be a DataFrame or the path"):
        gp.Economy.from_tables(folder / "flows.csv", capital={"energy": {}})


# --- hostile plan files: every message in the library's template -------------------

def _cell(table, row, column, value):
    """Replace one cell of a demo table (by row and column label)."""
    def change(folder, d):
        lines = (folder / table).read_text().splitlines()
        head = lines[0].split(",")
        for i, line in enumerate(lines):
            cells = line.split(",")
            if cells[0] == row:
                cells[head.index(column)] = value
                lines[i] = ",".join(cells)
        (folder / f"bad_{table}").write_text("\n".join(lines) + "\n")
        d["economy"][table[:-4]] = f"bad_{table}"
    return change


def _plan(change):
    return lambda folder, d: change(d["plan"])


HOSTILE_MESSAGES = {  # name: (change, the message from the field on)
    "misspelt plan key": (_plan(lambda p: p.update(labor=p.pop("labour"))),
                          "plan.labor must be a known field (did you mean 'labour'?). "
                          "Got 'labor'."),
    "misspelt nested key": (_plan(lambda p: p["consumption"].update(flor=1)),
                            "plan.consumption.flor must be a known field (did you mean "
                            "'floor'?)"),
    "misspelt target key": (_plan(lambda p: p["targets"][0].update(capacity_atleast=3)),
                            "plan.targets.0.capacity_atleast must be a known field (did you "
                            "mean 'capacity_at_least'?)"),
    "misspelt table key": (lambda f, d: d["economy"].update(capital_stock="x.csv"),
                           "economy.capital_stock must be a known field (did you mean "
                           "'capital_stocks'?)"),
    "misspelt section": (lambda f, d: d.update(solver=d.pop("solve")),
                         "solver must be a known field (did you mean 'solve'?)"),
    "unknown key, nothing close": (_plan(lambda p: p.update(zzz=1)),
                                   "plan.zzz must be a known field (one of "),
    "misspelt objective kind": (_plan(lambda p: p.update(objective={"kind": "terminal_capcity"})),
                                "plan.objective.kind must be one of 'terminal_capacity', "),
    "objective without kind": (_plan(lambda p: p.update(objective={"rate": 0.1})),
                               "plan.objective.kind must be given: one of 'terminal_capacity'"),
    "unknown key of an objective": (
        _plan(lambda p: p.update(objective={"kind": "terminal_capacity", "bogus": 1})),
        "plan.objective.bogus must be a known field"),
    "missing field of an objective": (_plan(lambda p: p.update(objective={"kind": "fastest"})),
                                      "plan.objective.max_years must be given. Got nothing."),
    "unknown kind in a weighted term": (
        _plan(lambda p: p.update(objective={"kind": "weighted", "terms": [
            {"objective": {"kind": "nope"}, "weight": 1}]})),
        "plan.objective.terms.0.objective.kind must be one of 'terminal_capacity'"),
    "text for a number": (_plan(lambda p: p["targets"][0].update(capacity_at_least="lots")),
                          "plan.targets.0.capacity_at_least must be a number. Got 'lots'."),
    "two conditions in a target": (_plan(lambda p: p["targets"][0].update(output_at_least=3)),
                                   "plan.targets.0 must give exactly one of output_at_least"),
    "number for a section": (_plan(lambda p: p.update(terminal=0.04)),
                             "plan.terminal must be a mapping of its fields. Got 0.04."),
    "text for a flag": (_plan(lambda p: p.update(allow_high_rates="maybe")),
                        "plan.allow_high_rates must be true or false. Got 'maybe'."),
    "share above 1": (_plan(lambda p: p["consumption"].update(max_fall=2)),
                      "plan.consumption.max_fall must be at most 1"),
    "one labour supply, text": (_plan(lambda p: p["labour"].update(start="many")),
                                "plan.labour.start must be a number. Got 'many'."),
    "misspelt method": (lambda f, d: d["solve"].update(method="simplx"),
                        "solve.method must be 'auto' or one of simplex"),
    "zero time limit": (lambda f, d: d["solve"].update(time_limit=0),
                        "solve.time_limit must be greater than 0"),
    "text in a year list": (_plan(lambda p: p.update(under_construction={"energy": [1, "x"]})),
                            "plan.under_construction.energy.1 must be a number. Got 'x'."),
    "text in the capital table": (_cell("capital.csv", "mining", "initial_capacity", "big"),
                                  "capital.mining.initial_capacity must be a number. Got 'big'."),
    "text in the flows table": (_cell("flows.csv", "energy", "food", "lots"),
                                "flows (bad_flows.csv)[energy, food] must be a number. "
                                "Got 'lots'."),
    "text in the stocks table": (_cell("capital_stocks.csv", "energy", "food", "x"),
                                 "capital_stocks (bad_capital_stocks.csv)[energy, food] must be a "
                                 "number. Got 'x'."),
}
PYDANTIC_WORDS = ("Input should", "input should", "input tag", "found using", "valid number",
                  "unable to", "Value error", "value error", "discriminator", "dictionary or "
                  "instance", "Field required", "Extra inputs")


def _class_names():
    from growthplan.io import planfile
    from growthplan.model import economy, objectives, plan
    from growthplan.model.validation import Model

    return {name for module in (plan, objectives, economy, planfile)
            for name, c in vars(module).items()
            if isinstance(c, type) and issubclass(c, Model)}


@pytest.mark.parametrize("name", list(HOSTILE_MESSAGES))
def test_hostile_plan_files_get_the_template(folder, name):
    change, expected = HOSTILE_MESSAGES[name]
    d = demo_data()
    change(folder, d)
    p = write(folder, d, "hostile.yaml")
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(p)
    msg = str(err.value)
    assert msg.startswith(str(p)) and expected in msg, msg
    assert "\n" not in msg and re.search(r" must .+\. Got .+\.", msg), msg
    assert not [w for w in PYDANTIC_WORDS if w in msg], msg
    path = msg.split(": ", 1)[1].split(" must ")[0]
    assert not set(re.split(r"[.\[\], ]+", path)) & _class_names(), path
    for tag in ("terminal_capacity", "weighted", "fastest", "function-after"):
        assert f".{tag}." not in path, path
    if "table" not in name:  # the plan file's own fields: the line is named
        assert re.match(rf"{re.escape(str(p))}, line \d+: ", msg), msg


def test_suggestions_only_for_close_names():
    from growthplan.errors import suggest

    assert suggest("labor", ["years", "labour"]) == "did you mean 'labour'?"
    assert suggest("labor", ["years", "labour"], sentence=True) == "Did you mean 'labour'?"
    assert suggest("zzz", ["years", "labour"]) == ""


def test_several_problems_each_with_the_section(folder):
    d = demo_data()
    d["plan"]["consumption"]["max_fall"] = 2
    d["plan"]["targets"][0]["year"] = "soon"
    with pytest.raises(gp.InvalidInput) as err:
        load_plan_file(write(folder, d))
    lines = str(err.value).splitlines()
    assert lines[0].endswith("2 problems:")
    assert lines[1].strip().startswith("plan.consumption.max_fall must be at most 1")
    assert lines[2].strip() == "plan.targets.0.year must be a whole number. Got 'soon'."
