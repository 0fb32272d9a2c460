"""Charts of plan results (matplotlib, the ``plot`` extra).

Every function draws on the Axes it is given (or a new figure) and returns
the Axes for further styling. Series are told apart by line style, marker and
hatching as well as colour, so the charts stay readable in greyscale.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from pathlib import Path
from types import ModuleType
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

if TYPE_CHECKING:
    from matplotlib.axes import Axes

    from .results.result import PlanResult

__all__ = ["plot_paths", "plot_starts", "plot_labour", "plot_shadow_prices",
           "plot_ray_distance", "plot_scenarios", "ray_distance", "save_charts"]

_STYLES = ["-", "--", "-.", ":"]
_MARKERS = ["o", "s", "^", "D", "v", "P", "X", "*", "h", "<"]
_HATCHES = ["", "//", "..", "xx", "\\\\", "++", "oo", "--", "||", "**"]
_COLOURS = ["#1b3a5c", "#b5652b", "#4f7d3a", "#7a4e8a", "#9a8a3a", "#3f8f8f", "#8a3b3b",
            "#5a5a5a", "#2f6fa8", "#c79a3a"]


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
    return {"linestyle": _STYLES[i % len(_STYLES)], "marker": _MARKERS[i % len(_MARKERS)],
            "color": _COLOURS[i % len(_COLOURS)], "markersize": 4}


def plot_paths(result: PlanResult, what: str = "output", *, sectors: list[str] | None = None,
               index: bool = False, ax: Axes | None = None) -> Axes:
    """Output or capacity paths by sector.

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
    for i, col in enumerate(frame.columns):
        ax.plot(frame.index, frame[col], label=str(col), **_style(i))
    ax.set_xlabel("year")
    units = set((frame.attrs.get("units") or {}).get(c) for c in frame.columns) - {None}
    unit = f" ({units.pop()})" if len(units) == 1 else " (each sector in its own unit)"
    ax.set_ylabel(f"{what} (first year = 1)" if index else f"{what}{unit}")
    ax.set_title(f"{what.capitalize()} by sector")
    ax.legend(ncols=2, fontsize="small", frameon=False)
    ax.grid(alpha=0.3)
    return ax


def plot_starts(result: PlanResult, *, ax: Axes | None = None) -> Axes:
    """Capacity starts by sector as stacked bars, valued at base-year prices.

    Starts are capacity (output per year) in each sector's own unit; stacking
    unlike units would mean nothing, so each bar is the value of the annual
    output the capacity started can make, at base-year prices.

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
    frame = result.starts * result.data.prices[None, :]
    ax = _axes(ax)
    bottom = np.zeros(len(frame))
    for i, col in enumerate(frame.columns):
        ax.bar(frame.index, frame[col], bottom=bottom, label=str(col),
               color=_COLOURS[i % len(_COLOURS)], hatch=_HATCHES[i % len(_HATCHES)],
               edgecolor="white", linewidth=0.5)
        bottom += frame[col].to_numpy()
    ax.set_xlabel("year")
    ax.set_ylabel(f"capacity started\n({result.data.value_unit} of annual output)",
                  fontsize="small")
    ax.set_title("Investment: capacity starts by sector, at base-year prices")
    ax.legend(ncols=2, fontsize="small", frameon=False)
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
    kinds = list(dict.fromkeys(frame.columns.get_level_values(0)))
    for i, kind in enumerate(kinds):
        st = _style(i)
        ax.plot(frame.index, frame[(kind, "used")], label=f"{kind}: used", **st)
        if (kind, "available") in frame:
            ax.plot(frame.index, frame[(kind, "available")], label=f"{kind}: available",
                    color=st["color"], linestyle=":", linewidth=2)
    ax.set_xlabel("year")
    assert result.data is not None
    units = set(result.data.labour_all_units) or {"person-years"}
    ax.set_ylabel(units.pop() if len(units) == 1 else "each kind in its own unit")
    ax.set_title("Labour use and supply")
    ax.legend(fontsize="small", frameon=False)
    ax.grid(alpha=0.3)
    return ax


def plot_shadow_prices(result: PlanResult, *, current: bool = True,
                       ax: Axes | None = None) -> Axes:
    """Shadow prices as a year × commodity heat map (current-year terms by default).

    Parameters
    ----------
    result : PlanResult
        An optimal, audited result.
    current : bool, default True
        Draw ``shadow_prices_current`` (undiscounted to each year's terms);
        False draws ``shadow_prices`` as solved.
    ax : matplotlib.axes.Axes, optional
        Where to draw; default a new figure.

    Returns
    -------
    matplotlib.axes.Axes
    """
    frame = result.shadow_prices_current if current else result.shadow_prices
    ax = _axes(ax)
    im = ax.imshow(frame.T.to_numpy(), aspect="auto", cmap="cividis", origin="upper")
    ax.set_yticks(range(frame.shape[1]), [str(c) for c in frame.columns])
    step = max(1, len(frame.index) // 8)
    ax.set_xticks(range(0, len(frame.index), step), [str(y) for y in frame.index[::step]])
    ax.set_xlabel("year")
    ax.set_title("Shadow prices" + (" (current-year terms)" if current else " (as solved)"))
    ax.figure.colorbar(im, ax=ax, label="value per unit")
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
    ax.set_xlabel("year")
    ax.set_ylabel("degrees")
    ax.set_title("Capacity's angle from the balanced-growth ray")
    ax.set_ylim(bottom=0)
    ax.grid(alpha=0.3)
    return ax


def plot_scenarios(table: pd.DataFrame, x: str, y: str = "objective", *, by: str | None = None,
                   ax: Axes | None = None) -> Axes:
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
    ax.set_xlabel(x)
    ax.set_ylabel(y)
    ax.set_title(f"Scenarios: {y} by {x}")
    if by is not None:
        ax.legend(fontsize="small", frameon=False)
    ax.grid(alpha=0.3)
    return ax


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
        An optimal, audited result.
    folder : str or Path
        Folder for the charts; created when missing.
    overwrite : bool, default False
        Write into an existing, non-empty folder.
    protect : iterable of str or Path, default ()
        Input files (such as the plan's own files) the folder must not hold.

    Returns
    -------
    list of Path
        The PNG files written: output, capacity, starts, labour (when the
        plan has labour), shadow prices and ray distance.
    """
    from .io.atomic import atomic_folder

    plt = _plt()
    folder = Path(folder)
    charts: dict[str, Callable[[Axes], Axes]] = {
        "output": lambda ax: plot_paths(result, "output", ax=ax),
        "capacity": lambda ax: plot_paths(result, "capacity", ax=ax),
        "starts": lambda ax: plot_starts(result, ax=ax),
        "labour": lambda ax: plot_labour(result, ax=ax),
        "shadow_prices": lambda ax: plot_shadow_prices(result, ax=ax),
        "ray_distance": lambda ax: plot_ray_distance(result, ax=ax)}
    names = []
    with atomic_folder(folder, overwrite=overwrite, protect=protect, kind="charts") as tmp:
        for name, draw in charts.items():
            if name == "labour" and result.labour.empty:
                continue
            fig, ax = plt.subplots(figsize=(8, 4.5), layout="constrained")
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
    from .errors import invalid

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
