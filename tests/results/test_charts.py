"""Charts: units on every axis, year ticks that stay readable, legends beside the data, a
palette that survives greyscale, the new charts on the demo and on an impossible plan, and
no chart that fails on a one-sector plan."""

from __future__ import annotations

import itertools

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt
import numpy as np
import pytest
from conftest import one_sector
from helpers import economy, make_plan

import growthplan as gp
from growthplan.cli.base import _CHART_NAMES
from growthplan.results import charts as plot

MONEY = "million arvens at 2026 prices"


def luma(colour: str) -> float:
    # ITU-R BT.601 luma, what most greyscale conversions (and printers' drivers) use
    r, g, b = matplotlib.colors.to_rgb(colour)
    return 0.299 * r + 0.587 * g + 0.114 * b


@pytest.fixture(scope="module")
def demo():
    r = gp.demo_plan().solve(progress=False)
    assert r.ok
    return r


@pytest.fixture(scope="module")
def impossible():
    plan = gp.demo_plan()
    targets = [t.model_copy(update={"capacity_at_least": 1e6}) if t.capacity_at_least else t
               for t in plan.targets]
    r = gp.variant(plan, {"targets": [t.model_dump() for t in targets]}).solve(progress=False)
    assert r.status is gp.Status.INFEASIBLE and r.diagnosis is not None
    return r


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


def draw(fn, *args, **kw):
    fig, ax = plt.subplots(figsize=(9, 4.5), layout="constrained")
    out = fn(*args, ax=ax, **kw)
    assert out is ax
    fig.canvas.draw()
    return ax


def test_palette_keeps_twelve_sectors_apart_in_greyscale():
    greys = [luma(c) for c in plot.PALETTE[:12]]
    gaps = [abs(a - b) for a, b in itertools.combinations(greys, 2)]
    assert len(plot.PALETTE) >= 12 and min(gaps) > 0.05
    assert len(set(plot.PALETTE)) == len(plot.PALETTE)
    # and the other cues repeat no sooner than the colours
    assert len(set(plot._MARKERS)) >= 12 and len(set(plot._HATCHES)) >= 12
    styles = [plot._style(i) for i in range(12)]
    assert len({(s["marker"], str(s["linestyle"])) for s in styles}) == 12


def test_every_axis_of_the_demo_charts_names_its_unit(demo):
    labels = {
        "output": draw(plot.plot_paths, demo, "output").get_ylabel(),
        "capacity": draw(plot.plot_paths, demo, "capacity").get_ylabel(),
        "index": draw(plot.plot_paths, demo, "capacity", index=True).get_ylabel(),
        "starts": draw(plot.plot_starts, demo).get_ylabel(),
        "labour": draw(plot.plot_labour, demo).get_ylabel(),
        "consumption": draw(plot.plot_consumption, demo).get_ylabel(),
        "targets": draw(plot.plot_targets, demo).get_xlabel(),
        "ray": draw(plot.plot_ray_distance, demo).get_ylabel(),
    }
    for name in ("output", "capacity", "starts"):
        assert MONEY in labels[name], name
    assert "no unit" in labels["index"]
    assert "thousand person-years" in labels["labour"]
    # one basket of the demo is worth 1 million arvens (the basket's shares sum to 1)
    assert "baskets" in labels["consumption"] and f"1 {MONEY}" in labels["consumption"]
    assert "%" in labels["targets"] and "degrees" in labels["ray"]
    for fn, kw in ((plot.plot_utilisation, {}), (plot.plot_shadow_prices, {"money": True})):
        ax = draw(fn, demo, **kw)
        bar = ax.figure.axes[-1]  # the colour bar
        assert ax.get_xlabel() == "year" and bar.get_ylabel()
    assert "%" in draw(plot.plot_utilisation, demo).figure.axes[-1].get_ylabel()
    assert MONEY in draw(plot.plot_shadow_prices, demo, money=True).figure.axes[-1].get_ylabel()
    title = draw(plot.plot_starts, demo).get_title()
    assert "investment" not in title.lower() and "capacity started" in title.lower()


def test_capacity_chart_marks_the_year_after_the_plan(demo):
    ax = draw(plot.plot_paths, demo, "capacity")
    after = demo.plan.years[-1] + 1
    assert any(t.get_text() == "after the plan" for t in ax.texts)
    spans = [p for p in ax.patches if p.get_x() <= after <= p.get_x() + p.get_width()]
    assert spans, "the year after the plan is shaded"
    assert ax.get_xlim()[1] > after


def test_legends_stand_beside_the_axes(demo):
    for fn, args in ((plot.plot_paths, ("output",)), (plot.plot_starts, ()),
                     (plot.plot_labour, ()), (plot.plot_consumption, ())):
        ax = draw(fn, demo, *args)
        legend = ax.get_legend()
        box = legend.get_window_extent()
        assert box.x0 >= ax.get_window_extent().x1, fn.__name__


def test_thirty_years_of_ticks_fit_and_bars_fit_the_axis():
    r = make_plan(economy(3), 30).solve(progress=False)
    assert r.ok
    for fn in (plot.plot_starts, plot.plot_paths, plot.plot_utilisation):
        ax = draw(fn, r)
        labels = [t for t in ax.get_xticklabels() if t.get_text()]
        assert 5 <= len(labels) <= 10, fn.__name__
        boxes = sorted((t.get_window_extent() for t in labels), key=lambda b: b.x0)
        assert all(a.x1 < b.x0 for a, b in itertools.pairwise(boxes)), fn.__name__
    ax = draw(plot.plot_starts, r)
    lo, hi = ax.get_xlim()
    bars = [p for p in ax.patches]
    assert bars and all(lo <= p.get_x() and p.get_x() + p.get_width() <= hi for p in bars)
    assert hi - lo < 31.5  # no empty margin wider than a bar


