"""Interregional tables and trade shares: from published layouts to a multiregional economy.

Two layouts of an interregional transactions table with full region–sector
detail:

- *wide*: a CSV with two header rows (region, then sector) and two label
  columns (region, sector), flows ``z_{ri,sj}`` of pair ``(r, i)`` bought by
  pair ``(s, j)``;
- *long*: the columns ``from_region, from_sector, to_region, to_sector, value``,
  one flow a row (pairs not given are 0).

A Chenery–Moses description is regional technical coefficients (one
economy per region) plus trade shares in the long layout
``commodity, from_region, to_region, share``
(:meth:`~growthplan.MultiRegionalEconomy.from_chenery_moses`).
"""

from __future__ import annotations

import io
import os
from typing import Any

import numpy as np
import pandas as pd

from ..errors import invalid
from ..io.files import read_regular_file
from ..model.regions import MultiRegionalEconomy, pair_names

__all__ = ["read_interregional", "read_trade_shares", "interregional_economy",
           "LONG_COLUMNS", "SHARE_COLUMNS"]

LONG_COLUMNS = ["from_region", "from_sector", "to_region", "to_sector", "value"]
SHARE_COLUMNS = ["commodity", "from_region", "to_region", "share"]
TABLE_MAX_BYTES = 200 * 2**20


def _csv(source: Any, what: str, **kwargs: Any) -> pd.DataFrame:
    if isinstance(source, pd.DataFrame):
        return source
    raw = read_regular_file(source, what=what, limit=TABLE_MAX_BYTES)
    try:
        return pd.read_csv(io.BytesIO(raw), **kwargs)
    except (ValueError, pd.errors.ParserError, UnicodeDecodeError) as exc:
        raise invalid(f"{what} ({os.fspath(source)})", "be readable CSV",
                      str(exc).splitlines()[0]) from None


def read_interregional(source: pd.DataFrame | str | os.PathLike[str], *,
                       layout: str = "wide") -> pd.DataFrame:
    """Read an interregional flows table into pairs × pairs with two-level labels.

    Parameters
    ----------
    source : DataFrame, str or path-like
        A CSV file or a frame in the layout given.
    layout : {"wide", "long"}

    Returns
    -------
    pandas.DataFrame
        Flows, index and columns ``(region, sector)``, regions and sectors in
        the order they first appear; every pair on both axes.
    """
    if layout == "long":
        frame = _csv(source, "interregional table")
        if list(frame.columns) != LONG_COLUMNS:
            raise invalid("interregional table", f"have the columns {LONG_COLUMNS}",
                          list(frame.columns))
        for col in LONG_COLUMNS[:4]:
            frame[col] = frame[col].astype(str).str.strip()
        values = pd.to_numeric(frame["value"], errors="coerce")
        if values.isna().any() or not np.isfinite(values).all():
            row = int(np.flatnonzero(~np.isfinite(values.fillna(np.inf)))[0])
            raise invalid(f"interregional table.value (row {row + 1})", "be a finite number",
                          frame["value"].iloc[row])
        keys = list(zip(*(frame[c] for c in LONG_COLUMNS[:4]), strict=True))
        if len(set(keys)) != len(keys):
            dup = next(k for k in keys if keys.count(k) > 1)
            raise invalid("interregional table", "give each flow (from, to) once", dup)
        regions = list(dict.fromkeys([*frame["from_region"], *frame["to_region"]]))
        sectors = list(dict.fromkeys([*frame["from_sector"], *frame["to_sector"]]))
        idx = pd.MultiIndex.from_product([regions, sectors], names=["region", "sector"])
        z = np.zeros((len(idx), len(idx)))
        rows = pd.MultiIndex.from_arrays([frame["from_region"], frame["from_sector"]])
        cols = pd.MultiIndex.from_arrays([frame["to_region"], frame["to_sector"]])
        z[idx.get_indexer(rows), idx.get_indexer(cols)] = values.to_numpy()
        return pd.DataFrame(z, index=idx, columns=idx.copy())
    if layout != "wide":
        raise invalid("layout", "be 'wide' or 'long'", layout)
    frame = _csv(source, "interregional table", header=[0, 1], index_col=[0, 1])
    if frame.index.nlevels != 2 or frame.columns.nlevels != 2:
        raise invalid("interregional table", "have two header rows (region, sector) and two "
                      "label columns", f"{frame.columns.nlevels} and {frame.index.nlevels}")
    for axis, labels in (("rows", frame.index), ("columns", frame.columns)):
        if labels.has_duplicates:
            raise invalid(f"interregional table {axis}", "name each (region, sector) pair once",
                          labels[labels.duplicated()][0])
    if set(frame.index) != set(frame.columns):
        raise invalid("interregional table", "have the same (region, sector) pairs in rows "
                      "and columns", sorted(set(frame.index) ^ set(frame.columns))[:3])
    values = frame.apply(pd.to_numeric, errors="coerce")
    if not np.isfinite(values.to_numpy(dtype=float)).all():
        raise invalid("interregional table", "hold finite numbers", "a blank or text cell")
    frame = values.loc[:, list(frame.index)].astype(float)
    frame.index = frame.index.set_names(["region", "sector"])
    frame.columns = frame.columns.set_names(["region", "sector"])
    return frame


