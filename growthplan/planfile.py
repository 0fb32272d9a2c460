"""Plan files: a plan and its economy in one YAML or TOML file.

The file points at its tables by paths relative to the file itself. Layout
(YAML; TOML has the same keys)::

    economy:
      flows: flows.csv                  # transactions table (see growthplan.tables)
      capital: capital.csv              # one row per sector
      capital_stocks: capital_stocks.csv  # or capital_coefficients: b.csv
      consumption_basket: {food: 0.5, services: 0.5}
    plan:
      years: {first: 2027, last: 2041}  # or a list of years
      labour: {start: 4900, growth: 0.012}
      consumption: {floor: 9000, floor_growth: 0.02, max_fall: 0.0}
      final_demand: {services: 1500}
      final_demand_growth: 0.03
      targets:
        - {sector: energy, year: 2034, capacity_at_least: 3400}
      terminal: {rate: 0.04}
      objective: {kind: terminal_capacity}
    solve: {method: auto, time_limit: 600}

Everything under ``plan`` is validated by :class:`~growthplan.Plan` itself;
:func:`plan_file_schema` publishes the JSON Schema of the whole file.
YAML is read with ``yaml.safe_load`` only.
"""

from __future__ import annotations

import tomllib
from pathlib import Path
from typing import Any

import yaml
from pydantic import Field, field_validator

from ._validation import Model, Rule
from .economy import Economy
from .errors import InvalidInput, invalid
from .plan import Plan

__all__ = ["PlanFile", "EconomyTables", "SolveOptions", "load_plan_file", "plan_file_schema"]


class EconomyTables(Model):
    """Where the economy's tables are, relative to the plan file."""

    flows: str
    capital: str | None = None
    capital_stocks: str | None = None
    capital_coefficients: str | None = None
    consumption_basket: dict[str, float] | None = None
    wage_basket: dict[str, float] | None = None


class SolveOptions(Model):
    """Solver settings stored with the plan."""

    method: str = "auto"
    time_limit: float | None = Field(default=None, gt=0)
    threads: int | None = Field(default=None, ge=1)
    tolerance: float | None = Field(default=None, gt=0, lt=1)


class PlanFile(Model):
    """The whole plan file: economy tables, the plan, solver settings."""

    economy: EconomyTables
    plan: dict[str, Any]
    solve: SolveOptions = Field(default_factory=SolveOptions)

    @field_validator("plan")
    @classmethod
    def _plan(cls, v: dict[str, Any]) -> dict[str, Any]:
        if "economy" in v:
            raise Rule("not contain 'economy' (it is a section of its own)", "economy")
        if "years" not in v:
            raise Rule("give years (a list, or first and last)", sorted(v))
        return v


def plan_file_schema() -> dict:
    """JSON Schema of a plan file, with the plan section's own schema filled in."""
    schema = PlanFile.model_json_schema()
    plan_schema = Plan.model_json_schema(mode="validation")
    plan_schema.get("properties", {}).pop("economy", None)
    if "required" in plan_schema:
        plan_schema["required"] = [r for r in plan_schema["required"] if r != "economy"]
    defs = schema.setdefault("$defs", {})
    defs.update(plan_schema.pop("$defs", {}))
    defs["PlanSection"] = plan_schema
    schema["properties"]["plan"] = {"$ref": "#/$defs/PlanSection"}
    return schema


def _line_of(text: str, path: list[str]) -> int | None:
    """Line (1-based) of a dotted field in YAML text, where the loader can tell."""
    try:
        node = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.YAMLError:
        return None
    line = None
    for part in path:
        if isinstance(node, yaml.MappingNode):
            nxt = None
            for k, v in node.value:
                if str(k.value) == part:
                    line, nxt = k.start_mark.line + 1, v
                    break
            if nxt is None:
                return line
            node = nxt
        elif isinstance(node, yaml.SequenceNode) and part.isdigit() and int(part) < len(
                node.value):
            node = node.value[int(part)]
            line = node.start_mark.line + 1
        else:
            return line
    return line


