"""growthplan: multi-year growth planning of multi-sector economies.

The public door of the library; everything an analyst needs is importable
from here.
"""

from importlib.metadata import PackageNotFoundError, version

from . import capital, objectives
from .audit import Audit
from .compile import LinearProgram
from .diagnose import Diagnosis
from .economy import CapitalSpec, Economy, Sector
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
    UnproductiveEconomy,
)
from .expanding import ExpandingEconomy, expanding_economy
from .io.planfile import load_plan_file, plan_file_schema, save_plan_file
from .io.tables import TransactionsTable, read_transactions
from .plan import (
    Consumption,
    LabourSupply,
    Plan,
    StartsCeiling,
    Target,
    TerminalGrowth,
    Trade,
)
from .result import CAUTION, PlanResult
from .solvers import Status
from .steady import BalancedGrowth
from .sweep import SerialExecutor, Sweep, sweep

try:
    __version__ = version("growthplan")
except PackageNotFoundError:  # running from a source tree
    __version__ = "0.0.0"

__all__ = [
    "Audit",
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
    "TerminalGrowth",
    "Trade",
    "objectives",
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
]
