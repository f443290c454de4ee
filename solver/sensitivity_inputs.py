"""The inputs a column's sensitivities are taken with respect to, each a way of moving one
number of the case (or of its property model) while everything else stays as it is.

An :class:`InputParameter` names the number (``key``, in the dotted words of the case file where
it has one), gives its nominal ``value`` in SI and a ``scale`` (the size that makes a derivative
a relative one: the value itself, or 1 for a shift that is already relative), and ``apply``:
``apply(case, thermo, value) -> (case, thermo)`` gives the case and the thermo package with the
number set to ``value``. The same function serves the sensitivities (residuals at the converged
point of the moved model) and the checks that solve the moved column again.

Kinds, in the order :func:`choose_inputs` lists them:

* ``spec``: the value of every specification;
* ``feed``: each feed's flow, its mole fraction of each component (the others in proportion),
  its temperature and pressure where the case gives them;
* ``column``: the top pressure (every stage's pressure moved by the same amount, the pressure
  drop kept) and the Murphree efficiency of the trays (every stage but the condenser and the
  reboiler moved by the same amount);
* ``binary``: every non-zero term of every binary parameter of the activity model and NRTL's
  non-randomness; with an equation of state, k_ij of every pair;
* ``vapor_pressure``: a shift of ``ln Psat`` of each component (``Psat exp(shift)``; modified
  Raoult's law only), nominal 0, so its derivative is per unit relative change of Psat.
"""

from __future__ import annotations

import dataclasses
import itertools
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .case import Case
from .case.model import InteractionParameter
from .spec_kinds import SI_UNITS, spec_kind
from .thermo.package import ThermoPackage, activity_model

__all__ = ["INPUT_KINDS", "InputParameter", "ShiftedVaporPressure", "choose_inputs"]

INPUT_KINDS = ("spec", "feed", "column", "binary", "vapor_pressure")

Apply = Callable[[Case, ThermoPackage, float], "tuple[Case, ThermoPackage]"]

_EQUATIONS_OF_STATE = ("peng-robinson", "soave-redlich-kwong")
_TERMS = ("constant_term", "term_over_temperature", "term_in_ln_temperature", "term_times_temperature")
_TERM_UNITS = {"constant_term": "1", "term_over_temperature": "K", "term_in_ln_temperature": "1",
               "term_times_temperature": "1/K"}


@dataclass(frozen=True)
class InputParameter:
    """One input: ``key`` (dotted, as in the case file where it has one), ``label`` (words),
    ``kind`` (one of :data:`INPUT_KINDS`), nominal ``value`` and ``unit`` (SI), ``scale`` (the
    elasticity is ``scale / output * d output / d input``) and ``apply``. ``changes_thermo``,
    ``changes_column`` and ``changes_feeds`` say what has to be built again when it moves."""

    key: str
    label: str
    kind: str
    value: float
    unit: str
    scale: float
    apply: Apply = dataclasses.field(repr=False, compare=False)
    changes_thermo: bool = False
    changes_column: bool = False
    changes_feeds: bool = False

    def step(self, relative: float) -> float:
        """A finite-difference step of relative size ``relative`` for this input."""
        return relative * max(abs(self.value), abs(self.scale), 1e-12)


class ShiftedVaporPressure:
    """The pure-component properties of ``pure`` with ``ln Psat_i`` raised by ``shift_i``
    (``Psat_i exp(shift_i)``); every other property as ``pure`` has it. A constant shift leaves
    ``d ln Psat/dT`` and so any Clausius-Clapeyron latent heat unchanged."""

    def __init__(self, pure, shift: np.ndarray) -> None:
        self._pure = pure
        self.shift = np.asarray(shift, dtype=float)

    def __getattr__(self, name: str):
        return getattr(self._pure, name)

    def ln_vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        ln_p, slope = self._pure.ln_vapor_pressure(T)
        return ln_p + self.shift, slope

    def vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        ln_p, slope = self.ln_vapor_pressure(T)
        pressure = np.exp(ln_p)
        return pressure, pressure * slope


def _with_spec_value(index: int) -> Apply:
    def apply(case: Case, thermo: ThermoPackage, value: float):
        specs = list(case.specs)
        specs[index] = dataclasses.replace(specs[index], value=value)
        return dataclasses.replace(case, specs=tuple(specs)), thermo
    return apply


def _with_feed(index: int, change: Callable) -> Apply:
    def apply(case: Case, thermo: ThermoPackage, value: float):
        feeds = list(case.feeds)
        feeds[index] = change(feeds[index], value)
        return dataclasses.replace(case, feeds=tuple(feeds)), thermo
    return apply


