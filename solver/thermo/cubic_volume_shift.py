"""Volume translation of a cubic equation of state matched to each component's saturated
liquid volume: the opt-in ``volume_shift = "peneloux"`` of ``[thermo]``.

Translation (A. Peneloux, E. Rauzy and R. Freze, Fluid Phase Equilib. 8 (1982) 7-23): the
molar volume of every phase becomes v = v_eos - sum_i x_i c_i with a constant c_i per
component. ln phi_i moves by -c_i P/(R T) in every phase, so K-values, bubble and dew points
and every equilibrium stay as they were; liquid (and vapor) densities change, and the enthalpy
by -P sum_i x_i c_i (see :mod:`solver.thermo.cubic`).

Choice of c_i (ours): the equation's saturated liquid volume of pure component i at
T = 0.7 Tc_i, where the acentric factor is defined, minus the component data's saturated liquid
volume there (CoolProp's reference equation of state, a user's correlation or the Rackett
equation, :meth:`solver.thermo.pure.PureComponents.liquid_molar_volume`). Peneloux et al.
obtained their c_i in the same spirit, from saturated liquid densities, and correlated them
with the Rackett compressibility factor for the Soave-Redlich-Kwong equation only
(:func:`solver.thermo.cubic.peneloux_volume_shift`); matching at one temperature serves both
equations and every component with liquid volume data.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from solver.errors import CaseError
from solver.thermo.cubic import CubicParameters, cubic_phase
from solver.thermo.cubic_flash import bubble_pressure

__all__ = ["MATCHING_REDUCED_TEMPERATURE", "matched_volume_shift", "saturated_liquid_volume", "with_matched_volume_shift"]

#: T / Tc at which the shift makes the equation's saturated liquid volume exact.
MATCHING_REDUCED_TEMPERATURE = 0.7
_TRACE = 1e-12  # mole fraction of the other components in a "pure" liquid


def saturated_liquid_volume(parameters: CubicParameters, temperature) -> tuple[np.ndarray, np.ndarray]:
    """``(pressure (c,) Pa, volume (c,) m3/mol)``: each pure component's vapor pressure and
    saturated liquid molar volume (translated if ``parameters`` carry a shift) from the
    equation itself, component i at ``temperature[i]`` K."""
    temperature = np.asarray(temperature, dtype=float)
    c = parameters.component_count
    pure = np.full((c, c), _TRACE) + np.eye(c) * (1.0 - c * _TRACE)
    saturation = bubble_pressure(parameters, temperature, pure)
    if not saturation.converged.all():
        bad = [parameters.names[i] for i in np.flatnonzero(~saturation.converged)]
        raise CaseError(f"the equation of state gives no vapor pressure of {', '.join(bad)} at 0.7 Tc, so no volume "
                        "shift can be matched to its liquid volume", key="thermo.volume_shift", value="peneloux",
                        expected='volume_shift = "none"')
    liquid = cubic_phase(parameters, temperature, saturation.pressure, pure, "liquid")
    return saturation.pressure, liquid.molar_volume


def matched_volume_shift(parameters: CubicParameters, liquid_molar_volume: Callable[[np.ndarray], np.ndarray]) -> np.ndarray:
    """c_i [m3/mol] that make the equation's saturated liquid volume of each pure component
    equal ``liquid_molar_volume(T) -> (n, c)`` at T = 0.7 Tc_i (module docstring)."""
    plain = parameters if parameters.volume_shift is None else parameters.with_volume_shift(None, "")
    temperature = MATCHING_REDUCED_TEMPERATURE * plain.critical_temperature
    _, equation = saturated_liquid_volume(plain, temperature)
    data = np.diagonal(np.atleast_2d(liquid_molar_volume(temperature)))
    return equation - data


def with_matched_volume_shift(parameters: CubicParameters, liquid_molar_volume: Callable[[np.ndarray], np.ndarray],
                              data_source: str) -> CubicParameters:
    """``parameters`` with the shift of :func:`matched_volume_shift`; ``data_source`` names
    where the liquid volumes come from, for the result file."""
    shift = matched_volume_shift(parameters, liquid_molar_volume)
    source = (f"c_i matched to the saturated liquid volume at T = {MATCHING_REDUCED_TEMPERATURE} Tc of "
              f"{data_source}")
    return parameters.with_volume_shift(shift, source)
