"""The demo scenario: the invented Republic of Arvenna plans 2027–2041.

Arvenna is a fictional country; its tables are invented for illustration and
describe no real economy. They ship inside the package (``DEMO_DIR``, the
folder ``growthplan/demo_data/``), so the demo runs from an installed wheel
as well as from a source checkout, where ``data/demo/`` holds the same files
for reading and editing. :func:`copy_demo` writes them into a folder of your
own to edit and solve.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from .io.planfile import load_plan_file
from .model.economy import Economy
from .model.plan import Plan
from .model.regions import MultiRegionalEconomy

__all__ = ["DEMO_DIR", "PLAN_FILE", "CLIMATE_FILE", "DEMO_FILES", "SUPPLY_USE_FILES",
           "demo_economy", "demo_plan", "demo_climate_plan", "copy_demo", "demo_regions",
           "demo_regional_plan"]

DEMO_DIR = Path(__file__).resolve().parent / "demo_data"

PLAN_FILE = "plan.yaml"

CLIMATE_FILE = "climate.yaml"

DEMO_FILES = ("plan.yaml", "flows.csv", "capital.csv", "capital_stocks.csv", "README.md",
              "climate.yaml", "emissions.csv")

# the same country's supply and use tables and the spec that builds an economy from them
SUPPLY_USE_FILES = tuple(f"supply_use/{name}" for name in (
    "supply.csv", "use.csv", "employment.csv", "capital_flows.csv", "economy.yaml",
    "published_supply.csv", "published_use.csv", "published.yaml"))


def demo_plan(folder: str | Path | None = None) -> Plan:
    """Arvenna's fifteen-year plan, read from the demo's ``plan.yaml``.

    Households are guaranteed a consumption level rising 2 % a year and never
    falling; the government's own demand for services and construction grows
    3 % a year; labour grows 1.2 % a year; the energy programme wants 3,400
    million arvens a year of power capacity in service by 2034 and the
    machinery programme 3,600 million arvens of output in 2033 (the tables
    are in money: one unit of a sector is one million arvens' worth of its
    output at 2026 prices). The plan maximises terminal capacity in
    balanced-growth proportions and keeps capacity growing at 4 % after 2041.

    Parameters
    ----------
    folder : str or Path, optional
        A folder holding the demo files (such as one written by
        :func:`copy_demo` and edited); default the copy inside the package.

    Returns
    -------
    Plan
    """
    return load_plan_file(_folder(folder) / PLAN_FILE)[0]


def demo_climate_plan(folder: str | Path | None = None) -> Plan:
    """Arvenna's plan under a falling cap on greenhouse gases, read from ``climate.yaml``.

    The same plan as :func:`demo_plan` with the demo's invented satellite
    accounts (``emissions.csv``: kt of CO2 and CH4 per million arvens of
    output; households emit 0.15 kt of CO2 per basket; CH4 counts 28 times
    CO2 in kt CO2-eq), a renewable energy technique that needs no fuel from
    mining but more capital, and a cap on greenhouse gases of 16,000 kt
    CO2-eq in 2029 falling 2 % a year to 2041.

    Parameters
    ----------
    folder : str or Path, optional
        As for :func:`demo_plan`.

    Returns
    -------
    Plan
    """
    return load_plan_file(_folder(folder) / CLIMATE_FILE)[0]


def demo_economy(folder: str | Path | None = None) -> Economy:
    """Arvenna's economy: ten sectors from the demo tables.

    Parameters
    ----------
    folder : str or Path, optional
        As for :func:`demo_plan`.

    Returns
    -------
    Economy
    """
    return demo_plan(folder).economy


def copy_demo(folder: str | Path, *, overwrite: bool = False) -> list[Path]:
    """Write the demo's plan file and tables into ``folder``, to edit and solve.

    The files are written aside and moved in together (see
    :func:`growthplan.io.atomic_folder`); an existing, non-empty folder is
    written only with ``overwrite=True``, and then only files growthplan
    wrote there before are replaced.

    Parameters
    ----------
    folder : str or Path
        The folder to write; created when missing.
    overwrite : bool, default False
        Write into an existing, non-empty folder.

    Returns
    -------
    list of Path
        The files written, the plan file first.
    """
    from .io.atomic import atomic_folder

    source = _folder(None)
    target = Path(folder)
    with atomic_folder(target, overwrite=overwrite, kind="demo") as tmp:
        for name in DEMO_FILES:
            shutil.copyfile(source / name, tmp / name)
    return [target / name for name in DEMO_FILES]


def _folder(folder: str | Path | None) -> Path:
    d = Path(folder) if folder is not None else DEMO_DIR
    if not (d / PLAN_FILE).is_file():
        from .errors import invalid

        raise invalid("folder", "hold the demo plan file and its tables (plan.yaml, flows.csv, "
                      "capital.csv, capital_stocks.csv)", str(d))
    return d



# -- three regions of Arvenna -------------------------------------------------------------

REGION_SECTORS = ("grain", "machinery", "freight")


def demo_regions() -> MultiRegionalEconomy:
    """Arvenna's three regions: the Highlands, the Coast and the Plains (invented figures).

    The Highlands make machinery with little labour, the Plains grow grain,
    the Coast has the most people and the least capital. Every region can
    make every good; freight (million tonne-km) carries shipments between
    them. Grain is counted in thousand tonnes, machinery in million arvens
    at 2026 prices.
    """
    import numpy as np

    from .model.economy import CapitalSpec, Sector

    units = {"grain": "thousand tonnes", "machinery": "million arvens",
             "freight": "million tonne-km"}
    prices = {"grain": 0.30, "machinery": 1.0, "freight": 0.05}
    # input coefficients: rows grain, machinery, freight per unit of each column
    a = [[0.10, 0.02, 0.00], [0.08, 0.20, 0.02], [0.60, 0.50, 0.05]]
    # capital goods (machinery) per unit of new capacity; plus freight to install them
    b = [[0.0, 0.0, 0.0], [1.6, 2.2, 0.03], [2.0, 4.0, 0.2]]
    regions = {
        # region: (labour per unit of grain, machinery, freight), capacity, basket
        "highlands": ([0.020, 0.25, 0.004], [300.0, 900.0, 6000.0], [0.9, 0.20, 2.0]),
        "coast": ([0.030, 0.60, 0.003], [250.0, 150.0, 9000.0], [1.2, 0.25, 2.5]),
        "plains": ([0.008, 0.55, 0.005], [1400.0, 120.0, 5000.0], [0.8, 0.15, 2.0]),
    }
    econs = {}
    for name, (lab, cap, basket) in regions.items():
        econs[name] = Economy(
            sectors=[Sector(name=s, unit=units[s], price=prices[s]) for s in REGION_SECTORS],
            input_coefficients=np.array(a), capital_coefficients=np.array(b),
            labour_coefficients=np.array([lab]), labour_units=["thousand person-years"],
            value_unit="million arvens at 2026 prices", consumption_basket=np.array(basket),
            capital={s: CapitalSpec(initial_capacity=c, mean_service_life=life, lead_time=lead)
                     for s, c, life, lead in zip(REGION_SECTORS, cap, (25.0, 15.0, 30.0),
                                                 (1, 2, 2), strict=True)})
    return MultiRegionalEconomy.from_regions(econs)


def demo_regional_plan() -> Plan:
    """Arvenna's regional plan 2027–2041: who supplies whom, and whether the Coast catches up.

    Each region's labour grows 1 % a year (the Coast's 1.5 %), up to 20
    thousand person-years a year may move to the Highlands; freight between
    regions costs 2 million tonne-km per thousand tonnes of grain and 1 per
    million arvens of machinery (the shipping region's freight), and every
    region's consumption level stays at least 60 baskets a year.
    """
    from .model.objectives import DiscountedConsumption
    from .model.plan import Consumption, TerminalGrowth
    from .model.regions import Corridor

    mre = demo_regions()
    freight = {"grain": 2.0, "machinery": 1.0}
    corridors = [Corridor(origin=o, destination=d, goods=["grain", "machinery"],
                          transport=freight, both_ways=True)
                 for o, d in (("highlands", "coast"), ("plains", "coast"),
                              ("highlands", "plains"))]
    return mre.plan(range(2027, 2042), corridors=corridors, transport_sector="freight",
                    regional_labour={"highlands": 260.0, "coast": 420.0, "plains": 240.0},
                    labour_growth=0.01, migration={"highlands": 20.0},
                    consumption=Consumption(floor=60.0),
                    consumption_floors={"coast": 60.0, "highlands": 60.0, "plains": 60.0},
                    terminal=TerminalGrowth(rate=0.03),
                    objective=DiscountedConsumption(rate=0.03))
