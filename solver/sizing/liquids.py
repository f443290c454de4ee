"""Pure-component liquid properties for the hydraulics, each from a named source: surface
tension and liquid viscosity along the saturation curve, vectorized over temperatures.

Sources, in order:

* CoolProp's pure fluids (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498): the saturated
  liquid's surface tension (CoolProp's correlations of Mulero, Cachadina and Parra 2012,
  J. Phys. Chem. Ref. Data 41, 043105) and viscosity (the fluid's reference correlation), by
  ``AbstractState`` at vapor quality 0;
* where CoolProp has no surface tension for a fluid: the correlation of Mulero, Cachadina and
  Parra (2012), ``sigma = sum_k sigma_k (1 - T/Tc)^n_k``, through the registry package
  ``chemicals`` (its table ``sigma_data_Mulero_Cachadina``, which reproduces the paper);
* where CoolProp has no viscosity: Perry's Chemical Engineers' Handbook, 8th ed. (2008),
  Table 2-313 (DIPPR equation 101, ``ln mu = C1 + C2/T + C3 ln T + C4 T^C5``), through
  ``chemicals`` (``mu_data_Perrys_8E_2_313``); the same handbook the library's vapor pressures
  and heats of vaporization come from;
* a value the case gives under ``[sizing.components.NAME]`` (at column conditions) replaces
  any of these, and is the only source for a user-defined component.

The liquid molar volume comes from the thermo package (CoolProp's saturated liquid, or the
user's correlation, or the Rackett equation); a ``liquid_density`` given in the case replaces
it. A property nobody gives is a :class:`~solver.errors.CaseError` naming the key to add.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Mapping

import numpy as np

from ..case import Case
from ..case.sizing_table import ComponentHydraulicData
from ..components import ComponentInfo, component_info
from ..errors import CaseError, ThermoError
from ..thermo.package import ThermoPackage

__all__ = ["PropertySource", "PureLiquids", "coolprop_saturated_liquid"]

_MULERO = ("Mulero, A., Cachadina, I. and Parra, M. I. (2012), J. Phys. Chem. Ref. Data 41, 043105, "
           "through chemicals (sigma_data_Mulero_Cachadina)")
_PERRY_313 = ("Green, D. W. and Perry, R. H. (eds.) (2008), Perry's Chemical Engineers' Handbook, 8th ed., "
              "Table 2-313 (DIPPR equation 101), through chemicals (mu_data_Perrys_8E_2_313)")
#: Reduced temperature up to which saturated-liquid properties are evaluated; hotter stages
#: take the value there (a component that hot is a trace in the liquid, or the case is near
#: its critical point and the hydraulics are out of their range anyway).
HIGHEST_REDUCED_TEMPERATURE = 0.98


@dataclass(frozen=True)
class PropertySource:
    """Where one pure-component property comes from: ``component``, ``prop``, ``source``."""

    component: str
    prop: str
    source: str


Curve = Callable[[np.ndarray], np.ndarray]


def coolprop_saturated_liquid(fluid: str, T: np.ndarray, output: str) -> np.ndarray:
    """``output`` ("surface_tension" N/m, "viscosity" Pa s, "rhomolar" mol/m3) of CoolProp's
    saturated liquid ``fluid`` at temperatures ``T`` (K), clipped to the fluid's liquid range."""
    from CoolProp import CoolProp as CP

    state = CP.AbstractState("HEOS", fluid)
    low = max(state.Ttriple(), state.Tmin())
    high = HIGHEST_REDUCED_TEMPERATURE * state.T_critical()
    values = np.empty(np.size(T))
    for k, temperature in enumerate(np.clip(np.ravel(T), low, high)):
        state.update(CP.QT_INPUTS, 0.0, float(temperature))
        values[k] = getattr(state, output)()
    return values


