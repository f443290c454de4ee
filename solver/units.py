"""Units: one pint registry for the whole package, and conversion of case-file values to SI.

A case-file quantity is either a number (taken in the default unit for that kind of quantity)
or a string pint understands ("100 kmol/h", "65 degC", "1.5 bar"). Everything inside the
engine is SI: K, Pa, mol/s, W, J/mol, kg/mol, m3/mol.
"""

from __future__ import annotations

import math
from functools import lru_cache

import pint

ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
Quantity = ureg.Quantity

#: SI unit and the dimensionality it stands for, per kind of quantity used in case files.
SI_UNITS: dict[str, str] = {
    "temperature": "K",
    "temperature_difference": "delta_degC",
    "pressure": "Pa",
    "molar_flow": "mol/s",
    "power": "W",
    "molar_energy": "J/mol",
    "molar_mass": "kg/mol",
    "molar_volume": "m**3/mol",
    "molar_heat_capacity": "J/mol/K",
    "dimensionless": "dimensionless",
}


class UnitParseError(ValueError):
    """A value that is not a quantity of the expected kind; the message says what was expected."""


@lru_cache(maxsize=512)
def _parse_text(text: str) -> pint.Quantity:
    return ureg.Quantity(text)


def to_si(value: object, kind: str) -> float:
    """Convert ``value`` (a number in SI, or a string with units) to a float in the SI unit of
    ``kind`` (one of :data:`SI_UNITS`). Raises :class:`UnitParseError` with a plain message."""
    si_unit = SI_UNITS[kind]
    if isinstance(value, bool):
        raise UnitParseError(f"a {kind.replace('_', ' ')} is needed, not a true/false value")
    if isinstance(value, (int, float)):
        number = float(value)
    elif isinstance(value, str):
        try:
            quantity = _parse_text(value.strip())
        except Exception as exc:  # pint raises many kinds of errors for unreadable text
            raise UnitParseError(f"cannot read {value!r} as a quantity ({type(exc).__name__})") from None
        if not isinstance(quantity, pint.Quantity):
            number = float(quantity)
            if kind not in ("dimensionless",):
                # a bare number written as a string is taken in the SI unit, like a number
                pass
        else:
            try:
                if kind == "temperature_difference":
                    number = float(quantity.to("delta_degC").magnitude)
                else:
                    number = float(quantity.to(si_unit).magnitude)
            except pint.DimensionalityError:
                raise UnitParseError(
                    f"{value!r} is not a {kind.replace('_', ' ')} (wanted units like {example_unit(kind)})"
                ) from None
            except Exception as exc:
                raise UnitParseError(f"cannot convert {value!r} to {si_unit} ({type(exc).__name__})") from None
    else:
        raise UnitParseError(f"a {kind.replace('_', ' ')} is needed (a number or a string with units)")
    if not math.isfinite(number):
        raise UnitParseError("the value is not a finite number")
    return number


def example_unit(kind: str) -> str:
    """A unit a user would write for ``kind``, for error messages."""
    return {
        "temperature": "'K' or 'degC'",
        "temperature_difference": "'K' or 'delta_degC'",
        "pressure": "'kPa' or 'bar'",
        "molar_flow": "'kmol/h' or 'mol/s'",
        "power": "'kW' or 'W'",
        "molar_energy": "'kJ/mol' or 'J/mol'",
        "molar_mass": "'kg/mol' or 'g/mol'",
        "molar_volume": "'m**3/mol' or 'cm**3/mol'",
        "molar_heat_capacity": "'J/mol/K'",
        "dimensionless": "no units",
    }[kind]


def unit_factor(unit: str, kind: str) -> float:
    """SI value of one ``unit`` of a (non-offset) quantity of ``kind``: ``unit_factor('kPa',
    'pressure') == 1000``. Raises :class:`UnitParseError`."""
    return to_si(f"1 {unit}", kind)


def temperature_scale(unit: str) -> tuple[float, float]:
    """(slope, intercept) with ``T_in_unit = slope * T_kelvin + intercept`` for a temperature
    unit such as 'K', 'degC', 'degF', 'degR'. Raises :class:`UnitParseError`."""
    try:
        zero = Quantity(0.0, "K").to(unit).magnitude
        one = Quantity(1.0, "K").to(unit).magnitude
    except Exception:
        raise UnitParseError(f"{unit!r} is not a temperature unit (wanted 'K', 'degC', 'degF' or 'degR')") from None
    return float(one - zero), float(zero)


def convert(value_si: float, kind: str, unit: str) -> float:
    """Convert an SI value of ``kind`` to ``unit`` (for display)."""
    return float(Quantity(value_si, SI_UNITS[kind]).to(unit).magnitude)
