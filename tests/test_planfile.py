"""Plan files: round trip through the models, schema, one clear message per malformed file."""

from __future__ import annotations

import json
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
