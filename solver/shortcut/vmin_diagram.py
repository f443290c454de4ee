"""The minimum-vapor (Vmin) diagram of Halvorsen & Skogestad for a multicomponent feed with
constant relative volatilities, and the minimum vapor of the Petlyuk (divided-wall) column and
of the direct and indirect sequences of simple columns.

Method (Halvorsen & Skogestad, Ind. Eng. Chem. Res. 42 (2003) 596 and 605, built on Underwood,
Chem. Eng. Prog. 44 (1948) 603; constant molar overflow, constant relative volatilities,
infinitely many stages):

* the feed's Underwood roots ``theta_1 > ... > theta_{n-1}``, one between each pair of adjacent
  volatilities, from ``sum_i alpha_i z_i / (alpha_i - theta) = 1 - q``;
* the point ``P_ij`` of the diagram (components numbered from the most volatile, i < j): the
  sharp split in which every component up to i leaves in the distillate and every component from
  j on in the bottoms, the components between them distributing as the minimum vapor demands.
  The roots between ``alpha_i`` and ``alpha_j`` are all active, and Underwood's second equation
  ``V_top = sum_k alpha_k d_k / (alpha_k - theta)`` at each of them is one linear system in
  ``V_top`` and the intermediates' distillate flows;
* the peaks are the sharp splits between adjacent components, ``P_{j,j+1}``:
  ``V_top = sum_{k<=j} alpha_k F z_k / (alpha_k - theta_j)``;
* the Petlyuk arrangement (and the divided-wall column) needs the highest peak (Halvorsen &
  Skogestad 2003: ``V_min,Petlyuk = max_j V(P_{j,j+1})``; for a ternary, the larger of the
  A/BC and AB/C peaks);
* the direct sequence removes the lightest component in each column, the indirect sequence the
  heaviest; each column's minimum vapor is the peak of its own feed. The first column takes the
  case's feed (its q); the later ones take the bottoms of a partial reboiler (direct) or the
  distillate of a total condenser (indirect), both saturated liquid (q = 1).

Flows are in the unit of the feed flows given (mol/s from a case); ``V_top`` is the vapor in the
rectifying section, ``V_bottom = V_top - (1 - q) F`` the vapor in the stripping section.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..case import Case
from ..errors import SpecError
from ..feed_flash import flash_feed_list
from ..thermo.flash import bubble_temperature
from ..thermo.package import ThermoPackage
from .underwood import underwood_roots

__all__ = [
    "SplitPoint",
    "VminDiagram",
    "case_minimum_vapor_diagram",
    "direct_sequence_minimum_vapor",
    "indirect_sequence_minimum_vapor",
    "minimum_vapor_diagram",
    "sharp_split_point",
]


@dataclass(frozen=True)
class SplitPoint:
    """One point ``P_ij`` of the Vmin diagram: the sharp split between components ``light`` and
    ``heavy`` (0-based, in order of falling volatility), the distillate flows ``distillate_flows``
    (per component), ``distillate_flow`` D and the rectifying vapor ``vapor_top`` (stripping
    vapor ``vapor_bottom``) at minimum vapor."""

    light: int
    heavy: int
    distillate_flows: tuple[float, ...]
    distillate_flow: float
    vapor_top: float
    vapor_bottom: float


@dataclass(frozen=True)
class VminDiagram:
    """The Vmin diagram of one feed: Underwood ``roots`` (descending), every point ``P_ij``
    (``points[(i, j)]``), the ``peaks`` (sharp splits between adjacent components), the
    Petlyuk minimum vapor (the highest peak's rectifying vapor), and the direct and indirect
    sequences' minimum vapor (the sum over their columns)."""

    relative_volatility: tuple[float, ...]
    feed_flows: tuple[float, ...]
    q: float
    roots: tuple[float, ...]
    points: dict[tuple[int, int], SplitPoint]
    peaks: tuple[SplitPoint, ...]
    petlyuk_minimum_vapor: float
    direct_sequence_minimum_vapor: float
    indirect_sequence_minimum_vapor: float

    @property
    def highest_peak(self) -> SplitPoint:
        return max(self.peaks, key=lambda point: point.vapor_top)


def _checked(relative_volatility, feed_flows) -> tuple[np.ndarray, np.ndarray]:
    alpha = np.asarray(relative_volatility, dtype=float)
    flows = np.asarray(feed_flows, dtype=float)
    if alpha.ndim != 1 or alpha.shape != flows.shape or alpha.size < 2:
        raise SpecError("the Vmin diagram needs one relative volatility and one feed flow per component, at least two")
    if not np.all(np.isfinite(alpha)) or np.any(alpha <= 0.0) or np.any(np.diff(alpha) >= 0.0):
        raise SpecError(
            f"the Vmin diagram needs relative volatilities that fall strictly from the first component to the last; got {alpha.tolist()}"
        )
    if not np.all(np.isfinite(flows)) or np.any(flows <= 0.0):
        raise SpecError(f"the Vmin diagram needs every component in the feed (flows > 0); got {flows.tolist()}")
    return alpha, flows


def sharp_split_point(relative_volatility, feed_flows, q: float, light: int, heavy: int,
                      roots=None) -> SplitPoint:
    """The point ``P_ij`` (``light`` = i < ``heavy`` = j, 0-based, volatilities falling) at
    minimum vapor: components up to i all in the distillate, from j on all in the bottoms, those
    between distributing; ``roots`` the feed's Underwood roots (computed when not given)."""
    alpha, flows = _checked(relative_volatility, feed_flows)
    if not 0 <= light < heavy < alpha.size:
        raise SpecError(f"a sharp split needs 0 <= light < heavy < {alpha.size}; got light={light}, heavy={heavy}")
    F = float(flows.sum())
    if roots is None:
        roots = underwood_roots(alpha, flows / F, q)
    active = np.asarray(roots, dtype=float)[light:heavy]  # theta_light .. theta_{heavy-1}
    between = list(range(light + 1, heavy))
    known = np.where(np.arange(alpha.size) <= light, flows, 0.0)
    matrix = np.empty((active.size, len(between) + 1))
    right_side = np.empty(active.size)
    for row, theta in enumerate(active):
        matrix[row, :-1] = alpha[between] / (alpha[between] - theta)
        matrix[row, -1] = -1.0
        right_side[row] = -np.sum(alpha * known / (alpha - theta))
    solution = np.linalg.solve(matrix, right_side)
    distillate = known.copy()
    distillate[between] = solution[:-1]
    slack = 1e-9 * flows
    if np.any(distillate < -slack) or np.any(distillate > flows + slack):
        raise SpecError(f"the split P({light},{heavy}) puts an intermediate component outside its feed flow: {distillate.tolist()}")
    vapor_top = float(solution[-1])
    return SplitPoint(light, heavy, tuple(float(v) for v in distillate), float(distillate.sum()), vapor_top,
                      vapor_top - (1.0 - q) * F)


def _peak_vapor(alpha: np.ndarray, flows: np.ndarray, q: float, split: int) -> float:
    """Rectifying vapor of the sharp split between components ``split`` and ``split + 1``."""
    return sharp_split_point(alpha, flows, q, split, split + 1).vapor_top


def direct_sequence_minimum_vapor(relative_volatility, feed_flows, q: float) -> tuple[float, ...]:
    """Rectifying minimum vapor of each column of the direct sequence (the lightest component
    taken overhead in each; the later feeds saturated-liquid bottoms)."""
    alpha, flows = _checked(relative_volatility, feed_flows)
    vapors = []
    feed_q = q
    for first in range(alpha.size - 1):
        vapors.append(_peak_vapor(alpha[first:], flows[first:], feed_q, 0))
        feed_q = 1.0
    return tuple(vapors)


def indirect_sequence_minimum_vapor(relative_volatility, feed_flows, q: float) -> tuple[float, ...]:
    """Rectifying minimum vapor of each column of the indirect sequence (the heaviest component
    taken as bottoms in each; the later feeds saturated-liquid distillates)."""
    alpha, flows = _checked(relative_volatility, feed_flows)
    vapors = []
    feed_q = q
    for last in range(alpha.size, 1, -1):
        vapors.append(_peak_vapor(alpha[:last], flows[:last], feed_q, last - 2))
        feed_q = 1.0
    return tuple(vapors)


def minimum_vapor_diagram(relative_volatility, feed_flows, q: float) -> VminDiagram:
    """The Vmin diagram of a feed (``feed_flows`` per component, volatilities falling strictly)
    with thermal condition ``q``: every sharp-split point, the peaks, and the minimum vapor of the
    Petlyuk column and of the direct and indirect sequences (see the module docstring)."""
    alpha, flows = _checked(relative_volatility, feed_flows)
    F = float(flows.sum())
    roots = underwood_roots(alpha, flows / F, q)
    if roots.size != alpha.size - 1:
        raise SpecError(f"expected {alpha.size - 1} Underwood roots, found {roots.size}")
    points = {
        (i, j): sharp_split_point(alpha, flows, q, i, j, roots)
        for i in range(alpha.size - 1)
        for j in range(i + 1, alpha.size)
    }
    peaks = tuple(points[(j, j + 1)] for j in range(alpha.size - 1))
    return VminDiagram(
        relative_volatility=tuple(float(a) for a in alpha),
        feed_flows=tuple(float(f) for f in flows),
        q=float(q),
        roots=tuple(float(r) for r in roots),
        points=points,
        peaks=peaks,
        petlyuk_minimum_vapor=max(point.vapor_top for point in peaks),
        direct_sequence_minimum_vapor=float(sum(direct_sequence_minimum_vapor(alpha, flows, q))),
        indirect_sequence_minimum_vapor=float(sum(indirect_sequence_minimum_vapor(alpha, flows, q))),
    )


def case_minimum_vapor_diagram(case: Case, thermo: ThermoPackage | None = None) -> tuple[tuple[str, ...], VminDiagram]:
    """The Vmin diagram of a case's single feed: relative volatilities from the K-values at the
    feed's bubble point at its stage's pressure (relative to the heaviest component), q as the
    rigorous engine flashes the feed (:func:`solver.feed_flash.flash_feed_list`: under the
    ``cmo`` enthalpy model a feed whose rigorous enthalpies are not known is judged by its
    phase alone). Returns the component names in order
    of falling volatility (the diagram's order) and the diagram; flows mol/s."""
    if len(case.feeds) != 1:
        raise SpecError(f"{case.source_file or '<case>'}: feeds: the Vmin diagram takes one feed; this case has {len(case.feeds)}")
    thermo = thermo or ThermoPackage.from_case(case)
    feed = case.feeds[0]
    z = np.asarray(feed.composition, dtype=float)
    pressure = np.array([case.feed_stage_pressure(0)])
    bubble, _ = bubble_temperature(thermo, pressure, z[None, :])
    K = thermo.k_values(np.atleast_1d(bubble), pressure, z[None, :], derivatives=False).K[0]
    order = np.argsort(-K)
    alpha = K[order] / K[order[-1]]
    q = float(flash_feed_list([feed], thermo, [float(pressure[0])], source_file=case.source_file or "")[0].q)
    names = tuple(case.component_names[i] for i in order)
    return names, minimum_vapor_diagram(alpha, feed.flow * z[order], q)
