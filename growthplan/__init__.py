"""growthplan: multi-year growth planning of multi-sector economies.

The public door of the library; everything an analyst needs is importable
from here.
"""

from importlib.metadata import PackageNotFoundError, version

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
    plot_wage_profit,
    von_neumann_choice,
    wage_profit_frontier,
)
from .analysis.expanding import ExpandingEconomy, expanding_economy
from .analysis.steady import BalancedGrowth
from .backends import HighsBackend, PulpBackend, Status
from .backends.highs import SlowMethodWarning
from .demo import DEMO_DIR, copy_demo, demo_economy, demo_plan
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
from .model.technique import Technique, technique_arrays
from .results import CAUTION, Audit, Diagnosis, PlanResult
from .results import charts as plot
from .scenarios.revision import compare, plot_compare, read_actuals, revise
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
    plot_fan,
    plot_probabilities,
    reoptimise,
    robust_plan,
    stress_test,
)
from .statistics.build import BuildReport, build_economy, economy_spec_schema, write_economy
from .statistics.supply_use import SupplyUseTable, SymmetricTable
from .statistics.tables import TransactionsTable, read_transactions

try:
    __version__ = version("growthplan")
except PackageNotFoundError:  # running from a source tree
    __version__ = "0.0.0"

__all__ = [
    "Audit",
    "DEMO_DIR",
    "demo_economy",
    "demo_plan",
    "copy_demo",
    "HighsBackend",
    "PulpBackend",
    "backends",
    "variant",
    "CAUTION",
    "Consumption",
    "Diagnosis",
    "LabourSupply",
    "LinearProgram",
    "Plan",
    "PlanResult",
    "StartsCeiling",
    "Status",
    "Target",
    "TechnicalChange",
    "TerminalGrowth",
    "Trade",
    "objectives",
    "plot",
    "BalancedGrowth",
    "CapitalSpec",
    "Economy",
    "EndEffectsWarning",
    "ExpandingEconomy",
    "GrowthplanError",
    "GrowthplanWarning",
    "InvalidInput",
    "NoBalancedGrowth",
    "PlanInfeasible",
    "PlanNotOptimal",
    "PlanUnbounded",
    "Sector",
    "SerialExecutor",
    "Sweep",
    "SolverFailure",
    "TinyCoefficientsWarning",
    "SupplyUseTable",
    "SymmetricTable",
    "TransactionsTable",
    "UnproductiveEconomy",
    "__version__",
    "capital",
    "expanding_economy",
    "load_plan_file",
    "plan_file_schema",
    "read_transactions",
    "save_plan_file",
    "sweep",
    "compare",
    "plot_compare",
    "revise",
    "Empirical",
    "LogNormal",
    "Normal",
    "RobustPlan",
    "Triangular",
    "Uncertain",
    "UncertaintyResult",
    "UncertaintySpec",
    "Uniform",
    "plot_fan",
    "plot_probabilities",
    "reoptimise",
    "robust_plan",
    "stress_test",
    "ActivityTable",
    "CheapestTechniques",
    "VonNeumannChoice",
    "WageProfitFrontier",
    "activity_table",
    "activity_table_from_economy",
    "activity_table_from_plan",
    "cheapest_techniques",
    "plot_wage_profit",
    "von_neumann_choice",
    "wage_profit_frontier",
    "BuildReport",
    "build_economy",
    "economy_spec_schema",
    "write_economy",
    "Technique",
    "technique_arrays",
    "load_uncertainty",
    "read_actuals",
    "SlowMethodWarning",
]
