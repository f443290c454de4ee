"""Bubble and dew points, flashes and the thermal condition of a feed.

All functions are vectorized over states (``n`` rows) and use a
:class:`~solver.thermo.package.ThermoPackage` for K-values and enthalpies.

* Bubble point: Newton on ``ln sum_i K_i(T, x) x_i = 0``.
* Dew point: Newton on ``ln sum_i y_i / K_i(T, x) = 0`` with the liquid composition updated
  by successive substitution, ``x = (y/K) / sum(y/K)``.
* Isothermal flash and flash at given vapor fraction: the Rachford-Rice equation (Rachford &
  Rice 1952, J. Petrol. Technol. 4(10):19), with K-values updated by successive substitution
  on the liquid composition.
* Feed thermal condition ``q = (h_V,dew - h_F) / (h_V,dew - h_L,bubble)``: heat needed to turn
  one mole of feed into saturated vapor divided by its molar latent heat (e.g. McCabe, Smith &
  Harriott, *Unit Operations of Chemical Engineering*, 7th ed., 2005, sec. 21). ``q > 1`` is a
  subcooled liquid, ``q < 0`` a superheated vapor.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ThermoError

__all__ = [
    "FeedState",
    "FlashResult",
    "bubble_temperature",
    "dew_temperature",
    "feed_state",
    "feed_state_by_phase",
    "flash_p_vapor_fraction",
    "flash_tp",
    "rachford_rice",
]

_MAX_TEMPERATURE_STEP = 25.0  # K per Newton step
_TOLERANCE = 1e-11


def _as_rows(values: np.ndarray, count: int | None = None) -> np.ndarray:
    array = np.atleast_1d(np.asarray(values, dtype=float))
    if count is not None and array.shape[0] == 1 and count > 1:
        array = np.repeat(array, count)
    return array


def _starting_temperature(thermo, pressure: np.ndarray, composition: np.ndarray) -> np.ndarray:
    """Mole-fraction average of the pure-component saturation temperatures at ``pressure``
    (needs only the vapor pressures: no heat of vaporization, no normal boiling point)."""
    saturation = thermo.saturation_temperatures(pressure)
    return np.clip(np.einsum("nc,nc->n", composition, saturation), _lower_temperature(thermo), _upper_temperature(thermo))


def _upper_temperature(thermo) -> float:
    return float(np.max(thermo.pure.critical_temperature)) * 0.999


def _lower_temperature(thermo) -> float:
    """Lowest temperature a bubble or dew point iteration may visit: a tenth of the lowest
    critical temperature (about 13 K for nitrogen, 65 K for water)."""
    return float(np.min(thermo.pure.critical_temperature)) * 0.1


def bubble_temperature(thermo, pressure, x, guess=None, max_iterations: int = 100,
                       vapor_guess=None) -> tuple[np.ndarray, np.ndarray]:
    """Bubble-point temperature (K) and incipient vapor composition of liquid ``x (n,c)`` at
    ``pressure (n,)`` Pa; ``vapor_guess (n,c)`` starts the incipient vapor where K depends on
    it. Raises :class:`ThermoError` if it does not converge."""
    x = np.atleast_2d(np.asarray(x, dtype=float))
    x = x / x.sum(axis=1, keepdims=True)
    pressure = _as_rows(pressure, x.shape[0])
    temperature = _starting_temperature(thermo, pressure, x) if guess is None else _as_rows(guess, x.shape[0]).copy()
    lower, upper = _lower_temperature(thermo), _upper_temperature(thermo)
    # where K depends on the vapor, the incipient vapor y = K x / sum(K x) moves by one
    # successive substitution per Newton step (the package finds it from scratch only at the
    # start); with that y the partial T-derivative is exact (see solver.thermo.eos_package)
    if vapor_guess is _FROM_WILSON:
        y = thermo.wilson_bubble_point(pressure, x)[1]
    else:
        y = None if vapor_guess is None or not thermo.vapor_dependent else np.array(vapor_guess, dtype=float)
    for _ in range(max_iterations):
        k = thermo.k_values(temperature, pressure, x, derivatives=True, y=y)
        total = np.einsum("nc,nc->n", k.K, x)
        residual = np.log(total)
        slope = np.einsum("nc,nc,nc->n", k.K, x, k.d_ln_K_dT) / total
        step = -residual / np.where(np.abs(slope) > 1e-12, slope, 1e-12)
        step = np.clip(step, -_MAX_TEMPERATURE_STEP, _MAX_TEMPERATURE_STEP)
        temperature = np.clip(temperature + step, lower, upper)
        settled = True
        if thermo.vapor_dependent:
            new_y = k.K * x / total[:, None]
            settled = y is not None and float(np.max(np.abs(new_y - y))) < 1e-10
            y = new_y
        if settled and np.all(np.abs(residual) < _TOLERANCE):
            break
    else:
        bad = int(np.argmax(np.abs(residual)))
        raise ThermoError(
            f"bubble point did not converge at {pressure[bad] / 1e5:.4g} bar for x = {np.round(x[bad], 6).tolist()}"
        )
    k = thermo.k_values(temperature, pressure, x, derivatives=False, y=y)
    y = k.K * x
    y = y / y.sum(axis=1, keepdims=True)
    if thermo.trivial_solution_possible and vapor_guess is not _FROM_WILSON:
        temperature, y = _leave_trivial_bubble_points(thermo, pressure, x, temperature, y, k.K, max_iterations)
    return temperature, y


_FROM_WILSON = object()  # marks a bubble-point iteration restarted from Wilson's K-values
#: a bubble point whose every |ln K_i| is below this has found the trivial solution (y = x)
_TRIVIAL_LN_K = 1e-3


def _leave_trivial_bubble_points(thermo, pressure, x, temperature, y, K, max_iterations):
    """Rows whose bubble point is the trivial solution of an equation of state (K = 1: the
    liquid and vapor roots one phase, reached from a start above the mixture's critical
    point) are started again from Wilson's estimate of the temperature and the vapor (see
    :meth:`~solver.thermo.eos_package.CubicThermoPackage.wilson_bubble_point`)."""
    trivial = np.max(np.abs(np.log(K)), axis=1) < _TRIVIAL_LN_K
    if not trivial.any():
        return temperature, y
    start, vapor = thermo.wilson_bubble_point(pressure[trivial], x[trivial])
    again, y_again = bubble_temperature(thermo, pressure[trivial], x[trivial], guess=start,
                                        max_iterations=max_iterations, vapor_guess=_FROM_WILSON)
    temperature, y = temperature.copy(), y.copy()
    temperature[trivial], y[trivial] = again, y_again
    return temperature, y


def dew_temperature(thermo, pressure, y, guess=None, max_iterations: int = 200) -> tuple[np.ndarray, np.ndarray]:
    """Dew-point temperature (K) and incipient liquid composition of vapor ``y (n,c)`` at
    ``pressure (n,)`` Pa. Raises :class:`ThermoError` if it does not converge."""
    y = np.atleast_2d(np.asarray(y, dtype=float))
    y = y / y.sum(axis=1, keepdims=True)
    pressure = _as_rows(pressure, y.shape[0])
    if guess is None:
        temperature, _ = bubble_temperature(thermo, pressure, y)
        temperature = temperature + 5.0
    else:
        temperature = _as_rows(guess, y.shape[0]).copy()
    lower, upper = _lower_temperature(thermo), _upper_temperature(thermo)
    x = y.copy()
    for _ in range(max_iterations):
        k = thermo.k_values(temperature, pressure, x, derivatives=True, y=y)
        ratio = y / k.K
        total = ratio.sum(axis=1)
        new_x = ratio / total[:, None]
        residual = np.log(total)
        slope = -np.einsum("nc,nc->n", ratio, k.d_ln_K_dT) / total
        step = -residual / np.where(np.abs(slope) > 1e-12, slope, -1e-12)
        step = np.clip(step, -_MAX_TEMPERATURE_STEP, _MAX_TEMPERATURE_STEP)
        change = np.max(np.abs(new_x - x))
        x = new_x
        temperature = np.clip(temperature + step, lower, upper)
        if np.all(np.abs(residual) < _TOLERANCE) and change < 1e-12:
            break
    else:
        bad = int(np.argmax(np.abs(residual)))
        raise ThermoError(
            f"dew point did not converge at {pressure[bad] / 1e5:.4g} bar for y = {np.round(y[bad], 6).tolist()}"
        )
    return temperature, x


def rachford_rice(z: np.ndarray, K: np.ndarray) -> np.ndarray:
    """Vapor fraction beta solving ``sum_i z_i (K_i - 1) / (1 + beta (K_i - 1)) = 0`` for each
    row, by Newton's method kept inside the bracket where all phase fractions are positive.
    Rows with no root in (0, 1) are clipped to 0 (all liquid) or 1 (all vapor)."""
    z = np.atleast_2d(z)
    K = np.atleast_2d(K)
    km1 = K - 1.0
    at_zero = np.einsum("nc,nc->n", z, km1)  # value at beta = 0
    at_one = np.einsum("nc,nc->n", z, km1 / K)  # value at beta = 1
    beta = np.full(z.shape[0], 0.5)
    low = np.zeros_like(beta)
    high = np.ones_like(beta)
    for _ in range(100):
        denominator = 1.0 + beta[:, None] * km1
        value = np.einsum("nc,nc->n", z, km1 / denominator)
        slope = -np.einsum("nc,nc->n", z, km1**2 / denominator**2)
        low = np.where(value > 0, beta, low)
        high = np.where(value < 0, beta, high)
        candidate = beta - value / np.where(slope < 0, slope, -1e-300)
        outside = (candidate <= low) | (candidate >= high)
        beta_new = np.where(outside, 0.5 * (low + high), candidate)
        if np.all(np.abs(beta_new - beta) < 1e-15):
            beta = beta_new
            break
        beta = beta_new
    beta = np.where(at_zero <= 0.0, 0.0, beta)
    beta = np.where(at_one >= 0.0, 1.0, beta)
    return beta


@dataclass(frozen=True)
class FlashResult:
    temperature: np.ndarray  # (n,) K
    pressure: np.ndarray  # (n,) Pa
    vapor_fraction: np.ndarray  # (n,) molar
    x: np.ndarray  # (n, c) liquid
    y: np.ndarray  # (n, c) vapor


def flash_tp(thermo, temperature, pressure, z, max_iterations: int = 300) -> FlashResult:
    """Isothermal flash of feed ``z (n,c)`` at ``temperature`` K and ``pressure`` Pa."""
    z = np.atleast_2d(np.asarray(z, dtype=float))
    z = z / z.sum(axis=1, keepdims=True)
    temperature = _as_rows(temperature, z.shape[0])
    pressure = _as_rows(pressure, z.shape[0])
    x = z.copy()
    y = z.copy()
    beta = np.full(z.shape[0], 0.5)
    for _ in range(max_iterations):
        K = thermo.k_values(temperature, pressure, x, derivatives=False, y=y).K
        beta = rachford_rice(z, K)
        denominator = 1.0 + beta[:, None] * (K - 1.0)
        new_x = z / denominator
        new_x = new_x / new_x.sum(axis=1, keepdims=True)
        new_y = K * new_x
        new_y = new_y / new_y.sum(axis=1, keepdims=True)
        change = max(np.max(np.abs(new_x - x)), np.max(np.abs(new_y - y)))
        x, y = new_x, new_y
        if change < 1e-13:
            break
    else:
        raise ThermoError(f"isothermal flash did not converge at {temperature.tolist()} K")
    # single-phase rows: the absent phase is the incipient one
    liquid_only = beta <= 0.0
    vapor_only = beta >= 1.0
    x = np.where(liquid_only[:, None], z, x)
    y = np.where(vapor_only[:, None], z, y)
    return FlashResult(temperature, pressure, beta, x, y)


def flash_p_vapor_fraction(thermo, pressure, z, vapor_fraction, max_iterations: int = 200) -> FlashResult:
    """Flash of feed ``z (n,c)`` at ``pressure`` Pa to a given molar ``vapor_fraction`` in [0, 1]:
    finds the temperature."""
    z = np.atleast_2d(np.asarray(z, dtype=float))
    z = z / z.sum(axis=1, keepdims=True)
    pressure = _as_rows(pressure, z.shape[0])
    beta = _as_rows(vapor_fraction, z.shape[0])
    bubble, y_bubble = bubble_temperature(thermo, pressure, z)
    dew, x_dew = dew_temperature(thermo, pressure, z)
    temperature = bubble + beta * (dew - bubble)
    x = z * (1 - beta[:, None]) + x_dew * beta[:, None]
    y = y_bubble * (1 - beta[:, None]) + z * beta[:, None]
    upper = _upper_temperature(thermo)
    for _ in range(max_iterations):
        k = thermo.k_values(temperature, pressure, x, derivatives=True, y=y)
        denominator = 1.0 + beta[:, None] * (k.K - 1.0)
        value = np.einsum("nc,nc->n", z, (k.K - 1.0) / denominator)
        slope = np.einsum("nc,nc,nc->n", z, k.K * k.d_ln_K_dT, 1.0 / denominator**2)
        step = np.clip(-value / slope, -_MAX_TEMPERATURE_STEP, _MAX_TEMPERATURE_STEP)
        temperature = np.clip(temperature + step, np.minimum(bubble, dew) - 1.0, min(upper, float(np.max(dew)) + 1.0))
        new_x = z / denominator
        new_x = new_x / new_x.sum(axis=1, keepdims=True)
        new_y = k.K * new_x
        new_y = new_y / new_y.sum(axis=1, keepdims=True)
        change = max(np.max(np.abs(new_x - x)), np.max(np.abs(new_y - y)))
        x, y = new_x, new_y
        if np.all(np.abs(value) < 1e-12) and change < 1e-12:
            break
    else:
        raise ThermoError(f"flash at vapor fraction {beta.tolist()} did not converge")
    K = thermo.k_values(temperature, pressure, x, derivatives=False, y=y).K
    y = K * x
    y = y / y.sum(axis=1, keepdims=True)
    return FlashResult(temperature, pressure, beta, x, y)


@dataclass(frozen=True)
class FeedState:
    """A feed's phase state at its own temperature and pressure, with its thermal condition."""

    temperature: float  # K
    pressure: float  # Pa
    vapor_fraction: float
    x: np.ndarray  # (c,)
    y: np.ndarray  # (c,)
    enthalpy: float  # J/mol, rigorous model
    q: float  # thermal condition
    bubble_temperature: float
    dew_temperature: float


