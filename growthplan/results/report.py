"""A plan result as one self-contained HTML report that a colleague opens in a browser.

The file needs nothing beyond itself: the style sheet is inline and the
charts (drawn when matplotlib, the ``plot`` extra, is installed) are PNG
images embedded as ``data:`` URIs. It holds no script. Every string that
comes from the user (sector names, units, notes) is escaped.

An impossible plan gets a report too: it never reads the schedule tables
of a result that is not optimal (they raise ``PlanNotOptimal``) and shows
the diagnosis in words instead.

The helpers :func:`tidy_number`, :func:`decimals_for`, :func:`inputs` and
:data:`GLOSSARY` are shared with the workbook writer.
"""

from __future__ import annotations

import base64
import html
import io
import math
import os
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
import pandas as pd

from .summary import CAUTION

if TYPE_CHECKING:
    from .result import PlanResult

__all__ = ["write_report", "render", "tidy_number", "decimals_for", "inputs", "targets_table",
           "GLOSSARY", "RATIO_WORDS"]

# columns whose values are shares (shown as percents)
RATIO_WORDS = ("share", "growth", "utilisation")

GLOSSARY: list[tuple[str, str]] = [
    ("output", "Gross output of a sector in a plan year, in the sector's own unit."),
    ("capacity", "Output a sector can make in a year with the capacity in service at its "
                 "start; the last row is the capacity left in service after the plan."),
    ("utilisation", "Output over capacity in service (1 = fully used)."),
    ("starts", "New capacity begun in a year (output per year, in the sector's unit); it "
               "enters service after the sector's construction lead time."),
    ("capital deliveries", "Capital goods each commodity delivers to projects under "
                           "construction in a year."),
    ("retirements", "Capacity leaving service during a year as it wears out."),
    ("surplus", "What a commodity balance leaves unused in a year (free disposal); a "
                "positive surplus means the commodity is not scarce then."),
    ("shadow prices (as solved)", "Value to the objective of one more unit of a commodity in "
                                  "a year, in the objective's own terms."),
    ("shadow prices in current-year terms", "The same values undiscounted to each year's "
                                            "terms, so years can be compared."),
    ("shadow prices in base-year money", "The same values rescaled each year so that the "
                                         "first plan year's output bundle is worth as much "
                                         "at shadow prices as at base-year prices: money "
                                         "per unit of the commodity."),
    ("quasi-rents", "Value of one more unit of capacity in service in a sector and year: "
                    "what capacity earns while it is scarce."),
    ("labour values", "Value of one more unit of labour of a kind in a year."),
    ("bottleneck", "A condition that binds: more of it would raise the objective. Ranked by "
                   "value per unit of base-year value."),
    ("gross output (accounts)", "All sectors' output valued at base-year prices."),
    ("intermediate use", "Inputs used up in production, at base-year prices."),
    ("GDP", "Value added: gross output less intermediate use, at base-year prices."),
    ("investment", "Capital goods delivered to projects, at base-year prices."),
    ("investment share", "Investment over GDP."),
    ("consumption (accounts)", "Households' consumption at base-year prices."),
    ("exogenous demand", "Demand fixed outside the plan (such as government's), at "
                         "base-year prices."),
    ("exports, imports", "Foreign trade at base-year prices."),
    ("disposal", "Value of what the commodity balances leave unused, shown so that GDP "
                 "equals final uses plus disposal exactly."),
    ("retirements (accounts)", "Capacity retired, valued at the capital goods it embodies."),
    ("growth", "Change on the previous year (real: every aggregate is at base-year prices)."),
    ("shortfall", "For an impossible plan: how far a condition falls short of what it asks "
                  "when every other condition is kept as well as it can be."),
    ("emissions", "What each sector, technique and households emit (or a resource they use) "
                  "in a year, in the stressor's own unit; impacts add stressors by stated "
                  "factors (CO2-equivalent)."),
    ("emission prices", "Value of allowing one more unit of a capped or budgeted stressor: "
                        "the limit's shadow price, in the objective's terms (value) and in "
                        "base-year money per unit (price); zero where the limit does not "
                        "bind; one price for a budget over several years."),
]


# -- numbers -------------------------------------------------------------------
def tidy_number(x: float, scale: float = 1.0) -> float:
    """``x`` with solver noise removed: tiny values (relative to ``scale``) and -0.0 become 0.

    Parameters
    ----------
    x : float
    scale : float, default 1
        Size of the values ``x`` is shown among (the largest magnitude of its column).

    Returns
    -------
    float
    """
    if not math.isfinite(x):
        return x
    if abs(x) <= 1e-9 * max(abs(scale), 1.0):
        return 0.0
    return x + 0.0  # -0.0 + 0.0 is 0.0


def decimals_for(values: Iterable[float]) -> int:
    """Decimals that show a column of values to about five significant digits (2 to 6).

    Parameters
    ----------
    values : iterable of float

    Returns
    -------
    int
    """
    finite = [abs(float(v)) for v in values if v is not None and np.isfinite(v)]
    top = max(finite, default=0.0)
    if top <= 0:
        return 2
    most = int(min(6, max(2, 4 - math.floor(math.log10(top)))))
    for d in range(2, most):  # fewer decimals when they show the same numbers
        if all(round(v, d) == round(v, most) for v in finite):
            return d
    return most


