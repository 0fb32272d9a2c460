"""From the statistical office's tables to a plannable economy: the economy spec.

An economy spec (YAML or TOML, ``layout_version: 1``) names the published
tables and the assumptions that turn them into an :class:`~growthplan.Economy`;
:func:`build_economy` reads it, :func:`write_economy` writes the coefficient
tables a plan file reads (``growthplan economy build SPEC --out FOLDER``)::

    layout_version: 1
    value_unit: million arvens at 2026 prices
    supply: supply.csv            # products × industries, plus an imports column
    use: {file: use.xlsx, sheet: use, label_column: 2}
    imports_columns: [imports]    # columns of the supply table that are imports
    value_added_rows: [compensation, surplus, taxes]   # rows of the use table
    model: industry_technology    # or product_technology, fixed_industry_sales, ...
    negatives: raise              # or zero, industry_technology
    import_treatment: proportionality   # or imports_use (with imports_use: FILE)
    consumption_column: households
    aggregation: {products: {agri: agri, fish: agri, ...}}
    employment: {table: employment.csv, unit: thousand persons}
    capital:
      flows: capital_flows.csv    # or stocks, or investment + composition,
      service_life: 25            #    or capital_output_ratios + composition
      past_growth: 0.04

Tables are given by file name (the wide layout with defaults) or by a
layout (see :mod:`growthplan.statistics.layouts`), relative to the spec file and
inside its folder. The use table's columns are the industries of the supply
table followed by final-use categories (every other column; one named
``exports`` is taken as wholly domestic); its rows are the products of the
supply table and the ``value_added_rows``.

Capital, products × industries at base-year prices, from one of:

``stocks``
    A capital stock matrix.
``flows``
    A capital-flows table (investment of the base year by product and
    industry); stocks by the steady-state perpetual inventory
    ``K = I (1 + g) / (g + 1 / L)`` (see :mod:`growthplan.statistics.capital_flows`).
``investment`` + ``composition``
    Investment by industry spread over products by a composition (one
    column, or products × industries), then as ``flows``.
``capital_output_ratios`` + ``composition``
    ``K_ij = c_ij κ_j g_j``.

The stock matrix is turned into the symmetric table's sectors like the use
table, and divided by capacity (output over ``max_utilisation``) for the
capital coefficients. Every assumption applied is listed in the report
(:attr:`BuildReport.assumptions`, ``assumptions.md``).
"""

from __future__ import annotations

import csv
import io
import os
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Annotated, Any, Literal

import numpy as np
import pandas as pd
import yaml
from pydantic import ConfigDict, Discriminator, Field, Tag

from ..errors import InvalidInput, invalid
from ..io.atomic import atomic_folder
from ..io.files import read_regular_file
from ..model.economy import Economy
from ..model.validation import Model
from .capital_flows import (
    capital_coefficients_from_ratios,
    investment_matrix,
    stocks_from_investment,
)
from .employment import Employment, employment_table
from .layouts import LAYOUT_VERSION, LocatedTable, TableLayout, read_table
from .published import PublishedEconomy, PublishedTables, published_economy, read_published
from .skeleton import PlanSkeleton, plan_skeleton
from .supply_use import MODELS, SupplyUseTable, SymmetricTable
from .tables import write_coefficient_tables

__all__ = ["EconomySpec", "PublishedSpec", "BuildReport", "build_economy", "write_economy",
           "plan_skeleton_of",
           "economy_spec_schema", "SPEC_MAX_BYTES"]

SPEC_MAX_BYTES = 1 << 20
"""Largest economy spec read (1 MB)."""



def _written_as(value: Any) -> str:
    """Which member of a union the user wrote: a mapping or text (or a number).

    Validating only that member reports only its errors, not every member's.
    A mapping with a ``file`` key is a table layout, any other a mapping of values.
    """
    if isinstance(value, dict):
        return "layout" if "file" in value else "values"
    return "number" if isinstance(value, int | float) and not isinstance(value, bool) else "text"


def _table_kind(value: Any) -> str:
    return "layout" if isinstance(value, dict) else "text"


# the tags are no keys of the user's data, so error paths leave them out
Table = Annotated[Annotated[str, Tag("text")] | Annotated[TableLayout, Tag("layout")],
                  Discriminator(_table_kind)]
Values = Annotated[Annotated[dict[str, float], Tag("values")]
                   | Annotated[TableLayout, Tag("layout")] | Annotated[str, Tag("text")],
                   Discriminator(lambda v: "text" if _written_as(v) == "number"
                                 else _written_as(v))]
Concordance = Annotated[Annotated[dict[str, str], Tag("values")]
                        | Annotated[str, Tag("text")],
                        Discriminator(lambda v: "values" if isinstance(v, dict) else "text")]
Years = Annotated[float, Field(ge=1)]
ServiceLife = Annotated[Annotated[Years, Tag("number")]
                        | Annotated[dict[str, Years], Tag("values")],
                        Discriminator(lambda v: "values" if isinstance(v, dict) else "number")]


