"""The summary of a plan result and the key figures it shares with scenario tables."""

from __future__ import annotations

import html
from typing import TYPE_CHECKING, Any

import numpy as np

if TYPE_CHECKING:
    from .result import PlanResult

__all__ = ["CAUTION", "CALIBRATION_WARNING", "Summary", "key_figures"]

CALIBRATION_WARNING = 0.25  # a first year this far from the base year is remarked on

CAUTION = ("Planning estimates: results rest on the coefficients and assumptions supplied "
           "and do not replace professional judgement or the decisions of the responsible "
           "authorities.")


def key_figures(result: PlanResult) -> dict[str, Any]:
    """Status, objective, solve time and, for an optimal plan, its totals at base-year prices.

    Parameters
    ----------
    result : PlanResult

    Returns
    -------
    dict
        ``status``, ``objective``, ``solve_seconds`` and, when the plan is
        optimal, ``terminal_capacity`` (value of the capacity in service after
        the plan), ``total_starts`` (value of the annual output of all
        capacity started), ``gdp_first`` and ``gdp_last`` (value added in the
        first and last plan years), ``investment_share`` (mean share of
        investment in GDP) and ``peak_labour_use`` (largest share of a labour
        supply used). Every total is at base-year prices, so none changes with
        the unit of a sector.
    """
    out: dict[str, Any] = {"status": result.status.value, "objective": result.objective,
                           "solve_seconds": result.timings.get("solve", np.nan)}
    if result.ok:
        assert result.data is not None
        prices = result.data.prices
        out["terminal_capacity"] = float(result.capacity.iloc[-1].to_numpy() @ prices)
        out["total_starts"] = float((result.starts.to_numpy() @ prices).sum())
        acc = result.accounts
        out["gdp_first"] = float(acc["gdp"].iloc[0])
        out["gdp_last"] = float(acc["gdp"].iloc[-1])
        out["investment_share"] = float(acc["investment_share"].mean())
        lab = result.labour
        if not lab.empty and (lab.columns.get_level_values(1) == "available").any():
            kinds = dict.fromkeys(lab.columns.get_level_values(0))
            out["peak_labour_use"] = max(float((lab[(k, "used")] / lab[(k, "available")])
                                               .max()) for k in kinds
                                         if (k, "available") in lab)
    return out


def labour_label(kind: str, unit: str) -> str:
    """"labour (person-years)" for the default kind, "labour skilled (person-years)" else."""
    return f"labour ({unit})" if kind == "labour" else f"labour {kind} ({unit})"


