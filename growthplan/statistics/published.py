"""Supply and use tables as offices publish them, read into a plannable economy.

A published pair is two wide tables with names (or codes) in the first column
and the first row: the **supply table** (products × industries at basic
prices, then columns for total output, imports, CIF/FOB adjustments on
imports and total supply) and the **use table** (products × industries at
purchasers' prices, then total intermediate use, the final-use columns and
total use; below the products the total intermediate row, the value-added
block and total output). :func:`read_published` reads either: labels with
commas and quotes, a byte-order mark, blank padding rows, a first header cell
left empty, suppressed cells (:data:`~growthplan.statistics.valuation.SUPPRESSED`)
read as missing and counted, a total row without a label; tables printed with
codes only take their labels from a separate list.

:class:`PublishedTables` finds the blocks without a layout description:

- totals: a row or column whose name holds "total" in any case, or a code
  ``T`` + three digits;
- in the supply table, imports columns name "import" (and "CIF/FOB"
  adjustments are kept apart), every other column is an industry;
- in the use table, rows are the supply table's products, then named rows:
  "compensation", "value added … basic", "taxes on products", "subsidies on
  products"; its first columns are the supply table's industries, matched by
  name, or by position when the use table prints codes instead (the match is
  checked against the two tables' industry output);
- every other use column is a final use: a name or code holding "export" or
  ``F04x`` is the exports column; "personal consumption expenditures",
  "household" or ``F01x`` household consumption; "fixed investment", "fixed
  capital formation" or a code ``F02``, ``F06``, ``F07`` or ``F10`` followed
  by E, N, R or S fixed investment.

The rules applied on the way, each written into the assumptions
(:attr:`PublishedEconomy.assumptions`): suppressed cells filled against the
published totals; CIF/FOB adjustments folded into imports (added to the
imports of their product; what would turn a product's imports negative is
taken off the other products' imports in proportion, so total imports are
kept); imports above a product's use at home read as re-exports (taken off
its imports and its exports alike: the rest-of-world adjustment row); the
valuation layers (:mod:`growthplan.statistics.valuation`); negative
intermediate uses by their rule; negative final uses (inventories) kept.

Capital and labour, which supply and use tables do not hold, come by one of
the routes of :func:`published_economy`: an aggregate capital–output ratio on
value added spread over products by the composition of fixed investment, or
capital stocks by industry; persons employed by industry, or compensation of
employees at a stated average wage.
"""

from __future__ import annotations

import csv
import io
import os
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import numpy as np
import pandas as pd

from ..errors import invalid
from ..io.files import read_regular_file
from ..model.economy import Economy
from .supply_use import MODELS, SupplyUseTable, SymmetricTable
from .tables import _NUMBER, TABLE_MAX_BYTES, TABLE_MAX_CELLS
from .valuation import (
    SUPPRESSED,
    Filled,
    NegativeUses,
    Valuation,
    fill_suppressed,
    negative_supply,
    negative_uses,
    to_basic_prices,
)

__all__ = ["PublishedTable", "PublishedTables", "PublishedEconomy", "read_published",
           "published_economy"]

_TOTAL_CODE = re.compile(r"T\d{3}")
_EXPORT_CODE = re.compile(r"F04\d")
_INVESTMENT_CODE = re.compile(r"F(02|06|07|10)[ENRS]")  # fixed investment, private and public
_CONSUMPTION_CODE = re.compile(r"F01\d")


@dataclass(frozen=True)
class PublishedTable:
    """A wide published table: NaN where a cell was suppressed or blank.

    Attributes
    ----------
    frame : DataFrame
        Rows and columns by their printed name or code.
    file : str
    suppressed : int
        Cells printed as suppressed (or left blank).
    """

    frame: pd.DataFrame
    file: str
    suppressed: int


def _label(text: str) -> str:
    return " ".join(text.split())


def _value(text: str, where: str) -> float:
    t = text.strip()
    if not t or t in SUPPRESSED:
        return float("nan")
    neg = t.startswith("(") and t.endswith(")")  # accountants' negatives
    core = t[1:-1] if neg else t
    core = core.replace(",", "") if re.fullmatch(r"[+-]?\d{1,3}(,\d{3})+(\.\d*)?", core) \
        else core
    if not _NUMBER.fullmatch(core):
        raise invalid(where, f"be a number, empty or a suppressed mark {list(SUPPRESSED)}", t)
    x = float(core)
    return -x if neg else x