class EmploymentSpec(Model):
    """Where the employment table is and its unit (see :mod:`growthplan.statistics.employment`)."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    table: Table
    unit: str = Field(min_length=1)
    industries: Literal["rows", "columns"] = "rows"
    person_years_per_person: float | None = Field(default=None, gt=0, le=1.5)


class CapitalSection(Model):
    """Capital data: one source of stocks, and what every sector's capital spec needs."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    stocks: Table | None = None
    flows: Table | None = None
    investment: Values | None = None
    composition: Values | None = None
    capital_output_ratios: Values | None = None
    service_life: ServiceLife = 20.0  # mean years, one for all or by industry
    retirement: str = "geometric"
    lead_time: int = Field(default=1, ge=0, le=100)
    max_utilisation: float = Field(default=1.0, gt=0, le=1)
    past_growth: float = Field(default=0.0, gt=-1, lt=1)


class Aggregation(Model):
    """Concordances ``{old code: new code}`` (or a two-column CSV file of them)."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    products: Concordance | None = None
    industries: Concordance | None = None


class EconomySpec(Model):
    """An economy spec, layout version 1 (see the module notes)."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    layout_version: Literal[1]
    description: str | None = None
    value_unit: str = Field(min_length=1)
    supply: Table
    use: Table
    imports_columns: list[str] = Field(default_factory=lambda: ["imports"])
    value_added_rows: list[str] = Field(default_factory=lambda: ["value_added"])
    import_treatment: Literal["proportionality", "imports_use"] = "proportionality"
    imports_use: Table | None = None
    model: Literal["product_technology", "industry_technology", "fixed_industry_sales",
                   "fixed_product_sales"] = "industry_technology"
    negatives: Literal["raise", "zero", "industry_technology"] = "raise"
    tolerance: float = Field(default=0.005, ge=0, lt=1)
    consumption_column: str | None = None
    base_year: int | None = Field(default=None, ge=1000, le=9999)
    aggregation: Aggregation | None = None
    employment: EmploymentSpec | None = None
    capital: CapitalSection


