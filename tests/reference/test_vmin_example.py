"""The Vmin diagram's example of Halvorsen & Skogestad (Ind. Eng. Chem. Res. 42 (2003) 596 and
605): alpha = [4, 2, 1], an equimolar saturated-liquid feed (q = 1), F = 1.

Status: NOT verified against the paper's printed numbers -- no stored copy of the paper could
be read. Every check value below is "computed here" by hand from Underwood's equations (the
derivation is in the docstring), independently of solver/shortcut/vmin_diagram.py.
"""

from __future__ import annotations

import math

import pytest

from solver.shortcut.vmin_diagram import minimum_vapor_diagram


def test_equimolar_ternary_example_by_hand():
    """alpha = [4, 2, 1], z = 1/3 each, saturated liquid (q = 1), F = 1, the example
    Halvorsen & Skogestad use. Hand derivation (not read in a stored copy of the paper): the feed
    equation 4/(4-t) + 2/(2-t) + 1/(1-t) = 0 clears to 7 t^2 - 28 t + 24 = 0, so
    t = 2 +- sqrt(112)/14; the A/BC peak is (4/3)/(4 - t_A) and the AB/C peak
    (4/3)/(4 - t_B) + (2/3)/(2 - t_B). The second column of the direct sequence (B/C, 1/3 each,
    q = 1) has its root at 4/3 and V = (2/3)/(2 - 4/3) = 1; the indirect one's (A/B) at 8/3 and
    V = (4/3)/(4 - 8/3) = 1."""
    diagram = minimum_vapor_diagram([4.0, 2.0, 1.0], [1 / 3, 1 / 3, 1 / 3], 1.0)
    theta_a, theta_b = 2.0 + math.sqrt(112.0) / 14.0, 2.0 - math.sqrt(112.0) / 14.0
    assert diagram.roots == pytest.approx((theta_a, theta_b), rel=1e-12)
    peak_ab = (4 / 3) / (4.0 - theta_a)
    peak_bc = (4 / 3) / (4.0 - theta_b) + (2 / 3) / (2.0 - theta_b)
    assert peak_ab == pytest.approx(1.07175, abs=1e-5) and peak_bc == pytest.approx(1.36572, abs=1e-5)
    assert diagram.peaks[0].vapor_top == pytest.approx(peak_ab, rel=1e-12)
    assert diagram.peaks[1].vapor_top == pytest.approx(peak_bc, rel=1e-12)
    assert diagram.petlyuk_minimum_vapor == pytest.approx(peak_bc, rel=1e-12)
    assert diagram.highest_peak.light == 1
    assert diagram.direct_sequence_minimum_vapor == pytest.approx(peak_ab + 1.0, rel=1e-12)
    assert diagram.indirect_sequence_minimum_vapor == pytest.approx(peak_bc + 1.0, rel=1e-12)
    # the preferred split P_AC: B distributes; both roots active
    preferred = diagram.points[(0, 2)]
    d_b = preferred.distillate_flows[1]
    for theta in diagram.roots:
        assert 4 * (1 / 3) / (4 - theta) + 2 * d_b / (2 - theta) == pytest.approx(preferred.vapor_top, rel=1e-12)
    assert 0.0 < d_b < 1 / 3
    assert preferred.vapor_top < min(peak_ab, peak_bc)


