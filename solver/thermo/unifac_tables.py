"""The published UNIFAC parameter tables and group assignments shipped with traystack.

Two variants, each a JSON file in ``solver/thermo/data/`` that names its sources:

- ``original``: UNIFAC of Fredenslund, Jones & Prausnitz (AIChE J. 21 (1975) 1086-1099) with the
  parameters of Hansen, Rasmussen, Fredenslund, Schiller & Gmehling (Ind. Eng. Chem. Res. 30
  (1991) 2352-2355) and Wittig, Lohmann & Gmehling (Ind. Eng. Chem. Res. 42 (2003) 183-188);
- ``dortmund``: modified UNIFAC (Dortmund) of Weidlich & Gmehling (Ind. Eng. Chem. Res. 26
  (1987) 1372-1381) with the parameters of Gmehling, Li & Schiller (Ind. Eng. Chem. Res. 32
  (1993) 178-193) and the later published revisions up to 2016.

A component's groups are given as ``{subgroup: count}``, a subgroup by its published name
("CH3", "CH2", "OH", "CH3CO", "OH(P)", ...; case does not matter) or its number in the table.
``builtin_groups`` gives the published assignment of ~40 common solvents, looked up by name,
synonym or CAS number (``solver/thermo/data/unifac_assignments.json``).
"""

from __future__ import annotations

import difflib
import json
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from typing import Mapping

from solver.errors import CaseError
from solver.fluids import loose_key

__all__ = [
    "VARIANTS",
    "Subgroup",
    "UnifacTables",
    "builtin_components",
    "builtin_groups",
    "builtin_source",
    "load_tables",
]

#: the variants and the model keys a case uses for them
VARIANTS = {"original": "unifac", "dortmund": "unifac-dortmund"}


@dataclass(frozen=True)
class Subgroup:
    """One UNIFAC subgroup: its number and published name, its main group, and its relative van
    der Waals volume R and surface area Q."""

    number: int
    name: str
    main_group: int
    main_group_name: str
    volume: float  # R
    area: float  # Q


@dataclass(frozen=True)
class UnifacTables:
    """The subgroups and main-group interaction parameters of one variant.

    ``interactions[(m, n)] = (a, b, c)`` for main groups m != n, read in
    Psi_mn = exp(-(a + b T + c T^2) / T) (b = c = 0 for the original method).
    """

    variant: str
    subgroups: Mapping[int, Subgroup]
    interactions: Mapping[tuple[int, int], tuple[float, float, float]]
    description: Mapping[str, object]

    def __post_init__(self) -> None:
        object.__setattr__(self, "_by_name", {group.name.upper(): group for group in self.subgroups.values()})

    def subgroup(self, key: str | int, *, where: str = "UNIFAC groups") -> Subgroup:
        """The subgroup named ``key`` (published name, any case) or numbered ``key``; a
        :class:`CaseError` naming the nearest published names otherwise."""
        if isinstance(key, bool):
            key = str(key)
        if isinstance(key, int) or (isinstance(key, str) and key.strip().isdigit()):
            number = int(key)
            if number in self.subgroups:
                return self.subgroups[number]
            raise CaseError(
                f"no subgroup number {number} in the {self.variant} UNIFAC table",
                key=where,
                value=key,
                expected=f"a subgroup number among {min(self.subgroups)}..{max(self.subgroups)} or a published name",
            )
        by_name = self._by_name
        found = by_name.get(str(key).strip().upper())
        if found is not None:
            return found
        nearest = difflib.get_close_matches(str(key).strip().upper(), list(by_name), n=6, cutoff=0.5)
        hint = f"; nearest published names: {', '.join(by_name[n].name for n in nearest)}" if nearest else ""
        raise CaseError(
            f"unknown subgroup {key!r} for {self.variant} UNIFAC{hint}",
            key=where,
            expected="a subgroup name as the published tables spell it (e.g. CH3, CH2, OH, CH3CO) or its number",
        )

    def interaction(self, m: int, n: int) -> tuple[float, float, float] | None:
        """(a, b, c) between main groups m and n; zeros for m == n; None when unpublished."""
        if m == n:
            return (0.0, 0.0, 0.0)
        return self.interactions.get((m, n))


def _read_json(filename: str) -> dict:
    return json.loads(resources.files("solver.thermo").joinpath("data", filename).read_text(encoding="utf-8"))


@lru_cache(maxsize=None)
def load_tables(variant: str) -> UnifacTables:
    """The tables of ``variant`` ("original" or "dortmund"), read once."""
    if variant not in VARIANTS:
        raise CaseError("unknown UNIFAC variant", value=variant, expected=" or ".join(VARIANTS))
    data = _read_json(f"unifac_{variant}.json")
    main_groups = {int(k): v for k, v in data["main_groups"].items()}
    subgroups = {
        int(number): Subgroup(int(number), name, int(main), main_groups[int(main)], float(r), float(q))
        for number, name, main, r, q in data["subgroups"]
    }
    interactions = {}
    for row in data["interactions"]:
        m, n, *terms = row
        terms = [float(t) for t in terms] + [0.0] * (3 - len(terms))
        interactions[(int(m), int(n))] = tuple(terms)
    description = {k: v for k, v in data.items() if k not in ("subgroups", "interactions", "main_groups")}
    return UnifacTables(variant, subgroups, interactions, description)


# --------------------------------------------------------------------------------------------
# built-in assignments


@dataclass(frozen=True)
class BuiltinComponent:
    name: str
    cas: str
    synonyms: tuple[str, ...]
    groups: Mapping[str, Mapping[str, int]]  # variant -> {subgroup name: count}


@lru_cache(maxsize=1)
def _builtin() -> tuple[tuple[BuiltinComponent, ...], dict[str, BuiltinComponent], dict[str, str]]:
    data = _read_json("unifac_assignments.json")
    components = tuple(
        BuiltinComponent(
            entry["name"], entry["cas"], tuple(entry["synonyms"]), {v: dict(entry[v]) for v in VARIANTS}
        )
        for entry in data["components"]
    )
    index = {}
    for component in components:
        for key in (component.name, component.cas, *component.synonyms):
            index[loose_key(key)] = component
    return components, index, dict(data["sources"])


def builtin_components() -> tuple[str, ...]:
    """Names of the components with a built-in group assignment."""
    return tuple(component.name for component in _builtin()[0])


def builtin_groups(component: str, variant: str) -> dict[str, int] | None:
    """The published group assignment ``{subgroup name: count}`` of ``component`` (name,
    synonym or CAS number, any case) for ``variant``, or None when it has none built in."""
    components, index, _ = _builtin()
    found = index.get(loose_key(str(component)))
    return None if found is None else dict(found.groups[variant])


def builtin_source(variant: str) -> str:
    """Where the built-in assignments of ``variant`` come from."""
    return _builtin()[2][variant]
