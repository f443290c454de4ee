"""How a result is shown: screen units (a case's ``[display]`` table or the ``--units``
option; values inside stay SI, only the text is converted), numbers in table cells, and
tables as rich screen tables or Markdown."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping, Sequence

import numpy as np
from rich.table import Table

from ..case import DEFAULT_DISPLAY
from ..errors import CaseError
from ..units import UnitParseError, flow_unit_kind, offset_scale, unit_factor

__all__ = ["COMPOSITIONS", "SI_DISPLAY", "DisplayUnits", "cell", "display_units", "markdown_table", "screen_table"]

#: The ``--units si`` preset.
SI_DISPLAY = {"temperature": "K", "pressure": "Pa", "flow": "mol/s", "duty": "W"}
#: How product compositions can be shown: (basis, scale, column label).
COMPOSITIONS = {
    "mole fraction": ("mole", 1.0, "x"),
    "ppm": ("mole", 1e6, "ppm"),
    "mass fraction": ("mass", 1.0, "w"),
    "ppmw": ("mass", 1e6, "ppmw"),
}
_TEMPERATURE_LABELS = {"degC": "°C", "degF": "°F", "degR": "°R", "K": "K", "kelvin": "K"}
_KEYS = (*DEFAULT_DISPLAY, "composition")


@dataclass(frozen=True)
class DisplayUnits:
    """Screen units and their conversion from SI. Build with :func:`display_units`.

    ``flow`` may be a mass flow ("kg/h", "klb/h"): stream flows (products, feeds, stages) are
    then shown in it with each stream's molar mass (:meth:`stream`), and flows that are not
    of one stream (a rate spec, CMO flows) in ``molar_flow``. A gauge pressure ("barg",
    "psig") is shown against the standard atmosphere."""

    temperature: str = "degC"
    pressure: str = "bar"
    flow: str = "kmol/h"
    duty: str = "kW"
    composition: str = "mole fraction"
    molar_flow: str = "kmol/h"
    _temperature_scale: tuple[float, float] = field(default=(1.0, -273.15), repr=False)
    _pressure_scale: tuple[float, float] = field(default=(1e-5, 0.0), repr=False)
    _factors: tuple[float, float, float] = field(default=(1e5, 1.0 / 3.6, 1e3), repr=False)  # SI per unit
    _mass_flow_factor: float | None = field(default=None, repr=False)  # kg/s per unit of a mass flow display

    @property
    def temperature_label(self) -> str:
        return _TEMPERATURE_LABELS.get(self.temperature, self.temperature)

    @property
    def composition_label(self) -> str:
        """The prefix of a composition column: "x", "ppm", "w" or "ppmw"."""
        return COMPOSITIONS[self.composition][2]

    def T(self, kelvin: float | np.ndarray) -> float | np.ndarray:
        """Temperature [K] in the display unit."""
        slope, intercept = self._temperature_scale
        value = slope * np.asarray(kelvin, dtype=float) + intercept
        return value if value.ndim else float(value)

    def P(self, pascal: float | np.ndarray) -> float | np.ndarray:
        """Pressure [Pa] in the display unit (a gauge unit against the standard atmosphere)."""
        slope, intercept = self._pressure_scale
        if not intercept:
            return pascal * slope
        value = np.asarray(pascal, dtype=float) * slope + intercept
        value = np.where(np.abs(value) < 1e-12 * abs(intercept), 0.0, value)  # rounding at one atmosphere
        return value if value.ndim else float(value)

    def F(self, mol_per_s: float | np.ndarray) -> float | np.ndarray:
        """Molar flow [mol/s] in ``molar_flow``."""
        return mol_per_s / self._factors[1]

    def stream(self, mol_per_s: float | np.ndarray, composition: np.ndarray, molar_masses: np.ndarray) -> float | np.ndarray:
        """A stream's flow [mol/s] in ``flow``: molar, or a mass flow with the stream's molar
        mass sum x_i M_i (``composition`` mole fractions, one row per stream; ``molar_masses``
        kg/mol)."""
        if self._mass_flow_factor is None:
            return self.F(mol_per_s)
        molar_mass = np.asarray(composition, dtype=float) @ np.asarray(molar_masses, dtype=float)
        value = np.asarray(mol_per_s, dtype=float) * molar_mass / self._mass_flow_factor
        return value if value.ndim else float(value)

    def fractions(self, composition: np.ndarray, molar_masses: np.ndarray) -> np.ndarray:
        """Mole fractions (one row per stream) in the display's composition basis and scale."""
        basis, scale, _ = COMPOSITIONS[self.composition]
        x = np.asarray(composition, dtype=float)
        if basis == "mass":
            mass = x * np.asarray(molar_masses, dtype=float)
            x = mass / mass.sum(axis=-1, keepdims=True)
        return x * scale

    def Q(self, watt: float | np.ndarray) -> float | np.ndarray:
        """Duty [W] in the display unit."""
        return watt / self._factors[2]


