"""Names of a package loaded on first use (the door's and each layer's
``__getattr__``), so that importing a package costs nothing until a name is
touched."""

from __future__ import annotations

import importlib
from collections.abc import Mapping
from typing import Any

__all__ = ["attribute"]

# a public name -> the submodule that holds it (same attribute name), or
# (submodule, attribute), with None for the submodule itself
Table = Mapping[str, "str | tuple[str, str | None]"]


def attribute(package: str, name: str, table: Table, namespace: dict[str, Any]) -> Any:
    """Load ``name`` of ``package`` from the submodule ``table`` names and keep it.

    Parameters
    ----------
    package : str
        The package's ``__name__``.
    name : str
        The attribute asked for.
    table : mapping
        Public name -> submodule, or (submodule, attribute or None).
    namespace : dict
        The package's ``globals()``: the loaded value is kept there, so the
        next access does not come back here.

    Returns
    -------
    object
        The module or attribute.
    """
    where = table.get(name)
    if where is None:
        raise AttributeError(f"module {package!r} has no attribute {name!r}")
    module_name, attr = (where, name) if isinstance(where, str) else where
    module = importlib.import_module(f"{package}.{module_name}")
    value = module if attr is None else getattr(module, attr)
    namespace[name] = value
    return value