def _text(x: Any, decimals: int = 2, *, ratio: bool = False, scale: float = 1.0) -> str:
    """A number for reading: thousands separators, fixed decimals, no -0, no noise."""
    if x is None or isinstance(x, str):
        return "" if x is None else x
    if isinstance(x, bool | np.bool_):
        return "yes" if x else "no"
    if isinstance(x, int | np.integer):
        return f"{int(x):,}"
    try:
        v = float(x)
    except (TypeError, ValueError):
        return str(x)
    if not math.isfinite(v):
        return "–" if math.isnan(v) else ("∞" if v > 0 else "−∞")
    v = tidy_number(v, scale)
    text = f"{100 * v:,.1f} %" if ratio else f"{v:,.{decimals}f}"
    if text.lstrip("-").strip("0.,% ") == "":
        text = text.lstrip("-")  # a value rounded to zero shows no sign
    return text.replace("-", "−")


def _is_ratio(name: object) -> bool:
    return isinstance(name, str) and any(w in name for w in RATIO_WORDS)


# -- inputs and targets ----------------------------------------------------------
def _span(values: Sequence[float] | np.ndarray, years: Sequence[int], unit: str) -> str:
    if len(values) == 0:
        return ""
    first, last = float(values[0]), float(values[-1])
    d = decimals_for([first, last])
    if len(values) == 1 or np.allclose(values, first):
        return f"{_text(first, d)} {unit} in every year"
    return (f"{_text(first, d)} {unit} in {years[0]}, rising to {_text(last, d)} in {years[-1]}"
            if last >= first else
            f"{_text(first, d)} {unit} in {years[0]}, falling to {_text(last, d)} in "
            f"{years[-1]}")


def _objective_words(obj: Any) -> str:
    doc = (type(obj).__doc__ or "").strip().splitlines()
    head = doc[0].rstrip(".").replace("``", "") if doc else ""
    return f"{obj.kind.replace('_', ' ')} ({obj.sense}imise)" + (f": {head}" if head else "")


def inputs(result: PlanResult) -> list[tuple[str, str]]:
    """The plan's inputs and assumptions as (item, words) pairs.

    Parameters
    ----------
    result : PlanResult
        Any result, optimal or not (only the plan and its arrays are read).

    Returns
    -------
    list of (str, str)
    """
    p = result.plan
    econ = p.economy
    d = result.data
    years = list(p.years)
    rows = [("economy", f"{econ.n} sectors; values in {econ.value_unit}"),
            ("plan years", f"{years[0]}–{years[-1]} ({len(years)} years)")]
    if d is not None:
        units = d.labour_units or ["person-years"] * len(d.labour_kinds)
        for k, kind in enumerate(d.labour_kinds):
            rows.append((f"labour supply ({kind})", _span(d.supply[k], years, units[k])))
        for kind in d.labour_all_kinds:
            if kind not in d.labour_kinds:
                rows.append((f"labour ({kind})", "counted, not limited"))
        if d.has_consumption:
            worth = float(d.basket @ d.prices)
            text = _span(d.floor, years, "units of the consumption level")
            rows.append(("consumption floor", f"at least {text} (one unit is a basket worth "
                         f"{_text(worth, decimals_for([worth]))} {d.value_unit})"))
            if d.max_fall is not None:
                rows.append(("consumption fall", "may not fall from one year to the next"
                             if d.max_fall == 0 else
                             f"may fall at most {_text(d.max_fall, ratio=True)} a year"))
        demand = d.demand @ d.prices
        if np.any(demand):
            rows.append(("exogenous demand", _span(demand, years, d.value_unit)))
    for t in p.targets:
        unit = _unit_of(result, t.sector)
        what = f"{t.quantity} of {t.sector}" if t.sector else f"{t.quantity} level"
        need = _text(t.required, decimals_for([t.required]))
        rows.append(("target", f"{what} in {t.year} at least {need} {unit}".rstrip()))
    for c in p.starts_ceilings:
        when = "every year" if not c.years else ", ".join(map(str, c.years))
        rows.append(("starts ceiling", f"{c.sector}: at most {_text(c.at_most)} "
                     f"{_unit_of(result, c.sector)} a year ({when})"))
    if p.under_construction:
        rows.append(("under construction", ", ".join(sorted(map(str, p.under_construction)))))
    if p.terminal is not None:
        rows.append(("after the plan", f"capacity keeps growing at "
                     f"{_text(p.terminal.rate, ratio=True)} a year"))
    if p.trade is not None:
        goods = sorted(set(p.trade.import_prices) | set(p.trade.export_prices))
        rows.append(("foreign trade", "traded goods: " + (", ".join(goods) or "none")))
    rows.append(("objective", _objective_words(p.objective)))
    s = result.solver
    versions = _versions(s)
    rows.append(("solver", f"{s.get('backend', '')}, method {s.get('method', '')}; "
                 f"{versions}"))
    return rows


