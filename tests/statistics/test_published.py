"""Published supply and use tables: an invented pair laid out as offices do, and the
United States BEA 2021 tables end to end.

The BEA tables (public-domain data of the Bureau of Economic Analysis, shipped in
the registry package ``quantecon-book-networks`` 1.6, ``data/csv_files/``) are a
test dependency; these tests are skipped when it is absent. Their check figures
are the tables' own printed totals (use tables, "Total Intermediate" column):
value added at basic prices 22,485,863, value added at producer prices
23,315,081 (US GDP 2021, $ million), total industry output 40,575,547, total
intermediate use 18,089,683, compensation of employees 12,549,140.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner, Result
from conftest import assert_optimal
from helpers import BEA_SIZES, bea_economy, bea_plan, bea_spec, bea_tables

import growthplan as gp
from growthplan.cli import main
from growthplan.errors import InvalidInput
from growthplan.statistics.published import PublishedTables, published_economy, read_published

needs_bea = pytest.mark.skipif(bea_tables(15) is None,
                               reason="quantecon-book-networks is not installed")

# An invented pair (Arvenna), laid out the ways offices do: a byte-order mark, labels
# with commas and quotes, blank padding rows, suppressed cells of four kinds, a total
# column in capitals, a total row without a label, a use table with codes for headers
# (matched by position), the value-added block below the products.
SUPPLY = ("\ufeffProduct,\"Farming, fishing\",Industry,Trade,Imports,"
          "CIF/FOB adjustments on imports,TOTAL SUPPLY\n"
          "\n"
          "\"Food, raw\",100,---,n.p.,20,,120\n"
          "Goods,5,200,..,50,-2,253\n"
          "Trade,x,---,60,,,60\n"
          ",,,,,,\n"
          ",105,200,60,70,-2,433\n")
USE = (",A01,C00,G00,T001,F010,F02S,F040,T019\n"
       "\"Food, raw\",10,30,---,40,60,0,30,130\n"
       "Goods,20,50,5,75,100,80,25,280\n"
       "Trade,---,2,1,3,25,---,---,28\n"
       "Total Intermediate,30,82,6,118,185,80,55,438\n"
       "Compensation of employees,40,70,30,140,,,,\n"
       "Gross operating surplus,35,48,24,107,,,,\n"
       "\"Value added (basic prices)\",75,118,54,247,,,,\n"
       "Total industry output (basic prices),105,200,60,365,,,,\n"
       "Taxes on products and imports,3,2,---,5,,,,\n")


@pytest.fixture
def arvenna(tmp_path: Path) -> PublishedTables:
    (tmp_path / "supply.csv").write_text(SUPPLY, encoding="utf-8")
    (tmp_path / "use.csv").write_text(USE, encoding="utf-8")
    return PublishedTables.read(tmp_path / "supply.csv", tmp_path / "use.csv")


def test_reader_finds_the_blocks_of_an_office_layout(arvenna):
    t = arvenna
    assert t.products == ["Food, raw", "Goods", "Trade"]
    assert t.industries == ["Farming, fishing", "Industry", "Trade"]
    assert t.codes == {"Farming, fishing": "A01", "Industry": "C00", "Trade": "G00"}
    assert list(t.final_demand.columns) == ["F010", "F02S", "F040"]
    assert t.imports.to_dict() == {"Food, raw": 20.0, "Goods": 50.0, "Trade": 0.0}
    assert t.cif_fob.sum() == -2.0
    assert t.filled["supply table"].suppressed == 5
    assert t.filled["use table"].suppressed == 2
    assert t.column("investment") == ["F02S"] and t.column("exports") == ["F040"]
    f = t.figures()
    assert f["value added at basic prices"] == 247 and f["industry output"] == 365
    assert f["value added at producer prices"] == 252  # 247 + taxes on products 5
    assert f["compensation of employees"] == 140


def test_the_invented_pair_builds_a_balanced_economy(arvenna):
    econ, rep = published_economy(arvenna, value_unit="million arvens",
                                  capital_output_ratio=2.0, wage=10.0)
    # value added at basic prices kept exactly through every rule
    va = rep.figures["value added at basic prices"]
    assert va[1] == pytest.approx(va[0], rel=1e-12)
    # every product balances at basic prices: supply (output + imports) = uses
    v = rep.valuation
    assert v.taxes.sum() == pytest.approx(5.0)  # 438 of uses against 433 of supply
    sut = rep.supply_use
    uses = sut.use.sum(axis=1) + sut.final_demand.sum(axis=1)
    assert uses.to_numpy() == pytest.approx((sut.product_output + sut.imports).to_numpy())
    assert econ.n == 3 and econ.spectral_radius() < 1
    assert (np.asarray(econ.input_coefficients) >= 0).all()
    assert econ.labour_kinds == ["employees"]
    # labour = compensation / wage, per unit of output
    assert np.asarray(econ.labour_coefficients)[0] == pytest.approx(
        np.array([40, 70, 30]) / 10 / np.asarray(econ.base_output))
    assert any("CIF/FOB" in a for a in rep.assumptions)


def test_reader_refuses_a_cell_that_is_no_number(tmp_path):
    (tmp_path / "t.csv").write_text(",a,b\nx1,1,two\n", encoding="utf-8")
    with pytest.raises(InvalidInput, match=r"row 2 'x1', column 'b'.*Got 'two'"):
        read_published(tmp_path / "t.csv")
    (tmp_path / "n.csv").write_text(",a,b\nx1,\"(1,234)\",\"5,678\"\n", encoding="utf-8")
    assert read_published(tmp_path / "n.csv").frame.loc["x1"].tolist() == [-1234.0, 5678.0]


@needs_bea
@pytest.mark.parametrize("size", BEA_SIZES)
def test_bea_tables_give_the_published_totals(size):
    econ, rep = bea_economy(size)
    published = {  # BEA 2021 use tables' printed totals, $ million (see the module notes)
        "value added at basic prices": 22_485_863,
        "value added at producer prices": 23_315_081,
        "industry output": 40_575_547,
        "intermediate use": 18_089_683,
        "compensation of employees": 12_549_140,
    }
    for name, value in published.items():
        printed, built = rep.figures[name]
        assert printed == pytest.approx(value, rel=1e-12), name
        assert built == pytest.approx(value, rel=1e-4), name  # the tables' rounding, 0.01 %
    # the economy itself: gross output and value added add up to the same figures
    assert float(np.sum(econ.base_output)) == pytest.approx(40_575_547, rel=1e-4)
    assert float(rep.value_added.sum()) == pytest.approx(22_485_863, rel=1e-4)
    assert econ.n == size and econ.spectral_radius() < 1
    assert (np.asarray(econ.input_coefficients) >= 0).all()
    assert (np.asarray(econ.capital_coefficients) >= 0).all()
    assert rep.tables.filled["use table"].suppressed > 0


@needs_bea
@pytest.mark.parametrize("model", ["industry_technology", "fixed_product_sales"])
def test_bea_15_by_the_models_that_apply(model):
    # 17 products, 15 industries: the two square-only models do not apply
    econ, rep = bea_economy(15, model=model)
    assert econ.spectral_radius() < 1
    assert (np.asarray(econ.input_coefficients) >= 0).all()
    assert float(rep.value_added.sum()) == pytest.approx(22_485_863, rel=1e-4)
    with pytest.raises(InvalidInput, match="square make matrix"):
        bea_economy(15, model="product_technology")


def _cli(*args: str) -> Result:
    return CliRunner().invoke(main, list(args))


@needs_bea
def test_economy_build_on_bea_15_writes_a_plan_that_solves(tmp_path):
    spec = bea_spec(tmp_path / "bea", 15)
    out = tmp_path / "economy"
    r = _cli("economy", "build", str(spec), "--out", str(out), "--plan")
    assert r.exit_code == 0, r.output
    assert "value added at basic prices: 22,485,8" in r.stdout
    assert "consumption floor" in r.stdout
    text = (out / "assumptions.md").read_text(encoding="utf-8")
    for words in ("proportional margins", "by-product", "Suppressed cells", "CIF/FOB",
                  "capital–output ratio of 3", "average wage of 75", "Consumption floor"):
        assert words in text, words
    assert "labour_kinds:\n  - employees" in (out / "economy.yaml").read_text(encoding="utf-8")
    plan = gp.load_plan_file(out / "plan.yaml")
    assert plan.years[0] == 2022 and len(plan.years) == 30
    assert_optimal(plan.solve())


@needs_bea
@pytest.mark.slow
def test_a_71_sector_30_year_plan_of_bea_solves_optimal_and_audited():
    plan = bea_plan(71, 30)
    assert plan.economy.n == 71 and len(plan.years) == 30
    assert_optimal(plan.solve())


@needs_bea
@pytest.mark.slow
def test_a_71_sector_30_year_plan_of_bea_beyond_reach_is_diagnosed_in_full():
    # the size at which the diagnosis once ended "did not finish" with nothing else:
    # now a shortfall table, an audited elastic solution, and a conflict or its reason
    result = bea_plan(71, 30, floor_factor=1.5).solve()
    assert result.status is gp.Status.INFEASIBLE
    d = result.diagnosis
    assert d is not None and d.status is gp.Status.OPTIMAL and d.audit_ok
    assert not d.shortfalls.empty and set(d.shortfalls.kind) == {"aim"}
    assert "consumption floor" in set(d.shortfalls.condition)
    # the entries span 16 orders of magnitude: the interior point ends the elastic
    # problem "unknown" and simplex on the problem as it is decides (steps say so)
    assert d.method in ("ipm", "simplex")
    assert any("optimal by" in s.outcome for s in d.steps)
    assert d.conflict() or "set subset=True" in d.subset_source
    # every step said with its method, time and outcome
    assert d.steps and all(s.seconds >= 0 and s.outcome for s in d.steps)


def test_economy_build_on_the_demo_writes_labour_kinds_and_a_plan(tmp_path):
    out = tmp_path / "arvenna"
    r = _cli("economy", "build", str(gp.DEMO_DIR / "supply_use" / "economy.yaml"), "--out",
             str(out), "--plan", "--years", "12")
    assert r.exit_code == 0, r.output
    economy_yaml = (out / "economy.yaml").read_text(encoding="utf-8")
    assert "labour_kinds:\n  - skilled\n  - unskilled" in economy_yaml
    text = (out / "assumptions.md").read_text(encoding="utf-8")
    assert "capacity = " not in text and "K = I" not in text  # prose, not formulas
    assert "its capacity is its base-year output" in text
    plan = gp.load_plan_file(out / "plan.yaml")
    assert plan.economy.labour_kinds == ["skilled", "unskilled"]
    assert [lab.kind for lab in plan.labour] == ["skilled", "unskilled"]
    result = assert_optimal(plan.solve())
    # the floor the skeleton computed holds in every year
    floor = plan.consumption.floor if plan.consumption else None
    assert floor is not None
    assert (result.consumption["level"] >= float(floor) * (1 - 1e-6)).all()
    # a spec without base_year cannot give a plan's years
    spec = tmp_path / "nobase" / "economy.yaml"
    spec.parent.mkdir()
    for f in (gp.DEMO_DIR / "supply_use").iterdir():
        (spec.parent / f.name).write_bytes(f.read_bytes())
    spec.write_text("\n".join(line for line in spec.read_text().splitlines()
                              if not line.startswith("base_year")), encoding="utf-8")
    r = _cli("economy", "build", str(spec), "--out", str(tmp_path / "x"), "--plan")
    assert r.exit_code != 0 and "base_year must be given" in r.output


# margins and taxes of the invented pair, laid out like its use table (codes as headers):
# food's uses exceed its supply by 10 (margins 8, taxes 2), goods' by 27 (24, 3), and
# trade's supply exceeds its uses by the 32 of margins
MARGINS = (",A01,C00,G00,F010,F02S,F040\n"
           "\"Food, raw\",1,3,,4,,\n"
           "Goods,,4,,10,10,\n")
TAXES = (",A01,C00,G00,F010,F02S,F040\n"
         "\"Food, raw\",,,,2,,\n"
         "Goods,1,,,2,,\n")


def test_exact_valuation_from_the_spec(tmp_path):
    folder = tmp_path / "arvenna"
    folder.mkdir()
    for name, text in (("supply.csv", SUPPLY), ("use.csv", USE), ("trade.csv", MARGINS),
                       ("taxes.csv", TAXES)):
        (folder / name).write_text(text, encoding="utf-8")
    spec = folder / "economy.yaml"
    spec.write_text("layout_version: 1\nvalue_unit: million arvens\n"
                    "published: {supply: supply.csv, use: use.csv}\n"
                    "valuation: exact\nmargins: {Trade: trade.csv}\ntaxes: taxes.csv\n"
                    "capital: {capital_output_ratio: 2}\nlabour: {wage: 10}\n",
                    encoding="utf-8")
    econ, rep = gp.build_economy(spec)
    v = rep.valuation
    assert v.method == "exact"
    # basic prices by hand: food for A01 10 − 1, households 60 − 4 − 2; goods for A01 20 − 1
    assert v.use.loc["Food, raw", "Farming, fishing"] == pytest.approx(9.0)
    assert v.final_demand.loc["Food, raw", "F010"] == pytest.approx(54.0)
    assert v.use.loc["Goods", "Farming, fishing"] == pytest.approx(19.0)
    # margins delivered by trade: its column totals (A01 1, C00 7, households 14, F02S 10)
    assert v.use.loc["Trade", "Industry"] == pytest.approx(2 + 7)
    assert v.final_demand.loc["Trade", "F010"] == pytest.approx(25 + 14)
    assert v.taxes.sum() == pytest.approx(5.0)
    va = rep.figures["value added at basic prices"]
    assert va[1] == pytest.approx(va[0], rel=1e-12)
    assert any("exactly" in a for a in rep.assumptions)
    # the exact route without margin tables is refused
    spec.write_text(spec.read_text().replace("margins: {Trade: trade.csv}\n", ""),
                    encoding="utf-8")
    with pytest.raises(InvalidInput, match="margins must be given"):
        gp.build_economy(spec)


def test_the_schema_takes_the_published_spec_and_refuses_a_misspelt_key():
    import jsonschema
    import yaml

    from growthplan.statistics.build import economy_spec_schema

    schema = economy_spec_schema()
    spec = yaml.safe_load((gp.DEMO_DIR / "supply_use" / "published.yaml").read_text(
        encoding="utf-8"))
    jsonschema.validate(spec, schema)  # jsonschema, independent of pydantic
    for bad in ({**spec, "valuation": "guess"}, {**spec, "capitol": {}},
                {k: v for k, v in spec.items() if k != "labour"}):
        with pytest.raises(jsonschema.ValidationError):
            jsonschema.validate(bad, schema)


def test_tables_printed_with_codes_take_their_labels_from_a_list(tmp_path):
    # both tables by code only, no output row to match by position: the list names them
    supply = ("code,A01,C00,G00,IMP,TOTAL\n"
              "P1,100,,,20,120\nP2,5,200,,48,253\nP3,,,60,,60\n")
    use = USE.replace("\"Food, raw\"", "P1").replace("Goods", "P2").replace("Trade", "P3")
    use = "\n".join(line for line in use.splitlines() if not line.startswith("Total industry"))
    labels = ("code,label\nA01,\"Farming, fishing\"\nC00,Industry\nG00,Trade\n"
              "P1,\"Food, raw\"\nP2,Goods\nP3,Trade services\nIMP,Imports\n")
    for name, text in (("s.csv", supply), ("u.csv", use), ("labels.csv", labels)):
        (tmp_path / name).write_text(text, encoding="utf-8")
    t = PublishedTables.read(tmp_path / "s.csv", tmp_path / "u.csv",
                             labels=tmp_path / "labels.csv")
    assert t.industries == ["Farming, fishing", "Industry", "Trade"]
    assert t.codes["Industry"] == "Industry"  # matched by name, not by position
    assert t.products == ["Food, raw", "Goods", "Trade services"]
    assert t.imports.to_dict() == {"Food, raw": 20.0, "Goods": 48.0, "Trade services": 0.0}
    (tmp_path / "bad.csv").write_text("code,label\nA01,Same\nC00,Same\n", encoding="utf-8")
    with pytest.raises(InvalidInput, match="its own label"):
        PublishedTables.read(tmp_path / "s.csv", tmp_path / "u.csv",
                             labels=tmp_path / "bad.csv")


@needs_bea
def test_a_floor_above_the_skeleton_s_is_impossible_and_diagnosed():
    # 1.5 times the skeleton's floor is 1.35 times the most a steady state within base-year
    # capacity gives households; the first year's capacity cannot give it either
    result = bea_plan(15, 10, floor_factor=1.5).solve()
    assert result.status is gp.Status.INFEASIBLE and not result.ok
    assert result.diagnosis is not None
    assert "consumption floor in 2022" in result.diagnosis.conflict()
