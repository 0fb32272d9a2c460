"""How a plan is solved: one settings object, checked in one place, and the default back end.

:class:`SolveOptions` holds the method, time limit, threads, tolerances,
further HiGHS options and, optionally, another back end. The Python API
(``Plan.solve``), plan files (their ``solve`` section) and the command line
all build one, so a setting is refused with the same words wherever it
comes from. :func:`default_backend` is the one place the default back end
(HiGHS) is made. Nothing here loads a solver.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from pydantic import Field, field_validator
from pydantic.json_schema import SkipJsonSchema

from ..errors import invalid, suggest
from ..model.validation import Model, Rule
from .base import Backend
from .methods import METHODS

if TYPE_CHECKING:
    from .highs import HighsBackend

__all__ = ["SolveOptions", "default_backend", "highs_backend"]

# the keywords of Plan.solve that are solver settings, with their defaults
KEYWORDS: dict[str, Any] = {"method": "auto", "time_limit": None, "threads": None,
                            "tolerance": None, "audit_tolerance": 1e-6, "options": None,
                            "backend": None}


class SolveOptions(Model):
    """How to solve a plan (the ``solve`` section of a plan file).

    Parameters
    ----------
    method : str, default "auto"
        HiGHS method: ``auto`` (chosen by the plan's size) or one of
        :data:`growthplan.backends.methods.METHODS`.
    time_limit : float, optional
        Seconds for the solver, > 0.
    threads : int, optional
        Solver threads, >= 1.
    tolerance : float, optional
        Primal and dual feasibility tolerance of HiGHS, in (0, 1).
    audit_tolerance : float, default 1e-6
        Largest violation, relative to each condition's own terms, that the
        audit accepts, in (0, 1).
    options : dict, optional
        Further HiGHS options by name (a bad name or value is refused when
        the solver is made).
    backend : Backend, optional
        Another back end (Python only, never in a file); then ``method``,
        ``time_limit``, ``threads``, ``tolerance`` and ``options`` are its
        business.

    Examples
    --------
    >>> from growthplan.backends.options import SolveOptions
    >>> SolveOptions(method="simplex", time_limit=60).keywords()["time_limit"]
    60.0
    >>> SolveOptions(threads=0)
    Traceback (most recent call last):
        ...
    growthplan.errors.InvalidInput: threads must be at least 1. Got 0.
    """

    method: str = "auto"
    time_limit: float | None = Field(default=None, gt=0, allow_inf_nan=False, strict=True)
    threads: int | None = Field(default=None, ge=1, strict=True)
    tolerance: float | None = Field(default=None, gt=0, lt=1, strict=True)
    audit_tolerance: float = Field(default=1e-6, gt=0, lt=1, allow_inf_nan=False, strict=True)
    options: dict[str, Any] = Field(default_factory=dict)
    backend: SkipJsonSchema[Any] = Field(default=None, exclude=True)

    @field_validator("method")
    @classmethod
    def _method(cls, v: str) -> str:
        if v != "auto" and v not in METHODS:
            raise Rule(f"be 'auto' or one of {', '.join(METHODS)}", v,
                       hint=suggest(v, ["auto", *METHODS], sentence=True))
        return v

    @field_validator("backend")
    @classmethod
    def _backend(cls, v: Any) -> Any:
        if v is not None and not (callable(getattr(v, "solve", None))
                                  and callable(getattr(v, "alternatives", None))):
            raise Rule("be a back end (an object with solve and alternatives), given in "
                       "Python", type(v).__name__)
        return v

    @classmethod
    def of(cls, solver: SolveOptions | None = None, **keywords: Any) -> SolveOptions:
        """The settings of a solve given as an object or as loose keywords, never both.

        Parameters
        ----------
        solver : SolveOptions, optional
            The settings as one object.
        **keywords
            The keywords of :meth:`growthplan.Plan.solve` that are settings
            (``method``, ``time_limit``, ``threads``, ``tolerance``,
            ``audit_tolerance``, ``options``, ``backend``).

        Returns
        -------
        SolveOptions
        """
        given = {k: v for k, v in keywords.items() if v is not KEYWORDS[k]
                 and not (k == "method" and v == "auto")
                 and not (k == "audit_tolerance" and v == 1e-6)}
        if solver is not None:
            if not isinstance(solver, SolveOptions):
                raise invalid("solver", "be a SolveOptions", type(solver).__name__)
            if given:
                raise invalid("solver", "come alone: give the settings in it, not also as "
                              "keywords", ", ".join(sorted(given)))
            return solver
        if given.get("options") is not None and not isinstance(given["options"], dict):
            raise invalid("options", "be a mapping of HiGHS option names to values",
                          given["options"])
        given = {k: (int(v) if k == "threads" and _is_whole(v) else v)
                 for k, v in given.items() if v is not None}
        return cls(**given)

    def keywords(self) -> dict[str, Any]:
        """The settings as keywords of :meth:`growthplan.Plan.solve` (the back end left out)."""
        return {"method": self.method, "time_limit": self.time_limit, "threads": self.threads,
                "tolerance": self.tolerance, "audit_tolerance": self.audit_tolerance,
                "options": dict(self.options) or None}


def _is_whole(v: Any) -> bool:
    """A numpy or Python integer (never a bool)."""
    return hasattr(v, "__index__") and not isinstance(v, bool)


def default_backend(options: SolveOptions | None = None, **highs: Any) -> Backend:
    """The back end a solve uses: ``options.backend``, or HiGHS with these settings.

    Parameters
    ----------
    options : SolveOptions, optional
        The settings (default: HiGHS's automatic method).
    **highs
        Further keywords of :class:`~growthplan.backends.highs.HighsBackend`
        (``scale``, ``presolve``).

    Returns
    -------
    Backend
    """
    opts = options or SolveOptions()
    if opts.backend is not None:
        chosen: Backend = opts.backend
        return chosen
    return highs_backend(opts, **highs)


def highs_backend(options: SolveOptions | None = None, **highs: Any) -> HighsBackend:
    """The default solver itself: HiGHS with these settings (``options.backend`` ignored).

    For the steps that need HiGHS's own features (an infeasible subset, an
    unbounded ray) whatever back end solved the plan.

    Parameters
    ----------
    options : SolveOptions, optional
    **highs
        Further keywords of :class:`~growthplan.backends.highs.HighsBackend`.

    Returns
    -------
    HighsBackend
    """
    from .highs import HighsBackend

    opts = options or SolveOptions()

    return HighsBackend(opts.method, time_limit=opts.time_limit, threads=opts.threads,
                        tolerance=opts.tolerance, options=dict(opts.options) or None, **highs)

