"""The streams of a column as plain data in SI units: each feed as it enters its stage, and the
streams leaving every stage.

Units throughout: K, Pa, mol/s, J/mol, mole fractions. Stages are numbered from the top (the
condenser, if any, is stage 1); arrays are stage-major, top stage first. ``L`` and ``V`` are the
liquid and vapor flows leaving a stage for its neighbours, side draws excluded; the top stage's
vapor slot is the overhead product (the liquid distillate, for a total condenser) and the
bottom stage's liquid slot is the bottoms product.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["FlashedFeed", "StageProfile"]


@dataclass(frozen=True)
class FlashedFeed:
    """One feed after its flash at its own temperature (or vapor fraction) and pressure."""

    stage: int  # stage number, 1-based from the top, as in the case file
    flow: float  # mol/s
    z: tuple[float, ...]  # mole fractions, in the order of the case's components
    h: float  # J/mol, the molar enthalpy the stage's enthalpy balance takes for it
    q: float  # thermal condition: liquid fraction, below 0 superheated, above 1 subcooled
    name: str = ""
    temperature: float | None = None  # K
    pressure: float | None = None  # Pa
    vapor_fraction: float | None = None  # molar


@dataclass(frozen=True)
class StageProfile:
    """Temperature, pressure, flows and compositions of every stage's leaving streams; a start
    for the rigorous solve, or the profile of a solution.

    ``temperature``, ``pressure``, ``liquid_flow``, ``vapor_flow`` are (N,) arrays in K, Pa,
    mol/s, mol/s; ``x`` and ``y`` are (N, c) mole fractions of the liquid and vapor slots."""

    temperature: np.ndarray
    pressure: np.ndarray
    liquid_flow: np.ndarray
    vapor_flow: np.ndarray
    x: np.ndarray
    y: np.ndarray

    @property
    def stage_count(self) -> int:
        return len(self.temperature)

    @property
    def liquid_component_flows(self) -> np.ndarray:
        """(N, c) mol/s of each component in the liquid leaving each stage."""
        return self.liquid_flow[:, None] * self.x

    @property
    def vapor_component_flows(self) -> np.ndarray:
        """(N, c) mol/s of each component in the vapor slot of each stage."""
        return self.vapor_flow[:, None] * self.y

    @classmethod
    def from_component_flows(
        cls, temperature: np.ndarray, pressure: np.ndarray, liquid: np.ndarray, vapor: np.ndarray
    ) -> "StageProfile":
        """The profile of component flows ``liquid`` and ``vapor`` (N, c) mol/s: totals summed,
        compositions normalized (a slot without flow has all mole fractions zero)."""
        L, V = liquid.sum(axis=1), vapor.sum(axis=1)
        x = liquid / np.maximum(L, 1e-300)[:, None]
        y = vapor / np.maximum(V, 1e-300)[:, None]
        return cls(np.asarray(temperature, dtype=float), np.asarray(pressure, dtype=float), L, V, x, y)
