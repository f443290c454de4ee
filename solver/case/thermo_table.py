"""The ``[thermo]`` table: the liquid, vapor and enthalpy models (an equation of state for
both phases, or an activity model beside an ideal vapor or an equation of state for the
vapor), the per-component tables ``[thermo.wilson_volumes]`` and ``[thermo.uniquac_structure]``, and the binary parameters
``[thermo.MODEL.I.J]`` of the activity model (see :class:`~solver.case.model.BinaryParameters`)."""

from __future__ import annotations

import math
from types import MappingProxyType
from typing import Any, Mapping


from solver.case.fields import (
    At,
    Field,
    Reader,
    check_keys,
    component_key,
    plain,
    plausible_quantity,
    quantity,
    read_choice,
    read_fields,
    read_ij_ji,
    read_quantity,
    read_real,
    read_table,
    read_text,
)
from solver.case.model import BinaryParameters, InteractionParameter, ThermoOptions
from solver.errors import CaseError

__all__ = ["read_thermo_table"]

_UNIFAC_MODELS = ("unifac", "unifac-dortmund")
_CUBIC_MODELS = ("peng-robinson", "soave-redlich-kwong")
_LIQUID_MODELS = ("ideal", "wilson", "nrtl", "uniquac") + _UNIFAC_MODELS + _CUBIC_MODELS
_ACTIVITY_MODELS = ("wilson", "nrtl", "uniquac")
_MISSING_PAIRS = _UNIFAC_MODELS + ("ideal",)
_THERMO_KEYS = ("liquid", "vapor", "enthalpy") + _ACTIVITY_MODELS + (
    "wilson_volumes", "uniquac_structure", "groups", "missing_pairs", "interaction", "volume_shift")
#: ``volume_shift``: none, or the Peneloux translation matched to the liquid volume data
#: (:mod:`solver.thermo.cubic_volume_shift`, whose names these mirror)
_VOLUME_SHIFTS = ("none", "peneloux")
#: model -> the key of its energy form
_ENERGY_FORM_KEY = {"nrtl": "dg", "wilson": "dlambda", "uniquac": "du"}
#: The four terms of a binary parameter: key -> (kind of quantity, how a message names it)
_PAIR_TERMS = {
    "constant_term": ("dimensionless", "constant term"),
    "term_over_temperature": ("temperature_difference", "term over temperature (K)"),
    "term_in_ln_temperature": ("dimensionless", "term in ln T"),
    "term_times_temperature": ("inverse_temperature", "term times temperature (1/K)"),
}
#: Keys of the terms in earlier versions of the pair tables -> the key that replaced them
_OLD_TERM_KEYS = {
    "a": "constant_term",
    "b": "term_over_temperature",
    "e": "term_in_ln_temperature",
    "f": "term_times_temperature",
}
_ALPHA_EXAMPLE = 'alpha = { value = 0.3, slope = "0.001 1/K", reference_temperature = "350 K" }'
#: The largest liquid molar volume taken, m**3/mol.
_LARGEST_LIQUID_VOLUME = 0.01