def read_published(path: str | os.PathLike[str], *, what: str = "table") -> PublishedTable:
    """Read a wide table as offices publish it (see the module notes).

    Parameters
    ----------
    path : path
        A CSV file, UTF-8 (a byte-order mark is allowed).
    what : str
        What the table is, first in every message.

    Returns
    -------
    PublishedTable

    Raises
    ------
    InvalidInput
        Naming the file, the row and the column: a cell that is neither a
        number nor a suppressed mark, a name given twice, values under no
        column name.
    """
    p = Path(path)
    raw = read_regular_file(p, what=what, limit=TABLE_MAX_BYTES)
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise invalid(f"{what} ({p.name})", "be UTF-8 text", f"byte {exc.start}") from None
    try:
        grid = [(i, row) for i, row in enumerate(csv.reader(io.StringIO(text, newline="")),
                                                 start=1) if any(c.strip() for c in row)]
    except csv.Error as exc:
        raise invalid(f"{what} ({p.name})", "be readable CSV", str(exc)) from None
    if len(grid) < 2:
        raise invalid(f"{what} ({p.name})", "have a header row and rows of figures",
                      f"{len(grid)} row(s)")
    if sum(len(r) for _, r in grid) > TABLE_MAX_CELLS:
        raise invalid(f"{what} ({p.name})", f"have at most {TABLE_MAX_CELLS:,} cells", "more")
    hrow, header = grid[0]
    names = [_label(c) for c in header[1:]]
    width = max(len(r) for _, r in grid) - 1
    names += [""] * (width - len(names))
    used = [j for j in range(width) if names[j] or any(
        j + 1 < len(r) and r[j + 1].strip() for _, r in grid[1:])]
    for j in used:
        if not names[j]:
            raise invalid(f"{what} ({p.name}, row {hrow}, column {j + 2})", "name every "
                          "column that holds figures", "")
    cols = [names[j] for j in used]
    dup = sorted({c for c in cols if cols.count(c) > 1})
    if dup:
        raise invalid(f"{what} ({p.name}, row {hrow})", "name each column once", dup[:3])
    rows, data = [], []
    for i, row in grid[1:]:
        label = _label(row[0]) if row else ""
        if not label:
            label = "Total"  # a total row printed without a label
        if label in rows:
            raise invalid(f"{what} ({p.name}, row {i})", "name each row once", label)
        cells = list(row[1:]) + [""] * (width - len(row) + 1)
        data.append([_value(cells[j], f"{what} ({p.name}, row {i} '{label}', column "
                            f"'{names[j]}')") for j in used])
        rows.append(label)
    frame = pd.DataFrame(np.array(data, dtype=float), index=rows, columns=cols)
    return PublishedTable(frame, p.name, int(frame.isna().to_numpy().sum()))


def _label_list(path: str | os.PathLike[str]) -> dict[str, str]:
    """``{code: label}`` from a two-column CSV file (a header row first)."""
    p = Path(path)
    raw = read_regular_file(p, what="labels", limit=TABLE_MAX_BYTES)
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise invalid(f"labels ({p.name})", "be UTF-8 text", f"byte {exc.start}") from None
    out: dict[str, str] = {}
    for i, row in enumerate(csv.reader(io.StringIO(text, newline="")), start=1):
        cells = [_label(c) for c in row]
        if i == 1 or not any(cells):
            continue
        if len(cells) < 2 or not cells[0] or not cells[1]:
            raise invalid(f"labels ({p.name}, row {i})", "hold a code and a label", row)
        if cells[0] in out:
            raise invalid(f"labels ({p.name}, row {i})", "give each code once", cells[0])
        out[cells[0]] = cells[1]
    return out


def _is_total(name: str) -> bool:
    return "total" in name.lower() or bool(_TOTAL_CODE.fullmatch(name))


def _find(names: list[str], *words: str, exclude: tuple[str, ...] = ()) -> str | None:
    for n in names:
        low = n.lower()
        if all(w in low for w in words) and not any(x in low for x in exclude):
            return n
    return None