class PublishedFiles(Model):
    """The supply and use tables as the office publishes them (CSV files)."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    supply: str = Field(min_length=1)
    use: str = Field(min_length=1)
    labels: str | None = Field(default=None, min_length=1)  # code, label: for code-only tables


class PublishedCapital(Model):
    """Capital of an economy built from published tables: one line is enough.

    Parameters
    ----------
    capital_output_ratio : float, optional
        Capital stock per unit of value added, for every industry.
    stocks : mapping or table, optional
        Capital stocks by industry (instead of the ratio).
    service_life : float, default 20
        Mean service life, years.
    past_growth : float, default 0
        Growth rate of investment before the base year.
    """

    model_config = ConfigDict(extra="forbid", frozen=True)

    capital_output_ratio: float | None = Field(default=None, gt=0, lt=100)
    stocks: Values | None = None
    service_life: Years = 20.0
    past_growth: float = Field(default=0.0, gt=-1, lt=1)


class PublishedLabour(Model):
    """Labour of an economy built from published tables.

    Parameters
    ----------
    wage : float, optional
        Average compensation per labour unit (value units): labour is
        compensation of employees divided by it.
    employment : mapping or table, optional
        Persons employed by industry (instead of the wage).
    unit : str, default "thousand person-years"
    kind : str, default "employees"
    """

    model_config = ConfigDict(extra="forbid", frozen=True)

    wage: float | None = Field(default=None, gt=0)
    employment: Values | None = None
    unit: str = Field(default="thousand person-years", min_length=1)
    kind: str = Field(default="employees", min_length=1)


class PublishedSpec(Model):
    """An economy spec for published tables (layout version 1, see the module notes).

    ``valuation`` is ``proportional`` (the default: proportional margins) or
    ``exact``, which needs ``margins`` (a margin table, laid out like the use
    table, for each margin product: ``{product: file}``) and may give
    ``taxes`` (taxes less subsidies on products, laid out likewise).
    """

    model_config = ConfigDict(extra="forbid", frozen=True)

    layout_version: Literal[1]
    description: str | None = None
    value_unit: str = Field(min_length=1)
    base_year: int | None = Field(default=None, ge=1000, le=9999)
    published: PublishedFiles
    valuation: Literal["proportional", "exact"] = "proportional"
    margins: dict[str, str] | None = None
    taxes: str | None = None
    negatives: Literal["byproduct", "net"] = "byproduct"
    model: Literal["product_technology", "industry_technology", "fixed_industry_sales",
                   "fixed_product_sales"] = "fixed_product_sales"
    consumption_column: str | None = None
    tolerance: float = Field(default=0.005, ge=0, lt=1)
    capital: PublishedCapital
    labour: PublishedLabour


def economy_spec_schema() -> dict[str, Any]:
    """The JSON Schema of economy spec files (layout version 1).

    A spec is one of two kinds: tables in the library's layouts
    (``supply``, ``use``, ...) or tables as an office publishes them
    (``published``).

    Returns
    -------
    dict
    """
    from pydantic import TypeAdapter

    schema = TypeAdapter(EconomySpec | PublishedSpec).json_schema()
    schema["title"] = "growthplan economy spec"
    schema["$comment"] = f"layout_version {LAYOUT_VERSION}"
    return schema


@dataclass(frozen=True)
class BuildReport:
    """What :func:`build_economy` did: the tables on the way and every assumption.

    Attributes
    ----------
    spec : EconomySpec
    supply_use : SupplyUseTable
        The supply and use tables (after aggregation).
    symmetric : SymmetricTable
        The symmetric table of domestic flows.
    capital_stocks : DataFrame
        Capital stock by product (rows) and sector (columns), base-year values.
    employment : Employment or None
    assumptions : list of str
        Every assumption applied, in words.
    checks : dict of str to float
        Totals checked on the way (``name: largest relative gap``).
    inputs : list of Path
        The files read.
    """

    spec: EconomySpec
    supply_use: SupplyUseTable
    symmetric: SymmetricTable
    capital_stocks: pd.DataFrame
    employment: Employment | None
    assumptions: list[str]
    checks: dict[str, float] = field(default_factory=dict)
    inputs: list[Path] = field(default_factory=list)

    @property
    def negatives(self) -> pd.DataFrame:
        """Negative flows the transformation model gave, before any remedy."""
        return self.symmetric.negatives

    def to_markdown(self, title: str = "Assumptions") -> str:
        """The assumptions and checks as a Markdown document."""
        lines = [f"# {title}", ""]
        if self.spec.description:
            lines += [self.spec.description, ""]
        lines += [f"- {a}" for a in self.assumptions]
        lines += ["", "## Checks", ""]
        lines += [f"- {k}: largest relative gap {v:.3g}" for k, v in self.checks.items()]
        neg = self.negatives
        if len(neg):
            lines += ["", "## Negative flows of the transformation model", "",
                      "| row | column | flow | coefficient |", "|---|---|---|---|"]
            lines += [f"| {r.row} | {r.column} | {r.flow:.6g} | {r.coefficient:.6g} |"
                      for r in neg.itertuples()]
        return "\n".join(lines) + "\n"


# -- reading the spec ---------------------------------------------------------------------

def _read_spec(path: Path) -> tuple[dict[str, Any], Any]:
    from ..io.planfile import _read

    return _read(path, what="economy spec", limit=SPEC_MAX_BYTES,
                 holds="a mapping (an economy spec)")


def _spec(path: Path) -> tuple[EconomySpec | PublishedSpec, Any]:
    from ..io.planfile import _located

    data, node = _read_spec(path)
    version = data.get("layout_version")
    if version != LAYOUT_VERSION:
        raise _located(invalid("layout_version", f"be {LAYOUT_VERSION} (the layout this "
                               "version of growthplan reads)", version), path, node, [])
    try:
        if "published" in data:
            return PublishedSpec.model_validate(data), node
        return EconomySpec.model_validate(data), node
    except InvalidInput as exc:
        raise _located(exc, path, node, []) from None


class _Files:
    """Table files relative to the spec, confined to its folder unless allowed."""

    def __init__(self, spec_path: Path, allow_outside: bool, node: Any = None) -> None:
        self.base = spec_path.parent
        self.spec_path = spec_path
        self.allow_outside = allow_outside
        self.node = node  # the spec's YAML nodes, for the line of a field
        self.read: list[Path] = [spec_path]

    def located(self, exc: InvalidInput) -> InvalidInput:
        """An error about a field of the spec, with the spec file and the field's line."""
        from ..io.planfile import _located

        return _located(exc, self.spec_path, self.node, [])

    def path(self, name: str, what: str) -> Path:
        if "\0" in name:
            raise invalid(f"{self.spec_path}: {what}", "be a file name", name)
        target = self.base / name
        if not self.allow_outside:
            base = self.base.resolve()
            resolved = target.resolve()
            if resolved != base and base not in resolved.parents:
                raise invalid(f"{self.spec_path}: {what}", "name a table in the spec's folder "
                              "or below it", name)
        if not target.exists():
            raise invalid(f"{self.spec_path}: {what}", "name an existing file (relative to "
                          "the spec)", name)
        self.read.append(target)
        return target

    def table(self, ref: Table, what: str) -> LocatedTable:
        lay = ref if isinstance(ref, TableLayout) else TableLayout(file=ref)
        target = self.path(lay.file, what)
        return read_table(lay.model_copy(update={"file": str(target)}), what=what)

    def values(self, ref: Values, what: str) -> pd.Series | pd.DataFrame:
        if isinstance(ref, dict):
            return pd.Series(ref, dtype=float)
        t = self.table(ref, what)
        return t.frame.iloc[:, 0].rename(None) if t.frame.shape[1] == 1 else t.frame

    def concordance(self, ref: dict[str, str] | str, what: str) -> dict[str, str]:
        if isinstance(ref, dict):
            return {str(k): str(v) for k, v in ref.items()}
        target = self.path(ref, what)
        raw = read_regular_file(target, what=what, limit=SPEC_MAX_BYTES)
        out: dict[str, str] = {}
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise invalid(f"{what} ({target.name})", "be UTF-8 text",
                          f"byte {exc.start}") from None
        for i, row in enumerate(csv.reader(io.StringIO(text, newline="")), start=1):
            cells = [c.strip() for c in row]
            if not any(cells) or i == 1:
                continue  # the header row, blank rows
            if len(cells) < 2 or not cells[0] or not cells[1]:
                raise invalid(f"{what} ({target.name}, row {i})", "hold an old code and a "
                              "new code", row)
            if cells[0] in out:
                raise invalid(f"{what} ({target.name}, row {i}, column A)", "map each code "
                              "once", cells[0])
            out[cells[0]] = cells[1]
        return out


