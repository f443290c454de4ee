"""Pure components of the handbook library (:mod:`solver.handbook`) as the thermo package
evaluates them: each correlation inside its stated range and, beyond it, the documented
continuation of :mod:`solver.thermo.extrapolation` toward the critical point (Lee-Kesler vapor
pressure, Watson's law, the Rackett equation, a linear ideal-gas heat capacity), never the
plain clip-and-extend of user components. Temperatures outside a range are not an error; they
are reported as range notes (:meth:`LibraryComponent.range_notes`) naming the component, the
property, the range and the method used."""

from __future__ import annotations

import numpy as np

from solver.components import ComponentInfo
from solver.thermo import extrapolation
from solver.thermo.data import ComponentData
from solver.thermo.user_components import UserComponent

__all__ = ["LibraryComponent", "PROPERTIES"]

#: Attribute of ComponentData -> the property's name in range notes.
PROPERTIES = {
    "vapor_pressure": "vapor pressure",
    "heat_of_vaporization": "heat of vaporization",
    "ideal_gas_cp": "ideal-gas heat capacity",
    "liquid_molar_volume": "liquid molar volume",
}


class LibraryComponent(UserComponent):
    """A handbook component: the evaluation of :class:`UserComponent` with the extrapolations
    of :mod:`solver.thermo.extrapolation` outside each correlation's range."""

    def __init__(self, info: ComponentInfo, data: ComponentData) -> None:
        super().__init__(info, data)
        self.Pc = data.critical_pressure
        self.omega = extrapolation.acentric_factor(data.vapor_pressure, self.Tc, self.Pc, data.normal_boiling_point)

    def ln_vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return extrapolation.ln_vapor_pressure(
            self.data.vapor_pressure, T, Tc=self.Tc, Pc=self.Pc, omega=self.omega, warn=False
        )

    def heat_of_vaporization(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.heat_of_vaporization
        if corr is None:
            raise self._missing("heat_of_vaporization", "use enthalpy = 'cmo'")
        return extrapolation.heat_of_vaporization(corr, T, Tc=self.Tc, warn=False)

    def ideal_gas_enthalpy(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.ideal_gas_cp
        if corr is None:
            raise self._missing("ideal_gas_cp", "use enthalpy = 'cmo'")
        return extrapolation.ideal_gas_enthalpy(corr, T, warn=False)

    def liquid_molar_volume_and_slope(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.liquid_molar_volume
        if corr is None:
            return super().liquid_molar_volume_and_slope(T)
        return extrapolation.liquid_molar_volume(corr, T, Tc=self.Tc, Pc=self.Pc, warn=False)

    def check_temperature(self, T: np.ndarray) -> None:
        """Nothing to refuse below Tc (the package checks Tc): outside a range the documented
        extrapolation applies, and :meth:`range_notes` says so."""

    def range_notes(self, T: np.ndarray) -> list[str]:
        """One note per property and side on which a temperature (K) lies outside the
        correlation's range (:func:`solver.thermo.extrapolation.range_notes`)."""
        notes: list[str] = []
        for key, prop in PROPERTIES.items():
            corr = getattr(self.data, key)
            if corr is not None:
                notes += extrapolation.range_notes(corr, np.asarray(T, dtype=float), component=self.info.name, prop=prop)
        return notes

    def describe(self) -> dict:
        described = super().describe()
        if self.data.provenance:
            described["handbook"] = dict(self.data.provenance)
        return described