def _feed_composition(component: int) -> Callable:
    """Set one mole fraction, the others scaled in proportion so that they still sum to 1."""
    def change(feed, value: float):
        z = np.asarray(feed.composition, dtype=float)
        rest = 1.0 - z[component]
        moved = z * ((1.0 - value) / rest) if rest > 0 else z
        moved[component] = value
        return dataclasses.replace(feed, composition=tuple(moved.tolist()))
    return change


def _with_top_pressure(case: Case, thermo: ThermoPackage, value: float):
    pressures = np.asarray(case.column.pressures, dtype=float)
    column = dataclasses.replace(case.column, pressures=tuple((pressures + (value - pressures[0])).tolist()))
    return dataclasses.replace(case, column=column), thermo


def _tray_stages(case: Case) -> np.ndarray:
    """0-based indices of the stages that are trays (not the condenser, not a partial reboiler)."""
    column = case.column
    first = 1 if column.condenser != "none" else 0
    last = column.stages - 1 if column.reboiler == "partial" else column.stages
    return np.arange(first, last)


def _with_tray_efficiency(case: Case, thermo: ThermoPackage, value: float):
    trays = _tray_stages(case)
    efficiencies = np.asarray(case.column.efficiencies, dtype=float)
    efficiencies[trays] += value - float(np.mean(efficiencies[trays]))
    column = dataclasses.replace(case.column, efficiencies=tuple(efficiencies.tolist()))
    return dataclasses.replace(case, column=column), thermo


def _with_pair_term(index: int, term: str, side: int) -> Apply:
    def apply(case: Case, thermo: ThermoPackage, value: float):
        pairs = list(case.thermo.pairs)
        pair = pairs[index]
        if term == "alpha":
            pairs[index] = dataclasses.replace(pair, alpha=value)
        else:
            both = list(getattr(pair, term))
            both[side] = value
            pairs[index] = dataclasses.replace(pair, **{term: tuple(both)})
        moved = dataclasses.replace(case, thermo=dataclasses.replace(case.thermo, pairs=tuple(pairs)))
        # the pairs fitted to UNIFAC do not depend on the stated ones: kept, not fitted again
        activity = activity_model(moved, moved.component_names, thermo.predicted_pairs)
        return moved, thermo.replaced(activity=activity)
    return apply


def _with_interaction(first: str, second: str) -> Apply:
    def apply(case: Case, thermo: ThermoPackage, value: float):
        kept = [p for p in case.thermo.interaction if {p.first, p.second} != {first, second}]
        stated = [p for p in case.thermo.interaction if {p.first, p.second} == {first, second}]
        source = stated[0].source if stated else "moved for a sensitivity"
        interaction = tuple(kept) + (InteractionParameter(first, second, value, source),)
        moved = dataclasses.replace(case, thermo=dataclasses.replace(case.thermo, interaction=interaction))
        return moved, ThermoPackage.from_case(moved)
    return apply


def _with_vapor_pressure_shift(component: int) -> Apply:
    def apply(case: Case, thermo: ThermoPackage, value: float):
        pure = thermo.pure
        shift = np.array(pure.shift if isinstance(pure, ShiftedVaporPressure) else np.zeros(thermo.component_count))
        shift[component] = value
        base = pure._pure if isinstance(pure, ShiftedVaporPressure) else pure
        return case, thermo.replaced(pure=ShiftedVaporPressure(base, shift))
    return apply


def _spec_inputs(case: Case) -> list[InputParameter]:
    inputs = []
    for index, spec in enumerate(case.specs):
        key = spec.key or f"specs.{spec.kind}"
        inputs.append(InputParameter(key, f"spec {key}", "spec", float(spec.value), SI_UNITS[spec_kind(spec.kind).quantity],
                                     float(spec.value) or 1.0, _with_spec_value(index)))
    return inputs