def read_thermo_table(value: Any, names: tuple[str, ...], at: At) -> ThermoOptions:
    table = read_table(value, at)
    check_keys(table, at, _THERMO_KEYS)
    liquid = read_choice(table.get("liquid", "ideal"), at.child("liquid"), _LIQUID_MODELS)
    vapor = _read_vapor(table, liquid, at)
    enthalpy = read_choice(table.get("enthalpy", "rigorous"), at.child("enthalpy"), ("rigorous", "cmo"))
    for model in _ACTIVITY_MODELS:
        if model in table and model != liquid:
            at.child(model).fail(f"not used: thermo.liquid is {liquid!r}", model, f"parameters for {liquid!r} only")
    for key, model in (("wilson_volumes", "wilson"), ("uniquac_structure", "uniquac")):
        if key in table and liquid != model:
            at.child(key).fail(f"not used: thermo.liquid is {liquid!r}", key, f"{key} only with liquid = {model!r}")

    wilson_volumes: dict[str, float] = {}
    if "wilson_volumes" in table:
        wilson_volumes = _per_component(table["wilson_volumes"], names, at.child("wilson_volumes"), _LIQUID_VOLUME)
    uniquac_structure: dict[str, tuple[float, float]] = {}
    if liquid == "uniquac":
        uniquac_structure = _read_uniquac_structure(table.get("uniquac_structure"), names, at.child("uniquac_structure"))
    pairs: tuple[BinaryParameters, ...] = ()
    if liquid in _ACTIVITY_MODELS and liquid in table:
        pairs = _read_pairs(liquid, table[liquid], names, wilson_volumes, at)
    missing_pairs = _read_missing_pairs(table, liquid, pairs, names, at)
    groups = read_unifac_groups(table, liquid, missing_pairs, names, at)
    interaction: tuple[InteractionParameter, ...] = ()
    if "interaction" in table:
        if liquid not in _CUBIC_MODELS and vapor not in _CUBIC_MODELS:
            at.child("interaction").fail(
                f"not used: thermo.liquid is {liquid!r} and thermo.vapor is {vapor!r}", "interaction",
                "k_ij only with an equation of state: liquid or vapor = "
                + " or ".join(repr(m) for m in _CUBIC_MODELS)
            )
        interaction = _read_interaction(table["interaction"], names, at.child("interaction"))
    volume_shift = "none"
    if "volume_shift" in table:
        volume_shift = read_choice(table["volume_shift"], at.child("volume_shift"), _VOLUME_SHIFTS)
        if volume_shift != "none" and liquid not in _CUBIC_MODELS:
            at.child("volume_shift").fail(
                f"not used: thermo.liquid is {liquid!r}", table["volume_shift"],
                "volume_shift only with an equation of state for both phases: liquid = "
                + " or ".join(repr(m) for m in _CUBIC_MODELS),
            )
    return ThermoOptions(
        interaction=interaction,
        volume_shift=volume_shift,
        liquid=liquid,
        vapor=vapor,
        enthalpy=enthalpy,
        pairs=pairs,
        uniquac_structure=MappingProxyType(uniquac_structure),
        wilson_volumes=MappingProxyType(wilson_volumes),
        groups=MappingProxyType(groups),
        missing_pairs=missing_pairs,
    )


def _read_missing_pairs(
    table: Mapping, liquid: str, pairs: tuple[BinaryParameters, ...], names: tuple[str, ...], at: At
) -> str:
    """``missing_pairs``: how the pairs of a binary-parameter model without parameters in the
    case are taken. Without it a missing pair is an error naming the pair."""
    if "missing_pairs" in table and liquid in _UNIFAC_MODELS + _CUBIC_MODELS:
        at.child("missing_pairs").fail(
            f"not used: thermo.liquid is {liquid!r}", table["missing_pairs"], "missing_pairs only with " + ", ".join(_ACTIVITY_MODELS) + " (an ideal liquid ignores it)"
        )
    if liquid not in _ACTIVITY_MODELS:
        return ""
    choice = ""
    if "missing_pairs" in table:
        choice = read_choice(table["missing_pairs"], at.child("missing_pairs"), _MISSING_PAIRS)
    given = {frozenset((pair.first, pair.second)) for pair in pairs}
    missing = [f"{a}.{b}" for k, a in enumerate(names) for b in names[k + 1:] if frozenset((a, b)) not in given]
    if missing and not choice:
        at.child(liquid).fail(
            f"no {liquid.upper()} parameters for the pair(s) " + ", ".join(missing)
            + f"; give each as [thermo.{liquid}.{missing[0]}], or set missing_pairs = \"unifac\" (or"
            " \"unifac-dortmund\") in [thermo] to predict them from UNIFAC, or missing_pairs = \"ideal\" to take"
            " them as ideal knowingly",
            expected="a parameter table for every pair of components",
        )
    return choice


