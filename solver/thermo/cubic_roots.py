"""Real roots of many cubic equations at once, and the root a phase takes.

The compressibility factor of a two-parameter cubic equation of state is a root of

    Z^3 + c2 Z^2 + c1 Z + c0 = 0

(one cubic per state). All states are solved together in closed form: with Z = t - c2/3 the
depressed cubic t^3 + p t + q = 0 has one real root when (q/2)^2 + (p/3)^3 > 0, found by
Cardano's formula written without cancellation (the larger cube root first, the other as
-p / (3 u)), and three real roots otherwise, found by the trigonometric (Viete) formula
t_k = 2 sqrt(-p/3) cos(theta/3 - 2 pi k/3) with cos(theta) = (3 q / (2 p)) sqrt(-3/p)
(e.g. W. H. Press et al., *Numerical Recipes*, 3rd ed., Cambridge 2007, sec. 5.6). The chosen
root is then polished by Newton steps on the original cubic, which restores full precision
where the closed form loses digits (nearly equal roots).

Root per phase (e.g. M. L. Michelsen and J. M. Mollerup, *Thermodynamic Models: Fundamentals
and Computational Aspects*, 2nd ed., Tie-Line Publications 2007, ch. 3): the liquid takes the
smallest root greater than the co-volume term B, the vapor the largest. Where only one real root
exists both phases get it, and the phase identity is ambiguous: :class:`PhaseRoots` flags those
states.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["PhaseRoots", "cubic_real_roots", "phase_roots", "chosen_root"]

_NEWTON_STEPS = 1
#: A Newton step longer than this (relative to the root) would leave the closed-form root's
#: neighbourhood (a nearly double root): it is not taken.
_LARGEST_POLISH_STEP = 1e-6
_HALF_SQRT3 = 0.5 * np.sqrt(3.0)


@dataclass(frozen=True)
class PhaseRoots:
    """The root each phase takes, for n states.

    ``liquid (n,)``: smallest real root above ``B``; ``vapor (n,)``: largest real root;
    ``single_root (n,)`` True where the cubic has only one real root (both phases then get it
    and whether it is liquid-like or vapor-like is not decided by the root choice)."""

    liquid: np.ndarray
    vapor: np.ndarray
    single_root: np.ndarray


def cubic_real_roots(c2: np.ndarray, c1: np.ndarray, c0: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Real roots of ``Z^3 + c2 Z^2 + c1 Z + c0 = 0`` for arrays of coefficients (n,).

    Returns ``(largest, middle, smallest, single)``: where ``single`` is True the cubic has one
    real root, returned as all three; elsewhere the three real roots in decreasing order. The
    roots come from the closed form, unpolished (see :func:`phase_roots`)."""
    c2, c1, c0 = (np.asarray(v, dtype=float) for v in (c2, c1, c0))
    shift = c2 / 3.0
    p = c1 - c2 * shift
    q = (2.0 / 27.0) * c2 * c2 * c2 - shift * c1 + c0
    half_q = 0.5 * q
    third_p = p / 3.0
    discriminant = half_q * half_q + third_p * third_p * third_p
    single = discriminant > 0.0

    # one real root: u = -sign(q) cbrt(|q|/2 + sqrt(D)), t = u - p/(3u)
    root_d = np.sqrt(np.where(single, discriminant, 0.0))
    u = -np.copysign(np.cbrt(np.abs(half_q) + root_d), q)
    safe_u = np.where(u == 0.0, 1.0, u)
    t_single = np.where(u == 0.0, 0.0, u - third_p / safe_u)

    # three real roots (p <= 0 there); cos(a -+ 2 pi/3) = -cos(a)/2 +- sqrt(3) sin(a)/2
    minus_third_p = np.where(single, 1.0, np.maximum(-third_p, 0.0))
    radius = np.sqrt(minus_third_p)
    cos_theta = np.minimum(np.maximum(np.where(single, 0.0, -half_q / (minus_third_p * radius)), -1.0), 1.0)
    angle = np.arccos(cos_theta) / 3.0
    cosine = radius * np.cos(angle)
    sine = _HALF_SQRT3 * radius * np.sin(angle)
    largest = np.where(single, t_single, 2.0 * cosine) - shift
    middle = np.where(single, t_single, 2.0 * sine - cosine) - shift
    smallest = np.where(single, t_single, -cosine - 2.0 * sine) - shift
    return largest, middle, smallest, single


def _liquid_root(largest, middle, smallest, covolume) -> np.ndarray:
    covolume = np.asarray(covolume, dtype=float)
    return np.where(smallest > covolume, smallest, np.where(middle > covolume, middle, largest))


def _polish(z: np.ndarray, c2: np.ndarray, c1: np.ndarray, c0: np.ndarray) -> np.ndarray:
    for _ in range(_NEWTON_STEPS):
        value = ((z + c2) * z + c1) * z + c0
        slope = (3.0 * z + 2.0 * c2) * z + c1
        step = np.divide(value, slope, out=np.zeros_like(z), where=slope != 0.0)
        z = np.where(np.abs(step) <= _LARGEST_POLISH_STEP * np.abs(z), z - step, z)
    return z


def phase_roots(c2: np.ndarray, c1: np.ndarray, c0: np.ndarray, covolume: np.ndarray) -> PhaseRoots:
    """Liquid and vapor compressibility factors for n states: the cubic's real roots
    (:func:`cubic_real_roots`), the smallest above ``covolume`` (the dimensionless B = bP/RT)
    for the liquid and the largest for the vapor, each polished by Newton steps."""
    largest, middle, smallest, single = cubic_real_roots(c2, c1, c0)
    liquid = _liquid_root(largest, middle, smallest, covolume)
    return PhaseRoots(_polish(liquid, c2, c1, c0), _polish(largest, c2, c1, c0), single)


def chosen_root(c2: np.ndarray, c1: np.ndarray, c0: np.ndarray, covolume: np.ndarray, liquid: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The root of each state's phase (``liquid (n,)`` True: the liquid root of
    :func:`phase_roots`, False: the vapor root), polished, and the single-root flags (n,)."""
    largest, middle, smallest, single = cubic_real_roots(c2, c1, c0)
    chosen = np.where(liquid, _liquid_root(largest, middle, smallest, covolume), largest)
    return _polish(chosen, c2, c1, c0), single