def _versions(solver: dict[str, Any]) -> str:
    found = solver.get("versions")
    if not isinstance(found, dict):
        return ""
    return ", ".join(f"{k} {v}" for k, v in found.items() if v)


def _unit_of(result: PlanResult, sector: str | None) -> str:
    econ = result.plan.economy
    if sector is None or sector not in econ.names:
        return ""
    return str(econ.units[econ.names.index(sector)])


def sectors_table(result: PlanResult) -> pd.DataFrame:
    """Sectors with their units and base-year prices (value unit per unit).

    Parameters
    ----------
    result : PlanResult

    Returns
    -------
    pandas.DataFrame
    """
    econ = result.plan.economy
    return pd.DataFrame({"sector": econ.names, "unit": econ.units,
                         f"base-year price [{econ.value_unit} per unit]":
                             np.asarray(econ.prices, dtype=float)})


def targets_table(result: PlanResult) -> pd.DataFrame:
    """Each target with what the plan reaches and the margin (negative when missed).

    For an optimal plan the reached value is read from its schedules; for an
    impossible plan from the diagnosis (what is achievable with every other
    condition kept as well as it can be).

    Parameters
    ----------
    result : PlanResult

    Returns
    -------
    pandas.DataFrame
        Columns target, year, unit, required, reached, margin, verdict.
    """
    rows = []
    short = None
    if not result.ok and result.diagnosis is not None:
        short = result.diagnosis.shortfalls
    for t in result.plan.targets:
        reached: float = float("nan")
        if result.ok:
            reached = _reached(result, t)
        elif short is not None and not short.empty:
            hit = short[short["year"].eq(t.year) & short["condition"].str.contains(
                t.quantity, regex=False) & short["sector"].eq(t.sector or "")]
            if not hit.empty:
                reached = float(hit["achievable"].iloc[0])
            elif result.diagnosis is not None and result.diagnosis.confirmed:
                reached = float(t.required)  # the diagnosis finds no shortfall on it
        margin = reached - float(t.required)
        scale = max(abs(float(t.required)), 1.0)
        if math.isnan(margin):
            verdict = "not known (no plan)"
        elif margin >= -1e-6 * scale:
            verdict = "met"
        else:
            verdict = "missed"
        name = f"{t.quantity} of {t.sector}" if t.sector else f"{t.quantity} level"
        rows.append({"target": name, "year": t.year, "unit": _unit_of(result, t.sector),
                     "required": float(t.required), "reached": reached,
                     "margin": tidy_number(margin, scale), "verdict": verdict})
    return pd.DataFrame(rows, columns=["target", "year", "unit", "required", "reached",
                                       "margin", "verdict"])


def _reached(result: PlanResult, t: Any) -> float:
    try:
        if t.quantity == "output":
            return float(result.output.loc[t.year, t.sector])
        if t.quantity == "capacity":
            return float(result.capacity.loc[t.year, t.sector])
        cons = result.consumption
        return float(cons.loc[t.year, t.sector if t.sector else "level"])
    except (KeyError, TypeError):
        return float("nan")


# -- HTML ----------------------------------------------------------------------
_STYLE = """
:root { --ink:#1d2a33; --muted:#5d6b73; --band:#27475e; --accent:#c9822b; --ok:#2f7a4f;
        --bad:#a8342c; --paper:#fbfaf6; --rule:#d9d4c7; --soft:#f1ede2; }
* { box-sizing: border-box; }
body { margin:0; background:var(--paper); color:var(--ink);
       font:15px/1.5 "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; }
header { background:var(--band); color:#fff; padding:22px 36px 18px; }
header h1 { margin:0 0 4px; font-size:25px; font-weight:600; letter-spacing:.2px; }
header p { margin:0; color:#d8e2e8; }
main { max-width:1180px; margin:0 auto; padding:8px 36px 40px; }
section { margin-top:26px; }
h2 { font-size:18px; border-bottom:2px solid var(--accent); padding-bottom:3px;
     margin:0 0 10px; }
.badge { display:inline-block; padding:1px 10px; border-radius:10px; font-size:13px;
         font-weight:600; color:#fff; margin-left:8px; vertical-align:middle; }
.badge.ok { background:var(--ok); } .badge.bad { background:var(--bad); }
.caution { border-left:5px solid var(--accent); background:var(--soft); padding:8px 14px;
           font-style:italic; }
.verdict { border-left:5px solid var(--bad); background:#f7e9e6; padding:8px 14px; }
.note { color:var(--muted); font-size:13px; }
.scroll { overflow-x:auto; }
table.years thead th { white-space:normal; vertical-align:bottom; width:5.5em; }
.side { display:flex; flex-wrap:wrap; gap:0 36px; align-items:flex-start; }
.side > div { flex:none; }
table { border-collapse:collapse; margin:4px 0 8px; font-size:13.5px; }
caption { text-align:left; color:var(--muted); font-size:13px; padding-bottom:3px; }
th, td { padding:3px 9px; border-bottom:1px solid var(--rule); vertical-align:top; }
thead th { background:var(--soft); text-align:right; white-space:nowrap; }
thead th:first-child, thead th.text, tbody th { text-align:left; }
tbody th { font-weight:600; white-space:nowrap; }
td.num { text-align:right; font-variant-numeric:tabular-nums; white-space:nowrap; }
td.missed { color:var(--bad); font-weight:600; } td.met { color:var(--ok); font-weight:600; }
dl.pairs { display:grid; grid-template-columns:max-content 1fr; gap:3px 18px; margin:0; }
dl.pairs dt { font-weight:600; } dl.pairs dd { margin:0; }
figure { margin:14px 0; } figure img { max-width:100%; height:auto;
         border:1px solid var(--rule); background:#fff; }
figcaption { color:var(--muted); font-size:13px; }
"""


