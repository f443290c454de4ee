"""The general caution shown under every result and in the command's help (a module of its own
so that the command line can show it without importing the reports)."""

from __future__ import annotations

__all__ = ["CAUTION"]

#: The general caution, shown under every result.
CAUTION = (
    "Engineering estimate from models and data of limited accuracy. It does not replace review by a "
    "qualified engineer, vendor data, or the codes and standards that apply where the column is built "
    "(pressure equipment, relief, hazardous areas, flammable/toxic service, thermal stability of bottoms)."
)
