"""Every chart of the library (matplotlib, the ``plot`` extra).

Charts of a plan result come first, then those of other objects: the fan
and probability charts of an uncertainty study, the comparison of a plan
with its revision, the wage–profit frontier of a choice of techniques.

Every function draws on the Axes it is given (or a new figure) and returns
the Axes for further styling. Every axis names its unit, taken from the
economy (a sector's ``unit``, ``value_unit``, ``labour_units``). Series are
told apart by lightness, line style, marker and hatching as well as by hue:
the first twelve colours have distinct grey levels, so a chart printed in
black and white still tells twelve sectors apart. Legends stand outside the
axes, where they cover no data (the figure's ``constrained`` layout makes
room for them).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Sequence
from pathlib import Path
from types import ModuleType
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from ..errors import invalid

if TYPE_CHECKING:
    from matplotlib.axes import Axes

    from ..analysis.choice import WageProfitFrontier
    from ..scenarios.uncertainty import UncertaintyResult
    from .result import PlanResult

__all__ = ["plot_paths", "plot_starts", "plot_labour", "plot_shadow_prices",
           "plot_ray_distance", "plot_scenarios", "ray_distance", "save_charts",
           "plot_consumption", "plot_targets", "plot_utilisation", "plot_diagnosis",
           "PALETTE", "chart_list", "plot_emissions", "plot_abatement", "plot_flows",
           "plot_regional_growth", "plot_fan", "plot_probabilities", "plot_compare",
           "plot_wage_profit"]

# Twelve colours whose grey levels (luma 0.299 R + 0.587 G + 0.114 B) run from
# 0.15 to 0.78 in steps of about 0.057, ordered so that neighbours in a legend
# differ most in lightness as well as in hue.
PALETTE = ("#00334b", "#bf6650", "#2e6c2e", "#aa9dec", "#4b3400", "#01c7cc", "#a44058",
           "#b6c773", "#015595", "#d7895c", "#09a17f", "#f5a9eb")
_COLOURS = list(PALETTE)
_STYLES: list[Any] = ["-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (8, 2))]
_MARKERS = ["o", "s", "^", "D", "v", "P", "X", "*", "h", "<", ">", "p"]
_HATCHES = ["", "//", "..", "xx", "\\\\", "++", "oo", "--", "||", "**", "OO", "-."]
_MET, _MISSED = "#2e6c2e", "#a44058"


def _plt() -> ModuleType:
    try:
        import matplotlib.pyplot as plt
    except ImportError as exc:  # pragma: no cover - depends on the extra
        raise ImportError("charts need matplotlib: pip install 'growthplan[plot]'") from exc
    return plt


def _axes(ax: Axes | None) -> Axes:
    if ax is not None:
        return ax
    _, ax = _plt().subplots(figsize=(8, 4.5), layout="constrained")
    return ax


def _style(i: int) -> dict[str, Any]:
    colour = _COLOURS[i % len(_COLOURS)]
    return {"linestyle": _STYLES[i % len(_STYLES)], "marker": _MARKERS[i % len(_MARKERS)],
            "color": colour, "markersize": 4, "markeredgecolor": colour}


def _bar_style(i: int) -> dict[str, Any]:
    # a dark edge draws the hatching, so pale colours keep their pattern on white paper
    return {"color": _COLOURS[i % len(_COLOURS)], "hatch": _HATCHES[i % len(_HATCHES)],
            "edgecolor": "#333333", "linewidth": 0.4}


def _year_ticks(years: Sequence[int]) -> list[int]:
    """At most ten labelled years (every 1, 2, 5, 10… years): labels that never overlap,
    even in a narrow figure with a legend beside it."""
    n = len(years)
    step = next((s for s in (1, 2, 5, 10, 20, 50, 100) if -(-n // s) <= 10), 100)
    return [int(y) for y in years if (int(y) - int(years[0])) % step == 0]


def _year_axis(ax: Axes, years: Iterable[Any], *, pad: float = 0.5) -> None:
    """Year ticks that stay readable (every year marked, some labelled), and limits that
    fit bars or points."""
    ys = [int(y) for y in years]
    if not ys:
        return
    ticks = _year_ticks(ys)
    ax.set_xticks(ticks, [str(t) for t in ticks])
    ax.set_xticks(ys, minor=True)
    ax.set_xlim(ys[0] - pad, ys[-1] + pad)
    ax.set_xlabel("year")


def _year_positions(ax: Axes, years: Sequence[Any]) -> None:
    """Year ticks for a heat map whose columns are positions 0..n-1."""
    ys = [int(y) for y in years]
    ticks = _year_ticks(ys)
    ax.set_xticks([ys.index(t) for t in ticks], [str(t) for t in ticks])
    ax.set_xlabel("year")


def _after_label(ax: Axes, after: int) -> None:
    """"after the plan" under the year after the plan's tick (beside the axis title, over
    no data)."""
    ax.annotate("after the plan", xy=(after, 0.0), xycoords=ax.get_xaxis_transform(),
                xytext=(0, -22), textcoords="offset points", ha="center", va="top",
                fontsize="x-small", color="#333333", annotation_clip=False)


def _legend(ax: Axes, n: int) -> None:
    """A legend beside the axes (never over the data)."""
    if n == 0:
        return
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0,
              ncols=1 if n <= 16 else 2, fontsize="small", frameon=False)


def _nothing(ax: Axes, title: str, words: str) -> Axes:
    """An empty chart that says why it is empty (a plan without labour, targets…)."""
    ax.set_title(title)
    ax.text(0.5, 0.5, words, ha="center", va="center", transform=ax.transAxes,
            wrap=True, color="#444444")
    ax.set_xticks([])
    ax.set_yticks([])
    return ax


def _sector_units(result: PlanResult, names: Iterable[Any]) -> dict[str, str]:
    econ = result.plan.economy
    units = dict(zip(econ.names, econ.units, strict=True))
    return {str(c): str(units.get(str(c), econ.value_unit)) for c in names}


def _fmt(x: float) -> str:
    """A number for a label: thousands separators, three significant digits at least."""
    if not np.isfinite(x):
        return "–"
    ax_ = abs(x)
    text = f"{x:,.0f}" if ax_ >= 100 else f"{x:,.1f}" if ax_ >= 10 else f"{x:,.3g}"
    return text.replace("-", "−")


def plot_paths(result: PlanResult, what: str = "output", *, sectors: list[str] | None = None,
               index: bool = False, ax: Axes | None = None) -> Axes:
    """Output or capacity paths by sector.

    The capacity chart has one year more than the plan: the capacity left in
    service after the plan (what the terminal conditions judge), shaded and
    labelled.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    what : {"output", "capacity"}
        The schedule drawn: gross output or capacity in service.
    sectors : list of str, optional
        Sectors drawn (default: all).
    index : bool, default False
        Divide each path by its first year (first year = 1); a path starting
        at zero is left out (divided by NaN).
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    frame: pd.DataFrame = getattr(result, what)
    frame = frame[sectors] if sectors else frame
    if index:
        frame = frame / frame.iloc[0].replace(0, np.nan)
    ax = _axes(ax)
    units = _sector_units(result, frame.columns)
    mixed = len(set(units.values())) > 1
    for i, col in enumerate(frame.columns):
        label = f"{col} [{units[str(col)]}]" if mixed and not index else str(col)
        ax.plot(frame.index, frame[col], label=label, **_style(i))
    name = "output" if what == "output" else "capacity in service"
    if index:
        ax.set_ylabel(f"{name}, first year = 1 (a ratio, no unit)")
    elif mixed:
        ax.set_ylabel(f"{name} a year\n(each sector in its own unit, see legend)")
    else:
        unit = next(iter(units.values()), result.plan.economy.value_unit)
        ax.set_ylabel(f"{name}\n({unit} a year)")
    _year_axis(ax, frame.index, pad=0.4)
    if what == "capacity" and len(frame.index) > len(result.plan.years):
        after = int(frame.index[-1])
        ax.axvspan(after - 0.5, after + 0.4, color="#999999", alpha=0.18, linewidth=0)
        _after_label(ax, after)
    title = "Output by sector" if what == "output" else "Capacity in service by sector"
    ax.set_title(title + (" (first year = 1)" if index else ""))
    _legend(ax, len(frame.columns))
    ax.grid(alpha=0.3)
    return ax