def _e(value: object) -> str:
    return html.escape(str(value), quote=True)


def _pairs(rows: Iterable[tuple[str, str]]) -> str:
    body = "".join(f"<dt>{_e(k)}</dt><dd>{_e(v)}</dd>" for k, v in rows)
    return f'<dl class="pairs">{body}</dl>'


def _table(frame: pd.DataFrame, *, caption: str = "", index: bool = True,
           ratios: Iterable[object] = ()) -> str:
    """A frame as an HTML table, numbers formatted per column (percents for shares)."""
    ratio_cols = set(ratios) | {c for c in frame.columns if _is_ratio(c)}
    floats = [c for c in frame.columns if pd.api.types.is_float_dtype(frame[c])]
    # one number format for the whole table, so columns read alike
    plain = frame[[c for c in floats if c not in ratio_cols]].to_numpy(dtype=float).ravel()
    plain = plain[np.isfinite(plain)]
    dec = decimals_for(plain)
    top = float(np.abs(plain).max()) if plain.size else 1.0
    fmt: dict[object, tuple[int, float]] = {}
    for c in floats:
        vals = frame[c].to_numpy(dtype=float)
        finite = vals[np.isfinite(vals)]
        fmt[c] = (dec, float(np.abs(finite).max()) if finite.size and c in ratio_cols else top)
    head = "".join(f"<th>{_e(c)}</th>" if c in fmt else f'<th class="text">{_e(c)}</th>'
                   for c in frame.columns)
    if index:
        head = f"<th>{_e(frame.index.name or '')}</th>" + head
    rows = []
    for key, row in frame.iterrows():
        cells = [f"<th>{_e(key)}</th>"] if index else []
        for c in frame.columns:
            v = row[c]
            if isinstance(v, str):
                cls = f' class="{v}"' if v in ("met", "missed") else ""
                cells.append(f"<td{cls}>{_e(v)}</td>")
            elif c == "year" and isinstance(v, int | np.integer):
                cells.append(f'<td class="num">{int(v)}</td>')
            elif c in fmt or isinstance(v, int | np.integer | float | np.floating):
                d, scale = fmt.get(c, (2, 1.0))
                cells.append(f'<td class="num">'
                             f"{_e(_text(v, d, ratio=c in ratio_cols, scale=scale))}</td>")
            else:
                cells.append(f"<td>{_e(v)}</td>")
        rows.append("<tr>" + "".join(cells) + "</tr>")
    cap = f"<caption>{_e(caption)}</caption>" if caption else ""
    return (f'<div class="scroll"><table>{cap}<thead><tr>{head}</tr></thead>'
            f"<tbody>{''.join(rows)}</tbody></table></div>")


def _charts(result: PlanResult) -> tuple[list[tuple[str, str, str]], str]:
    """The standard charts as (title, data URI, what to read), and a note when there are none."""
    try:
        from matplotlib.figure import Figure
    except ImportError:
        return [], ("Charts are left out: they need matplotlib "
                    "(pip install 'growthplan[plot]').")
    from . import charts as plot

    draw = [(name, caption, fn) for name, caption, fn in plot.chart_list(result)]
    out, failed = [], []
    for name, caption, fn in draw:
        fig = Figure(figsize=(9, 4.5), layout="constrained")
        try:
            fn(fig.add_subplot())
            buf = io.BytesIO()
            fig.savefig(buf, format="png", dpi=96, metadata={"Software": None})
        except Exception:  # noqa: BLE001 - one chart that cannot be drawn leaves the rest
            failed.append(caption)
            continue
        uri = "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode("ascii")
        out.append((caption, uri, _READING.get(name, "")))
    note = f"Could not draw: {', '.join(failed)}." if failed else ""
    return out, note


