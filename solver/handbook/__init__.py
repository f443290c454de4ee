"""The handbook component library: pure-component data for compounds by common name,
synonym, CAS number or molecular formula, every property from a named handbook or paper
(:mod:`solver.handbook.sources` lists the tables, their order of preference and the tables
left out), as :class:`~solver.thermo.data.ComponentData` in the correlation forms the thermo layer
evaluates.

``search``, ``suggest`` and ``find`` read the shipped name index only and answer in
milliseconds; ``lookup``, ``component_data``, ``property_rows`` and ``describe`` read the
tables through the registry package ``chemicals``, which is imported on the first lookup (not
when this package is imported).
"""

from __future__ import annotations

import importlib

from solver.handbook.names import AmbiguousFormula, IndexEntry, find, search, suggest

__all__ = [
    "AmbiguousFormula",
    "HandbookComponent",
    "IndexEntry",
    "component_data",
    "describe",
    "find",
    "lookup",
    "property_rows",
    "search",
    "suggest",
]

_LAZY = {
    "lookup": ("library", "lookup"),
    "component_data": ("library", "component_data"),
    "property_rows": ("library", "property_rows"),
    "describe": ("library", "describe"),
    "HandbookComponent": ("component", "HandbookComponent"),
}


def __getattr__(name: str):
    if name in _LAZY:
        module, attribute = _LAZY[name]
        value = getattr(importlib.import_module(f".{module}", __name__), attribute)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'solver.handbook' has no attribute {name!r}")
