"""O'Connell's overall efficiency and real trays (solver.sizing.efficiency, .keys)."""

from __future__ import annotations

import numpy as np
import pytest

from solver.sizing.efficiency import OverallEfficiency, oconnell_efficiency, real_trays


def test_lockett_fit_of_oconnells_chart():
    # E = 0.492 (alpha mu)^-0.245 with mu in mPa s (Lockett 1986, from memory); by hand:
    # alpha mu = 1 -> 0.492; = 2 -> 0.492 * 2^-0.245 = 0.492 * 0.8438 = 0.4152; = 0.5 -> 0.492 * 1.1851 = 0.5831
    assert oconnell_efficiency(2.0, 0.5e-3) == pytest.approx(0.492)
    assert oconnell_efficiency(4.0, 0.5e-3) == pytest.approx(0.4152, abs=2e-4)
    assert oconnell_efficiency(1.0, 0.5e-3) == pytest.approx(0.5831, abs=2e-4)
    assert oconnell_efficiency(0.01, 1e-3) == 1.0  # capped
    values = oconnell_efficiency(np.array([1.5, 3.0, 10.0]), 0.3e-3)
    assert np.all(np.diff(values) < 0)


def test_real_trays_round_up_and_the_correlated_range():
    assert real_trays(10, 0.5) == 20 and real_trays(10, 0.46) == 22 and real_trays(0, 0.5) == 0
    efficiency = OverallEfficiency(0.46, 4.2, 0.31e-3, 356.0, "methanol", "water")
    assert efficiency.alpha_mu == pytest.approx(1.302) and efficiency.in_range
    assert not OverallEfficiency(0.3, 30.0, 0.5e-3, 356.0, "a", "b").in_range
