"""Shared validation machinery: the base model, array fields, label alignment.

Pydantic does the field-level work; this module turns its errors into the
library's one message template ("field must rule. Got value.") and raises
them as :class:`~growthplan.errors.InvalidInput`, so no raw pydantic error
reaches the user.
"""

from __future__ import annotations

import re
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
)

from .errors import GrowthplanError, InvalidInput, invalid, show


class Rule(ValueError):
    """Raised inside validators; carries the rule so the path can be added later."""

    def __init__(self, rule: str, value: Any, *, field: str | None = None, hint: str = ""):
        super().__init__(rule)
        self.rule, self.value, self.field, self.hint = rule, value, field, hint


def _loc(parts: Sequence[Any]) -> str:
    return ".".join(str(p) for p in parts if p != "__root__")


def translate(exc: ValidationError, model: str) -> GrowthplanError:
    """Turn a pydantic ValidationError into one growthplan error (all problems listed)."""
    messages: list[str] = []
    first_field: str | None = None
    for err in exc.errors(include_url=False):
        loc = _loc(err.get("loc", ()))
        cause = (err.get("ctx") or {}).get("error")
        if type(cause) is InvalidInput:  # raised by a nested model: add the path
            field = ".".join(p for p in (loc, cause.field) if p)
            text = f"{loc}.{cause}" if loc else str(cause)
        elif isinstance(cause, GrowthplanError) and not isinstance(cause, Rule):
            return cause  # a domain error with its own type (e.g. UnproductiveEconomy)
        elif isinstance(cause, Rule):
            field = ".".join(p for p in (loc, cause.field) if p) or model
            text = str(invalid(field, cause.rule, cause.value, hint=cause.hint))
        elif err["type"] == "missing":
            field = loc or model
            text = f"{field} is required. Got nothing."
        elif err["type"] == "extra_forbidden":
            field = loc
            text = f"{field} is not a field of {model}. Got {show(err.get('input'))}."
        else:
            field = loc or model
            rule = err["msg"][0].lower() + err["msg"][1:]
            rule = rule.replace("input should be", "be").replace("value error, ", "")
            rule = re.sub(r"'([^']{60})[^']+'", r"'\1...'", rule)  # a quoted input, shortened
            text = f"{field} must {rule}. Got {show(err.get('input'))}."
        first_field = first_field or field
        messages.append(text)
    message = messages[0] if len(messages) == 1 else (
        f"{len(messages)} problems in {model}:\n  " + "\n  ".join(messages))
    return InvalidInput(message, field=first_field)


class Model(BaseModel):
    """Base of every growthplan model: strict fields, growthplan errors."""

    model_config = ConfigDict(extra="forbid", arbitrary_types_allowed=True, frozen=True,
                              validate_default=True)

    def __init__(self, /, **data: Any) -> None:
        try:
            super().__init__(**data)
        except ValidationError as exc:
            raise translate(exc, type(self).__name__) from None

    @classmethod
    def model_validate(cls, obj: Any, *args: Any, **kwargs: Any) -> Self:
        try:
            return super().model_validate(obj, *args, **kwargs)
        except ValidationError as exc:
            raise translate(exc, cls.__name__) from None

    @classmethod
    def model_validate_json(cls, json_data: Any, *args: Any, **kwargs: Any) -> Self:
        try:
            return super().model_validate_json(json_data, *args, **kwargs)
        except ValidationError as exc:
            raise translate(exc, cls.__name__) from None


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


def raise_plain(exc: Rule, field: str) -> InvalidInput:
    """A Rule raised outside pydantic, formatted with its field."""
    return invalid(".".join(p for p in (field, exc.field) if p), exc.rule, exc.value,
                   hint=exc.hint)
