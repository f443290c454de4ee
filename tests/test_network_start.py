"""The default start of a network (solver/network_start.py): its candidate starts ordered by
Newton's natural level (Deuflhard, Newton Methods for Nonlinear Problems, 2004, sec. 3.3)."""

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
    assert sorted(start.name.split()[1] for start in (better, other)) == ["from", "with"]  # one of each kind
    assert better.level < other.level
    assert np.array_equal(network_initial_estimate(system), better.X)
    # in both cases the two starts differ by more than an order of magnitude (measured: the divided wall
    # column's energy-pass start has a Newton correction of ~3000 K, the pumparound's CMO start ~9000 K)
    assert other.level > 10 * better.level


def test_divided_wall_columns_around_the_hard_case_converge_from_the_default_start():
    """Variants of the 120-stage divided-wall hard case (distillate rate near the benzene feed, where
    the profile is most sensitive to the flows; other liquid and vapor splits): each converges from
    the first start (measured: 2 to 15 iterations; the start of the project's first network engine,
    one start with two energy passes, failed on three of these five)."""
    from network_hard_cases import petlyuk

    from solver.network_engine import simulate_network

    for distillate, reflux, liquid, vapor in (("30", "3.0", 0.45, 0.55), ("30", "5.0", 0.3, 0.3), ("30", "3.0", 0.35, 0.4),
                                             ("33", "5.0", 0.35, 0.4), ("36", "5.0", 0.35, 0.4)):
        text = petlyuk("variant", 84, 36, f'reflux_ratio = {reflux}\ndistillate_rate = "{distillate} kmol/h"', liquid=liquid,
                       vapor=f"fraction = {vapor}")
        result = simulate_network(loads_case(text, source_file="<variant>"))
        assert result.converged and "second_start" not in result.strategy, (distillate, reflux, liquid, vapor, result.strategy)
        assert result.iterations <= 20
