"""A study's points written as they finish, so that an interrupted study can be resumed: a JSON
Lines file whose first line holds the study's fingerprint (a SHA-256 of everything a point's
outcome depends on besides its index) and each further line one finished point. Run again into
the same folder, the study reads the points the log holds and solves only the others. A log of
another study (another fingerprint) is started afresh; a line cut short by an interrupt, or that
the study does not recognize as one of its points, is dropped.
"""

from __future__ import annotations

import hashlib
import json
import os
from pathlib import Path
from typing import Any, Callable, Generic, Mapping, TypeVar

from .results import json_safe, write_atomic

__all__ = ["StudyLog", "fingerprint"]

Outcome = TypeVar("Outcome")


def fingerprint(study: Mapping[str, Any]) -> str:
    """The SHA-256 of ``study`` (plain data: the case document, the study's settings)."""
    return hashlib.sha256(json.dumps(json_safe(dict(study)), sort_keys=True).encode()).hexdigest()


class StudyLog(Generic[Outcome]):
    """The log at ``path`` of the study ``fingerprint``. ``read(record)`` turns a line's record
    into ``(index, outcome)``, or None (or raises ValueError, KeyError, TypeError or IndexError)
    for a record that is not one of the study's points; :attr:`done` holds the points read.
    The file is rewritten at once with the points kept, then appended to."""

    def __init__(self, path: str | os.PathLike, fingerprint: str,
                 read: Callable[[dict], tuple[int, Outcome] | None]) -> None:
        self.path = Path(path)
        self.done: dict[int, Outcome] = {}
        head = json.dumps({"fingerprint": fingerprint})
        kept: dict[int, str] = {}
        lines = self.path.read_text(encoding="utf-8").splitlines() if self.path.exists() else []
        if lines and lines[0] == head:
            for line in lines[1:]:
                try:
                    found = read(json.loads(line))
                except (ValueError, KeyError, TypeError, IndexError):
                    continue
                if found is not None:
                    self.done[found[0]] = found[1]
                    kept[found[0]] = line
        self.path.parent.mkdir(parents=True, exist_ok=True)
        write_atomic(self.path, "\n".join([head, *(kept[index] for index in sorted(kept))]) + "\n")
        self._handle = open(self.path, "a", encoding="utf-8")

    def append(self, index: int, record: Mapping[str, Any]) -> None:
        """Write the finished point ``index`` (unless the log already held it)."""
        if index in self.done:
            return
        self._handle.write(json.dumps(record) + "\n")
        self._handle.flush()

    def close(self) -> None:
        self._handle.close()
