"""The economy spec: from the Arvenna supply and use tables to an economy, a folder, a plan."""

from __future__ import annotations

import csv
import shutil
import subprocess
import sys

import jsonschema
import numpy as np
import pytest
import yaml
from conftest import assert_optimal

import growthplan as gp
from growthplan.statistics.build import build_economy, economy_spec_schema, write_economy

DEMO = gp.DEMO_DIR / "supply_use"
P = ["agri", "food", "machinery", "construction", "services"]
I = ["AGR", "FOOD", "MACH", "CONS", "SERV"]


@pytest.fixture
def demo(tmp_path):
    folder = tmp_path / "tables"
    shutil.copytree(DEMO, folder)
    return folder


def _grid(path, first_row, codes_col=0, skip=1):
    """Rows of a CSV as {row code: {column code: float}} (plain csv module, no library code)."""
    rows = list(csv.reader(path.open(encoding="utf-8")))
    header = rows[first_row - 1]
    out = {}
    for r in rows[first_row:]:
        out[r[codes_col]] = {h: float(v or 0) for h, v in zip(header[codes_col + skip:],
                                                             r[codes_col + skip:], strict=True)}
    return out


def test_demo_spec_against_independent_numpy():
    # Miller & Blair (2009), ch. 5: industry technology A = U_d ĝ⁻¹ V q̂⁻¹, labour and capital
    # rows turned alike; import proportionality (M&B ch. 5, common practice); stocks by the
    # steady-state perpetual inventory K = I (1 + g) / (g + 1/L) (closed form)
    econ, report = build_economy(DEMO / "economy.yaml")
    sup, use = _grid(DEMO / "supply.csv", 2, skip=2), _grid(DEMO / "use.csv", 2, skip=2)
    v = np.array([[sup[p][i] for p in P] for i in I])  # make: industries × products
    u = np.array([[use[p][i] for i in I] for p in P])
    m = np.array([sup[p]["imports"] for p in P])
    home = np.array([sum(use[p][c] for c in ("households", "government", "gfcf",
                                             "inventories")) for p in P])
    share = m / (u.sum(axis=1) + home)
    ud = u * (1 - share)[:, None]
    g, q = v.sum(axis=1), v.sum(axis=0)
    t = v / g[:, None]  # ĝ⁻¹ V
    np.testing.assert_allclose(econ.A.to_numpy(), ud @ t / q, rtol=1e-12)
    emp = _grid(DEMO / "employment.csv", 1)
    lab = np.array([[emp[i][k] * 0.95 for i in I] for k in ("skilled", "unskilled")])
    np.testing.assert_allclose(econ.labour_coefficients, lab @ t / q, rtol=1e-12)
    cf = _grid(DEMO / "capital_flows.csv", 1)
    life = np.array([20, 20, 18, 25, 30.0])
    k = np.array([[cf.get(p, {}).get(i, 0.0) for i in I] for p in P]) * 1.04 / (0.04 + 1 / life)
    np.testing.assert_allclose(econ.B.to_numpy(), k @ t / q, rtol=1e-12)
    # the valued capital matrix by industry adds up to the investment it came from (times
    # the steady-state factor), and the transformation keeps the stock
    np.testing.assert_allclose(report.capital_stocks.to_numpy().sum(), k.sum(), rtol=1e-12)
    assert econ.labour_units == ["thousand person-years"] * 2
    assert econ.value_unit == "million arvens at 2026 prices"
    np.testing.assert_allclose(econ.base_output, q)


def test_schema_validates_the_demo_spec_and_refuses_bad_ones():
    schema = economy_spec_schema()
    spec = yaml.safe_load((DEMO / "economy.yaml").read_text(encoding="utf-8"))
    jsonschema.validate(spec, schema)  # jsonschema, independent of pydantic
    for bad in ({**spec, "model": "leontief"}, {**spec, "colour": "red"},
                {k: v for k, v in spec.items() if k != "supply"},
                {**spec, "layout_version": 2}):
        with pytest.raises(jsonschema.ValidationError):
            jsonschema.validate(bad, schema)