def _spec_inputs(spec_path: str | os.PathLike[str]) -> list[Path]:
    """The spec and every table file it names, as written (for the command line to refuse
    an output folder holding any of them before the build)."""
    path = Path(spec_path)
    spec, _ = _spec(path)
    if isinstance(spec, PublishedSpec):
        pub = [spec.published.supply, spec.published.use, spec.published.labels,
               spec.capital.stocks,
               spec.labour.employment, spec.taxes, *(spec.margins or {}).values()]
        pnames = [r.file if isinstance(r, TableLayout) else r for r in pub]
        return [path] + [path.parent / n for n in pnames
                         if isinstance(n, str) and "\0" not in n]
    cap, agg = spec.capital, spec.aggregation
    refs: list[Any] = [spec.supply, spec.use, spec.imports_use, cap.stocks, cap.flows,
                       cap.investment, cap.composition, cap.capital_output_ratios]
    if spec.employment is not None:
        refs.append(spec.employment.table)
    if agg is not None:
        refs += [agg.products, agg.industries]
    names = [r.file if isinstance(r, TableLayout) else r for r in refs]
    return [path] + [path.parent / n for n in names if isinstance(n, str) and "\0" not in n]


# -- the build ------------------------------------------------------------------------------

def _split(supply: LocatedTable, use: LocatedTable, spec: EconomySpec
           ) -> tuple[list[str], list[str], list[str], list[str]]:
    """Products, industries, final-use categories and value-added rows, codes checked."""
    s, u = supply.frame, use.frame
    imp_cols = [c for c in s.columns if c in spec.imports_columns]
    industries = [c for c in s.columns if c not in imp_cols]
    products = list(s.index)
    if not industries:
        raise invalid(supply.where(), "have a column per industry besides the imports",
                      list(s.columns))
    for p in products:
        if p not in u.index:
            raise supply.error(p, None, f"be a row of the use table ({use.file}) too: every "
                               "product is supplied and used", p)
    for i in industries:
        if i not in u.columns:
            raise supply.error(None, i, f"be a column of the use table ({use.file}) too "
                               "(industries supply and use); imports columns are "
                               f"{spec.imports_columns}", i)
    va_rows = [r for r in u.index if r in spec.value_added_rows]
    for r in u.index:
        if r not in products and r not in va_rows:
            raise use.error(r, None, f"be a product of the supply table ({supply.file}) or "
                            f"one of value_added_rows {spec.value_added_rows}", r)
    final = [c for c in u.columns if c not in industries]
    for p in products:
        for j in industries + imp_cols:
            v = float(s.at[p, j])
            if v < 0:
                raise supply.error(p, j, "be >= 0 (supply cannot be negative)", v)
        for j in industries:
            v = float(u.at[p, j])
            if v < 0:
                raise use.error(p, j, "be >= 0 (intermediate use cannot be negative)", v)
    return products, industries, final, va_rows


def _sut(files: _Files, spec: EconomySpec, assumptions: list[str]
         ) -> tuple[SupplyUseTable, Employment | None, LocatedTable, LocatedTable]:
    supply = files.table(spec.supply, "supply")
    use = files.table(spec.use, "use")
    products, industries, final, va_rows = _split(supply, use, spec)
    s, u = supply.frame, use.frame
    imp_cols = [c for c in s.columns if c in spec.imports_columns]
    imports = s.loc[products, imp_cols].sum(axis=1) if imp_cols else None
    va = u.loc[va_rows, industries].sum(axis=0) if va_rows else None
    um = None
    if spec.import_treatment == "imports_use":
        if spec.imports_use is None:
            raise invalid("import_treatment", "come with an imports_use table", "imports_use")
        mt = files.table(spec.imports_use, "imports_use")
        for r in mt.frame.index:
            if r not in products:
                raise mt.error(r, None, "be a product of the supply table", r)
        for c in mt.frame.columns:
            if c not in industries:
                raise mt.error(None, c, "be an industry of the supply table", c)
        um = mt.frame.reindex(index=products, columns=industries).fillna(0.0)
        assumptions.append(f"Imports: the imported intermediate use table ({mt.file}) is "
                           "subtracted from the use table; the rest of each product's imports "
                           "is taken off its final uses at home in proportion to them.")
    else:
        if spec.imports_use is not None:
            raise invalid("imports_use", "come with import_treatment: imports_use",
                          "import_treatment: proportionality")
        assumptions.append("Imports: import proportionality — every user of a product at "
                           "home (industries and final uses other than exports) takes the "
                           "same share of imports in its use of that product; exports are "
                           "wholly domestic.")
    if not imp_cols:
        assumptions.append("Imports: the supply table has no imports column "
                           f"({spec.imports_columns}); all supply is domestic output.")
    emp = None
    if spec.employment is not None:
        et = files.table(spec.employment.table, "employment")
        emp = employment_table(et, unit=spec.employment.unit,
                               industries=spec.employment.industries,
                               person_years_per_person=spec.employment.person_years_per_person,
                               expected=industries)
        assumptions.append(f"Labour: {emp.assumption}; kinds {emp.kinds}; labour "
                           f"coefficients in {emp.unit} per {spec.value_unit} of output.")
    if va_rows:
        assumptions.append(f"Value added: the use table's rows {va_rows} summed.")
    else:
        assumptions.append("Value added: industry output less intermediate inputs (the use "
                           "table has no value-added row).")
    fd = u.loc[products, final]
    assumptions.append(f"Final uses: the use table's columns {final}.")
    try:
        sut = SupplyUseTable(u.loc[products, industries], supply=s.loc[products, industries],
                             final_demand=fd, value_added=va, imports=imports,
                             imports_use=um, labour=None if emp is None else emp.labour,
                             tolerance=spec.tolerance)
    except InvalidInput as exc:
        raise InvalidInput(f"supply and use tables ({supply.file}, {use.file}): {exc}",
                           field=exc.field) from None
    return sut, emp, supply, use


