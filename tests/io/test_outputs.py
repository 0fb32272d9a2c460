"""Every text that reaches a file is safe for it; ``overwrite`` replaces only the
library's own files."""

from __future__ import annotations

import re
import unicodedata
import warnings

import numpy as np
import openpyxl
import pytest

import growthplan as gp
from growthplan.io.marks import MARK, RECORD
from growthplan.model.satellite import Satellite, Stressor


def _economy(names, **extra):
    return gp.Economy(
        sectors=names, input_coefficients=[[0.2, 0.1], [0.1, 0.2]],
        capital_coefficients=[[0.0, 0.0], [1.5, 2.0]], labour_coefficients=[[0.4, 0.3]],
        consumption_basket=[1.0, 0.0],
        capital={names[0]: gp.CapitalSpec(initial_capacity=100, mean_service_life=20),
                 names[1]: gp.CapitalSpec(initial_capacity=40, mean_service_life=15)}, **extra)


def _plan(names):
    econ = _economy(names)
    return gp.Plan(economy=econ, years=range(2030, 2033),
                   labour=gp.LabourSupply(start=100.0, growth=0.01),
                   objective=gp.objectives.TerminalCapacity(
                       proportions={s: 1.0 for s in econ.names}))


@pytest.fixture(scope="module")
def injected():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return _plan(["=1+1", "@SUM(A1)"]).solve()


# -- names: control characters, length, case and normal form ------------------------------

@pytest.mark.parametrize("names, field, rule", [
    (["food\x07", "machinery"], "sectors.0", "hold no control characters"),  # BEL crashed
    (["food", "mach\x00inery"], "sectors.1", "hold no control characters"),  # to_excel
    (["food", "mach\ninery"], "sectors.1", "hold no control characters"),
    (["food", "x" * 32_768], "sectors.1", "be at most 32,767 characters"),
    (["Food", "food"], "sectors", "differ by more than case or Unicode normal form"),
    ([unicodedata.normalize("NFC", "café"), unicodedata.normalize("NFD", "café")],
     "sectors", "differ by more than case or Unicode normal form"),
])
def test_sector_names_unsafe_for_files_are_refused(names, field, rule):
    with pytest.raises(gp.InvalidInput, match=rf"^{re.escape(field)} must {rule}"):
        _economy(names)


@pytest.mark.parametrize("extra, field", [
    ({"labour_kinds": ["lab\tour"]}, "labour_kinds.0"),
    ({"value_unit": "arvens\x1b[31m"}, "value_unit"),
])
def test_other_names_unsafe_for_files_are_refused(extra, field):
    with pytest.raises(gp.InvalidInput, match=rf"^{field} must hold no control characters"):
        _economy(["food", "machinery"], **extra)


def test_the_longest_name_a_workbook_cell_holds_is_accepted(tmp_path):
    long = "x" * 32_767
    econ = _economy([long, "machinery"])
    assert econ.names[0] == long


def test_technique_labels_unsafe_for_files_are_refused():
    with pytest.raises(gp.InvalidInput, match="must hold no control characters"):
        gp.Technique(sector="food", label="new\x00")


# -- workbooks: names that look like formulas stay text ------------------------------------

def test_formula_like_names_are_text_in_the_workbook(injected, tmp_path):
    path = injected.to_excel(tmp_path / "plan.xlsx")
    book = openpyxl.load_workbook(path)
    seen = 0
    for ws in book.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                assert cell.data_type != "f", (ws.title, cell.coordinate, cell.value)
                if cell.value in ("=1+1", "@SUM(A1)"):
                    assert cell.data_type == "s" and cell.quotePrefix, cell.coordinate
                    seen += 1
    assert seen > 0  # the names are there, as the text they are
    assert book.properties.description == MARK


# -- overwrite replaces only files the library wrote ---------------------------------------

def _writers(result):
    from growthplan.results.report import write_report

    plan = result.plan
    return {
        "plan.xlsx": lambda p, **kw: result.to_excel(p, **kw),
        # the writer behind result.report, without charts (they take seconds to draw)
        "report.html": lambda p, **kw: write_report(result, p, charts=False, **kw),
        "plan.mps": lambda p, **kw: plan.write_mps(p, **kw),
        "plan.lp": lambda p, **kw: plan.write_lp(p, **kw),
        "plan.yaml": lambda p, **kw: gp.save_plan_file(plan, p, **kw),
    }


@pytest.mark.parametrize("name", ["plan.xlsx", "report.html", "plan.mps", "plan.lp",
                                  "plan.yaml"])
def test_overwrite_replaces_only_the_librarys_own_file(injected, tmp_path, name):
    write = _writers(injected)[name]
    mine = tmp_path / name
    mine.write_text("the analyst's own notes\n")
    # the reproducer: overwrite=True replaced this file
    with pytest.raises(gp.InvalidInput, match=re.escape(f"'{mine}'")) as err:
        write(mine, overwrite=True)
    assert "force=True" in str(err.value)
    assert mine.read_text() == "the analyst's own notes\n"
    write(mine, overwrite=True, force=True)  # the user who means it
    assert mine.read_text(errors="replace") != "the analyst's own notes\n"
    write(mine, overwrite=True)  # now the library's own: replaced without force
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(f".{name}")] == []


def test_the_marks_do_not_change_what_readers_read(injected, tmp_path):
    import highspy

    plan = injected.plan
    mps = plan.write_mps(tmp_path / "p.mps")
    assert mps.read_text().startswith(f"* {MARK}\n")
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.readModel(str(mps))  # the comment line is skipped by an MPS reader
    h.run()
    # the objective of the written model is the plan's optimum (HiGHS reads it back)
    assert np.isclose(abs(h.getInfo().objective_function_value), abs(injected.objective),
                      rtol=1e-7)
    loaded = gp.load_plan_file(gp.save_plan_file(plan, tmp_path / "p.yaml"))
    assert loaded.economy.names == plan.economy.names


def test_a_csv_table_changed_by_hand_is_no_longer_the_librarys(injected, tmp_path):
    plan = injected.plan
    path = gp.save_plan_file(plan, tmp_path / "p.yaml")
    assert (tmp_path / RECORD).is_file()
    table = next(p for p in tmp_path.glob("*.csv"))
    table.write_text(table.read_text() + "\n")  # edited by hand
    with pytest.raises(gp.InvalidInput, match=re.escape(table.name)):
        gp.save_plan_file(plan, path, overwrite=True)
    gp.save_plan_file(plan, path, overwrite=True, force=True)
    gp.save_plan_file(plan, path, overwrite=True)


@pytest.mark.parametrize("make, rule", [
    (lambda: Stressor(name="CO2\x00", unit="t"), "hold no control characters"),
    (lambda: Stressor(name="CO2", unit="t\n"), "hold no control characters"),
    (lambda: Satellite(stressors=[Stressor(name="CO2", unit="t"),
                                  Stressor(name="co2", unit="t")]),
     "differ by more than case or Unicode normal form"),
])
def test_stressor_names_unsafe_for_files_are_refused(make, rule):
    with pytest.raises(gp.InvalidInput, match=rule):
        make()
