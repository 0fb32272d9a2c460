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
