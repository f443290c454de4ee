"""A folder of fitted property curves on disk, so that a second run of a case needs neither
CoolProp's import nor its sampling.

Each entry is one JSON file named after its kind, fluid and a hash of its key; the file holds
the format version, the whole key (fluid, CoolProp version, fit settings) and the payload with
a SHA-256 checksum of it. JSON writes floats by ``repr``, which reads back to the same double,
so a fit from the cache is bit-identical to the fit it stores. An entry is written to a
temporary file in the same folder and renamed into place (atomic, so concurrent processes see
either no entry or a whole one); an entry that cannot be read, has another key or format, or
fails its checksum is ignored (the caller builds the fit again and overwrites it). Nothing
here raises: a cache that cannot be written only costs time.

The folder is :func:`solver.user_cache.cache_folder` (``fits-N`` inside it, N the format
version); ``TRAYSTACK_NO_CACHE=1`` (the command's ``--no-cache``) neither reads nor writes it.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import tempfile
from pathlib import Path

from solver.user_cache import NO_CACHE_VARIABLE, cache_folder

__all__ = ["FORMAT_VERSION", "NO_CACHE_VARIABLE", "fits_folder", "load", "store"]

#: Changes whenever the layout of an entry changes; older entries are then rebuilt.
FORMAT_VERSION = 1


def fits_folder() -> Path | None:
    """The folder of the fits, or None when the cache is switched off."""
    folder = cache_folder()
    return None if folder is None else folder / f"fits-{FORMAT_VERSION}"


def load(kind: str, key: dict) -> dict | None:
    """The payload stored under ``key``, or None (no cache, no entry, or an entry not to be
    trusted)."""
    path = _entry_path(kind, key)
    if path is None:
        return None
    try:
        document = json.loads(path.read_text(encoding="utf-8"))
        if (
            document["format"] == FORMAT_VERSION
            and document["key"] == _canonical(key)
            and document["checksum"] == _checksum(document["payload"])
        ):
            return document["payload"]
    except (OSError, ValueError, KeyError, TypeError):  # missing, unreadable or damaged
        pass
    return None


def store(kind: str, key: dict, payload: dict) -> Path | None:
    """Write ``payload`` under ``key`` atomically; the path written, or None if it could not be."""
    path = _entry_path(kind, key)
    if path is None:
        return None
    document = {"format": FORMAT_VERSION, "key": _canonical(key), "checksum": _checksum(payload), "payload": payload}
    temporary = None
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
        with os.fdopen(handle, "w", encoding="utf-8") as stream:
            json.dump(document, stream)
        os.replace(temporary, path)
        return path
    except (OSError, ValueError, TypeError):  # a read-only or full disk: the run goes on without
        if temporary is not None:
            try:
                os.unlink(temporary)
            except OSError:
                pass
        return None


def _canonical(key: dict) -> dict:
    """The key as it reads back from JSON (tuples become lists)."""
    return json.loads(json.dumps(key, sort_keys=True))


def _checksum(payload) -> str:
    return hashlib.sha256(json.dumps(payload, sort_keys=True).encode("utf-8")).hexdigest()


def _entry_path(kind: str, key: dict) -> Path | None:
    folder = fits_folder()
    if folder is None:
        return None
    digest = hashlib.sha256(f"{FORMAT_VERSION}:{kind}:{json.dumps(key, sort_keys=True)}".encode("utf-8")).hexdigest()
    fluid = re.sub(r"[^A-Za-z0-9_.-]", "_", str(key.get("fluid", "")))[:60]
    return folder / f"{kind}-{fluid}-{digest[:20]}.json"
