"""Reading single values of a case file: where a value sits (:class:`At`, for messages), the
readers of numbers, quantities with units, whole numbers, text, choices, lists and [ij, ji]
pairs, and flat tables described declaratively (:class:`Field`, :func:`read_fields`).

Every reader takes the value as TOML gave it and its place, and returns the value in SI or
raises :class:`~solver.errors.CaseError` naming the file, the dotted key, the value and what
was expected (one message, no traceback).
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from typing import Any, Callable, Mapping, NoReturn

from solver.errors import CaseError
from solver.units import SI_UNITS, UnitParseError, to_si, to_si_of_kinds

__all__ = [
    "At",
    "Field",
    "Reader",
    "check_keys",
    "component_key",
    "plain",
    "plausible_quantity",
    "quantity",
    "read_boolean",
    "read_choice",
    "read_component_name",
    "read_fields",
    "read_ij_ji",
    "read_integer",
    "read_list",
    "read_quantity",
    "read_quantity_of_kinds",
    "read_real",
    "read_table",
    "read_text",
]

_QUANTITY_EXAMPLES = {
    "temperature": "a temperature such as '65 degC' or 338.15 (a plain number is K)",
    "temperature_difference": "a temperature difference such as '5 K' (a plain number is K)",
    "pressure": "a pressure such as '101.325 kPa', '1.5 bar' or '0.5 barg' (a plain number is Pa)",
    "pressure_difference": "a pressure difference such as '0.7 kPa' (a plain number is Pa)",
    "mass_flow": "a mass flow such as '6000 kg/h' or '13 klb/h' (a plain number is kg/s)",
    "molar_flow": "a molar flow such as '100 kmol/h' (a plain number is mol/s)",
    "power": "a power such as '-2.5 MW', '800 kW' or '3 MMBtu/h' (a plain number is W)",
    "molar_energy": "a molar energy such as '-250 cal/mol' or '35 kJ/mol' (a plain number is J/mol)",
    "molar_mass": "a molar mass such as '0.1 kg/mol' or '100 g/mol' (a plain number is kg/mol)",
    "molar_volume": "a molar volume such as '40.7 cm**3/mol' (a plain number is m**3/mol)",
    "molar_density": "a molar density such as '12 kmol/m**3' (a plain number is mol/m**3)",
    "molar_heat_capacity": "a molar heat capacity such as '75 J/mol/K' (a plain number is J/mol/K)",
    "inverse_temperature": "a number in 1/K such as 0.001 or '0.001 1/K'",
    "dimensionless": "a number such as 0.7 or '70 %'",
}
_BARE_KEY = re.compile(r"[A-Za-z0-9_-]+")

#: A reader of one value: (value as TOML gave it, its place) -> the value read.
Reader = Callable[[Any, "At"], Any]


@dataclass(frozen=True)
class At:
    """A place in the case file (file name and key path), for error messages."""

    file: str
    key: str = ""

    def child(self, name: object) -> At:
        text = str(name)
        if not _BARE_KEY.fullmatch(text):
            text = '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'
        return At(self.file, f"{self.key}.{text}" if self.key else text)

    def item(self, index: int) -> At:
        return At(self.file, f"{self.key}[{index}]")

    def fail(self, problem: str, value: Any = None, expected: str | None = None) -> NoReturn:
        raise CaseError(problem, file=self.file, key=self.key or None, value=_shown(value), expected=expected)


def _shown(value: Any) -> Any:
    """The value for a message; very long values are cut short."""
    try:
        text = repr(value)
    except Exception:
        return "<unprintable value>"
    return value if len(text) <= 120 else text[:100] + "..."


def _kind_name(value: Any) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, Mapping):
        return "a table"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, (int, float)):
        return "a number"
    return type(value).__name__


def plain(value: Any) -> Any:
    """A plain copy (dicts and lists) of parsed TOML data."""
    if isinstance(value, Mapping):
        return {str(k): plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    return value


# --- tables and their keys ----------------------------------------------------------------


def read_table(value: Any, at: At, expected: str = "a table") -> Mapping:
    if not isinstance(value, Mapping):
        at.fail(f"must be a table, not {_kind_name(value)}", value, expected)
    return value


def check_keys(table: Mapping, at: At, allowed: tuple[str, ...], required: tuple[str, ...] = ()) -> None:
    """Unknown keys are errors with a suggestion; required keys must be present."""
    for name in table:
        if name not in allowed:
            text = str(name)
            close = difflib.get_close_matches(text, allowed, n=1, cutoff=0.6)
            if not close:
                close = [a for a in allowed if a.lower() == text.lower()]
            hint = f"; did you mean {close[0]!r}?" if close else ""
            at.child(text).fail(f"unknown key{hint}", name, "one of: " + ", ".join(allowed))
    for name in required:
        if name not in table:
            at.child(name).fail("missing", expected=f"a value for {name!r}")


@dataclass(frozen=True)
class Field:
    """One key of a flat table: the reader of its value, whether it must be given, and the value
    taken when it is not (read like a written one; None: the key is left out of the result).
    A field without a reader is allowed in the table and read by the caller."""

    read: Reader | None = None
    required: bool = False
    default: Any = None


def read_fields(value: Any, at: At, fields: Mapping[str, Field], expected: str = "a table") -> dict[str, Any]:
    """A flat table read key by key as ``fields`` describes it, in the order of ``fields``:
    unknown keys and missing required ones are errors; returns {key: value read}."""
    table = read_table(value, at, expected)
    check_keys(table, at, tuple(fields), required=tuple(name for name, f in fields.items() if f.required))
    values: dict[str, Any] = {}
    for name, spec in fields.items():
        if spec.read is None:
            continue
        if name in table:
            values[name] = spec.read(table[name], at.child(name))
        elif spec.default is not None:
            values[name] = spec.read(spec.default, at.child(name))
    return values


# --- single values ------------------------------------------------------------------------


def _range_text(minimum, maximum, above, below, unit: str) -> str:
    parts = []
    suffix = f" {unit}" if unit else ""
    if above is not None:
        parts.append(f"> {above:g}{suffix}")
    if minimum is not None:
        parts.append(f">= {minimum:g}{suffix}")
    if below is not None:
        parts.append(f"< {below:g}{suffix}")
    if maximum is not None:
        parts.append(f"<= {maximum:g}{suffix}")
    return "a value " + " and ".join(parts)


def _check_range(number: float, value: Any, at: At, minimum, maximum, above, below, unit: str = "") -> float:
    if (
        (minimum is not None and number < minimum)
        or (maximum is not None and number > maximum)
        or (above is not None and number <= above)
        or (below is not None and number >= below)
    ):
        shown = f"{number:g} {unit}".strip()
        problem = "out of range" if value is None or isinstance(value, (int, float)) else f"out of range ({shown})"
        at.fail(problem, value, _range_text(minimum, maximum, above, below, unit))
    return number


def read_real(value: Any, at: At, *, minimum=None, maximum=None, above=None, below=None) -> float:
    """A plain number (int or float, not a boolean), finite."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        at.fail(f"must be a number, not {_kind_name(value)}", value, "a number")
    try:
        number = float(value)
    except OverflowError:
        at.fail("the number is too large", value, "a number")
    if not math.isfinite(number):
        at.fail("not a finite number", value, "a finite number")
    return _check_range(number, value, at, minimum, maximum, above, below)