@dataclass(frozen=True)
class PublishedTables:
    """The blocks of a published pair of supply and use tables.

    Built by :meth:`read`; every figure in the tables' printed unit.

    Attributes
    ----------
    products, industries : list of str
        Industries by their supply-table names.
    supply : DataFrame
        Domestic output, products × industries (suppressed cells filled).
    imports, cif_fob : Series by product
    use : DataFrame
        Intermediate use at purchasers' prices, products × industries.
    final_demand : DataFrame
        Final uses at purchasers' prices, products × categories.
    rows : DataFrame
        The use table's other rows (value added and its parts, taxes on
        products, totals) by industry.
    codes : dict of str to str
        The use table's column code of each industry (its name when the use
        table prints names).
    filled : dict of str to Filled
        The suppressed cells of each block and how they were filled.
    printed : dict of str to float
        The grand totals the use table prints (industry output, intermediate
        use, value added at basic and producer prices, compensation of
        employees, taxes and subsidies on products), where it prints them.
    files : list of str
    """

    products: list[str]
    industries: list[str]
    supply: pd.DataFrame
    imports: pd.Series
    cif_fob: pd.Series
    use: pd.DataFrame
    final_demand: pd.DataFrame
    rows: pd.DataFrame
    codes: dict[str, str]
    filled: dict[str, Filled]
    printed: dict[str, float] = field(default_factory=dict)
    files: list[str] = field(default_factory=list)

    @classmethod
    def read(cls, supply: str | os.PathLike[str], use: str | os.PathLike[str], *,
             labels: str | os.PathLike[str] | None = None,
             tolerance: float = 0.005) -> PublishedTables:
        """Read a published supply table and use table (see the module notes).

        Parameters
        ----------
        supply, use : path
        labels : path, optional
            A separate list of labels for tables printed with codes only: a
            CSV file of two columns, code and label, after a header row.
            Every code of either table found in it is read as its label.
        tolerance : float, default 0.005
            Largest gap between the two tables' industry output, as a share.

        Returns
        -------
        PublishedTables
        """
        s = read_published(supply, what="supply")
        u = read_published(use, what="use")
        sf, uf = s.frame, u.frame
        if labels is not None:
            names = _label_list(labels)
            sf = sf.rename(index=names, columns=names)
            uf = uf.rename(index=names, columns=names)
            for what, f, file in (("supply", sf, s.file), ("use", uf, u.file)):
                for axis in (list(f.index), list(f.columns)):
                    dup = sorted({x for x in axis if axis.count(x) > 1})
                    if dup:
                        raise invalid(f"labels ({Path(labels).name})", f"give each code of "
                                      f"the {what} table ({file}) its own label", dup[:3])
        s_cols = list(sf.columns)
        imp = [c for c in s_cols if "import" in c.lower() and not _is_total(c)
               and "cif" not in c.lower()]
        cif = [c for c in s_cols if "cif" in c.lower() and not _is_total(c)]
        industries = [c for c in s_cols if not _is_total(c) and c not in imp + cif]
        products = [r for r in sf.index if not _is_total(r)]
        if not industries or not products:
            raise invalid(f"supply ({s.file})", "have product rows and industry columns",
                          f"{len(products)} product(s), {len(industries)} industry(ies)")
        missing = [p for p in products if p not in uf.index]
        if missing:
            raise invalid(f"supply ({s.file}) row '{missing[0]}'", f"be a product row of the "
                          f"use table ({u.file}) too", missing[0])
        u_cols = list(uf.columns)
        if all(i in u_cols for i in industries):
            codes = {i: i for i in industries}
        else:
            lead = [c for c in u_cols if not _is_total(c)][:len(industries)]
            codes = dict(zip(industries, lead, strict=False))
        out_row = _find([r for r in sf.index if _is_total(r)], "total")
        u_out = _find(list(uf.index), "output", "total") or _find(list(uf.index), "output")
        if out_row is not None and u_out is not None:
            a = sf.loc[out_row, industries].to_numpy(dtype=float)
            b = uf.loc[u_out, [codes[i] for i in industries]].to_numpy(dtype=float)
            off = np.abs(a - b) > tolerance * np.abs(a).clip(min=1.0)
            if off.any():
                k = int(np.argmax(off))
                raise invalid(f"use ({u.file}) column '{codes[industries[k]]}'", "be the "
                              f"industry of the supply table in that place ({industries[k]}: "
                              "the two tables' industry output must agree)",
                              f"{b[k]:.6g} against {a[k]:.6g}")
        elif codes[industries[0]] != industries[0]:
            raise invalid(f"use ({u.file})", "name its industry columns as the supply table "
                          "does, or print total industry output to match codes by", u_cols[:3])
        ind_cols = [codes[i] for i in industries]
        final = [c for c in u_cols if c not in ind_cols and not _is_total(c)]
        other_rows = [r for r in uf.index if r not in products]
        # suppressed cells, filled against the published totals
        s_tot = [c for c in s_cols if _is_total(c)]
        dom_total = _find(s_tot, "commodity") if imp else None
        if not imp and s_tot:
            # no imports column: imports are total supply less domestic output and CIF/FOB
            total = sf.loc[products, s_tot[-1]]
            imports = total - sf.loc[products, industries].fillna(0.0).sum(axis=1) \
                - sf.loc[products, cif].fillna(0.0).sum(axis=1)
        else:
            imports = sf.loc[products, imp].fillna(0.0).sum(axis=1)
        filled: dict[str, Filled] = {}
        v = sf.loc[products, industries]
        filled["supply table"] = fill_suppressed(v, None if dom_total is None
                                                 else sf.loc[products, dom_total])
        t_int = _find([c for c in u_cols if _is_total(c)], "intermediate") or (
            "T001" if "T001" in u_cols else None)
        uu = uf.loc[products, ind_cols]
        filled["use table"] = fill_suppressed(uu, None if t_int is None
                                              else uf.loc[products, t_int])
        t_use = _find([c for c in u_cols if _is_total(c)], "use") or (
            "T019" if "T019" in u_cols else None)
        ff = uf.loc[products, final]
        fin_total = None
        if t_use is not None:
            inter = filled["use table"].frame.sum(axis=1)
            fin_total = uf.loc[products, t_use] - inter
        filled["final uses"] = fill_suppressed(ff, fin_total)
        rows = uf.loc[other_rows, ind_cols].fillna(0.0)
        rows.columns = industries
        printed: dict[str, float] = {}
        if t_int is not None:  # the grand totals the use table prints
            for key, words, excl in (
                    ("industry output", ("output",), ()),
                    ("intermediate use", ("total", "intermediate"), ()),
                    ("value added at basic prices", ("value added", "basic"), ()),
                    ("value added at producer prices", ("value added", "producer"), ()),
                    ("compensation of employees", ("compensation",), ()),
                    ("taxes on products", ("taxes on products",), ()),
                    ("subsidies on products", ("subsidies on products",), ())):
                name = _find(other_rows, *words, exclude=excl)
                if name is not None and np.isfinite(uf.at[name, t_int]):
                    printed[key] = float(uf.at[name, t_int])
        use_b = filled["use table"].frame
        use_b.columns = industries
        return cls(products=products, industries=industries,
                   supply=filled["supply table"].frame,
                   imports=imports,
                   cif_fob=sf.loc[products, cif].fillna(0.0).sum(axis=1),
                   use=use_b, final_demand=filled["final uses"].frame, rows=rows,
                   codes=codes, filled=filled, printed=printed, files=[s.file, u.file])

    def row(self, *words: str, exclude: tuple[str, ...] = ()) -> pd.Series | None:
        """The use table's row whose name holds every word (any case), by industry."""
        name = _find(list(self.rows.index), *words, exclude=exclude)
        return None if name is None else self.rows.loc[name]

    def figures(self) -> dict[str, float]:
        """The tables' own totals: the published check figures.

        The grand totals the use table prints where it prints them, else the
        sums of the cells.

        Returns
        -------
        dict
            ``industry output``, ``intermediate use``, ``value added at basic
            prices`` (the printed row, else output less intermediate use),
            ``value added at producer prices`` (basic plus taxes less
            subsidies on products), ``compensation of employees``,
            ``imports``.
        """
        g = float(self.supply.to_numpy().sum())
        inter = float(self.use.to_numpy().sum())
        va_row = self.row("value added", "basic")
        va = float(va_row.sum()) if va_row is not None else g - inter
        taxes = self.row("taxes on products")
        subs = self.row("subsidies on products")
        out = {"industry output": g, "intermediate use": inter,
               "value added at basic prices": va,
               "value added at producer prices": va
               + (0.0 if taxes is None else float(taxes.sum()))
               - (0.0 if subs is None else float(subs.sum())),
               "imports": float(self.imports.sum() + self.cif_fob.sum())}
        comp = self.row("compensation")
        if comp is not None:
            out["compensation of employees"] = float(comp.sum())
        p = self.printed
        if "taxes on products" in p and "value added at basic prices" in p:
            p = {**p, "value added at producer prices": p.get(
                "value added at producer prices", p["value added at basic prices"]
                + p["taxes on products"] - p.get("subsidies on products", 0.0))}
        out.update({k: v for k, v in p.items() if k in out})
        return out

    def column(self, kind: Literal["consumption", "investment", "exports"]) -> list[str]:
        """The final-use columns of a kind, by name or by code."""
        cols = list(self.final_demand.columns)
        if kind == "exports":
            return [c for c in cols if "export" in c.lower() or _EXPORT_CODE.fullmatch(c)]
        if kind == "investment":
            return [c for c in cols if "fixed investment" in c.lower()
                    or "fixed capital formation" in c.lower() or _INVESTMENT_CODE.fullmatch(c)]
        return [c for c in cols if ("consumption expenditures" in c.lower()
                                    or "household" in c.lower())
                and "government" not in c.lower() or _CONSUMPTION_CODE.fullmatch(c)]