def _read(path: Path) -> tuple[dict, str]:
    if not path.exists():
        raise invalid("plan file", "name an existing file", str(path))
    raw = path.read_bytes()
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise invalid(f"{path}", "be UTF-8 text", f"byte {exc.start}") from None
    suffix = path.suffix.lower()
    try:
        if suffix == ".toml":
            data = tomllib.loads(text)
        elif suffix in (".yaml", ".yml"):
            data = yaml.safe_load(text)
        else:
            raise invalid(f"{path}", "end in .yaml, .yml or .toml", suffix or "no suffix")
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        where = f" (line {mark.line + 1})" if mark is not None else ""
        raise InvalidInput(f"{path}{where}: not valid YAML: "
                           f"{getattr(exc, 'problem', exc)}.", field="plan file") from None
    except tomllib.TOMLDecodeError as exc:
        raise InvalidInput(f"{path}: not valid TOML: {exc}.", field="plan file") from None
    if not isinstance(data, dict):
        raise invalid(f"{path}", "hold a mapping with economy and plan sections",
                      type(data).__name__)
    return data, text


def _located(exc: InvalidInput, path: Path, text: str, prefix: list[str]) -> InvalidInput:
    field = exc.field or ""
    parts = prefix + [p for p in field.split(".") if p]
    line = _line_of(text, parts) if path.suffix.lower() in (".yaml", ".yml") else None
    where = f"{path}" + (f", line {line}" if line else "")
    return InvalidInput(f"{where}: {'.'.join(prefix) + '.' if prefix else ''}{exc}",
                        field=".".join(parts))


def load_plan_file(path: str | Path) -> tuple[Plan, SolveOptions]:
    """Read a plan file and its tables into a validated :class:`Plan`.

    Returns
    -------
    (plan, solve_options)

    Raises
    ------
    InvalidInput
        Naming the file, the field and (for YAML) the line.
    """
    path = Path(path)
    data, text = _read(path)
    try:
        spec = PlanFile.model_validate(data)
    except InvalidInput as exc:
        raise _located(exc, path, text, []) from None
    base = path.parent
    tables = spec.economy

    def ref(name: str | None, field: str) -> Path | None:
        if name is None:
            return None
        p = (base / name)
        if not p.exists():
            raise _located(invalid(field, "name an existing table file (relative to the plan "
                                   "file)", name, ), path, text, ["economy"])
        return p

    try:
        econ = Economy.from_tables(
            ref(tables.flows, "flows"), capital=ref(tables.capital, "capital"),
            capital_stocks=ref(tables.capital_stocks, "capital_stocks"),
            capital_coefficients=ref(tables.capital_coefficients, "capital_coefficients"),
            consumption_basket=tables.consumption_basket, wage_basket=tables.wage_basket)
    except InvalidInput as exc:
        if str(exc).startswith(str(path)):
            raise
        raise InvalidInput(f"{path}: economy tables: {exc}", field=exc.field) from None
    fields = dict(spec.plan)
    years = fields.get("years")
    if isinstance(years, dict):
        if set(years) != {"first", "last"}:
            raise _located(invalid("years", "be a list or have exactly first and last",
                                   sorted(years)), path, text, ["plan"])
        first, last = years["first"], years["last"]
        if not (isinstance(first, int) and isinstance(last, int)) or last < first:
            raise _located(invalid("years", "have whole years with first <= last", years),
                           path, text, ["plan"])
        fields["years"] = list(range(first, last + 1))
    try:
        plan = Plan(economy=econ, **fields)
    except InvalidInput as exc:
        raise _located(exc, path, text, ["plan"]) from None
    except TypeError as exc:
        raise InvalidInput(f"{path}: plan: {exc}", field="plan") from None
    return plan, spec.solve