def test_assumptions_are_listed(demo, tmp_path):
    econ, report = build_economy(demo / "economy.yaml")
    written = write_economy(econ, report, tmp_path / "out")
    text = (tmp_path / "out" / "assumptions.md").read_text(encoding="utf-8")
    for words in ("Transformation model: industry technology", "import proportionality",
                  "Negative flows: none", "composition from the capital-flows table",
                  "thousand persons turned into thousand person-years",
                  "0.95 person-years"):
        assert words in text
    assert {p.name for p in written} == {"assumptions.md", "capital.csv",
                                        "capital_coefficients.csv", "economy.yaml",
                                        "input_coefficients.csv", "labour_coefficients.csv"}
    with pytest.raises(gp.InvalidInput, match="must not exist yet or be empty"):
        write_economy(econ, report, tmp_path / "out")


def _edit(folder, **changes):
    spec = yaml.safe_load((folder / "economy.yaml").read_text(encoding="utf-8"))
    for k, v in changes.items():
        if v is None:
            spec.pop(k, None)
        else:
            spec[k] = v
    (folder / "economy.yaml").write_text(yaml.safe_dump(spec), encoding="utf-8")
    return folder / "economy.yaml"


def test_product_technology_negatives_reported_and_remedied(demo):
    with pytest.raises(gp.InvalidInput, match=r"supply and use tables \(supply.csv, use.csv\): "
                       r"symmetric table \[.*\] must be >= 0: the product_technology model "
                       r"gives \d+ negative flow"):
        build_economy(_edit(demo, model="product_technology"))
    econ, report = build_economy(_edit(demo, model="product_technology", negatives="zero"))
    assert len(report.negatives) > 0
    assert any("remedy: set to zero" in a for a in report.assumptions)
    assert (econ.A.to_numpy() >= 0).all()


def test_aggregation_and_capital_routes(demo):
    agg = {"products": {"agri": "goods", "food": "goods", "machinery": "capital_goods",
                        "construction": "capital_goods", "services": "services"},
           "industries": {"AGR": "GOODS", "FOOD": "GOODS", "MACH": "CAP", "CONS": "CAP",
                          "SERV": "SERV"}}
    econ, report = build_economy(_edit(demo, aggregation=agg, model="fixed_product_sales"))
    assert econ.names == ["GOODS", "CAP", "SERV"]
    assert all(gap < 1e-12 for k, gap in report.checks.items() if k.startswith("aggregation"))
    # capital–output ratios: an industry table keeps each industry's capital, so the column
    # sums of B are the ratios (by construction of the documented assumption)
    ratios = {"AGR": 2.0, "FOOD": 1.5, "MACH": 2.5, "CONS": 1.0, "SERV": 3.0}
    cap = {"capital_output_ratios": ratios,
           "composition": {"machinery": 60.0, "construction": 40.0}, "service_life": 20}
    econ, _ = build_economy(_edit(demo, aggregation=None, capital=cap,
                                  model="fixed_product_sales"))
    np.testing.assert_allclose(econ.B.sum(axis=0), list(ratios.values()), rtol=1e-12)
    # investment by industry and one composition: the valued capital matrix adds up to
    # the investment times the steady-state factor (g = 0: the service life)
    inv = {"AGR": 130.0, "FOOD": 200.0, "MACH": 300.0, "CONS": 150.0, "SERV": 650.0}
    cap = {"investment": inv, "composition": {"machinery": 55.0, "construction": 45.0},
           "service_life": 20}
    econ, report = build_economy(_edit(demo, capital=cap, model="fixed_product_sales"))
    np.testing.assert_allclose(report.capital_stocks.sum(axis=0), np.array(list(
        inv.values())) * 20, rtol=1e-12)


