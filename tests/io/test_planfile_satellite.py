"""Satellite accounts in plan files: a table section, inline accounts, the demo scenario."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import yaml

import growthplan as gp
from growthplan.demo import demo_climate_plan


def test_the_climate_demo_reads_its_table():
    """The demo's emissions.csv (intensities, kt per million arvens) reaches the plan as
    written, the renewable technique's column included, with the stated CH4 factor."""
    plan = demo_climate_plan()
    sat = plan.satellite
    assert sat is not None and sat.names == ["CO2", "CH4", "GHG"]
    co2 = sat.stressors[0]
    assert co2.intensities["energy"] == 3.0 and co2.intensities["energy:renewable"] == 0.05
    assert co2.households == 0.15 and sat.units == ["kt", "kt", "kt CO2-eq"]
    d = plan.lowered()
    ghg = d.satellite.intensity[2, 0]
    k = d.tech_names.index("agriculture")
    assert ghg[k] == pytest.approx(0.17 + 28 * 0.023)
    assert [lim.kind for lim in d.satellite.limits] == ["cap"]
    np.testing.assert_allclose(d.satellite.limits[0].bound, 16000 * 0.98 ** np.arange(13))


def test_table_section_refuses_unknown_keys_and_outside_files(tmp_path):
    demo = gp.copy_demo(tmp_path / "demo")[0].parent
    text = (demo / "climate.yaml").read_text(encoding="utf-8")
    bad = demo / "bad.yaml"
    bad.write_text(text.replace("households: {CO2: 0.15}", "housholds: {CO2: 0.15}"),
                   encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match="households"):
        gp.load_plan_file(bad)
    bad.write_text(text.replace("table: emissions.csv", "table: ../elsewhere.csv"),
                   encoding="utf-8")
    with pytest.raises(gp.InvalidInput, match="satellite.table"):
        gp.load_plan_file(bad)
    assert demo / "emissions.csv" in gp.io.planfile.plan_file_inputs(demo / "climate.yaml")


def test_flows_table_divided_by_base_output(tmp_path):
    """flows: true divides the base-year flows by the base-year output of the flows table
    (S = F x̂^-1): 5200 million arvens of agriculture emitting 884 kt is 0.17 kt each."""
    demo = gp.copy_demo(tmp_path / "demo")[0].parent
    (demo / "flows_emissions.csv").write_text("stressor,agriculture,energy\nCO2,884,6300\n",
                                              encoding="utf-8")
    text = (demo / "climate.yaml").read_text(encoding="utf-8")
    text = text.replace("table: emissions.csv", "table: flows_emissions.csv\n    flows: true")
    text = text.replace("units: {CO2: kt, CH4: kt}", "units: {CO2: kt}")
    text = text.replace("factors: {CO2: 1.0, CH4: 28.0}", "factors: {CO2: 1.0}")
    (demo / "f.yaml").write_text(text, encoding="utf-8")
    plan, _ = gp.load_plan_file(demo / "f.yaml")
    s = plan.satellite.stressors[0].intensities
    assert s["agriculture"] == pytest.approx(884 / 5200) and s["energy"] == pytest.approx(3.0)


def test_inline_accounts_round_trip(tmp_path):
    econ = gp.Economy(sectors=["goods"], input_coefficients=[[0.6]],
                      capital_coefficients=[[2.0]],
                      capital={"goods": gp.CapitalSpec(initial_capacity=100,
                                                       mean_service_life=20)})
    plan = gp.Plan(economy=econ, years=range(2030, 2035),
                   satellite=gp.Satellite(stressors=[gp.Stressor(
                       name="CO2", unit="t", intensities={"goods": 0.5})]),
                   limits=[gp.Cap(what="CO2", at_most=60.0, rate=-0.05),
                           gp.Budget(what="CO2", total=250.0, first=2031)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        path = gp.save_plan_file(plan, tmp_path / "p.yaml")
    data = yaml.safe_load(path.read_text(encoding="utf-8"))
    assert data["plan"]["limits"][1]["kind"] == "budget"
    again, _ = gp.load_plan_file(path)
    assert again.satellite == plan.satellite and again.limits == plan.limits
