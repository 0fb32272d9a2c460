"""Files in and out: plan files, transactions tables and the atomic writer.

:mod:`~growthplan.io.planfile` reads and writes YAML/TOML plan files,
:mod:`~growthplan.io.tables` reads transactions and coefficient tables (CSV
or Excel), :mod:`~growthplan.io.supply_use` turns supply and use tables into
symmetric ones, :mod:`~growthplan.io.balancing` updates a matrix to new
totals (RAS, GRAS), :mod:`~growthplan.io.capital_flows` estimates capital
coefficients, :mod:`~growthplan.io.layouts` reads the tables offices publish
(wide and long), :mod:`~growthplan.io.employment` labour by kind,
:mod:`~growthplan.io.build` the economy spec that turns them into an
economy, and :mod:`~growthplan.io.atomic` is the one writer every export
goes through (written aside, renamed into place only on success).

The names below are loaded on first use, so that ``growthplan.io.atomic``
can be imported by any module (results, plans) without importing the plan
model in turn.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

from .atomic import atomic_file, atomic_files, atomic_folder

if TYPE_CHECKING:
    from .balancing import Balanced, gras, ras
    from .build import BuildReport, EconomySpec, build_economy, economy_spec_schema, write_economy
    from .capital_flows import (
        capital_coefficients_from_ratios,
        investment_matrix,
        stocks_from_investment,
    )
    from .employment import Employment, employment_table, labour_coefficients
    from .layouts import LAYOUT_VERSION, LocatedTable, TableLayout, read_table
    from .planfile import (
        EconomyTables,
        PlanFile,
        SolveOptions,
        load_plan_file,
        plan_file_inputs,
        plan_file_schema,
        save_plan_file,
    )
    from .supply_use import MODELS, SupplyUseTable, SymmetricTable
    from .tables import (
        TransactionsTable,
        capital_coefficients_from_stocks,
        capital_table,
        economy_from_coefficients,
        read_frame,
        read_transactions,
        write_coefficient_tables,
    )

_LAZY = {
    "EconomyTables": "planfile", "PlanFile": "planfile", "SolveOptions": "planfile",
    "load_plan_file": "planfile", "plan_file_inputs": "planfile",
    "plan_file_schema": "planfile", "save_plan_file": "planfile",
    "TransactionsTable": "tables", "capital_coefficients_from_stocks": "tables",
    "capital_table": "tables", "economy_from_coefficients": "tables", "read_frame": "tables",
    "read_transactions": "tables", "write_coefficient_tables": "tables",
    "Balanced": "balancing", "ras": "balancing", "gras": "balancing",
    "capital_coefficients_from_ratios": "capital_flows", "investment_matrix": "capital_flows",
    "MODELS": "supply_use", "SupplyUseTable": "supply_use", "SymmetricTable": "supply_use",
    "BuildReport": "build", "EconomySpec": "build", "build_economy": "build",
    "economy_spec_schema": "build", "write_economy": "build",
    "Employment": "employment", "employment_table": "employment",
    "labour_coefficients": "employment",
    "LAYOUT_VERSION": "layouts", "LocatedTable": "layouts", "TableLayout": "layouts",
    "read_table": "layouts", "stocks_from_investment": "capital_flows",
}

__all__ = [
    "Balanced",
    "EconomyTables",
    "MODELS",
    "PlanFile",
    "SolveOptions",
    "SupplyUseTable",
    "SymmetricTable",
    "TransactionsTable",
    "atomic_file",
    "atomic_files",
    "atomic_folder",
    "capital_coefficients_from_ratios",
    "capital_coefficients_from_stocks",
    "capital_table",
    "economy_from_coefficients",
    "gras",
    "investment_matrix",
    "load_plan_file",
    "plan_file_inputs",
    "plan_file_schema",
    "ras",
    "read_frame",
    "read_transactions",
    "save_plan_file",
    "write_coefficient_tables",
    "BuildReport",
    "EconomySpec",
    "Employment",
    "LAYOUT_VERSION",
    "LocatedTable",
    "TableLayout",
    "build_economy",
    "economy_spec_schema",
    "employment_table",
    "labour_coefficients",
    "read_table",
    "stocks_from_investment",
    "write_economy",
]


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{module}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
