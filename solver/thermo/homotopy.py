"""A thermo package part way between the easy model and the real one, for continuation.

At ``t = 0`` the liquid is an ideal solution (K = Psat / P) and the enthalpies are those of
the ``cmo`` model (equal constant molar latent heats, no sensible heat); at ``t = 1`` it is the
real package. In between, ``ln gamma_t = t ln gamma`` and every phase enthalpy is
``t h_real,t + (1 - t) h_cmo``, where ``h_real,t`` carries the excess enthalpy of the scaled
activity model (so the heat of mixing enters as ``t^2 h_E``). The maps are smooth in ``t`` and
the derivatives with respect to T and composition carry over unchanged. This is the "thermodynamic homotopy" used to reach hard
column solutions from easy ones (e.g. Wayburn & Seader, Comput. Chem. Eng. 11 (1987) 7;
Kovach & Seider, Comput. Chem. Eng. 11 (1987) 593).
"""

from __future__ import annotations

import numpy as np

from .activity import ActivityResult
from .package import PhaseEnthalpy, StageProperties, ThermoPackage

__all__ = ["HomotopyThermo", "ScaledActivity"]


class ScaledActivity:
    """An activity model whose ln(gamma) (and so excess enthalpy) is multiplied by ``t``."""

    def __init__(self, model, t: float) -> None:
        self.model = model
        self.t = float(t)
        self.name = f"{model.name} x {self.t:g}"
        self.component_count = model.component_count

    def evaluate(self, temperature, x, derivatives: bool = True) -> ActivityResult:
        result = self.model.evaluate(temperature, x, derivatives=derivatives)
        t = self.t

        def scaled(value):
            return None if value is None else t * value

        return ActivityResult(
            ln_gamma=t * result.ln_gamma,
            d_ln_gamma_dT=scaled(result.d_ln_gamma_dT),
            d_ln_gamma_dx=scaled(result.d_ln_gamma_dx),
            excess_enthalpy=t * result.excess_enthalpy,
            d_excess_enthalpy_dT=scaled(result.d_excess_enthalpy_dT),
            d_excess_enthalpy_dx=scaled(result.d_excess_enthalpy_dx),
        )

    def ln_gamma(self, temperature, x) -> np.ndarray:
        return self.t * self.model.ln_gamma(temperature, x)

    def describe(self) -> dict:
        return {"scaled_by": self.t, "model": self.model.describe()}


def _blend(t: float, real: PhaseEnthalpy, easy: PhaseEnthalpy) -> PhaseEnthalpy:
    s = 1.0 - t
    return PhaseEnthalpy(
        t * real.molar + s * easy.molar,
        t * real.d_dT + s * easy.d_dT,
        t * real.d_dx + s * easy.d_dx,
        t * real.pure + s * easy.pure,
        t * real.excess + s * easy.excess,
    )


class HomotopyThermo(ThermoPackage):
    """``base`` at homotopy parameter ``t`` in [0, 1] (1 = ``base`` itself)."""

    def __init__(self, base: ThermoPackage, t: float) -> None:
        super().__init__(
            base.pure,
            ScaledActivity(base.activity, t),
            enthalpy=base.enthalpy_model,
            cmo_latent_heat=base.cmo_latent_heat,
            description=base._description,
        )
        self.base = base
        self.t = float(t)

    def _blended(self) -> bool:
        return self.enthalpy_model == "rigorous" and self.t < 1.0

    def liquid_enthalpy(self, temperature, x, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        if model is not None or not self._blended():
            return super().liquid_enthalpy(temperature, x, model=model)
        return _blend(self.t, super().liquid_enthalpy(temperature, x, "rigorous"), super().liquid_enthalpy(temperature, x, "cmo"))

    def vapor_enthalpy(self, temperature, y, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        if model is not None or not self._blended():
            return super().vapor_enthalpy(temperature, y, model=model)
        return _blend(self.t, super().vapor_enthalpy(temperature, y, "rigorous"), super().vapor_enthalpy(temperature, y, "cmo"))

    def rigorous_enthalpies(self, temperature, x, y, pressure=None):
        """A feed's thermal condition is judged with the real package at every ``t``."""
        return self.base.rigorous_enthalpies(temperature, x, y, pressure=pressure)

    def stage_properties(self, temperature, pressure, x, y) -> StageProperties:
        props = super().stage_properties(temperature, pressure, x, y)
        if not self._blended():
            return props
        T = np.asarray(temperature, dtype=float)
        liquid = _blend(self.t, props.liquid, super().liquid_enthalpy(T, x, "cmo"))
        vapor = _blend(self.t, props.vapor, super().vapor_enthalpy(T, y, "cmo"))
        return StageProperties(props.k_values, liquid, vapor)

    def describe(self) -> dict:
        return self.base.describe()
