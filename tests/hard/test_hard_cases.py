"""Every hard case converges from the default start, and its answer passes the post-check.

`python benchmarks/hard_cases.py` prints the rung of the fallback chain each one needed."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from hard_cases import HARD_CASES  # noqa: E402
from solver.case import loads_case
from solver.engine import simulate


def test_the_suite_is_large_enough():
    assert len(HARD_CASES) >= 25


@pytest.mark.parametrize("name", sorted(HARD_CASES))
def test_hard_case_converges(name):
    result = simulate(loads_case(HARD_CASES[name], source_file=f"<hard case {name}>"))
    assert result.converged, f"{name}: {result.message} ({result.strategy})"
    assert result.post_check["enthalpy_balance_max"] < 1e-8
    assert result.post_check["component_balance_max"] < 1e-8
    assert result.strategy["rung"] in ("newton", "damped newton", "second start", "homotopy", "shorter column")