def read_unifac_groups(
    table: Mapping, liquid: str, missing_pairs: str, names: tuple[str, ...], at: At
) -> dict[str, dict[str, int]]:
    """``[thermo.groups.NAME]`` subgroup = count, for the components without a built-in UNIFAC
    group assignment (or to replace it); checked against the published tables of the variant in
    use, every component then having groups and every group pair published interactions."""
    model = liquid if liquid in _UNIFAC_MODELS else missing_pairs if missing_pairs in _UNIFAC_MODELS else ""
    if not model:
        if "groups" in table:
            at.child("groups").fail(
                "not used: neither thermo.liquid nor thermo.missing_pairs is a UNIFAC model",
                expected='groups with liquid = "unifac" or "unifac-dortmund", or missing_pairs = "unifac"',
            )
        return {}
    from solver.thermo.unifac import DortmundUNIFAC, UNIFAC

    groups_at = at.child("groups")
    written = _per_component(table.get("groups", {}), names, groups_at, lambda value, item_at: dict(read_table(value, item_at)))
    model_class = UNIFAC if model == "unifac" else DortmundUNIFAC
    try:
        model_class.from_components(names, written, where=groups_at.key)
    except CaseError as exc:
        raise CaseError(exc.problem, file=at.file, key=exc.key, value=exc.value, expected=exc.expected) from None
    return written


def _read_vapor(table: Mapping, liquid: str, at: At) -> str:
    """With an equation of state for the liquid the vapor is the same equation (the default);
    beside an activity model the vapor is ideal (the default) or an equation of state."""
    vapor_at = at.child("vapor")
    if liquid in _CUBIC_MODELS:
        vapor = read_choice(table.get("vapor", liquid), vapor_at, _CUBIC_MODELS + ("ideal",))
        if vapor != liquid:
            vapor_at.fail(f"with liquid = {liquid!r} both phases come from that equation of state", vapor,
                          f"{liquid!r} (or leave vapor out)")
        return vapor
    return read_choice(table.get("vapor", "ideal"), vapor_at, ("ideal",) + _CUBIC_MODELS)


_INTERACTION_FIELDS = {
    "k": Field(lambda value, at: read_real(value, at, minimum=-1.0, maximum=1.0), required=True),
    "source": Field(lambda value, at: read_text(value, at, allow_empty=False), required=True),
}


def _read_interaction(value: Any, names: tuple[str, ...], at: At) -> tuple[InteractionParameter, ...]:
    """[thermo.interaction.I.J] k = ..., source = "..." for each pair given (others zero)."""
    expected = 'tables [thermo.interaction.NAME1.NAME2] with k = 0.01 and source = "..."'
    found = []
    for first, second, entry, pair_at in _pair_tables(value, names, at, expected):
        fields = read_fields(entry, pair_at, _INTERACTION_FIELDS, '{ k = 0.01, source = "..." }')
        found.append(InteractionParameter(first, second, fields["k"], fields["source"]))
    return tuple(found)


def _per_component(value: Any, names: tuple[str, ...], at: At, read: Reader) -> dict[str, Any]:
    """A table NAME = value with one entry per component at most."""
    result: dict[str, Any] = {}
    for written, item in read_table(value, at).items():
        item_at = at.child(written)
        name = component_key(written, names, item_at)
        if name in result:
            item_at.fail("given twice", written)
        result[name] = read(item, item_at)
    return result


_LIQUID_VOLUME = plausible_quantity(
    "molar_volume", _LARGEST_LIQUID_VOLUME, "a liquid molar volume", "a molar volume such as '40.7 cm**3/mol'"
)


_STRUCTURE_FIELDS = {
    "r": Field(lambda value, at: read_real(value, at, above=0.0), required=True),
    "q": Field(lambda value, at: read_real(value, at, above=0.0), required=True),
}


def _read_uniquac_structure(value: Any, names: tuple[str, ...], at: At) -> dict[str, tuple[float, float]]:
    """NAME = { r, q } for every component (UNIQUAC's volume and area parameters)."""
    if value is None:
        at.fail("missing: UNIQUAC needs r and q of every component", expected="NAME = { r = ..., q = ... }")

    def structure(entry: Any, entry_at: At) -> tuple[float, float]:
        fields = read_fields(entry, entry_at, _STRUCTURE_FIELDS, "{ r = ..., q = ... }")
        return fields["r"], fields["q"]

    result = _per_component(value, names, at, structure)
    missing = [n for n in names if n not in result]
    if missing:
        at.fail("r and q missing for " + ", ".join(missing), expected="NAME = { r = ..., q = ... }")
    return result