class Summary:
    """Printable and notebook-renderable summary of a :class:`PlanResult`."""

    def __init__(self, result: PlanResult) -> None:
        self.result = result

    def _lines(self) -> list[tuple[str, str]]:
        r = self.result
        p = r.plan
        rows = [("status", r.status.value + ("" if r.ok else f" ({r.message})")),
                ("years", f"{p.years[0]}–{p.years[-1]} ({p.horizon})"),
                ("sectors", str(p.economy.n)),
                ("objective", f"{type(p.objective).__name__} = {r.objective:.6g}"
                 + (f" (terminal proportions: {r.data.proportions_source})"
                    if r.data is not None and r.data.proportions_source else ""))]
        if r.ok:
            assert r.data is not None
            d = r.data
            unit = d.value_unit
            if r.level is not None:
                rows.append(("terminal level", f"λ = {r.level:.6g} (the proportions bundle is "
                             f"worth 1 {unit}); terminal capacity worth "
                             f"{r.terminal_value:,.6g} {unit}"))
            cap = r.capacity.to_numpy() @ d.prices
            if cap[0] > 0 and cap[-1] > 0:
                g = (cap[-1] / cap[0]) ** (1.0 / p.horizon) - 1
                rows.append(("capacity growth", f"{100 * g:.2f} % a year (valued at base-year "
                             "prices)"))
            acc = r.accounts
            gdp = acc["gdp"].to_numpy()
            if gdp[0] > 0 and gdp[-1] > 0 and len(gdp) > 1:
                g = (gdp[-1] / gdp[0]) ** (1.0 / (len(gdp) - 1)) - 1
                rows.append(("GDP", f"{gdp[0]:,.6g} → {gdp[-1]:,.6g} {unit}, "
                             f"{100 * g:.2f} % a year"))
                share = acc["investment_share"]
                rows.append(("investment share", f"{100 * share.min():.1f}–"
                             f"{100 * share.max():.1f} % of GDP"))
            if r.labour is not None and not r.labour.empty:
                units = dict(zip(d.labour_all_kinds, d.labour_all_units, strict=True))
                for kind in r.labour.columns.get_level_values(0).unique():
                    if (kind, "available") not in r.labour:
                        continue  # labour is counted but not limited
                    ratio = r.labour[(kind, "used")] / r.labour[(kind, "available")]
                    full = ratio[ratio >= 1 - 1e-6]
                    if len(full):
                        use = (f"fully used in {len(full)} of {len(ratio)} years (from "
                               f"{full.index[0]})")
                    else:
                        use = f"up to {100 * ratio.max():.1f} % used ({ratio.idxmax()})"
                    rows.append((labour_label(str(kind), units.get(kind, "person-years")),
                                 f"{use}; at least {100 * ratio.min():.1f} % "
                                 f"({ratio.idxmin()})"))
            cal = r.calibration
            if not cal.empty:
                far = cal[cal["change"].abs() > CALIBRATION_WARNING].sort_values(
                    "change", key=abs, ascending=False)
                if not far.empty:
                    rows.append(("first year", "departs from the base year by more than "
                                 f"{100 * CALIBRATION_WARNING:.0f} %: " + ", ".join(
                                     f"{k} {100 * v:+.0f} %" for k, v in
                                     far["change"].head(4).items())
                                 + (" (Plan(first_year_within=...) holds it nearer)"
                                    if p.first_year_within is None else "")))
            if d.satellite is not None:
                rows.extend(_emission_lines(r))
            b = r.bottlenecks(top=3)
            if not b.empty:
                first_year = b[b.year == b.year.min()]
                rows.append((f"bottlenecks {b.year.min()}",
                             ", ".join(f"{c} {n}" for c, n in
                                       zip(first_year.condition, first_year.name, strict=True))))
            assert r.audit is not None
            rows.append(("audit", f"largest violation {r.audit.max_violation:.2g} (relative, "
                         f"tolerance {r.audit.tolerance:g})"))
        rows.append(("solver", f"{r.outcome.solver_version or 'HiGHS'}, method "
                     f"{r.solver['method']}, {r.timings.get('solve', 0):.3f} s"))
        total = sum(r.timings.values())
        rows.append(("time", f"{total:.3f} s in all (" + ", ".join(
            f"{k} {v:.3f}" for k, v in r.timings.items()) + ")"))
        for w in r.warnings:
            rows.append(("note", w))
        if r.diagnosis is not None:
            rows.append(("diagnosis", r.diagnosis.headline()))
            if r.diagnosis.conflict():
                rows.append(("conflict", r.diagnosis.conflict()))
        return rows

    def __str__(self) -> str:
        rows = self._lines()
        width = max(len(k) for k, _ in rows)
        body = "\n".join(f"{k:<{width}}  {v}" for k, v in rows)
        return f"growthplan result\n{body}\n\n{CAUTION}"

    def __repr__(self) -> str:
        return str(self)

    def _repr_html_(self) -> str:
        cells = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th>"
                        f"<td style='text-align:left'>{html.escape(v)}</td></tr>"
                        for k, v in self._lines())
        return (f"<table><caption>growthplan result</caption>{cells}</table>"
                f"<p><em>{html.escape(CAUTION)}</em></p>")


def _emission_lines(r: Any) -> list[tuple[str, str]]:
    """Each limited stressor's path and where its limits bind, with the highest price."""
    sat = r.data.satellite
    totals, prices = r.emission_totals, r.emission_prices
    rows = []
    limited = list(dict.fromkeys(lim.what for lim in sat.limits)) or sat.names[-1:]
    for what in limited:
        unit = sat.units[sat.names.index(what)]
        e = totals[what]
        text = f"{e.iloc[0]:,.6g} → {e.iloc[-1]:,.6g} {unit} a year"
        mine = prices[prices["what"] == what]
        own = mine[mine["slack"] <= 1e-7 * mine["bound"].abs().clip(lower=1.0)]
        if not own.empty:
            top = own.loc[own["price"].idxmax()]
            text += (f"; at its limit in {len(own)} of {len(mine)} limit rows, price up to "
                     f"{top['price']:.4g} {top['price_unit']} ({top['year']})")
        rows.append((f"emissions of {what}", text))
    return rows
