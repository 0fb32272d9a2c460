"""A solved plan: the result object, its tables, the audit and the diagnosis."""

from .audit import Audit
from .diagnosis import Diagnosis, diagnose
from .result import CAUTION, PlanResult
from .summary import Summary, key_figures

__all__ = ["Audit", "CAUTION", "Diagnosis", "PlanResult", "Summary", "diagnose", "key_figures"]
