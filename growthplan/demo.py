"""The demo scenario: the invented Republic of Arvenna plans 2027–2041.

Arvenna is a fictional country; its tables in ``data/demo/`` are invented
for illustration and describe no real economy.
"""

from __future__ import annotations

from pathlib import Path

from .economy import Economy
from .io.planfile import load_plan_file
from .plan import Plan

__all__ = ["DEMO_DIR", "PLAN_FILE", "demo_economy", "demo_plan"]

DEMO_DIR = Path(__file__).resolve().parent.parent / "data" / "demo"

PLAN_FILE = "plan.yaml"


def demo_plan(folder: str | Path | None = None) -> Plan:
    """Arvenna's fifteen-year plan, read from ``data/demo/plan.yaml``.

    Households are guaranteed a consumption level rising 2 % a year and never
    falling; the government's own demand for services and construction grows
    3 % a year; labour grows 1.2 % a year; the energy programme wants 3,400
    units of power capacity in service by 2034 and the machinery programme
    3,600 units of output in 2033. The plan maximises terminal capacity in
    balanced-growth proportions and keeps capacity growing at 4 % after 2041.
    """
    return load_plan_file(_folder(folder) / PLAN_FILE)[0]


def demo_economy(folder: str | Path | None = None) -> Economy:
    """Arvenna's economy: ten sectors from the demo tables."""
    return demo_plan(folder).economy


def _folder(folder: str | Path | None) -> Path:
    d = Path(folder) if folder is not None else DEMO_DIR
    if not (d / PLAN_FILE).exists():
        from .errors import invalid

        raise invalid("folder", "hold the demo plan file and tables (run from a source "
                      "checkout)", str(d))
    return d
