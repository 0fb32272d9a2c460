"""Plan files: a plan and its economy in one YAML or TOML file.

The file points at its tables by paths relative to the file itself. Layout
(YAML; TOML has the same keys)::

    economy:
      flows: flows.csv                  # transactions table (see growthplan.statistics.tables)
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
    uncertainty:                        # optional: see growthplan.scenarios.uncertainty
      seed: 7
      draws: 200
      items:
        - {what: capital_coefficients, correlation: independent,
           distribution: {kind: uniform, low: 0.9, high: 1.1}}
        - {what: mean_service_life, cols: [energy],
           distribution: {kind: triangular, low: 0.8, mode: 1.0, high: 1.1}}

Everything under ``plan`` is validated by :class:`~growthplan.Plan` itself;
:func:`plan_file_schema` publishes the JSON Schema of the whole file. The
``uncertainty`` section is an :class:`~growthplan.UncertaintySpec`:
:func:`load_plan_file` checks it against the plan (every selected cell must
exist) and :func:`load_uncertainty` returns it.

A plan file may come from anyone, so it is read defensively: at most
:data:`PLAN_FILE_MAX_BYTES`, parsed once by a safe YAML loader (the C one
where installed) that refuses anchors and aliases (no "billion laughs"),
nesting deeper than :data:`MAX_DEPTH`, repeated keys (``2030`` and
``"2030"`` count as the same key) and keys YAML would turn into true/false,
decimals or null. Tables must lie in the plan file's folder or below it.
"""

from __future__ import annotations

import os
import tomllib
from pathlib import Path
from typing import Any

import yaml
from pydantic import Field, field_validator, model_validator
from yaml.composer import Composer
from yaml.events import AliasEvent
from yaml.nodes import MappingNode, Node, ScalarNode, SequenceNode

from ..backends.options import SolveOptions
from ..errors import InvalidInput, invalid, show, suggest
from ..limits import MAX_YEARS, PLAN_FILE_MAX_BYTES
from ..model.economy import Economy, Sector
from ..model.plan import Plan
from ..model.validation import Model, Rule, unknown_keys
from ..scenarios.uncertainty import UncertaintySpec
from ..statistics.tables import _coefficient_frames, _write_csv, economy_from_coefficients
from .atomic import atomic_files
from .files import read_regular_file
from .marks import comment_line

__all__ = ["PlanFile", "EconomyTables", "SolveOptions", "load_plan_file", "read_plan_file",
           "save_plan_file",
           "plan_file_schema", "plan_file_inputs", "PLAN_FILE_MAX_BYTES", "MAX_DEPTH",
           "MAX_YEARS", "load_uncertainty"]

_TABLE_FIELDS = ("flows", "input_coefficients", "labour_coefficients", "capital",
                 "capital_stocks", "capital_coefficients")

MAX_DEPTH = 100
"""Deepest nesting of mappings and lists in a plan file."""