@dataclass(frozen=True)
class PublishedEconomy:
    """What :func:`published_economy` did, and the tables on the way.

    Attributes
    ----------
    tables : PublishedTables
    valuation : Valuation
    negative_uses : NegativeUses
    supply_use : SupplyUseTable
        At basic prices, every special cell treated.
    symmetric : SymmetricTable
    value_added : Series
        Value added at basic prices by sector of the symmetric table.
    capital_stocks : DataFrame
        Capital stock by product (rows) and sector (columns).
    assumptions : list of str
    checks : dict of str to float
        Largest relative gaps of the identities checked on the way.
    figures : dict of str to float
        The published totals and the built economy's: ``{name: (published, built)}``.
    """

    tables: PublishedTables
    valuation: Valuation
    negative_uses: NegativeUses
    supply_use: SupplyUseTable
    symmetric: SymmetricTable
    value_added: pd.Series
    capital_stocks: pd.DataFrame
    assumptions: list[str]
    checks: dict[str, float]
    figures: dict[str, tuple[float, float]]
    spec: Any = None
    inputs: list[Path] = field(default_factory=list)
    """The economy spec (when built from one) and the files read."""

    def other_demand(self) -> pd.Series:
        """Final demand other than households', fixed investment and inventories, by sector."""
        f = self.symmetric.final_demand
        skip = set(self.tables.column("consumption")) | set(self.tables.column("investment"))
        cols = [c for c in f.columns if c not in skip and "inventor" not in c.lower()
                and c != "F030"]
        return f[cols].sum(axis=1)

    def base_consumption(self) -> float:
        """Household consumption of domestic products in the base year."""
        cols = [c for c in self.tables.column("consumption")
                if c in self.symmetric.final_demand.columns]
        return float(self.symmetric.final_demand[cols].clip(lower=0.0).to_numpy().sum())

    def to_markdown(self, title: str = "Assumptions") -> str:
        """The assumptions, the published figures and the checks as a Markdown document."""
        lines = [f"# {title}", ""]
        if self.spec is not None and getattr(self.spec, "description", None):
            lines += [self.spec.description, ""]
        lines += [f"- {a}" for a in self.assumptions]
        lines += ["", "## The tables' totals and the economy's", "",
                  "| figure | published | built | gap |", "|---|---:|---:|---:|"]
        lines += [f"| {k} | {a:,.0f} | {b:,.0f} | {100 * (b - a) / a:+.4f} % |"
                  for k, (a, b) in self.figures.items()]
        lines += ["", "## Valuation adjustment of each product, largest first", "",
                  "| product | uses | supply | taken off its uses |", "|---|---:|---:|---:|"]
        adj = self.valuation.adjustments
        for p in adj["adjustment"].abs().sort_values(ascending=False).index:
            r = adj.loc[p]
            lines.append(f"| {p} | {r['uses']:,.0f} | {r['supply']:,.0f} | "
                         f"{r['adjustment']:,.0f} |")
        lines += ["", "## Checks", ""]
        lines += [f"- {k}: largest relative gap {v:.3g}" for k, v in self.checks.items()]
        return "\n".join(lines) + "\n"


