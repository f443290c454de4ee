"""Underwood's minimum reflux with a distributing non-key, checked by an independent calculation.

No published answer for an Underwood example with a distributing component could be read (the
[SHR] data of test_shortcut_examples.py come without the book's result). The check here rests on
a published theorem instead: for constant relative volatilities and constant molar overflow,
Underwood's equations give the *exact* minimum reflux of a column with infinitely many stages,
distributing components included (Underwood, Chem. Eng. Prog. 44 (1948) 603; Shiras, Hanson &
Gibson, Ind. Eng. Chem. 42 (1950) 871 on "class 2" separations).

So a stage-by-stage calculation of a long constant-alpha CMO column, coded here independently of
solver.shortcut (tridiagonal component balances, bubble-point update of the stage K scale, the
theta correction of the product split: Holland, *Fundamentals of Multicomponent Distillation*,
1981, ch. 2), must meet both key specifications just above Underwood's R_min and miss them just
below it however many stages it has; and the distributing component must split as Underwood
says. The checker is itself checked against McCabe-Thiele stepping, which is exact for a
constant-alpha binary. Everything here is "computed here"; the data are the [SHR] volatilities,
feed and q (verified in the problem statement quoted at numerade.com), the keys our choice.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.linalg import solve_banded
from scipy.optimize import brentq
from scipy.special import expit

from solver.shortcut.fug import underwood_minimum_reflux
from solver.shortcut.mccabe_thiele import EquilibriumCurve, mccabe_thiele

SHR_ALPHA = np.array([2.43, 1.93, 1.00, 0.765, 0.362, 0.164, 0.072, 0.0362])
SHR_FEED = 100.0 * np.array([0.0137, 0.5113, 0.0411, 0.0171, 0.0262, 0.0446, 0.3106, 0.0354])
SHR_Q = 0.0866
LIGHT_KEY, HEAVY_KEY, MIDDLE = 1, 3, 2  # alpha 1.93 and 0.765 (our choice); alpha = 1.00 distributes
RECOVERY = 0.95


def constant_alpha_column(alpha, feed, q, reflux_ratio, distillate, stages, feed_stage,
                          iterations=3000, tolerance=1e-10, damping=0.25):
    """Distillate flows of a constant-alpha CMO column: equilibrium stages 1..N from the top
    (N the partial reboiler) under a total condenser, one feed of thermal condition q on
    ``feed_stage``, reflux ratio and distillate rate given. K_ij = alpha_i s_j with the bubble-
    point scale s_j = 1 / sum_i alpha_i x_ij, updated with damping in ln s. Returns (d, converged)."""
    alpha = np.asarray(alpha, dtype=float)
    feed = np.asarray(feed, dtype=float)
    F = feed.sum()
    D = distillate
    B = F - D
    L = reflux_ratio * D
    V = L + D
    numbers = np.arange(1, stages + 1)
    liquid = np.where(numbers < feed_stage, L, L + q * F)
    liquid[-1] = B
    vapor = np.where(numbers <= feed_stage, V, V - (1.0 - q) * F)
    scale = np.full(stages, 1.0 / np.dot(alpha, feed / F))
    for _ in range(iterations):
        x = np.empty((alpha.size, stages))
        for i, a in enumerate(alpha):
            K = a * scale
            banded = np.zeros((3, stages))
            banded[0, 1:] = vapor[1:] * K[1:]  # vapor from the stage below
            banded[1] = -(liquid + vapor * K)
            banded[1, 0] = -(liquid[0] + D * K[0])  # the reflux is the top vapor condensed
            banded[2, :-1] = liquid[:-1]  # liquid from the stage above
            rhs = np.zeros(stages)
            rhs[feed_stage - 1] = -feed[i]
            x[i] = solve_banded((1, 1), banded, rhs)
        x = np.maximum(x, 1e-300)
        d = D * alpha * scale[0] * x[:, 0]
        ln_ratio = np.log(B * x[:, -1]) - np.log(d)
        u = brentq(lambda v: np.sum(feed * expit(-(v + ln_ratio))) - D, -1500.0, 1500.0, xtol=1e-14)
        corrected = feed * expit(-(u + ln_ratio))
        x *= (corrected / d)[:, None]
        x /= x.sum(axis=0)
        new_scale = 1.0 / (alpha @ x)
        change = np.max(np.abs(new_scale / scale - 1.0))
        scale = scale * (new_scale / scale) ** damping
        if change < tolerance and abs(u) < 1e-9:
            return corrected, True
    return corrected, False


def test_the_checker_agrees_with_exact_binary_stepping():
    """A constant-alpha binary: the stage-by-stage column and McCabe-Thiele stepping on the
    same lines must agree on the stage count to a fraction of a stage."""
    distillate, converged = constant_alpha_column([2.5, 1.0], [50.0, 50.0], 1.0, 2.0, 50.0, 12, 6)
    assert converged
    x_D = distillate[0] / 50.0
    x_B = (50.0 - distillate[0]) / 50.0
    stepped = mccabe_thiele(EquilibriumCurve.constant_alpha(2.5), x_distillate=x_D, x_bottoms=x_B, x_feed=0.5,
                            q=1.0, reflux_ratio=2.0, feed_stage=7)  # traystack numbering: the condenser is stage 1
    assert stepped.equilibrium_stages == pytest.approx(12.0, abs=1e-4)


@pytest.fixture(scope="module")
def underwood():
    return underwood_minimum_reflux(SHR_ALPHA, SHR_FEED, SHR_Q, LIGHT_KEY, HEAVY_KEY,
                                    RECOVERY * SHR_FEED[LIGHT_KEY], (1.0 - RECOVERY) * SHR_FEED[HEAVY_KEY])


def _key_margin(distillate: np.ndarray) -> float:
    """Positive when both key recoveries meet the specification."""
    light = distillate[LIGHT_KEY] / SHR_FEED[LIGHT_KEY]
    heavy = distillate[HEAVY_KEY] / SHR_FEED[HEAVY_KEY]
    return min(light - RECOVERY, (1.0 - RECOVERY) - heavy)


def test_underwood_is_the_minimum_reflux_of_a_long_column(underwood):
    assert MIDDLE in underwood.distributing
    D = float(underwood.distillate_flows.sum())
    R_min = underwood.minimum_reflux
    above, converged_above = constant_alpha_column(SHR_ALPHA, SHR_FEED, SHR_Q, 1.01 * R_min, D, 120, 96)
    below, converged_below = constant_alpha_column(SHR_ALPHA, SHR_FEED, SHR_Q, 0.99 * R_min, D, 120, 96)
    longer, converged_longer = constant_alpha_column(SHR_ALPHA, SHR_FEED, SHR_Q, 0.99 * R_min, D, 250, 200)
    assert converged_above and converged_below and converged_longer
    assert _key_margin(above) > 0.0  # 1 % above R_min, 120 stages meet both keys
    assert _key_margin(below) < -0.01  # 1 % below, they miss ...
    assert _key_margin(longer) == pytest.approx(_key_margin(below), abs=2e-3)  # ... and more stages do not help: a pinch
    # the distributing component splits as Underwood says
    middle_recovery = underwood.distillate_flows[MIDDLE] / SHR_FEED[MIDDLE]
    assert above[MIDDLE] / SHR_FEED[MIDDLE] == pytest.approx(middle_recovery, abs=0.01)
    assert below[MIDDLE] / SHR_FEED[MIDDLE] == pytest.approx(middle_recovery, abs=0.01)
    print(f"\nUnderwood R_min {R_min:.4f}, alpha=1.00 recovery {middle_recovery:.4f}; long column at 1.01 R_min: "
          f"key margin {_key_margin(above):+.4f}, middle {above[MIDDLE] / SHR_FEED[MIDDLE]:.4f}; at 0.99 R_min: "
          f"{_key_margin(below):+.4f} (120 stages), {_key_margin(longer):+.4f} (250 stages)")
