"""Where traystack keeps what it can compute again: the user cache folder.

``$TRAYSTACK_CACHE_DIR`` if set, else the platform's usual user cache folder
(``$XDG_CACHE_HOME/traystack`` or ``~/.cache/traystack`` on Linux,
``~/Library/Caches/traystack`` on macOS, ``%LOCALAPPDATA%\\traystack\\Cache`` on Windows).
``TRAYSTACK_NO_CACHE=1`` (the command's ``--no-cache``) switches the cache off. Imports nothing
of ours.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

__all__ = ["CACHE_DIR_VARIABLE", "NO_CACHE_VARIABLE", "cache_folder"]

CACHE_DIR_VARIABLE = "TRAYSTACK_CACHE_DIR"
NO_CACHE_VARIABLE = "TRAYSTACK_NO_CACHE"


def cache_folder() -> Path | None:
    """The cache folder, or None when the cache is switched off."""
    if os.environ.get(NO_CACHE_VARIABLE, "").strip() not in ("", "0"):
        return None
    chosen = os.environ.get(CACHE_DIR_VARIABLE, "").strip()
    if chosen:
        return Path(chosen).expanduser()
    if sys.platform == "win32":
        base = os.environ.get("LOCALAPPDATA") or str(Path.home() / "AppData" / "Local")
        return Path(base) / "traystack" / "Cache"
    if sys.platform == "darwin":
        return Path.home() / "Library" / "Caches" / "traystack"
    base = os.environ.get("XDG_CACHE_HOME", "").strip()
    return (Path(base) if base else Path.home() / ".cache") / "traystack"