# what to read in each chart (its title is drawn in the image and kept as its alt text)
_READING = {
    "output": "Read the turning points: a line turns up when new capacity enters service "
              "after its lead time and levels off when capacity or inputs run short.",
    "capacity": "Steep climbs are the sectors the plan builds up; the shaded last year is "
                "the capacity handed on after the plan.",
    "starts": "When the plan begins new capacity and in which sectors: the early bars are the "
              "investment the later output rests on.",
    "labour": "Where the used line meets the available one, labour limits the plan (see "
              "Bottlenecks); a gap is labour to spare.",
    "consumption": "Years on the floor are years when consumption is held at its minimum so "
                   "that more can be invested.",
    "targets": "A bar at 100 % is a target that binds; a longer bar is met with room to "
               "spare, a shorter one is missed.",
    "utilisation": "Cells at 100 % are capacity that limits output in that year; lower "
                   "values are capacity standing partly idle.",
    "shadow_prices": "Rising values mark commodities growing scarce; values near zero are "
                     "commodities in surplus in that year.",
    "ray_distance": "A falling line is the plan's mix of capacities moving toward the "
                    "proportions of balanced growth.",
    "diagnosis": "The longest bars are the conditions that fall furthest short of what they "
                 "ask.",
}


def _charts_section(result: PlanResult, charts: bool) -> str:
    if not charts:
        return ('<section><h2>Charts</h2><p class="note">Charts are left out of '
                "this report.</p></section>")
    pics, note = _charts(result)
    figs = "".join(f'<figure><img src="{uri}" alt="{_e(cap)}">'
                   + (f"<figcaption>{_e(read)}</figcaption>" if read else "") + "</figure>"
                   for cap, uri, read in pics)
    note_html = f'<p class="note">{_e(note)}</p>' if note else ""
    return f"<section><h2>Charts</h2>{note_html}{figs}</section>"


PROFIT_WORDS = (
    "The profit of a technique at shadow prices is what a start of new capacity would earn "
    "over its life (the value of its products less its inputs and labour, all at the plan's "
    "shadow prices) less the capital goods it takes, in the objective's own terms. It is zero "
    "for a technique the plan starts and at most zero for one it leaves aside: a negative "
    "profit is how far that technique falls short of paying at these prices, and a technique "
    "takes over when the prices move, as labour or capital becomes scarcer, until its profit "
    "reaches zero. The table of these profits is the result's technique_profits.")


def _figure_uri(draw: Any) -> str | None:
    """One chart drawn by ``draw(ax)`` as a PNG data URI (None when it cannot be drawn)."""
    from matplotlib.figure import Figure

    fig = Figure(figsize=(9, 4.5), layout="constrained")
    try:
        draw(fig.add_subplot())
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=96, metadata={"Software": None})
    except Exception:  # noqa: BLE001 - one chart that cannot be drawn leaves the rest
        return None
    return "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode("ascii")


def techniques_table(result: PlanResult) -> pd.DataFrame:
    """Each technique's first start, last year of use and output in the first and last year.

    Parameters
    ----------
    result : PlanResult
        An optimal plan with techniques.

    Returns
    -------
    pandas.DataFrame
        Indexed by technique key: sector, technique, first started, last used
        (years as text, "never" when not), unit, output in the first and last
        plan year.
    """
    years = result.technique_years
    table = result.techniques
    first, last = int(table["year"].min()), int(table["year"].max())
    out = table[table["year"] == first].set_index("technique")["output"]
    end = table[table["year"] == last].set_index("technique")["output"]

    def when(v: Any) -> str:
        return "never" if pd.isna(v) else str(int(v))

    frame = pd.DataFrame({
        "sector": years["sector"], "technique": years["label"],
        "first started": [when(v) for v in years["first_start"]],
        "last used": [when(v) for v in years["last_used"]],
        "unit": [_unit_of(result, str(s)) for s in years["sector"]],
        f"output {first}": out.reindex(years.index).to_numpy(dtype=float),
        f"output {last}": end.reindex(years.index).to_numpy(dtype=float)},
        index=pd.Index(list(years.index), name="key"))
    return frame


def _techniques_section(result: PlanResult, charts: bool) -> str:
    """The techniques' years of use, the mix of sectors with a choice, and profits in words."""
    table = result.techniques
    labels = table.groupby("sector", sort=False)["label"].nunique()
    choice = [str(s) for s, k in labels.items() if k > 1]
    years = techniques_table(result)
    n = result.plan.economy.n
    if choice:  # the sectors with one technique only would bury the choice
        years = years[years["sector"].isin(choice)]
    rest = (f" The other {n - len(choice)} sectors have one technique each."
            if choice and len(choice) < n else "")
    parts = ["<section><h2>Techniques</h2><p>"
             + _e(f"{len(choice)} of {n} sectors can choose between techniques. The table "
                  "gives the first year each of their techniques is started and the last "
                  "year it is used, with its output (a year, in the sector's unit) in the "
                  f"first and last plan year.{rest}") + "</p>",
             _table(years, caption="Techniques and the years the plan uses them"),
             f"<p>{_e(PROFIT_WORDS)}</p>"]
    if not charts:
        parts.append('<p class="note">Charts are left out of this report.</p>')
    else:
        try:
            from matplotlib.figure import Figure  # noqa: F401
        except ImportError:
            choice = []
            parts.append('<p class="note">The technique-mix charts need matplotlib '
                         "(pip install 'growthplan[plot]').</p>")
        from . import charts as plot

        for sector in choice:
            cap = f"Technique mix of {sector}: output by technique"
            uri = _figure_uri(lambda ax, s=sector: plot.plot_techniques(result, s, ax=ax))
            if uri is None:
                parts.append(f'<p class="note">Could not draw: {_e(cap)}.</p>')
            else:
                parts.append(f'<figure><img src="{uri}" alt="{_e(cap)}">'
                             f"<figcaption>{_e(cap)}</figcaption></figure>")
    parts.append("</section>")
    return "".join(parts)


