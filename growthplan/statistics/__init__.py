"""From published statistical tables to an economy.

:mod:`~growthplan.statistics.layouts` reads the tables offices publish (wide
and long, located errors), :mod:`~growthplan.statistics.tables` transactions
and coefficient tables (CSV or Excel) and their aggregation,
:mod:`~growthplan.statistics.supply_use` turns supply and use tables into
symmetric ones, :mod:`~growthplan.statistics.balancing` updates a matrix to
new totals (RAS, GRAS), :mod:`~growthplan.statistics.capital_flows` estimates
capital coefficients, :mod:`~growthplan.statistics.employment` labour by kind,
:mod:`~growthplan.statistics.valuation` the valuation layers and the rules for
special cells, :mod:`~growthplan.statistics.published` tables as offices
publish them, :mod:`~growthplan.statistics.skeleton` a first plan of a built
economy, :mod:`~growthplan.statistics.satellite` emissions and resources by
sector, :mod:`~growthplan.statistics.regions` interregional tables and trade
shares, and :mod:`~growthplan.statistics.build` the economy spec that turns
them into an economy.

The names below are loaded on first use.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from ..lazy import attribute

if TYPE_CHECKING:
    from .balancing import Balanced, gras, ras
    from .build import (
        BuildReport,
        EconomySpec,
        PublishedSpec,
        build_economy,
        economy_spec_schema,
        plan_skeleton_of,
        write_economy,
    )
    from .capital_flows import (
        capital_coefficients_from_ratios,
        investment_matrix,
        stocks_from_investment,
    )
    from .employment import Employment, employment_table, labour_coefficients
    from .layouts import LAYOUT_VERSION, LocatedTable, TableLayout, read_table
    from .published import PublishedEconomy, PublishedTables, published_economy, read_published
    from .regions import interregional_economy, read_interregional, read_trade_shares
    from .satellite import read_satellite, satellite_from_frame
    from .skeleton import PlanSkeleton, plan_skeleton
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
    from .valuation import (
        SUPPRESSED,
        Valuation,
        fill_suppressed,
        negative_supply,
        negative_uses,
        to_basic_prices,
    )

_LAZY = {
    "TransactionsTable": "tables", "capital_coefficients_from_stocks": "tables",
    "capital_table": "tables", "economy_from_coefficients": "tables", "read_frame": "tables",
    "read_transactions": "tables", "write_coefficient_tables": "tables",
    "Balanced": "balancing", "ras": "balancing", "gras": "balancing",
    "capital_coefficients_from_ratios": "capital_flows", "investment_matrix": "capital_flows",
    "stocks_from_investment": "capital_flows",
    "MODELS": "supply_use", "SupplyUseTable": "supply_use", "SymmetricTable": "supply_use",
    "BuildReport": "build", "EconomySpec": "build", "build_economy": "build",
    "economy_spec_schema": "build", "write_economy": "build",
    "Employment": "employment", "employment_table": "employment",
    "labour_coefficients": "employment",
    "LAYOUT_VERSION": "layouts", "LocatedTable": "layouts", "TableLayout": "layouts",
    "read_table": "layouts",
    "PublishedSpec": "build", "plan_skeleton_of": "build",
    "PublishedEconomy": "published", "PublishedTables": "published",
    "published_economy": "published", "read_published": "published",
    "PlanSkeleton": "skeleton", "plan_skeleton": "skeleton",
    "SUPPRESSED": "valuation", "Valuation": "valuation", "fill_suppressed": "valuation",
    "negative_supply": "valuation", "negative_uses": "valuation",
    "to_basic_prices": "valuation",
    "read_satellite": "satellite", "satellite_from_frame": "satellite",
    "interregional_economy": "regions", "read_interregional": "regions",
    "read_trade_shares": "regions",
}

__all__ = [
    "Balanced",
    "PlanSkeleton",
    "PublishedEconomy",
    "PublishedSpec",
    "PublishedTables",
    "SUPPRESSED",
    "Valuation",
    "fill_suppressed",
    "negative_supply",
    "negative_uses",
    "plan_skeleton",
    "plan_skeleton_of",
    "published_economy",
    "read_published",
    "to_basic_prices",
    "BuildReport",
    "EconomySpec",
    "Employment",
    "LAYOUT_VERSION",
    "LocatedTable",
    "MODELS",
    "SupplyUseTable",
    "SymmetricTable",
    "TableLayout",
    "TransactionsTable",
    "build_economy",
    "capital_coefficients_from_ratios",
    "capital_coefficients_from_stocks",
    "capital_table",
    "economy_from_coefficients",
    "economy_spec_schema",
    "employment_table",
    "interregional_economy",
    "gras",
    "investment_matrix",
    "labour_coefficients",
    "read_satellite",
    "satellite_from_frame",
    "ras",
    "read_frame",
    "read_interregional",
    "read_table",
    "read_trade_shares",
    "read_transactions",
    "stocks_from_investment",
    "write_coefficient_tables",
    "write_economy",
]


def __getattr__(name: str) -> Any:
    return attribute(__name__, name, _LAZY, globals())


def __dir__() -> list[str]:
    return sorted(__all__)
