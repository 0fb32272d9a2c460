"""Steady-state figures of several regions: the multiregional Leontief inverse and its parts.

With ``L = (I − A)^-1`` over region–sector pairs, the output multiplier of
pair ``(s, j)`` is the column sum of ``L``; the part of it that falls in
region ``s`` itself is its *intraregional* multiplier, the rest its
*spillover* to the other regions. Labour content by region splits the
vertically integrated labour ``l L`` by the region that works it:
``diag(l) L`` summed over each region's rows.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from ..errors import invalid
from . import steady

if TYPE_CHECKING:
    from ..model.regions import MultiRegionalEconomy

__all__ = ["leontief_inverse", "output_multipliers", "spillovers", "labour_content",
           "multiplier_table", "required_output"]


def _inverse(mre: MultiRegionalEconomy) -> np.ndarray:
    return steady.leontief_inverse(np.asarray(mre.economy.input_coefficients))


def _by_region(mre: MultiRegionalEconomy, rows: np.ndarray) -> np.ndarray:
    """Sum the rows of a pairs × … array within each region: regions × …."""
    return rows.reshape(mre.R, mre.n, *rows.shape[1:]).sum(axis=1)


def leontief_inverse(mre: MultiRegionalEconomy) -> pd.DataFrame:
    """``(I − A)^-1`` over the pairs, labelled ``(region, sector)`` on both axes."""
    idx = mre.index()
    return pd.DataFrame(_inverse(mre), index=idx, columns=idx.copy())


def output_multipliers(mre: MultiRegionalEconomy) -> pd.Series:
    """Column sums of the multiregional Leontief inverse, one per pair."""
    return pd.Series(_inverse(mre).sum(axis=0), index=mre.index(), name="output_multiplier")


def spillovers(mre: MultiRegionalEconomy) -> pd.DataFrame:
    """Gross output in each region (rows) per unit of final demand for each pair (columns)."""
    return pd.DataFrame(_by_region(mre, _inverse(mre)),
                        index=pd.Index(mre.regions, name="region"), columns=mre.index())


def multiplier_table(mre: MultiRegionalEconomy) -> pd.DataFrame:
    """Per pair: output multiplier, its intraregional part and its spillover to other regions."""
    by_region = _by_region(mre, _inverse(mre))
    own = by_region[mre.region_of(), np.arange(mre.R * mre.n)]
    total = by_region.sum(axis=0)
    return pd.DataFrame({"output_multiplier": total, "intraregional": own,
                         "spillover": total - own}, index=mre.index())


def labour_content(mre: MultiRegionalEconomy) -> pd.DataFrame:
    """Person-years of the first labour kind in each region (rows) per unit of each pair's product.

    Raises
    ------
    InvalidInput
        When the economy has no labour coefficients.
    """
    lab = mre.economy.labour_coefficients
    if lab is None:
        raise invalid("labour_coefficients", "be given to compute labour content", None)
    worked = np.asarray(lab)[0][:, None] * _inverse(mre)
    return pd.DataFrame(_by_region(mre, worked), index=pd.Index(mre.regions, name="region"),
                        columns=mre.index())


def required_output(mre: MultiRegionalEconomy, final_demand: pd.Series | np.ndarray
                    ) -> pd.Series:
    """Gross output ``x = L f`` for final demand ``f`` by pair (array or two-level Series)."""
    if isinstance(final_demand, pd.Series):
        f = final_demand.reindex(mre.index()).to_numpy(dtype=float)
        if np.isnan(f).any():
            raise invalid("final_demand", "give one value per (region, sector) pair",
                          len(final_demand))
    else:
        f = np.asarray(final_demand, dtype=float)
    return pd.Series(_inverse(mre) @ f, index=mre.index(), name="output")
