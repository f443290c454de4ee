"""The optional ``[uncertainty]`` table: standard uncertainties (one standard deviation) of the
inputs of a case, for linear propagation (``run --sensitivity``) and the Monte
Carlo study (``traystack uncertainty``).

```toml
[uncertainty]
efficiency = 0.03                                  # the trays' Murphree efficiency, absolute
vapor_pressure = { methanol = "1 %" }              # relative, of each component's Psat

[uncertainty.nrtl.methanol.water]                  # a pair of [thermo], either order
dg = ["40 cal/mol", "40 cal/mol"]                  # the pair's energy form, or its terms:
alpha = 0.01                                       # constant_term, term_over_temperature, ...

[[uncertainty.feeds]]
feed = 1                                           # its number in [[feeds]], or its name
composition = { methanol = 0.005 }                 # mole fraction, absolute
temperature = "2 K"
```

In a network case (``[[columns]]``) ``efficiency`` is a table of the columns' names,
``efficiency = { main = 0.03, stripper = 0.05 }`` (each column's trays together); the rest reads
the same, ``feed`` counting the network's ``[[feeds]]``.

Each value becomes a :class:`~solver.case.model.StandardUncertainty` keyed like the input of
the sensitivities it moves. A stated uncertainty must belong to a number the case has (a pair
of the liquid model, a term the pair gives, a feed given by its temperature, trays with an
efficiency): anything else is refused naming the file, the key and the value.
"""

from __future__ import annotations

from typing import Any

from solver.case.fields import At, Field, component_key, quantity, read_fields, read_ij_ji, read_integer, read_list, read_table
from solver.case.model import Column, Feed, Network, StandardUncertainty, ThermoOptions

__all__ = ["read_uncertainty_table"]

_EQUATIONS_OF_STATE = ("peng-robinson", "soave-redlich-kwong")
_ENERGY_FORMS = {"nrtl": "dg", "wilson": "dlambda", "uniquac": "du"}
_TERM_KINDS = {"constant_term": "dimensionless", "term_over_temperature": "temperature_difference",
               "term_in_ln_temperature": "dimensionless", "term_times_temperature": "inverse_temperature"}
_SIDES = ("ij", "ji")
_TOP_FIELDS = {"efficiency": Field(), "vapor_pressure": Field(), "feeds": Field(), "nrtl": Field(), "wilson": Field(),
               "uniquac": Field()}
_FEED_FIELDS = {"feed": Field(required=True), "composition": Field(), "temperature": Field()}
_EXAMPLE = 'a table such as { efficiency = 0.03, vapor_pressure = { methanol = "1 %" } }'


def _deviation(kind: str):
    return quantity(kind, minimum=0.0)


def read_uncertainty_table(value: Any, names: tuple[str, ...], thermo: ThermoOptions, column: Column | None,
                           feeds: tuple[Feed, ...], at: At, network: Network | None = None) -> tuple[StandardUncertainty, ...]:
    """The standard uncertainties stated under ``[uncertainty]`` (see the module docstring);
    ``column`` is None for a network case, whose ``network`` then names the columns."""
    table = read_table(value, at, _EXAMPLE)
    read_fields(table, at, _TOP_FIELDS, _EXAMPLE)
    stated: list[StandardUncertainty] = []
    if "efficiency" in table:
        if column is None:
            stated += _network_efficiencies(table["efficiency"], network, at.child("efficiency"))
        else:
            stated.append(_efficiency(table["efficiency"], column, "column", at.child("efficiency")))
    if "vapor_pressure" in table:
        stated += _vapor_pressures(table["vapor_pressure"], names, thermo, at.child("vapor_pressure"))
    for model in _ENERGY_FORMS:
        if model in table:
            stated += _pairs(model, table[model], names, thermo, at.child(model))
    if "feeds" in table:
        stated += _feeds(table["feeds"], names, feeds, at.child("feeds"))
    return tuple(stated)


def _efficiency(value: Any, column: Column, where: str, at: At) -> StandardUncertainty:
    last = column.stages - 1 if column.reboiler == "partial" else column.stages
    first = 1 if column.condenser != "none" else 0
    if last <= first:
        at.fail("the column has no trays whose efficiency could be uncertain", value, "no efficiency uncertainty")
    return StandardUncertainty(f"{where}.efficiency", _deviation("dimensionless")(value, at), at.key)


def _network_efficiencies(value: Any, network: Network, at: At) -> list[StandardUncertainty]:
    names = [section.name for section in network.columns]
    example = "{ " + ", ".join(f"{name} = 0.03" for name in names) + " }"
    if not isinstance(value, dict):
        at.fail("a network's efficiency uncertainties are given per column", value, f"a table such as {example}")
    stated = []
    for name, deviation in value.items():
        if name not in names:
            at.child(name).fail("not a column of [[columns]]", name, f"one of {', '.join(names)}")
        stated.append(_efficiency(deviation, network.section(name).column, name, at.child(name)))
    return stated


