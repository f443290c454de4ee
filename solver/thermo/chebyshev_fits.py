"""Piecewise Chebyshev fits of CoolProp's pure-fluid properties, built once per fluid (cached
in the process and on disk, :mod:`solver.thermo.fit_cache`): the saturation curve (vapor pressure, heat of vaporization, saturated liquid
volume) and the ideal-gas heat capacity, sampled with CoolProp's ``AbstractState`` (reference
equations of state; Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498-2508) and represented by
piecewise Chebyshev interpolants (Trefethen 2013, Approximation Theory and Approximation
Practice, SIAM, ch. 3-4):

* saturation properties in the variable ``s = ln(1 - T/Tc)``, which turns the power laws of the
  near-critical region (heat of vaporization ~ (1 - Tr)^0.38, Watson 1943, Ind. Eng. Chem. 35,
  398) into smooth functions: ``Tr ln(Psat/Pc)`` (the quantity of Wagner's vapor-pressure
  equation, Wagner 1973, Cryogenics 13, 470), ``ln dHvap`` and ``ln V_liquid``;
* the ideal-gas heat capacity ``cp0`` in T.

Each interpolant has equal pieces of :data:`SATURATION_TERMS` (saturation) or
:data:`IDEAL_GAS_TERMS` (cp0) Chebyshev coefficients; the number of pieces doubles until the
interpolant matches CoolProp within :data:`FIT_TOLERANCE` at the Chebyshev-Lobatto points of
every piece (where the interpolation error of Chebyshev nodes of the first kind peaks). The
achieved maximum error is kept and reported (:func:`describe_fit`). The fits are evaluated by
:mod:`solver.thermo.piecewise_table`.

A fit found in the disk cache under the same fluid, CoolProp version and fit settings is used
as stored (the coefficients exactly); CoolProp is imported only to build a fit that is not
there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Mapping

import numpy as np
from numpy.polynomial import chebyshev, polynomial

from solver.errors import ThermoError
from solver.fluids import coolprop_version
from solver.thermo import fit_cache

__all__ = [
    "CRITICAL_GAPS",
    "FIT_TOLERANCE",
    "IDEAL_GAS_TERMS",
    "LOW_END_PRESSURES",
    "MAX_PIECES",
    "SATURATION_TERMS",
    "IdealGasFit",
    "PiecewiseFit",
    "SaturationFits",
    "chebyshev_to_monomial",
    "describe_fit",
    "ideal_gas_fit",
    "saturation_fits",
]

#: Chebyshev coefficients per piece of the saturation fits and of the cp0 fit. Few terms and
#: more pieces make the evaluation cheap (it costs ~4 numpy operations per term).
SATURATION_TERMS = 6
IDEAL_GAS_TERMS = 6
#: Target of every fit: relative error (for ln Psat, ln dHvap and ln V: absolute error of the
#: logarithm, which is the relative error of the property) at the check points.
FIT_TOLERANCE = 3e-7
#: The most pieces one interpolant may use.
MAX_PIECES = 256
#: Closest approach of the saturation fits to Tc, tried in turn: T_high_fit = Tc (1 - gap).
CRITICAL_GAPS = (1e-4, 1e-3, 1e-2)
#: Saturation pressures (Pa) the lower end of the saturation fits is raised to, in turn, when
#: the tolerance cannot be met down to the triple point (a judgement: such pressures play no
#: part in a column; below the fit ln Psat is extrapolated linearly in 1/T).
LOW_END_PRESSURES = (1e-3, 1.0)


@dataclass(frozen=True)
class PiecewiseFit:
    """One quantity of one fluid as a piecewise Chebyshev interpolant on ``[low, high]`` of
    ``variable``, in ``pieces`` equal pieces; ``coefficients[i]`` are the Chebyshev coefficients
    of piece i in its local variable t in [-1, 1]."""

    quantity: str
    variable: str
    low: float
    high: float
    pieces: int
    coefficients: np.ndarray  # (pieces, terms)
    max_error: float
    error_measure: str

    @property
    def meets_tolerance(self) -> bool:
        return self.max_error <= FIT_TOLERANCE

    def monomial(self) -> np.ndarray:
        """Power-series coefficients of every piece in u = (t + 1)/2 in [0, 1], (pieces, terms)."""
        return self.coefficients @ chebyshev_to_monomial(self.coefficients.shape[1])


@dataclass(frozen=True)
class SaturationFits:
    """CoolProp saturation curve of one fluid as fits in ``s = ln(1 - T/Tc)``."""

    fluid: str
    critical_temperature: float
    critical_pressure: float
    T_low: float  # K, lower end of the fits (triple point or CoolProp's Tmin)
    T_high: float  # K, upper end, just below Tc
    wagner: PiecewiseFit  # Tr ln(Psat/Pc)
    ln_heat_of_vaporization: PiecewiseFit  # ln(h_satV - h_satL / (J/mol))
    ln_liquid_volume: PiecewiseFit  # ln(V_satL / (m3/mol))


@dataclass(frozen=True)
class IdealGasFit:
    """CoolProp ideal-gas heat capacity cp0 of one fluid, fitted in T on ``[cp.low, cp.high]``."""

    fluid: str
    cp: PiecewiseFit



@lru_cache(maxsize=None)
def saturation_fits(fluid: str) -> SaturationFits:
    """Fits of the CoolProp saturation curve of ``fluid`` (cached per process and on disk):
    ln Psat (as Tr ln(Psat/Pc)), ln dHvap and ln V_satL in s = ln(1 - T/Tc), from the triple
    point (or CoolProp's Tmin) to as close to Tc as the tolerance allows (see
    :data:`CRITICAL_GAPS`). If the tolerance cannot be met there, the lower end is raised to
    where Psat reaches :data:`LOW_END_PRESSURES` (far below anything a column sees) before the
    upper end is moved away from Tc."""
    key = _cache_key(fluid)
    stored = fit_cache.load("saturation", key)
    if stored is not None:
        try:
            return _saturation_from_json(stored, fluid)
        except (KeyError, TypeError, ValueError):  # a damaged entry: built again below
            pass
    fits = _build_saturation_fits(fluid)
    fit_cache.store("saturation", key, _saturation_to_json(fits))
    return fits


def _build_saturation_fits(fluid: str) -> SaturationFits:
    import CoolProp.CoolProp as CP

    state = CP.AbstractState("HEOS", fluid)
    Tc, Pc = float(state.T_critical()), float(state.p_critical())
    T_floor = max(float(state.Ttriple()), float(state.Tmin()))
    low_ends = [T_floor]
    for pressure in LOW_END_PRESSURES:
        try:
            state.update(CP.PQ_INPUTS, pressure, 0.0)
            low_ends.append(max(T_floor, float(state.T())))
        except ValueError:  # pressure below the triple point: the floor stays
            pass

    def sample(s: np.ndarray) -> dict[str, np.ndarray]:
        T = np.clip(Tc * (1.0 - np.exp(s)), T_floor, Tc)
        p = np.empty_like(T)
        dh = np.empty_like(T)
        rho = np.empty_like(T)
        for i, Ti in enumerate(T):
            state.update(CP.QT_INPUTS, 0.0, float(Ti))
            p[i] = state.p()
            dh[i] = state.saturated_vapor_keyed_output(CP.iHmolar) - state.saturated_liquid_keyed_output(CP.iHmolar)
            rho[i] = state.saturated_liquid_keyed_output(CP.iDmolar)
        return {"wagner": (T / Tc) * np.log(p / Pc), "ln_dh": np.log(dh), "ln_v": -np.log(rho)}

    def inverse_reduced(s: np.ndarray) -> np.ndarray:
        return 1.0 / (1.0 - np.exp(s))

    weights = {"wagner": inverse_reduced, "ln_dh": None, "ln_v": None}
    best: tuple[float, float, float, dict[str, PiecewiseFit]] | None = None
    last_error: Exception | None = None
    attempts = [(gap, T_low) for gap in CRITICAL_GAPS for T_low in dict.fromkeys(low_ends)]
    for gap, T_low in attempts:
        T_high = Tc * (1.0 - gap)
        if T_high <= T_low * 1.01:
            continue
        try:
            fits = _fit_adaptively(sample, math.log(gap), math.log(1.0 - T_low / Tc), weights, SATURATION_TERMS)
        except (ValueError, RuntimeError) as exc:  # CoolProp failed at some sample point
            last_error = exc
            continue
        worst = max(f.max_error for f in fits.values())
        if best is None or worst < best[0]:
            best = (worst, T_low, T_high, fits)
        if worst <= FIT_TOLERANCE:
            break
    if best is None:
        raise ThermoError(f"CoolProp could not compute the saturation curve of {fluid}: {last_error}")
    _, T_low, T_high, fits = best
    variable = "ln(1 - T/Tc)"
    return SaturationFits(
        fluid=fluid,
        critical_temperature=Tc,
        critical_pressure=Pc,
        T_low=T_low,
        T_high=T_high,
        wagner=_named(fits["wagner"], "Tr ln(Psat/Pc)", variable, "absolute error of ln Psat (relative error of Psat)"),
        ln_heat_of_vaporization=_named(fits["ln_dh"], "ln dHvap", variable, "absolute error of ln dHvap (relative error)"),
        ln_liquid_volume=_named(fits["ln_v"], "ln V_satL", variable, "absolute error of ln V (relative error)"),
    )


@lru_cache(maxsize=None)
def ideal_gas_fit(fluid: str, T_low: float, T_high: float) -> IdealGasFit:
    """Fit of CoolProp's ideal-gas heat capacity cp0 (J/(mol K)) of ``fluid`` on [T_low,
    T_high] K (cached per process and on disk)."""
    key = {**_cache_key(fluid), "T_low": float(T_low), "T_high": float(T_high)}
    stored = fit_cache.load("ideal_gas", key)
    if stored is not None:
        try:
            fit = _fit_from_json(stored["cp"], IDEAL_GAS_TERMS)
            if (fit.low, fit.high) == (float(T_low), float(T_high)):
                return IdealGasFit(fluid, fit)
        except (KeyError, TypeError, ValueError):  # a damaged entry: built again below
            pass
    fit = _build_ideal_gas_fit(fluid, T_low, T_high)
    fit_cache.store("ideal_gas", key, {"cp": _fit_to_json(fit.cp)})
    return fit


def _build_ideal_gas_fit(fluid: str, T_low: float, T_high: float) -> IdealGasFit:
    import CoolProp.CoolProp as CP

    state = CP.AbstractState("HEOS", fluid)
    density = 1e-6  # mol/m3; cp0 depends on T only, the density just makes a valid state

    def sample(T: np.ndarray) -> dict[str, np.ndarray]:
        cp = np.empty_like(T)
        for i, Ti in enumerate(T):
            state.update(CP.DmolarT_INPUTS, density, float(Ti))
            cp[i] = state.cp0molar()
        return {"cp": cp}

    try:
        fits = _fit_adaptively(sample, T_low, T_high, {"cp": "relative"}, IDEAL_GAS_TERMS)
    except (ValueError, RuntimeError) as exc:
        raise ThermoError(f"CoolProp could not compute the ideal-gas heat capacity of {fluid}: {exc}") from None
    return IdealGasFit(fluid, _named(fits["cp"], "cp0", "T", "relative error of cp0"))


def _cache_key(fluid: str) -> dict:
    """What a stored fit depends on: the fluid, CoolProp's version and every fit setting."""
    return {
        "fluid": fluid,
        "coolprop_version": coolprop_version(),
        "saturation_terms": SATURATION_TERMS,
        "ideal_gas_terms": IDEAL_GAS_TERMS,
        "fit_tolerance": FIT_TOLERANCE,
        "max_pieces": MAX_PIECES,
        "critical_gaps": list(CRITICAL_GAPS),
        "low_end_pressures": list(LOW_END_PRESSURES),
    }