def _group(frame: pd.DataFrame, mapping: dict[str, str] | None, axis: int) -> pd.DataFrame:
    if mapping is None:
        return frame
    labels = frame.index if axis == 0 else frame.columns
    key = np.array([mapping[str(x)] for x in labels], dtype=object)
    new = list(dict.fromkeys(key))
    if axis == 0:
        return frame.groupby(key, sort=False).sum().loc[new]
    return frame.T.groupby(key, sort=False).sum().loc[new].T


def _capital_stocks(files: _Files, spec: EconomySpec, products: list[str],
                    industries: list[str], output: pd.Series, assumptions: list[str]
                    ) -> tuple[pd.DataFrame, pd.Series]:
    """Capital stock by product and industry (detailed codes), and service life by industry."""
    cap = spec.capital
    sources = [k for k in ("stocks", "flows", "investment", "capital_output_ratios")
               if getattr(cap, k) is not None]
    if len(sources) != 1:
        raise files.located(invalid("capital", "give one of stocks, flows, investment (with "
                                    "composition) and capital_output_ratios (with "
                                    "composition)", sources or None))
    source = sources[0]
    if source in ("investment", "capital_output_ratios") and cap.composition is None:
        raise files.located(invalid(f"capital.{source}", "come with capital.composition (the "
                                    "products investment is made of)", None))
    if source in ("stocks", "flows") and cap.composition is not None:
        raise files.located(invalid("capital.composition", f"not be given with "
                                    f"capital.{source} (the table holds the composition)",
                                    "composition"))
    if isinstance(cap.service_life, dict):
        life = pd.Series(cap.service_life, dtype=float)
        missing = [i for i in industries if i not in life.index]
        unknown = [i for i in life.index if i not in industries]
        if missing or unknown:
            raise files.located(invalid(
                "capital.service_life", f"give the life of every industry (missing "
                f"{missing[:5]}; unknown {unknown[:5]})", sorted(life.index)[:5]))
        life = life.loc[industries]
    else:
        life = pd.Series(float(cap.service_life), index=industries)

    def shares(comp: pd.Series | pd.DataFrame) -> pd.Series | pd.DataFrame:
        unknown = [str(r) for r in comp.index if str(r) not in products]
        if unknown:
            raise invalid("capital.composition", "name products of the supply table",
                          unknown[:5])
        return comp.reindex(products).fillna(0.0)  # products not invested in: zero

    def matrix(t: LocatedTable) -> pd.DataFrame:
        for r in t.frame.index:
            if r not in products:
                raise t.error(r, None, "be a product of the supply table", r)
        for c in t.frame.columns:
            if c not in industries:
                raise t.error(None, c, "be an industry of the supply table", c)
        arr = t.frame.to_numpy()
        if (arr < 0).any():
            i, j = np.argwhere(arr < 0)[0]
            raise t.error(str(t.frame.index[i]), str(t.frame.columns[j]), "be >= 0",
                          float(arr[i, j]))
        return t.frame.reindex(index=products, columns=industries).fillna(0.0)

    g = cap.past_growth
    steady = ("stocks estimated from one year's investment as the capital still in service "
              f"if investment had grown {100 * g:g} % a year before the base year and capital "
              "retired geometrically over its mean service life (the steady-state perpetual "
              "inventory)")
    if source == "stocks":
        stocks = matrix(files.table(cap.stocks, "capital.stocks"))  # type: ignore[arg-type]
        assumptions.append("Capital: the capital stock matrix as published (products × "
                           "industries, base-year values).")
    elif source == "flows":
        flows = matrix(files.table(cap.flows, "capital.flows"))  # type: ignore[arg-type]
        stocks = stocks_from_investment(flows, life, past_growth=g)
        assumptions.append(f"Capital: composition from the capital-flows table; {steady}.")
    elif source == "investment":
        inv = files.values(cap.investment, "capital.investment")  # type: ignore[arg-type]
        comp = shares(files.values(cap.composition,  # type: ignore[arg-type]
                                   "capital.composition"))
        flows = investment_matrix(inv, comp, products=products)
        flows = flows.reindex(columns=industries)
        if flows.isna().any().any():
            raise invalid("capital.investment", "give the investment of every industry",
                          [i for i in industries if flows[i].isna().any()][:5])
        stocks = stocks_from_investment(flows, life, past_growth=g)
        assumptions.append("Capital: investment by industry spread over products by the "
                           f"composition given (the same shares for every industry unless "
                           f"given by industry); {steady}.")
    else:
        ratios = files.values(cap.capital_output_ratios,  # type: ignore[arg-type]
                              "capital.capital_output_ratios")
        comp = shares(files.values(cap.composition,  # type: ignore[arg-type]
                                   "capital.composition"))
        b = capital_coefficients_from_ratios(ratios, comp, products=products)
        b = b.reindex(columns=industries)
        if b.isna().any().any():
            raise invalid("capital.capital_output_ratios", "give the ratio of every industry",
                          [i for i in industries if b[i].isna().any()][:5])
        stocks = b.mul(output.loc[industries], axis=1)
        assumptions.append("Capital: capital–output ratios by industry times industry output, "
                           "spread over products by the composition given (a sector's stock "
                           "has the product composition of its investment).")
    return stocks, life