def _feed_phases(thermo, composition, pressure: float, temperature: float | None, vapor_fraction: float | None):
    """(z, p, flash, bubble, dew) of a feed given by its temperature or its vapor fraction."""
    z = np.atleast_2d(np.asarray(composition, dtype=float))
    z = z / z.sum()
    p = np.array([float(pressure)])
    bubble, y_bubble = bubble_temperature(thermo, p, z)
    dew, x_dew = dew_temperature(thermo, p, z)
    if (temperature is None) == (vapor_fraction is None):
        raise ValueError("give exactly one of temperature and vapor_fraction")
    if temperature is not None:
        t = np.array([float(temperature)])
        if t[0] <= bubble[0]:
            flash = FlashResult(t, p, np.zeros(1), z.copy(), y_bubble)
        elif t[0] >= dew[0]:
            flash = FlashResult(t, p, np.ones(1), x_dew, z.copy())
        else:
            flash = flash_tp(thermo, t, p, z)
    else:
        flash = flash_p_vapor_fraction(thermo, p, z, np.array([float(vapor_fraction)]))
    return z, p, flash, bubble, dew


def feed_state_by_phase(
    thermo, composition, pressure: float, *, temperature: float | None = None, vapor_fraction: float | None = None
) -> FeedState:
    """A feed's state without real enthalpies (a component lacking heat-capacity or latent-heat
    data), for the ``cmo`` model: its thermal condition is its liquid fraction, ``q = 1 - vapor
    fraction`` (a subcooled liquid counts as saturated liquid, a superheated vapor as saturated
    vapor), and ``enthalpy`` is the vapor fraction times the constant molar latent heat."""
    _, _, flash, bubble, dew = _feed_phases(thermo, composition, pressure, temperature, vapor_fraction)
    beta = float(flash.vapor_fraction[0])
    return FeedState(
        temperature=float(flash.temperature[0]), pressure=float(pressure), vapor_fraction=beta,
        x=flash.x[0], y=flash.y[0], enthalpy=beta * thermo.cmo_latent_heat, q=1.0 - beta,
        bubble_temperature=float(bubble[0]), dew_temperature=float(dew[0]),
    )


