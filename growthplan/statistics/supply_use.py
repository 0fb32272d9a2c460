"""Supply and use tables, and their transformation into symmetric input–output tables.

Statistical offices publish supply and use tables: which industry makes which
products, and which products each industry and final demand use. A plan
needs a symmetric table (products × products or industries × industries);
this module builds it by one of the four standard transformation models
(Eurostat, *Manual of Supply, Use and Input-Output Tables*, 2008, ch. 11;
Miller & Blair, *Input-Output Analysis*, 2nd ed., 2009, ch. 5).

Notation (Miller & Blair)
-------------------------
``V``  make matrix, **industries × products**: ``v_ij`` is the output of
       product ``j`` by industry ``i`` (the transpose of the supply table as
       most offices print it; pass that as ``supply=``).
``U``  use matrix, products × industries (intermediate use).
``g = V i`` industry output, ``q = V' i`` product output.
``B = U ĝ⁻¹`` input coefficients of industries; ``D = V q̂⁻¹`` market shares;
``C = V' ĝ⁻¹`` product mix of industries.

The four models
---------------
========================== ============= ================= ======================
model                      table         coefficients      flows
========================== ============= ================= ======================
``product_technology``     product       ``A = B C⁻¹``     ``Z = U V'⁻¹ q̂``
``industry_technology``    product       ``A = B D``       ``Z = U ĝ⁻¹ V``
``fixed_industry_sales``   industry      ``A = ĝ V'⁻¹ B``  ``Z = ĝ V'⁻¹ U``
``fixed_product_sales``    industry      ``A = D B``       ``Z = V q̂⁻¹ U``
========================== ============= ================= ======================

Product × product tables turn the columns of the use table from industries
into products, ``Z = U T`` (value added, imported inputs and labour by
industry turn likewise, ``w' T``); industry × industry tables turn its rows
from products into industries, ``Z = S U`` (final demand too, ``S F``). The
product technology (each product is made with the same inputs wherever it is
made) and the fixed industry sales structure need as many products as
industries and an invertible ``V``, and may give negative flows; the other
two never do. When ``V`` is diagonal every model gives back ``U``.

Imports
-------
The use table holds domestic and imported products alike: the balance of a
product is ``U i + F i = q + m`` (``m`` imports by product). The plan needs
domestic flows. Either an imports use table ``U_m`` (products × industries)
is given and subtracted, the rest of each product's imports going to final
demand in proportion to it; or the *import proportionality* assumption is
used: every user of a product takes the same share of imports,
``m_k / (total use of k less exports)`` (a final-demand column named
``exports`` is taken as wholly domestic). Imported inputs by industry are
then a row beside value added, turned like it.

Aggregation
-----------
:meth:`SupplyUseTable.aggregate` merges products and industries by
concordances before the transformation: every table is summed over the
merged codes and its grand total checked to be kept.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
import pandas as pd

from ..errors import InvalidInput, invalid
from ..model.economy import Economy
from .balancing import ras
from .tables import TransactionsTable, _numeric

__all__ = ["SupplyUseTable", "SymmetricTable", "MODELS"]

Model = Literal["product_technology", "industry_technology", "fixed_industry_sales",
                "fixed_product_sales"]
MODELS: tuple[str, ...] = ("product_technology", "industry_technology",
                           "fixed_industry_sales", "fixed_product_sales")
"""The four transformation models, in Eurostat's order A, B, C, D."""
Remedy = Literal["raise", "zero", "industry_technology"]
_PRODUCT_MODELS = ("product_technology", "industry_technology")
_SQUARE_MODELS = ("product_technology", "fixed_industry_sales")
EXPORTS = "exports"


def _labels(x: Any) -> list[str]:
    return [str(v) for v in x]


