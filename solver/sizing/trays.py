"""Crossflow trays (sieve and valve): entrainment flooding, the column area and diameter a
stage needs at a chosen fraction of flood, the downcomer, the weir and the tray's pressure drop.
Every function is vectorized over stages; SI units (m, m/s, kg/s, kg/m3, N/m, Pa).

* **Flooding**: Fair's entrainment-flooding chart (Fair, J. R. 1961, Petro/Chem Eng. 33(10),
  45), through the fit of Lygeros and Magoulas (1986, Hydrocarbon Processing 65(12), 43) as
  printed in Perry's Chemical Engineers' Handbook, 8th ed. (2008), Eq. 14-90:
  ``C_sbf = 0.0105 + 8.127e-4 TS^0.755 exp(-1.463 F_LV^0.842)`` (m/s, tray spacing TS in mm),
  ``F_LV = (L/G) (rho_V/rho_L)^0.5`` with mass flows; the flooding velocity through the net
  area ``U_nf = C_sbf (sigma/20 mN/m)^0.2 SF F_HA ((rho_L - rho_V)/rho_V)^0.5`` (Perry's
  Eq. 14-91 with the system factor SF, 1 for non-foaming systems). The fit lies up to about
  10 % below the chart at flow parameters 0.01-0.1 (our comparison with printed chart readings,
  tests/reference/test_sizing_examples.py), so it sizes on the safe side. Valid for
  low-foaming systems, weir height under 15 % of the tray spacing, holes up to 13 mm and a
  hole area at least 10 % of the active area; below that the capacity is multiplied by
  ``F_HA = 5 A_h/A_a + 0.5`` (down to 6 %; Seader and Henley, *Separation Process
  Principles*, 2nd ed., 2006, sec. 6.6, from memory).
* **Column area**: net area ``A_N = Q_V/(f U_nf)`` at the design fraction of flood ``f``, plus
  the downcomer area ``A_d``: from the flow parameter (``A_d/A`` = 0.1 up to F_LV 0.1, rising
  linearly to 0.2 at F_LV 1; Seader and Henley 2006, below Eq. 6-44), from a clear-liquid
  residence time over the tray spacing (``A_d = t Q_L / TS``; 3 to 5 s by foaming tendency,
  Kister, *Distillation Design*, 1992, ch. 6, common practice) or from a largest downcomer
  velocity (``A_d = Q_L/u_d``, common practice), the last two not below a minimum fraction.
* **Weir**: a single-pass segmental downcomer; the weir is the chord that cuts off ``A_d``;
  weir loading ``Q_L/l_w`` (m3/(h m)).
* **Pressure drop** of a sieve tray (a valve tray is estimated as a sieve tray of the same open
  area): dry orifice ``h_d = 0.051 (u_h/C_o)^2 rho_V/rho_L`` (m of liquid), weir crest by the
  Francis formula ``h_ow = 0.75 (L/(rho_L l_w))^(2/3)``, residual head ``12.5/rho_L`` and the
  weir height (Towler and Sinnott, *Chemical Engineering Design*, 2nd ed., 2013, sec. 17.13,
  from memory), ``dP = g rho_L (h_d + h_w + h_ow + h_r)``; ``C_o`` = 0.84 for 10 % hole area
  and a plate as thick as the hole diameter (the same source's chart, from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..case.sizing_table import DowncomerRule

__all__ = [
    "GRAVITY",
    "ORIFICE_COEFFICIENT",
    "TrayLoads",
    "TrayRating",
    "capacity_factor",
    "column_area",
    "downcomer_area",
    "flood_velocity",
    "flow_parameter",
    "hole_area_factor",
    "rate_trays",
    "segment_chord",
    "tray_pressure_drop",
]

GRAVITY = 9.80665  # m/s2
#: Orifice coefficient of a sieve tray with 10 % hole area, plate thickness = hole diameter.
ORIFICE_COEFFICIENT = 0.84
#: Surface tension at which Fair's chart is drawn (N/m).
CHART_SURFACE_TENSION = 0.020


@dataclass(frozen=True)
class TrayLoads:
    """What a tray carries, per stage: vapor and liquid mass flows (kg/s), densities
    (kg/m3), surface tension (N/m)."""

    vapor_mass_flow: np.ndarray
    liquid_mass_flow: np.ndarray
    vapor_density: np.ndarray
    liquid_density: np.ndarray
    surface_tension: np.ndarray

    @property
    def vapor_volume_flow(self) -> np.ndarray:
        return self.vapor_mass_flow / self.vapor_density

    @property
    def liquid_volume_flow(self) -> np.ndarray:
        return self.liquid_mass_flow / self.liquid_density


@dataclass(frozen=True)
class TrayRating:
    """Trays of column area ``area`` (m2) carrying ``loads``, per stage: flow parameter,
    flooding velocity through the net area (m/s), downcomer area (m2), fraction of flood,
    weir length (m), weir loading (m3/(h m)) and pressure drop (Pa)."""

    area: np.ndarray
    flow_parameter: np.ndarray
    flood_velocity: np.ndarray
    downcomer_area: np.ndarray
    fraction_of_flood: np.ndarray
    weir_length: np.ndarray
    weir_loading: np.ndarray
    pressure_drop: np.ndarray

    @property
    def diameter(self) -> np.ndarray:
        return np.sqrt(4.0 * self.area / np.pi)


def flow_parameter(liquid_mass_flow: np.ndarray, vapor_mass_flow: np.ndarray, liquid_density: np.ndarray,
                   vapor_density: np.ndarray) -> np.ndarray:
    """``F_LV = (L/G) (rho_V/rho_L)^0.5`` from mass flows and densities."""
    return liquid_mass_flow / vapor_mass_flow * np.sqrt(vapor_density / liquid_density)


def capacity_factor(tray_spacing: float, flow_parameter: np.ndarray) -> np.ndarray:
    """Fair's flood capacity factor ``C_sbf`` (m/s) at 20 mN/m, by the Lygeros-Magoulas fit
    (Perry's 8th ed. Eq. 14-90); ``tray_spacing`` in m."""
    spacing_mm = 1000.0 * tray_spacing
    return 0.0105 + 8.127e-4 * spacing_mm**0.755 * np.exp(-1.463 * np.asarray(flow_parameter) ** 0.842)


def hole_area_factor(hole_area_fraction: float) -> float:
    """Capacity multiplier for a hole (or open valve) area below 10 % of the active area."""
    return 1.0 if hole_area_fraction >= 0.1 else 5.0 * hole_area_fraction + 0.5


def flood_velocity(loads: TrayLoads, tray_spacing: float, system_factor: float = 1.0,
                   hole_area_fraction: float = 0.1) -> np.ndarray:
    """Entrainment-flooding vapor velocity through the net area (m/s), per stage."""
    F_LV = flow_parameter(loads.liquid_mass_flow, loads.vapor_mass_flow, loads.liquid_density, loads.vapor_density)
    C = capacity_factor(tray_spacing, F_LV) * (loads.surface_tension / CHART_SURFACE_TENSION) ** 0.2
    C = C * system_factor * hole_area_factor(hole_area_fraction)
    return C * np.sqrt((loads.liquid_density - loads.vapor_density) / loads.vapor_density)


def _flow_parameter_fraction(F_LV: np.ndarray) -> np.ndarray:
    return np.clip(0.1 + (np.asarray(F_LV) - 0.1) / 9.0, 0.1, 0.2)


def downcomer_area(rule: DowncomerRule, area: np.ndarray, loads: TrayLoads, tray_spacing: float) -> np.ndarray:
    """Downcomer area (m2) of trays of column area ``area`` (m2) by ``rule``."""
    if rule.rule == "flow_parameter":
        F_LV = flow_parameter(loads.liquid_mass_flow, loads.vapor_mass_flow, loads.liquid_density, loads.vapor_density)
        return _flow_parameter_fraction(F_LV) * area
    if rule.rule == "residence_time":
        needed = rule.residence_time * loads.liquid_volume_flow / tray_spacing
    else:
        needed = loads.liquid_volume_flow / rule.velocity
    return np.maximum(needed, rule.minimum_fraction * area)


def column_area(loads: TrayLoads, rule: DowncomerRule, tray_spacing: float, flood_fraction: float,
                system_factor: float = 1.0, hole_area_fraction: float = 0.1) -> np.ndarray:
    """The column area (m2) each stage needs for its vapor to flow at ``flood_fraction`` of
    its flooding velocity through the net area, with the downcomer of ``rule``."""
    net = loads.vapor_volume_flow / (flood_fraction * flood_velocity(loads, tray_spacing, system_factor,
                                                                     hole_area_fraction))
    if rule.rule == "flow_parameter":
        F_LV = flow_parameter(loads.liquid_mass_flow, loads.vapor_mass_flow, loads.liquid_density, loads.vapor_density)
        return net / (1.0 - _flow_parameter_fraction(F_LV))
    needed = (rule.residence_time * loads.liquid_volume_flow / tray_spacing if rule.rule == "residence_time"
              else loads.liquid_volume_flow / rule.velocity)
    return np.maximum(net + needed, net / (1.0 - rule.minimum_fraction))


def segment_chord(fraction: np.ndarray, diameter: np.ndarray) -> np.ndarray:
    """Length (m) of the chord that cuts off ``fraction`` of a circle of ``diameter``: the
    central angle solves ``(theta - sin theta) / (2 pi) = fraction`` (Newton's method)."""
    fraction = np.clip(np.asarray(fraction, dtype=float), 1e-6, 0.5)
    theta = np.cbrt(12.0 * np.pi * fraction)  # small-segment start: theta^3/12 = 2 pi fraction
    for _ in range(40):
        theta = theta - (theta - np.sin(theta) - 2.0 * np.pi * fraction) / (1.0 - np.cos(theta))
        theta = np.clip(theta, 1e-6, np.pi)
    return diameter * np.sin(theta / 2.0)


def tray_pressure_drop(loads: TrayLoads, area: np.ndarray, downcomer: np.ndarray, weir_length: np.ndarray,
                       hole_area_fraction: float, weir_height: float) -> np.ndarray:
    """Pressure drop of the vapor through one sieve tray (Pa): dry orifice, weir height,
    crest over the weir and residual head (module docstring)."""
    active = area - 2.0 * downcomer
    hole_velocity = loads.vapor_volume_flow / (hole_area_fraction * active)
    dry = 0.051 * (hole_velocity / ORIFICE_COEFFICIENT) ** 2 * loads.vapor_density / loads.liquid_density
    crest = 0.75 * (loads.liquid_mass_flow / (loads.liquid_density * weir_length)) ** (2.0 / 3.0)
    residual = 12.5 / loads.liquid_density
    return GRAVITY * loads.liquid_density * (dry + weir_height + crest + residual)


def rate_trays(loads: TrayLoads, area: np.ndarray | float, rule: DowncomerRule, tray_spacing: float,
               system_factor: float = 1.0, hole_area_fraction: float = 0.1, weir_height: float = 0.05) -> TrayRating:
    """Trays of column area ``area`` (m2; one per stage or one for all) carrying ``loads``:
    fraction of flood, downcomer, weir and pressure drop, per stage."""
    area = np.broadcast_to(np.asarray(area, dtype=float), loads.vapor_mass_flow.shape).copy()
    flood = flood_velocity(loads, tray_spacing, system_factor, hole_area_fraction)
    downcomer = downcomer_area(rule, area, loads, tray_spacing)
    net = area - downcomer
    fraction = np.where(net > 0.0, loads.vapor_volume_flow / (np.where(net > 0.0, net, 1.0) * flood), np.inf)
    diameter = np.sqrt(4.0 * area / np.pi)
    weir = segment_chord(downcomer / area, diameter)
    return TrayRating(
        area=area,
        flow_parameter=flow_parameter(loads.liquid_mass_flow, loads.vapor_mass_flow, loads.liquid_density,
                                      loads.vapor_density),
        flood_velocity=flood,
        downcomer_area=downcomer,
        fraction_of_flood=fraction,
        weir_length=weir,
        weir_loading=3600.0 * loads.liquid_volume_flow / weir,
        pressure_drop=tray_pressure_drop(loads, area, downcomer, weir, hole_area_fraction, weir_height),
    )
