"""Published binary interaction parameters k_ij of the Peng-Robinson equation for light
hydrocarbon pairs, with the source and the status of each value.

Source of the values: H. Knapp, R. Doering, L. Oellrich, U. Ploecker and J. M. Prausnitz,
*Vapor-Liquid Equilibria for Mixtures of Low Boiling Substances*, DECHEMA Chemistry Data Series
Vol. VI, Frankfurt 1982 (Peng-Robinson k_ij fitted to binary VLE data). Status "from memory":
the numbers were written from memory of that compilation's table and could not be checked
against a stored copy of it; "verified" would mean read in a stored copy. Hydrocarbon pairs
have small k_ij (about -0.01 to 0.03), and zero is the default for any pair not listed; the
reference tests compare bubble pressures with these values against reference equations of state
(tests/reference/test_cubic_reference.py), which bounds the harm a mistaken value could do.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

__all__ = ["PublishedInteraction", "PENG_ROBINSON_HYDROCARBONS", "interaction_matrix"]

KNAPP_1982 = (
    "H. Knapp, R. Doering, L. Oellrich, U. Ploecker, J. M. Prausnitz, Vapor-Liquid Equilibria for "
    "Mixtures of Low Boiling Substances, DECHEMA Chemistry Data Series VI (1982)"
)


@dataclass(frozen=True)
class PublishedInteraction:
    """One k_ij: the pair (component names as used in a case), the value, the equation it
    belongs to, the source and its status ("verified" or "from memory")."""

    first: str
    second: str
    value: float
    equation: str
    source: str
    status: str


def _pr(first: str, second: str, value: float) -> PublishedInteraction:
    return PublishedInteraction(first, second, value, "peng-robinson", KNAPP_1982, "from memory")


PENG_ROBINSON_HYDROCARBONS: tuple[PublishedInteraction, ...] = (
    _pr("methane", "propane", 0.0140),
    _pr("methane", "n-butane", 0.0133),
    _pr("methane", "isobutane", 0.0256),
    _pr("methane", "n-pentane", 0.0230),
    _pr("ethane", "propane", 0.0011),
    _pr("ethane", "n-butane", 0.0096),
    _pr("ethane", "isobutane", -0.0067),
    _pr("ethane", "n-pentane", 0.0078),
    _pr("propane", "n-butane", 0.0033),
    _pr("propane", "isobutane", -0.0078),
    _pr("propane", "n-pentane", 0.0267),
    _pr("isobutane", "n-butane", -0.0004),
    _pr("n-butane", "n-pentane", 0.0174),
    _pr("propylene", "propane", 0.0074),
)

#: Other names of the components in the table.
SYNONYMS = {
    "c1": "methane",
    "c2": "ethane",
    "c3": "propane",
    "propene": "propylene",
    "butane": "n-butane",
    "nbutane": "n-butane",
    "2-methylpropane": "isobutane",
    "i-butane": "isobutane",
    "pentane": "n-pentane",
    "npentane": "n-pentane",
}


def _canonical(name: str) -> str:
    key = name.strip().lower()
    return SYNONYMS.get(key, key)


def interaction_matrix(
    names: Sequence[str],
    equation: str = "peng-robinson",
    table: Sequence[PublishedInteraction] = PENG_ROBINSON_HYDROCARBONS,
) -> tuple[np.ndarray, dict[str, str]]:
    """The (c, c) k_ij matrix for components ``names`` from ``table`` (zero where no value is
    listed) and the source of each value used, keyed "first/second" as in ``names``."""
    canonical = [_canonical(name) for name in names]
    matrix = np.zeros((len(names), len(names)))
    sources: dict[str, str] = {}
    for entry in table:
        if entry.equation != equation:
            continue
        for i, first in enumerate(canonical):
            for j, second in enumerate(canonical):
                if i < j and {first, second} == {entry.first, entry.second}:
                    matrix[i, j] = matrix[j, i] = entry.value
                    sources[f"{names[i]}/{names[j]}"] = f"{entry.source} ({entry.status})"
    return matrix, sources
