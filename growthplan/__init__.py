"""growthplan: multi-year growth planning of multi-sector economies.

The public door of the library; everything an analyst needs is importable
from here. Names are loaded on first use, so ``import growthplan`` loads no
solver, no PuLP and no scipy: the command line answers ``--help`` at once and
a notebook pays only for what it touches.

Examples
--------
>>> import growthplan as gp
>>> econ = gp.Economy(sectors=["farm", "mill"],
...                   input_coefficients=[[0.15, 0.25], [0.20, 0.05]])
>>> econ.leontief_inverse().round(6).to_numpy().tolist()
[[1.254125, 0.330033], [0.264026, 1.122112]]
"""

from __future__ import annotations

from .startup import command_signals

command_signals()  # first: a signal while the command starts ends it in one line

from typing import TYPE_CHECKING, Any  # noqa: E402

from .lazy import attribute  # noqa: E402

if TYPE_CHECKING:
    from . import backends
    from .analysis.choice import (
        ActivityTable,
        CheapestTechniques,
        VonNeumannChoice,
        WageProfitFrontier,
        activity_table,
        activity_table_from_economy,
        activity_table_from_plan,
        cheapest_techniques,
        von_neumann_choice,
        wage_profit_frontier,
    )
    from .analysis.expanding import ExpandingEconomy, expanding_economy
    from .analysis.footprint import (
        balanced_emissions,
        direct_intensities,
        emissions_by_sector,
        footprints,
        total_intensities,
    )
    from .analysis.steady import BalancedGrowth
    from .backends import HighsBackend, PulpBackend, Status
    from .backends.highs import SlowMethodWarning
    from .backends.options import SolveOptions
    from .demo import (
        DEMO_DIR,
        copy_demo,
        demo_climate_plan,
        demo_economy,
        demo_plan,
        demo_regional_plan,
        demo_regions,
    )
    from .errors import (
        EndEffectsWarning,
        GrowthplanError,
        GrowthplanWarning,
        InvalidInput,
        NoBalancedGrowth,
        PlanInfeasible,
        PlanNotOptimal,
        PlanUnbounded,
        SolverFailure,
        TinyCoefficientsWarning,
        UnproductiveEconomy,
    )
    from .io.planfile import load_plan_file, load_uncertainty, plan_file_schema, save_plan_file
    from .lp.program import LinearProgram
    from .model import capital, objectives
    from .model.economy import CapitalSpec, Economy, Sector
    from .model.plan import (
        Consumption,
        LabourSupply,
        Plan,
        StartsCeiling,
        Target,
        TechnicalChange,
        TerminalGrowth,
        Trade,
    )
    from .model.regions import Corridor, MultiRegionalEconomy, NationalTarget, Regions
    from .model.satellite import Budget, Cap, Impact, IntensityCeiling, Satellite, Stressor
    from .model.technique import Technique, technique_arrays
    from .results import CAUTION, Audit, Diagnosis, PlanResult
    from .results import charts as plot
    from .results.charts import plot_compare, plot_fan, plot_probabilities, plot_wage_profit
    from .scenarios.abatement import abatement_curve
    from .scenarios.revision import compare, read_actuals, revise
    from .scenarios.sweep import SerialExecutor, Sweep, sweep, variant
    from .scenarios.uncertainty import (
        Empirical,
        LogNormal,
        Normal,
        RobustPlan,
        Triangular,
        Uncertain,
        UncertaintyResult,
        UncertaintySpec,
        Uniform,
        reoptimise,
        robust_plan,
        stress_test,
    )
    from .statistics.build import BuildReport, build_economy, economy_spec_schema, write_economy
    from .statistics.satellite import read_satellite
    from .statistics.supply_use import SupplyUseTable, SymmetricTable
    from .statistics.tables import TransactionsTable, read_transactions