class EconomyTables(Model):
    """Where the economy's tables are, relative to the plan file.

    Either ``flows`` (a transactions table) or ``input_coefficients`` (with
    ``labour_coefficients`` and ``capital_coefficients`` as coefficient
    tables) describes the technology.

    Parameters
    ----------
    flows : str, optional
        Transactions table (CSV or Excel): flows, a gross_output row, labour
        rows and final-demand columns.
    input_coefficients : str, optional
        Input coefficients table, commodities × sectors (instead of flows).
    labour_coefficients : str, optional
        Labour coefficients table, labour kinds × sectors (with input_coefficients).
    capital : str, optional
        Capital table, one row per sector: initial capacity, service life,
        retirement, lead time, spending profile, utilisation.
    capital_stocks : str, optional
        Capital stocks table, commodities × sectors, divided by capacity into
        the capital coefficients.
    capital_coefficients : str, optional
        Capital coefficients table, commodities × sectors (capital goods per
        unit of new capacity).
    consumption_basket : dict of str to float, optional
        Commodities per unit of the consumption level, by sector.
    wage_basket : dict of str to float, optional
        Commodities per unit of labour, by sector.
    value_unit : str, optional
        The unit values are measured in (e.g. million arvens at 2026 prices).
    labour_units : list of str, optional
        The unit of each labour kind, in the order of the labour rows.
    labour_kinds : list of str, optional
        The labour kinds the tables hold, in the order of their labour rows
        (checked against the tables).
    units : dict of str to str, optional
        Physical unit of each sector's output, by sector.
    prices : dict of str to float, optional
        Base-year price of one unit of each sector's output, by sector
        (default 1: tables in money).
    base_output : dict of str to float, optional
        Base-year gross output of every sector.
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
    value_unit: str | None = None
    labour_units: list[str] | None = None
    labour_kinds: list[str] | None = None
    units: dict[str, str] | None = None
    prices: dict[str, float] | None = None
    base_output: dict[str, float] | None = None


def with_units(econ: Economy, tables: EconomyTables) -> Economy:
    """The economy with the plan file's units, base-year prices, value unit and base year.

    Parameters
    ----------
    econ : Economy
        As read from the tables.
    tables : EconomyTables
        The plan file's ``economy`` section.

    Returns
    -------
    Economy
    """
    if tables.labour_kinds is not None and list(tables.labour_kinds) != [
            str(k) for k in econ.labour_kinds or []]:
        raise invalid("economy.labour_kinds", "name the labour rows of the tables, in their "
                      f"order {econ.labour_kinds or []}", tables.labour_kinds)
    if not (tables.value_unit or tables.labour_units or tables.units or tables.prices
            or tables.base_output):
        return econ
    for field in ("units", "prices", "base_output"):
        unknown = [k for k in getattr(tables, field) or {} if k not in econ.names]
        if unknown:
            raise invalid(f"economy.{field}", "name sectors of the economy", unknown[:5])
    units, prices = tables.units or {}, tables.prices or {}
    sectors = [Sector(name=s.name, unit=units.get(s.name, s.unit),
                      price=prices.get(s.name, s.price)) for s in econ.sectors]
    fields = {k: getattr(econ, k) for k in type(econ).model_fields}
    fields["sectors"] = sectors
    if tables.value_unit:
        fields["value_unit"] = tables.value_unit
    if tables.labour_units:
        fields["labour_units"] = tables.labour_units
    if tables.base_output:
        missing = [k for k in econ.names if k not in tables.base_output]
        if missing:
            raise invalid("economy.base_output", "give every sector's base-year output",
                          f"missing {missing[:5]}")
        fields["base_output"] = [tables.base_output[k] for k in econ.names]
    return Economy(**fields)


class PlanFile(Model):
    """The whole plan file: economy tables, the plan, solver settings.

    Parameters
    ----------
    economy : EconomyTables
        Where the economy's tables are (paths relative to the plan file), its
        baskets, units and prices.
    plan : dict
        The plan: years, labour, consumption, targets, terminal condition,
        objective (the fields of :class:`~growthplan.Plan` but its economy).
    solve : SolveOptions, optional
        Solver settings (method, time limit, threads, tolerance).
    """

    economy: EconomyTables
    plan: dict[str, Any]
    solve: SolveOptions = Field(default_factory=SolveOptions)
    uncertainty: UncertaintySpec | None = Field(default=None, description=(
        "Optional: what is uncertain (coefficient blocks or cells, service lives, labour "
        "growth, exogenous demand, trade prices), by which distribution and correlation, "
        "the seed and the number of draws; read by load_uncertainty and the stress and "
        "reoptimise commands."))

    @field_validator("plan")
    @classmethod
    def _plan(cls, v: dict[str, Any]) -> dict[str, Any]:
        if "economy" in v:
            raise Rule("not contain 'economy' (it is a section of its own)", "economy")
        # every misspelt key of the section at once, before the tables are read
        names = [n for n in Plan.model_fields if n != "economy"]
        unknown_keys(v, names, more=[] if "years" in v else [invalid(
            "years", "be given (a list, or first and last)", None)])
        return v


def plan_file_schema() -> dict[str, Any]:
    """JSON Schema of a plan file, with the plan section's own schema filled in.

    Returns
    -------
    dict
    """
    schema = PlanFile.model_json_schema()
    plan_schema = Plan.model_json_schema(mode="validation")
    plan_schema.get("properties", {}).pop("economy", None)
    if "required" in plan_schema:
        plan_schema["required"] = [r for r in plan_schema["required"] if r != "economy"]
    defs = schema.setdefault("$defs", {})
    defs.update(plan_schema.pop("$defs", {}))
    defs["PlanSection"] = plan_schema
    schema["properties"]["plan"] = {"$ref": "#/$defs/PlanSection"}
    _as_loaded(plan_schema["properties"], defs)
    from ..model import objectives, regions, satellite, technique
    from ..model import plan as plan_module
    from ..scenarios import uncertainty
    from .schema import describe

    classes: dict[str, type] = {name: c for module in (plan_module, objectives, technique,
                                                       uncertainty, satellite, regions)
                                for name, c in vars(module).items()
                                if isinstance(c, type) and issubclass(c, Model)}
    classes.update({"": PlanFile, "PlanSection": Plan, "EconomyTables": EconomyTables,
                    "SolveOptions": SolveOptions})
    describe(schema, classes)
    plan_schema["properties"]["years"]["description"] = (
        "Consecutive calendar years of the plan: a list, or first and last.")
    return schema


def _as_loaded(plan: dict[str, Any], defs: dict[str, Any]) -> None:
    """The plan section's schema as the loader reads it: ``years`` as a list or as
    first and last, one labour supply as a mapping or several as a list, the
    methods HiGHS takes, an objective's kind always given."""
    year = {"type": "integer"}
    plan["years"] = {"anyOf": [
        {"type": "array", "items": year, "minItems": 1},
        {"type": "object", "additionalProperties": False, "required": ["first", "last"],
         "properties": {"first": {**year, "description": "The first plan year."},
                        "last": {**year, "description": "The last plan year."}}}]}
    supply = {"$ref": "#/$defs/LabourSupply"}
    plan["labour"] = {"anyOf": [supply, {"type": "array", "items": supply}]}
    sat_table = {"type": "object", "additionalProperties": False, "required": ["table", "units"],
                 "description": "Satellite accounts read from a table (wide or long layout).",
                 "properties": {
                     "table": {"description": "The table's file (wide layout: stressors as "
                               "rows, sectors or techniques as columns), or a table layout "
                               "mapping for the long layout."},
                     "units": {"type": "object", "description": "The unit of every "
                               "stressor in the table."},
                     "flows": {"type": "boolean", "description": "True when the table holds "
                               "base-year flows, divided by the base-year output."},
                     "households": {"type": "object", "description": "Direct amounts per "
                                    "unit of the consumption level, by stressor."},
                     "impacts": {"type": "array", "items": {"$ref": "#/$defs/Impact"},
                                 "description": "The characterisation of the stressors."},
                     "resources": {"type": "array", "items": {"type": "string"},
                                   "description": "Stressors that are resources used."}}}
    if "satellite" in plan:
        plan["satellite"] = {"anyOf": [{"$ref": "#/$defs/Satellite"}, sat_table,
                                       {"type": "null"}]}
    from ..backends.methods import METHODS

    defs["SolveOptions"]["properties"]["method"]["enum"] = ["auto", *METHODS]
    for definition in defs.values():  # an objective's kind picks it: never implied
        if "const" in definition.get("properties", {}).get("kind", {}):
            definition["required"] = ["kind", *definition.get("required", [])]


