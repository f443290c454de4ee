"""The cautions shown with a result, most specific first: not converged, elevated pressure
with ideal-vapor K-values, stages near a component's critical temperature, the ``cmo``
enthalpy model, the case reader's warnings, the flags of an attached audit, and last the
general caution shown under every result (:data:`CAUTION`)."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..caution import CAUTION

if TYPE_CHECKING:  # only named as a type: the command's --help reads CAUTION without the results' imports
    from ..results import Result

__all__ = ["CAUTION", "ELEVATED_PRESSURE", "NEAR_CRITICAL_REDUCED_TEMPERATURE", "PRESENT_FRACTION", "cautions"]

#: Above this pressure ideal-vapor K-values deserve a check against data (a rule of thumb,
#: common practice: vapor fugacity coefficients of light hydrocarbons fall below about 0.9).
ELEVATED_PRESSURE = 5e5  # Pa
#: Reduced temperature above which a component's vapor pressure and latent heat change fast and
#: the ideal-vapor, ideal-gas-enthalpy picture loses accuracy (common practice).
NEAR_CRITICAL_REDUCED_TEMPERATURE = 0.85
#: A component counts on a stage when its liquid mole fraction is at least this.
PRESENT_FRACTION = 0.01


def cautions(result: Result) -> list[str]:
    """The cautions that apply to this result, most specific first, the general one last."""
    found: list[str] = []
    if not result.converged:
        found.append(f"NOT CONVERGED: {result.message}. Do not use these numbers.")
    bottom = float(np.max(result.pressure))
    if "equation_of_state" in result.thermo:
        found.extend(_equation_of_state(result))
    elif bottom > ELEVATED_PRESSURE:
        found.append(
            f"Column pressure up to {bottom / 1e5:.3g} bar: K-values assume an ideal vapor (no fugacity "
            "coefficients, no Poynting factor) and the vapor enthalpy is the ideal-gas one; above about "
            f"{ELEVATED_PRESSURE / 1e5:.0f} bar check them against data."
        )
    if "equation_of_state" not in result.thermo:
        found.extend(_near_critical(result))
    if result.enthalpy_model == "cmo":
        found.append(
            "Enthalpy model 'cmo': equal molar latent heats and no sensible heat, so the internal flows are "
            "constant molar overflow by construction; the duties are estimates on that basis."
        )
    found.extend(result.case_warnings)
    found.extend(f"Beyond a handbook correlation's range: {note}." for note in (result.thermo or {}).get("range_notes", []))
    audit, own = result.extra.get("audit"), result.extra.get("flags")
    for flag in (*(audit.flags if audit is not None else ()), *(own.flags if own is not None else ())):
        found.append(f"[{flag.severity}] {flag.code}: {flag.message}".strip())
    found.append(CAUTION)
    return found


def _near_critical(result: Result) -> list[str]:
    critical = np.array(
        [component.get("critical_temperature", np.inf) for component in result.thermo.get("components", [])], dtype=float
    )
    if critical.shape != (len(result.components),):
        return []
    reduced = result.temperature[:, None] / critical[None, :]
    reduced = np.where(result.x >= PRESENT_FRACTION, reduced, 0.0)
    notes = []
    for i in np.flatnonzero(reduced.max(axis=0) > NEAR_CRITICAL_REDUCED_TEMPERATURE):
        stage = int(np.argmax(reduced[:, i]))
        notes.append(
            f"{result.components[i]} reaches T/Tc = {reduced[stage, i]:.3f} on stage {stage + 1}: near its critical "
            "point ideal-vapor K-values and the latent-heat-based liquid enthalpy lose accuracy."
        )
    return notes


def _equation_of_state(result: Result) -> list[str]:
    """With both phases from a cubic equation of state: the k_ij left at zero, and the accuracy
    of the liquid near the mixture's critical point."""
    eos = result.thermo["equation_of_state"]
    zero = [f"{pair['i']}/{pair['j']}" for pair in eos.get("interaction", []) if pair.get("source") == "default zero"]
    notes = []
    if zero:
        notes.append(
            f"{eos.get('model', 'equation of state')}: k_ij = 0 (not given) for {len(zero)} pair(s), e.g. "
            + ", ".join(zero[:3]) + "; check K-values of the key pair against data."
        )
    return notes