def _frame(value: Any, what: str, rows: list[str] | None, cols: list[str] | None,
           row_axis: str, col_axis: str) -> pd.DataFrame:
    """A numeric table, reordered to the given labels when they are known."""
    if not isinstance(value, pd.DataFrame):
        arr = np.asarray(value, dtype=object)
        if arr.ndim != 2:
            raise invalid(what, "be a two-dimensional table", f"shape {arr.shape}")
        if rows is None or cols is None:
            raise invalid(what, f"be a labelled DataFrame ({row_axis} × {col_axis})",
                          type(value).__name__)
        if arr.shape != (len(rows), len(cols)):
            raise invalid(what, f"be a labelled DataFrame or have shape "
                          f"({len(rows)}, {len(cols)}) ({row_axis} × {col_axis})",
                          f"shape {arr.shape}")
        value = pd.DataFrame(arr, index=rows, columns=cols)
    frame = value.copy()
    frame.index, frame.columns = _labels(frame.index), _labels(frame.columns)
    for axis, labels in (("row", list(frame.index)), ("column", list(frame.columns))):
        dup = sorted({x for x in labels if labels.count(x) > 1})
        if dup:
            raise invalid(what, f"have each {axis} label once", dup)
    frame = _numeric(frame, what).fillna(0.0)
    for axis_name, have, want in ((row_axis, list(frame.index), rows),
                                  (col_axis, list(frame.columns), cols)):
        if want is None:
            continue
        missing = [n for n in want if n not in have]
        unknown = [n for n in have if n not in want]
        if missing or unknown:
            raise invalid(what, f"have the {axis_name} of the make matrix as labels "
                          f"(missing {missing}; unknown {unknown})", have)
    if rows is not None:
        frame = frame.loc[rows]
    if cols is not None:
        frame = frame[cols]
    bad = ~np.isfinite(frame.to_numpy())
    if bad.any():
        i, j = np.argwhere(bad)[0]
        raise invalid(f"{what}[{frame.index[i]}, {frame.columns[j]}]", "be finite",
                      frame.iat[i, j])
    return frame


def _series(value: Any, what: str, names: list[str], axis: str) -> pd.Series:
    if isinstance(value, pd.DataFrame) and value.shape[1] == 1:
        value = value.iloc[:, 0]
    if not isinstance(value, pd.Series):
        arr = np.asarray(value, dtype=object).ravel()
        if arr.size != len(names):
            raise invalid(what, f"have one entry per label ({len(names)})", f"{arr.size} entries")
        value = pd.Series(list(arr), index=names)
    value = value.copy()
    value.index = _labels(value.index)
    frame = _frame(value.to_frame("v"), what, names, ["v"], axis, "values")
    return frame["v"].rename(None)


def _concordance(mapping: dict[str, str] | None, codes: list[str], what: str
                 ) -> dict[str, str]:
    if mapping is None:
        return {c: c for c in codes}
    if not isinstance(mapping, dict):
        raise invalid(what, "be a mapping {old code: new code}", type(mapping).__name__)
    mapping = {str(k): str(v).strip() for k, v in mapping.items()}
    missing = [c for c in codes if c not in mapping]
    unknown = [c for c in mapping if c not in codes]
    if missing or unknown:
        raise invalid(what, f"map every code once (missing {missing[:5]}; unknown "
                      f"{unknown[:5]})", sorted(mapping)[:5])
    empty = [k for k, v in mapping.items() if not v]
    if empty:
        raise invalid(f"{what}[{empty[0]}]", "be a non-empty new code", "")
    return mapping


def _negative_table(z: pd.DataFrame, x: pd.Series) -> pd.DataFrame:
    cells = np.argwhere(z.to_numpy() < 0)
    rows = [{"row": z.index[i], "column": z.columns[j],
             "flow": float(z.iat[i, j]), "coefficient": float(z.iat[i, j] / x.iloc[j])}
            for i, j in cells]
    return pd.DataFrame(rows, columns=["row", "column", "flow", "coefficient"])