def emission_words(result: PlanResult) -> list[str]:
    """Each limit of an optimal plan in words: binding or not, its price with units.

    Parameters
    ----------
    result : PlanResult
        An optimal plan with satellite accounts.

    Returns
    -------
    list of str
    """
    out = []
    for row in result.emission_prices.itertuples():
        what = f"the {row.kind} on {row.what} in {row.year}"
        if row.slack <= 1e-7 * max(abs(row.bound), 1.0):
            out.append(f"{what[0].upper()}{what[1:]} binds ({row.emitted:,.6g} of "
                       f"{row.bound:,.6g} {row.unit}): one more {row.unit} allowed would be "
                       f"worth {row.price:.4g} {row.price_unit}.")
        else:
            out.append(f"{what[0].upper()}{what[1:]} does not bind ({row.emitted:,.6g} of "
                       f"{row.bound:,.6g} {row.unit}); one more {row.unit} allowed is worth "
                       "nothing.")
    return out


def _emissions_section(result: PlanResult, charts: bool) -> str:
    """Emissions by year with their limits, the limits' prices in words, and a chart."""
    totals = result.emission_totals
    units = totals.attrs.get("units", {})
    shown = totals.rename(columns={c: f"{c} [{units.get(c, '')}]" for c in totals.columns})
    prices = result.emission_prices
    parts = ["<section><h2>Emissions</h2><p>"
             + _e("Emissions (and resources used) of every stressor and impact, by year, "
                  "from each technique's output and households' consumption. A limit's "
                  "shadow price is what one more unit allowed would add to the objective, "
                  "in base-year money per unit (the numeraire of the other shadow prices); "
                  "a budget over several years has one price.") + "</p>",
             _table(shown, caption="Emissions by year")]
    if not prices.empty:
        parts.append(_table(prices, caption="Limits and their shadow prices", index=False))
        parts.append("<ul>" + "".join(f"<li>{_e(w)}</li>" for w in emission_words(result))
                     + "</ul>")
    if charts:
        try:
            from matplotlib.figure import Figure  # noqa: F401

            from . import charts as plot

            cap = "Emissions by sector under the limit"
            uri = _figure_uri(lambda ax: plot.plot_emissions(result, ax=ax))
            if uri is not None:
                parts.append(f'<figure><img src="{uri}" alt="{_e(cap)}">'
                             f"<figcaption>{_e(cap)}</figcaption></figure>")
        except ImportError:
            parts.append('<p class="note">The emissions chart needs matplotlib '
                         "(pip install 'growthplan[plot]').</p>")
    parts.append("</section>")
    return "".join(parts)


def _regions_section(result: PlanResult) -> str:
    """Regions: growth, the gap, the main corridor, accounts, flows and the price pattern."""
    from .regions import flow_matrix, regional_words

    unit = result.plan.economy.value_unit
    acc, gap, flows = result.regional_accounts, result.regional_gap, result.flows
    regions = result.data.regions.regions if result.data is not None else []
    last = acc.index.get_level_values("year").max()
    parts = ["<section><h2>Regions</h2>", _pairs(regional_words(acc, gap, flows, unit)),
             _table(acc.xs(last, level="year").round(3),
                    caption=f"Regional accounts in {last} ({unit}; employment in "
                            "person-years)"),
             _table(gap.round(3), caption=f"Regional gap: {gap.attrs.get('note', '')}")]
    if not flows.empty:
        parts.append(_table(flow_matrix(flows, list(regions)).round(2),
                            caption=f"Value shipped over the plan, origin × destination "
                                    f"({unit})"))
    sp = result.spatial_prices
    parts.append(_table(sp.xs(last, level="year").round(4),
                        caption=f"Shadow prices by region in {last}: a traded good's prices "
                                "differ by at most the transport it needs, valued at the "
                                "transport sector's price"))
    return "".join(parts) + "</section>"


def _job(result: PlanResult) -> str:
    p = result.plan
    years = list(p.years)
    obj = p.objective.kind.replace("_", " ")
    text = (f"This report sets out a growth plan for an economy of {p.economy.n} sectors over "
            f"{years[0]}–{years[-1]}: how much each sector produces and invests year by year, "
            f"which limits bind and what they are worth. The plan is the solution of a "
            f"linear programme ({obj} objective) subject to the commodity balances, "
            "capacities, labour supplies, consumption floors and targets listed below")
    if result.ok:
        text += ("; an independent audit rechecked every condition from the schedules.")
    else:
        text += (f". No plan meets all of them (status: {result.status.value}); the report "
                 "says what falls short.")
    return text


