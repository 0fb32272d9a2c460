"""Plan files with alternative techniques: ``techniques:`` under the plan section."""

from __future__ import annotations

import shutil

import yaml
from conftest import assert_optimal

import growthplan as gp
from growthplan.demo import DEMO_DIR


def test_plan_file_with_techniques(tmp_path):
    """The techniques of a YAML plan file reach Plan's field and its LP."""
    for f in ("flows.csv", "capital.csv", "capital_stocks.csv"):
        shutil.copy(DEMO_DIR / f, tmp_path / f)
    data = yaml.safe_load((DEMO_DIR / "plan.yaml").read_text())
    data["plan"]["years"] = {"first": 2027, "last": 2030}
    data["plan"].pop("targets", None)  # they name years after this short plan
    data["plan"]["techniques"] = [
        {"sector": "energy", "label": "solar", "labour": 0.01, "first_year": 2028,
         "capital": {"machinery": 0.9, "construction": 1.6}, "mean_service_life": 25},
        {"sector": "energy", "label": "base", "last_start": 2029}]
    path = tmp_path / "plan.yaml"
    path.write_text(yaml.safe_dump(data, sort_keys=False), encoding="utf-8")
    plan = gp.load_plan_file(path)
    assert [t.label for t in plan.techniques] == ["solar", "base"]
    assert plan.techniques[0] == gp.Technique(
        sector="energy", label="solar", labour=0.01, first_year=2028,
        capital={"machinery": 0.9, "construction": 1.6}, mean_service_life=25)
    d = plan.lowered()
    assert d.m == d.n + 1 and d.tech_names[-1] == "energy:solar"
    r = plan.solve()
    if r.ok:  # the short demo may not meet its targets; the audit must hold when it does
        assert_optimal(r)
        assert "energy:solar" in set(r.techniques["technique"])
