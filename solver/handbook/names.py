"""The handbook library's name index: every compound by its name, synonyms, CAS number and
(where no other library compound shares it) molecular formula; search and "did you mean".

The index is the generated module :mod:`solver.handbook._index_data` (built by
``scripts/build_handbook_index.py``); reading it imports neither ``chemicals`` nor numpy, so a
search answers in a few milliseconds after Python's start. Names match ignoring case; spaces,
hyphens, underscores and commas are optional where that leaves the name unambiguous.
"""

from __future__ import annotations

import difflib
import fnmatch
import re
from dataclasses import dataclass
from functools import lru_cache

from solver.handbook import _index_data

__all__ = ["IndexEntry", "AmbiguousFormula", "entries", "find", "search", "suggest"]

@dataclass(frozen=True)
class IndexEntry:
    """One compound of the library. ``refused`` marks a compound whose every vapor-pressure
    table misses its handbook normal boiling point (looking it up gives the numbers)."""

    cas: str
    name: str
    formula: str
    synonyms: tuple[str, ...]
    refused: bool = False


class AmbiguousFormula(LookupError):
    """A molecular formula that several library compounds share; ``entries`` are they."""

    def __init__(self, formula: str, matches: tuple[IndexEntry, ...]) -> None:
        names = ", ".join(f"{e.name} ({e.cas})" for e in matches)
        super().__init__(f"the formula {formula} fits {len(matches)} library compounds: {names}; name one of them")
        self.formula = formula
        self.entries = matches


def loose(text: str) -> str:
    """``text`` in lower case without spaces, hyphens, underscores and commas."""
    return re.sub(r"[\s_,\-]", "", text.lower())


@lru_cache(maxsize=1)
def entries() -> tuple[IndexEntry, ...]:
    """Every compound of the index, in the order of the index (by CAS number)."""
    return tuple(
        IndexEntry(cas, name, formula, tuple(synonyms), status == "refused")
        for cas, name, formula, status, synonyms in _index_data.INDEX
    )


@lru_cache(maxsize=1)
def _tables() -> tuple[dict[str, IndexEntry], dict[str, IndexEntry], dict[str, tuple[IndexEntry, ...]]]:
    """(exact key -> entry, loose key -> entry, lower-case formula -> entries). Names, CAS
    numbers and synonyms are exact keys; a loose key that two compounds share is dropped."""
    exact: dict[str, IndexEntry] = {}
    for entry in entries():
        exact.setdefault(entry.cas, entry)
        exact.setdefault(entry.name.lower(), entry)
    for entry in entries():
        for synonym in entry.synonyms:
            exact.setdefault(synonym.lower(), entry)
    by_loose: dict[str, IndexEntry] = {}
    clashes = set()
    for key, entry in exact.items():
        lk = loose(key)
        if lk in by_loose and by_loose[lk] is not entry:
            clashes.add(lk)
        by_loose.setdefault(lk, entry)
    for lk in clashes:
        del by_loose[lk]
    formulas: dict[str, tuple[IndexEntry, ...]] = {}
    for entry in entries():
        formulas[entry.formula.lower()] = formulas.get(entry.formula.lower(), ()) + (entry,)
    return exact, by_loose, formulas


def find(name: str) -> IndexEntry | None:
    """The compound called ``name`` (name, synonym, CAS number, or a molecular formula no other
    library compound has), or None. A formula several compounds share raises
    :class:`AmbiguousFormula`."""
    key = name.strip().lower()
    exact, by_loose, formulas = _tables()
    if key in exact:
        return exact[key]
    if loose(key) in by_loose:
        return by_loose[loose(key)]
    matches = formulas.get(key.replace(" ", ""), ())
    if len(matches) == 1:
        return matches[0]
    if len(matches) > 1:
        raise AmbiguousFormula(name.strip(), matches)
    return None


def search(pattern: str | None = None) -> list[IndexEntry]:
    """The usable compounds (not refused) whose name, a synonym, the CAS number or the formula
    contains ``pattern`` (ignoring case), or matches it as a shell-style glob when it has
    ``*``, ``?`` or ``[``; all of them without a pattern. Sorted by name."""
    usable = [e for e in entries() if not e.refused]
    if pattern:
        text = pattern.strip().lower()
        glob = any(ch in text for ch in "*?[")
        usable = [e for e in usable if any(_hit(key, text, glob) for key in _keys(e))]
    return sorted(usable, key=lambda e: e.name.lower())


def suggest(name: str, count: int = 3) -> list[str]:
    """Up to ``count`` library names close to ``name`` (difflib, as for CoolProp's names)."""
    exact, _, _ = _tables()
    key = name.strip().lower()
    matches = difflib.get_close_matches(key, list(exact), n=3 * count, cutoff=0.6)
    if not matches:
        loose_keys = {loose(k): k for k in exact}
        matches = [loose_keys[m] for m in difflib.get_close_matches(loose(key), list(loose_keys), n=3 * count, cutoff=0.6)]
    names: list[str] = []
    for match in matches:
        if exact[match].name not in names and not exact[match].refused:
            names.append(exact[match].name)
    return names[:count]


def _keys(entry: IndexEntry) -> tuple[str, ...]:
    return (entry.name.lower(), entry.cas, entry.formula.lower(), *(s.lower() for s in entry.synonyms))


def _hit(key: str, text: str, glob: bool) -> bool:
    return fnmatch.fnmatchcase(key, text) if glob else text in key