def test_year_labels_never_overlap_in_a_default_figure(demo):
    # a new figure of the default size with the legend beside it: the narrowest case
    for ax in (plot.plot_paths(demo, "capacity"), plot.plot_ray_distance(demo),
               plot.plot_utilisation(demo)):
        ax.figure.canvas.draw()
        labels = [t for t in ax.get_xticklabels() if t.get_text()]
        boxes = sorted((t.get_window_extent() for t in labels), key=lambda b: b.x0)
        assert len(boxes) >= 5
        assert all(a.x1 + 4 < b.x0 for a, b in itertools.pairwise(boxes))
    ax = plot.plot_paths(demo, "capacity")
    marked = set(ax.get_xticks()) | set(ax.xaxis.get_minorticklocs())
    assert marked >= set(range(2027, 2043))  # every year marked, every other one labelled


def test_targets_chart_shows_margins(demo, impossible):
    ax = draw(plot.plot_targets, demo)
    words = [t.get_text() for t in ax.texts]
    assert len(words) == len(demo.plan.targets) and all(w.startswith("met") for w in words)
    machinery = next(w for w in words if "5,102" in w)  # output 8,702 against 3,600
    assert MONEY in machinery
    bad = draw(plot.plot_targets, impossible)
    missed = [t.get_text() for t in bad.texts if t.get_text().startswith("missed")]
    assert len(missed) == 1 and "−985,851" in missed[0]
    assert any(p.get_hatch() == "//" for p in bad.patches)  # missed is hatched, not only red


def test_diagnosis_chart(demo, impossible):
    ax = draw(plot.plot_diagnosis, impossible)
    row = impossible.diagnosis.shortfalls.iloc[0]
    assert [t.get_text() for t in ax.get_yticklabels()] == ["capacity target of energy in 2034"]
    assert f"short by {row['shortfall']:,.0f}\n{MONEY}" == ax.texts[0].get_text()
    assert ax.patches[0].get_width() == pytest.approx(100 * row["share"])
    assert "%" in ax.get_xlabel()
    ok = draw(plot.plot_diagnosis, demo)
    assert "meets every condition" in ok.texts[0].get_text()


def test_save_charts_writes_the_new_charts(demo, impossible, tmp_path):
    names = [p.stem for p in plot.save_charts(demo, tmp_path / "ok")]
    assert names == ["output", "capacity", "starts", "labour", "consumption", "targets",
                     "utilisation", "shadow_prices", "ray_distance"]
    bad = [p.stem for p in plot.save_charts(impossible, tmp_path / "bad")]
    assert bad == ["targets", "diagnosis"]
    assert set(names + bad) <= set(_CHART_NAMES)  # the command line knows every name
    assert all((tmp_path / "ok" / f"{n}.png").stat().st_size > 10_000 for n in names)


def test_no_chart_fails_on_a_one_sector_plan(tmp_path):
    r = gp.Plan(economy=one_sector(), years=range(2030, 2036)).solve(progress=False)
    assert r.ok
    for fn, kw in ((plot.plot_paths, {}), (plot.plot_paths, {"what": "capacity"}),
                   (plot.plot_starts, {}), (plot.plot_labour, {}),
                   (plot.plot_shadow_prices, {}), (plot.plot_shadow_prices, {"money": True}),
                   (plot.plot_utilisation, {}), (plot.plot_consumption, {}),
                   (plot.plot_targets, {}), (plot.plot_diagnosis, {}),
                   (plot.plot_ray_distance, {})):
        draw(fn, r, **kw)
    assert "no consumption" in draw(plot.plot_consumption, r).texts[0].get_text()
    assert "no targets" in draw(plot.plot_targets, r).texts[0].get_text()
    assert plot.save_charts(r, tmp_path / "one")
    floor = gp.Plan(economy=one_sector(), years=range(2030, 2036),
                    consumption=gp.Consumption(basket={"goods": 1.0}, floor=5.0),
                    targets=[gp.Target("goods", year=2035, capacity_at_least=120.0)])
    r2 = floor.solve(progress=False)
    assert r2.ok
    assert "baskets" in draw(plot.plot_consumption, r2).get_ylabel()
    assert draw(plot.plot_targets, r2).texts[0].get_text().startswith("met")


def test_scenario_axes_name_their_units():
    import pandas as pd

    table = pd.DataFrame({"labour.0.growth": [0.0, 0.01, 0.0, 0.01], "peak_labour_use":
                          [0.9, 0.8, 0.95, 0.85], "floor": [1, 1, 2, 2],
                          "status": ["optimal"] * 4})
    ax = draw(plot.plot_scenarios, table, "labour.0.growth", "peak_labour_use", by="floor")
    assert "a year" in ax.get_xlabel() and "fraction of the supply" in ax.get_ylabel()
    assert len(ax.lines) == 2
    assert np.isclose(ax.lines[0].get_ydata(), [0.9, 0.8]).all()