class PureLiquids:
    """Surface tension (N/m) and viscosity (Pa s) of each pure liquid of a case, and its
    molar volume (m3/mol), at temperatures ``T`` (n,) -> (n, c); ``sources`` says where each
    came from. Build with :meth:`from_case`, which raises :class:`CaseError` for a property
    that no source has (naming the ``[sizing.components.NAME]`` key that would give it)."""

    def __init__(self, names: tuple[str, ...], molar_mass: np.ndarray, critical_temperature: np.ndarray,
                 tension: list[Curve], viscosity: list[Curve], volume: Curve, sources: tuple[PropertySource, ...]):
        self.names = names
        self.molar_mass = molar_mass
        self.critical_temperature = critical_temperature
        self._tension, self._viscosity, self._volume = tension, viscosity, volume
        self.sources = sources

    @classmethod
    def from_case(cls, case: Case, thermo: ThermoPackage, *, need_viscosity: bool = True) -> PureLiquids:
        given = case.sizing.components if case.sizing is not None else {}
        infos = [component_info(name, case.component_data) for name in case.component_names]
        tension, viscosity, sources = [], [], []
        for info in infos:
            data = given.get(info.name)
            for prop, curves, finder in (("surface_tension", tension, _surface_tension),
                                         ("liquid_viscosity", viscosity, _viscosity)):
                curve, source = _given(data, prop) or finder(info)
                if curve is None and (prop == "surface_tension" or need_viscosity):
                    raise CaseError(
                        f"no {prop.replace('_', ' ')} is known for {info.name} ({source}); give its value at column "
                        "conditions", file=case.source_file or None, key=f"sizing.components.{info.name}.{prop}",
                        expected=f"{prop} = '...' with its source under [sizing.components.{info.name}]")
                curves.append(curve or _nan)
                sources.append(PropertySource(info.name, prop, source))
        volume, volume_sources = _molar_volume(case, thermo, infos, given)
        return cls(tuple(case.component_names), np.array([i.molar_mass for i in infos]),
                   np.array([i.critical_temperature for i in infos]), tension, viscosity, volume,
                   tuple(sources) + volume_sources)

    def surface_tension(self, T: np.ndarray) -> np.ndarray:
        T = np.atleast_1d(np.asarray(T, dtype=float))
        return np.stack([curve(T) for curve in self._tension], axis=1)

    def viscosity(self, T: np.ndarray) -> np.ndarray:
        T = np.atleast_1d(np.asarray(T, dtype=float))
        return np.stack([curve(T) for curve in self._viscosity], axis=1)

    def molar_volume(self, T: np.ndarray) -> np.ndarray:
        return self._volume(np.atleast_1d(np.asarray(T, dtype=float)))

    def describe(self) -> list[dict[str, str]]:
        return [{"component": s.component, "property": s.prop, "source": s.source} for s in self.sources]


# --- where each property comes from -------------------------------------------------------


def _nan(T: np.ndarray) -> np.ndarray:
    return np.full(T.shape, np.nan)


def _constant(value: float) -> Curve:
    return lambda T: np.full(T.shape, value)


def _given(data: ComponentHydraulicData | None, prop: str) -> tuple[Curve, str] | None:
    value = getattr(data, prop, None) if data is not None else None
    if value is None:
        return None
    return _constant(value), f"given in the case at column conditions ({data.source})"


def _coolprop_curve(info: ComponentInfo, output: str) -> tuple[Curve | None, str]:
    """A CoolProp curve when the fluid has the property (tried at its normal boiling point or
    mid-range), else None and the reason."""
    if info.backend != "coolprop":
        return None, "a user-defined component"
    try:
        probe = info.normal_boiling_point or 0.7 * info.critical_temperature
        coolprop_saturated_liquid(info.coolprop_name, np.array([probe]), output)
    except ValueError as exc:
        return None, f"CoolProp has none for {info.coolprop_name} ({str(exc).splitlines()[0][:80]})"
    from ..components import coolprop_source

    fluid = info.coolprop_name
    return (lambda T: coolprop_saturated_liquid(fluid, T, output)), f"{coolprop_source(fluid)}, saturated liquid"