def read_trade_shares(source: pd.DataFrame | str | os.PathLike[str]) -> pd.DataFrame:
    """Read trade shares in the long layout ``commodity, from_region, to_region, share``."""
    frame = _csv(source, "trade shares")
    if list(frame.columns) != SHARE_COLUMNS:
        raise invalid("trade shares", f"have the columns {SHARE_COLUMNS}",
                      list(frame.columns))
    frame = frame.copy()
    for col in SHARE_COLUMNS[:3]:
        frame[col] = frame[col].astype(str).str.strip()
    frame["share"] = pd.to_numeric(frame["share"], errors="coerce")
    return frame


def interregional_economy(flows: pd.DataFrame, gross_output: pd.Series | Any,
                          **kwargs: Any) -> MultiRegionalEconomy:
    """A multiregional economy from interregional flows: ``a_{ri,sj} = z_{ri,sj} / x_{sj}``.

    Parameters
    ----------
    flows : DataFrame
        Pairs × pairs with a two-level ``(region, sector)`` index (as
        :func:`read_interregional` returns), regions and sectors in product order.
    gross_output : Series or array_like
        Gross output by pair (a two-level Series is aligned), every entry > 0.
    **kwargs
        Further fields of the pairs' economy.
    """
    regions = list(dict.fromkeys(flows.index.get_level_values(0)))
    sectors = list(dict.fromkeys(flows.index.get_level_values(1)))
    idx = pd.MultiIndex.from_product([regions, sectors])
    if len(idx) != len(flows.index) or not flows.index.isin(idx).all():
        raise invalid("flows", "hold every (region, sector) pair, each region with the same "
                      "sectors", len(flows.index))
    z = flows.reindex(index=idx, columns=idx).to_numpy(dtype=float)
    if isinstance(gross_output, pd.Series):
        x = gross_output.reindex(idx).to_numpy(dtype=float)
    else:
        x = np.asarray(gross_output, dtype=float).ravel()
    if x.shape != (len(idx),) or not np.all(np.isfinite(x)) or np.any(x <= 0):
        raise invalid("gross_output", "give one finite value > 0 per (region, sector) pair",
                      "a missing, zero or negative entry" if x.shape == (len(idx),)
                      else f"shape {x.shape}")
    names = pair_names([str(r) for r in regions], [str(s) for s in sectors])
    kwargs.setdefault("base_output", x)
    return MultiRegionalEconomy.from_interregional(
        [str(r) for r in regions], [str(s) for s in sectors],
        pd.DataFrame(z / x[None, :], index=names, columns=names), **kwargs)
