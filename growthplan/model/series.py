"""Per-year series: a number grown at a rate, a list, or a mapping of years to numbers."""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd

from .validation import Rule

__all__ = ["series"]

RULE = "be a number, a list with one number per plan year, or a mapping of years to numbers"


def _year(key: Any, field: str) -> int:
    """A mapping key as a whole year; floats with a fraction, booleans and text are refused."""
    if isinstance(key, bool | np.bool_):
        raise Rule("have whole years as keys", key, field=field)
    if isinstance(key, int | np.integer):
        return int(key)
    if isinstance(key, float | np.floating) and float(key).is_integer():
        return int(key)
    if isinstance(key, str) and key.isascii() and key.isdigit():
        return int(key)
    raise Rule("have whole years as keys", key, field=field)


def _number(v: Any, field: str) -> float:
    if isinstance(v, bool | np.bool_) or not isinstance(v, int | float | np.integer | np.floating):
        raise Rule("hold numbers", v, field=field)
    return float(v)


def series(value: Any, years: list[int], field: str, growth: float = 0.0) -> np.ndarray:
    """A per-year array from a number (grown at ``growth``), a list, a mapping or a Series.

    Parameters
    ----------
    value : number, sequence, dict or pandas.Series
        A number is the first year's value, grown as ``X_t = X_0 (1 + growth)^t``.
        A mapping needs a value for every plan year and nothing else; its keys
        are whole years (``2030``, ``"2030"``, ``2030.0``), each given once.
    years : list of int
        The plan years.
    field : str
        Name used in error messages.
    growth : float, default 0.0

    Returns
    -------
    numpy.ndarray
        One finite, non-negative value per plan year.
    """
    t = np.arange(len(years), dtype=float)
    scalar = isinstance(value, int | float | np.integer | np.floating) and not isinstance(
        value, bool | np.bool_)
    if scalar:
        with np.errstate(over="ignore", invalid="ignore"):
            out = float(value) * (1.0 + growth) ** t
    elif isinstance(value, dict | pd.Series):
        items: dict[int, float] = {}
        for k, v in dict(value).items():
            y = _year(k, field)
            if y in items:
                raise Rule("give each year once", k, field=field)
            items[y] = _number(v, f"{field}[{y}]")
        unknown = [y for y in items if y not in years]
        if unknown:
            raise Rule(f"give values for plan years {years[0]}..{years[-1]} only", unknown[:5],
                       field=field)
        missing = [y for y in years if y not in items]
        if missing:
            raise Rule("give a value for every plan year", f"missing {missing[:5]}", field=field)
        out = np.array([items[y] for y in years])
    elif isinstance(value, str | bytes | bool | np.bool_) or value is None:
        raise Rule(RULE, value, field=field)
    else:
        try:
            seq = list(value)
        except TypeError:
            raise Rule(RULE, value, field=field) from None
        if len(seq) != len(years):  # first, so every entry below has its year
            raise Rule(f"have one value per plan year ({len(years)})", f"{len(seq)} values",
                       field=field)
        out = np.array([_number(v, f"{field}[{y}]") for y, v in zip(years, seq, strict=True)],
                       dtype=float)
    bad = ~np.isfinite(out) | (out < 0)
    if bad.any():
        if scalar:  # a number grown out of range is the number's fault, not one year's
            raise Rule("hold finite values >= 0", value, field=field)
        i = int(np.argmax(bad))
        raise Rule("hold finite values >= 0", float(out[i]), field=f"{field}[{years[i]}]")
    return out