def read_quantity(value: Any, kind: str, at: At, *, minimum=None, maximum=None, above=None, below=None) -> float:
    """A number in the SI unit of ``kind`` or a string with units, converted to SI."""
    try:
        number = to_si(value, kind)
    except UnitParseError as exc:
        at.fail(str(exc), value, _QUANTITY_EXAMPLES[kind])
    unit = _si_label(kind)
    return _check_range(number, value, at, minimum, maximum, above, below, unit)


def _si_label(kind: str) -> str:
    return "" if kind == "dimensionless" else SI_UNITS[kind].replace("delta_degC", "K")


def read_quantity_of_kinds(value: Any, kinds: tuple[str, ...], at: At, *, above=None) -> tuple[float, str]:
    """(value in SI, its kind) of a quantity that may be of any of ``kinds`` (a bare number:
    the first), such as a feed flow in mol/s or kg/s; within ``above`` in its own SI unit."""
    try:
        number, kind = to_si_of_kinds(value, kinds)
    except UnitParseError as exc:
        at.fail(str(exc), value, " or ".join(_QUANTITY_EXAMPLES[kind] for kind in kinds))
    return _check_range(number, value, at, None, None, above, None, _si_label(kind)), kind


def quantity(kind: str, **bounds: float) -> Reader:
    """A reader of a quantity of ``kind`` within ``bounds`` (minimum, maximum, above, below)."""
    return lambda value, at: read_quantity(value, kind, at, **bounds)