def _fit_to_json(fit: PiecewiseFit) -> dict:
    return {
        "quantity": fit.quantity, "variable": fit.variable, "low": fit.low, "high": fit.high, "pieces": fit.pieces,
        "coefficients": fit.coefficients.tolist(), "max_error": fit.max_error, "error_measure": fit.error_measure,
    }


def _fit_from_json(data: dict, terms: int) -> PiecewiseFit:
    """A fit read back from the cache; ValueError if it is not a well-formed fit."""
    coefficients = np.array(data["coefficients"], dtype=float)
    pieces, low, high = data["pieces"], float(data["low"]), float(data["high"])
    if (
        not isinstance(pieces, int) or not 1 <= pieces <= MAX_PIECES
        or coefficients.shape != (pieces, terms) or not np.all(np.isfinite(coefficients))
        or not (math.isfinite(low) and math.isfinite(high) and low < high)
    ):
        raise ValueError("not a well-formed fit")
    coefficients.setflags(write=False)
    return PiecewiseFit(str(data["quantity"]), str(data["variable"]), low, high, pieces, coefficients,
                        float(data["max_error"]), str(data["error_measure"]))


def _saturation_to_json(fits: SaturationFits) -> dict:
    return {
        "critical_temperature": fits.critical_temperature, "critical_pressure": fits.critical_pressure,
        "T_low": fits.T_low, "T_high": fits.T_high, "wagner": _fit_to_json(fits.wagner),
        "ln_heat_of_vaporization": _fit_to_json(fits.ln_heat_of_vaporization),
        "ln_liquid_volume": _fit_to_json(fits.ln_liquid_volume),
    }


