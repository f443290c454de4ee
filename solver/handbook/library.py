"""Looking a compound up in the handbook library by any of its names, and the record of each
property's source for screens (``traystack components NAME``) and the result file."""

from __future__ import annotations

from solver.thermo.data import ComponentData
from solver.errors import CaseError
from solver.handbook.component import HandbookComponent, PropertySource, build_component
from solver.handbook.names import AmbiguousFormula, find, suggest

__all__ = ["component_data", "describe", "lookup", "property_rows"]

_UNITS = {
    "molar mass": (1e3, "g/mol", "{:.3f}"),
    "critical temperature": (1.0, "K", "{:.2f}"),
    "critical pressure": (1e-6, "MPa", "{:.4g}"),
    "normal boiling point": (1.0, "K", "{:.2f}"),
}


def lookup(name: str, *, key: str | None = None) -> HandbookComponent:
    """The handbook component called ``name`` (common name, synonym, CAS number, or a formula
    no other library compound has). :class:`~solver.errors.CaseError` (naming ``key``, the
    case-file key, when given) for an unknown name (with the closest library names), a formula
    several compounds share (with their names), or a compound the boiling-point check refuses
    (with the numbers)."""
    if not isinstance(name, str) or not name.strip():
        raise CaseError("a component name must be a non-empty string", key=key, value=name)
    try:
        entry = find(name)
    except AmbiguousFormula as exc:
        raise CaseError(str(exc), key=key, value=name) from None
    if entry is None:
        close = suggest(name)
        hint = "; did you mean " + " or ".join(repr(n) for n in close) + "?" if close else ""
        raise CaseError(f"{name.strip()!r} is not in the handbook library{hint}", key=key,
                        expected="a name, synonym, CAS number or formula of a library compound "
                                 "(list them with `traystack components`)")
    try:
        return build_component(entry.cas, entry.name, entry.formula)
    except CaseError as exc:
        raise CaseError(exc.problem, key=key) from None


def component_data(name: str, *, key: str | None = None) -> ComponentData:
    """The :class:`~solver.thermo.data.ComponentData` (SI) of the handbook component ``name``; see
    :func:`lookup`."""
    return lookup(name, key=key).data


def property_rows(component: HandbookComponent) -> list[dict[str, str]]:
    """One row per property for a screen table: ``property``, ``value`` (constants, with their
    unit) or ``form`` and ``range`` (correlations), ``source`` (short title) and ``citation``;
    then one row per note (property "note")."""
    rows = []
    for source in component.sources:
        row = {"property": source.prop, "value": "", "form": "", "range": "", "source": source.title,
               "citation": source.citation}
        if source.value is not None:
            factor, unit, pattern = _UNITS[source.prop]
            row["value"] = f"{pattern.format(source.value * factor)} {unit}"
        else:
            row["form"] = source.form
            row["range"] = _range_text(source)
        rows.append(row)
    rows.append({"property": "acentric factor", "value": f"{component.acentric_factor:.4f}", "form": "", "range": "",
                 "source": "computed: Pitzer's definition from the vapor pressure at 0.7 Tc (Lee and Kesler's "
                 "estimate from Tb when 0.7 Tc is outside its range)", "citation": ""})
    for note in component.notes:
        rows.append({"property": "note", "value": note, "form": "", "range": "", "source": "", "citation": ""})
    return rows


def describe(component: HandbookComponent) -> dict:
    """The record for result.json: identity, acentric factor, and per property its table,
    citation, form, coefficients or value, and range (SI, K)."""
    data = component.data
    correlations = {
        "vapor pressure": data.vapor_pressure,
        "heat of vaporization": data.heat_of_vaporization,
        "ideal-gas heat capacity": data.ideal_gas_cp,
        "liquid molar volume": data.liquid_molar_volume,
    }
    properties = []
    for source in component.sources:
        entry: dict = {"property": source.prop, "table": source.table, "citation": source.citation,
                       "form": source.form, "T_min": source.T_min, "T_max": source.T_max}
        if source.value is not None:
            entry["value"] = source.value
        else:
            corr = correlations[source.prop]
            entry.update(coefficients=dict(corr.coefficients), value_factor=corr.value_factor, log_base=corr.log_base)
        properties.append(entry)
    return {
        "backend": "handbook",
        "cas": component.cas,
        "name": component.name,
        "formula": component.formula,
        "acentric_factor": component.acentric_factor,
        "properties": properties,
        "notes": list(component.notes),
    }


def _range_text(source: PropertySource) -> str:
    if source.T_min is None and source.T_max is None:
        return "to Tc"
    low = "" if source.T_min is None else f"{source.T_min:.2f}"
    high = "" if source.T_max is None else f"{source.T_max:.2f}"
    return f"{low}-{high} K"
