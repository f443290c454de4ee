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
from ..units import UnitParseError, temperature_scale, unit_factor

__all__ = ["SI_DISPLAY", "DisplayUnits", "cell", "display_units", "markdown_table", "screen_table"]

#: The ``--units si`` preset.
SI_DISPLAY = {"temperature": "K", "pressure": "Pa", "flow": "mol/s", "duty": "W"}
_TEMPERATURE_LABELS = {"degC": "°C", "degF": "°F", "degR": "°R", "K": "K", "kelvin": "K"}
_KINDS = {"pressure": "pressure", "flow": "molar_flow", "duty": "power"}


@dataclass(frozen=True)
class DisplayUnits:
    """Screen units and their conversion from SI. Build with :func:`display_units`."""

    temperature: str = "degC"
    pressure: str = "bar"
    flow: str = "kmol/h"
    duty: str = "kW"
    _temperature_scale: tuple[float, float] = field(default=(1.0, -273.15), repr=False)
    _factors: tuple[float, float, float] = field(default=(1e5, 1.0 / 3.6, 1e3), repr=False)  # SI per unit

    @property
    def temperature_label(self) -> str:
        return _TEMPERATURE_LABELS.get(self.temperature, self.temperature)

    def T(self, kelvin: float | np.ndarray) -> float | np.ndarray:
        """Temperature [K] in the display unit."""
        slope, intercept = self._temperature_scale
        value = slope * np.asarray(kelvin, dtype=float) + intercept
        return value if value.ndim else float(value)

    def P(self, pascal: float | np.ndarray) -> float | np.ndarray:
        """Pressure [Pa] in the display unit."""
        return pascal / self._factors[0]

    def F(self, mol_per_s: float | np.ndarray) -> float | np.ndarray:
        """Molar flow [mol/s] in the display unit."""
        return mol_per_s / self._factors[1]

    def Q(self, watt: float | np.ndarray) -> float | np.ndarray:
        """Duty [W] in the display unit."""
        return watt / self._factors[2]


def display_units(display: Mapping[str, str] | None = None, override: str | None = None) -> DisplayUnits:
    """Screen units from a case's ``[display]`` table, then ``override``: the ``--units`` text,
    either ``"si"`` (K, Pa, mol/s, W) or ``"temperature=degF,pressure=psi,flow=lbmol/h,duty=kW"``
    (any subset). Raises :class:`CaseError` naming the option, key and unit for a bad one."""
    chosen = dict(DEFAULT_DISPLAY)
    chosen.update({key: value for key, value in (display or {}).items() if key in DEFAULT_DISPLAY})
    origin = dict.fromkeys(chosen, "display")
    if override is not None:
        text = override.strip()
        if text.lower() == "si":
            chosen.update(SI_DISPLAY)
            origin = dict.fromkeys(chosen, "--units")
        else:
            for item in filter(None, (part.strip() for part in text.split(","))):
                key, sign, unit = item.partition("=")
                key, unit = key.strip(), unit.strip()
                if not sign or key not in DEFAULT_DISPLAY or not unit:
                    raise CaseError(
                        "cannot read the screen units",
                        key="--units",
                        value=item,
                        expected="'si' or KEY=UNIT pairs separated by commas, KEY one of "
                        + ", ".join(DEFAULT_DISPLAY)
                        + " (e.g. temperature=degF,pressure=psi,duty=Btu/h)",
                    )
                chosen[key] = unit
                origin[key] = "--units"
    try:
        scale = temperature_scale(chosen["temperature"])
    except UnitParseError as exc:
        raise CaseError(str(exc), key=_where(origin, "temperature"), value=chosen["temperature"]) from None
    factors = []
    for key in ("pressure", "flow", "duty"):
        try:
            factors.append(unit_factor(chosen[key], _KINDS[key]))
        except UnitParseError as exc:
            raise CaseError(str(exc), key=_where(origin, key), value=chosen[key]) from None
    return DisplayUnits(
        temperature=chosen["temperature"], pressure=chosen["pressure"], flow=chosen["flow"], duty=chosen["duty"],
        _temperature_scale=scale, _factors=tuple(factors),
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
