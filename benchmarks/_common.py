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

IDEAL_COLUMN = """
title = "ideal {count}-component benchmark column ({stages} stages)"
[components]
names = [{names}]
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
composition = {{ {composition} }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.5
distillate_rate = "45 kmol/h"
"""


def ideal_column_case(stages: int, feed: dict[str, float]):
    """A saturated-liquid feed of 100 kmol/h on the middle stage, reflux ratio 2.5, distillate
    45 kmol/h, and a fixed total pressure drop of 20 kPa whatever the stage count."""
    text = IDEAL_COLUMN.format(
        count=len(feed),
        names=", ".join(f'"{name}"' for name in feed),
        composition=", ".join(f'"{name}" = {fraction}' for name, fraction in feed.items()),
        stages=stages,
        drop=20000.0 / stages,
        feed=stages // 2,
    )
    return loads_case(text, source_file=f"<benchmark N={stages}>")


def ideal_four_case(stages: int):
    return ideal_column_case(stages, {"benzene": 0.3, "toluene": 0.3, "ethylbenzene": 0.2, "o-xylene": 0.2})


def five_component_case(stages: int):
    return ideal_column_case(
        stages, {"benzene": 0.3, "toluene": 0.25, "ethylbenzene": 0.15, "o-xylene": 0.15, "n-nonane": 0.15}
    )


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
