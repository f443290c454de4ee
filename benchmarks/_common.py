"""Shared pieces of the benchmark scripts: test columns and JSON output."""

from __future__ import annotations

import json
import platform
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from solver.case import loads_case  # noqa: E402
from solver.results import write_atomic  # noqa: E402

IDEAL_FOUR = """
title = "ideal four-component benchmark column ({stages} stages)"
[components]
names = ["benzene", "toluene", "ethylbenzene", "o-xylene"]
[thermo]
liquid = "ideal"
[column]
stages = {stages}
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
pressure.drop_per_stage = "{drop} Pa"
[[feeds]]
stage = {feed}
flow = "100 kmol/h"
composition = {{ benzene = 0.3, toluene = 0.3, ethylbenzene = 0.2, "o-xylene" = 0.2 }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.5
distillate_rate = "{distillate} kmol/h"
"""

FIVE = """
title = "ideal five-component benchmark column ({stages} stages)"
[components]
names = ["benzene", "toluene", "ethylbenzene", "o-xylene", "n-nonane"]
[thermo]
liquid = "ideal"
[column]
stages = {stages}
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
pressure.drop_per_stage = "{drop} Pa"
[[feeds]]
stage = {feed}
flow = "100 kmol/h"
composition = {{ benzene = 0.3, toluene = 0.25, ethylbenzene = 0.15, "o-xylene" = 0.15, "n-nonane" = 0.15 }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.5
distillate_rate = "45 kmol/h"
"""


def ideal_four_case(stages: int):
    # a fixed total pressure drop of 20 kPa over the column, whatever the stage count
    return loads_case(
        IDEAL_FOUR.format(stages=stages, drop=20000.0 / stages, feed=stages // 2, distillate=45.0),
        source_file=f"<benchmark N={stages}>",
    )


def five_component_case(stages: int):
    return loads_case(FIVE.format(stages=stages, drop=20000.0 / stages, feed=stages // 2), source_file="<benchmark>")


def best_of(function, repeats: int) -> float:
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        best = min(best, time.perf_counter() - start)
    return best


def save(name: str, figures: dict) -> Path:
    figures = dict(figures)
    figures["machine"] = {"python": platform.python_version(), "processor": platform.processor() or platform.machine()}
    path = HERE / "results" / f"{name}.json"
    write_atomic(path, json.dumps(figures, indent=2) + "\n")
    print(f"wrote {path}")
    return path
