"""Shared validation machinery: the base model, array fields, label alignment.

Pydantic does the field-level work; this module turns its errors into the
library's one message template ("field must rule. Got value.") and raises
them as :class:`~growthplan.errors.InvalidInput`, so no raw pydantic error
reaches the user.
"""

from __future__ import annotations

import re
import typing
import unicodedata
from collections.abc import Sequence
from typing import Annotated, Any, Self

import numpy as np
import pandas as pd
from pydantic import (
    BaseModel,
    ConfigDict,
    PlainSerializer,
    PlainValidator,
    ValidationError,
    WithJsonSchema,
    model_validator,
)

from ..errors import GrowthplanError, InvalidInput, invalid, show, suggest
from ..limits import LABEL_MAX_CHARS


class Rule(ValueError):
    """Raised inside validators; carries the rule so the path can be added later."""

    def __init__(self, rule: str, value: Any, *, field: str | None = None, hint: str = ""):
        super().__init__(rule)
        self.rule, self.value, self.field, self.hint = rule, value, field, hint


_MISSING = object()
_WHOLE = re.compile(r"^([A-Z]\w*) must ")  # a message about a whole model, by class name
# pydantic's names for the members of a union ("float", "function-after[...]", a class)
_TYPE_TAG = re.compile(r"^[\w-]+\[.*\]$|^[A-Z]\w*$|^(float|int|str|bool|none|list|dict|tuple"
                       r"|set|decimal|bytes)$")


def _step(node: Any, part: Any) -> Any:
    """The child of ``node`` that ``part`` names in the user's own data, or ``_MISSING``."""
    if isinstance(node, dict):
        keys: list[Any] = [part, str(part)]
        if isinstance(part, str) and part.isdigit():
            keys.append(int(part))  # a year key written as a number
        for key in keys:
            if key in node:
                return node[key]
        return _MISSING
    if isinstance(node, list | tuple) and isinstance(part, int) and 0 <= part < len(node):
        return node[part]
    return _MISSING


def _path(loc: Sequence[Any], data: Any = _MISSING, missing: bool = False) -> str:
    """The dotted path of an error as the user wrote it.

    Pydantic's location also holds the tag of a union member (``terminal_capacity``,
    ``float``, a class name) that is no key of the user's data; following the
    data leaves those out, and a one-item wrapper (one labour supply given as
    a mapping) is not counted. With ``missing`` the last part is a field the
    data lacks.
    """
    parts: list[str] = []
    node = data
    seen = data is not _MISSING
    for i, part in enumerate(loc):
        if part == "__root__":
            continue
        if seen and isinstance(node, dict | list | tuple):
            child = _step(node, part)
            if child is _MISSING:
                if missing and i == len(loc) - 1 and isinstance(node, dict):
                    parts.append(str(part))  # a field that is missing
                continue
            parts.append(str(part))
            node = child
        elif seen and (node is None or isinstance(node, str | bytes | int | float | bool)):
            continue  # below a plain value only union tags follow
        else:
            seen = False
            if not (isinstance(part, str) and _TYPE_TAG.match(part)):
                parts.append(str(part))
    return ".".join(parts)


def _loc(parts: Sequence[Any]) -> str:
    return _path(parts)


def _tags(ctx: dict[str, Any]) -> list[str]:
    return re.findall(r"'([^']*)'", str(ctx.get("expected_tags") or ctx.get("expected") or ""))


def _members(annotation: Any) -> list[Any]:
    """Every type named in an annotation (union members, list and dict items)."""
    out, stack = [], [annotation]
    while stack:
        t = stack.pop()
        args = typing.get_args(t)
        if args:
            stack.extend(reversed(args))  # popped in the order written
        else:
            out.append(t)
    return out


def _kinds(root: type | None, name: str, key: str) -> list[str]:
    """The tags (``key`` values) a union field called ``name`` accepts, found in the
    models reachable from ``root``."""
    stack: list[Any] = [root]
    seen: set[Any] = set()
    while stack:
        cls = stack.pop()
        if cls in seen or not (isinstance(cls, type) and issubclass(cls, BaseModel)):
            continue
        seen.add(cls)
        for field, info in cls.model_fields.items():
            models = [m for m in _members(info.annotation)
                      if isinstance(m, type) and issubclass(m, BaseModel)]
            tags = [str(m.model_fields[key].default) for m in models if key in m.model_fields]
            if field == name and tags:
                return tags
            stack.extend(models)
    return []


