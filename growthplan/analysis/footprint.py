"""Emissions in the steady state: direct and total intensities, footprints, balanced growth.

With direct intensities ``S`` (stressors × sectors, per unit of output) and
a characterisation ``C`` (impacts × stressors):

* total (embodied) intensities ``M = S (I − A)^-1``: everything emitted
  along the supply chain per unit of final demand for each sector's product;
* the footprint of a final-demand vector ``y`` is ``M y``, of which
  ``S x̂`` (with ``x = (I − A)^-1 y``) is emitted by each producing sector;
* on a balanced-growth ray ``x`` emissions grow at the growth rate; their
  level per unit of output value is ``S x / p·x`` and per unit of GDP
  ``S x / p·(I − A) x`` (base-year prices ``p``).

Impacts are reported below their stressors (rows ``C S`` and ``C M``).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

if TYPE_CHECKING:
    from ..model.economy import Economy
    from ..model.satellite import Satellite

__all__ = ["direct_intensities", "total_intensities", "footprints", "emissions_by_sector",
           "balanced_emissions"]


def _rows(sat: Satellite) -> pd.Index:
    return pd.Index(sat.names, name="stressor")


def _direct(econ: Economy, sat: Satellite) -> np.ndarray:
    return sat.characterisation() @ sat.intensities(econ.names)


def direct_intensities(econ: Economy, sat: Satellite) -> pd.DataFrame:
    """Amount per unit of each sector's output, ``S`` (and ``C S``), stressors × sectors.

    Parameters
    ----------
    econ : Economy
    sat : Satellite

    Returns
    -------
    pandas.DataFrame
        Units in ``attrs["units"]`` (per unit of each sector's output).
    """
    out = pd.DataFrame(_direct(econ, sat), index=_rows(sat),
                       columns=pd.Index(econ.names, name="sector"))
    out.attrs["units"] = dict(zip(sat.names, sat.units, strict=True))
    return out


def total_intensities(econ: Economy, sat: Satellite) -> pd.DataFrame:
    """Total (embodied) intensities ``M = S (I − A)^-1``, stressors × sectors.

    Parameters
    ----------
    econ : Economy
    sat : Satellite

    Returns
    -------
    pandas.DataFrame
        Amount emitted along the whole supply chain per unit of final demand
        for each sector's product.
    """
    from scipy import linalg

    a = np.asarray(econ.input_coefficients, dtype=float)
    s = _direct(econ, sat)
    # M (I − A) = S, solved rather than inverted
    m = linalg.solve((np.eye(a.shape[0]) - a).T, s.T).T
    out = pd.DataFrame(m, index=_rows(sat), columns=pd.Index(econ.names, name="sector"))
    out.attrs["units"] = dict(zip(sat.names, sat.units, strict=True))
    return out


def footprints(econ: Economy, sat: Satellite, final_demand: Any, *,
               consumption_level: float | None = None,
               direct: pd.DataFrame | None = None) -> pd.DataFrame:
    """Footprint of each final-demand category, ``M y_c``, stressors × categories.

    Parameters
    ----------
    econ : Economy
    sat : Satellite
    final_demand : DataFrame, Series or mapping
        Sectors × categories (households, government, investment, exports…),
        or one vector.
    consumption_level : float, optional
        The households' consumption level; adds a ``households (direct)``
        column with their own emissions (``households`` of each stressor times it).
    direct : DataFrame, optional
        Emissions of the final-demand categories themselves (fuel burnt by
        households), stressors × categories, added to their footprints.

    Returns
    -------
    pandas.DataFrame
    """
    y = final_demand if isinstance(final_demand, pd.DataFrame) else \
        pd.DataFrame({"final demand": pd.Series(final_demand, dtype=float)})
    y = y.reindex(econ.names).fillna(0.0)
    m = total_intensities(econ, sat)
    out = m @ y
    if direct is not None:
        extra = direct.reindex(index=out.index, columns=out.columns).fillna(0.0)
        out = out + extra.to_numpy(dtype=float)
    if consumption_level is not None:
        c = sat.characterisation()
        out["households (direct)"] = c @ sat.households() * float(consumption_level)
    out.columns.name = "category"
    out.attrs["units"] = m.attrs["units"]
    return out


def emissions_by_sector(econ: Economy, sat: Satellite, output: Any) -> pd.DataFrame:
    """Emissions of each producing sector, ``S x̂``, stressors × sectors.

    Parameters
    ----------
    econ : Economy
    sat : Satellite
    output : Series, mapping or array
        Gross output by sector (e.g. ``(I − A)^-1 y`` for a final demand ``y``).

    Returns
    -------
    pandas.DataFrame
    """
    x = pd.Series(output, dtype=float).reindex(econ.names).fillna(0.0) \
        if not isinstance(output, np.ndarray) else pd.Series(output, index=econ.names)
    out = direct_intensities(econ, sat) * x.to_numpy()[None, :]
    out.attrs["units"] = dict(zip(sat.names, sat.units, strict=True))
    return out


def balanced_emissions(econ: Economy, sat: Satellite, *, dynamic: bool = False) -> pd.DataFrame:
    """Emissions on the balanced-growth ray, per unit of output value and of GDP.

    Parameters
    ----------
    econ : Economy
    sat : Satellite
    dynamic : bool, default False
        The dynamic Leontief ray (with capital and replacement) instead of the
        static one.

    Returns
    -------
    pandas.DataFrame
        One row per stressor and impact: ``per_output_value`` (amount per unit
        of gross output at base-year prices), ``per_gdp`` (per unit of value
        added), ``growth`` (the ray's growth rate, at which emissions grow) and
        ``unit`` (per unit of the economy's value unit).
    """
    bg = econ.dynamic_balanced_growth() if dynamic else econ.balanced_growth()
    x = bg.proportions.reindex(econ.names).to_numpy(dtype=float)
    p = econ.prices
    a = np.asarray(econ.input_coefficients, dtype=float)
    e = _direct(econ, sat) @ x
    per_value = e / float(p @ x)
    gdp = float(p @ (x - a @ x))
    per_gdp = e / gdp if gdp > 0 else np.full(e.shape, np.nan)
    money = econ.value_unit or "value"
    return pd.DataFrame({"per_output_value": per_value, "per_gdp": per_gdp,
                         "growth": float(bg.rate),
                         "unit": [f"{u} per {money}" for u in sat.units]}, index=_rows(sat))