# --- [thermo.MODEL.I.J] -------------------------------------------------------------------


def _read_pairs(
    model: str, value: Any, names: tuple[str, ...], wilson_volumes: Mapping[str, float], thermo_at: At
) -> tuple[BinaryParameters, ...]:
    """Every pair table of the model, each pair once (in either order)."""
    return tuple(
        _read_pair(model, first, second, parameters, wilson_volumes, pair_at, thermo_at)
        for first, second, parameters, pair_at in _pair_tables(value, names, thermo_at.child(model), "tables [thermo.MODEL.NAME1.NAME2]")
    )


def _pair_tables(value: Any, names: tuple[str, ...], at: At, expected: str):
    """(first, second, table, where) of every pair table ``[...I.J]`` under ``at``, each pair
    of two different components once (in either order)."""
    seen: dict[frozenset, str] = {}
    for first_written, inner in read_table(value, at, expected).items():
        first_at = at.child(first_written)
        first = component_key(first_written, names, first_at)
        for second_written, parameters in read_table(inner, first_at, expected).items():
            pair_at = first_at.child(second_written)
            second = component_key(second_written, names, pair_at)
            if first == second:
                pair_at.fail("a pair needs two different components", second_written)
            pair_key = frozenset((first, second))
            if pair_key in seen:
                pair_at.fail(f"pair given twice (also as {seen[pair_key]})", second_written, "each pair once")
            seen[pair_key] = pair_at.key
            yield first, second, parameters, pair_at


def _read_pair(
    model: str,
    first: str,
    second: str,
    value: Any,
    wilson_volumes: Mapping[str, float],
    at: At,
    thermo_at: At,
) -> BinaryParameters:
    """One [thermo.MODEL.I.J] table; conversions as documented in :class:`BinaryParameters`."""
    table = read_table(value, at)
    _refuse_old_pair_keys(table, model, at)
    fields = read_fields(table, at, _PAIR_FIELDS[model])
    terms = {name: fields.get(name, (0.0, 0.0)) for name in _PAIR_TERMS}
    energy_key = _ENERGY_FORM_KEY[model]
    energy_form: dict[str, object] = {}
    if energy_key in table:
        given = [name for name in _PAIR_TERMS if name in table]
        if given:
            at.child(given[0]).fail(
                f"cannot be combined with the energy form {energy_key!r}",
                table[given[0]],
                f"either {energy_key} or the terms " + ", ".join(_PAIR_TERMS),
            )
        over_temperature, energy_form = _read_energy_form(model, table[energy_key], at.child(energy_key))
        terms["term_over_temperature"] = over_temperature
        if model == "wilson":
            terms["constant_term"], volumes = _wilson_volume_term(first, second, wilson_volumes, thermo_at)
            energy_form["liquid_molar_volumes_m3_per_mol"] = volumes
    alpha = (0.0, 0.0, None)
    if model == "nrtl":
        if "alpha" not in fields:
            at.child("alpha").fail(
                "missing: NRTL needs the non-randomness alpha of every pair", expected="a number such as 0.3"
            )
        alpha = fields["alpha"]
    return BinaryParameters(
        model=model,
        first=first,
        second=second,
        **terms,
        alpha=alpha[0],
        alpha_slope=alpha[1],
        alpha_reference_temperature=alpha[2],
        source=fields["source"],
        energy_form=MappingProxyType(energy_form),
    )


def _refuse_old_pair_keys(table: Mapping, model: str, at: At) -> None:
    """Keys of other models' energy forms and of earlier versions of the pair table are errors
    that say what to write instead."""
    for key in table:
        other = [m for m, k in _ENERGY_FORM_KEY.items() if k == key and m != model]
        if other:
            at.child(key).fail(
                f"{key!r} is the energy form of {other[0].upper()}; {model} uses {_ENERGY_FORM_KEY[model]!r}",
                key,
                "one of: " + ", ".join(_PAIR_FIELDS[model]),
            )
        if key == "alpha_T" and model == "nrtl":
            at.child(key).fail(
                "'alpha_T' is no longer a key: a temperature-dependent alpha is a slope about a reference"
                " temperature that you state (alpha and alpha_T as written before give the same alpha(T) as"
                ' value = alpha, slope = alpha_T, reference_temperature = "273.15 K")',
                table[key],
                _ALPHA_EXAMPLE,
            )
        if key in _OLD_TERM_KEYS:
            new = _OLD_TERM_KEYS[key]
            at.child(key).fail(
                f"{key!r} is no longer a key: the {_PAIR_TERMS[new][1]} of the parameter is written {new!r}",
                table[key],
                f"{new} = [ij, ji]",
            )


