"""Plan files: a plan and its economy in one YAML or TOML file.

The file points at its tables by paths relative to the file itself. Layout
(YAML; TOML has the same keys)::

    economy:
      flows: flows.csv                  # transactions table (see growthplan.io.tables)
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
from pydantic import Field, field_validator, model_validator

from .._validation import Model, Rule
from ..economy import Economy
from ..errors import InvalidInput, invalid
from ..plan import Plan

__all__ = ["PlanFile", "EconomyTables", "SolveOptions", "load_plan_file", "save_plan_file",
           "plan_file_schema"]


class EconomyTables(Model):
    """Where the economy's tables are, relative to the plan file.

    Either ``flows`` (a transactions table) or ``input_coefficients`` (with
    ``labour_coefficients`` and ``capital_coefficients`` as coefficient
    tables) describes the technology.
    """

    @model_validator(mode="after")
    def _one_source(self) -> EconomyTables:
        if (self.flows is None) == (self.input_coefficients is None):
            raise Rule("give exactly one of flows and input_coefficients",
                       [k for k in ("flows", "input_coefficients") if getattr(self, k)] or None,
                       field="flows")
        if self.flows is not None and self.labour_coefficients is not None:
            raise Rule("come with input_coefficients (flows carry their own labour rows)",
                       self.labour_coefficients, field="labour_coefficients")
        return self

    flows: str | None = None
    input_coefficients: str | None = None
    labour_coefficients: str | None = None
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
        if tables.flows is not None:
            econ = Economy.from_tables(
                ref(tables.flows, "flows"), capital=ref(tables.capital, "capital"),
                capital_stocks=ref(tables.capital_stocks, "capital_stocks"),
                capital_coefficients=ref(tables.capital_coefficients, "capital_coefficients"),
                consumption_basket=tables.consumption_basket, wage_basket=tables.wage_basket)
        else:
            from .tables import economy_from_coefficients

            econ = economy_from_coefficients(
                ref(tables.input_coefficients, "input_coefficients"),
                capital=ref(tables.capital, "capital"),
                capital_coefficients=ref(tables.capital_coefficients, "capital_coefficients"),
                labour_coefficients=ref(tables.labour_coefficients, "labour_coefficients"),
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


def _plain(value: Any) -> Any:
    """Plan field values as YAML-safe Python (lists, dicts, numbers, text)."""
    import numpy as np
    import pandas as pd

    if isinstance(value, pd.DataFrame):
        return {str(c): [float(v) for v in value[c]] for c in value.columns}
    if isinstance(value, pd.Series):
        return {int(k): float(v) for k, v in value.items()}
    if isinstance(value, np.ndarray):
        return value.tolist()
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_plain(v) for v in value]
    return value


def save_plan_file(plan: Plan, path: str | Path, *, overwrite: bool = False,
                   solve: SolveOptions | None = None) -> Path:
    """Write ``plan`` as a YAML plan file with its coefficient tables beside it.

    The tables are ``<stem>_input_coefficients.csv``, ``<stem>_capital_coefficients.csv``,
    ``<stem>_labour_coefficients.csv`` and ``<stem>_capital.csv`` in the file's folder;
    :func:`load_plan_file` reads the set back into an equal plan. Nothing is
    overwritten without ``overwrite=True``, and every file is written aside
    and renamed into place.
    """
    import os
    import shutil
    import tempfile

    from .tables import write_coefficient_tables

    path = Path(path)
    if path.suffix.lower() not in (".yaml", ".yml"):
        raise invalid("path", "end in .yaml or .yml", str(path))
    stem = f"{path.stem}_"
    econ = plan.economy
    tmp = Path(tempfile.mkdtemp(prefix=f".{path.name}.", dir=path.parent))
    try:
        names = write_coefficient_tables(econ, tmp, prefix=stem)
        targets = [path, *(path.parent / n for n in names.values())]
        existing = [str(t) for t in targets if t.exists()]
        if existing and not overwrite:
            raise invalid("path", "not overwrite existing files (pass overwrite=True)",
                          existing)
        economy: dict[str, Any] = dict(names)
        if econ.consumption_basket is not None:
            economy["consumption_basket"] = dict(zip(econ.names,
                                                     econ.consumption_basket.tolist(),
                                                     strict=True))
        if econ.wage_basket is not None:
            economy["wage_basket"] = dict(zip(econ.names, econ.wage_basket.tolist(),
                                              strict=True))
        fields = plan.model_dump(exclude={"economy"}, mode="python")
        fields = _plain({k: v for k, v in fields.items() if v not in (None, [], {})})
        doc = {"economy": economy, "plan": fields,
               "solve": (solve or SolveOptions()).model_dump(exclude_none=True)}
        (tmp / path.name).write_text(
            "# growthplan plan file (written by save_plan_file)\n"
            + yaml.safe_dump(doc, sort_keys=False, allow_unicode=True), encoding="utf-8")
        for name in [*names.values(), path.name]:
            os.replace(tmp / name, path.parent / name)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return path