def plausible_quantity(kind: str, largest: float, what: str, example: str) -> Reader:
    """A reader of a positive quantity of ``kind`` no larger than ``largest`` (SI): a larger one
    is taken as a plain number meant in another unit, and refused as not being ``what``."""

    def read(value: Any, at: At) -> float:
        number = read_quantity(value, kind, at, above=0.0)
        if number > largest:
            unit = SI_UNITS[kind]
            at.fail(f"{number:g} {unit} is not {what} (a plain number is {unit})", value, example)
        return number

    return read


def read_integer(value: Any, at: At, *, minimum: int, maximum: int, what: str = "a whole number") -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        hint = " written without a decimal point" if isinstance(value, float) else ""
        at.fail(f"must be a whole number{hint}, not {_kind_name(value)}", value, f"{what} from {minimum} to {maximum}")
    if not minimum <= value <= maximum:
        at.fail("out of range", value, f"{what} from {minimum} to {maximum}")
    return value


def read_text(value: Any, at: At, *, allow_empty: bool = True, max_length: int = 10_000) -> str:
    if not isinstance(value, str):
        at.fail(f"must be a string, not {_kind_name(value)}", value, "a string in quotes")
    if not allow_empty and not value.strip():
        at.fail("must not be empty", value, "a non-empty string")
    if len(value) > max_length:
        at.fail(f"too long ({len(value)} characters)", value, f"at most {max_length} characters")
    return value


def read_choice(value: Any, at: At, choices: tuple[str, ...]) -> str:
    expected = "one of: " + ", ".join(repr(c) for c in choices)
    if not isinstance(value, str):
        at.fail(f"must be a string, not {_kind_name(value)}", value, expected)
    word = value.strip().lower()
    if word not in choices:
        close = difflib.get_close_matches(word, choices, n=1, cutoff=0.6)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        at.fail(f"not a known choice{hint}", value, expected)
    return word


def read_boolean(value: Any, at: At) -> bool:
    if not isinstance(value, bool):
        at.fail(f"must be true or false, not {_kind_name(value)}", value, "true or false")
    return value


def read_list(value: Any, at: At, *, length: int | None = None, min_length: int = 0, max_length: int = 10_000) -> list:
    if not isinstance(value, (list, tuple)):
        at.fail(f"must be a list, not {_kind_name(value)}", value, "a list in brackets [...]")
    if length is not None and len(value) != length:
        at.fail(f"must have {length} entries, not {len(value)}", value, f"a list of {length} values")
    if len(value) < min_length:
        at.fail(f"must have at least {min_length} entries", value, f"a list of at least {min_length} values")
    if len(value) > max_length:
        at.fail(f"too many entries ({len(value)})", value, f"at most {max_length} entries")
    return list(value)


def read_ij_ji(value: Any, at: At, read: Reader) -> tuple[float, float]:
    """A 2-list [ij, ji] of a binary pair, read entry by entry."""
    items = read_list(value, at, length=2)
    return read(items[0], at.item(0)), read(items[1], at.item(1))


# --- component names ----------------------------------------------------------------------


def read_component_name(value: Any, at: At) -> str:
    """A component name as written in components.names, as its lower-case canonical form."""
    name = read_text(value, at, allow_empty=False, max_length=100)
    if name != name.strip() or any(ord(c) < 32 or c == "\x7f" for c in name) or "&" in name:
        at.fail("not a usable component name", value, "a single fluid name without spaces around it or '&'")
    return name.lower()


def component_key(written: Any, names: tuple[str, ...], at: At) -> str:
    """A key naming one of the case's components (case-insensitive) -> canonical name."""
    if isinstance(written, str) and written.strip().lower() in names:
        return written.strip().lower()
    close = difflib.get_close_matches(str(written).lower(), names, n=1, cutoff=0.6)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    at.fail(f"not a component of this case{hint}", written, "one of components.names: " + ", ".join(names))