# pydantic error type -> the library's rule (its context fills the braces)
_RULES = {
    "float_parsing": "be a number", "float_type": "be a number",
    "int_parsing": "be a whole number", "int_type": "be a whole number",
    "int_from_float": "be a whole number", "bool_parsing": "be true or false",
    "bool_type": "be true or false", "string_type": "be text",
    "dict_type": "be a mapping", "model_type": "be a mapping of its fields",
    "model_attributes_type": "be a mapping of its fields", "list_type": "be a list",
    "tuple_type": "be a list", "set_type": "be a list",
    "finite_number": "be a finite number (not inf or NaN)",
    "greater_than": "be greater than {gt}", "greater_than_equal": "be at least {ge}",
    "less_than": "be less than {lt}", "less_than_equal": "be at most {le}",
    "too_short": "hold at least {min_length} item(s)",
    "too_long": "hold at most {max_length} item(s)",
    "none_required": "be left out",
}


def _message(err: Any, loc: str, model: str, cls: type | None = None) -> tuple[str, str]:
    """One pydantic error in the library's words: (field, message)."""
    kind = err["type"]
    ctx = err.get("ctx") or {}
    value = err.get("input")
    if kind == "missing":
        field = loc or model
        return field, f"{field} must be given. Got nothing."
    if kind == "extra_forbidden":
        return loc, f"{loc} must be a known field. Got {show(value)}."
    if kind in ("union_tag_invalid", "union_tag_not_found", "literal_error"):
        key = ctx.get("discriminator", "").strip("'")
        tags = _tags(ctx) or _kinds(cls, loc.rsplit(".", 1)[-1], key)
        field = ".".join(p for p in (loc or model, key) if p)
        choices = ", ".join(repr(t) for t in tags)
        if kind == "union_tag_not_found":
            return field, f"{field} must be given{': one of ' + choices if tags else ''}. " \
                "Got nothing."
        got = ctx.get("tag", value)
        hint = suggest(got, tags, sentence=True)
        return field, f"{field} must be one of {choices}. Got {show(got)}." + (
            f" {hint}" if hint else "")
    field = loc or model
    if kind in _RULES:
        rule = _RULES[kind].format(**{k: show(v) for k, v in ctx.items()})
    else:  # a rule pydantic words: keep its content, not its voice
        rule = err["msg"][0].lower() + err["msg"][1:]
        rule = re.sub(r"^(input should be|value error, )", lambda m: "be " if
                      m.group(1).startswith("input") else "", rule)
        rule = rule.replace(" valid ", " ")
        rule = re.sub(r"'([^']{60})[^']+'", r"'\1...'", rule)  # a quoted input, shortened
    return field, f"{field} must {rule}. Got {show(value)}."


def translate(exc: ValidationError, model: str, data: Any = _MISSING,
              cls: type | None = None) -> GrowthplanError:
    """Turn a pydantic ValidationError into one growthplan error (all problems listed).

    Parameters
    ----------
    exc : ValidationError
    model : str
        What was validated, for an error about the whole of it.
    data : optional
        The input, so that field paths follow the user's own keys.
    cls : type, optional
        The model validated, where the choices of a missing tag are looked up.
    """
    messages: list[str] = []
    first_field: str | None = None
    for err in exc.errors(include_url=False):
        loc = _path(err.get("loc", ()), data, missing=err["type"] == "missing")
        cause = (err.get("ctx") or {}).get("error")
        if type(cause) is InvalidInput:  # raised by a nested model: add the path
            field = ".".join(p for p in (loc, cause.field) if p)
            text = str(cause)
            whole = _WHOLE.match(text)
            if whole and loc and not cause.field:  # about the whole nested model: its path
                text = loc + text[whole.end(1):]  # replaces its class name
            elif loc:
                head, *items = text.split("\n  ")
                if items and re.fullmatch(r"\d+ problems:", head):  # each one gets the path
                    messages.extend(f"{loc}.{i}" for i in items[:-1])
                    text = items[-1]
                text = f"{loc}.{text}"
        elif isinstance(cause, GrowthplanError) and not isinstance(cause, Rule):
            return cause  # a domain error with its own type (e.g. UnproductiveEconomy)
        elif isinstance(cause, Rule):
            field = ".".join(p for p in (loc, cause.field) if p)
            text = str(invalid(field or model, cause.rule, cause.value, hint=cause.hint))
        else:
            field, text = _message(err, loc, model, cls)
            field = "" if field == model else field
        first_field = first_field or field
        messages.append(text)
    message = messages[0] if len(messages) == 1 else (
        f"{len(messages)} problems:\n  " + "\n  ".join(messages))
    return InvalidInput(message, field=first_field or None)