class _Refused(Exception):
    """A YAML construct the plan-file loader will not build, with its line."""

    def __init__(self, line: int, message: str) -> None:
        super().__init__(message)
        self.line = line


def _quoted(text: str) -> str:
    return show(text)


class _Checks:
    """Loader checks made while the one parse builds the document."""

    _depth = 0

    def compose_node(self, parent: Node | None, index: Any) -> Node:
        event = self.peek_event()  # type: ignore[attr-defined]
        line = event.start_mark.line + 1
        if isinstance(event, AliasEvent) or getattr(event, "anchor", None) is not None:
            mark = "*" if isinstance(event, AliasEvent) else "&"
            raise _Refused(line, str(invalid(
                "plan file", "not use YAML anchors or aliases (write each value out)",
                f"{mark}{event.anchor}")))
        self._depth += 1
        try:
            if self._depth > MAX_DEPTH:
                raise _Refused(line, str(invalid("plan file", f"nest at most {MAX_DEPTH} "
                                                 "levels deep", f"level {self._depth}")))
            return super().compose_node(parent, index)  # type: ignore[misc]
        finally:
            self._depth -= 1

    def construct_mapping(self, node: MappingNode, deep: bool = False) -> dict[Any, Any]:
        if isinstance(node, MappingNode):
            seen: dict[str, int] = {}
            for key_node, _ in node.value:
                line = key_node.start_mark.line + 1
                if not isinstance(key_node, ScalarNode) or key_node.tag.endswith(":merge"):
                    what = ("merge key (<<)" if isinstance(key_node, ScalarNode)
                            else "list or mapping")
                    raise _Refused(line, f"a key must be a name or a whole year. Got a {what}.")
                key = self.construct_object(key_node, deep=True)  # type: ignore[attr-defined]
                text = _quoted(key_node.value)
                if isinstance(key, bool) or key is None:
                    raise _Refused(line, f"key {text} must be a name or a whole year; YAML "
                                   f"reads it as {str(key).lower() if key is not None else 'null'}"
                                   f". Got {text} (write it in quotes to mean the name).")
                if not isinstance(key, int | str):
                    raise _Refused(line, f"key {text} must be a name or a whole year. "
                                   f"Got a {type(key).__name__} (write it in quotes to mean "
                                   "the name).")
                norm = str(key)
                if norm in seen:
                    raise _Refused(line, f"key {show(norm)} must appear once in its mapping. "
                                   f"Got it again (first on line {seen[norm]}).")
                seen[norm] = line
        return super().construct_mapping(node, deep=deep)  # type: ignore[misc]