def _cas(info: ComponentInfo) -> str | None:
    from CoolProp import CoolProp as CP

    try:
        return CP.get_fluid_param_string(info.coolprop_name, "CAS") if info.coolprop_name else None
    except ValueError:
        return None


def _from_coolprop_or_table(info: ComponentInfo, output: str, fallback: Callable[[], tuple]) -> tuple[Curve | None, str]:
    """CoolProp's curve for ``output``; for a CoolProp fluid without it, the handbook table
    ``fallback()`` gives as (table keyed by CAS number, citation, curve from a row)."""
    curve, reason = _coolprop_curve(info, output)
    if curve is not None or info.backend != "coolprop":
        return curve, reason
    table, citation, curve_of = fallback()
    cas = _cas(info)
    if cas not in table.index:
        return None, f"{reason}; not in {citation.split(' (')[0]}"
    return curve_of(table.loc[cas]), citation


def _mulero_table() -> tuple:
    from chemicals.interface import sigma_data_Mulero_Cachadina as table

    def curve_of(row) -> Curve:
        terms = [(float(row[f"sigma{k}"]), float(row[f"n{k}"])) for k in range(3)]
        Tc = float(row["Tc"])
        return lambda T: sum(s * np.clip(1.0 - T / Tc, 0.0, None) ** n for s, n in terms)

    return table, _MULERO, curve_of


def _perry_313_table() -> tuple:
    from chemicals.viscosity import mu_data_Perrys_8E_2_313 as table

    def curve_of(row) -> Curve:
        C1, C2, C3, C4, C5 = (float(row[f"C{k}"]) for k in range(1, 6))
        return lambda T: np.exp(C1 + C2 / T + C3 * np.log(T) + C4 * T ** C5)

    return table, _PERRY_313, curve_of


def _surface_tension(info: ComponentInfo) -> tuple[Curve | None, str]:
    return _from_coolprop_or_table(info, "surface_tension", _mulero_table)


def _viscosity(info: ComponentInfo) -> tuple[Curve | None, str]:
    return _from_coolprop_or_table(info, "viscosity", _perry_313_table)


def _molar_volume(case: Case, thermo: ThermoPackage, infos: list[ComponentInfo],
                  given: Mapping[str, ComponentHydraulicData]) -> tuple[Curve, tuple[PropertySource, ...]]:
    """The saturated liquid molar volume of each component: a density given in the case, else
    the thermo package's (CoolProp's saturated liquid, the user's correlation, or Rackett)."""
    fixed = {}
    sources = []
    for k, info in enumerate(infos):
        data = given.get(info.name)
        if data is not None and data.liquid_density is not None:
            fixed[k] = info.molar_mass / data.liquid_density
            sources.append(PropertySource(info.name, "liquid_density", f"given in the case ({data.source})"))
            continue
        try:
            thermo.pure.liquid_molar_volume(np.array([0.7 * info.critical_temperature]))
        except ThermoError as exc:
            raise CaseError(f"no liquid density is known for {info.name} ({exc})", file=case.source_file or None,
                            key=f"sizing.components.{info.name}.liquid_density",
                            expected=f"liquid_density = '...' with its source under [sizing.components.{info.name}]",
                            ) from None
        sources.append(PropertySource(info.name, "liquid_density", _volume_source(info)))

    def volume(T: np.ndarray) -> np.ndarray:
        if len(fixed) == len(infos):
            values = np.empty((T.size, len(infos)))
        else:
            values = np.array(thermo.pure.liquid_molar_volume(T), dtype=float)
        for k, value in fixed.items():
            values[:, k] = value
        return values

    return volume, tuple(sources)


def _volume_source(info: ComponentInfo) -> str:
    if info.backend == "coolprop":
        from ..components import coolprop_source

        return f"{coolprop_source(info.coolprop_name)}, saturated liquid"
    return "the component's liquid_molar_volume correlation, or the Rackett equation (Rackett 1970)"

