"""Constant molar overflow checked on a rigorous solution, stage by stage, and where the column
pinches.

The CMO flows are the shortcut's section flows of the same reflux ratio R, distillate rate D
and feed q: ``L = R D`` above the feed, ``L + q F`` below it, ``V = (R + 1) D`` and
``V - (1 - q) F`` (McCabe & Thiele, Ind. Eng. Chem. 17 (1925) 605). For a binary the
rigorous operating curve ``(x_j, y_j+1)`` is set against the straight operating lines. A pinch is
the stage pair with the smallest composition step.

Units are SI: mol/s, W, J/mol; compositions are mole fractions.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import SpecError
from ..results import Result
from ..thermo.flash import bubble_temperature, dew_temperature
from ..thermo.package import ThermoPackage

__all__ = [
    "PINCH_CONTRAST",
    "CMOAudit",
    "cmo_audit",
    "cmo_duty_estimates",
    "composition_steps",
    "effective_q",
    "feed_stage_of",
    "largest",
    "pinch_stage",
]

#: The rigorous step at the shortcut's pinch must be this many times the rigorous column's
#: smallest step for the pinch to count as moved (a distinct zone, not a near tie).
PINCH_CONTRAST = 1.5


def largest(values: np.ndarray) -> tuple[float, int]:
    """(signed value of largest magnitude, its stage number) ignoring NaN; (NaN, 0) if none."""
    values = np.asarray(values, dtype=float)
    if not np.any(np.isfinite(values)):
        return float("nan"), 0
    j = int(np.nanargmax(np.abs(values)))
    return float(values[j]), j + 1


@dataclass(frozen=True, eq=False)
class CMOAudit:
    """Constant molar overflow checked on a rigorous solution, stage by stage (top first).

    ``liquid_cmo`` / ``vapor_cmo`` are the section flows of the same reflux ratio, distillate
    rate and feed q; ``liquid_deviation`` = L / L_cmo - 1 on the stages whose liquid is an
    internal flow (1..N-1), ``vapor_deviation`` likewise (2..N), NaN elsewhere. For a binary,
    ``line_distance[j]`` is ``y_j+1 - y_line(x_j)``, the vertical distance of the rigorous
    operating curve from the straight operating line of the same section (lines through the
    products the column delivers, slopes from the CMO flows), NaN for the last stage.
    ``liquid`` and ``vapor`` follow the result file's stream conventions: no vapor leaves a
    total condenser (its distillate is the liquid draw)."""

    feed_stage: int
    q: float
    q_effective: float
    reflux_ratio: float
    distillate_flow: float
    feed_flow: float
    liquid: np.ndarray
    vapor: np.ndarray
    liquid_cmo: np.ndarray
    vapor_cmo: np.ndarray
    liquid_deviation: np.ndarray
    vapor_deviation: np.ndarray
    line_distance: np.ndarray | None
    light: int | None

    @property
    def largest_liquid_deviation(self) -> tuple[float, int]:
        return largest(self.liquid_deviation)

    @property
    def largest_vapor_deviation(self) -> tuple[float, int]:
        return largest(self.vapor_deviation)

    @property
    def largest_line_distance(self) -> tuple[float, int]:
        if self.line_distance is None:
            return float("nan"), 0
        return largest(self.line_distance)


def feed_stage_of(result: Result) -> int:
    """The stage (1-based) of the single feed of ``result``; SpecError for several feeds."""
    stages = [j + 1 for j, feeds in enumerate(result.stage_feeds) if feeds]
    if len(stages) != 1:
        raise SpecError(f"the CMO audit handles one feed; this solution has feeds on stages {stages}")
    return stages[0]


def cmo_audit(result: Result, light: int | None = None) -> CMOAudit:
    """Constant molar overflow checked on ``result`` (one feed, condenser and partial
    reboiler): the section flows of its own reflux ratio, distillate rate and feed q against
    the rigorous flows; for a binary (``light`` the index of the light component) the
    operating curve against the straight lines."""
    f = feed_stage_of(result)
    feed = result.stage_feeds[f - 1][0]
    F, q = float(feed.flow), float(feed.q)
    N = result.stage_count
    D, B = result.distillate_flow, result.bottoms_flow
    R = float(result.reflux_ratio)
    numbers = np.arange(1, N + 1)
    L_top, V_top = R * D, (R + 1.0) * D
    L_bottom, V_bottom = L_top + q * F, V_top - (1.0 - q) * F
    liquid_cmo = np.where(numbers < f, L_top, L_bottom)
    vapor_cmo = np.where(numbers <= f, V_top, V_bottom)
    liquid_cmo[-1] = B
    L, V = result.liquid_flow.copy(), result.vapor_flow.copy()
    # the result file's convention: no vapor leaves a total condenser (its distillate is the
    # liquid draw); a partial condenser's vapor is the distillate
    vapor_cmo[0] = V[0] = 0.0 if result.condenser == "total" else D
    liquid_deviation = np.full(N, np.nan)
    vapor_deviation = np.full(N, np.nan)
    liquid_deviation[:-1] = L[:-1] / liquid_cmo[:-1] - 1.0
    vapor_deviation[1:] = V[1:] / vapor_cmo[1:] - 1.0
    q_effective = effective_q(L, f, F)
    line_distance = None
    if light is not None and len(result.components) == 2:
        x = result.x[:, light]
        y = result.y[:, light]
        x_D, x_B = float(result.distillate_composition[light]), float(result.bottoms_composition[light])
        rectifying = (L_top / V_top) * x[:-1] + D * x_D / V_top
        stripping = (L_bottom / V_bottom) * x[:-1] - B * x_B / V_bottom if V_bottom > 0 else np.full(N - 1, np.nan)
        line = np.where(numbers[:-1] < f, rectifying, stripping)
        line_distance = np.full(N, np.nan)
        line_distance[:-1] = y[1:] - line
    return CMOAudit(
        feed_stage=f, q=q, q_effective=q_effective, reflux_ratio=R, distillate_flow=D, feed_flow=F,
        liquid=L, vapor=V, liquid_cmo=liquid_cmo, vapor_cmo=vapor_cmo, liquid_deviation=liquid_deviation,
        vapor_deviation=vapor_deviation, line_distance=line_distance, light=light,
    )


def effective_q(liquid: np.ndarray, feed_stage: int, feed_flow: float) -> float:
    """The feed's thermal condition as the rigorous column shows it: the jump of the liquid
    flow at the feed stage, ``L_f - L_f-1``, less the mean stage-to-stage change of the liquid
    just above and just below it (the drift of the flows that unequal latent heats cause on
    every stage), over the feed flow. Under CMO it is q exactly."""
    L = np.asarray(liquid, dtype=float)
    N, f = L.size, int(feed_stage)
    if f < 2:
        return float("nan")
    jump = L[f - 1] - L[f - 2]
    trend = []
    if f - 2 >= 2:  # the two stages above the feed are trays (a condenser's liquid is the reflux)
        trend.append(L[f - 2] - L[f - 3])
    if f + 1 <= N - 1:  # the stage below the feed is a tray (the reboiler's liquid is the bottoms)
        trend.append(L[f] - L[f - 1])
    return float((jump - (np.mean(trend) if trend else 0.0)) / feed_flow)


def cmo_duty_estimates(result: Result, thermo: ThermoPackage) -> tuple[float, float]:
    """(condenser, reboiler) duty estimates under CMO at the solution's reflux ratio,
    distillate rate and feed q: ``-V lambda(x_D)`` (a partial condenser condenses only the
    reflux) and ``V' lambda(x_B)``, lambda the dew-point vapor less the bubble-point liquid of
    each product at its stage's pressure -- the estimates the shortcut designs make."""
    f = feed_stage_of(result)
    feed = result.stage_feeds[f - 1][0]
    R, D = float(result.reflux_ratio), result.distillate_flow
    V = (R + 1.0) * D
    V_bottom = V - (1.0 - float(feed.q)) * feed.flow

    def latent(x: np.ndarray, pressure: float) -> float:
        P = np.array([pressure])
        T_b, _ = bubble_temperature(thermo, P, x[None, :])
        T_d, _ = dew_temperature(thermo, P, x[None, :])
        return float(thermo.vapor_enthalpy(T_d, x[None, :]).molar[0] - thermo.liquid_enthalpy(T_b, x[None, :]).molar[0])

    top_pressure = float(result.pressure[1] if result.condenser == "total" else result.pressure[0])
    condensed = V if result.condenser == "total" else R * D
    condenser = -condensed * latent(result.distillate_composition, top_pressure)
    reboiler = V_bottom * latent(result.bottoms_composition, float(result.pressure[-1]))
    return condenser, reboiler


def composition_steps(x: np.ndarray) -> np.ndarray:
    """The composition step of each stage pair (j, j+1), top first, measured as the change of
    ln(x / (1 - x)) of the light component: small where the operating curve comes close to the
    equilibrium curve (a pinch); the log-ratio keeps the high-purity ends, where mole fractions
    change little from stage to stage, from looking like one."""
    x = np.clip(np.asarray(x, dtype=float), 1e-15, 1.0 - 1e-15)
    return np.abs(np.diff(np.log(x / (1.0 - x))))


def pinch_stage(x: np.ndarray) -> int:
    """The upper stage (1-based) of the pair with the smallest :func:`composition_steps`."""
    return int(np.argmin(composition_steps(x))) + 1