def plot_starts(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Capacity started by sector as stacked bars, valued at base-year prices.

    Starts are capacity (output per year) in each sector's own unit; stacking
    unlike units would mean nothing, so each bar is the value, at base-year
    prices, of the annual output the capacity started can make. It is not the
    cost of the capital goods (that is investment, in the national accounts).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    assert result.data is not None
    frame = (result.starts * result.data.prices[None, :]).clip(lower=0.0)  # no solver noise
    ax = _axes(ax)
    bottom = np.zeros(len(frame))
    for i, col in enumerate(frame.columns):
        ax.bar(frame.index, frame[col], bottom=bottom, width=0.8, label=str(col),
               **_bar_style(i))
        bottom += frame[col].to_numpy()
    _year_axis(ax, frame.index, pad=0.6)
    ax.set_ylim(bottom=0.0)
    ax.set_ylabel(f"capacity started\n({result.data.value_unit} of annual output)")
    ax.set_title("Capacity started by sector, valued at base-year prices")
    _legend(ax, len(frame.columns))
    ax.grid(alpha=0.3, axis="y")
    ax.set_axisbelow(True)  # grid lines behind the bars
    return ax


def plot_labour(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Labour used against labour available, per kind.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    frame = result.labour
    ax = _axes(ax)
    if frame.empty:
        return _nothing(ax, "Labour use and supply", "This plan has no labour.")
    assert result.data is not None
    d = result.data
    units = dict(zip(d.labour_all_kinds, d.labour_all_units, strict=False))
    kinds = list(dict.fromkeys(frame.columns.get_level_values(0)))
    mixed = len({units.get(k, "person-years") for k in kinds}) > 1
    n = 0
    for i, kind in enumerate(kinds):
        st = _style(i)
        tag = f"{kind} [{units.get(kind, 'person-years')}]" if mixed else str(kind)
        ax.plot(frame.index, frame[(kind, "used")], label=f"{tag}: used", **st)
        n += 1
        if (kind, "available") in frame:
            ax.plot(frame.index, frame[(kind, "available")], label=f"{tag}: available",
                    color=st["color"], linestyle=":", linewidth=2)
            n += 1
    _year_axis(ax, frame.index, pad=0.4)
    if mixed:
        ax.set_ylabel("labour\n(each kind in its own unit, see legend)")
    else:
        ax.set_ylabel(f"labour\n({units.get(kinds[0], 'person-years')})")
    ax.set_title("Labour use and supply")
    _legend(ax, n)
    ax.grid(alpha=0.3)
    return ax


def plot_shadow_prices(result: PlanResult, *, current: bool = True, money: bool = False,
                       ax: Axes | None = None) -> Axes:
    """Shadow prices as a year × commodity heat map (current-year terms by default).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    current : bool, default True
        Draw ``shadow_prices_current`` (undiscounted to each year's terms);
        False draws ``shadow_prices`` as solved.
    money : bool, default False
        Draw ``shadow_prices_money`` instead: base-year money per unit of
        each commodity (each year scaled so the first year's output bundle
        keeps its base-year value); overrides ``current``.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    if money:
        frame = result.shadow_prices_money
        what, unit = "in base-year money", f"{result.plan.economy.value_unit}\nper unit"
    else:
        frame = result.shadow_prices_current if current else result.shadow_prices
        what = "(current-year terms)" if current else "(as solved)"
        unit = "objective's units\nper unit"
    ax = _axes(ax)
    values = frame.T.to_numpy(dtype=float)
    low, top, clipped = _robust_range(values)
    im = ax.imshow(values, aspect="auto", cmap="cividis", vmin=low, vmax=top,
                   origin="upper", interpolation="nearest")
    ax.set_yticks(range(frame.shape[1]), [str(c) for c in frame.columns])
    ax.set_ylabel("commodity")
    _year_positions(ax, list(frame.index))
    if values.shape[0] <= 16 and values.shape[1] <= 20:
        for (i, j), v in np.ndenumerate(values):
            if np.isfinite(v):
                # each cell its own value, an outlier included; ink readable on its colour
                ink = "black" if (min(v, top) - low) > 0.6 * (top - low) else "white"
                ax.text(j, i, f"{v:.2g}" if abs(v) >= 1e-9 * max(abs(top), 1e-300) else "0",
                        ha="center", va="center", fontsize=6, color=ink)
    ax.set_title(f"Shadow prices {what}"
                 + ("\n(colours capped at the 95th percentile; cells give the values)"
                    if clipped else ""))
    ax.figure.colorbar(im, ax=ax, label=f"{unit} of the commodity",
                       extend="max" if clipped else "neither")
    return ax


def _robust_range(values: np.ndarray) -> tuple[float, float, bool]:
    """Colour limits a single outlier does not flatten: up to the 95th percentile when
    the largest value is more than twice it (the cells still print the values)."""
    finite = values[np.isfinite(values)]
    if not finite.size:
        return 0.0, 1.0, False
    low, high = float(min(finite.min(), 0.0)), float(finite.max())
    p95 = float(np.percentile(finite, 95))
    if p95 > low and high > 2 * p95:
        return low, p95, True
    return low, high if high > low else low + 1.0, False


def plot_utilisation(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Utilisation (output over capacity in service) by sector and year, as a heat map.

    Cells are labelled with the percentage when the map is small enough to
    read (at most 20 years and 16 sectors).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    frame = result.utilisation
    ax = _axes(ax)
    values = 100.0 * frame.T.to_numpy(dtype=float)
    top = max(100.0, float(np.nanmax(values)) if np.isfinite(values).any() else 100.0)
    im = ax.imshow(values, aspect="auto", cmap="cividis", vmin=0.0, vmax=top,
                   origin="upper", interpolation="nearest")
    ax.set_yticks(range(frame.shape[1]), [str(c) for c in frame.columns])
    ax.set_ylabel("sector")
    _year_positions(ax, list(frame.index))
    if values.shape[0] <= 16 and values.shape[1] <= 20:
        for (i, j), v in np.ndenumerate(values):
            if np.isfinite(v):
                # dark text on the light end of the map, light text on the dark end
                ink = "black" if v > 0.6 * top else "white"
                ax.text(j, i, f"{v:.0f}", ha="center", va="center", fontsize=6.5, color=ink)
    ax.set_title("Utilisation of capacity in service")
    ax.figure.colorbar(im, ax=ax, label="output / capacity (%)")
    return ax


def plot_consumption(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Households' consumption level against its guaranteed floor, by year.

    The level counts baskets (one unit is the consumption basket, whose
    base-year value the axis names); the shaded band is what the plan gives
    above the floor.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    d = result.data
    title = "Consumption level and its floor"
    if d is None or not d.has_consumption:
        return _nothing(ax, title, "This plan has no consumption.")
    cons = result.consumption
    years = cons.index
    level = cons["level"].to_numpy(dtype=float)
    floor = np.asarray(d.floor, dtype=float)[: len(years)]
    ax.plot(years, level, label="consumption level", **_style(0))
    ax.plot(years, floor, label="floor", color=_COLOURS[1], linestyle="--", linewidth=2)
    ax.fill_between(years, floor, level, where=level >= floor, color=_COLOURS[5], alpha=0.3,
                    hatch="..", edgecolor=_COLOURS[5], linewidth=0, label="above the floor")
    worth = float(d.basket @ d.prices)
    unit = result.plan.economy.value_unit
    ax.set_ylabel(f"consumption level, baskets a year\n(one basket = {_fmt(worth)} {unit})")
    _year_axis(ax, years, pad=0.4)
    ax.set_title(title)
    _legend(ax, 3)
    ax.grid(alpha=0.3)
    return ax


def plot_targets(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Each target as a bar: what the plan reaches as a share of what the target asks.

    Targets are in different units, so the bars are percentages of the
    requirement (the line at 100 % is the target itself) and each bar is
    labelled with its margin in the target's own unit. For an impossible plan
    the reached value is what the diagnosis finds achievable; a target
    missed is drawn hatched.

    Parameters
    ----------
    result : PlanResult
        Any result with targets (optimal, or impossible with a diagnosis).
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    from .report import targets_table

    ax = _axes(ax)
    title = "Targets: reached against required"
    table = targets_table(result)
    if table.empty:
        return _nothing(ax, title, "This plan has no targets.")
    names = [f"{t} in {y}" for t, y in zip(table["target"], table["year"], strict=True)]
    required = table["required"].to_numpy(dtype=float)
    reached = table["reached"].to_numpy(dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(required != 0, 100.0 * reached / np.where(required != 0, required, 1),
                         np.where(reached >= 0, 100.0, np.nan))
    pos = np.arange(len(table))[::-1]
    for k, row in enumerate(table.itertuples()):
        met = row.verdict == "met"
        v = share[k] if np.isfinite(share[k]) else 0.0
        ax.barh(pos[k], v, height=0.5, color=_MET if met else _MISSED,
                hatch="" if met else "//", edgecolor="#333333", linewidth=0.4,
                label=None)
        unit = f" {row.unit}" if row.unit else ""
        words = ("not known" if not np.isfinite(row.margin) else
                 f"{row.verdict}, margin {'+' if row.margin >= 0 else ''}"
                 f"{_fmt(float(row.margin))}\n{unit.strip()}")
        ax.annotate(words, xy=(v, pos[k]), xytext=(4, 0), textcoords="offset points",
                    va="center", fontsize="x-small")
    ax.axvline(100.0, color="#333333", linestyle="--", linewidth=1)
    ax.set_yticks(pos, names)
    finite = share[np.isfinite(share)]
    right = max(100.0, float(finite.max()) if finite.size else 100.0)
    ax.set_xlim(0, right * 1.6)  # room for the margin's words
    ax.set_ylim(-0.7, len(table) - 0.3)
    ax.set_xlabel("reached, % of what the target requires (dashed line: 100 %)")
    ax.set_title(title)
    ax.grid(alpha=0.3, axis="x")
    ax.set_axisbelow(True)  # grid lines behind the bars
    return ax


def _shortfall_unit(result: PlanResult, condition: str, sector: str) -> str:
    econ = result.plan.economy
    if condition.startswith("consumption"):
        return "baskets"
    if condition.startswith("labour") and result.data is not None:
        units = dict(zip(result.data.labour_all_kinds, result.data.labour_all_units,
                         strict=False))
        return str(units.get(sector, "person-years"))
    if sector in econ.names:
        return str(econ.units[econ.names.index(sector)])
    return ""


def plot_diagnosis(result: PlanResult, *, top: int = 20, ax: Axes | None = None) -> Axes:
    """Why a plan is impossible: each shortfall as a share of what its condition asks.

    One bar per condition and year the diagnosis finds short (the largest
    ``top`` by share), labelled with the shortfall in the condition's own unit.

    Parameters
    ----------
    result : PlanResult
        An impossible plan's result with its diagnosis; any other result
        gives a chart that says there is nothing to diagnose.
    top : int, default 20
        Most bars drawn.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    title = "Shortfalls of the impossible plan"
    diag = result.diagnosis
    if diag is None or diag.shortfalls.empty:
        words = ("The plan meets every condition: nothing falls short." if result.ok else
                 "No shortfall was found for this result.")
        return _nothing(ax, title, words)
    short = diag.shortfalls.head(top)
    pos = np.arange(len(short))[::-1]
    names = []
    for k, row in enumerate(short.itertuples()):
        who = f" of {row.sector}" if row.sector else ""
        when = f" in {row.year}" if row.year != "" else ""
        names.append(f"{row.condition}{who}{when}")
        pct = 100.0 * float(row.share)
        ax.barh(pos[k], pct, height=0.5, **_bar_style(k))
        unit = _shortfall_unit(result, str(row.condition), str(row.sector))
        inside = pct > 55.0  # a long bar carries its words inside, on a white ground
        ax.annotate(f"short by {_fmt(float(row.shortfall))}\n{unit}".rstrip(),
                    xy=(pct, pos[k]), xytext=(-4 if inside else 4, 0),
                    textcoords="offset points", ha="right" if inside else "left",
                    va="center", fontsize="x-small",
                    bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": "none",
                          "alpha": 0.85} if inside else None)
    ax.set_yticks(pos, names)
    ax.set_xlim(0, 100)  # a shortfall is at most all that its condition asks
    ax.set_ylim(-0.7, len(short) - 0.3)
    ax.set_xlabel("shortfall, % of what the condition asks")
    ax.set_title(title)
    ax.grid(alpha=0.3, axis="x")
    ax.set_axisbelow(True)  # grid lines behind the bars
    return ax


def ray_distance(result: PlanResult) -> pd.Series:
    """Angle in degrees between each year's capacity vector and the balanced-growth ray.

    The ray is the dynamic balanced growth of the plan's economy (capital
    replacement included). Both vectors are valued at base-year prices
    before the angle is taken, so it does not change with the unit of a
    sector.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result of a plan whose economy has capital.

    Returns
    -------
    pandas.Series
        Degrees by year (0 on the ray).
    """
    prices = result.plan.economy.prices
    ray = result.plan.economy.dynamic_balanced_growth().proportions.to_numpy() * prices
    cap = result.capacity.to_numpy() * prices[None, :]
    cos = cap @ ray / (np.linalg.norm(cap, axis=1) * np.linalg.norm(ray))
    return pd.Series(np.degrees(np.arccos(np.clip(cos, -1, 1))), index=result.capacity.index,
                     name="degrees from the balanced ray")


def plot_ray_distance(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Distance of the plan from the balanced-growth ray per year (the turnpike view).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result (see :func:`ray_distance`).
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    d = ray_distance(result)
    ax = _axes(ax)
    ax.plot(d.index, d.to_numpy(), **_style(0))
    _year_axis(ax, d.index, pad=0.4)
    if len(d.index) > len(result.plan.years):
        after = int(d.index[-1])
        ax.axvspan(after - 0.5, after + 0.4, color="#999999", alpha=0.18, linewidth=0)
        _after_label(ax, after)
    ax.set_ylabel("angle from the ray\n(degrees)")
    ax.set_title("Capacity's angle from the balanced-growth ray (0 = balanced proportions)")
    ax.set_ylim(bottom=0)
    ax.grid(alpha=0.3)
    return ax


# words and units of a sweep's key figures (growthplan.results.summary.key_figures)
_FIGURES = {"objective": "objective value (the objective's own units)",
            "solve_seconds": "solve time (seconds)",
            "terminal_capacity": "terminal capacity (value at base-year prices)",
            "total_starts": "capacity started, all years (value at base-year prices)",
            "gdp_first": "GDP in the first year (value at base-year prices)",
            "gdp_last": "GDP in the last year (value at base-year prices)",
            "investment_share": "mean investment share of GDP (a fraction)",
            "peak_labour_use": "peak labour use (fraction of the supply)"}


def _figure_label(column: str) -> str:
    if column in _FIGURES:
        return _FIGURES[column]
    if column.endswith(("growth", "rate")):
        return f"{column} (a fraction a year)"
    return column


def plot_scenarios(table: pd.DataFrame, x: str, y: str = "objective", *, by: str | None = None,
                   ax: Axes | None = None, xlabel: str | None = None,
                   ylabel: str | None = None) -> Axes:
    """Compare scenarios of a sweep: ``y`` against parameter ``x`` (lines per ``by``).

    Parameters
    ----------
    table : pandas.DataFrame
        A sweep's table (:attr:`Sweep.table`); only rows with status
        ``optimal`` are drawn when it has a status column.
    x : str
        Column on the horizontal axis, usually a swept parameter.
    y : str, default "objective"
        Column on the vertical axis (a key figure).
    by : str, optional
        Column whose values each get a line.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.
    xlabel, ylabel : str, optional
        Axis labels with their units; by default the key figures' own words
        and units (a growth or rate parameter is a fraction a year).

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    ok = table[table["status"] == "optimal"] if "status" in table else table
    groups = [(None, ok)] if by is None else list(ok.groupby(by, sort=True))
    for i, (key, part) in enumerate(groups):
        part = part.sort_values(x)
        ax.plot(part[x], part[y], label=None if key is None else f"{by} = {key}", **_style(i))
    ax.set_xlabel(xlabel or _figure_label(x))
    ax.set_ylabel(ylabel or _figure_label(y))
    ax.set_title(f"Scenarios: {y} by {x}")
    if by is not None:
        _legend(ax, len(groups))
    ax.grid(alpha=0.3)
    return ax


def plot_emissions(result: PlanResult, what: str | None = None, *,
                   ax: Axes | None = None) -> Axes:
    """Emissions of one stressor or impact by year, stacked by sector, with its limits.

    Parameters
    ----------
    result : PlanResult
        An optimal plan with satellite accounts.
    what : str, optional
        A stressor or impact (default: the first one a limit names, else the last).
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    d = result.data
    assert d is not None
    sat = d.satellite
    if sat is None:
        return _nothing(ax, "Emissions", "The plan has no satellite accounts.")
    if what is None:
        what = sat.limits[0].what if sat.limits else sat.names[-1]
    unit = sat.units[sat.names.index(what)]
    long = result.emissions
    long = long[long["stressor"] == what]
    table = long.pivot_table(index="year", columns="sector", values="amount", aggfunc="sum",
                             fill_value=0.0).reindex(d.years, fill_value=0.0)
    bottom = np.zeros(len(table))
    years = np.asarray(table.index)
    for i, col in enumerate(table.columns):
        ax.bar(years, table[col], bottom=bottom, label=str(col), **_bar_style(i))
        bottom += table[col].to_numpy()
    prices = result.emission_prices
    own = prices[(prices["what"] == what) & (prices["kind"] == "cap")]
    if not own.empty:
        ax.plot(own["year"], own["bound"], color="black", ls="--", marker="_", label="cap")
    ax.set_ylabel(f"{what} ({unit} per year)")
    ax.set_title(f"Emissions of {what} by sector")
    _year_axis(ax, years)
    _legend(ax, len(table.columns) + (0 if own.empty else 1))
    return ax


def plot_abatement(curve: pd.DataFrame, *, ax: Axes | None = None) -> Axes:
    """The marginal abatement curve: the objective's loss and the limit's price by level.

    Parameters
    ----------
    curve : pandas.DataFrame
        From :func:`growthplan.scenarios.abatement.abatement_curve`.
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
        The loss on the left axis, the price (base-year money per unit) on a
        twin axis on the right.
    """
    ax = _axes(ax)
    ok = curve[curve["status"] == "optimal"]
    unit = ok["unit"].iloc[0] if not ok.empty else ""
    ax.plot(ok["level"], ok["loss"], label="loss of the objective", **_style(0))
    ax.set_xlabel(f"{curve.attrs.get('limit', 'limit')} ({unit})")
    ax.set_ylabel("loss of the objective (objective's units)")
    twin = ax.twinx()
    twin.plot(ok["level"], ok["price"], label="shadow price", **_style(1))
    twin.set_ylabel(f"shadow price ({ok['price_unit'].iloc[0] if not ok.empty else ''})")
    ax.set_title("Marginal abatement curve")
    ax.grid(alpha=0.3)
    lines = ax.get_lines() + twin.get_lines()
    ax.legend(lines, [str(ln.get_label()) for ln in lines], loc="upper right")
    return ax


def chart_list(result: PlanResult) -> list[tuple[str, str, Callable[[Axes], Axes]]]:
    """The standard charts of a result: (file name, caption, drawing function).

    An optimal plan gets output, capacity, capacity started, labour (when
    the plan has labour), consumption (when it has a consumption level),
    targets (when it has targets), utilisation, shadow prices in base-year
    money and the distance from balanced growth (when the economy has
    capital); an impossible plan with a diagnosis gets its targets and the
    shortfalls.

    Parameters
    ----------
    result : PlanResult

    Returns
    -------
    list of (str, str, callable)
    """
    d = result.data
    if not result.ok:
        if result.diagnosis is None:
            result.output  # noqa: B018 - raises PlanNotOptimal: there is nothing to draw
        out: list[tuple[str, str, Callable[[Axes], Axes]]] = []
        if result.plan.targets:
            out.append(("targets", "Targets: what is achievable against what is required",
                        lambda ax: plot_targets(result, ax=ax)))
        out.append(("diagnosis", "Shortfalls of the impossible plan",
                    lambda ax: plot_diagnosis(result, ax=ax)))
        return out
    out = [("output", "Output by sector", lambda ax: plot_paths(result, "output", ax=ax)),
           ("capacity", "Capacity in service by sector (the last year is after the plan)",
            lambda ax: plot_paths(result, "capacity", ax=ax)),
           ("starts", "Capacity started, valued at base-year prices",
            lambda ax: plot_starts(result, ax=ax))]
    if not result.labour.empty:
        out.append(("labour", "Labour used and available", lambda ax: plot_labour(result, ax=ax)))
    if d is not None and d.has_consumption:
        out.append(("consumption", "Consumption level against its floor",
                    lambda ax: plot_consumption(result, ax=ax)))
    if result.plan.targets:
        out.append(("targets", "Targets: reached against required",
                    lambda ax: plot_targets(result, ax=ax)))
    out.append(("utilisation", "Utilisation of capacity by sector and year",
                lambda ax: plot_utilisation(result, ax=ax)))
    out.append(("shadow_prices", "Shadow prices in base-year money",
                lambda ax: plot_shadow_prices(result, money=True, ax=ax)))
    if d is not None and d.regions is not None:
        out.append(("flows", "Shipments between regions over the plan, at base-year prices",
                    lambda ax: plot_flows(result, ax=ax)))
        out.append(("regional_growth", "Regional product by region",
                    lambda ax: plot_regional_growth(result, ax=ax)))
    if d is not None and np.any(d.b):
        out.append(("ray_distance", "Capacity's distance from balanced growth",
                    lambda ax: plot_ray_distance(result, ax=ax)))
    return out


def save_charts(result: PlanResult, folder: str | Path, *, overwrite: bool = False,
                protect: Iterable[str | Path] = ()) -> list[Path]:
    """Write the standard charts of a result as PNG files into ``folder``.

    The charts are drawn into a temporary folder and moved in together, so
    an error or an interrupt leaves none of them or all of them. An existing,
    non-empty folder is written only with ``overwrite=True``, and then only
    the files growthplan wrote there before are replaced (see
    :func:`growthplan.io.atomic_folder`; ``protect`` lists input files the
    folder must not hold).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result, or an impossible plan's result with its
        diagnosis.
    folder : str or Path
        Folder for the charts; created when missing.
    overwrite : bool, default False
        Write into an existing, non-empty folder.
    protect : iterable of str or Path, default ()
        Input files (such as the plan's own files) the folder must not hold.

    Returns
    -------
    list of Path
        The PNG files written (see :func:`chart_list`): output, capacity,
        starts, labour, consumption, targets, utilisation, shadow prices and
        ray distance for an optimal plan; targets and diagnosis for an
        impossible one.
    """
    from ..io.atomic import atomic_folder

    plt = _plt()
    folder = Path(folder)
    charts = chart_list(result)
    names = []
    with atomic_folder(folder, overwrite=overwrite, protect=protect, kind="charts") as tmp:
        for name, _, draw in charts:
            fig, ax = plt.subplots(figsize=(9, 4.8), layout="constrained")
            try:
                draw(ax)
                fig.savefig(tmp / f"{name}.png", dpi=110)
            finally:
                plt.close(fig)
            names.append(f"{name}.png")
    return [folder / n for n in names]


def plot_techniques(result: PlanResult, sector: str, *, what: str = "output",
                    ax: Axes | None = None) -> Axes:
    """The technique mix of one sector: output (or capacity, starts) stacked by technique.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    sector : str
        A sector of the plan.
    what : {"output", "capacity", "starts"}, default "output"
        Which schedule to stack.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    from ..errors import invalid

    if what not in ("output", "capacity", "starts"):
        raise invalid("what", "be one of output, capacity, starts", what)
    table = result.techniques
    if sector not in set(table["sector"]):
        raise invalid("sector", "name a sector of the plan", sector)
    part = table[table["sector"] == sector]
    frame = part.pivot(index="year", columns="label", values=what)
    frame = frame[list(dict.fromkeys(part["label"]))]  # the plan's order of techniques
    if ax is None:
        ax = _plt().subplots(figsize=(7, 4))[1]
    # its own greys and hatches: a mix reads in print without the package palette
    shades = ["#202020", "#6a6a6a", "#a8a8a8", "#d0d0d0"]
    hatches = ["", "//", "..", "xx", "\\\\", "++"]
    bottom = np.zeros(len(frame))
    for i, col in enumerate(frame.columns):
        values = np.maximum(frame[col].to_numpy(dtype=float), 0.0)
        ax.bar(frame.index, values, bottom=bottom, label=str(col),
               color=shades[i % len(shades)], hatch=hatches[i % len(hatches)],
               edgecolor="white", linewidth=0.5)
        bottom += values
    unit = dict(zip(result.data.names, result.data.units, strict=True)).get(sector, "") \
        if result.data is not None else ""
    ax.set_xlabel("year")
    ax.set_ylabel(f"{what}" + (f" ({unit})" if unit else ""), fontsize="small")
    ax.set_title(f"Techniques of {sector}: {what} by technique")
    ax.legend(fontsize="small", frameon=False)
    return ax


__all__ += ["plot_techniques"]


def plot_flows(result: PlanResult, *, year: int | None = None, ax: Axes | None = None) -> Axes:
    """A matrix of the value shipped from each region (rows) to each other (columns).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result of a plan over several regions.
    year : int, optional
        One plan year (default: the whole plan).
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    from .regions import flow_matrix

    ax = _axes(ax)
    d = result.data
    title = "Shipments between regions" + ("" if year is None else f" in {year}")
    if d is None or d.regions is None or result.flows.empty:
        return _nothing(ax, title, "This plan has no shipments between regions.")
    m = flow_matrix(result.flows, d.regions.regions, year=year)
    values = m.to_numpy(dtype=float)
    image = ax.imshow(values, cmap="Greys", vmin=0.0)
    top = values.max() if values.size else 0.0
    for (i, j), v in np.ndenumerate(values):
        ax.text(j, i, _fmt(v), ha="center", va="center",
                color="white" if top > 0 and v > 0.6 * top else "black")
    ax.set_xticks(range(len(m.columns)), [str(c) for c in m.columns])
    ax.set_yticks(range(len(m.index)), [str(c) for c in m.index])
    ax.set_xlabel("to (destination)")
    ax.set_ylabel("from (origin)")
    unit = result.plan.economy.value_unit
    ax.figure.colorbar(image, ax=ax, label=f"value shipped, {unit}")
    ax.set_title(title)
    return ax


def plot_regional_growth(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Each region's product at base-year prices by year.

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result of a plan over several regions.
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    d = result.data
    title = "Regional product"
    if d is None or d.regions is None:
        return _nothing(ax, title, "This plan has one region.")
    table = result.regional_accounts["regional_product"].unstack("region")
    for i, region in enumerate(d.regions.regions):
        ax.plot(table.index, table[region].to_numpy(dtype=float), label=str(region),
                **_style(i))
    ax.set_ylabel(f"regional product, {result.plan.economy.value_unit} a year")
    _year_axis(ax, table.index, pad=0.4)
    ax.set_title(title)
    _legend(ax, len(d.regions.regions))
    ax.grid(alpha=0.3)
    return ax


# -- charts of scenarios and analyses ------------------------------------------------

def plot_fan(result: UncertaintyResult, quantity: str = "capacity", *,
             sector: str | None = None, ax: Axes | None = None) -> Axes:
    """Fan chart of a yearly quantity over the draws: median, 50 % and 90 % bands.

    Parameters
    ----------
    result : UncertaintyResult
    quantity : {"capacity", "output", "shadow_price"}
    sector : str, optional
        One sector (default: the sum over sectors).
    """
    q = result.quantiles(quantity, sector=sector)
    ax = _axes(ax)
    years = q.index.to_numpy()
    ax.fill_between(years, q[0.05], q[0.95], color="#1b3a5c", alpha=0.15, hatch="..",
                    label="5–95 %")
    ax.fill_between(years, q[0.25], q[0.75], color="#1b3a5c", alpha=0.35, label="25–75 %")
    ax.plot(years, q[0.5], color="#1b3a5c", marker="o", markersize=3, label="median")
    ax.set_xlabel("year")
    ax.set_ylabel(f"{quantity}{' of ' + sector if sector else ' (sum over sectors)'}")
    ax.legend(frameon=False)
    return ax


def plot_probabilities(result: UncertaintyResult, *, ax: Axes | None = None, top: int = 30) -> Axes:
    """Horizontal bars: the probability that each condition (and the plan) is met."""
    p = result.probability()
    label = p["condition"] + p["year"].map(lambda y: "" if pd.isna(y) else f" {y}")
    p = p.assign(label=label).sort_values("probability").head(top)
    ax = _axes(ax)
    ax.barh(p["label"], p["probability"], color="#4f7d3a", hatch="//", edgecolor="white")
    ax.set_xlim(0, 1)
    ax.set_xlabel("probability met")
    return ax



def plot_compare(table: pd.DataFrame, quantity: str = "starts", *, sector: str | None = None,
                 labels: tuple[str, str] = ("original", "revised"), ax: Axes | None = None) -> Axes:
    """Lines of a quantity in two results (from :func:`compare`), summed over sectors."""
    t = table[table["quantity"] == quantity]
    if sector is not None:
        t = t[t["sector"] == sector]
    if t.empty:
        raise invalid("quantity", "be a quantity (and sector) of the comparison", quantity)
    per = t.groupby("year")[["a", "b"]].sum()
    ax = _axes(ax)
    for i, (col, label) in enumerate(zip(("a", "b"), labels, strict=True)):
        ax.plot(per.index, per[col], label=label, **_style(i))
    ax.set_xlabel("year")
    ax.set_ylabel(f"{quantity}{' of ' + sector if sector else ' (sum over sectors)'}")
    ax.legend(frameon=False)
    return ax


def _legend_labels(sets: list[str]) -> dict[str, str]:
    """Each set named by the choices in which the sets differ ("agriculture: mechanised").

    A set's name lists ``commodity:technique`` for every commodity; choices
    shared by all sets are left out (with "others alike"), and a technique
    labelled by its commodity (an economy's own) reads "base".
    """
    split = [name.split(", ") for name in sets]
    common = set.intersection(*map(set, split)) if len(split) > 1 else set()

    def word(entry: str) -> str:
        commodity, _, tech = entry.partition(":")
        tech = tech[len(commodity) + 1:] if tech.startswith(f"{commodity}:") else tech
        return f"{commodity}: {'base' if tech == commodity else tech}"

    out = {}
    for name, entries in zip(sets, split, strict=True):
        own = [e for e in entries if e not in common]
        out[name] = ", ".join(map(word, own)) + ("; others alike" if common else "") \
            if own else name
    return out


def plot_wage_profit(frontier: WageProfitFrontier, *, ax: Axes | None = None) -> Axes:
    """Chart the wage–profit frontier: one line style per technique set, switch points marked.

    The legend names each set by the choices in which the sets drawn differ.

    Parameters
    ----------
    frontier : WageProfitFrontier
    ax : matplotlib Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    grid = frontier.table[~frontier.table["switch"]]
    order = list(dict.fromkeys(grid["techniques"]))
    legend = _legend_labels(order)
    # one line per contiguous range, so a set that comes back is drawn twice in its style
    run = (grid["techniques"] != grid["techniques"].shift()).cumsum()
    for _, part in grid.groupby(run, sort=False):
        name = str(part["techniques"].iloc[0])
        first = part.index[0] == grid.index[grid["techniques"] == name][0]
        ax.plot(part["profit_rate"], part["wage"], label=legend[name] if first else None,
                **(_style(order.index(name)) | {"markersize": 2}))
    sw = frontier.switch_points
    if not sw.empty:
        ax.scatter(sw["profit_rate"], sw["wage"], marker="X", s=60, color="black", zorder=3,
                   label="switch point")
    ax.set_xlabel("profit rate")
    ax.set_ylabel("wage (per unit of the numeraire)")
    ax.set_title("Wage–profit frontier")
    ax.legend(fontsize="small", frameon=False)
    ax.grid(alpha=0.3)
    return ax
