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


# a number as prose writes it: 4,680 · −6.473 · 0.0246 · 1e-14 (not part of a word or a name)
_NUMBER = re.compile(r"(?<![\w.])[-−]?\d(?:[\d,]*\d)?(?:\.\d+)?(?:e[-−]?\d+)?(?![\w])")


def _numbers(text: str) -> list[tuple[str, float, int]]:
    """(as written, value, decimals shown) for every number in ``text``."""
    out = []
    for m in _NUMBER.finditer(text):
        raw = m.group(0)
        plain = raw.replace("−", "-").replace(",", "")
        mantissa = plain.split("e")[0]
        decimals = len(mantissa.split(".")[1]) if "." in mantissa else 0
        out.append((raw, float(plain), decimals))
    return out


def _tiny(value: float) -> str:
    """A small number as prose writes it: ``1e-14``."""
    return f"{abs(value):.0e}".replace("e-0", "e-").replace("e+0", "e")


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_every_number_in_the_prose_is_one_the_code_prints(path):
    """The notebooks state only figures their cells reproduce: every number in the prose
    (but years and small counts) is, to the decimals it shows, a number printed by a cell,
    written in a cell's code or given in the demo's plan files (a share may be printed as a
    fraction and written as a percentage)."""
    cells = json.loads(path.read_text(encoding="utf-8"))["cells"]
    prose = "\n".join("".join(c["source"]) for c in cells if c["cell_type"] == "markdown")
    demo = Path(__file__).resolve().parent.parent / "growthplan" / "demo_data"
    shown = [p.read_text(encoding="utf-8") for p in sorted(demo.glob("*.yaml"))]
    for c in cells:
        if c["cell_type"] != "code":
            continue
        shown.append("".join(c["source"]))
        for o in c["outputs"]:
            shown.append("".join(o.get("text", "")))
            shown += ["".join(v) for k, v in o.get("data", {}).items() if k.startswith("text/")]
    printed = _numbers("\n".join(shown))
    values = [abs(v) for _, v, _ in printed]
    unmatched = []
    for raw, value, dec in _numbers(prose):
        if dec == 0 and "e" not in raw and (abs(value) <= 20 or 1900 <= value <= 2100):
            continue  # a year or a count
        if "e" in raw:  # a residual's order of magnitude
            if _tiny(value) not in {_tiny(v) for v in values}:
                unmatched.append(raw)
            continue
        half = 0.5 * 10.0 ** -dec + 1e-12
        target = abs(value)
        if any(abs(round(v, dec) - target) <= half or abs(round(100 * v, dec) - target) <= half
               for v in values):
            continue
        unmatched.append(raw)
    assert not unmatched, f"numbers in the prose no cell prints: {unmatched}"
