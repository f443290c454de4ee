"""Packed columns (random and structured packings): pressure drop, flooding, the column area a
stage needs at a chosen fraction of flood, and the HETP. Vectorized over stages; SI units.

* **Pressure drop**: the generalized correlation of Robbins (Robbins, L. A. 1991, Chem. Eng.
  Prog. 87(5), 87-91; in Kister, *Distillation Design*, 1992, Eqs. 8.13-8.15, and Perry's 8th
  ed. Eqs. 14-143 to 14-145), in its own units (lb/(ft2 h), lb/ft3, cP, 1/ft, in. water per
  ft): ``dP = C3 Gf^2 10^(C4 Lf) + 0.4 (Lf/20000)^0.1 (C3 Gf^2 10^(C4 Lf))^4``, ``C3 = 7.4e-8``,
  ``C4 = 2.7e-5``, ``Gf = G (0.075/rho_G)^0.5 (Fpd/20)^0.5``, ``Lf = L (62.4/rho_L)
  (Fpd/20)^0.5 mu_L^0.1`` (``(20/Fpd)^0.5`` for dry packing factors below 15 1/ft, Kister
  Eq. 8.15b). Robbins' correlation holds for ``Lf`` up to 20 000 and near atmospheric pressure
  or under vacuum (not above about 3 bar); outside, the notes say so.
* **Flooding**: the pressure drop at flood of Kister and Gill (1991, Chem. Eng. Prog. 87(2),
  32-42), ``dP_flood = 0.115 Fp^0.7`` (in. water per ft, Fp in 1/ft; from memory, Perry's
  rounds the constant to 0.12); a stage floods where Robbins' pressure drop reaches it. The
  flood point is found at the stage's own liquid-to-vapor ratio, so the fraction of flood is
  the ratio of the flooding column area to the column's area.
* **HETP** rules of thumb (common practice, from memory, as collected by Kister 1992,
  ch. 11): random packings ``HETP = 18 d_p`` (1.5 ft per inch of nominal size; Frank 1977,
  Chem. Eng. 84(6), 111); structured packings ``HETP = 100/a_p + 0.10 m`` (1200/a_p in
  ft2/ft3 plus 4 in; Harrison and France 1989, Chem. Eng. 96(4), 121). Vendor data rule.
"""

from __future__ import annotations

import numpy as np

__all__ = [
    "INCH_WATER_PER_FOOT",
    "ROBBINS_LIQUID_LIMIT",
    "flood_area",
    "flood_pressure_drop",
    "hetp_rule_of_thumb",
    "robbins_liquid_load",
    "robbins_pressure_drop",
]

#: One inch of water per foot of packing, in Pa/m (249.0889 Pa over 0.3048 m).
INCH_WATER_PER_FOOT = 249.0889 / 0.3048
#: Largest liquid load factor for which Robbins' equation (not his chart) holds.
ROBBINS_LIQUID_LIMIT = 20000.0
_FLUX = 3600.0 / 0.45359237 * 0.3048**2  # kg/(m2 s) -> lb/(ft2 h)
_DENSITY = 0.3048**3 / 0.45359237  # kg/m3 -> lb/ft3
_PER_FOOT = 0.3048  # 1/m -> 1/ft
_C3, _C4 = 7.4e-8, 2.7e-5


def _factors(packing_factor: float) -> tuple[float, float]:
    Fpd = packing_factor * _PER_FOOT
    gas = np.sqrt(Fpd / 20.0)
    return gas, (gas if Fpd >= 15.0 else np.sqrt(20.0 / Fpd))


def robbins_liquid_load(L: np.ndarray, liquid_density: np.ndarray, liquid_viscosity: np.ndarray,
                        packing_factor: float) -> np.ndarray:
    """Robbins' liquid load factor ``Lf`` (lb/(ft2 h)) of a liquid mass flux ``L`` (kg/(m2 s)),
    density (kg/m3) and viscosity (Pa s) on a packing of dry packing factor (1/m)."""
    _, liquid_term = _factors(packing_factor)
    mu_cP = 1000.0 * np.asarray(liquid_viscosity)
    return np.asarray(L) * _FLUX * (62.4 / (np.asarray(liquid_density) * _DENSITY)) * liquid_term * mu_cP**0.1


def robbins_pressure_drop(G: np.ndarray, L: np.ndarray, vapor_density: np.ndarray, liquid_density: np.ndarray,
                          liquid_viscosity: np.ndarray, packing_factor: float) -> np.ndarray:
    """Pressure drop (Pa per m of packing) by Robbins' correlation: gas and liquid mass fluxes
    ``G``, ``L`` (kg/(m2 s)), densities (kg/m3), liquid viscosity (Pa s), dry packing factor
    (1/m)."""
    gas_term, _ = _factors(packing_factor)
    Gf = np.asarray(G) * _FLUX * np.sqrt(0.075 / (np.asarray(vapor_density) * _DENSITY)) * gas_term
    Lf = robbins_liquid_load(L, liquid_density, liquid_viscosity, packing_factor)
    first = _C3 * Gf**2 * 10.0 ** (_C4 * Lf)
    return (first + 0.4 * (Lf / ROBBINS_LIQUID_LIMIT) ** 0.1 * first**4) * INCH_WATER_PER_FOOT


def flood_pressure_drop(packing_factor: float) -> float:
    """Pressure drop at flood (Pa/m) of Kister and Gill (1991), packing factor in 1/m."""
    return 0.115 * (packing_factor * _PER_FOOT) ** 0.7 * INCH_WATER_PER_FOOT


def flood_area(vapor_mass_flow: np.ndarray, liquid_mass_flow: np.ndarray, vapor_density: np.ndarray,
               liquid_density: np.ndarray, liquid_viscosity: np.ndarray, packing_factor: float,
               flood_packing_factor: float | None = None) -> np.ndarray:
    """The column area (m2) at which each stage's vapor and liquid (kg/s) reach the flood
    pressure drop: Robbins' pressure drop falls monotonically with the area, so the root is
    bracketed and found by bisection in log(area), all stages at once."""
    limit = flood_pressure_drop(flood_packing_factor or packing_factor)
    V, L = np.asarray(vapor_mass_flow, dtype=float), np.asarray(liquid_mass_flow, dtype=float)

    def excess(area: np.ndarray) -> np.ndarray:
        return robbins_pressure_drop(V / area, L / area, vapor_density, liquid_density, liquid_viscosity,
                                     packing_factor) - limit

    low, high = np.full(V.shape, 1e-4), np.full(V.shape, 1e4)
    for _ in range(80):
        middle = np.sqrt(low * high)
        above = excess(middle) > 0.0
        low = np.where(above, middle, low)
        high = np.where(above, high, middle)
    return np.sqrt(low * high)


def hetp_rule_of_thumb(internals: str, nominal_size: float | None = None, specific_area: float | None = None) -> float:
    """HETP (m) by the rules of thumb of the module docstring: random packings from the
    nominal size (m), structured packings from the specific area (m2/m3)."""
    if internals == "random" and nominal_size is not None:
        return 18.0 * nominal_size
    if internals == "structured" and specific_area is not None:
        return 100.0 / specific_area + 0.1016
    raise ValueError(f"the HETP rule for {internals} packings needs "
                     f"{'nominal_size' if internals == 'random' else 'specific_area'}")