class _PyLoader(_Checks, yaml.SafeLoader):
    """Safe pure-Python loader with the plan-file checks."""


if hasattr(yaml, "CSafeLoader"):
    class _CLoader(_Checks, Composer, yaml.CSafeLoader):
        """libyaml's parser with the Python composer, so every node passes the checks."""

        def __init__(self, stream: str) -> None:
            yaml.CSafeLoader.__init__(self, stream)
            Composer.__init__(self)

    _Loader: type = _CLoader
else:  # pragma: no cover - libyaml not installed
    _Loader = _PyLoader


def _yaml_load(text: str) -> tuple[Any, Node | None]:
    """The document and its node tree, from one parse."""
    loader = _Loader(text)
    try:
        node = loader.get_single_node()
        return (None if node is None else loader.construct_document(node)), node
    finally:
        loader.dispose()


def _depth_exceeds(data: Any, limit: int) -> bool:
    """Whether nested dicts and lists go deeper than ``limit`` (without recursion)."""
    stack = [(data, 1)]
    while stack:
        node, depth = stack.pop()
        if isinstance(node, dict | list):
            if depth > limit:
                return True
            stack.extend((v, depth + 1) for v in (node.values() if isinstance(node, dict)
                                                  else node))
    return False


def _line_of(root: Node | None, path: list[str], first_year: int | None = None) -> int | None:
    """Line (1-based) of a dotted field in the YAML node tree, where it can tell.

    A part ``name[key]`` is ``name`` then ``key``: a mapping's key, or the year
    of a per-year list (its position counted from ``first_year``).
    """
    node = root
    line = None
    for part, year in _parts(path):
        if isinstance(node, MappingNode):
            nxt = None
            for k, v in node.value:
                if str(k.value) == part:
                    line, nxt = k.start_mark.line + 1, v
                    break
            if nxt is None:
                return line
            node = nxt
        elif isinstance(node, SequenceNode) and part.isdigit():
            i = int(part) - (first_year or 0) if year else int(part)
            if not 0 <= i < len(node.value) or (year and first_year is None):
                return line
            node = node.value[i]
            line = node.start_mark.line + 1
        else:
            return line
    return line


def _parts(path: list[str]) -> list[tuple[str, bool]]:
    """Dotted parts with ``name[key]`` split in two; True marks a bracketed key."""
    out: list[tuple[str, bool]] = []
    for part in path:
        name, bracket, key = part.partition("[")
        if bracket and key.endswith("]"):
            out += [(name, False), (key[:-1], True)]
        else:
            out.append((part, False))
    return out


def _read(path: Path, *, what: str = "plan file", limit: int = PLAN_FILE_MAX_BYTES,
          holds: str = "a mapping with economy and plan sections",
          ) -> tuple[dict[str, Any], Node | None]:
    """A YAML or TOML file of ours as a mapping and its YAML node tree (for line
    numbers), read through the guarded loader; every failure one located message.

    Parameters
    ----------
    path : Path
    what : str
        What the file is, in messages ("plan file", "economy spec").
    limit : int
        Largest size read, in bytes.
    holds : str
        What the top level must be, in the message when it is not a mapping.
    """
    suffix = path.suffix.lower()
    if suffix not in (".toml", ".yaml", ".yml"):
        raise invalid(f"{path}", "end in .yaml, .yml or .toml", suffix or "no suffix")
    raw = read_regular_file(path, what=what, limit=limit)
    try:  # a byte-order mark (some editors write one) is not part of the text
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise invalid(f"{path}", "be UTF-8 text", f"byte {exc.start}") from None
    node = None
    try:
        if suffix == ".toml":
            data = tomllib.loads(text)
            if _depth_exceeds(data, MAX_DEPTH):
                raise invalid(f"{path}", f"nest at most {MAX_DEPTH} levels deep", "deeper")
        else:
            data, node = _yaml_load(text)
    except _Refused as exc:
        raise InvalidInput(f"{path}, line {exc.line}: {str(exc).replace('plan file', what)}",
                           field=what) from None
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        where = f" (line {mark.line + 1})" if mark is not None else ""
        problem = getattr(exc, "problem", None) or str(exc).splitlines()[0]
        raise InvalidInput(f"{path}{where}: not valid YAML: {show(problem)[1:-1]}.",
                           field=what) from None
    except tomllib.TOMLDecodeError as exc:
        raise InvalidInput(f"{path}: not valid TOML: {show(str(exc))[1:-1]}.",
                           field=what) from None
    except (ValueError, RecursionError, OverflowError, MemoryError) as exc:
        if isinstance(exc, InvalidInput):
            raise
        kind = "TOML" if suffix == ".toml" else "YAML"
        raise InvalidInput(f"{path}: not valid {kind}: {show(str(exc))[1:-1]}.",
                           field=what) from None
    if not isinstance(data, dict):
        raise invalid(f"{path}", f"hold {holds}", type(data).__name__)
    return data, node


