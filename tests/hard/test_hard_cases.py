"""Every hard case converges from the default start, and its answer passes the post-check.

`python benchmarks/hard_cases.py` prints the rung of the fallback chain each one needed."""

from __future__ import annotations

import re
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from hard_cases import HARD_CASES, REFUSED_CASES  # noqa: E402
from solver.case import loads_case
from solver.engine import simulate
from solver.errors import TraystackError

#: Words in a hard case's title that make it a pressure column (an equation of state for both phases).
EQUATIONS_OF_STATE = ('liquid = "peng-robinson"', 'liquid = "soave-redlich-kwong"')


def test_the_suite_is_large_enough():
    assert len(HARD_CASES) >= 25
    pressure_columns = [name for name, text in HARD_CASES.items() if any(m in text for m in EQUATIONS_OF_STATE)]
    assert len(pressure_columns) >= 8, pressure_columns


@pytest.mark.parametrize("name", sorted(REFUSED_CASES))
def test_pressure_column_without_an_answer_is_refused_with_its_reason(name):
    text, reason = REFUSED_CASES[name]
    try:
        result = simulate(loads_case(text, source_file=f"<refused case {name}>"))
    except TraystackError as exc:
        message = str(exc)
    else:
        assert not result.converged, name
        message = result.message
    assert re.search(reason, message), message


@pytest.mark.parametrize("name", sorted(HARD_CASES))
def test_hard_case_converges(name):
    result = simulate(loads_case(HARD_CASES[name], source_file=f"<hard case {name}>"))
    assert result.converged, f"{name}: {result.message} ({result.strategy})"
    assert result.post_check["enthalpy_balance_max"] < 1e-8
    assert result.post_check["component_balance_max"] < 1e-8
    assert result.strategy["rung"] in ("newton", "damped newton", "second start", "homotopy", "shorter column")