def _one_phase_feed(thermo, z, pressure: float, temperature: float) -> str:
    """Why a feed's thermal condition has no meaning: its composition has no two-phase region
    at ``pressure`` (its bubble and dew points and their enthalpies coincide), with the
    mixture's critical point where the thermo package gives one."""
    text = (f"the feed's composition does not split into a liquid and a vapor at {pressure / 1e5:.4g} bar: its bubble "
            f"and dew points coincide ({temperature:.2f} K), so its thermal condition q is not defined")
    note = getattr(thermo, "critical_pressure_note", None)
    detail = note(pressure, z, "the feed") if note is not None else ""
    return f"{text}; {detail}" if detail else text


def feed_state(
    thermo,
    composition,
    pressure: float,
    *,
    temperature: float | None = None,
    vapor_fraction: float | None = None,
    reference_pressure: float | None = None,
) -> FeedState:
    """Phase state, rigorous molar enthalpy and thermal condition ``q`` of a feed given by its
    temperature or its vapor fraction at ``pressure``. ``q`` is judged against saturated
    liquid and vapor of the feed composition at ``reference_pressure`` (the pressure of the
    stage it enters; default ``pressure``): the feed's enthalpy is kept across the valve."""
    z, p, flash, bubble, dew = _feed_phases(thermo, composition, pressure, temperature, vapor_fraction)
    h_liquid, h_vapor = thermo.rigorous_enthalpies(flash.temperature, flash.x, flash.y, pressure=p)
    beta = float(flash.vapor_fraction[0])
    enthalpy = (1.0 - beta) * float(h_liquid[0]) + beta * float(h_vapor[0])
    if reference_pressure is not None and reference_pressure != pressure:
        p_ref = np.array([float(reference_pressure)])
        bubble_ref, _ = bubble_temperature(thermo, p_ref, z)
        dew_ref, _ = dew_temperature(thermo, p_ref, z)
    else:
        bubble_ref, dew_ref = bubble, dew
        p_ref = p
    saturated_liquid, _ = thermo.rigorous_enthalpies(bubble_ref, z, z, pressure=p_ref)
    _, saturated_vapor = thermo.rigorous_enthalpies(dew_ref, z, z, pressure=p_ref)
    latent = float(saturated_vapor[0]) - float(saturated_liquid[0])
    if not abs(latent) > 1e-9 * max(abs(float(saturated_vapor[0])), 1.0):
        raise ThermoError(_one_phase_feed(thermo, z[0], float(p_ref[0]), float(bubble_ref[0])))
    q = (float(saturated_vapor[0]) - enthalpy) / latent
    return FeedState(
        temperature=float(flash.temperature[0]),
        pressure=float(pressure),
        vapor_fraction=beta,
        x=flash.x[0],
        y=flash.y[0],
        enthalpy=enthalpy,
        q=q,
        bubble_temperature=float(bubble[0]),
        dew_temperature=float(dew[0]),
    )