@pytest.mark.parametrize(("file", "old", "new", "message"), [
    ("supply.csv", "agri,Crops and livestock,760,80,,,,", "agri,Crops and livestock,760,85,,,-5,",
     r"supply \(supply.csv, row 3 'agri', column G 'SERV'\) must be >= 0 \(supply cannot be "
     r"negative\)\. Got -5\.0\."),
    ("use.csv", "food,Food products,20,150", "food,Food products,20,1x0",
     r"use \(use.csv, row 4 'food', column D 'FOOD'\) must be a number \(empty for zero\)\. "
     r"Got '1x0'\."),
    ("use.csv", "\ntaxes,", "\ntax,",
     r"use \(use.csv, row 9 'tax'\) must be a product of the supply table \(supply.csv\) or "
     r"one of value_added_rows"),
    ("supply.csv", "MACH,CONS", "MACH,BUILD",
     r"supply \(supply.csv, column F 'BUILD'\) must be a column of the use table \(use.csv\) "
     r"too"),
    ("employment.csv", "total,800", "total,810",
     r"employment \(employment.csv, row 7 'total', column D 'total'\) must equal the sum "
     r"of the other columns of its row within 0.5 % \(it is a totals column; they sum to "
     r"1950\)\. Got 1940\.0\."),
    ("capital_flows.csv", "services,", "software,",
     r"capital.flows \(capital_flows.csv, row 4 'software'\) must be a product of the "
     r"supply table"),
])
def test_malformed_tables_name_file_row_column_value(demo, file, old, new, message):
    path = demo / file
    text = path.read_text(encoding="utf-8")
    assert old in text
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match=message):
        build_economy(demo / "economy.yaml")


def test_spec_errors_are_located(demo):
    path = _edit(demo, model="leontief")
    with pytest.raises(gp.InvalidInput, match=r"economy.yaml, line \d+: model must be"):
        build_economy(path)
    path = _edit(demo, model="industry_technology", supply="../outside.csv")
    with pytest.raises(gp.InvalidInput, match=r"supply must name a table in the spec's folder"):
        build_economy(path)


def test_command_builds_a_folder_a_plan_loads(demo, tmp_path):
    out = tmp_path / "economy"
    cmd = [sys.executable, "-m", "growthplan.cli", "economy", "build",
           str(demo / "economy.yaml"), "--out", str(out)]
    run = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    assert "5 products, 5 industries" in run.stdout
    again = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    assert again.returncode == 2
    assert again.stderr.strip().count("\n") == 0 and "--overwrite" in again.stderr
    assert subprocess.run(cmd + ["--overwrite"], capture_output=True, text=True,
                          timeout=120).returncode == 0
    doc = yaml.safe_load((out / "economy.yaml").read_text(encoding="utf-8"))
    doc["plan"] = {"years": {"first": 2027, "last": 2034},
                   "labour": [{"kind": "skilled", "start": 800, "growth": 0.01},
                              {"kind": "unskilled", "start": 1150, "growth": 0.005}],
                   "consumption": {"floor": 1750, "floor_growth": 0.02},
                   "terminal": {"rate": 0.03}, "objective": {"kind": "terminal_capacity"}}
    (out / "plan.yaml").write_text(yaml.safe_dump(doc), encoding="utf-8")
    plan = gp.load_plan_file(out / "plan.yaml")
    econ, _ = build_economy(demo / "economy.yaml")
    np.testing.assert_allclose(plan.economy.A, econ.A, rtol=1e-15)
    np.testing.assert_allclose(plan.economy.B, econ.B, rtol=1e-15)
    assert plan.economy.labour_kinds == ["skilled", "unskilled"]
    assert_optimal(plan.solve(progress=False))
    # a malformed table: exit 2, one line naming the file and the cell
    (demo / "use.csv").write_text((demo / "use.csv").read_text(encoding="utf-8").replace(
        "food,Food products,20,150", "food,Food products,20,..", 1), encoding="utf-8")
    bad = subprocess.run(cmd[:-1] + [str(tmp_path / "other")], capture_output=True,
                         text=True, timeout=120)
    assert bad.returncode == 2
    assert bad.stderr.strip() == ("error: use (use.csv, row 4 'food', column D 'FOOD') must be "
                                  "a number (empty for zero). Got '..'.")
    assert not (tmp_path / "other").exists()


def _edit_capital(folder, **changes):
    spec = yaml.safe_load((folder / "economy.yaml").read_text(encoding="utf-8"))
    spec["capital"].update(changes)
    (folder / "economy.yaml").write_text(yaml.safe_dump(spec, sort_keys=False),
                                         encoding="utf-8")
    return folder / "economy.yaml"


def _line(path, text):
    """1-based line of the first line holding ``text`` (read with plain Python)."""
    lines = path.read_text(encoding="utf-8").splitlines()
    return next(i for i, line in enumerate(lines, start=1) if text in line)


