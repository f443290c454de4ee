"""Build solver/data/coolprop_fluids.json, the index of CoolProp's pure fluids (names,
aliases, constants, whether a column can use each) that lets traystack look fluids up without
importing CoolProp (whose import takes seconds).

Run from the repository root after a change of the CoolProp version:
    python scripts/build_coolprop_index.py

The file states the CoolProp version it was made with; traystack uses it only with that
version (and builds the same index live otherwise). tests/test_fluid_index.py checks the
shipped file against the installed CoolProp.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from solver.fluids import INDEX_FILE, live_index  # noqa: E402


def main() -> None:
    index = live_index()
    INDEX_FILE.parent.mkdir(parents=True, exist_ok=True)
    INDEX_FILE.write_text(json.dumps(index, indent=1, allow_nan=True) + "\n", encoding="utf-8")
    print(f"{len(index['fluids'])} fluids of CoolProp {index['coolprop_version']} written to {INDEX_FILE}")


if __name__ == "__main__":
    main()
