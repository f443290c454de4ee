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


def divided_wall_case(section: int):
    """The divided-wall column of the network hard cases (tests/hard/network_hard_cases.py) with
    ``section`` stages a section: a main column of 7 ``section`` stages and a prefractionator
    (the wall) of 3 ``section``; ``section = 12`` is its 120-stage column."""
    sys.path.insert(0, str(HERE.parent / "tests" / "hard"))
    from network_hard_cases import petlyuk  # noqa: E402

    text = petlyuk(f"divided-wall benchmark column ({10 * section} stages)", 7 * section, 3 * section,
                   'reflux_ratio = 5.0\ndistillate_rate = "33 kmol/h"')
    return loads_case(text, source_file=f"<divided wall, {10 * section} stages>")


def network_hard_case(name: str):
    sys.path.insert(0, str(HERE.parent / "tests" / "hard"))
    from network_hard_cases import NETWORK_HARD_CASES  # noqa: E402

    return loads_case(NETWORK_HARD_CASES[name], source_file=f"<network hard case {name}>")


def best_of(function, repeats: int, clock=time.perf_counter) -> float:
    """The shortest of ``repeats`` timings of ``function()`` by ``clock`` (wall time unless told;
    ``time.process_time`` counts only this process's CPU time, steadier on a shared machine)."""
    best = float("inf")
    for _ in range(repeats):
        start = clock()
        function()
        best = min(best, clock() - start)
    return best


def save(name: str, figures: dict) -> Path:
    figures = dict(figures)
    figures["machine"] = {"python": platform.python_version(), "processor": platform.processor() or platform.machine()}
    path = HERE / "results" / f"{name}.json"
    write_atomic(path, json.dumps(figures, indent=2) + "\n")
    print(f"wrote {path}")
    return path