def unknown_keys(data: dict[Any, Any], names: list[str], *,
                 more: list[InvalidInput] | None = None) -> None:
    """Refuse the keys of ``data`` not in ``names`` (and the problems in ``more``),
    all in one error, so a second misspelt key shows with the first.

    Parameters
    ----------
    data : dict
    names : list of str
        The known keys.
    more : list of InvalidInput, optional
        Other problems found with these, listed after them.
    """
    problems = []
    for k in (k for k in data if k not in names):
        hint = suggest(k, names)
        problems.append(Rule(f"be a known field ({hint})" if hint else
                             f"be a known field (one of {', '.join(names)})", k,
                             field=str(k)))
    if len(problems) == 1 and not more:
        raise problems[0]
    found = [invalid(str(p.field), p.rule, p.value) for p in problems] + (more or [])
    if len(found) == 1:
        raise found[0]
    if found:
        raise InvalidInput(f"{len(found)} problems:\n  " + "\n  ".join(map(str, found)),
                           field=found[0].field)


class Model(BaseModel):
    """Base of every growthplan model: strict fields, growthplan errors."""

    model_config = ConfigDict(extra="forbid", arbitrary_types_allowed=True, frozen=True,
                              validate_default=True)

    def __init__(self, /, **data: Any) -> None:
        try:
            super().__init__(**data)
        except ValidationError as exc:
            raise translate(exc, type(self).__name__, data, type(self)) from None

    @model_validator(mode="before")
    @classmethod
    def _known_fields(cls, data: Any) -> Any:
        """Refuse unknown keys first, every one at once, each with the known field it
        most likely meant."""
        if isinstance(data, dict):
            unknown_keys(data, list(cls.model_fields))
        return data

    @classmethod
    def model_validate(cls, obj: Any, *args: Any, **kwargs: Any) -> Self:
        try:
            return super().model_validate(obj, *args, **kwargs)
        except ValidationError as exc:
            raise translate(exc, cls.__name__, obj, cls) from None

    @classmethod
    def model_validate_json(cls, json_data: Any, *args: Any, **kwargs: Any) -> Self:
        try:
            return super().model_validate_json(json_data, *args, **kwargs)
        except ValidationError as exc:
            raise translate(exc, cls.__name__, cls=cls) from None


def to_float_array(value: Any, ndim: int | None = None) -> np.ndarray:
    """Copy ``value`` into a read-only float array, refusing text, NaN and inf."""
    if isinstance(value, pd.DataFrame | pd.Series):
        value = value.to_numpy()
    try:
        arr = np.array(value, dtype=float, copy=True)
    except (TypeError, ValueError):
        raise Rule("hold numbers only", value) from None
    if ndim is not None and arr.ndim != ndim:
        if not (ndim == 2 and arr.ndim == 1 and arr.size == 0):
            raise Rule(f"be {ndim}-dimensional", f"shape {arr.shape}")
    if not np.all(np.isfinite(arr)):
        bad = np.argwhere(~np.isfinite(arr))[0].tolist()
        raise Rule("hold finite numbers only (no NaN or inf)",
                   f"{arr[tuple(bad)]} at position {tuple(bad)}")
    arr.setflags(write=False)
    return arr


def _json_list(arr: np.ndarray) -> list[Any]:
    return arr.tolist()