def _fold_imports(t: PublishedTables, assumptions: list[str]) -> pd.Series:
    m = t.imports + t.cif_fob
    short = (-m).clip(lower=0.0)
    if short.sum() > 0:
        rest = m.clip(lower=0.0)
        m = rest - rest / rest.sum() * short.sum()
    if t.cif_fob.abs().sum() > 0:
        assumptions.append(
            f"Imports: CIF/FOB adjustments on imports ({t.cif_fob.sum():,.0f} in all) folded "
            "into imports, each added to its product's imports; where a product's imports "
            f"would turn negative ({int((short > 0).sum())} product(s)), the rest was taken off "
            "the other products' imports in proportion, so total imports are kept "
            f"({m.sum():,.0f}).")
    return m


def published_economy(tables: PublishedTables, *, value_unit: str,
                      model: str = "fixed_product_sales",
                      valuation: Literal["exact", "proportional"] = "proportional",
                      margins: dict[str, pd.DataFrame] | None = None,
                      taxes: pd.DataFrame | None = None,
                      negatives: Literal["byproduct", "net"] = "byproduct",
                      capital_output_ratio: float | None = None,
                      capital_stocks: pd.Series | None = None,
                      service_life: float = 20.0, past_growth: float = 0.0,
                      employment: pd.Series | None = None, wage: float | None = None,
                      labour_unit: str = "thousand person-years",
                      labour_kind: str = "employees",
                      consumption_column: str | None = None,
                      tolerance: float = 0.005) -> tuple[Economy, PublishedEconomy]:
    """A plannable economy from published supply and use tables.

    Parameters
    ----------
    tables : PublishedTables
    value_unit : str
        The tables' unit (e.g. "million dollars at 2021 prices").
    model : str, default "fixed_product_sales"
        The transformation model (:data:`~growthplan.statistics.MODELS`); the
        default gives an industry × industry table without negative flows.
    valuation : {"proportional", "exact"}, default "proportional"
        The route to basic prices (:mod:`~growthplan.statistics.valuation`):
        ``"exact"`` needs ``margins`` (and ``taxes``).
    margins, taxes : optional
        Margin tables by margin product, and taxes less subsidies on
        products, products × uses.
    negatives : {"byproduct", "net"}, default "byproduct"
        The rule for negative intermediate uses.
    capital_output_ratio : float, optional
        Capital route 1: capital stock per unit of value added (the aggregate
        ratio); each industry's stock is this times its value added, made of
        products in the proportions of fixed investment.
    capital_stocks : Series by industry, optional
        Capital route 2: stocks by industry, made of products likewise.
    service_life : float, default 20
        Mean service life of capital (years).
    past_growth : float, default 0
        Growth rate of investment before the base year.
    employment : Series by industry, optional
        Labour route 1: persons employed (in ``labour_unit``).
    wage : float, optional
        Labour route 2: compensation of employees divided by this average
        wage (value units per ``labour_unit``).
    labour_unit, labour_kind : str
    consumption_column : str, optional
        The final-use column of household consumption (default: found by
        name or code).
    tolerance : float, default 0.005

    Returns
    -------
    economy : Economy
    report : PublishedEconomy
    """
    if model not in MODELS:
        raise invalid("model", f"be one of {list(MODELS)}", model)
    if (capital_output_ratio is None) == (capital_stocks is None):
        raise invalid("capital", "be given as an aggregate capital_output_ratio or as "
                      "capital stocks by industry (one of them)",
                      "both" if capital_output_ratio is not None else "neither")
    if capital_output_ratio is not None and not 0 < capital_output_ratio < 100:
        raise invalid("capital_output_ratio", "be in (0, 100)", capital_output_ratio)
    if (employment is None) == (wage is None):
        raise invalid("labour", "be given as employment by industry or as an average wage "
                      "(one of them)", "both" if wage is not None else "neither")
    if wage is not None and not wage > 0:
        raise invalid("wage", "be > 0", wage)
    assumptions: list[str] = [f"Values in {value_unit}; tables read from "
                              f"{' and '.join(tables.files)}."]
    for what, f in tables.filled.items():
        assumptions.append(f.assumption(what))
    products, industries = tables.products, tables.industries
    fd = tables.final_demand.copy()
    exports = tables.column("exports")
    if len(exports) > 1:
        raise invalid("final_demand", "have one exports column", exports)
    imports = _fold_imports(tables, assumptions)
    imports_total = float(imports.sum())
    q = tables.supply.sum(axis=1)
    if valuation not in ("exact", "proportional"):
        raise invalid("valuation", "be 'exact' or 'proportional'", valuation)
    if valuation == "exact" and not margins:
        raise invalid("margins", "be given for the exact valuation (a margin table for each "
                      "margin product)", margins)
    val = to_basic_prices(tables.use, fd, q + imports, margins=margins, taxes=taxes,
                          tolerance=tolerance) if valuation == "exact" else \
        to_basic_prices(tables.use, fd, q + imports)
    assumptions.append(val.assumption())
    supply0, use0, said = negative_supply(tables.supply, val.use)
    assumptions.append(said)
    neg = negative_uses(use0, val.final_demand, negatives)
    assumptions.append(neg.assumption())
    if (val.final_demand < 0).any().any():
        cols = list(val.final_demand.columns[(val.final_demand < 0).any(axis=0)])
        assumptions.append(f"Negative final uses (changes in inventories and the like) kept "
                           f"as published, in {len(cols)} column(s): {', '.join(cols)}.")
    supply = supply0 + neg.byproducts.T.reindex(index=products, columns=industries)
    f = neg.final_demand
    if exports:
        f = f.rename(columns={exports[0]: "exports"})
        home = f.drop(columns="exports").sum(axis=1) + neg.use.sum(axis=1)
        excess = (imports - home).clip(lower=0.0)
        if excess.sum() > 0:
            imports = imports - excess
            f["exports"] = f["exports"] - excess
            names = list(excess.index[excess > 0])
            assumptions.append(
                f"Re-exports: {len(names)} product(s) ({', '.join(names)}) import more than "
                f"is used at home; the excess ({excess.sum():,.0f}) was read as re-exported, "
                "taken off the product's imports and exports alike.")
    # value added by industry at basic prices, with the taxes on its inputs beside it
    g = supply.sum(axis=0)
    va_sut = g - neg.use.sum(axis=0)
    va_basic = va_sut - val.taxes.reindex(industries).fillna(0.0)
    comp = tables.row("compensation")
    va_name = _find(list(tables.rows.index), "value added", "basic")
    assumptions.append(
        "Value added: "
        + (f"the use table's row '{va_name}' (compensation of employees, taxes less "
           "subsidies on production and operating surplus) by industry"
           if va_name is not None else "industry output less intermediate use")
        + "; the taxes less subsidies on products paid on an industry's inputs are a "
        "primary input beside it, so the economy's inputs are valued at basic prices.")
    gov = [i for i in industries if "government" in i.lower()
           and "except government" not in i.lower()]
    if gov:
        assumptions.append(f"Government industries ({len(gov)}: {', '.join(gov)}) are kept "
                           "as industries: their output, bought mostly by government final "
                           "consumption, is planned like any other, with its own inputs, "
                           "capital and labour.")
    labour = None
    if wage is not None:
        if comp is None:
            raise invalid("wage", "come with a compensation of employees row in the use table",
                          wage)
        persons = comp / wage
        assumptions.append(f"Labour: compensation of employees divided by an average wage of "
                           f"{wage:g} {value_unit} per {labour_unit} gives {labour_kind} "
                           f"in {labour_unit} by industry.")
    else:
        assert employment is not None
        persons = employment.reindex(industries)
        if persons.isna().any():
            raise invalid("employment", "give every industry", [
                i for i in industries if pd.isna(persons[i])][:5])
        assumptions.append(f"Labour: persons employed by industry as given, in {labour_unit}.")
    labour = persons.astype(float).rename(labour_kind)
    try:
        sut = SupplyUseTable(neg.use, supply=supply, final_demand=f, value_added=va_sut,
                             imports=imports, labour=labour, tolerance=tolerance)
    except Exception as exc:
        raise invalid(f"supply and use tables ({', '.join(tables.files)})",
                      "balance at basic prices after the stated rules", str(exc)) from None
    sym = sut.symmetric(model)  # type: ignore[arg-type]
    assumptions.append(f"Transformation model: {model.replace('_', ' ')} "
                       f"({MODELS.index(model) + 1} of the four standard models).")
    assumptions.append("Imports: import proportionality: every user of a product at home "
                       "takes the same share of imports; exports are wholly domestic.")
    # capital: stocks by industry, made of products like fixed investment
    inv_cols = [c for c in tables.column("investment") if c in val.final_demand.columns]
    if not inv_cols:
        raise invalid("final_demand", "have a fixed investment column (its products make "
                      "the capital stock)", list(fd.columns)[:8])
    comp_inv = val.final_demand[inv_cols].sum(axis=1).clip(lower=0.0)
    comp_inv = comp_inv / comp_inv.sum()
    if capital_output_ratio is not None:
        k_ind = va_basic.clip(lower=0.0) * capital_output_ratio
        assumptions.append(
            f"Capital: an aggregate capital–output ratio of {capital_output_ratio:g} (capital "
            "stock per unit of value added at basic prices) for every industry: each "
            "industry's stock is that ratio times its value added.")
    else:
        assert capital_stocks is not None
        k_ind = capital_stocks.reindex(industries).astype(float)
        if k_ind.isna().any():
            raise invalid("capital_stocks", "give every industry",
                          [i for i in industries if pd.isna(k_ind[i])][:5])
        assumptions.append("Capital: stocks by industry as given.")
    assumptions.append(f"Capital goods: every stock is made of products in the proportions of "
                       f"fixed investment (columns {', '.join(inv_cols)}); mean service life "
                       f"{service_life:g} years, geometric retirement, investment having "
                       f"grown {100 * past_growth:g} % a year before the base year.")
    stocks = pd.DataFrame(np.outer(comp_inv.to_numpy(), k_ind.to_numpy()), index=products,
                          columns=industries)
    t = sut.transformation(model).to_numpy()  # type: ignore[arg-type]
    if model in ("product_technology", "industry_technology"):
        k = pd.DataFrame(stocks.to_numpy() @ t, index=products, columns=sym.names)
    else:
        k = pd.DataFrame(t @ stocks.to_numpy(), index=industries, columns=industries)
    x = sym.gross_output
    b = k.div(x, axis=1)
    capital = {n: {"initial_capacity": float(x[n]), "mean_service_life": float(service_life),
                   "past_growth": past_growth} for n in sym.names}
    assumptions.append("Capacity: each sector's base-year output, at full utilisation.")
    kwargs: dict[str, Any] = {"value_unit": value_unit, "labour_units": [labour_unit]}
    cons = consumption_column
    if cons is None:
        found = [c for c in tables.column("consumption") if c in sym.final_demand.columns]
        cons = found[0] if found else None
    if cons is not None:
        if cons not in sym.final_demand.columns:
            raise invalid("consumption_column", "be a final-use column",
                          list(sym.final_demand.columns)[:8])
        basket = sym.final_demand[cons].clip(lower=0.0)
        kwargs["consumption_basket"] = (basket / basket.sum()).to_numpy()
        assumptions.append(f"Consumption basket: the domestic part of household consumption "
                           f"(column {cons}) as shares; one unit of the plan's consumption "
                           f"level is a basket worth 1 {value_unit}.")
    econ = sym.to_economy(capital=capital, capital_coefficients=b, **kwargs)
    va_s = sym.value_added - (val.taxes.reindex(industries).fillna(0.0).to_numpy() @ (
        t if model in ("product_technology", "industry_technology") else np.eye(len(t))))
    published = tables.figures()
    built = {"industry output": float(x.sum()) if model not in (
        "product_technology", "industry_technology") else float(g.sum()),
        "intermediate use": float(neg.use.to_numpy().sum() + val.taxes[industries].sum()),
        "value added at basic prices": float(va_s.sum()),
        "value added at producer prices": float(va_s.sum() + val.taxes.sum()),
        "imports": imports_total}
    if comp is not None:
        built["compensation of employees"] = float(comp.sum())
    figures = {k: (published[k], built[k]) for k in built if k in published}
    checks = {"value added kept by the valuation": abs(float(va_basic.sum())
                                                        - published["value added at basic "
                                                                    "prices"])
              / abs(published["value added at basic prices"])}
    report = PublishedEconomy(tables=tables, valuation=val, negative_uses=neg, supply_use=sut,
                              symmetric=sym, value_added=pd.Series(np.asarray(va_s),
                                                                   index=sym.names),
                              capital_stocks=k, assumptions=assumptions, checks=checks,
                              figures=figures)
    return econ, report