def _vapor_pressures(value: Any, names, thermo: ThermoOptions, at: At) -> list[StandardUncertainty]:
    if thermo.liquid in _EQUATIONS_OF_STATE:
        at.fail(f"an equation of state ({thermo.liquid}) does not use vapor pressures", "a table",
                "no vapor_pressure uncertainty with an equation of state")
    stated = []
    for written, relative in read_table(value, at, '{ methanol = "1 %" }').items():
        name = component_key(written, names, at.child(written))
        stated.append(StandardUncertainty(f"thermo.vapor_pressure_shift.{name}",
                                          _deviation("dimensionless")(relative, at.child(written)), at.child(written).key))
    return stated


def _pairs(model: str, value: Any, names, thermo: ThermoOptions, at: At) -> list[StandardUncertainty]:
    if thermo.liquid != model:
        at.fail(f"the case's liquid model is {thermo.liquid!r}, not {model!r}", "a table",
                f"uncertainties of the pairs of [thermo.{thermo.liquid}]")
    stated = []
    for first_written, inner in read_table(value, at).items():
        first = component_key(first_written, names, at.child(first_written))
        for second_written, terms in read_table(inner, at.child(first_written)).items():
            pair_at = at.child(first_written).child(second_written)
            second = component_key(second_written, names, pair_at)
            pair = next((p for p in thermo.pairs if p.model == model and {p.first, p.second} == {first, second}), None)
            if pair is None or first == second:
                pair_at.fail(f"not a pair of [thermo.{model}]", second_written, "a pair the case gives parameters for")
            stated += _pair_terms(model, pair, first != pair.first, terms, pair_at)
    return stated


def _pair_terms(model: str, pair, reversed_: bool, terms: Any, at: At) -> list[StandardUncertainty]:
    energy = _ENERGY_FORMS[model]
    allowed = {name: Field() for name in (energy, *_TERM_KINDS, *(("alpha",) if model == "nrtl" else ()))}
    read_fields(terms, at, allowed, f"a table such as {{ {energy} = [\"40 cal/mol\", \"40 cal/mol\"] }}")
    table = terms
    where = f"thermo.{model}.{pair.first}.{pair.second}"
    stated = []
    for name in table:
        if name == "alpha":
            if not pair.alpha:
                at.child(name).fail("the pair has no alpha", table[name])
            stated.append(StandardUncertainty(f"{where}.alpha", _deviation("dimensionless")(table[name], at.child(name)),
                                              at.child(name).key))
            continue
        term, kind = (("term_over_temperature", "molar_energy") if name == energy else (name, _TERM_KINDS[name]))
        if name == energy and not pair.energy_form:
            at.child(name).fail(f"the pair is given by its terms, not by {energy}", table[name],
                                "uncertainties of the terms the pair gives")
        deviations = read_ij_ji(table[name], at.child(name), _deviation(kind))
        if reversed_:
            deviations = deviations[::-1]
        for side, deviation in enumerate(deviations):
            if deviation == 0.0:
                continue
            if getattr(pair, term)[side] == 0.0:
                at.child(name).item(side if not reversed_ else 1 - side).fail(
                    f"the pair's {term.replace('_', ' ')} ({_SIDES[side]}) is zero in the case", table[name],
                    "an uncertainty of a term the pair gives")
            if name == energy:
                from scipy.constants import R as GAS_CONSTANT

                deviation /= GAS_CONSTANT  # the term over temperature is the energy over R
            stated.append(StandardUncertainty(f"{where}.{term}.{_SIDES[side]}", deviation, at.child(name).key))
    return stated


def _feeds(value: Any, names, feeds: tuple[Feed, ...], at: At) -> list[StandardUncertainty]:
    stated = []
    for index, item in enumerate(read_list(value, at)):
        item_at = at.item(index)
        read_fields(item, item_at, _FEED_FIELDS, "a table such as { feed = 1, temperature = \"2 K\" }")
        number = _feed_number(item["feed"], feeds, item_at.child("feed"))
        feed, where = feeds[number - 1], f"feeds[{number}]"
        if "temperature" in item:
            if feed.temperature is None:
                item_at.child("temperature").fail("the feed is given by its vapor fraction, not a temperature",
                                                  item["temperature"])
            stated.append(StandardUncertainty(f"{where}.temperature",
                                              _deviation("temperature_difference")(item["temperature"], item_at.child("temperature")),
                                              item_at.child("temperature").key))
        for written, deviation in read_table(item.get("composition", {}), item_at.child("composition")).items():
            place = item_at.child("composition").child(written)
            name = component_key(written, names, place)
            k = names.index(name)
            if not 0.0 < feed.composition[k] < 1.0:
                place.fail("the feed's mole fraction of it is 0 or 1 and cannot move", deviation)
            if len(names) == 2:  # a binary's two mole fractions are one input: the first one's
                name = names[0]
            stated.append(StandardUncertainty(f"{where}.composition.{name}",
                                              _deviation("dimensionless")(deviation, place), place.key))
    keys = [s.key for s in stated]
    for key in keys:
        if keys.count(key) > 1:
            at.fail(f"the uncertainty of {key} is stated twice", key, "each input once")
    return stated


def _feed_number(value: Any, feeds: tuple[Feed, ...], at: At) -> int:
    if isinstance(value, str):
        for number, feed in enumerate(feeds, start=1):
            if feed.name and feed.name == value:
                return number
        at.fail("no feed of that name", value, "a name of [[feeds]] or its number (1 for the first)")
    return read_integer(value, at, minimum=1, maximum=len(feeds))
