"""The published JSON Schema of plan files agrees with the loader.

Every shipped plan file and every file ``save_plan_file`` writes is valid
under the schema (checked with the ``jsonschema`` reference validator); what
the loader refuses for a misspelt key or a wrong kind the schema refuses too;
every property says what it is.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import jsonschema
import pytest
import yaml
from click.testing import CliRunner

import growthplan as gp
from growthplan.backends.highs import METHODS
from growthplan.cli import main
from growthplan.demo import DEMO_DIR
from growthplan.io.planfile import SolveOptions, load_plan_file, plan_file_schema

ROOT = Path(__file__).resolve().parents[2]
# plan files shipped in the repository and the package (economy specs, which build
# an economy from statistical tables, have their own schema and tests)
SHIPPED = sorted(p for folder in ("data", "notebooks", "growthplan/demo_data")
                 if (ROOT / folder).exists()
                 for pattern in ("*.yaml", "*.yml", "*.toml")
                 for p in (ROOT / folder).rglob(pattern) if "supply_use" not in p.parts)


@pytest.fixture(scope="module")
def validator():
    schema = plan_file_schema()
    jsonschema.Draft202012Validator.check_schema(schema)  # a well-formed schema
    return jsonschema.Draft202012Validator(schema)


def read(path: Path):
    text = path.read_text(encoding="utf-8")
    if path.suffix == ".toml":
        import tomllib

        return tomllib.loads(text)
    return yaml.safe_load(text)


def test_the_demo_file_is_shipped():
    assert DEMO_DIR / "plan.yaml" in SHIPPED and ROOT / "data" / "demo" / "plan.yaml" in SHIPPED


@pytest.mark.parametrize("path", SHIPPED, ids=[str(p.relative_to(ROOT)) for p in SHIPPED])
def test_every_shipped_plan_file_is_valid_under_the_schema(validator, path):
    errors = [f"{list(e.absolute_path)}: {e.message}" for e in validator.iter_errors(read(path))]
    assert errors == []
    load_plan_file(path)  # and the loader takes it


def plans():
    demo = gp.demo_plan()
    econ = demo.economy
    yield "demo", demo
    yield "discounted, list of labour", demo.model_copy(update={
        "objective": gp.objectives.DiscountedConsumption(rate=0.03),
        "labour": [gp.LabourSupply(start=4900, growth=0.01)]})
    yield "trade and technical change", gp.Plan(
        economy=econ, years=range(2027, 2032), labour=gp.LabourSupply(start=4900),
        consumption=gp.Consumption(floor=[9000, 9100, 9200, 9300, 9400]),
        trade=gp.Trade(import_prices={"machinery": 1.2}, export_prices={"food": 0.9},
                       inflow=100.0),
        technical_change=gp.TechnicalChange(input_rate={"energy": -0.01}),
        starts_ceilings=[gp.StartsCeiling("energy", at_most=500.0)],
        terminal=gp.TerminalGrowth(rate=0.03),
        objective=gp.objectives.Lexicographic([gp.objectives.LeastLabour(),
                                               gp.objectives.TerminalCapacity()]))


@pytest.mark.parametrize(("name", "plan"), list(plans()), ids=[n for n, _ in plans()])
def test_files_save_plan_file_writes_are_valid_and_compact(validator, tmp_path, name, plan):
    path = gp.save_plan_file(plan, tmp_path / "saved.yaml",
                             solve=SolveOptions(method="ipm", time_limit=60))
    data = yaml.safe_load(path.read_text(encoding="utf-8"))
    assert [f"{list(e.absolute_path)}: {e.message}" for e in validator.iter_errors(data)] == []
    section = data["plan"]
    assert section["years"] == {"first": plan.years[0], "last": plan.years[-1]}
    assert "allow_high_rates" not in section  # a default is left out
    if len(plan.labour) == 1:
        assert isinstance(section["labour"], dict) and "kind" not in section["labour"]
    assert data["solve"] == {"method": "ipm", "time_limit": 60}
    for target in section.get("targets", []):
        assert None not in target.values()
    again = load_plan_file(path)
    assert again.model_dump_json() == plan.model_dump_json()
    assert SolveOptions(**again.solve_options) == SolveOptions(method="ipm", time_limit=60)


def test_default_solver_settings_are_left_out(tmp_path):
    path = gp.save_plan_file(gp.demo_plan(), tmp_path / "saved.yaml")
    assert "solve" not in yaml.safe_load(path.read_text(encoding="utf-8"))


def properties(node, path=()):
    """Every (path, property schema) in a schema."""
    if isinstance(node, dict):
        for name, sub in node.get("properties", {}).items():
            yield (*path, name), sub
        for key, value in node.items():
            yield from properties(value, (*path, key))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from properties(value, (*path, i))


def test_every_property_has_a_description():
    found = list(properties(plan_file_schema()))
    assert len(found) > 80
    bare = [".".join(map(str, p)) for p, sub in found
            if len(sub.get("description", "")) < 12 or "``" in sub["description"]]
    assert bare == []
    for name, definition in plan_file_schema()["$defs"].items():
        assert definition.get("description"), name
        assert "Parameters" not in definition["description"], name


def test_the_schema_lists_exactly_the_methods_accepted():
    method = plan_file_schema()["$defs"]["SolveOptions"]["properties"]["method"]
    assert method["enum"] == ["auto", *METHODS]


def test_the_command_prints_the_same_schema():
    res = CliRunner().invoke(main, ["schema"])
    assert res.exit_code == 0 and json.loads(res.stdout) == plan_file_schema()


REFUSED = {  # what the loader refuses, the schema refuses too
    "misspelt plan key": lambda d: d["plan"].update(labor=d["plan"].pop("labour")),
    "misspelt section": lambda d: d.update(solver=d.pop("solve")),
    "years without last": lambda d: d["plan"].update(years={"first": 2027}),
    "years as text": lambda d: d["plan"].update(years="2027-2041"),
    "unknown objective": lambda d: d["plan"].update(objective={"kind": "most"}),
    "objective without kind": lambda d: d["plan"].update(objective={"rate": 0.1}),
    "unknown method": lambda d: d["solve"].update(method="fastest"),
    "time limit 0": lambda d: d["solve"].update(time_limit=0),
    "target as text": lambda d: d["plan"]["targets"][0].update(capacity_at_least="lots"),
    "labour list item misspelt": lambda d: d["plan"].update(labour=[{"strat": 1}]),
}


@pytest.mark.parametrize("change", list(REFUSED))
def test_what_the_loader_refuses_the_schema_refuses(validator, tmp_path, change):
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    data = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text(encoding="utf-8"))
    REFUSED[change](data)
    (tmp_path / "plan.yaml").write_text(yaml.safe_dump(data), encoding="utf-8")
    assert not validator.is_valid(data)
    with pytest.raises(gp.InvalidInput):
        load_plan_file(tmp_path / "plan.yaml")