def _saturation_from_json(data: dict, fluid: str) -> SaturationFits:
    quantities = [_fit_from_json(data[name], SATURATION_TERMS)
                  for name in ("wagner", "ln_heat_of_vaporization", "ln_liquid_volume")]
    if len({(f.low, f.high, f.pieces) for f in quantities}) != 1:
        raise ValueError("the saturation fits do not share their pieces")
    return SaturationFits(fluid, float(data["critical_temperature"]), float(data["critical_pressure"]),
                          float(data["T_low"]), float(data["T_high"]), *quantities)


def _fit_adaptively(
    sample: Callable[[np.ndarray], dict[str, np.ndarray]],
    low: float,
    high: float,
    weights: Mapping[str, Callable[[np.ndarray], np.ndarray] | str | None],
    terms: int,
) -> dict[str, PiecewiseFit]:
    """Piecewise Chebyshev interpolants of the quantities ``sample`` returns, on ``[low, high]``
    with 1, 2, 4, ... equal pieces until all match at the check points (the quantities share
    their pieces, so one piece index serves all when evaluated). The error of a quantity is
    ``|fit - sample| * weight(x)`` (``None``: absolute; ``"relative"``: divided by the sampled
    value). If :data:`MAX_PIECES` is not enough, the level with the smallest worst error is
    kept (its errors are reported)."""
    nodes = np.cos(np.pi * (np.arange(terms) + 0.5) / terms)  # first kind
    checks = np.cos(np.pi * np.arange(terms + 1) / terms)  # Chebyshev-Lobatto
    to_coefficients = _values_to_chebyshev(terms)
    # checked in the local power form the evaluation uses, so its rounding is included
    at_checks = chebyshev_to_monomial(terms) @ polynomial.polyvander(0.5 * (checks + 1.0), terms - 1).T
    best: dict[str, PiecewiseFit] | None = None
    pieces = 1
    previous_worst = math.inf
    stalled = 0
    while pieces <= MAX_PIECES:
        edges = np.linspace(low, high, pieces + 1)
        middle = 0.5 * (edges[:-1] + edges[1:])
        half = 0.5 * (edges[1:] - edges[:-1])
        node_x = middle[:, None] + half[:, None] * nodes
        check_x = middle[:, None] + half[:, None] * checks
        sampled = sample(np.concatenate([node_x.ravel(), check_x.ravel()]))
        split = node_x.size
        level: dict[str, PiecewiseFit] = {}
        for name, weight in weights.items():
            values = sampled[name]
            if not np.all(np.isfinite(values)):
                raise ValueError(f"non-finite {name} sampled between {low:g} and {high:g}")
            coefficients = values[:split].reshape(pieces, terms) @ to_coefficients.T
            expected = values[split:].reshape(pieces, terms + 1)
            error = np.abs(coefficients @ at_checks - expected)
            if weight == "relative":
                error /= np.abs(expected)
            elif weight is not None:
                error *= weight(check_x)
            level[name] = PiecewiseFit(name, "", low, high, pieces, coefficients, float(error.max()), "")
        worst = max(f.max_error for f in level.values())
        if best is None or worst < max(f.max_error for f in best.values()):
            best = level
        if worst <= FIT_TOLERANCE:
            break
        # a smooth function loses a factor 2^terms per doubling; much less means noise or a
        # singularity in the sampled data, and more pieces will not help
        stalled = stalled + 1 if pieces >= 16 and worst > 0.25 * previous_worst else 0
        if stalled >= 2:
            break
        previous_worst = worst
        pieces *= 2
    return best


