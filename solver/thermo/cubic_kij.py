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
No shipped case uses this table (their k_ij are zero or written in the case file).

Verification attempted, December 2026: every value is still UNVERIFIED. The publisher's page of
the volume (dechema.de, Chemistry Data Series Vol. VI) confirms that it lists Peng-Robinson
binary parameters fitted to all the data of each binary, but no page we could read shows the
numbers, and no paper tabulating Peng-Robinson k_ij of light hydrocarbons was found in a
readable form (searched: the volume's title and authors; "Peng-Robinson binary interaction
parameters propane n-butane"; tables of k_ij in public code, where the ones found came from
process simulators' data banks and were not used).

What the values do against the reference mixture model (GERG-2008 in CoolProp, O. Kunz and
W. Wagner, J. Chem. Eng. Data 57 (2012) 3032; Peng-Robinson with the reference equations'
critical constants; rms relative bubble-pressure deviation at x1 = 0.1-0.9, 0.5-3 MPa; computed,
not a source of values): the table's k_ij against k = 0 and the k that fits the reference best.

    pair                  table    rms(table)  rms(k=0)  best k   rms(best)
    ethane/propane       +0.0011     1.35 %     1.17 %  -0.0059    0.49 %
    ethane/n-butane      +0.0096     1.23 %     1.17 %  +0.0047    0.51 %
    ethane/isobutane     -0.0067     0.79 %     1.67 %  -0.0070    0.79 %
    ethane/n-pentane     +0.0078     1.29 %     3.20 %  +0.0120    0.65 %
    propane/n-butane     +0.0033     0.76 %     0.32 %  -0.0009    0.28 %
    propane/isobutane    -0.0078     0.85 %     0.66 %  -0.0032    0.42 %
    propane/n-pentane    +0.0267     0.89 %     4.20 %  +0.0223    0.24 %
    isobutane/n-butane   -0.0004     0.50 %     0.53 %  -0.0018    0.45 %
    n-butane/n-pentane   +0.0174     2.99 %     0.45 %  -0.0013    0.40 %
    propylene/propane    +0.0074     0.41 %     1.45 %  +0.0091    0.30 %

Doubtful, to be checked first when a copy of the table is at hand: n-butane/n-pentane (the
table's value makes the bubble pressures six times worse than k = 0) and propane/n-butane
(worse than k = 0). The suspected swap of the n- and iso-butane values is not borne out by the
ethane pairs (ethane/isobutane -0.0067 is what the reference model wants); for the methane
pairs the comparison is inconclusive (methane is supercritical there and no k brings the rms
below 1.5 %).
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