def render(result: PlanResult, *, charts: bool = True) -> str:
    """The report as one HTML document (see the module notes).

    Parameters
    ----------
    result : PlanResult
        Any result: an impossible plan is reported with its diagnosis.
    charts : bool, default True
        Draw the charts (when matplotlib is installed).

    Returns
    -------
    str
    """
    p = result.plan
    years = list(p.years)
    unit = p.economy.value_unit
    status = result.status.value
    badge = "ok" if result.ok else "bad"
    parts = [f"<header><h1>Growth plan {years[0]}–{years[-1]}"
             f'<span class="badge {badge}">{_e(status)}</span></h1>'
             f"<p>{p.economy.n} sectors · values in {_e(unit)} · "
             f"objective: {_e(p.objective.kind.replace('_', ' '))}</p></header><main>"]
    parts.append(f'<section><h2>What this report is</h2><p>{_e(_job(result))}</p>'
                 f'<p class="caution">{_e(CAUTION)}</p></section>')
    if not result.ok:
        parts.append(_impossible(result))
    else:
        parts.append("<section><h2>Summary</h2>"
                     + _pairs((k, v) for k, v in result.summary()._lines()
                              if k not in ("time", "solver")) + "</section>")
    parts.append("<section><h2>Inputs and assumptions</h2>" + _pairs(inputs(result))
                 + _table(sectors_table(result).set_index("sector"),
                          caption="Sectors, their units and base-year prices") + "</section>")
    targets = targets_table(result)
    if not targets.empty:
        parts.append("<section><h2>Targets</h2>"
                     + _table(targets, index=False, caption="Margin = reached − required; "
                              "a negative margin is a target missed.") + "</section>")
    if result.ok:
        acc = result.accounts
        names = {c: _account_name(result, c) for c in acc.columns}
        parts.append("<section><h2>National accounts at base-year prices</h2>"
                     + _accounts(acc.rename(columns=names), unit) + "</section>")
        b = result.bottlenecks(top=3)
        if not b.empty:
            dec = decimals_for(b["per_value"])
            per_year = {int(str(year)): "; ".join(
                f"{_binding(str(c), str(n))} {_text(float(v), dec)}" for c, n, v in
                zip(grp["condition"], grp["name"], grp["per_value"], strict=True))
                for year, grp in b.groupby("year", sort=True)}
            table = pd.DataFrame({"binding conditions, value per unit of base-year value":
                                  list(per_year.values())},
                                 index=pd.Index(list(per_year), name="year"))
            parts.append("<section><h2>Bottlenecks</h2><p>The three conditions worth most "
                         "per unit of base-year value in each year: more of them would "
                         "raise the objective most.</p>" + _table(table)
                         + _end_effect(result, b, dec) + "</section>")
        parts.append(_charts_section(result, charts))
        if result.data is not None and result.data.regions is not None:
            parts.append(_regions_section(result))
        if result.data is not None and result.data.tech is not None:
            parts.append(_techniques_section(result, charts))
        if result.data is not None and result.data.satellite is not None:
            parts.append(_emissions_section(result, charts))
        money = result.shadow_prices_money
        parts.append("<section><h2>Shadow prices in base-year money</h2>"
                     f'<p class="note">{_e(money.attrs.get("note", unit))}.</p>'
                     + _table(money) + "</section>")
    elif result.diagnosis is not None:
        parts.append(_charts_section(result, charts))
    warnings = list(result.warnings)
    solver = result.solver
    rows = [("status", f"{status} ({result.message})"),
            ("back end", f"{solver.get('backend', '')}, method {solver.get('method', '')}"),
            ("versions", _versions(solver)),
            ("time", f"{sum(result.timings.values()):.3f} s in all")]
    if result.ok and result.audit is not None:
        rows.append(("audit", f"largest violation {result.audit.max_violation:.2g} "
                              f"(relative, tolerance {result.audit.tolerance:g})"))
    rows += [("note", w) for w in warnings]
    parts.append("<section><h2>Solver</h2>" + _pairs(rows) + "</section>")
    parts.append("</main>")
    title = f"Growth plan {years[0]}–{years[-1]}"
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{_e(title)}</title><style>{_STYLE}</style></head><body>"
            + "".join(parts) + "</body></html>\n")


def _end_effect(result: PlanResult, b: pd.DataFrame, dec: int) -> str:
    """One sentence on a jump of the bottleneck values in the last plan year, or ""."""
    top = b.groupby("year")["per_value"].max()
    if len(top) < 2 or int(top.index[-1]) != int(result.plan.years[-1]):
        return ""
    last, before = float(top.iloc[-1]), float(top.iloc[-2])
    if not last > 1.5 * max(before, 0.0):
        return ""
    why = ("the terminal condition" if result.plan.terminal is not None
           else "the plan's end")
    return (f'<p class="note">The jump in {int(top.index[-1])} (up to {_text(last, dec)} '
            f"against {_text(before, dec)} in {int(top.index[-2])}) is an end effect of "
            f"{why}: values in the last plan year carry the whole future after the plan, "
            "so compare the earlier years with one another rather than with the last.</p>")


