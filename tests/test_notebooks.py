"""The notebooks are committed with their outputs and keep to the public API (pytest runs
them through nbmake as well)."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

NOTEBOOKS = sorted((Path(__file__).resolve().parent.parent / "notebooks").glob("*.ipynb"))


def test_the_notebooks_are_there():
    assert [p.stem for p in NOTEBOOKS] == ["climate_plan", "impossible_targets", "quickstart",
                                           "regions", "scenario_sweep",
                                           "supply_use_to_plan", "techniques",
                                           "uncertainty_and_revision"]


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_notebook_is_saved_with_outputs_and_uses_the_public_api(path):
    cells = json.loads(path.read_text(encoding="utf-8"))["cells"]
    code = [c for c in cells if c["cell_type"] == "code"]
    source = "\n".join("".join(c["source"]) for c in code)
    assert all(c["outputs"] for c in code), "every code cell shows its result"
    kinds = [o["output_type"] for c in code for o in c["outputs"]]
    assert "error" not in kinds
    assert not [o for c in code for o in c["outputs"] if o.get("name") == "stderr"]
    assert any("image/png" in o.get("data", {}) for c in code for o in c["outputs"])
    assert "matplotlib.use" not in source  # charts inline
    assert 'simplefilter("ignore")' not in source and "simplefilter('ignore')" not in source
    imports = re.findall(r"^\s*(?:import|from)\s+(\S+)", source, re.M)
    # the library through its one public door, beside the usual tools of a notebook
    assert set(imports) <= {"growthplan", "matplotlib.pyplot", "pandas", "numpy", "warnings"}
    assert "import growthplan as gp" in source
    prose = [c for c in cells if c["cell_type"] == "markdown"]
    assert len(prose) >= len(code) // 2 + 1  # each step explained
    assert "arvens" in "".join("".join(c["source"]) for c in prose)  # numbers with units