def _located(exc: InvalidInput, path: Path, node: Node | None,
             prefix: list[str], years: Any = None) -> InvalidInput:
    field = exc.field or ""
    parts = prefix + [p for p in field.split(".") if p]
    first = years[0] if isinstance(years, list) and years and _whole(years[0]) else None
    line = _line_of(node, parts, first)
    where = f"{path}" + (f", line {line}" if line else "")
    head, *items = str(exc).split("\n  ")  # several problems: each item gets the prefix
    lead = ".".join(prefix) + "." if prefix else ""
    text = f"{head}\n  " + "\n  ".join(lead + i for i in items) if items else lead + head
    return InvalidInput(f"{where}: {text}", field=".".join(parts))


def _whole(value: Any) -> bool:
    return isinstance(value, int) and not isinstance(value, bool)


def _years(years: Any) -> Any:
    """Plan-file checks of ``years`` (first/last or a list) before the plan sees them."""
    if isinstance(years, dict):
        if set(years) != {"first", "last"}:
            raise invalid("years", "be a list or have exactly first and last", sorted(years))
        first, last = years["first"], years["last"]
        if not (_whole(first) and _whole(last)):
            raise invalid("years", "have whole years for first and last (not true/false, "
                          "on/off, yes/no or decimals)", years)
        if last < first:
            raise invalid("years", "have first <= last", years)
        if last - first > MAX_YEARS:
            raise invalid("years", f"span at most {MAX_YEARS} years", f"{first}..{last}")
        return list(range(first, last + 1))
    if isinstance(years, list):
        bad = [y for y in years if not _whole(y)]
        if bad:
            raise invalid("years", "hold whole years (not true/false, on/off, yes/no or "
                          "decimals)", bad[0])
        if len(years) > MAX_YEARS + 1 or (years and max(years) - min(years) > MAX_YEARS):
            raise invalid("years", f"span at most {MAX_YEARS} years",
                          f"{min(years)}..{max(years)}")
    return years


def load_plan_file(path: str | os.PathLike[str], *, allow_outside: bool = False) -> Plan:
    """Read a plan file and its tables into a validated :class:`Plan`.

    The file's ``solve:`` settings travel with the plan
    (:attr:`Plan.solve_options`) and :meth:`Plan.solve` uses them, so
    ``load_plan_file(path).solve()`` solves as ``growthplan solve path`` does.

    Parameters
    ----------
    path : path
        A ``.yaml``, ``.yml`` or ``.toml`` plan file.
    allow_outside : bool, default False
        Read tables outside the plan file's folder. By default a table path
        must stay in that folder or below it (after following symbolic
        links), so a plan file received from someone else cannot make the
        library read arbitrary files.

    Returns
    -------
    Plan
        With the file's solver settings in ``plan.solve_options``.

    Raises
    ------
    InvalidInput
        Naming the file, the field and (for YAML) the line.
    """
    plan, options = read_plan_file(path, allow_outside=allow_outside)
    plan._solve_options = options.model_dump()
    return plan


