"""The demo scenario: the invented Republic of Arvenna plans 2027–2041.

Arvenna is a fictional country; its tables in ``data/demo/`` are invented
for illustration and describe no real economy.
"""

from __future__ import annotations

from pathlib import Path

from .economy import Economy
from .objectives import TerminalCapacity
from .plan import Consumption, LabourSupply, Plan, Target, TerminalGrowth

__all__ = ["DEMO_DIR", "demo_economy", "demo_plan"]

DEMO_DIR = Path(__file__).resolve().parent.parent / "data" / "demo"

BASKET = {"agriculture": 0.10, "food": 0.32, "textiles": 0.10, "energy": 0.05,
          "chemicals": 0.03, "services": 0.40}


def demo_economy(folder: str | Path | None = None) -> Economy:
    """Arvenna's economy: ten sectors from the demo tables."""
    d = Path(folder) if folder is not None else DEMO_DIR
    if not (d / "flows.csv").exists():
        from .errors import invalid

        raise invalid("folder", "hold the demo tables flows.csv, capital.csv and "
                      "capital_stocks.csv (run from a source checkout)", str(d))
    return Economy.from_tables(d / "flows.csv", capital=d / "capital.csv",
                               capital_stocks=d / "capital_stocks.csv",
                               consumption_basket=BASKET)


def demo_plan(folder: str | Path | None = None, *, years=range(2027, 2042)) -> Plan:
    """Arvenna's fifteen-year plan.

    Households are guaranteed a consumption level rising 2 % a year and never
    falling; the government's own demand for services and construction grows
    3 % a year; labour grows 1.2 % a year; the energy programme wants 3,400
    units of power capacity in service by 2034 and the machinery programme
    3,600 units of output in 2033. The plan maximises terminal capacity in
    balanced-growth proportions and keeps capacity growing at 4 % after 2041.
    """
    econ = demo_economy(folder)
    return Plan(
        economy=econ,
        years=years,
        labour=LabourSupply(start=4900, growth=0.012),
        consumption=Consumption(floor=9000, floor_growth=0.02, max_fall=0.0),
        final_demand={"services": 1500.0, "construction": 300.0},
        final_demand_growth=0.03,
        targets=[Target("energy", year=2034, capacity_at_least=3400),
                 Target("machinery", year=2033, output_at_least=3600)],
        terminal=TerminalGrowth(rate=0.04),
        objective=TerminalCapacity(),
    )
