"""Units: one pint registry for the whole package, and conversion of case-file values to SI.

A case-file quantity is either a number (taken in the default unit for that kind of quantity)
or a string pint understands ("100 kmol/h", "65 degC", "1.5 bar"). Everything inside the
engine is SI: K, Pa, mol/s, W, J/mol, kg/mol, m3/mol.

Plant units beside pint's own: gauge pressures ``barg``, ``kPag`` and ``psig`` (absolute =
gauge + one standard atmosphere, :data:`ATMOSPHERE` = 101325 Pa; pint's ``bar``, ``kPa`` and
``psi`` with an offset, read like degC is read against K), ``MMBtu`` (a million of pint's
``Btu``), and ``lbmol``. Pint's ``lb``, ``klb`` (kilo-pound) and ``ppm`` (1e-6) are used as
pint defines them. ``MBtu`` is refused: a thousand Btu in US plant usage, a million by the SI
prefix.

A quantity string is read as a leading number followed by a unit expression ("40.7 cm**3/mol").
The unit part is read with ``parse_units``, so a temperature unit inside a compound unit is a
temperature *difference* ("75 J/mol/degC" is 75 J/mol/K, not 75 J/mol per 274.15 K as a plain
pint expression would give). Powers are allowed on unit names only ("m**3"), which keeps a
hostile expression such as "9**9**9" from tying up the reader.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import pint

from solver.user_cache import cache_folder

__all__ = [
    "ATMOSPHERE",
    "MAX_TEXT_LENGTH",
    "SI_UNITS",
    "Quantity",
    "UnitParseError",
    "convert",
    "example_unit",
    "offset_scale",
    "temperature_scale",
    "to_si",
    "to_si_of_kinds",
    "flow_unit_kind",
    "fraction_and_basis",
    "unit_factor",
    "ureg",
]



def _registry() -> pint.UnitRegistry:
    """The registry, its parsed definitions kept in the user cache folder (pint's own disk
    cache: building the registry from its definition file takes about half a second, reading
    the cache a twentieth); without the cache if it is switched off or cannot be read."""
    folder = cache_folder()
    if folder is not None:
        try:
            return pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=folder / "pint")
        except Exception:  # a damaged or unwritable cache: the definitions are read from pint's file
            pass
    return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


ureg = _registry()
# pound-mole, used on US datasheets (453.59237 g per lb, NIST SP 811)
ureg.define("lbmol = 453.59237 * mol = lb_mol")
#: The atmosphere gauge pressures are read against [Pa] (the standard atmosphere, ISO 2533).
ATMOSPHERE = 101325.0
# gauge pressures: absolute = gauge + one standard atmosphere (psi = 6894.757293168361 Pa, NIST SP 811)
ureg.define(f"bar_gauge = bar; offset: {ATMOSPHERE / 1e5!r} = barg")
ureg.define(f"kilopascal_gauge = kilopascal; offset: {ATMOSPHERE / 1e3!r} = kPag")
ureg.define(f"psi_gauge = psi; offset: {ATMOSPHERE / 6894.757293168361!r} = psig")
# a million Btu, as fuel and steam duties are stated on US datasheets
ureg.define("million_Btu = 1e6 * Btu = MMBtu")
Quantity = ureg.Quantity

#: SI unit and the dimensionality it stands for, per kind of quantity used in case files.
SI_UNITS: dict[str, str] = {
    "temperature": "K",
    "temperature_difference": "delta_degC",
    "pressure": "Pa",
    "molar_flow": "mol/s",
    "mass_flow": "kg/s",
    "pressure_difference": "Pa",
    "power": "W",
    "molar_energy": "J/mol",
    "molar_mass": "kg/mol",
    "molar_volume": "m**3/mol",
    "molar_density": "mol/m**3",
    "molar_heat_capacity": "J/mol/K",
    "inverse_temperature": "1/K",
    "dimensionless": "dimensionless",
    # column hardware ([sizing])
    "length": "m",
    "time": "s",
    "velocity": "m/s",
    "mass_density": "kg/m**3",
    "surface_tension": "N/m",
    "viscosity": "Pa*s",
    "inverse_length": "1/m",
}

#: Longest quantity or unit text accepted; nothing a case file needs comes close.
MAX_TEXT_LENGTH = 200

_LEADING_NUMBER = re.compile(r"\s*([+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)(.*)", re.DOTALL)
_POWER = re.compile(r"\*\*|\^")
_AMBIGUOUS_BTU = re.compile(r"(?<![A-Za-z_])MBtu")


class UnitParseError(ValueError):
    """A value that is not a quantity of the expected kind; the message says what was expected."""


def _describe(kind: str) -> str:
    return kind.replace("_", " ")


def _check_unit_text(text: str) -> None:
    """Refuse unit text that is too long or raises a number to a power (see module docstring)."""
    if len(text) > MAX_TEXT_LENGTH:
        raise UnitParseError(f"the text is too long to be a quantity ({len(text)} characters)")
    for match in _POWER.finditer(text):
        before = text[: match.start()].rstrip()
        if not before or not (before[-1].isalpha() or before[-1] == "_"):
            raise UnitParseError(f"in {text!r} powers are allowed on unit names only (like 'm**3')")
    if _AMBIGUOUS_BTU.search(text):
        raise UnitParseError(
            f"{text!r}: 'MBtu' is a thousand Btu in US usage but a million by the SI prefix; write kBtu or MMBtu"
        )


def _parse_unit_expression(text: str) -> pint.Unit:
    _check_unit_text(text)
    try:
        return ureg.parse_units(text)
    except Exception as exc:  # pint raises many kinds of errors for unreadable text
        raise UnitParseError(f"{text!r} is not a unit pint knows ({type(exc).__name__})") from None


def _single_offset_unit(unit: pint.Unit) -> str | None:
    """The name of the offset unit (degC, degF) if ``unit`` is exactly one of them, else None."""
    items = list(unit._units.items())
    if len(items) == 1 and items[0][1] == 1 and not ureg._units[items[0][0]].is_multiplicative:
        return items[0][0]
    return None


def _is_delta_unit(unit: pint.Unit) -> bool:
    return any(name.startswith("delta_") for name in unit._units)


@lru_cache(maxsize=1024)
def _parse_text(text: str) -> tuple[float, pint.Unit | None]:
    """(magnitude, unit) of a quantity text; unit None for a bare number."""
    if len(text) > MAX_TEXT_LENGTH:
        raise UnitParseError(f"the text is too long to be a quantity ({len(text)} characters)")
    match = _LEADING_NUMBER.fullmatch(text)
    if match is None:
        raise UnitParseError(f"cannot read {text!r} as a quantity: it must start with a number, like '100 kmol/h'")
    number_text, unit_text = match.group(1), match.group(2).strip()
    magnitude = float(number_text)
    if not unit_text:
        return magnitude, None
    try:
        unit = _parse_unit_expression(unit_text)
    except UnitParseError as exc:
        raise UnitParseError(f"cannot read {text!r} as a quantity: {exc}") from None
    if unit.dimensionless and not unit._units:
        return magnitude, None
    return magnitude, unit


def to_si(value: object, kind: str) -> float:
    """Convert ``value`` (a number in SI, or a string with units) to a float in the SI unit of
    ``kind`` (one of :data:`SI_UNITS`). Raises :class:`UnitParseError` with a plain message.

    A bare number (or a string holding only a number) is taken in the SI unit. For
    ``temperature_difference`` an offset unit is read as its difference ("5 degC" = 5 K); for
    ``temperature`` a difference unit ("5 delta_degC") is refused."""
    si_unit = SI_UNITS[kind]
    if isinstance(value, bool):
        raise UnitParseError(f"a {_describe(kind)} is needed, not a true/false value")
    if isinstance(value, (int, float)):
        try:
            number = float(value)
        except OverflowError:
            raise UnitParseError("the value is too large to be a number") from None
    elif isinstance(value, str):
        magnitude, unit = _parse_text(value.strip())
        if unit is None:
            number = magnitude
        else:
            if kind == "temperature" and _is_delta_unit(unit):
                raise UnitParseError(
                    f"{value!r} is a temperature difference; a temperature is needed (like '65 degC' or '338.15 K')"
                )
            offset_name = _single_offset_unit(unit)
            if kind == "temperature_difference" and offset_name is not None:
                unit = ureg.parse_units("delta_" + offset_name)
            if kind == "pressure_difference" and offset_name is not None:
                raise UnitParseError(f"{value!r} is a gauge pressure; a pressure difference is needed (like '0.7 kPa')")
            try:
                number = float(Quantity(magnitude, unit).to(si_unit).magnitude)
            except pint.DimensionalityError:
                raise UnitParseError(
                    f"{value!r} is not a {_describe(kind)} (wanted units like {example_unit(kind)})"
                ) from None
            except Exception as exc:
                raise UnitParseError(f"cannot convert {value!r} to {si_unit} ({type(exc).__name__})") from None
    else:
        raise UnitParseError(f"a {_describe(kind)} is needed (a number or a string with units)")
    if not math.isfinite(number):
        raise UnitParseError("the value is not a finite number")
    return number


_MASS_PPM = re.compile(r"\s*([+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)\s*(?:ppmw|wppm)\s*")


def fraction_and_basis(value: object) -> tuple[float, str]:
    """(fraction, "mole" or "mass") of a product purity: a number or pint's dimensionless
    units ("0.995", "99.5 %", "50 ppm") are mole fractions; "50 ppmw" (or "50 wppm") is a mass
    fraction of 50e-6. Raises :class:`UnitParseError`."""
    if isinstance(value, str):
        match = _MASS_PPM.fullmatch(value)
        if match is not None:
            number = float(match.group(1)) * 1e-6
            if not math.isfinite(number):
                raise UnitParseError("the value is not a finite number")
            return number, "mass"
    return to_si(value, "dimensionless"), "mole"


def example_unit(kind: str) -> str:
    """A unit a user would write for ``kind``, for error messages."""
    return {
        "temperature": "'K' or 'degC'",
        "temperature_difference": "'K' or 'delta_degC'",
        "pressure": "'kPa', 'bar' or 'barg'",
        "molar_flow": "'kmol/h' or 'mol/s'",
        "mass_flow": "'kg/h' or 'klb/h'",
        "pressure_difference": "'kPa' or 'mbar'",
        "power": "'kW' or 'W'",
        "molar_energy": "'kJ/mol' or 'J/mol'",
        "molar_mass": "'kg/mol' or 'g/mol'",
        "molar_volume": "'m**3/mol' or 'cm**3/mol'",
        "molar_density": "'mol/m**3' or 'kmol/m**3'",
        "molar_heat_capacity": "'J/mol/K'",
        "inverse_temperature": "'1/K'",
        "dimensionless": "no units",
        "length": "'m', 'mm' or 'in'",
        "time": "'s'",
        "velocity": "'m/s'",
        "mass_density": "'kg/m**3'",
        "surface_tension": "'mN/m' or 'dyn/cm'",
        "viscosity": "'mPa*s' or 'cP'",
        "inverse_length": "'1/m' or '1/ft'",
    }[kind]


def unit_factor(unit: str, kind: str) -> float:
    """SI value of one ``unit`` of a (non-offset) quantity of ``kind``: ``unit_factor('kPa',
    'pressure') == 1000``. ``unit`` must be a unit alone (no number); an offset unit such as
    'degC' standing alone is refused (use :func:`temperature_scale`). Raises
    :class:`UnitParseError`."""
    if not isinstance(unit, str):
        raise UnitParseError(f"a unit is needed as text, like {example_unit(kind)}")
    parsed = _parse_unit_expression(unit.strip())
    if _single_offset_unit(parsed) is not None:
        raise UnitParseError(f"{unit!r} has an offset (zero not at absolute zero); it cannot scale a value")
    try:
        factor = float(Quantity(1.0, parsed).to(SI_UNITS[kind]).magnitude)
    except pint.DimensionalityError:
        raise UnitParseError(f"{unit!r} is not a unit of {_describe(kind)} (wanted {example_unit(kind)})") from None
    except Exception as exc:
        raise UnitParseError(f"cannot convert {unit!r} to {SI_UNITS[kind]} ({type(exc).__name__})") from None
    if not (math.isfinite(factor) and factor > 0.0):
        raise UnitParseError(f"{unit!r} does not give a usable scale factor")
    return factor


def flow_unit_kind(unit: str) -> str:
    """"molar_flow" or "mass_flow": the kind of a flow unit such as 'kmol/h' or 'klb/h'.
    Raises the molar flow's :class:`UnitParseError` for a unit of neither."""
    try:
        unit_factor(unit, "molar_flow")
        return "molar_flow"
    except UnitParseError as molar_error:
        try:
            unit_factor(unit, "mass_flow")
        except UnitParseError:
            raise molar_error from None
        return "mass_flow"