def _feed_inputs(case: Case) -> list[InputParameter]:
    inputs = []
    names = case.component_names
    for index, feed in enumerate(case.feeds):
        where = f"feeds[{index + 1}]"
        title = f"feed {feed.name or index + 1}"
        inputs.append(InputParameter(
            f"{where}.flow", f"{title} flow", "feed", feed.flow, "mol/s", feed.flow,
            _with_feed(index, lambda f, v: dataclasses.replace(f, flow=v)), changes_feeds=True))
        # a binary's two mole fractions are one input
        for k in range(1 if len(names) == 2 else len(names)):
            z = float(feed.composition[k])
            if 0.0 < z < 1.0:
                inputs.append(InputParameter(
                    f"{where}.composition.{names[k]}", f"{title} mole fraction of {names[k]}", "feed", z, "1", z,
                    _with_feed(index, _feed_composition(k)), changes_feeds=True))
        if feed.temperature is not None:
            inputs.append(InputParameter(
                f"{where}.temperature", f"{title} temperature", "feed", feed.temperature, "K", feed.temperature,
                _with_feed(index, lambda f, v: dataclasses.replace(f, temperature=v)), changes_feeds=True))
        elif feed.vapor_fraction is not None and 0.0 < feed.vapor_fraction < 1.0:
            inputs.append(InputParameter(
                f"{where}.vapor_fraction", f"{title} vapor fraction", "feed", feed.vapor_fraction, "1",
                feed.vapor_fraction,
                _with_feed(index, lambda f, v: dataclasses.replace(f, vapor_fraction=v)), changes_feeds=True))
        if feed.pressure is not None:
            inputs.append(InputParameter(
                f"{where}.pressure", f"{title} pressure", "feed", feed.pressure, "Pa", feed.pressure,
                _with_feed(index, lambda f, v: dataclasses.replace(f, pressure=v)), changes_feeds=True))
    return inputs


def _column_inputs(case: Case) -> list[InputParameter]:
    column = case.column
    top = float(column.pressures[0])
    inputs = [InputParameter("column.pressure.top", "column pressure (top, drop kept)", "column", top, "Pa", top,
                             _with_top_pressure, changes_column=True, changes_feeds=True)]
    trays = _tray_stages(case)
    if len(trays):
        mean = float(np.mean(np.asarray(column.efficiencies)[trays]))
        inputs.append(InputParameter("column.efficiency", "Murphree efficiency of the trays (all together)", "column",
                                     mean, "1", mean, _with_tray_efficiency, changes_column=True))
    return inputs


def _binary_inputs(case: Case) -> list[InputParameter]:
    options = case.thermo
    inputs = []
    if options.liquid in _EQUATIONS_OF_STATE:
        stated = {frozenset((p.first, p.second)): p.value for p in options.interaction}
        for first, second in itertools.combinations(case.component_names, 2):
            value = float(stated.get(frozenset((first, second)), 0.0))
            inputs.append(InputParameter(
                f"thermo.interaction.{first}.{second}", f"k_ij {first}-{second}", "binary", value, "1",
                value or 1.0, _with_interaction(first, second), changes_thermo=True, changes_feeds=True))
        return inputs
    for index, pair in enumerate(options.pairs):
        if pair.model != options.liquid:
            continue
        where = f"thermo.{pair.model}.{pair.first}.{pair.second}"
        for term in _TERMS:
            for side, direction in enumerate(("ij", "ji")):
                value = float(getattr(pair, term)[side])
                if value != 0.0:
                    inputs.append(InputParameter(
                        f"{where}.{term}.{direction}", f"{pair.model.upper()} {pair.first}-{pair.second} "
                        f"{term.replace('_', ' ')} ({direction})", "binary", value, _TERM_UNITS[term], value,
                        _with_pair_term(index, term, side), changes_thermo=True, changes_feeds=True))
        if pair.model == "nrtl" and pair.alpha:
            inputs.append(InputParameter(
                f"{where}.alpha", f"NRTL {pair.first}-{pair.second} non-randomness alpha", "binary", pair.alpha, "1",
                pair.alpha, _with_pair_term(index, "alpha", 0), changes_thermo=True, changes_feeds=True))
    return inputs


def _vapor_pressure_inputs(case: Case) -> list[InputParameter]:
    if case.thermo.liquid in _EQUATIONS_OF_STATE:
        return []
    return [
        InputParameter(f"thermo.vapor_pressure_shift.{name}", f"vapor pressure of {name} (ln Psat shift)",
                       "vapor_pressure", 0.0, "1", 1.0, _with_vapor_pressure_shift(k),
                       changes_thermo=True, changes_feeds=True)
        for k, name in enumerate(case.component_names)
    ]


def choose_inputs(case: Case, kinds: tuple[str, ...] = INPUT_KINDS) -> tuple[InputParameter, ...]:
    """The inputs of a single-column case of the given ``kinds`` (all by default), in the order
    of :data:`INPUT_KINDS`."""
    makers = {"spec": _spec_inputs, "feed": _feed_inputs, "column": _column_inputs, "binary": _binary_inputs,
              "vapor_pressure": _vapor_pressure_inputs}
    return tuple(item for kind in INPUT_KINDS if kind in kinds for item in makers[kind](case))