@pytest.mark.parametrize(("where", "key", "value", "message"), [
    # a table written as a mapping: its field's error only, not "must be text"
    ("supply", "header_row", -1, r"supply.header_row must be at least 1\. Got -1\.$"),
    ("employment", "table", {"file": "employment.csv", "header_row": 0},
     r"employment.table.header_row must be at least 1\. Got 0\.$"),
    # values written as a mapping: the value's own path, not the layout's fields
    ("capital", "investment", {"AGR": "x"}, r"capital.investment.AGR must be a number\. "
     r"Got 'x'\.$"),
    ("aggregation", "products", {"agri": 3}, r"aggregation.products.agri must be text\. "
     r"Got 3\.$"),
])
def test_a_union_reports_the_branch_written(demo, where, key, value, message):
    spec = yaml.safe_load((demo / "economy.yaml").read_text(encoding="utf-8"))
    if where == "supply":
        spec["supply"][key] = value
    elif where == "capital":
        spec["capital"] = {"investment": value, "composition": {"machinery": 1.0}}
    elif where == "employment":
        spec[where] = {**spec[where], key: value}
    else:
        spec[where] = {key: value}
    (demo / "economy.yaml").write_text(yaml.safe_dump(spec, sort_keys=False), encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match=r"economy.yaml, line \d+: " + message) as info:
        build_economy(demo / "economy.yaml")
    assert "problems" not in str(info.value) and "\n" not in str(info.value)


@pytest.mark.parametrize(("life", "message"), [
    ({"AGR": "abc", "FOOD": 20, "MACH": 18, "CONS": 25, "SERV": 30},
     r"capital.service_life.AGR must be a number\. Got 'abc'\.$"),
    ({"AGR": 0, "FOOD": 20, "MACH": 18, "CONS": 25, "SERV": 30},
     r"capital.service_life.AGR must be at least 1(\.0)?\. Got 0\.$"),
    ({"FOOD": 20, "MACH": 18, "CONS": 25, "SERV": 30},
     r"capital.service_life must give the life of every industry \(missing \['AGR'\]"),
])
def test_service_life_by_industry_named_with_file_and_line(demo, life, message):
    path = _edit_capital(demo, service_life=life)
    line = _line(path, "AGR:") if "AGR" in life else _line(path, "service_life:")
    with pytest.raises(gp.InvalidInput, match=rf"economy.yaml, line {line}: {message}"):
        build_economy(path)


@pytest.mark.parametrize("life", [0, "abc", [20]])
def test_one_service_life_for_all_named_with_file_and_line(demo, life):
    path = _edit_capital(demo, service_life=life)
    line = _line(path, "service_life:")
    with pytest.raises(gp.InvalidInput, match=rf"economy.yaml, line {line}: "
                       r"capital.service_life must be (at least 1|a number)") as info:
        build_economy(path)
    assert "\n" not in str(info.value)


def test_several_problems_of_one_section_each_get_its_path(demo):
    path = _edit_capital(demo, lead_time=-1, past_growth=5)
    with pytest.raises(gp.InvalidInput) as info:
        build_economy(path)
    head, *items = str(info.value).split("\n  ")
    assert head.endswith(": 2 problems:") and "capital.2" not in head
    assert items[0].startswith("capital.lead_time must be at least 0. Got -1.")
    assert items[1].startswith("capital.past_growth must be less than 1")


@pytest.mark.parametrize("target", ["tables", "tables/sub"])
def test_command_refuses_a_folder_holding_the_spec_or_a_table_before_the_build(demo, target):
    from click.testing import CliRunner

    from growthplan.cli import main

    (demo / "sub").mkdir()
    (demo / "use.csv").rename(demo / "sub" / "use.csv")
    spec = yaml.safe_load((demo / "economy.yaml").read_text(encoding="utf-8"))
    spec["use"]["file"] = "sub/use.csv"
    (demo / "economy.yaml").write_text(yaml.safe_dump(spec), encoding="utf-8")
    out = demo.parent / target
    res = CliRunner().invoke(main, ["economy", "build", str(demo / "economy.yaml"), "--out",
                                    str(out), "--overwrite"])
    assert res.exit_code == 2
    assert res.stderr.strip() == ("error: --out must not be a folder holding the economy spec "
                                  f"or its tables. Got {str(out)!r}.")
    assert "plan file" not in res.stderr
    assert res.stdout == ""  # refused before the build: nothing built, nothing reported
    assert sorted(p.name for p in (demo / "sub").iterdir()) == ["use.csv"]