def read_plan_file(path: str | os.PathLike[str], *,
                   allow_outside: bool = False) -> tuple[Plan, SolveOptions]:
    """Read a plan file into a validated :class:`Plan` and its solver settings apart.

    Parameters
    ----------
    path : path
        A ``.yaml``, ``.yml`` or ``.toml`` plan file.
    allow_outside : bool, default False
        Read tables outside the plan file's folder. By default a table path
        must stay in that folder or below it (after following symbolic
        links), so a plan file received from someone else cannot make the
        library read arbitrary files.

    Returns
    -------
    (plan, solve_options)

    Raises
    ------
    InvalidInput
        Naming the file, the field and (for YAML) the line.

    Examples
    --------
    The demo's plan file (Arvenna, an invented economy) and its settings:

    >>> from growthplan.demo import DEMO_DIR
    >>> plan, options = read_plan_file(DEMO_DIR / "plan.yaml")
    >>> plan.economy.n, plan.years[0], plan.years[-1], options.method
    (10, 2027, 2041, 'auto')
    >>> result = plan.solve(solver=options)  # doctest: +SKIP
    """
    path = Path(path)
    data, node = _read(path)
    try:
        spec = PlanFile.model_validate(data)
    except InvalidInput as exc:
        raise _located(exc, path, node, []) from None
    fields = dict(spec.plan)
    try:
        if "years" in fields:
            fields["years"] = _years(fields["years"])
    except InvalidInput as exc:
        raise _located(exc, path, node, ["plan"]) from None
    base = path.parent
    try:
        base_resolved = base.resolve()
    except (OSError, RuntimeError) as exc:
        raise invalid("plan file", "be in a folder that can be reached", str(path),
                      hint=str(exc)) from None
    tables = spec.economy

    def ref(name: str | None, field: str) -> Path | None:
        if name is None:
            return None
        if "\0" in name:
            raise _located(invalid(field, "be a file name", name), path, node, ["economy"])
        target = base / name
        if not allow_outside:
            try:
                resolved = target.resolve()
            except (OSError, RuntimeError) as exc:  # a symbolic link loop
                raise _located(invalid(field, "name a reachable table file", name,
                                       hint=f"({exc})"), path, node, ["economy"]) from None
            if resolved != base_resolved and base_resolved not in resolved.parents:
                raise _located(invalid(field, "name a table in the plan file's folder or "
                                       "below it (load_plan_file(..., allow_outside=True) "
                                       "reads others)", name), path, node, ["economy"])
        if not os.path.lexists(target):
            raise _located(invalid(field, "name an existing table file (relative to the plan "
                                   "file)", name), path, node, ["economy"])
        return target

    try:
        if tables.flows is not None:
            econ = Economy.from_tables(
                ref(tables.flows, "flows"), capital=ref(tables.capital, "capital"),
                capital_stocks=ref(tables.capital_stocks, "capital_stocks"),
                capital_coefficients=ref(tables.capital_coefficients, "capital_coefficients"),
                consumption_basket=tables.consumption_basket, wage_basket=tables.wage_basket)
        else:
            econ = economy_from_coefficients(
                ref(tables.input_coefficients, "input_coefficients"),
                capital=ref(tables.capital, "capital"),
                capital_coefficients=ref(tables.capital_coefficients, "capital_coefficients"),
                labour_coefficients=ref(tables.labour_coefficients, "labour_coefficients"),
                consumption_basket=tables.consumption_basket, wage_basket=tables.wage_basket)
        econ = with_units(econ, tables)
    except InvalidInput as exc:
        if str(exc).startswith(str(path)):
            raise
        raise InvalidInput(f"{path}: economy tables: {exc}", field=exc.field) from None
    sat = fields.get("satellite")
    if isinstance(sat, dict) and "table" in sat:
        try:
            fields["satellite"] = _satellite_table(sat, econ, base, allow_outside)
        except InvalidInput as exc:
            raise _located(exc, path, node, ["plan", "satellite"]) from None
    try:
        plan = Plan(economy=econ, **fields)
    except InvalidInput as exc:
        raise _located(exc, path, node, ["plan"], fields.get("years")) from None
    except TypeError as exc:
        raise InvalidInput(f"{path}: plan: {show(str(exc))[1:-1]}", field="plan") from None
    if spec.uncertainty is not None:
        try:
            spec.uncertainty.check(plan)
        except InvalidInput as exc:
            raise _located(exc, path, node, ["uncertainty"]) from None
    return plan, spec.solve


SATELLITE_TABLE_KEYS = {"table", "units", "flows", "households", "impacts", "resources"}