def _binding(condition: str, name: str) -> str:
    """"metals balance", "metals capacity", "labour supply" (a bottleneck in words)."""
    if condition == "labour":
        return "labour supply" if name == "labour" else f"labour supply {name}"
    return f"{name} {'balance' if condition == 'commodity' else condition}"


def _account_name(result: PlanResult, column: str) -> str:
    """"GDP growth", "employment skilled (thousand person-years)": accounts rows for reading."""
    name = column.replace("_", " ").replace("gdp", "GDP")
    if column.startswith("employment ") and result.data is not None:
        d = result.data
        units = dict(zip(d.labour_all_kinds, d.labour_all_units, strict=False))
        unit = units.get(column[len("employment "):], "") or "person-years"
        name = f"{name} ({unit})"
    return name


# the accounts' aggregates of output and its uses, as :func:`_account_name` words them
_FLOWS = ("gross output", "intermediate use", "GDP", "investment", "consumption",
          "exogenous demand", "exports", "imports", "disposal")


def _accounts(acc: pd.DataFrame, unit: str) -> str:
    """The accounts with years as rows, in tables narrow enough for a page: output and
    its uses, the other levels, then shares and growth; each has one number format."""
    rates = [c for c in acc.columns if _is_ratio(c)]
    flows = [c for c in acc.columns if c in _FLOWS]
    other = [c for c in acc.columns if c not in rates and c not in flows]
    return (_years_table(acc[flows], f"Output and its uses, {unit}", ratio=False)
            + '<div class="side">'
            + _years_table(acc[other], f"Per head, retirements ({unit}) and employment",
                           ratio=False)
            + _years_table(acc[rates], "Shares and growth, in percent", ratio=True) + "</div>")


def _years_table(t: pd.DataFrame, caption: str, *, ratio: bool) -> str:
    if t.empty:
        return ""
    vals = t.to_numpy(dtype=float)
    finite = vals[np.isfinite(vals)]
    scale = float(np.abs(finite).max()) if finite.size else 1.0
    # whole units for large aggregates keep a row short; one format for every column
    dec = 0 if scale >= 10_000 else 1 if scale >= 100 else 2
    head = "".join(f"<th>{_e(c)}</th>" for c in t.columns)
    rows = []
    for year, row in zip(t.index, vals, strict=True):
        cells = "".join(f'<td class="num">{_e(_text(v, dec, ratio=ratio, scale=scale))}</td>'
                        for v in row)
        rows.append(f"<tr><th>{_e(year)}</th>{cells}</tr>")
    return (f'<div class="scroll"><table class="years"><caption>{_e(caption)}</caption>'
            f"<thead><tr><th>year</th>{head}</tr></thead>"
            f"<tbody>{''.join(rows)}</tbody></table></div>")


def _impossible(result: PlanResult) -> str:
    diag = result.diagnosis
    out = ['<section><h2>Why the plan is impossible</h2><div class="verdict">']
    out.append(f"<p>No plan meets every condition (status {_e(result.status.value)}: "
               f"{_e(result.message)}).</p>")
    if diag is None:
        out.append("<p>No diagnosis was made for this result.</p></div></section>")
        return "".join(out)
    out.append(f"<p><strong>{_e(diag.headline())}</strong></p>")
    conflict = diag.conflict()
    if conflict:
        out.append(f"<p>{_e(conflict)}</p>")
    out.append("</div>")
    if not diag.shortfalls.empty:
        words = []
        for r in diag.shortfalls.itertuples():
            where = " ".join(str(x) for x in (r.condition, r.sector) if x != "")
            when = f" in {r.year}" if r.year != "" else ""
            words.append(f"The {where}{when} asks for {_text(float(r.required))} but at most "
                         f"{_text(float(r.achievable))} can be reached: short by "
                         f"{_text(float(r.shortfall))} ({_text(float(r.share), ratio=True)}).")
        out.append("<ul>" + "".join(f"<li>{_e(w)}</li>" for w in words) + "</ul>")
        out.append(_table(diag.shortfalls, index=False, ratios=("share",),
                          caption="Shortfalls found by the elastic re-solve"))
    for note in diag.notes:
        out.append(f'<p class="note">{_e(note)}</p>')
    out.append("</section>")
    return "".join(out)


def write_report(result: PlanResult, path: str | os.PathLike[str], *, overwrite: bool = False,
                 protect: Iterable[str | os.PathLike[str]] = (), charts: bool = True) -> Path:
    """Write :func:`render`'s report to ``path`` through the atomic writer.

    Parameters
    ----------
    result : PlanResult
    path : str or path-like
        The HTML file, written aside and renamed into place.
    overwrite : bool, default False
        Replace an existing file.
    protect : iterable of paths
        Input files that must never be overwritten.
    charts : bool, default True
        Draw the charts (when matplotlib is installed).

    Returns
    -------
    pathlib.Path
    """
    from ..io.atomic import atomic_file

    text = render(result, charts=charts)  # built first: a failure leaves no file
    with atomic_file(path, overwrite=overwrite, protect=protect) as tmp:
        tmp.write_text(text, encoding="utf-8")
    return Path(path)
