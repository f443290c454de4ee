"""Uncertainty of the data: the standard uncertainties a case states (``[uncertainty]``) matched
to the inputs of the sensitivities, propagated linearly to every output, and drawn as samples
for the Monte Carlo study (:mod:`solver.monte_carlo`).

Linear propagation (first-order, inputs independent; JCGM 100:2008, *Guide to the Expression of
Uncertainty in Measurement*, section 5.1.2): ``u(y)^2 = sum_m (dy/dp_m)^2 u(p_m)^2`` with the
derivatives of :mod:`solver.sensitivity` at the converged solution. It holds while the outputs
are close to linear over a few standard deviations of the inputs; the Monte Carlo study
(JCGM 101:2008, *Propagation of distributions using a Monte Carlo method*) does not need that.

Samples are normal about the nominal values, drawn from ``numpy.random.default_rng(seed)`` in
one block (sample-major), so that a seed gives the same samples on every machine and in any
order of solving. A drawn value outside the range its input can take (an efficiency above 1, a
mole fraction outside (0, 1), a negative non-randomness) is clipped into it; the number of
clipped draws is reported.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from .case import Case
from .errors import CaseError
from .network_sensitivity import network_inputs
from .results import json_safe
from .sensitivity import Sensitivities
from .sensitivity_inputs import InputParameter, choose_inputs

__all__ = ["LinearUncertainty", "UncertainInput", "clip_to_range", "draw_samples", "linear_uncertainty",
           "propagate", "uncertain_inputs"]


@dataclass(frozen=True)
class UncertainInput:
    """An input of the sensitivities and its standard uncertainty (SI, as stated at ``written``)."""

    parameter: InputParameter
    deviation: float
    written: str


def uncertain_inputs(case: Case) -> tuple[UncertainInput, ...]:
    """The inputs with a stated uncertainty, in the order of
    :func:`~solver.sensitivity_inputs.choose_inputs` (a network's:
    :func:`~solver.network_sensitivity.network_inputs`), the order in which samples are applied."""
    stated = {item.key: item for item in case.uncertainties}
    parameters = choose_inputs(case) if case.network is None else network_inputs(case)
    known = {parameter.key for parameter in parameters}
    for item in case.uncertainties:
        if item.key not in known:
            raise CaseError("not an input of this case that can be uncertain", file=case.source_file,
                            key=item.written, value=item.key)
    return tuple(UncertainInput(p, stated[p.key].value, stated[p.key].written) for p in parameters if p.key in stated)


def propagate(sensitivities: Sensitivities, inputs: tuple[UncertainInput, ...]) -> np.ndarray:
    """The standard uncertainty of every output of ``sensitivities`` (SI), inputs independent."""
    keys = [i.key for i in sensitivities.inputs]
    columns = [keys.index(item.parameter.key) for item in inputs]
    deviations = np.array([item.deviation for item in inputs])
    contributions = sensitivities.derivatives[:, columns] * deviations[None, :]
    return np.sqrt(np.sum(contributions ** 2, axis=1))


@dataclass(frozen=True)
class LinearUncertainty:
    """The standard uncertainty of every output in both views of a sensitivity study
    (``views``: name -> (sensitivities, standard uncertainties)); result.json ``uncertainty``."""

    inputs: tuple[UncertainInput, ...]
    views: tuple[tuple[str, Sensitivities, np.ndarray], ...]

    def deviation(self, view: str, key: str) -> float:
        for name, sensitivities, deviations in self.views:
            if name == view:
                return float(deviations[sensitivities.output_index(key)])
        raise KeyError(view)

    def as_json(self) -> dict[str, Any]:
        return json_safe({
            "schema": "traystack-uncertainty/1",
            "method": "linear propagation of independent standard uncertainties through the sensitivities "
                      "(JCGM 100:2008, 5.1.2)",
            "inputs": [{"key": i.parameter.key, "label": i.parameter.label, "value": i.parameter.value,
                        "unit": i.parameter.unit, "standard_uncertainty": i.deviation, "stated_at": i.written}
                       for i in self.inputs],
            **{name: [{"key": o.key, "value": o.value, "unit": o.unit, "standard_uncertainty": float(u)}
                      for o, u in zip(sensitivities.outputs, deviations)]
               for name, sensitivities, deviations in self.views},
        })


def linear_uncertainty(case: Case, study) -> LinearUncertainty | None:
    """The linear propagation of the case's stated uncertainties through a
    :class:`~solver.sensitivity.SensitivityStudy` (None when the case states none)."""
    inputs = uncertain_inputs(case)
    if not inputs:
        return None
    return LinearUncertainty(inputs, tuple((name, view, propagate(view, inputs)) for name, view in study.views()))


def clip_to_range(parameter: InputParameter, values: np.ndarray) -> np.ndarray:
    """``values`` of ``parameter`` clipped into the range the input can take."""
    key = parameter.key
    if key.endswith(".efficiency"):  # column.efficiency, or a network column's NAME.efficiency
        return np.clip(values, 1e-3, 1.0)
    if ".composition." in key:
        return np.clip(values, 1e-9, 1.0 - 1e-9)
    if key.endswith(".alpha"):
        return np.clip(values, 1e-3, None)
    if key.endswith(".temperature") and key.startswith("feeds["):
        return np.clip(values, 1.0, None)
    return values


def draw_samples(inputs: tuple[UncertainInput, ...], count: int, seed: int) -> tuple[np.ndarray, int]:
    """``count`` samples (rows) of the inputs (columns), normal about the nominal values, and the
    number of draws that were clipped into range."""
    generator = np.random.default_rng(seed)
    nominal = np.array([item.parameter.value for item in inputs])
    deviations = np.array([item.deviation for item in inputs])
    drawn = nominal[None, :] + deviations[None, :] * generator.standard_normal((count, len(inputs)))
    clipped = drawn.copy()
    for m, item in enumerate(inputs):
        clipped[:, m] = clip_to_range(item.parameter, drawn[:, m])
    return clipped, int(np.sum(clipped != drawn))
