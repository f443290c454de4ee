"""The default start of a network (solver/network_start.py): its two starts ordered by Newton's
natural level (Deuflhard, Newton Methods for Nonlinear Problems, 2004, sec. 3.3)."""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).parent / "hard"))
from network_hard_cases import NETWORK_HARD_CASES  # noqa: E402
from solver.case import loads_case
from solver.network_engine import build_network_system
from solver.network_start import natural_level, network_initial_estimate, network_starts


def _system(name: str):
    return build_network_system(loads_case(NETWORK_HARD_CASES[name], source_file=f"<{name}>"))


def test_natural_level_is_the_size_of_the_full_newton_correction():
    system = _system("petlyuk_free_vapor_split")
    X = network_initial_estimate(system)
    evaluation = system.evaluate(X, jacobian=True)
    correction = np.linalg.solve(evaluation.jacobian.toarray(), -evaluation.residuals)  # dense, independent of the sparse LU
    correction[system.temperature_index()] /= 10.0  # K, Newton's temperature scale
    assert natural_level(system, X) == pytest.approx(float(np.max(np.abs(correction))), rel=1e-8)


@pytest.mark.parametrize("name", ["divided_wall_120", "pumparound_large_duty"])
def test_the_default_start_is_the_one_newton_models_better(name):
    system = _system(name)
    better, other = network_starts(system)
    assert {better.name, other.name} == {"start from CMO flows", "start with energy passes"}
    assert better.level < other.level
    assert np.array_equal(network_initial_estimate(system), better.X)
    # in both cases the two starts differ by more than an order of magnitude (measured: the divided wall
    # column's energy-pass start has a Newton correction of ~3000 K, the pumparound's CMO start ~9000 K)
    assert other.level > 10 * better.level