@lru_cache(maxsize=None)
def _values_to_chebyshev(terms: int) -> np.ndarray:
    """Matrix taking values at the first-kind Chebyshev nodes to Chebyshev coefficients."""
    theta = np.pi * (np.arange(terms) + 0.5) / terms
    matrix = (2.0 / terms) * np.cos(np.outer(np.arange(terms), theta))
    matrix[0] *= 0.5
    return matrix


@lru_cache(maxsize=None)
def chebyshev_to_monomial(terms: int) -> np.ndarray:
    """(terms, terms) matrix M: power-series coefficients in u = (t + 1)/2 of a Chebyshev
    series in t are (Chebyshev coefficients) @ M."""
    matrix = np.zeros((terms, terms))
    t_of_u = polynomial.Polynomial([-1.0, 2.0])
    for k in range(terms):
        unit = np.zeros(terms)
        unit[k] = 1.0
        in_u = polynomial.Polynomial(chebyshev.cheb2poly(unit))(t_of_u).coef
        matrix[k, : in_u.size] = in_u
    return matrix


def _named(fit: PiecewiseFit, quantity: str, variable: str, measure: str) -> PiecewiseFit:
    coefficients = fit.coefficients.copy()
    coefficients.setflags(write=False)
    return PiecewiseFit(quantity, variable, fit.low, fit.high, fit.pieces, coefficients, fit.max_error, measure)


def describe_fit(fit: PiecewiseFit, saturation: SaturationFits | None) -> dict:
    if saturation is not None:
        T_range = [saturation.T_low, saturation.T_high]
    else:
        T_range = [fit.low, fit.high]
    return {
        "quantity": fit.quantity,
        "variable": fit.variable,
        "T_min": T_range[0],
        "T_max": T_range[1],
        "pieces": fit.pieces,
        "degree": fit.coefficients.shape[1] - 1,
        "max_error": fit.max_error,
        "error_measure": fit.error_measure,
        "meets_tolerance": fit.meets_tolerance,
    }