# public name -> (module below this package, attribute; None for the module itself)
_LAZY: dict[str, tuple[str, str | None]] = {
    "activity_table": ("analysis.choice", "activity_table"),
    "activity_table_from_economy": ("analysis.choice", "activity_table_from_economy"),
    "activity_table_from_plan": ("analysis.choice", "activity_table_from_plan"),
    "ActivityTable": ("analysis.choice", "ActivityTable"),
    "Audit": ("results", "Audit"),
    "backends": ("backends", None),
    "BalancedGrowth": ("analysis.steady", "BalancedGrowth"),
    "build_economy": ("statistics.build", "build_economy"),
    "BuildReport": ("statistics.build", "BuildReport"),
    "capital": ("model.capital", None),
    "CapitalSpec": ("model.economy", "CapitalSpec"),
    "CAUTION": ("results", "CAUTION"),
    "cheapest_techniques": ("analysis.choice", "cheapest_techniques"),
    "CheapestTechniques": ("analysis.choice", "CheapestTechniques"),
    "Corridor": ("model.regions", "Corridor"),
    "compare": ("scenarios.revision", "compare"),
    "Consumption": ("model.plan", "Consumption"),
    "copy_demo": ("demo", "copy_demo"),
    "DEMO_DIR": ("demo", "DEMO_DIR"),
    "demo_economy": ("demo", "demo_economy"),
    "demo_plan": ("demo", "demo_plan"),
    "demo_regional_plan": ("demo", "demo_regional_plan"),
    "demo_regions": ("demo", "demo_regions"),
    "Diagnosis": ("results", "Diagnosis"),
    "Economy": ("model.economy", "Economy"),
    "economy_spec_schema": ("statistics.build", "economy_spec_schema"),
    "Empirical": ("scenarios.uncertainty", "Empirical"),
    "EndEffectsWarning": ("errors", "EndEffectsWarning"),
    "expanding_economy": ("analysis.expanding", "expanding_economy"),
    "ExpandingEconomy": ("analysis.expanding", "ExpandingEconomy"),
    "GrowthplanError": ("errors", "GrowthplanError"),
    "GrowthplanWarning": ("errors", "GrowthplanWarning"),
    "HighsBackend": ("backends", "HighsBackend"),
    "InvalidInput": ("errors", "InvalidInput"),
    "LabourSupply": ("model.plan", "LabourSupply"),
    "LinearProgram": ("lp.program", "LinearProgram"),
    "MultiRegionalEconomy": ("model.regions", "MultiRegionalEconomy"),
    "NationalTarget": ("model.regions", "NationalTarget"),
    "load_plan_file": ("io.planfile", "load_plan_file"),
    "load_uncertainty": ("io.planfile", "load_uncertainty"),
    "LogNormal": ("scenarios.uncertainty", "LogNormal"),
    "NoBalancedGrowth": ("errors", "NoBalancedGrowth"),
    "Normal": ("scenarios.uncertainty", "Normal"),
    "objectives": ("model.objectives", None),
    "Plan": ("model.plan", "Plan"),
    "plan_file_schema": ("io.planfile", "plan_file_schema"),
    "PlanInfeasible": ("errors", "PlanInfeasible"),
    "PlanNotOptimal": ("errors", "PlanNotOptimal"),
    "PlanResult": ("results", "PlanResult"),
    "PlanUnbounded": ("errors", "PlanUnbounded"),
    "plot": ("results.charts", None),
    "plot_compare": ("results.charts", "plot_compare"),
    "plot_fan": ("results.charts", "plot_fan"),
    "plot_probabilities": ("results.charts", "plot_probabilities"),
    "plot_wage_profit": ("results.charts", "plot_wage_profit"),
    "PulpBackend": ("backends", "PulpBackend"),
    "read_actuals": ("scenarios.revision", "read_actuals"),
    "read_transactions": ("statistics.tables", "read_transactions"),
    "Regions": ("model.regions", "Regions"),
    "reoptimise": ("scenarios.uncertainty", "reoptimise"),
    "revise": ("scenarios.revision", "revise"),
    "robust_plan": ("scenarios.uncertainty", "robust_plan"),
    "RobustPlan": ("scenarios.uncertainty", "RobustPlan"),
    "save_plan_file": ("io.planfile", "save_plan_file"),
    "Sector": ("model.economy", "Sector"),
    "SerialExecutor": ("scenarios.sweep", "SerialExecutor"),
    "SlowMethodWarning": ("backends.highs", "SlowMethodWarning"),
    "SolveOptions": ("backends.options", "SolveOptions"),
    "SolverFailure": ("errors", "SolverFailure"),
    "StartsCeiling": ("model.plan", "StartsCeiling"),
    "Status": ("backends", "Status"),
    "stress_test": ("scenarios.uncertainty", "stress_test"),
    "SupplyUseTable": ("statistics.supply_use", "SupplyUseTable"),
    "Sweep": ("scenarios.sweep", "Sweep"),
    "sweep": ("scenarios.sweep", "sweep"),
    "SymmetricTable": ("statistics.supply_use", "SymmetricTable"),
    "Target": ("model.plan", "Target"),
    "TechnicalChange": ("model.plan", "TechnicalChange"),
    "Technique": ("model.technique", "Technique"),
    "Satellite": ("model.satellite", "Satellite"),
    "Stressor": ("model.satellite", "Stressor"),
    "Impact": ("model.satellite", "Impact"),
    "Cap": ("model.satellite", "Cap"),
    "Budget": ("model.satellite", "Budget"),
    "IntensityCeiling": ("model.satellite", "IntensityCeiling"),
    "read_satellite": ("statistics.satellite", "read_satellite"),
    "abatement_curve": ("scenarios.abatement", "abatement_curve"),
    "demo_climate_plan": ("demo", "demo_climate_plan"),
    "direct_intensities": ("analysis.footprint", "direct_intensities"),
    "total_intensities": ("analysis.footprint", "total_intensities"),
    "footprints": ("analysis.footprint", "footprints"),
    "emissions_by_sector": ("analysis.footprint", "emissions_by_sector"),
    "balanced_emissions": ("analysis.footprint", "balanced_emissions"),
    "technique_arrays": ("model.technique", "technique_arrays"),
    "TerminalGrowth": ("model.plan", "TerminalGrowth"),
    "TinyCoefficientsWarning": ("errors", "TinyCoefficientsWarning"),
    "Trade": ("model.plan", "Trade"),
    "TransactionsTable": ("statistics.tables", "TransactionsTable"),
    "Triangular": ("scenarios.uncertainty", "Triangular"),
    "Uncertain": ("scenarios.uncertainty", "Uncertain"),
    "UncertaintyResult": ("scenarios.uncertainty", "UncertaintyResult"),
    "UncertaintySpec": ("scenarios.uncertainty", "UncertaintySpec"),
    "Uniform": ("scenarios.uncertainty", "Uniform"),
    "UnproductiveEconomy": ("errors", "UnproductiveEconomy"),
    "variant": ("scenarios.sweep", "variant"),
    "von_neumann_choice": ("analysis.choice", "von_neumann_choice"),
    "VonNeumannChoice": ("analysis.choice", "VonNeumannChoice"),
    "wage_profit_frontier": ("analysis.choice", "wage_profit_frontier"),
    "WageProfitFrontier": ("analysis.choice", "WageProfitFrontier"),
    "write_economy": ("statistics.build", "write_economy"),
}