def _build_published(spec: PublishedSpec, files: _Files) -> tuple[Economy, PublishedEconomy]:
    """The published-tables route of :func:`build_economy`."""
    labels = None if spec.published.labels is None else files.path(spec.published.labels,
                                                                   "published.labels")
    tables = PublishedTables.read(files.path(spec.published.supply, "published.supply"),
                                  files.path(spec.published.use, "published.use"),
                                  labels=labels, tolerance=spec.tolerance)
    margins = taxes = None
    if spec.valuation == "exact":
        if not spec.margins:
            raise files.located(invalid("margins", "be given for valuation: exact ({margin "
                                        "product: margin table file})", spec.margins))
        rename = {code: name for name, code in tables.codes.items()}

        def layer(name: str, what: str) -> pd.DataFrame:
            frame = read_published(files.path(name, what), what=what).frame.fillna(0.0)
            return frame.rename(columns=rename)

        margins = {p: layer(f, f"margins.{p}") for p, f in spec.margins.items()}
        taxes = None if spec.taxes is None else layer(spec.taxes, "taxes")
    elif spec.margins is not None or spec.taxes is not None:
        raise files.located(invalid("valuation", "be exact when margin or tax tables are "
                                    "given", spec.valuation))
    stocks = employment = None
    if spec.capital.stocks is not None:
        stocks = files.values(spec.capital.stocks, "capital.stocks")
    if spec.labour.employment is not None:
        employment = files.values(spec.labour.employment, "labour.employment")
    for what, value in (("capital.stocks", stocks), ("labour.employment", employment)):
        if isinstance(value, pd.DataFrame):
            raise invalid(what, "be one figure per industry", f"{value.shape[1]} columns")
    econ, report = published_economy(
        tables, value_unit=spec.value_unit, model=spec.model, valuation=spec.valuation,
        margins=margins, taxes=taxes,
        negatives=spec.negatives, capital_output_ratio=spec.capital.capital_output_ratio,
        capital_stocks=stocks, service_life=float(spec.capital.service_life),
        past_growth=spec.capital.past_growth, employment=employment,
        wage=spec.labour.wage, labour_unit=spec.labour.unit, labour_kind=spec.labour.kind,
        consumption_column=spec.consumption_column, tolerance=spec.tolerance)
    return econ, replace(report, spec=spec, inputs=list(dict.fromkeys(files.read)))


