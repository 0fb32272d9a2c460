"""The published JSON Schema of plan files: what a file may hold, each field described.

Pydantic writes the skeleton from the models; this module makes it say what
the loader accepts (``years`` as first and last, one labour supply as a
mapping) and fills every property's description from the models' own
numpydoc ``Parameters`` sections, so the schema and the API reference cannot
drift apart.
"""

from __future__ import annotations

import inspect
import re
from typing import Any

__all__ = ["describe", "field_docs"]

# Fields the models' docstrings leave out (the objectives' shared fields and
# the composite objectives' parts); a model's own ``Parameters`` come first.
_EXTRA = {
    "Consumption": {
        "population_growth": "Yearly growth rate of a population given as a number.",
    },
    "WeightedTerm": {
        "objective": "A simple objective (a mapping with its kind).",
        "weight": "Its weight, > 0; weights carry the units of the objectives.",
    },
    "Weighted": {
        "terms": "The weighted objectives, at least one: each a mapping of objective "
                 "and weight.",
    },
    "Lexicographic": {
        "objectives": "The objectives in order of priority, at least one.",
        "tolerance": "How far, relative, each earlier optimum may give way, in [0, 1) "
                     "(default 1e-6).",
    },
    "Fastest": {
        "max_years": "The longest horizon searched, in whole years (1 to 500).",
        "then": "The objective the shortest feasible plan is solved with (default "
                "terminal_capacity).",
    },
    "Cap": {"kind": "Always cap: a yearly ceiling (or a falling path)."},
    "Budget": {"kind": "Always budget: a cumulative budget over the plan or a window."},
    "IntensityCeiling": {"kind": "Always intensity: a ceiling per unit of GDP."},
    "Objective": {
        "kind": "Which objective: terminal_capacity, discounted_consumption, least_labour, "
                "least_foreign_exchange, weighted, lexicographic or fastest.",
        "sense": "Maximised or minimised; set by the kind (leave it out).",
    },
}


def field_docs(cls: type) -> dict[str, str]:
    """Descriptions of a class's fields from the numpydoc ``Parameters`` of it and its bases.

    Parameters
    ----------
    cls : type
        A documented class.

    Returns
    -------
    dict of str to str
        Field name to its description (one line).
    """
    docs: dict[str, str] = {}
    for klass in reversed(cls.__mro__):
        docs.update(_EXTRA.get(klass.__name__, {}))
        docs.update({k: v for k, v in _parameters(klass.__dict__.get("__doc__") or "").items()
                     if v})  # a parameter documented by its type only keeps the text above
    return docs


def _parameters(doc: str) -> dict[str, str]:
    lines = inspect.cleandoc(doc).splitlines()
    out: dict[str, str] = {}
    try:
        start = next(i for i, ln in enumerate(lines[:-1]) if ln.strip() == "Parameters"
                     and set(lines[i + 1].strip()) == {"-"}) + 2
    except StopIteration:
        return out
    names: list[str] = []
    text: list[str] = []

    def flush() -> None:
        for n in names:
            out[n] = " ".join(text)
    for i in range(start, len(lines)):
        line = lines[i]
        if i + 1 < len(lines) and line.strip() and set(lines[i + 1].strip()) == {"-"}:
            break  # the next section
        if line and not line[0].isspace():
            flush()
            head = line.partition(" : ")[0]
            names = [n.strip() for n in head.split(",") if n.strip()]
            text = []
        elif line.strip():
            text.append(line.strip())
    flush()
    return {k: _plain(v) for k, v in out.items()}


def _plain(text: str) -> str:
    """Docstring markup as plain text: ``code`` and :role:`target` lose their marks."""
    text = re.sub(r":\w+:`~?([^`]+)`", lambda m: m.group(1).rsplit(".", 1)[-1], text)
    return text.replace("``", "")


def _summary(cls: type) -> str:
    doc = inspect.cleandoc(cls.__doc__ or "")
    return _plain(" ".join(doc.split("\n\n")[0].split()))


def _refs(node: Any, found: set[str]) -> None:
    if isinstance(node, dict):
        for key, value in node.items():
            if key == "$ref" and isinstance(value, str):
                found.add(value.rsplit("/", 1)[-1])
            else:
                _refs(value, found)
    elif isinstance(node, list):
        for value in node:
            _refs(value, found)


def describe(schema: dict[str, Any], classes: dict[str, type]) -> dict[str, Any]:
    """Drop definitions nothing refers to; give every definition and property its text.

    Parameters
    ----------
    schema : dict
        A JSON Schema with ``$defs``; changed in place.
    classes : dict of str to type
        The class behind each definition (and ``""`` for the schema itself).

    Returns
    -------
    dict
        ``schema``.
    """
    defs = schema.get("$defs", {})
    used: set[str] = set()
    _refs({k: v for k, v in schema.items() if k != "$defs"}, used)
    while True:
        more = set(used)
        for name in used:
            _refs(defs.get(name, {}), more)
        if more == used:
            break
        used = more
    for name in [n for n in defs if n not in used]:
        del defs[name]
    for name, node in [("", schema), *defs.items()]:
        cls = classes.get(name)
        if cls is None:
            continue
        node["description"] = _summary(cls)
        docs = field_docs(cls)
        for prop, sub in node.get("properties", {}).items():
            sub.pop("title", None)
            if prop in docs:
                sub["description"] = docs[prop]
    return schema
