"""The README's example and the docstring examples run as written."""

from __future__ import annotations

import doctest
import importlib
import re
import warnings
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def test_readme_tour_runs(tmp_path, monkeypatch):
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## A short tour\s+```python\n(.*?)```", text, re.S).group(1)
    (tmp_path / "data").symlink_to(ROOT / "data")
    monkeypatch.chdir(tmp_path)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        namespace: dict = {}
        exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    assert namespace["result"].ok
    assert (tmp_path / "plan-out" / "output.csv").exists()


def test_readme_safe_outputs_example_runs(capsys):
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"```python\n(import tempfile, warnings.*?)```", text, re.S).group(1)
    exec(compile(block, "README.md", "exec"), {})  # noqa: S102 - our own README
    assert capsys.readouterr().out == "path must be a file growthplan wrote to be r\n"


@pytest.mark.parametrize("module", ["errors", "model.capital", "model.economy",
                                    "analysis.expanding", "model.plan",
                                    "io.atomic", "io.planfile", "results.result",
                                    "backends.options"])
def test_docstring_examples(module):
    mod = importlib.import_module(f"growthplan.{module}")
    failures, tried = doctest.testmod(mod, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert tried > 0 and failures == 0


def test_readme_supply_use_example_runs(tmp_path, monkeypatch):
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## From supply and use tables.*?```python\n(.*?)```", text,
                      re.S).group(1)
    monkeypatch.chdir(tmp_path)
    namespace: dict = {}
    exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    assert (tmp_path / "arvenna-economy" / "assumptions.md").exists()
    assert namespace["econ"].n == 5
def test_readme_impossible_plan_example_runs():
    """The example under "When the plan is impossible": the aim is blamed before labour."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"\*\*When the plan is impossible\*\*.*?```python\n(.*?)```", text,
                      re.S).group(1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        namespace: dict = {}
        exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    diag = namespace["result"].diagnosis
    assert list(diag.shortfalls.kind) == ["aim"]
    assert "labour" in diag.views() and diag.conflict()


def test_readme_published_example_runs():
    """The "Published tables" example on the invented tables; 247 is the use table's total."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## Published tables as the office prints them.*?```python\n(.*?)```",
                      text, re.S).group(1)
    namespace: dict = {}
    exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    printed, built = namespace["report"].figures["value added at basic prices"]
    assert printed == 247.0 and abs(built - 247.0) < 1e-9
    assert namespace["skeleton"].floor > 0


def test_readme_techniques_example_runs():
    """The "Choosing techniques" example; its switch year is the closed form it states."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## Choosing techniques\s.*?```python\n(.*?)```", text, re.S).group(1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        namespace: dict = {}
        exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    assert namespace["result"].ok
    assert namespace["result"].technique_years.loc["goods:saving", "first_start"] == 2032


def test_readme_regions_example_runs():
    """The "Several regions" example: the demo's three regions solve and ship goods."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## Several regions\s.*?```python\n(.*?)```", text, re.S).group(1)
    namespace: dict = {}
    exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    result = namespace["result"]
    assert result.ok
    assert result.flows["amount"].sum() > 0
    gap = result.regional_gap["highest_to_lowest"]
    assert gap.iloc[-1] < gap.iloc[0]
def test_readme_formulation_example_runs():
    """The formulation example: the state form solves the demo to the audited optimum of
    the expression form (the same LP written another way)."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"\*\*Capacity as an expression or as a state\.\*\*.*?```python\n(.*?)```",
                      text, re.S).group(1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        namespace: dict = {}
        exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
        expression = namespace["plan"].solve(formulation="expression")
    result = namespace["result"]
    assert result.ok and result.lp.formulation == "state"
    assert result.objective == pytest.approx(expression.objective, rel=1e-8)


def test_readme_emissions_example_runs():
    """The "Emissions" example: output held at E/e = 60/0.5 = 120 (closed form it states)."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    block = re.search(r"## Emissions and natural resources\s.*?```python\n(.*?)```", text,
                      re.S).group(1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        namespace: dict = {}
        exec(compile(block, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    result = namespace["result"]
    assert result.ok
    assert result.output["goods"].round(1).tolist() == [100.0, 115.0, 120.0, 120.0, 120.0,
                                                        120.0]
    assert (namespace["curve"]["status"] == "optimal").all()
