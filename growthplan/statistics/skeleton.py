"""A plan skeleton for an economy built from statistics: the plan section a first run needs.

The skeleton holds the years after the base year, the labour supply of each
kind at its base-year use, government's and foreign demand (the final uses
other than household consumption, fixed investment and inventories) held at
their base-year level, a consumption floor, and the objective of the largest
terminal capacity in balanced-growth proportions.

The consumption floor
---------------------
It is computed from the base year so that the economy can keep it up: the
largest level ``c_max`` of the consumption basket ``h`` that a steady state
within base-year capacity gives, with output ``x`` at most ``x₀``, after
intermediate use ``A x``, the other final demand ``e`` and the replacement of
worn capital ``B x / L`` (capital over its mean service life ``L``)::

    c_max = max c  subject to  (I − A − B L̂⁻¹) x ≥ c h + e,  0 ≤ x ≤ x₀

(a small linear program). The floor is a share (default 90 %) of the
smaller of ``c_max`` and the base year's household consumption.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ..errors import invalid
from ..model.economy import Economy

__all__ = ["PlanSkeleton", "plan_skeleton"]


@dataclass(frozen=True)
class PlanSkeleton:
    """The plan section and the figures behind its consumption floor.

    Attributes
    ----------
    section : dict
        The ``plan`` section of a plan file.
    floor : float
        The consumption floor (basket units a year).
    largest_floor : float
        ``c_max`` (see the module notes).
    base_consumption : float
        Household consumption of the base year (basket units).
    assumptions : list of str
    """

    section: dict[str, Any]
    floor: float
    largest_floor: float
    base_consumption: float
    assumptions: list[str]


def _largest_floor(a: np.ndarray, b: np.ndarray, life: np.ndarray, x0: np.ndarray,
                   e: np.ndarray, basket: np.ndarray) -> float:
    """``c_max``: the largest basket level a steady state within base-year capacity gives."""
    from scipy.optimize import linprog

    n = len(x0)
    net = np.eye(n) - a - b / life[None, :]  # output less inputs and replacement, per unit
    res = linprog(np.r_[np.zeros(n), -1.0], A_ub=np.c_[-net, basket[:, None]], b_ub=-e,
                  bounds=[(0.0, float(v)) for v in x0] + [(0.0, None)], method="highs")
    return float(res.x[-1]) if res.status == 0 else 0.0


def plan_skeleton(econ: Economy, *, base_year: int, years: int = 30,
                  other_demand: np.ndarray | None = None,
                  base_consumption: float | None = None, floor_share: float = 0.9,
                  labour_growth: float = 0.005) -> PlanSkeleton:
    """The plan section of a first plan of an economy built from statistics.

    Parameters
    ----------
    econ : Economy
        With ``base_output``, ``consumption_basket`` and labour coefficients.
    base_year : int
        The year of the tables; the plan starts the year after.
    years : int, default 30
    other_demand : array, optional
        Final demand held at its base-year level (government, exports), by sector.
    base_consumption : float, optional
        Household consumption of the base year in basket units (default ``c_max``).
    floor_share : float, default 0.9
        The floor as a share of the smaller of ``c_max`` and base consumption.
    labour_growth : float, default 0.005
        Growth rate of every labour supply.

    Returns
    -------
    PlanSkeleton

    Raises
    ------
    InvalidInput
        An economy without base-year output or basket, or a base year that
        leaves nothing for households.
    """
    if econ.base_output is None or econ.consumption_basket is None:
        raise invalid("economy", "have base-year output and a consumption basket for a plan "
                      "skeleton", "missing")
    if not 1 <= years <= 200:
        raise invalid("years", "be between 1 and 200", years)
    if not 0 < floor_share <= 1:
        raise invalid("floor_share", "be in (0, 1]", floor_share)
    x0 = np.asarray(econ.base_output, dtype=float)
    a = np.asarray(econ.input_coefficients, dtype=float)
    b = np.asarray(econ.capital_coefficients, dtype=float)
    life = np.array([econ.capital[n].mean_service_life for n in econ.names]) \
        if econ.capital is not None else np.full(econ.n, 20.0)
    e = np.zeros(econ.n) if other_demand is None else np.clip(
        np.asarray(other_demand, dtype=float), 0.0, None)
    basket = np.asarray(econ.consumption_basket, dtype=float)
    c_max = _largest_floor(a, b, life, x0, e, basket)
    if not c_max > 0:
        raise invalid("consumption floor", "be positive: the base year's capacity leaves "
                      "nothing for households after intermediate use, other final demand "
                      "and the replacement of capital", c_max)
    base_c = c_max if base_consumption is None else float(base_consumption)
    floor = floor_share * min(c_max, base_c)
    unit = econ.value_unit or "value units"
    plan: dict[str, Any] = {"years": {"first": base_year + 1, "last": base_year + years}}
    labour = []
    if econ.labour_coefficients is not None:
        use = np.asarray(econ.labour_coefficients, dtype=float) @ x0
        for k, u in zip(econ.labour_kinds or [], use, strict=True):
            labour.append({"kind": k, "start": float(round(u, 3)), "growth": labour_growth})
    if labour:
        plan["labour"] = labour
    plan["consumption"] = {"floor": float(round(floor, 3)), "max_fall": 0.0}
    if e.any():
        plan["final_demand"] = {n: float(round(v, 3)) for n, v in zip(econ.names, e,
                                                                     strict=True) if v > 0}
    plan["terminal"] = {"rate": labour_growth}  # capacity keeps growing with labour after
    plan["objective"] = {"kind": "terminal_capacity"}
    assumptions = [
        f"Plan skeleton: {years} years from {base_year + 1}; labour supply of each kind "
        f"starts at its base-year use and grows {100 * labour_growth:g} % a year; government "
        "and foreign demand held at their base-year level; after the plan, capacity is "
        "valued as growing at the rate of labour; the objective is the largest terminal "
        "capacity in balanced-growth proportions.",
        f"Consumption floor {floor:,.0f} ({unit}, a basket level a year): "
        f"{100 * floor_share:g} % of the smaller of base-year household consumption "
        f"({base_c:,.0f}) and the most a steady state within base-year capacity can give "
        "households after intermediate use, other final demand and the replacement of worn "
        f"capital ({c_max:,.0f}); it never falls.",
    ]
    return PlanSkeleton(plan, floor, c_max, base_c, assumptions)
