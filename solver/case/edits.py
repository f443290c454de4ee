"""Changing a case without editing its text: a spec, a feed's values, the column's stage count
or other [column] values. A :class:`Case` stays frozen; each change writes the new values into
a copy of the case's TOML data (``Case.raw``) and reads that copy again through
:func:`~solver.case.reader.parse_case`, so an edited case is checked exactly as a file is and a
bad value is a :class:`~solver.errors.CaseError` naming the key and the value.

    case2 = with_spec(case, reflux_ratio=2.0)
    case3 = with_spec(case, boilup_ratio=1.5, replaces="reflux_ratio")
    case4 = with_feed(case, flow="6000 kg/h", temperature="70 degC")
    case5 = with_stages(case, 30, feed_stage=15)
"""

from __future__ import annotations

import copy
from typing import Any, Iterable, Mapping

from solver.case.fields import plain
from solver.case.model import Case
from solver.case.reader import parse_case
from solver.errors import CaseError

__all__ = ["EDITED", "with_column", "with_feed", "with_spec", "with_stages"]

#: Added to the case's file name in the messages about an edited case.
EDITED = " (edited)"
#: A feed's keys that exclude each other: writing one removes the other.
_EXCLUSIVE = {"temperature": ("vapor_fraction",), "vapor_fraction": ("temperature",)}


def _document(case: Case) -> dict[str, Any]:
    if not isinstance(case, Case):
        raise CaseError("a Case is needed (from load_case, or from an earlier edit)", value=type(case).__name__)
    return copy.deepcopy(plain(case.raw))


def _reread(case: Case, document: Mapping[str, Any]) -> Case:
    source = case.source_file or "<case>"
    return parse_case(document, source_file=source if source.endswith(EDITED) else source + EDITED)


def _single_column(case: Case, what: str) -> None:
    if case.network is not None:
        raise CaseError(f"{what} edits a single-column case; this case is a network of columns",
                        file=case.source_file or None, key="columns")


def with_spec(case: Case, replaces: str | Iterable[str] = (), **specs: Any) -> Case:
    """A new case whose ``[specs]`` has each of ``specs`` (keys and values as the file writes
    them: ``reflux_ratio=2.0``, ``bottoms={"water": "50 ppm"}``, ``distillate_rate="40
    kmol/h"``), after the keys ``replaces`` are removed (to trade one spec for another: the
    number of specs must still match the degrees of freedom, which the solve checks)."""
    _single_column(case, "with_spec")
    document = _document(case)
    table = document.setdefault("specs", {})
    for key in [replaces] if isinstance(replaces, str) else list(replaces):
        if key not in table:
            raise CaseError("the case has no such spec to replace", file=case.source_file or None,
                            key=f"specs.{key}", value=key, expected="one of: " + ", ".join(table) if table else None)
        del table[key]
    table.update(specs)
    return _reread(case, document)


def with_feed(case: Case, feed: int | str = 0, **values: Any) -> Case:
    """A new case whose feed ``feed`` (its index from 0 or its name) has ``values`` (the keys
    of a [[feeds]] table: ``flow``, ``composition`` (a whole table), ``temperature`` or
    ``vapor_fraction`` (each replaces the other), ``pressure``, ``stage``, ``basis``)."""
    document = _document(case)
    entry = _feed_entry(case, document, feed)
    for key in values:
        for other in _EXCLUSIVE.get(key, ()):
            entry.pop(other, None)
    entry.update(values)
    return _reread(case, document)


def _feed_entry(case: Case, document: Mapping[str, Any], feed: int | str) -> dict[str, Any]:
    """The [[feeds]] table of ``feed`` (index from 0, or name) in ``document``."""
    feeds = document.get("feeds")
    where = {"file": case.source_file or None, "key": "feeds"}
    if not isinstance(feeds, list) or not feeds:
        raise CaseError("the case has no [[feeds]] to change", **where)
    if isinstance(feed, str):
        names = [entry.get("name", f"feed_{k + 1}") for k, entry in enumerate(feeds)]
        if feed not in names:
            raise CaseError("the case has no feed of this name", **where, value=feed,
                            expected="one of: " + ", ".join(map(str, names)))
        return feeds[names.index(feed)]
    if isinstance(feed, int) and not isinstance(feed, bool) and 0 <= feed < len(feeds):
        return feeds[feed]
    raise CaseError(f"the case has {len(feeds)} feed(s)", **where, value=feed,
                    expected=f"an index from 0 to {len(feeds) - 1} or a feed's name")


def with_column(case: Case, **values: Any) -> Case:
    """A new case whose ``[column]`` has ``values`` (``stages``, ``pressure``, ``efficiency``,
    ``condenser``, ...; a table such as ``pressure`` is replaced whole)."""
    _single_column(case, "with_column")
    document = _document(case)
    document.setdefault("column", {}).update(values)
    return _reread(case, document)


def with_stages(case: Case, stages: int, feed_stage: int | Mapping[str, int] | None = None) -> Case:
    """A new case of ``stages`` stages (condenser and reboiler included), its feeds on their
    stages unless ``feed_stage`` moves them: a stage number (for a case of one feed) or
    {feed name: stage}."""
    _single_column(case, "with_stages")
    document = _document(case)
    document.setdefault("column", {})["stages"] = stages
    if feed_stage is not None:
        if isinstance(feed_stage, Mapping):
            for name, stage in feed_stage.items():
                _feed_entry(case, document, name)["stage"] = stage
        elif len(document.get("feeds", [])) == 1:
            _feed_entry(case, document, 0)["stage"] = feed_stage
        else:
            raise CaseError("the case has several feeds: give feed_stage as {feed name: stage}",
                            file=case.source_file or None, key="feeds", value=feed_stage)
    return _reread(case, document)
