"""Labour by industry and by kind, from the employment tables offices publish.

An employment table gives the labour of each industry by kind (skill level,
occupation group), as a head count (``thousand persons``) or as labour input
(``thousand person-years``, ``million hours``). A plan counts labour input
per year, so a head count is turned into person-years by a factor
``person_years_per_person`` (the share of a full year an employed person
works on average; 1 when not given, an assumption reported as such).

Labour coefficients are labour per unit of output: ``l_kj = L_kj / x_j``
(kinds × industries, e.g. thousand person-years per million arvens). For a
symmetric table by products the labour of industries is first turned into
products like value added (see :class:`~growthplan.statistics.SupplyUseTable`).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np
import pandas as pd

from ..errors import invalid
from .layouts import LocatedTable

__all__ = ["Employment", "employment_table", "labour_coefficients"]

_INPUT = re.compile(r"person[- ]?years?|full[- ]time equivalents?|\bfte\b|hours?|"
                    r"man[- ]?years?|work[- ]?years?", re.I)
_HEADS = re.compile(r"persons?|people|jobs?|employees?|employed|workers?|heads?", re.I)


@dataclass(frozen=True)
class Employment:
    """Labour input by kind and industry, in one unit.

    Attributes
    ----------
    labour : DataFrame
        Kinds × industries, labour input per year in ``unit``.
    unit : str
        Unit of labour input (``"thousand person-years"``).
    published_unit : str
        The unit of the table as published.
    assumption : str
        How the published figures were turned into labour input.
    """

    labour: pd.DataFrame
    unit: str
    published_unit: str
    assumption: str

    @property
    def kinds(self) -> list[str]:
        """The labour kinds."""
        return [str(k) for k in self.labour.index]

    @property
    def industries(self) -> list[str]:
        """The industries."""
        return [str(c) for c in self.labour.columns]


def _input_unit(unit: str) -> str:
    """``thousand persons`` → ``thousand person-years``."""
    return _HEADS.sub("person-years", unit, count=1)


def employment_table(table: LocatedTable | pd.DataFrame, *, unit: str,
                     industries: Literal["rows", "columns"] = "rows",
                     person_years_per_person: float | None = None,
                     expected: list[str] | None = None) -> Employment:
    """Labour input by kind and industry from an employment table.

    Parameters
    ----------
    table : LocatedTable or DataFrame
        Industries × kinds (``industries="rows"``, as most offices print it)
        or kinds × industries. A table read by
        :func:`~growthplan.statistics.layouts.read_table` gives located errors.
    unit : str
        Unit of the figures: labour input (``"thousand person-years"``,
        ``"million hours"``) or a head count (``"thousand persons"``).
    industries : {"rows", "columns"}, default "rows"
        Where the industries are.
    person_years_per_person : float, optional
        For a head count: person-years worked per person employed, in
        (0, 1.5]. Default 1 (everyone employed the whole year), reported as
        an assumption. Not allowed for labour input.
    expected : list of str, optional
        The industries of the supply and use tables, in order: every one must
        be in the table, and no other.

    Returns
    -------
    Employment

    Raises
    ------
    InvalidInput
        Naming the file, row, column and value: a negative figure, an
        industry not in the supply and use tables or missing from them, a unit
        that says neither labour input nor a head count.
    """
    loc = table if isinstance(table, LocatedTable) else None
    frame = table.frame if isinstance(table, LocatedTable) else table.astype(float)
    where = loc.where() if loc is not None else "employment"
    if not isinstance(unit, str) or not unit.strip():
        raise invalid(f"{where} unit", "be a unit such as 'thousand person-years' or "
                      "'thousand persons'", unit)
    if industries not in ("rows", "columns"):
        raise invalid(f"{where} industries", "be 'rows' or 'columns'", industries)
    arr = frame.to_numpy(dtype=float)
    bad = ~np.isfinite(arr) | (arr < 0)
    if bad.any():
        i, j = np.argwhere(bad)[0]
        r, c = str(frame.index[i]), str(frame.columns[j])
        if loc is not None:
            raise loc.error(r, c, "be a number >= 0", float(arr[i, j]))
        raise invalid(f"employment[{r}, {c}]", "be a number >= 0", float(arr[i, j]))
    if expected is not None:
        codes = [str(x) for x in (frame.index if industries == "rows" else frame.columns)]
        unknown = [c for c in codes if c not in expected]
        missing = [c for c in expected if c not in codes]
        if unknown:
            u = unknown[0]
            if loc is not None:
                raise loc.error(u if industries == "rows" else None,
                                None if industries == "rows" else u,
                                "name an industry of the supply and use tables", u)
            raise invalid("employment", "name industries of the supply and use tables", u)
        if missing:
            raise invalid(where, f"give the labour of every industry (industries are its "
                          f"{industries}; missing {missing[:5]})", missing[0])
    lab = frame.T if industries == "rows" else frame.copy()
    if expected is not None:
        lab = lab[expected]
    lab.index = [str(k) for k in lab.index]
    lab.columns = [str(c) for c in lab.columns]
    unit = unit.strip()
    if _INPUT.search(unit):
        if person_years_per_person is not None:
            raise invalid(f"{where} person_years_per_person", "be given only for a head "
                          f"count (the unit {unit!r} is labour input already)",
                          person_years_per_person)
        return Employment(lab, unit, unit, f"employment is labour input in {unit}, "
                          "taken as published")
    if not _HEADS.search(unit):
        raise invalid(f"{where} unit", "say labour input ('person-years', 'hours', "
                      "'full-time equivalents') or a head count ('persons', 'jobs')", unit)
    factor = 1.0 if person_years_per_person is None else person_years_per_person
    if isinstance(factor, bool) or not isinstance(factor, int | float) \
            or not 0 < factor <= 1.5:
        raise invalid(f"{where} person_years_per_person", "be a number in (0, 1.5]", factor)
    out_unit = _input_unit(unit)
    how = ("each person employed counted as one person-year (employed the whole year; "
           "no factor given)" if person_years_per_person is None else
           f"each person employed counted as {factor:g} person-years")
    return Employment(lab * float(factor), out_unit, unit,
                      f"employment published in {unit} turned into {out_unit}: {how}")


def labour_coefficients(labour: Any, output: Any) -> pd.DataFrame:
    """Labour per unit of output, ``l_kj = L_kj / x_j`` (kinds × sectors).

    Parameters
    ----------
    labour : DataFrame or Employment
        Kinds × sectors.
    output : Series
        Gross output by sector (> 0), in the table's value unit.

    Returns
    -------
    DataFrame, kinds × sectors
    """
    lab = labour.labour if isinstance(labour, Employment) else pd.DataFrame(labour)
    x = pd.Series(output, dtype=float)
    missing = [c for c in lab.columns if c not in x.index]
    if missing:
        raise invalid("output", "give the output of every sector of the labour table",
                      missing[:5])
    zero = [c for c in lab.columns if not x[c] > 0]
    if zero:
        raise invalid(f"output[{zero[0]}]", "be > 0 (coefficients divide by it)",
                      float(x[zero[0]]))
    return lab.div(x[list(lab.columns)], axis=1)
