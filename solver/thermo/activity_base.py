"""What every activity model shares: the result of an evaluation (:class:`ActivityResult`),
the check of the states asked for, per-thread scratch arrays, the excess enthalpy by
Gibbs-Helmholtz, the base class :class:`ActivityModel`, and the ideal solution. The
conventions (stage first, mole-number form) are those of :mod:`solver.thermo.activity`."""

from __future__ import annotations

import threading
from dataclasses import dataclass

import numpy as np
from scipy.constants import R as GAS_CONSTANT

from solver.errors import CaseError, ThermoError

__all__ = [
    "ActivityModel",
    "ActivityResult",
    "IdealSolution",
    "ScratchArrays",
    "check_states",
    "excess_enthalpy",
    "stage_first_into",
]


@dataclass(frozen=True)
class ActivityResult:
    """Activity coefficients of n liquid states of c components and their derivatives.

    ``d_ln_gamma_dx[s, i, k]`` is d ln gamma_i / d x_k with every other x held fixed. The
    derivative arrays are None when ``evaluate(..., derivatives=False)`` was asked for.
    """

    ln_gamma: np.ndarray  # (n, c)
    d_ln_gamma_dT: np.ndarray | None  # (n, c) [1/K]
    d_ln_gamma_dx: np.ndarray | None  # (n, c, c)
    excess_enthalpy: np.ndarray  # (n,) [J/mol of mixture]
    d_excess_enthalpy_dT: np.ndarray | None  # (n,) [J/mol/K]
    d_excess_enthalpy_dx: np.ndarray | None  # (n, c) [J/mol]



def check_states(model: str, component_count: int, temperature, x) -> tuple[np.ndarray, np.ndarray]:
    """temperature (n,) [K] and x (n, c) as float arrays; a single state may be given as a
    scalar temperature and x of shape (c,)."""
    temperature = np.asarray(temperature, dtype=float)
    x = np.asarray(x, dtype=float)
    if x.ndim == 1:
        x = x[None, :]
    if temperature.ndim == 0:
        temperature = np.full(x.shape[0], float(temperature))
    if x.ndim != 2 or x.shape[1] != component_count or temperature.shape != (x.shape[0],):
        raise ThermoError(
            f"{model} activity model: temperature must have shape (n,) and x shape (n, {component_count}); "
            f"got temperature {temperature.shape} and x {x.shape}"
        )
    if not np.all(temperature > 0.0):
        raise ThermoError(f"{model} activity model: temperature must be positive, got {temperature.min()!r} K")
    return temperature, x



# --------------------------------------------------------------------------------------------
# pieces shared by the models


class ScratchArrays(threading.local):
    """Per-thread scratch arrays (count, c, c, n), kept between calls with the same n.

    Allocating and freeing ten or so 100 kB temporaries per call can cost more than the
    arithmetic (the C allocator may hand the memory back to the system after each call and
    page-fault it in again), so the hot paths write into these instead. Results never alias them.
    """

    def __init__(self, count: int, component_count: int) -> None:
        self.count = count
        self.component_count = component_count
        self.arrays = np.empty((count, component_count, component_count, 0))

    def __reduce__(self):
        # a model pickles (for worker processes) with fresh, empty scratch arrays
        return (ScratchArrays, (self.count, self.component_count))

    def get(self, stage_count: int) -> np.ndarray:
        if self.arrays.shape[-1] != stage_count:
            c = self.component_count
            self.arrays = np.empty((self.count, c, c, stage_count))
        return self.arrays



def stage_first_into(matrix: np.ndarray, out: np.ndarray, *, transpose: bool = False) -> np.ndarray:
    """Copies (c, c, n) ``matrix`` [i, j, s] into the memory of ``out`` as (n, c, c) [s, i, j]
    ([s, j, i] with ``transpose``) and returns that view."""
    c, _, n = matrix.shape
    view = out.reshape(n, c, c)
    np.copyto(view, matrix.transpose(2, 1, 0) if transpose else matrix.transpose(2, 0, 1))
    return view


def excess_enthalpy(
    temperature: np.ndarray,
    x: np.ndarray,
    d_ln_gamma_dT: np.ndarray,
    weighted_second_temperature_derivative: np.ndarray | None,
) -> tuple[np.ndarray, np.ndarray | None, np.ndarray | None]:
    """h^E = -R T^2 sum_i x_i d ln gamma_i/dT (Gibbs-Helmholtz) [J/mol] and its derivatives;
    x and d_ln_gamma_dT are (n, c).

    ``weighted_second_temperature_derivative`` is sum_i x_i d2 ln gamma_i / dT2 (None: no
    derivatives wanted). Because every model here is homogeneous of degree zero in x and
    ln gamma_i = d(n g^E/RT)/d n_i, sum_i x_i d2 ln gamma_i/(dT dx_k) = 0 and so
    dh^E/dx_k = -R T^2 d ln gamma_k / dT.
    """
    r_t = GAS_CONSTANT * temperature
    first = np.einsum("si,si->s", x, d_ln_gamma_dT)
    enthalpy = -r_t * temperature * first
    if weighted_second_temperature_derivative is None:
        return enthalpy, None, None
    d_dT = -2.0 * r_t * first - r_t * temperature * weighted_second_temperature_derivative
    d_dx = (-r_t * temperature)[:, None] * d_ln_gamma_dT
    return enthalpy, d_dT, d_dx



class ActivityModel:
    """What every model shares: the convenience method ``ln_gamma``."""

    component_count: int

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        raise NotImplementedError

    def ln_gamma(self, temperature: np.ndarray, x: np.ndarray) -> np.ndarray:
        """ln gamma (n, c) for temperature (n,) [K] and x (n, c)."""
        return self.evaluate(temperature, x, derivatives=False).ln_gamma


# --------------------------------------------------------------------------------------------
# models


class IdealSolution(ActivityModel):
    """Ideal liquid solution: gamma_i = 1, no heat of mixing."""

    name = "ideal"

    def __init__(self, component_count: int) -> None:
        if int(component_count) != component_count or component_count < 1:
            raise CaseError("component count must be a positive whole number", value=component_count)
        self.component_count = int(component_count)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma = 0 and h^E = 0 for temperature (n,) [K] and x (n, c)."""
        temperature, x = check_states(self.name, self.component_count, temperature, x)
        n, c = x.shape
        return ActivityResult(
            ln_gamma=np.zeros((n, c)),
            d_ln_gamma_dT=np.zeros((n, c)) if derivatives else None,
            d_ln_gamma_dx=np.zeros((n, c, c)) if derivatives else None,
            excess_enthalpy=np.zeros(n),
            d_excess_enthalpy_dT=np.zeros(n) if derivatives else None,
            d_excess_enthalpy_dx=np.zeros((n, c)) if derivatives else None,
        )

    def describe(self) -> dict:
        return {"model": self.name, "component_count": self.component_count}