def build_economy(spec_path: str | os.PathLike[str], *, allow_outside: bool = False
                  ) -> tuple[Economy, BuildReport | PublishedEconomy]:
    """Read an economy spec and its tables into a validated :class:`~growthplan.Economy`.

    Parameters
    ----------
    spec_path : path
        A YAML or TOML economy spec (see the module notes).
    allow_outside : bool, default False
        Read tables outside the spec's folder.

    Returns
    -------
    economy : Economy
        Input, capital and labour coefficients of the symmetric table, capital
        of every sector, base-year output, units.
    report : BuildReport
        The tables on the way and every assumption applied.

    Raises
    ------
    InvalidInput
        One line naming the spec or table file and the place in it.
    """
    path = Path(spec_path)
    spec, node = _spec(path)
    files = _Files(path, allow_outside, node)
    if isinstance(spec, PublishedSpec):
        return _build_published(spec, files)
    assumptions: list[str] = [f"Values in {spec.value_unit}."]
    sut, emp, supply, use = _sut(files, spec, assumptions)
    products, industries = sut.products, sut.industries
    stocks, life = _capital_stocks(files, spec, products, industries, sut.industry_output,
                                   assumptions)
    checks: dict[str, float] = {}
    pmap = imap = None
    if spec.aggregation is not None:
        pmap = None if spec.aggregation.products is None else files.concordance(
            spec.aggregation.products, "aggregation.products")
        imap = None if spec.aggregation.industries is None else files.concordance(
            spec.aggregation.industries, "aggregation.industries")
        before = sut
        sut = sut.aggregate(products=pmap, industries=imap)
        for what, a, b in (("aggregation: supply", before.make, sut.make),
                           ("aggregation: use", before.use, sut.use),
                           ("aggregation: final uses", before.final_demand,
                            sut.final_demand)):
            ta, tb = float(a.to_numpy().sum()), float(b.to_numpy().sum())
            checks[what] = abs(ta - tb) / max(abs(ta), 1e-300)
        assumptions.append(f"Aggregation: {len(before.products)} products into "
                           f"{len(sut.products)}, {len(before.industries)} industries into "
                           f"{len(sut.industries)}; every table summed over the merged codes, "
                           "coefficients computed from the sums.")
        weight = stocks.sum(axis=0)
        life_w = _group((weight * life).to_frame("v"), imap, 0)["v"]
        stocks = _group(_group(stocks, pmap, 0), imap, 1)
        life = life_w / _group(weight.to_frame("v"), imap, 0)["v"]
        life = life.fillna(float(np.mean(np.asarray(list(
            spec.capital.service_life.values()) if isinstance(spec.capital.service_life, dict)
            else [spec.capital.service_life]))))
    try:
        sym = sut.symmetric(spec.model, negatives=spec.negatives)
    except InvalidInput as exc:
        raise InvalidInput(f"supply and use tables ({supply.file}, {use.file}): {exc}",
                           field=exc.field) from None
    model_words = {
        "product_technology": "product technology (each product is made with the same "
                              "inputs whichever industry makes it); product × product table",
        "industry_technology": "industry technology (each industry makes all its products "
                               "with the same inputs); product × product table",
        "fixed_industry_sales": "fixed industry sales structure (each industry's output is "
                                "sold in fixed shares); industry × industry table",
        "fixed_product_sales": "fixed product sales structure (each product is sold in the "
                               "same shares whichever industry makes it); industry × industry "
                               "table",
    }
    assumptions.append(f"Transformation model: {model_words[spec.model]} "
                       f"({MODELS.index(spec.model) + 1} of the four standard models).")
    neg = sym.negatives
    if len(neg):
        remedy = {"zero": "set to zero and the table rebalanced by RAS to the model's "
                          "intermediate totals",
                  "industry_technology": "their columns taken from the industry-technology "
                                         "table and the table rebalanced by RAS"}[spec.negatives]
        worst = neg.iloc[int(np.argmin(neg["flow"].to_numpy()))]
        assumptions.append(f"Negative flows: the model gave {len(neg)} negative flow(s) (the "
                           f"largest {worst['flow']:.6g} in row {worst['row']}, column "
                           f"{worst['column']}); remedy: {remedy}.")
    else:
        assumptions.append("Negative flows: none.")
    # capital into the table's sectors, like the use table
    t = sut.transformation(spec.model).to_numpy()
    if spec.model in ("product_technology", "industry_technology"):
        k = pd.DataFrame(stocks.to_numpy() @ t, index=stocks.index, columns=sym.names)
        w = (stocks.sum(axis=0) * life).to_numpy() @ t
    else:
        k = pd.DataFrame(t @ stocks.to_numpy(), index=sut.industries, columns=stocks.columns)
        k = k[sym.names]
        w = (stocks.sum(axis=0) * life).to_numpy()
    ksum = k.sum(axis=0).to_numpy()
    with np.errstate(divide="ignore", invalid="ignore"):
        life_s = np.where(ksum > 0, w / np.where(ksum > 0, ksum, 1.0), float(life.mean()))
    checks["capital: stock kept by the transformation"] = abs(
        float(k.to_numpy().sum()) - float(stocks.to_numpy().sum())) / max(
        float(stocks.to_numpy().sum()), 1e-300)
    if spec.model in ("product_technology", "industry_technology"):
        assumptions.append("Capital by sector: each industry's capital stock shared over its "
                           "products like its inputs (the transformation matrix T); capital "
                           "goods imported or made at home alike.")
    cap = spec.capital
    x = sym.gross_output
    capacity = x / cap.max_utilisation
    b = k.reindex(index=sym.names).fillna(0.0).div(capacity, axis=1)
    capital: dict[str, Any] = {}
    for j, name in enumerate(sym.names):
        capital[name] = {"initial_capacity": float(capacity[name]),
                         "mean_service_life": float(max(life_s[j], 1.0)),
                         "retirement": cap.retirement, "lead_time": cap.lead_time,
                         "max_utilisation": cap.max_utilisation,
                         "past_growth": cap.past_growth}
    full = ("its base-year output, capacity being fully used in the base year"
            if cap.max_utilisation == 1 else
            f"its base-year output divided by {100 * cap.max_utilisation:g} %, the largest "
            "share of capacity that can be used")
    assumptions.append(f"Capital of each sector: its capacity is {full}; capital retires "
                       f"by the {cap.retirement.replace('_', ' ')} profile, new capacity "
                       f"takes {cap.lead_time} year(s) to build, and the service life is the "
                       "mean of its industries' lives weighted by their capital.")
    kwargs: dict[str, Any] = {"value_unit": spec.value_unit}
    if emp is not None:
        kwargs["labour_units"] = [emp.unit] * len(emp.kinds)
    if spec.consumption_column is not None:
        if spec.consumption_column not in sym.final_demand.columns:
            raise invalid("consumption_column", f"be a final-use column of the use table "
                          f"{list(sym.final_demand.columns)}", spec.consumption_column)
        basket = sym.final_demand[spec.consumption_column].clip(lower=0.0)
        if not basket.sum() > 0:
            raise invalid("consumption_column", "hold some domestic consumption",
                          spec.consumption_column)
        kwargs["consumption_basket"] = (basket / basket.sum()).to_numpy()
        assumptions.append(f"Consumption basket: the domestic part of the final-use column "
                           f"'{spec.consumption_column}' as shares: one unit of the plan's "
                           f"consumption level is a basket worth 1 {spec.value_unit}.")
    try:
        econ = sym.to_economy(capital=capital, capital_coefficients=b, **kwargs)
    except InvalidInput as exc:
        raise InvalidInput(f"the economy built from {path.name}: {exc}",
                           field=exc.field) from None
    table = sym.to_table()
    gap = table.balance_gap()
    if gap is not None:
        checks["symmetric table: rows balance at gross output"] = float(
            (gap.abs() / x).max())
    report = BuildReport(spec=spec, supply_use=sut, symmetric=sym, capital_stocks=k,
                         employment=emp, assumptions=assumptions, checks=checks,
                         inputs=list(dict.fromkeys(files.read)))
    return econ, report