class SupplyUseTable:
    """Supply and use tables of one year, checked for consistency.

    Parameters
    ----------
    use : DataFrame, products × industries
        Intermediate use ``U`` at purchasers' or basic prices, domestic and
        imported products together (unless ``imports`` is zero).
    make : DataFrame, industries × products, optional
        The make matrix ``V``. Give this or ``supply``.
    supply : DataFrame, products × industries, optional
        The supply table of domestic output (``V'``), as offices print it.
    final_demand : Series or DataFrame, products × categories
        Final uses by product (households, government, investment, exports,
        …); a column named ``exports`` is taken as wholly domestic.
    value_added : Series by industry, optional
        Default: industry output less intermediate inputs.
    imports : Series by product, optional
        Imports of each product (default none).
    imports_use : DataFrame, products × industries, optional
        The imported part of ``U``. Without it the import proportionality
        assumption gives the domestic flows.
    labour : Series or DataFrame (kinds × industries), optional
        Labour input by industry, turned like value added.
    tolerance : float, default 0.005
        Largest gap, as a share of the total, between a product's supply
        (output plus imports) and its uses, and between an industry's output
        and its inputs plus value added (published tables are rounded).

    Raises
    ------
    InvalidInput
        Naming the table, the row, the column and the value: labels that do
        not match, negative supply or use, a product or industry with no
        output, totals that do not add up within ``tolerance``.
    """

    def __init__(self, use: Any, *, make: Any = None, supply: Any = None,
                 final_demand: Any = None, value_added: Any = None, imports: Any = None,
                 imports_use: Any = None, labour: Any = None,
                 tolerance: float = 0.005) -> None:
        if (make is None) == (supply is None):
            raise invalid("make", "be given, or supply, but not both",
                          "both" if make is not None else "neither")
        if isinstance(tolerance, bool) or not isinstance(tolerance, int | float) \
                or not 0 <= tolerance < 1:
            raise invalid("tolerance", "be a share in [0, 1)", tolerance)
        self.tolerance = float(tolerance)
        if supply is not None:
            sup = _frame(supply, "supply", None, None, "products", "industries")
            self.make = sup.T
        else:
            self.make = _frame(make, "make", None, None, "industries", "products")
        self.industries: list[str] = list(self.make.index)
        self.products: list[str] = list(self.make.columns)
        what_v = "supply" if supply is not None else "make"
        v = self.make.to_numpy()
        if (v < 0).any():
            i, j = np.argwhere(v < 0)[0]
            raise invalid(f"{what_v}[{self._cell(what_v, i, j)}]", "be >= 0 (no negative "
                          "supply)", float(v[i, j]))
        self.use = _frame(use, "use", self.products, self.industries, "products",
                          "industries")
        self._no_negatives(self.use, "use")
        if final_demand is None:
            raise invalid("final_demand", "be given (products × final-use categories)", None)
        if isinstance(final_demand, pd.Series) or np.asarray(final_demand).ndim == 1:
            fd = _series(final_demand, "final_demand", self.products,
                         "products").to_frame("final_demand")
        else:
            fd = _frame(final_demand, "final_demand", self.products, None, "products",
                        "categories")
        self.final_demand = fd
        self.imports = (pd.Series(0.0, index=self.products) if imports is None
                        else _series(imports, "imports", self.products, "products"))
        self._no_negatives(self.imports.to_frame("imports"), "imports")
        self.imports_use = None if imports_use is None else _frame(
            imports_use, "imports_use", self.products, self.industries, "products",
            "industries")
        if self.imports_use is not None:
            self._no_negatives(self.imports_use, "imports_use")
        self.labour: pd.DataFrame | None = None
        if labour is not None:
            if isinstance(labour, pd.DataFrame):
                self.labour = _frame(labour, "labour", None, self.industries, "kinds",
                                     "industries")
            else:
                lab = _series(labour, "labour", self.industries, "industries")
                name = labour.name if isinstance(labour, pd.Series) and isinstance(
                    labour.name, str) and labour.name else "labour"
                self.labour = lab.to_frame(name).T
            self._no_negatives(self.labour, "labour")
        zero_g = [n for n, x in self.industry_output.items() if not x > 0]
        if zero_g:
            raise invalid(f"{what_v}[{zero_g[0]}]", "show output > 0 for every industry "
                          "(coefficients divide by it; drop or merge empty industries)", 0.0)
        zero_q = [n for n, x in self.product_output.items() if not x > 0]
        if zero_q:
            raise invalid(f"{what_v}[{zero_q[0]}]", "show domestic output > 0 for every "
                          "product (drop or merge products that are only imported)", 0.0)
        inputs = self.use.sum(axis=0)
        if value_added is None:
            self.value_added = (self.industry_output - inputs).rename(None)
        else:
            self.value_added = _series(value_added, "value_added", self.industries,
                                       "industries")
        self._check_totals()

    def _cell(self, what: str, i: int, j: int) -> str:
        ind, prod = self.make.index[i], self.make.columns[j]
        return f"{prod}, {ind}" if what == "supply" else f"{ind}, {prod}"

    @staticmethod
    def _no_negatives(frame: pd.DataFrame, what: str) -> None:
        arr = frame.to_numpy()
        if (arr < 0).any():
            i, j = np.argwhere(arr < 0)[0]
            where = f"{frame.index[i]}, {frame.columns[j]}" if frame.shape[1] > 1 \
                else f"{frame.index[i]}"
            raise invalid(f"{what}[{where}]", "be >= 0", float(arr[i, j]))

    def _check_totals(self) -> None:
        tol = self.tolerance
        q, m = self.product_output, self.imports
        uses = self.use.sum(axis=1) + self.final_demand.sum(axis=1)
        supply = q + m
        off = [p for p in self.products if abs(uses[p] - supply[p]) > tol * supply[p]]
        if off:
            p = off[0]
            raise invalid(f"use[{p}]", f"balance supply: intermediate and final uses of {p} "
                          f"equal its output plus imports within {100 * tol:g} % "
                          f"({len(off)} product(s) break this)",
                          f"uses {uses[p]:.6g} against supply {supply[p]:.6g}")
        g = self.industry_output
        cost = self.use.sum(axis=0) + self.value_added
        off = [n for n in self.industries if abs(cost[n] - g[n]) > tol * g[n]]
        if off:
            n = off[0]
            raise invalid(f"value_added[{n}]", f"make inputs plus value added of {n} equal its "
                          f"output within {100 * tol:g} % ({len(off)} industry(ies) break this)",
                          f"inputs {self.use[n].sum():.6g} + value added "
                          f"{self.value_added[n]:.6g} against output {g[n]:.6g}")
        neg = [n for n in self.industries if self.value_added[n] < 0]
        if neg:
            raise invalid(f"value_added[{neg[0]}]", "be >= 0 (inputs above output)",
                          float(self.value_added[neg[0]]))
        if self.imports_use is not None:
            over = self.imports_use.sum(axis=1) - self.imports
            bad = [p for p in self.products if over[p] > tol * max(self.imports[p], q[p])]
            if bad:
                p = bad[0]
                raise invalid(f"imports_use[{p}]", f"use at most the imports of {p}",
                              f"imported intermediate use {self.imports_use.loc[p].sum():.6g} "
                              f"against imports {self.imports[p]:.6g}")
            above = self.imports_use.to_numpy() > self.use.to_numpy() * (1 + tol)
            if above.any():
                i, j = np.argwhere(above)[0]
                raise invalid(f"imports_use[{self.products[i]}, {self.industries[j]}]",
                              "be at most the total use in that cell",
                              f"{self.imports_use.iat[i, j]:.6g} against "
                              f"{self.use.iat[i, j]:.6g}")

    # -- aggregation ------------------------------------------------------------------
    def aggregate(self, products: dict[str, str] | None = None,
                  industries: dict[str, str] | None = None) -> SupplyUseTable:
        """Merge products and industries by concordances ``{old code: new code}``.

        Every table is summed over the merged codes (supply, use, imports,
        imported use, final demand, value added, labour); coefficients are
        computed afterwards from the sums, never averaged. The grand totals of
        every table are checked to be kept.

        Parameters
        ----------
        products, industries : dict of str to str, optional
            The new code of every old code (each old code once); default keep
            them. New codes keep the order of their first old code.

        Returns
        -------
        SupplyUseTable

        Raises
        ------
        InvalidInput
            A mapping that leaves a code out or names an unknown one.
        """
        pmap = _concordance(products, self.products, "products")
        imap = _concordance(industries, self.industries, "industries")
        pkey = np.array([pmap[p] for p in self.products], dtype=object)
        ikey = np.array([imap[i] for i in self.industries], dtype=object)
        pnew = list(dict.fromkeys(pkey))
        inew = list(dict.fromkeys(ikey))

        def rows(frame: pd.DataFrame, key: np.ndarray, new: list[str]) -> pd.DataFrame:
            return frame.groupby(key, sort=False).sum().loc[new]

        def cols(frame: pd.DataFrame, key: np.ndarray, new: list[str]) -> pd.DataFrame:
            return rows(frame.T, key, new).T

        make = cols(rows(self.make, ikey, inew), pkey, pnew)
        use = cols(rows(self.use, pkey, pnew), ikey, inew)
        out = SupplyUseTable(
            use, make=make, final_demand=rows(self.final_demand, pkey, pnew),
            value_added=rows(self.value_added.to_frame("v"), ikey, inew)["v"],
            imports=rows(self.imports.to_frame("v"), pkey, pnew)["v"],
            imports_use=None if self.imports_use is None else cols(
                rows(self.imports_use, pkey, pnew), ikey, inew),
            labour=None if self.labour is None else cols(self.labour, ikey, inew),
            tolerance=self.tolerance)
        for what, before, after in (
                ("make", self.make, out.make), ("use", self.use, out.use),
                ("final_demand", self.final_demand, out.final_demand),
                ("imports", self.imports, out.imports),
                ("value_added", self.value_added, out.value_added),
                ("labour", self.labour, out.labour),
                ("imports_use", self.imports_use, out.imports_use)):
            if before is None or after is None:
                continue
            a, b = float(np.sum(before.to_numpy())), float(np.sum(after.to_numpy()))
            if abs(a - b) > 1e-9 * max(abs(a), 1.0):  # a guard: sums must be kept
                raise invalid(f"aggregate.{what}", "keep the grand total",
                              f"{b:.12g} against {a:.12g}")
        return out

    # -- totals and coefficients (Miller & Blair ch. 5) ------------------------
    @property
    def industry_output(self) -> pd.Series:
        """``g = V i``, output of each industry."""
        return self.make.sum(axis=1)

    @property
    def product_output(self) -> pd.Series:
        """``q = V' i``, domestic output of each product."""
        return self.make.sum(axis=0)

    def input_coefficients(self) -> pd.DataFrame:
        """``B = U ĝ⁻¹``, products × industries (total use, domestic and imported)."""
        return self.use.div(self.industry_output, axis=1)

    def market_shares(self) -> pd.DataFrame:
        """``D = V q̂⁻¹``, industries × products: each industry's share of a product."""
        return self.make.div(self.product_output, axis=1)

    def product_mix(self) -> pd.DataFrame:
        """``C = V' ĝ⁻¹``, products × industries: each industry's output by product."""
        return self.make.T.div(self.industry_output, axis=1)

    # -- domestic flows ---------------------------------------------------------
    def domestic(self) -> tuple[pd.DataFrame, pd.DataFrame, pd.Series]:
        """Domestic intermediate use, domestic final demand, imported inputs by industry.

        With ``imports_use``: ``U − U_m``, and the rest of each product's
        imports taken off its final uses other than exports, in proportion.
        Otherwise import proportionality (see the module notes).

        Returns
        -------
        use : DataFrame, products × industries
        final_demand : DataFrame, products × categories
        imported_inputs : Series by industry
        """
        f = self.final_demand
        home = [c for c in f.columns if c.lower() != EXPORTS]
        f_home = f[home].sum(axis=1)
        m = self.imports
        if self.imports_use is not None:
            um = self.imports_use
            rest = (m - um.sum(axis=1)).clip(lower=0.0)
        else:
            total = self.use.sum(axis=1) + f_home
            share = (m / total.where(total > 0, 1.0)).where(total > 0, 0.0)
            over = share[share > 1 + self.tolerance]
            if len(over):
                p = over.index[0]
                raise invalid(f"imports[{p}]", "be at most the use of the product at home "
                              "(intermediate and final uses other than exports)",
                              f"imports {m[p]:.6g} against use {total[p]:.6g}")
            share = share.clip(upper=1.0)
            um = self.use.mul(share, axis=0)
            rest = f_home * share
        fd = f.copy()
        if home:
            # shares of the home final uses; their sum may be negative (inventories)
            weights = f[home].div(f_home.where(f_home != 0, 1.0), axis=0)
            # magnitudes: home final uses may be negative (inventories drawn down)
            short = rest.abs() > f_home.abs() * (1 + self.tolerance) + 1e-12
            if short.any():
                p = rest.index[short.to_numpy()][0]
                raise invalid(f"imports[{p}]", "be covered by intermediate and final uses at "
                              "home", f"final imports {rest[p]:.6g} against final uses "
                              f"{f_home[p]:.6g}")
            fd[home] = f[home] - weights.mul(rest, axis=0)
        return self.use - um, fd, um.sum(axis=0)

    # -- transformation -----------------------------------------------------------
    def _transforms(self, model: str) -> tuple[np.ndarray, str]:
        """``T`` (industries → products, for columns) or ``S`` (products → industries)."""
        v = self.make.to_numpy()
        g, q = v.sum(axis=1), v.sum(axis=0)
        if model in _SQUARE_MODELS:
            if v.shape[0] != v.shape[1]:
                raise invalid("model", f"be 'industry_technology' or 'fixed_product_sales' "
                              f"when products and industries differ in number ({model} needs "
                              "a square make matrix)", f"{v.shape[1]} products, "
                              f"{v.shape[0]} industries")
            cond = np.linalg.cond(v)
            if not np.isfinite(cond) or cond > 1e12:
                raise invalid("make", f"be invertible for the {model} model (some industries "
                              "make products in the same proportions)",
                              f"condition number {cond:.3g}")
        if model == "product_technology":
            return np.linalg.solve(v.T, np.diag(q)), "columns"  # V'⁻¹ q̂
        if model == "industry_technology":
            return v / g[:, None], "columns"  # ĝ⁻¹ V
        if model == "fixed_industry_sales":
            return g[:, None] * np.linalg.inv(v.T), "rows"  # ĝ V'⁻¹
        if model == "fixed_product_sales":
            return v / q[None, :], "rows"  # V q̂⁻¹
        raise invalid("model", f"be one of {list(MODELS)}", model)

    def transformation(self, model: Model) -> pd.DataFrame:
        """The matrix that turns the use table into the symmetric one.

        For product tables ``T`` with ``Z = U T``; for industry tables ``S``
        with ``Z = S U``. Both are industries × products.

        Returns
        -------
        DataFrame, industries × products
        """
        t, _ = self._transforms(model)
        return pd.DataFrame(t, index=self.industries, columns=self.products)

    def negative_cells(self, model: Model = "product_technology") -> pd.DataFrame:
        """Negative flows of the symmetric table of ``model``, cell by cell.

        Returns
        -------
        DataFrame
            Columns ``row``, ``column``, ``flow``, ``coefficient`` (empty when
            there are none).
        """
        z, _, _, _, x, _ = self._raw(model)
        return _negative_table(z, x)

    def _raw(self, model: str) -> tuple[pd.DataFrame, pd.DataFrame, pd.Series, pd.Series,
                                         pd.Series, pd.DataFrame | None]:
        t, side = self._transforms(model)
        u, f, imported = self.domestic()
        va = self.value_added
        lab = self.labour
        if side == "columns":
            names = self.products
            z = pd.DataFrame(u.to_numpy() @ t, index=names, columns=names)
            va_out = pd.Series(va.to_numpy() @ t, index=names)
            imp_out = pd.Series(imported.to_numpy() @ t, index=names)
            lab_out = None if lab is None else pd.DataFrame(lab.to_numpy() @ t,
                                                            index=lab.index, columns=names)
            x = self.product_output.copy()
            f_out = f.copy()
        else:
            names = self.industries
            z = pd.DataFrame(t @ u.to_numpy(), index=names, columns=names)
            f_out = pd.DataFrame(t @ f.to_numpy(), index=names, columns=f.columns)
            va_out, imp_out, lab_out = va.copy(), imported.copy(), lab
            x = self.industry_output.copy()
        return z, f_out, va_out, imp_out, x, lab_out

    def symmetric(self, model: Model = "industry_technology", *,
                  negatives: Remedy = "raise") -> SymmetricTable:
        """The symmetric input–output table of domestic flows by ``model``.

        Parameters
        ----------
        model : str
            One of :data:`MODELS` (see the module notes).
        negatives : {"raise", "zero", "industry_technology"}
            What to do with negative flows (product technology and fixed
            industry sales structure only). ``"raise"``: refuse, naming the
            cells (:meth:`negative_cells` lists them all). ``"zero"``: set them
            to zero and rebalance the flows by RAS to the model's intermediate
            use by row and intermediate inputs by column, so output, final
            demand and value added stay as the model gives them.
            ``"industry_technology"``: take the columns that hold a negative
            from the industry-technology table, then rebalance alike. The
            cells changed are kept in ``SymmetricTable.negatives``.

        Returns
        -------
        SymmetricTable
        """
        if model not in MODELS:
            raise invalid("model", f"be one of {list(MODELS)}", model)
        if negatives not in ("raise", "zero", "industry_technology"):
            raise invalid("negatives", "be 'raise', 'zero' or 'industry_technology'",
                          negatives)
        z, f, va, imp, x, lab = self._raw(model)
        found = _negative_table(z, x)
        remedy = None
        scale = float(np.abs(z.to_numpy()).max()) if z.size else 1.0
        # a product technology table of a make matrix without secondary output can hold
        # -1e-17 where the exact result is 0: such dust is not a negative
        dust = (z < 0) & (z > -1e-12 * scale)
        z = z.mask(dust, 0.0)
        found = found[found["flow"] < -1e-12 * scale].reset_index(drop=True)
        if len(found):
            if negatives == "raise":
                first = found.iloc[0]
                raise invalid(f"symmetric table [{first['row']}, {first['column']}]",
                              f"be >= 0: the {model} model gives {len(found)} negative "
                              "flow(s) (negative_cells lists them; pass negatives='zero' or "
                              "'industry_technology' to remedy them)", float(first["flow"]))
            remedy = negatives
            rows, cols = z.sum(axis=1), z.sum(axis=0)
            if negatives == "zero":
                prior = z.clip(lower=0.0)
            else:
                if model not in _PRODUCT_MODELS:
                    raise invalid("negatives", "be 'raise' or 'zero' for an industry × "
                                  "industry table", negatives)
                alt = self._raw("industry_technology")[0]
                bad_cols = sorted(set(found["column"]))
                prior = z.copy()
                prior[bad_cols] = alt[bad_cols]
            for what, t in (("row", rows), ("column", cols)):
                if (t < 0).any():
                    k = t.index[(t < 0).to_numpy()][0]
                    raise invalid(f"symmetric table {what} {k}", "have non-negative "
                                  f"intermediate {'use' if what == 'row' else 'inputs'} to "
                                  "rebalance to", float(t[k]))
            try:
                z = ras(prior, rows, cols).matrix
            except InvalidInput as exc:
                raise invalid("negatives", f"be a remedy the table allows: rebalancing after "
                              f"'{negatives}' failed ({exc})", negatives) from None
        neg_va = va[va < -1e-9 * x]
        if len(neg_va):
            k = neg_va.index[0]
            raise invalid(f"value_added[{k}]", f"be >= 0 in the {model} table (the model "
                          "moves more inputs to it than its output)", float(va[k]))
        # a column of final uses >= 0 in the use table (not inventory changes) stays so
        signed = (self.final_demand < 0).any(axis=0).reindex(f.columns).to_numpy()
        negf = (f.to_numpy() < -1e-9 * x.to_numpy()[:, None]) & ~signed[None, :]
        if negf.any():
            i, j = np.argwhere(negf)[0]
            raise invalid(f"final_demand[{f.index[i]}, {f.columns[j]}]", f"be >= 0 in the "
                          f"{model} table", float(f.iat[i, j]))
        t, side = self._transforms(model)
        return SymmetricTable(model=model, flows=z, final_demand=f, value_added=va,
                              imported_inputs=imp, gross_output=x, labour=lab,
                              negatives=found, remedy=remedy, tolerance=self.tolerance,
                              transformation=pd.DataFrame(t, index=self.industries,
                                                          columns=self.products)
                              if side == "columns" else None)