def temperature_scale(unit: str) -> tuple[float, float]:
    """(slope, intercept) with ``T_in_unit = slope * T_kelvin + intercept`` for a temperature
    unit such as 'K', 'degC', 'degF', 'degR'. Difference units ('delta_degC') and units with a
    number ('2 K') are refused. Raises :class:`UnitParseError`."""
    return offset_scale(unit, "temperature")


_SCALE_WHAT = {"temperature": "a temperature unit", "pressure": "a unit of pressure"}
_SCALE_EXAMPLES = {"temperature": "'K', 'degC', 'degF' or 'degR'", "pressure": "'bar', 'kPa', 'psi', 'barg' or 'psig'"}


def offset_scale(unit: str, kind: str) -> tuple[float, float]:
    """(slope, intercept) with ``value_in_unit = slope * value_si + intercept`` for a unit of
    ``kind`` ("temperature" or "pressure") that may have an offset: 'degC' against K, a gauge
    pressure 'barg' or 'psig' against Pa (:data:`ATMOSPHERE`). Difference units and units
    with a number are refused. Raises :class:`UnitParseError`."""
    wanted = f"wanted {_SCALE_EXAMPLES[kind]}"
    if not isinstance(unit, str):
        raise UnitParseError(f"a {kind} unit is needed as text ({wanted})")
    parsed = _parse_unit_expression(unit.strip())
    si = ureg.parse_units(SI_UNITS[kind])
    if parsed.dimensionality != si.dimensionality or _is_delta_unit(parsed):
        raise UnitParseError(f"{unit!r} is not {_SCALE_WHAT[kind]} ({wanted})")
    if _single_offset_unit(parsed) is None and kind == "temperature" and len(parsed._units) != 1:
        raise UnitParseError(f"{unit!r} is not {_SCALE_WHAT[kind]} ({wanted})")
    try:
        zero = float(Quantity(0.0, si).to(parsed).magnitude)
        thousand = float(Quantity(1000.0, si).to(parsed).magnitude)
        slope = (thousand - zero) / 1000.0
        if _single_offset_unit(parsed) is None:  # no offset: the exact reciprocal of the unit's size
            slope, zero = 1.0 / float(Quantity(1.0, parsed).to(si).magnitude), 0.0
    except Exception:
        raise UnitParseError(f"{unit!r} is not {_SCALE_WHAT[kind]} ({wanted})") from None
    if not (math.isfinite(slope) and slope > 0.0 and math.isfinite(zero)):
        raise UnitParseError(f"{unit!r} does not give a usable scale")
    return slope, zero


def to_si_of_kinds(value: object, kinds: tuple[str, ...]) -> tuple[float, str]:
    """(value in SI, its kind) for a value that may be of any of ``kinds`` (tried in order; a
    bare number takes the first kind): ``to_si_of_kinds("6000 kg/h", ("molar_flow",
    "mass_flow")) == (1.6667, "mass_flow")``. Raises the first kind's :class:`UnitParseError`
    when none fits."""
    first_error = None
    for kind in kinds:
        try:
            return to_si(value, kind), kind
        except UnitParseError as exc:
            first_error = first_error or exc
    assert first_error is not None
    raise first_error


def convert(value_si: float, kind: str, unit: str) -> float:
    """Convert an SI value of ``kind`` to ``unit`` (for display)."""
    return float(Quantity(value_si, SI_UNITS[kind]).to(unit).magnitude)