def display_units(display: Mapping[str, str] | None = None, override: str | None = None) -> DisplayUnits:
    """Screen units from a case's ``[display]`` table, then ``override``: the ``--units`` text,
    either ``"si"`` (K, Pa, mol/s, W) or ``"temperature=degF,pressure=psig,flow=klb/h,duty=MMBtu/h"``
    (any subset; ``flow`` molar or mass, ``composition`` one of :data:`COMPOSITIONS`). Raises
    :class:`CaseError` naming the option, key and unit for a bad one."""
    chosen = {**DEFAULT_DISPLAY, "composition": "mole fraction"}
    chosen.update({key: value for key, value in (display or {}).items() if key in _KEYS})
    origin = dict.fromkeys(chosen, "display")
    if override is not None:
        text = override.strip()
        if text.lower() == "si":
            chosen.update(SI_DISPLAY)
            origin.update(dict.fromkeys(SI_DISPLAY, "--units"))
        else:
            for item in filter(None, (part.strip() for part in text.split(","))):
                key, sign, unit = item.partition("=")
                key, unit = key.strip(), unit.strip()
                if not sign or key not in _KEYS or not unit:
                    raise CaseError(
                        "cannot read the screen units",
                        key="--units",
                        value=item,
                        expected="'si' or KEY=UNIT pairs separated by commas, KEY one of "
                        + ", ".join(_KEYS)
                        + " (e.g. temperature=degF,pressure=psig,flow=kg/h,duty=MMBtu/h,composition=ppm)",
                    )
                chosen[key] = unit
                origin[key] = "--units"
    scales = {}
    for key in ("temperature", "pressure"):
        try:
            scales[key] = offset_scale(chosen[key], key)
        except UnitParseError as exc:
            raise CaseError(str(exc), key=_where(origin, key), value=chosen[key]) from None
    factors = [1e5]
    for key in ("flow", "duty"):
        try:
            kind = flow_unit_kind(chosen[key]) if key == "flow" else "power"
            factors.append(unit_factor(chosen[key], kind))
        except UnitParseError as exc:
            raise CaseError(str(exc), key=_where(origin, key), value=chosen[key]) from None
    kind = flow_unit_kind(chosen["flow"])
    if chosen["composition"] not in COMPOSITIONS:
        raise CaseError("not a way to show compositions", key=_where(origin, "composition"), value=chosen["composition"],
                        expected="one of " + ", ".join(repr(c) for c in COMPOSITIONS))
    mass = kind == "mass_flow"
    return DisplayUnits(
        temperature=chosen["temperature"], pressure=chosen["pressure"], flow=chosen["flow"], duty=chosen["duty"],
        composition=chosen["composition"], molar_flow=DEFAULT_DISPLAY["flow"] if mass else chosen["flow"],
        _temperature_scale=scales["temperature"], _pressure_scale=scales["pressure"],
        _factors=(factors[0], 1.0 / 3.6 if mass else factors[1], factors[2]),
        _mass_flow_factor=factors[1] if mass else None,
    )


def _where(origin: Mapping[str, str], key: str) -> str:
    return f"--units {key}" if origin[key] == "--units" else f"display.{key}"


def cell(value: Any, digits: str = ".4g") -> str:
    """A value in a table cell: numbers in the ``digits`` format, "-" for none or not finite."""
    if value is None:
        return "-"
    if isinstance(value, float) and not np.isfinite(value):
        return "-"
    return format(value, digits) if isinstance(value, (int, float)) else str(value)


def markdown_table(header: Sequence[str], rows: Sequence[Sequence[str]], right: Sequence[bool] | None = None) -> list[str]:
    """The lines of a Markdown table; ``right`` says which columns are right-aligned (all)."""
    right = right or [True] * len(header)
    cells = lambda row: "| " + " | ".join(str(item).replace("|", "\\|") for item in row) + " |"  # noqa: E731
    return [cells(header), "| " + " | ".join("---:" if r else "---" for r in right) + " |", *[cells(row) for row in rows]]


def screen_table(title: str, header: Sequence[str], rows: Sequence[Sequence[str]], left: int = 1) -> Table:
    """A rich table, the first ``left`` columns left-aligned, the others right-aligned."""
    table = Table(title=title, header_style="bold")
    for k, column in enumerate(header):
        table.add_column(column, justify="left" if k < left else "right", no_wrap=k == 0)
    for row in rows:
        table.add_row(*row)
    return table