def economy_section(econ: Economy, files: dict[str, str]) -> dict[str, Any]:
    """The ``economy`` section of a plan file that reads the written tables."""
    out: dict[str, Any] = dict(files)
    out["value_unit"] = econ.value_unit
    if econ.labour_units is not None:
        out["labour_units"] = list(econ.labour_units)
    if econ.labour_coefficients is not None:
        out["labour_kinds"] = [str(k) for k in econ.labour_kinds or []]
    if econ.base_output is not None:
        out["base_output"] = {n: float(v) for n, v in zip(econ.names, econ.base_output,
                                                          strict=True)}
    if econ.consumption_basket is not None:
        out["consumption_basket"] = {n: float(v) for n, v in zip(
            econ.names, econ.consumption_basket, strict=True) if v != 0}
    return out


def plan_skeleton_of(econ: Economy, report: BuildReport | PublishedEconomy, *,
                     years: int = 30) -> PlanSkeleton:
    """The plan skeleton of a built economy (see :mod:`growthplan.statistics.skeleton`).

    Government's and foreign demand are the final uses other than household
    consumption, fixed investment and inventories, by sector; the base year
    is the spec's ``base_year``.

    Parameters
    ----------
    econ : Economy
    report : BuildReport or PublishedEconomy
    years : int, default 30

    Returns
    -------
    PlanSkeleton
    """
    base_year = report.spec.base_year if report.spec is not None else None
    if base_year is None:
        raise invalid("base_year", "be given in the economy spec for a plan (the year of the "
                      "tables)", None)
    if isinstance(report, PublishedEconomy):
        other = report.other_demand().to_numpy()
        base_c: float | None = report.base_consumption()
    else:
        f = report.symmetric.final_demand
        cons = report.spec.consumption_column
        words = ("gfcf", "investment", "capital formation", "inventor", "stocks")
        cols = [c for c in f.columns if c != cons and not any(w in c.lower() for w in words)]
        other = f[cols].sum(axis=1).to_numpy()
        base_c = None if cons is None else float(f[cons].clip(lower=0.0).sum())
    return plan_skeleton(econ, base_year=base_year, years=years, other_demand=other,
                         base_consumption=base_c)


def write_economy(econ: Economy, report: BuildReport | PublishedEconomy,
                  folder: str | os.PathLike[str], *, overwrite: bool = False,
                  skeleton: PlanSkeleton | None = None) -> list[Path]:
    """Write the economy's coefficient tables, ``economy.yaml`` and ``assumptions.md``.

    The folder appears whole or not at all (:func:`~growthplan.io.atomic_folder`);
    an existing folder is written into only with ``overwrite=True``, and then
    only files the library wrote there are replaced.

    ``economy.yaml`` holds the ``economy`` section of a plan file in that
    folder (the tables, units, labour kinds, base-year output, consumption
    basket); with a ``skeleton``, ``plan.yaml`` is a whole plan file (that
    section, the skeleton's plan section) and its assumptions join
    ``assumptions.md``.

    Parameters
    ----------
    econ : Economy
    report : BuildReport or PublishedEconomy
    folder : path
    overwrite : bool, default False
    skeleton : PlanSkeleton, optional

    Returns
    -------
    list of Path
        The files written.
    """
    target = Path(folder)
    with atomic_folder(target, overwrite=overwrite, protect=report.inputs,
                       kind="economy") as tmp:
        files = write_coefficient_tables(econ, tmp)
        section = economy_section(econ, files)
        header = ("# The economy built by growthplan from the supply and use tables (see "
                  "assumptions.md).\n# A plan file in this folder reads it with this "
                  "economy section and a plan section.\n")
        (tmp / "economy.yaml").write_text(header + yaml.safe_dump(
            {"economy": section}, sort_keys=False, allow_unicode=True), encoding="utf-8")
        text = report.to_markdown()
        if skeleton is not None:
            text += "\n## The plan skeleton (plan.yaml)\n\n" + "".join(
                f"- {a}\n" for a in skeleton.assumptions)
            (tmp / "plan.yaml").write_text(
                "# A first plan of the economy built by growthplan (see assumptions.md): "
                "edit it, then\n# growthplan solve plan.yaml\n" + yaml.safe_dump(
                    {"economy": section, "plan": skeleton.section, "solve": {"method": "auto"}},
                    sort_keys=False, allow_unicode=True), encoding="utf-8")
        (tmp / "assumptions.md").write_text(text, encoding="utf-8")
        names = sorted(p.name for p in tmp.iterdir() if not p.name.startswith("."))
    return [target / n for n in names]