__all__ = [
    "__version__",
    "activity_table",
    "activity_table_from_economy",
    "activity_table_from_plan",
    "ActivityTable",
    "Audit",
    "backends",
    "BalancedGrowth",
    "build_economy",
    "BuildReport",
    "capital",
    "CapitalSpec",
    "CAUTION",
    "cheapest_techniques",
    "CheapestTechniques",
    "Corridor",
    "compare",
    "Consumption",
    "copy_demo",
    "DEMO_DIR",
    "demo_economy",
    "demo_plan",
    "demo_regional_plan",
    "demo_regions",
    "Diagnosis",
    "Economy",
    "economy_spec_schema",
    "Empirical",
    "EndEffectsWarning",
    "expanding_economy",
    "ExpandingEconomy",
    "GrowthplanError",
    "GrowthplanWarning",
    "HighsBackend",
    "InvalidInput",
    "LabourSupply",
    "LinearProgram",
    "MultiRegionalEconomy",
    "NationalTarget",
    "load_plan_file",
    "load_uncertainty",
    "LogNormal",
    "NoBalancedGrowth",
    "Normal",
    "objectives",
    "Plan",
    "plan_file_schema",
    "PlanInfeasible",
    "PlanNotOptimal",
    "PlanResult",
    "PlanUnbounded",
    "plot",
    "plot_compare",
    "plot_fan",
    "plot_probabilities",
    "plot_wage_profit",
    "PulpBackend",
    "read_actuals",
    "read_transactions",
    "Regions",
    "reoptimise",
    "revise",
    "robust_plan",
    "RobustPlan",
    "save_plan_file",
    "Sector",
    "SerialExecutor",
    "SlowMethodWarning",
    "SolveOptions",
    "SolverFailure",
    "StartsCeiling",
    "Status",
    "stress_test",
    "SupplyUseTable",
    "Sweep",
    "sweep",
    "SymmetricTable",
    "Target",
    "TechnicalChange",
    "Technique",
    "Satellite",
    "Stressor",
    "Impact",
    "Cap",
    "Budget",
    "IntensityCeiling",
    "read_satellite",
    "abatement_curve",
    "demo_climate_plan",
    "direct_intensities",
    "total_intensities",
    "footprints",
    "emissions_by_sector",
    "balanced_emissions",
    "technique_arrays",
    "TerminalGrowth",
    "TinyCoefficientsWarning",
    "Trade",
    "TransactionsTable",
    "Triangular",
    "Uncertain",
    "UncertaintyResult",
    "UncertaintySpec",
    "Uniform",
    "UnproductiveEconomy",
    "variant",
    "von_neumann_choice",
    "VonNeumannChoice",
    "wage_profit_frontier",
    "WageProfitFrontier",
    "write_economy",
]


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("growthplan")
    except PackageNotFoundError:  # running from a source tree
        return "0.0.0"


def __getattr__(name: str) -> Any:
    if name == "__version__":
        globals()[name] = _version()
        return globals()[name]
    return attribute(__name__, name, _LAZY, globals())


def __dir__() -> list[str]:
    return sorted(__all__)