def _satellite_table(section: dict[str, Any], econ: Economy, base: Path,
                     allow_outside: bool) -> Any:
    """The ``satellite`` section given as a table: ``table`` (a file name, or a layout
    mapping for the long layout), ``units`` by stressor, ``flows: true`` when the table
    holds base-year flows (divided by the economy's base-year output), ``households``,
    ``impacts`` and ``resources``."""
    from ..model.satellite import Impact
    from ..statistics.layouts import TableLayout
    from ..statistics.satellite import read_satellite

    unknown = sorted(set(section) - SATELLITE_TABLE_KEYS)
    if unknown:
        raise invalid(f"satellite.{unknown[0]}", "be one of "
                      f"{', '.join(sorted(SATELLITE_TABLE_KEYS))}", unknown[0],
                      hint=suggest(unknown[0], sorted(SATELLITE_TABLE_KEYS), sentence=True))
    table = section["table"]
    layout = TableLayout.model_validate(table if isinstance(table, dict)
                                        else {"file": str(table)})
    target = (base / layout.file)
    if not allow_outside:
        try:
            resolved, root = target.resolve(), base.resolve()
        except (OSError, RuntimeError) as exc:
            raise invalid("satellite.table", "name a reachable table file", layout.file,
                          hint=f"({exc})") from None
        if resolved != root and root not in resolved.parents:
            raise invalid("satellite.table", "name a table in the plan file's folder or "
                          "below it", layout.file)
    output = None
    if section.get("flows"):
        if econ.base_output is None:
            raise invalid("satellite.flows", "come with the economy's base-year output "
                          "(flows tables carry it)", True)
        output = dict(zip(econ.names, econ.base_output, strict=True))
    units = section.get("units")
    if not isinstance(units, dict):
        raise invalid("satellite.units", "map every stressor of the table to its unit", units)
    impacts = [Impact.model_validate(i) for i in section.get("impacts") or []]
    return read_satellite(layout, units=units, output=output,
                          households=section.get("households"), impacts=impacts,
                          resources=section.get("resources"), base=base)


def load_uncertainty(path: str | os.PathLike[str]) -> UncertaintySpec | None:
    """The plan file's ``uncertainty`` section (None when it has none).

    Only the section is read and validated here; :func:`load_plan_file`
    checks its selections against the plan (every named sector, labour kind
    or traded good must exist), so load the plan first.

    Parameters
    ----------
    path : path
        A ``.yaml``, ``.yml`` or ``.toml`` plan file.

    Returns
    -------
    UncertaintySpec or None
        Its items, seed and number of draws.

    Raises
    ------
    InvalidInput
        Naming the file, the field and (for YAML) the line.
    """
    path = Path(path)
    data, node = _read(path)
    section = data.get("uncertainty")
    if section is None:
        return None
    try:
        return UncertaintySpec.model_validate(section)
    except InvalidInput as exc:
        raise _located(exc, path, node, ["uncertainty"]) from None


def plan_file_inputs(path: str | os.PathLike[str]) -> list[Path]:
    """The plan file and the table files it names: what an export must never overwrite.

    Pass the list as ``protect=`` to :func:`~growthplan.io.atomic_file` and
    :func:`~growthplan.io.atomic_folder`, so results written next to a plan
    cannot replace its inputs.

    Raises
    ------
    InvalidInput
        When the plan file cannot be read or has no valid ``economy`` section.
    """
    path = Path(path)
    data, node = _read(path)
    try:
        tables = EconomyTables.model_validate(data.get("economy"))
    except InvalidInput as exc:
        raise _located(exc, path, node, ["economy"]) from None
    names = [getattr(tables, f) for f in _TABLE_FIELDS]
    sat = (data.get("plan") or {}).get("satellite") if isinstance(data.get("plan"), dict) \
        else None
    if isinstance(sat, dict) and isinstance(sat.get("table"), str | dict):
        table = sat["table"]
        name = table.get("file") if isinstance(table, dict) else table
        if isinstance(name, str):
            names.append(name)
    return [path, *(path.parent / n for n in names if n is not None)]


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


def _is_default(value: Any, info: Any) -> bool:
    """Whether a field holds its default (then a plan file leaves it out)."""
    from pydantic_core import PydanticUndefined

    if info.default_factory is not None:
        default = info.default_factory()
    elif info.default is PydanticUndefined:
        return False
    else:
        default = info.default
    try:
        return bool(type(value) is type(default) and value == default) or (
            value is None and default is None)
    except (TypeError, ValueError):  # arrays and frames: never a default
        return False