Matrix = Annotated[
    np.ndarray,
    PlainValidator(lambda v: to_float_array(v, 2)),
    PlainSerializer(_json_list, return_type=list),
    WithJsonSchema({"type": "array", "items": {"type": "array", "items": {"type": "number"}}}),
]
Vector = Annotated[
    np.ndarray,
    PlainValidator(lambda v: to_float_array(v, 1)),
    PlainSerializer(_json_list, return_type=list),
    WithJsonSchema({"type": "array", "items": {"type": "number"}}),
]


def align_labels(labels: Sequence[Any], names: Sequence[str], field: str, axis: str) -> list[int]:
    """Positions that put ``labels`` in the order of ``names``; all must match, any order."""
    labels = [str(x) for x in labels]
    if len(set(labels)) != len(labels):
        dup = sorted({x for x in labels if labels.count(x) > 1})
        raise Rule(f"have unique {axis} labels", dup, field=field)
    missing = [n for n in names if n not in labels]
    unknown = [x for x in labels if x not in names]
    if missing or unknown:
        parts = []
        if missing:
            parts.append(f"missing {missing}")
        if unknown:
            parts.append(f"unknown {unknown}")
        raise Rule(f"have {axis} labels matching the sectors ({'; '.join(parts)})",
                   labels, field=field)
    pos = {x: i for i, x in enumerate(labels)}
    return [pos[n] for n in names]


def align_matrix(value: Any, names: list[str], field: str, rows: list[str] | None = None) -> Any:
    """Reorder a labelled DataFrame to ``rows`` × ``names``; pass other values through."""
    if isinstance(value, pd.DataFrame):
        cols = align_labels(value.columns, names, field, "column")
        row_names = names if rows is None else rows
        rws = align_labels(value.index, row_names, field, "row")
        return value.iloc[rws, cols].to_numpy()
    return value


def align_vector(value: Any, names: list[str], field: str) -> Any:
    if isinstance(value, pd.Series):
        return value.iloc[align_labels(value.index, names, field, "index")].to_numpy()
    if isinstance(value, dict):  # a mapping may leave out sectors: they get 0
        unknown = [str(k) for k in value if str(k) not in names]
        if unknown:
            raise Rule(f"name only sectors of the economy (unknown {unknown})",
                       sorted(map(str, value)), field=field)
        return [value.get(n, 0.0) for n in names]
    return value


def label_rule(text: str) -> str | None:
    """The rule a name breaks, or None: names reach every file the library writes.

    A control character (NUL, BEL, a newline, a tab) cannot be written to a
    workbook and breaks CSV rows and reports; a lone surrogate cannot be
    written as UTF-8; a name longer than :data:`~growthplan.limits.LABEL_MAX_CHARS`
    does not fit a workbook cell and would be cut.
    """
    if len(text) > LABEL_MAX_CHARS:
        return (f"be at most {LABEL_MAX_CHARS:,} characters (the most a workbook cell holds; "
                f"it has {len(text):,})")
    if any(unicodedata.category(c) in ("Cc", "Cs") for c in text):
        bad = next(c for c in text if unicodedata.category(c) in ("Cc", "Cs"))
        return f"hold no control characters (it holds {bad!r})"
    return None


def check_label(text: Any, field: str | None = None) -> Any:
    """``text`` unchanged when it is a usable name; raises :class:`Rule` otherwise."""
    if isinstance(text, str):
        rule = label_rule(text)
        if rule is not None:
            raise Rule(rule, text if len(text) <= 120 else text[:117] + "...", field=field)
    return text


def name_key(text: str) -> str:
    """What two names must not share: the same text up to case and Unicode normal
    form (``"Énergie"`` composed and decomposed, ``"energy"`` and ``"Energy"``)."""
    return unicodedata.normalize("NFKC", text).casefold()


def check_distinct(names: Sequence[str], field: str) -> None:
    """Refuse names that differ only by case or Unicode normal form (readers, file
    systems and workbooks take them for one)."""
    seen: dict[str, str] = {}
    for name in names:
        other = seen.setdefault(name_key(name), name)
        if other != name:
            raise Rule("differ by more than case or Unicode normal form", [other, name],
                       field=field)


def raise_plain(exc: Rule, field: str) -> InvalidInput:
    """A Rule raised outside pydantic, formatted with its field."""
    return invalid(".".join(p for p in (field, exc.field) if p), exc.rule, exc.value,
                   hint=exc.hint)
