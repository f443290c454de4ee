"""The Vmin diagram (solver/shortcut/vmin_diagram.py): Underwood roots, the sharp-split points,
the Petlyuk minimum vapor and the direct and indirect sequences' (Halvorsen & Skogestad, Ind.
Eng. Chem. Res. 42 (2003) 596 and 605; Underwood, Chem. Eng. Prog. 44 (1948) 603)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.errors import SpecError
from solver.shortcut.underwood import underwood_minimum_reflux
from solver.shortcut.vmin_diagram import (
    direct_sequence_minimum_vapor,
    indirect_sequence_minimum_vapor,
    minimum_vapor_diagram,
    sharp_split_point,
)

volatilities = st.lists(st.floats(1.05, 3.0), min_size=2, max_size=5).map(
    lambda steps: list(np.cumprod(steps[::-1])[::-1]) + [1.0]
)


def _ternary_closed_forms(alpha, z, q):
    """Ternary closed forms written out independently of the module: the two feed roots from the
    feed equation cleared of fractions (a quadratic for q = 1, brentq otherwise), then the A/BC
    and AB/C peaks (Halvorsen & Skogestad 2003, Part I, the ternary case)."""
    from scipy.optimize import brentq

    a, b, c = alpha
    f = lambda t: a * z[0] / (a - t) + b * z[1] / (b - t) + c * z[2] / (c - t) - (1.0 - q)
    theta_a = brentq(f, b + 1e-12, a - 1e-12)
    theta_b = brentq(f, c + 1e-12, b - 1e-12)
    peak_ab = a * z[0] / (a - theta_a)
    peak_bc = a * z[0] / (a - theta_b) + b * z[1] / (b - theta_b)
    return theta_a, theta_b, peak_ab, peak_bc


@settings(max_examples=60, deadline=None)
@given(
    st.floats(1.1, 6.0), st.floats(1.1, 6.0),
    st.lists(st.floats(0.05, 1.0), min_size=3, max_size=3), st.floats(-0.5, 1.5),
)
def test_ternary_petlyuk_is_the_larger_peak(ratio_ab, ratio_bc, weights, q):
    """For a ternary feed, V_min Petlyuk = max(V_A/BC, V_AB/C) (Halvorsen & Skogestad 2003)."""
    alpha = [ratio_ab * ratio_bc, ratio_bc, 1.0]
    z = np.array(weights) / sum(weights)
    theta_a, theta_b, peak_ab, peak_bc = _ternary_closed_forms(alpha, z, q)
    diagram = minimum_vapor_diagram(alpha, z, q)
    assert diagram.roots == pytest.approx((theta_a, theta_b), rel=1e-9)
    assert diagram.petlyuk_minimum_vapor == pytest.approx(max(peak_ab, peak_bc), rel=1e-9)
    # the stripping vapor follows the feed's q
    for peak in diagram.peaks:
        assert peak.vapor_bottom == pytest.approx(peak.vapor_top - (1.0 - q), abs=1e-12)
    # the Petlyuk column never needs more vapor than the better conventional sequence
    assert diagram.petlyuk_minimum_vapor <= min(diagram.direct_sequence_minimum_vapor,
                                                diagram.indirect_sequence_minimum_vapor) + 1e-12


@settings(max_examples=60, deadline=None)
@given(volatilities, st.data(), st.floats(0.0, 1.0))
def test_sharp_split_agrees_with_underwood_minimum_reflux(alpha, data, q):
    """Constant alpha and CMO: the minimum vapor of a sharp split between adjacent components
    is Underwood's minimum reflux of that split, V = (R_min + 1) D (solver/shortcut/underwood.py,
    keys fully recovered, non-keys not distributing)."""
    n = len(alpha)
    flows = np.array(data.draw(st.lists(st.floats(0.05, 2.0), min_size=n, max_size=n)))
    split = data.draw(st.integers(0, n - 2))
    point = sharp_split_point(alpha, flows, q, split, split + 1)
    underwood = underwood_minimum_reflux(alpha, flows, q, split, split + 1, float(flows[split]), 0.0)
    assert point.vapor_top == pytest.approx((underwood.minimum_reflux + 1.0) * underwood.distillate_flow, rel=1e-9)
    assert point.distillate_flow == pytest.approx(float(flows[: split + 1].sum()), rel=1e-12)
    # the direct sequence's first column is this split for split = 0
    if split == 0:
        assert direct_sequence_minimum_vapor(alpha, flows, q)[0] == pytest.approx(point.vapor_top, rel=1e-12)
    if split == n - 2:
        assert indirect_sequence_minimum_vapor(alpha, flows, q)[0] == pytest.approx(point.vapor_top, rel=1e-12)


@settings(max_examples=40, deadline=None)
@given(volatilities, st.data(), st.floats(0.0, 1.0))
def test_every_point_solves_underwood_at_its_active_roots(alpha, data, q):
    n = len(alpha)
    flows = np.array(data.draw(st.lists(st.floats(0.05, 2.0), min_size=n, max_size=n)))
    diagram = minimum_vapor_diagram(alpha, flows, q)
    a = np.array(alpha)
    for (i, j), point in diagram.points.items():
        d = np.array(point.distillate_flows)
        assert np.all(d >= -1e-9) and np.all(d <= flows + 1e-9)
        for theta in diagram.roots[i:j]:
            assert np.sum(a * d / (a - theta)) == pytest.approx(point.vapor_top, rel=1e-8)
    assert diagram.petlyuk_minimum_vapor == max(p.vapor_top for p in diagram.peaks)


@pytest.mark.parametrize(
    "alpha, flows",
    [([2.0, 4.0, 1.0], [1, 1, 1]), ([4.0, 2.0], [1, -1]), ([4.0, 2.0, 1.0], [1, 1]), ([4.0], [1.0]), ([4.0, math.nan], [1, 1])],
)
def test_bad_input_is_a_spec_error(alpha, flows):
    with pytest.raises(SpecError):
        minimum_vapor_diagram(alpha, flows, 1.0)


def test_case_diagram_of_the_paraffin_splitter():
    """cases/paraffins_fug.toml: volatilities from the case's K-values at the feed's bubble
    point, components in order of falling volatility (boiling points of C5 < C6 < C7 < C8)."""
    from pathlib import Path

    from solver.case import load_case
    from solver.shortcut.vmin_diagram import case_minimum_vapor_diagram

    case = load_case(Path(__file__).parent.parent / "cases" / "paraffins_fug.toml")
    names, diagram = case_minimum_vapor_diagram(case)
    assert names == ("n-pentane", "n-hexane", "n-heptane", "n-octane")
    assert diagram.relative_volatility[-1] == 1.0 and np.all(np.diff(diagram.relative_volatility) < 0)
    assert sum(diagram.feed_flows) == pytest.approx(case.feeds[0].flow, rel=1e-12)
    assert len(diagram.peaks) == 3 and len(diagram.points) == 6
    assert diagram.petlyuk_minimum_vapor < min(diagram.direct_sequence_minimum_vapor, diagram.indirect_sequence_minimum_vapor)
