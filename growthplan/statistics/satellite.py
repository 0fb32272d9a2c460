"""Satellite tables: emissions and resource use by sector, read into satellite accounts.

A satellite table has one row per stressor and one column per sector (or
technique key) in the wide layout, or one row per cell (stressor, sector,
value) in the long layout, as the flows tables (:mod:`growthplan.statistics.layouts`).
It holds either intensities (amounts per unit of output) or, with the base
year's gross output given, the flows themselves (tonnes emitted in the base
year), divided here by the output of each sector: ``S = F x̂^-1``.
"""

from __future__ import annotations

import os
from collections.abc import Mapping
from typing import Any

import numpy as np
import pandas as pd

from ..errors import invalid
from ..model.satellite import Impact, Satellite, Stressor
from .layouts import TableLayout, read_table

__all__ = ["read_satellite", "satellite_from_frame"]


def read_satellite(table: TableLayout | str | os.PathLike[str] | pd.DataFrame, *,
                   units: Mapping[str, str], output: Any = None,
                   households: Mapping[str, float] | None = None,
                   impacts: list[Impact] | None = None, resources: list[str] | None = None,
                   base: str | os.PathLike[str] | None = None) -> Satellite:
    """Satellite accounts from a table of intensities or of base-year flows.

    Parameters
    ----------
    table : TableLayout, path or DataFrame
        Stressors × sectors (wide), or stressor, sector, value rows (long,
        through a :class:`~growthplan.statistics.layouts.TableLayout`).
    units : mapping of str to str
        The unit of every stressor in the table (of the flows or amounts).
    output : mapping or Series of sector to float, optional
        Base-year gross output; then the table holds flows and intensities are
        flows divided by output (a sector with flows and no output is refused).
    households : mapping of str to float, optional
        Direct amounts per unit of the consumption level, by stressor.
    impacts : list of Impact, optional
        The characterisation.
    resources : list of str, optional
        Stressors that are resources used rather than emissions.
    base : path, optional
        Folder a relative file name is relative to.

    Returns
    -------
    Satellite
    """
    if isinstance(table, pd.DataFrame):
        frame, what = table, "satellite table"
    else:
        loc = read_table(table, what="satellite table", base=base)
        frame, what = loc.frame, loc.where()
    return satellite_from_frame(frame, units=units, output=output, households=households,
                                impacts=impacts, resources=resources, what=what)


def satellite_from_frame(frame: pd.DataFrame, *, units: Mapping[str, str], output: Any = None,
                         households: Mapping[str, float] | None = None,
                         impacts: list[Impact] | None = None,
                         resources: list[str] | None = None,
                         what: str = "satellite table") -> Satellite:
    """:func:`read_satellite` for a DataFrame already read (stressors × sectors)."""
    values = frame.apply(pd.to_numeric, errors="coerce").to_numpy(dtype=float)
    bad = ~np.isfinite(values) | (values < 0)
    if bad.any():
        i, j = (int(k[0]) for k in np.nonzero(bad))
        raise invalid(f"{what} [{frame.index[i]!s}, {frame.columns[j]!s}]",
                      "be a finite number >= 0", frame.iat[i, j])
    names = [str(s) for s in frame.index]
    missing = [s for s in names if s not in units]
    if missing:
        raise invalid("units", "give the unit of every stressor in the table", missing[:5])
    cols = [str(c) for c in frame.columns]
    if output is not None:
        x = pd.Series(output, dtype=float) if not isinstance(output, pd.Series) else output
        x.index = x.index.map(str)
        absent = [c for c in cols if c not in x.index]
        if absent:
            raise invalid("output", "give the gross output of every sector of the table",
                          absent[:5])
        xs = x.reindex(cols).to_numpy(dtype=float)
        if not np.all(np.isfinite(xs)) or np.any(xs < 0):
            raise invalid("output", "hold finite amounts >= 0", xs.tolist()[:5])
        idle = (xs == 0) & np.any(values > 0, axis=0)
        if idle.any():
            raise invalid("output", "be > 0 where the table has flows (intensity is flow over "
                          "output)", [cols[j] for j in np.flatnonzero(idle)][:5])
        with np.errstate(divide="ignore", invalid="ignore"):
            values = np.where(xs > 0, values / np.where(xs > 0, xs, 1.0), 0.0)
    homes = dict(households or {})
    unknown = [k for k in homes if k not in names]
    if unknown:
        raise invalid("households", "name stressors of the table", unknown[:5])
    res = set(resources or [])
    stressors = [Stressor(name=s, unit=units[s], resource=s in res,
                          intensities={c: float(v) for c, v in zip(cols, values[i], strict=True)
                                       if v != 0},
                          households=float(homes.get(s, 0.0)))
                 for i, s in enumerate(names)]
    return Satellite(stressors=stressors, impacts=list(impacts or []))