@dataclass(frozen=True)
class SymmetricTable:
    """A symmetric input–output table of domestic flows, made from supply and use tables.

    Attributes
    ----------
    model : str
        The transformation model.
    flows : DataFrame
        Domestic intermediate flows, sectors × sectors (products or industries).
    final_demand : DataFrame
        Domestic final demand, sectors × categories.
    value_added, imported_inputs, gross_output : Series
        By sector; inputs + imported inputs + value added = gross output.
    labour : DataFrame or None
        Labour kinds × sectors.
    negatives : DataFrame
        The negative flows the model gave (``row``, ``column``, ``flow``,
        ``coefficient``), before any remedy.
    remedy : str or None
        The remedy applied to them, if any.
    tolerance : float
        The balance tolerance of the supply and use tables, kept for
        :meth:`to_table`.
    transformation : DataFrame or None
        ``T`` (industries × products) of a product table, None for an
        industry table (whose sectors are the industries).
    """

    model: str
    flows: pd.DataFrame
    final_demand: pd.DataFrame
    value_added: pd.Series
    imported_inputs: pd.Series
    gross_output: pd.Series
    labour: pd.DataFrame | None = None
    negatives: pd.DataFrame = field(default_factory=pd.DataFrame)
    remedy: str | None = None
    tolerance: float = 0.005
    transformation: pd.DataFrame | None = None

    @property
    def names(self) -> list[str]:
        """Sector names (products or industries)."""
        return list(self.flows.columns)

    def by_sector(self, values: Any) -> pd.Series:
        """Turn figures by industry (capital stock, employment) into the table's sectors.

        A product table shares each industry's figure over products as its
        inputs were shared (``w' T``); an industry table keeps it. Divide a
        stock by :attr:`gross_output` afterwards for a ratio by sector.

        Parameters
        ----------
        values : Series or dict by industry

        Returns
        -------
        Series by sector
        """
        if self.transformation is None:
            return _series(pd.Series(values, dtype=object) if isinstance(values, dict)
                           else values, "values", self.names, "industries")
        ind = list(self.transformation.index)
        w = _series(pd.Series(values, dtype=object) if isinstance(values, dict) else values,
                    "values", ind, "industries")
        return pd.Series(w.to_numpy() @ self.transformation.to_numpy(), index=self.names)

    def input_coefficients(self) -> pd.DataFrame:
        """Domestic input coefficients ``a_ij = z_ij / x_j``."""
        return self.flows.div(self.gross_output, axis=1)

    def total_requirements(self) -> pd.DataFrame:
        """The Leontief inverse ``(I − A)⁻¹`` of the domestic coefficients."""
        a = self.input_coefficients().to_numpy()
        inv = np.linalg.inv(np.eye(len(a)) - a)
        return pd.DataFrame(inv, index=self.names, columns=self.names)

    def to_table(self) -> TransactionsTable:
        """The table as a :class:`TransactionsTable` (value added there includes imported inputs).

        Returns
        -------
        TransactionsTable
        """
        return TransactionsTable(self.flows, self.gross_output, self.labour,
                                 final_demand=self.final_demand,
                                 value_added=self.value_added + self.imported_inputs,
                                 balance_tolerance=self.tolerance)

    def to_economy(self, **kwargs: Any) -> Economy:
        """The plannable :class:`Economy` (see :meth:`TransactionsTable.to_economy`)."""
        return self.to_table().to_economy(**kwargs)