def _compact(value: Any) -> Any:
    """A model as a plan file writes it: defaults left out, the kind of an objective kept."""
    from pydantic import BaseModel

    from ..model.objectives import Objective
    from ..model.satellite import Budget, Cap, IntensityCeiling

    if isinstance(value, BaseModel):
        out = {}
        for name, info in type(value).model_fields.items():
            v = getattr(value, name)
            keep = name == "kind" and isinstance(value, Objective | Cap | Budget
                                                 | IntensityCeiling)  # the tag is never implied
            if keep or not _is_default(v, info):
                out[name] = _compact(v)
        return out
    if isinstance(value, list | tuple):
        return [_compact(v) for v in value]
    if isinstance(value, dict):
        return {k: _compact(v) for k, v in value.items()}
    return _plain(value)


def _plan_section(plan: Plan) -> dict[str, Any]:
    """The ``plan`` section: defaults left out, years as first and last, one labour
    supply as a mapping."""
    fields = {k: v for k, v in _compact(plan).items()
              if k != "economy" and v not in (None, [], {})}
    years = list(plan.years)
    if years == list(range(years[0], years[-1] + 1)):
        fields["years"] = {"first": years[0], "last": years[-1]}
    if len(fields.get("labour", [])) == 1:
        fields["labour"] = fields["labour"][0]
    return fields


def save_plan_file(plan: Plan, path: str | os.PathLike[str], *, overwrite: bool = False,
                   solve: SolveOptions | None = None, force: bool = False) -> Path:
    """Write ``plan`` as a YAML plan file with its coefficient tables beside it.

    The tables are ``<stem>_input_coefficients.csv``, ``<stem>_capital_coefficients.csv``,
    ``<stem>_labour_coefficients.csv`` and ``<stem>_capital.csv`` in the file's folder;
    :func:`load_plan_file` reads the set back into an equal plan. Nothing is
    overwritten without ``overwrite=True``, and the files appear together or
    not at all (see :mod:`growthplan.io.atomic`).

    Parameters
    ----------
    plan : Plan
        The plan to write, economy included.
    path : str or path-like
        The plan file; must end in ``.yaml`` or ``.yml``.
    overwrite : bool, default False
        Replace the plan file and tables if they exist and the library wrote
        them (the plan file's second line is the mark; the tables are in the
        folder's record, :mod:`growthplan.io.marks`).
    solve : SolveOptions, optional
        Solver settings stored in the file's ``solve`` section (method, time
        limit, threads, tolerance); default the library's defaults.
    force : bool, default False
        With ``overwrite``, replace files the library did not write too.

    Notes
    -----
    The file is written compactly: fields that hold their defaults are left
    out, ``years`` is written as ``{first, last}`` and one labour supply as a
    mapping, as a person would write them.

    Returns
    -------
    Path
        The plan file written.
    """
    path = Path(path)
    if path.suffix.lower() not in (".yaml", ".yml"):
        raise invalid("path", "end in .yaml or .yml", str(path))
    econ = plan.economy
    frames = _coefficient_frames(econ, f"{path.stem}_")
    economy: dict[str, Any] = {key: name for key, (name, _) in frames.items()}
    if econ.consumption_basket is not None:
        economy["consumption_basket"] = dict(zip(econ.names, econ.consumption_basket.tolist(),
                                                 strict=True))
    if econ.wage_basket is not None:
        economy["wage_basket"] = dict(zip(econ.names, econ.wage_basket.tolist(), strict=True))
    if econ.value_unit != type(econ).model_fields["value_unit"].default:
        economy["value_unit"] = econ.value_unit
    if econ.labour_units:
        economy["labour_units"] = list(econ.labour_units)
    if any(sec.unit for sec in econ.sectors):
        economy["units"] = {sec.name: sec.unit for sec in econ.sectors if sec.unit}
    if any(sec.price != 1.0 for sec in econ.sectors):
        economy["prices"] = {sec.name: sec.price for sec in econ.sectors}
    if econ.base_output is not None:
        economy["base_output"] = dict(zip(econ.names, econ.base_output.tolist(), strict=True))
    doc = {"economy": economy, "plan": _plan_section(plan)}
    settings = _compact(solve or SolveOptions())
    if settings:
        doc["solve"] = settings
    targets = [path, *(path.parent / name for name, _ in frames.values())]
    with atomic_files(targets, overwrite=overwrite, force=force) as (plan_tmp, *table_tmps):
        for (key, (_, frame)), tmp in zip(frames.items(), table_tmps, strict=True):
            _write_csv(key, frame, tmp)
        plan_tmp.write_text("# growthplan plan file\n" + comment_line(".yaml")
                            + yaml.safe_dump(doc, sort_keys=False, allow_unicode=True),
                            encoding="utf-8")
    return path