def _read_energy_form(model: str, value: Any, at: At) -> tuple[tuple[float, float], dict[str, object]]:
    """The term over temperature [K] that the energy form (dg, dlambda or du) gives (see
    :class:`BinaryParameters`), and the form as written and in J/mol, for the record."""
    from scipy.constants import R as GAS_CONSTANT  # here: a case that is refused never waits for scipy

    energy_key = _ENERGY_FORM_KEY[model]
    energy = read_ij_ji(value, at, quantity("molar_energy"))
    sign = 1.0 if model == "nrtl" else -1.0
    over_temperature = (sign * energy[0] / GAS_CONSTANT, sign * energy[1] / GAS_CONSTANT)
    return over_temperature, {energy_key: tuple(plain(value)), energy_key + "_J_per_mol": energy}


def _wilson_volume_term(
    first: str, second: str, wilson_volumes: Mapping[str, float], thermo_at: At
) -> tuple[tuple[float, float], tuple[float, float]]:
    """The constant term ln(V_j / V_i) of Wilson's energy form, and the volumes (V_i, V_j)."""
    missing = [name for name in (first, second) if name not in wilson_volumes]
    if missing:
        thermo_at.child("wilson_volumes").fail(
            f"the energy form (dlambda) of pair {first}.{second} needs the liquid molar volume of "
            + " and ".join(repr(m) for m in missing),
            expected="[thermo.wilson_volumes] NAME = \"40.7 cm**3/mol\"",
        )
    volume_i, volume_j = wilson_volumes[first], wilson_volumes[second]
    return (math.log(volume_j / volume_i), math.log(volume_i / volume_j)), (volume_i, volume_j)


_ALPHA_FIELDS = {
    "value": Field(quantity("dimensionless"), required=True),
    "slope": Field(quantity("inverse_temperature")),
    "reference_temperature": Field(quantity("temperature", above=0.0)),
}


def _read_alpha(value: Any, at: At) -> tuple[float, float, float | None]:
    """NRTL alpha: a number, two equal numbers [ij, ji], or { value, slope, reference_temperature }
    -> (alpha at the reference temperature, slope [1/K], reference temperature [K] or None)."""
    if isinstance(value, Mapping):
        fields = read_fields(value, at, _ALPHA_FIELDS)
        if ("slope" in fields) != ("reference_temperature" in fields):
            missing = "reference_temperature" if "slope" in fields else "slope"
            at.child(missing).fail(
                "missing: a slope of alpha is about a reference temperature; give both", expected=_ALPHA_EXAMPLE
            )
        return fields["value"], fields.get("slope", 0.0), fields.get("reference_temperature")
    if isinstance(value, (list, tuple)):
        alpha_ij, alpha_ji = read_ij_ji(value, at, quantity("dimensionless"))
        if not math.isclose(alpha_ij, alpha_ji, rel_tol=1e-12, abs_tol=0.0):
            at.fail("alpha_ij and alpha_ji must be equal", value, "one number, or two equal numbers")
        return alpha_ij, 0.0, None
    return read_quantity(value, "dimensionless", at), 0.0, None


def _ij_ji(kind: str) -> Reader:
    return lambda value, at: read_ij_ji(value, at, quantity(kind))


def _pair_fields(model: str) -> dict[str, Field]:
    fields = {name: Field(_ij_ji(kind)) for name, (kind, _) in _PAIR_TERMS.items()}
    if model == "nrtl":
        fields["alpha"] = Field(_read_alpha)
    fields[_ENERGY_FORM_KEY[model]] = Field()  # read with the liquid volumes, below
    fields["source"] = Field(read_text, default="")
    return fields


_PAIR_FIELDS = {model: _pair_fields(model) for model in _ACTIVITY_MODELS}
