"""Molar mass from a molecular formula in Hill notation (``C3H8O``, ``C2H3Cl3``) with the
standard atomic weights of IUPAC's Commission on Isotopic Abundances and Atomic Weights
(Prohaska, T. et al. (2022), Pure Appl. Chem. 94, 573-600; the conventional values for the
elements given as intervals; values from memory)."""

from __future__ import annotations

import re

__all__ = ["ATOMIC_WEIGHTS", "molar_mass", "parse_formula"]

#: g/mol, for the elements of distillable organic and simple inorganic compounds.
ATOMIC_WEIGHTS: dict[str, float] = {
    "H": 1.008, "He": 4.002602, "B": 10.81, "C": 12.011, "N": 14.007, "O": 15.999, "F": 18.998403162,
    "Ne": 20.1797, "Si": 28.085, "P": 30.973761998, "S": 32.06, "Cl": 35.45, "Ar": 39.95,
    "Ge": 72.630, "As": 74.921595, "Se": 78.971, "Br": 79.904, "Kr": 83.798, "Sn": 118.710,
    "I": 126.90447, "Xe": 131.293, "Hg": 200.592, "Al": 26.9815384, "Ti": 47.867,
}

_TERM = re.compile(r"([A-Z][a-z]?)(\d*)")


def parse_formula(formula: str) -> dict[str, int]:
    """Element counts of a flat molecular formula (no brackets, no charges); ``ValueError``
    if it cannot be read."""
    text = formula.strip()
    counts: dict[str, int] = {}
    position = 0
    for match in _TERM.finditer(text):
        if match.start() != position:
            break
        counts[match.group(1)] = counts.get(match.group(1), 0) + int(match.group(2) or 1)
        position = match.end()
    if position != len(text) or not counts:
        raise ValueError(f"cannot read the molecular formula {formula!r}")
    return counts


def molar_mass(formula: str) -> float:
    """Molar mass in kg/mol of ``formula``; ``ValueError`` for an element without a standard
    atomic weight here."""
    total = 0.0
    for element, count in parse_formula(formula).items():
        if element not in ATOMIC_WEIGHTS:
            raise ValueError(f"no standard atomic weight here for element {element!r} of {formula!r}")
        total += ATOMIC_WEIGHTS[element] * count
    return total * 1e-3
