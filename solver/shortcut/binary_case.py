"""A binary case read for the McCabe-Thiele and Ponchon-Savarit designs.

* **Light component**: the one more volatile at the feed's bubble point (on the feed's side of
  any azeotrope).
* **Design pressure**: the arithmetic mean of the stage pressures (``pressure=`` overrides it);
  the equilibrium curve is built there (:class:`~.equilibrium_curve.EquilibriumCurve`).
* **Feed thermal condition** ``q`` from the feed's rigorous enthalpy
  (:func:`solver.thermo.flash.feed_state`, judged at the feed stage's pressure as the rigorous
  engine does).
* **Products and reflux** from the specs: each usable spec is one linear row in the unknowns
  (distillate rate D, light component in the distillate d, vapor from the top stage V) under
  constant molar overflow; product purities, recoveries and rates fix the split, a reflux
  ratio, a boilup ratio (with the feed's q) or a duty (through the products' latent heats,
  iterated with the products they give) fixes the reflux.

Units are SI: K, Pa, mol/s, W, J/mol. Compositions are mole fractions of the light component.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, NamedTuple, Sequence

import numpy as np

from ..case import Case, Column, Spec
from ..errors import SpecError
from ..thermo.flash import bubble_temperature
from ..thermo.package import ThermoPackage
from .equilibrium_curve import EquilibriumCurve
from .simple_column import check_simple_column, describe_spec, feed_condition

__all__ = ["BinaryProblem", "binary_problem"]

#: Most passes of the split with the products' latent heats (duty specs).
_LATENT_HEAT_PASSES = 6


@dataclass(frozen=True, eq=False)
class BinaryProblem:
    """Everything the binary shortcuts take from a case: the curve at the design pressure, the
    feed (flow mol/s, light fraction, q, rigorous molar enthalpy J/mol), the products and the
    reflux ratio from the specs, the column's condenser, and the latent heat function."""

    thermo: ThermoPackage
    curve: EquilibriumCurve
    light_index: int
    pressure: float
    condenser: str
    feed_flow: float
    x_feed: float
    q: float
    feed_enthalpy: float
    distillate_flow: float
    x_distillate: float
    x_bottoms: float
    reflux_ratio: float | None
    reflux_factor: float | None
    latent_heat: Callable[[float], float]
    reflux_temperature: float | None
    notes: tuple[str, ...]


class _Row(NamedTuple):
    """One spec as a linear row ``coefficients . (D, d, V) = value``."""

    coefficients: list[float]
    value: float
    label: str
    kind: str


def _spec_rows(specs: Sequence[Spec], light: str, F: float, z: float, q: float, condenser: str, latent_top: float,
               latent_bottom: float) -> tuple[list[_Row], list[_Row], list[str]]:
    """One linear row per usable spec in the unknowns (D, d, V): distillate rate, light
    component in the distillate, vapor from the top tray. Returns (split rows, energy rows,
    ignored specs)."""
    split, energy, ignored = [], [], []
    for spec in specs:
        value = spec.value
        label = describe_spec(spec)

        def row(coefficients, right_side):
            return _Row(coefficients, right_side, label, spec.kind)

        if spec.kind == "mole_fraction":
            x_light = value if spec.component == light else 1.0 - value
            if spec.product == "distillate":
                split.append(row([-x_light, 1.0, 0.0], 0.0))
            else:
                split.append(row([x_light, -1.0, 0.0], x_light * F - F * z))
        elif spec.kind == "recovery":
            is_light = spec.component == light
            if spec.product == "distillate":
                split.append(row([0.0, 1.0, 0.0], value * F * z) if is_light else row([1.0, -1.0, 0.0], value * F * (1 - z)))
            else:
                split.append(
                    row([0.0, 1.0, 0.0], (1 - value) * F * z) if is_light else row([-1.0, 1.0, 0.0], (value - 1) * F * (1 - z))
                )
        elif spec.kind == "distillate_rate":
            split.append(row([1.0, 0.0, 0.0], value))
        elif spec.kind == "bottoms_rate":
            split.append(row([1.0, 0.0, 0.0], F - value))
        elif spec.kind == "reflux_ratio":
            energy.append(row([-(value + 1.0), 0.0, 1.0], 0.0))
        elif spec.kind == "boilup_ratio":
            energy.append(row([value, 0.0, 1.0], value * F + (1.0 - q) * F))
        elif spec.kind == "condenser_duty":
            if condenser == "total":
                energy.append(row([0.0, 0.0, 1.0], abs(value) / latent_top))
            else:
                energy.append(row([-1.0, 0.0, 1.0], abs(value) / latent_top))
        elif spec.kind == "reboiler_duty":
            energy.append(row([0.0, 0.0, 1.0], value / latent_bottom + (1.0 - q) * F))
        else:
            ignored.append(label)
    return split, energy, ignored


def _split_not_fixed(rows: list[_Row], split: list[_Row], energy: list[_Row], ignored: list[str], need_energy: bool,
                     wanted: int) -> SpecError:
    """The error for specs that do not fix x_D, x_B and the reflux, saying what to add or remove."""
    given = [row.label for row in rows] or ["none"]
    if len(rows) > wanted or len(split) > 2:
        advice = "remove one"
    else:
        wants = []
        if len(split) < 2:
            wants.append("a product purity, recovery or product rate")
        if need_energy and not energy:
            wants.append("a reflux (reflux_ratio, boilup_ratio or a duty spec, or reflux_ratio=/reflux_factor= here)")
        advice = "add " + " and ".join(wants)
    return SpecError(
        "the binary shortcut needs specifications that fix x_D, x_B and the reflux: two product specs and a "
        "reflux (or one product spec with two of reflux/boilup/duty); the case gives "
        f"{len(rows)} it can use: " + "; ".join(given) + "; " + advice
        + ((" (not usable here: " + "; ".join(ignored) + ")") if ignored else "")
    )


def _solve_split(case, light, F, z, q, condenser, latent, reflux_ratio, reflux_factor):
    """(D, x_D, x_B, R or None, notes) from the case's specs, with the keyword reflux (ratio or
    factor) replacing the case's reflux, boilup and duty specs. A duty spec is turned into a
    vapor flow by the products' latent heats, which depend on the products: solved again with
    the new latent heats until they stop moving."""
    notes: list[str] = []
    override = reflux_ratio is not None or reflux_factor is not None
    latent_top = latent_bottom = latent(z)
    for _ in range(_LATENT_HEAT_PASSES):
        split, energy, ignored = _spec_rows(case.specs, light, F, z, q, condenser, latent_top, latent_bottom)
        if override:
            if energy:
                notes.append("the case's " + ", ".join(row.label for row in energy) + " replaced by the reflux given")
            energy = []
            if reflux_ratio is not None:
                energy = [_Row([-(reflux_ratio + 1.0), 0.0, 1.0], 0.0, f"reflux_ratio = {reflux_ratio:.6g} (given)",
                               "reflux_ratio")]
        rows = split + energy
        need_energy = reflux_factor is None or reflux_ratio is not None
        wanted = 3 if need_energy else 2
        if len(rows) != wanted or len(split) < (1 if need_energy else 2) or len(split) > 2:
            raise _split_not_fixed(rows, split, energy, ignored, need_energy, wanted)
        matrix = np.array([row.coefficients for row in rows], dtype=float)
        right_side = np.array([row.value for row in rows], dtype=float)
        if not need_energy:
            matrix = matrix[:, :2]
        if np.linalg.cond(matrix) > 1e12:
            raise SpecError(
                "these specifications do not fix the product split (two of them say the same thing): "
                + "; ".join(row.label for row in rows)
            )
        solution = np.linalg.solve(matrix, right_side)
        D, d = float(solution[0]), float(solution[1])
        if not 0.0 < D < F:
            raise SpecError(
                f"the specifications give a distillate rate of {D:.6g} mol/s, outside (0, F = {F:.6g} mol/s): "
                + "; ".join(row.label for row in rows)
            )
        x_D, x_B = d / D, (F * z - d) / (F - D)
        R = float(solution[2]) / D - 1.0 if need_energy else None
        if not any(spec.kind in ("condenser_duty", "reboiler_duty") for spec in case.specs) or override:
            break
        new_top, new_bottom = latent(min(max(x_D, 0.0), 1.0)), latent(min(max(x_B, 0.0), 1.0))
        if abs(new_top - latent_top) < 1e-9 * latent_top and abs(new_bottom - latent_bottom) < 1e-9 * latent_bottom:
            break
        latent_top, latent_bottom = new_top, new_bottom
    if ignored:
        notes.append("not used by the shortcut: " + "; ".join(ignored))
    converted = ("boilup_ratio", "condenser_duty", "reboiler_duty")
    if not override and any(row.kind in converted for row in energy):
        notes.append("the reflux ratio was found from the boilup/duty spec by the CMO balances")
    if R is not None and not R > 0.0:
        raise SpecError(f"the specifications give a reflux ratio of {R:.6g}; it must be positive")
    return D, x_D, x_B, R, notes


def _light_index(thermo: ThermoPackage, pressure: float, z: np.ndarray) -> int:
    """The component that is more volatile at the feed's bubble point (on the feed's side of
    any azeotrope)."""
    T, _ = bubble_temperature(thermo, np.array([pressure]), z[None, :])
    K = thermo.k_values(T, np.array([pressure]), z[None, :], derivatives=False).K[0]
    return 0 if K[0] >= K[1] else 1


def _reflux_temperature(column: Column, curve: EquilibriumCurve, x_distillate: float) -> float | None:
    """The subcooled reflux's temperature (K) of a total condenser, None for a saturated one."""
    if column.condenser != "total" or (column.reflux_temperature is None and not column.reflux_subcooling):
        return None
    if column.reflux_temperature is not None:
        return column.reflux_temperature
    bubble = float(curve.temperature_of_x(np.array([x_distillate]))[0])
    return bubble - column.reflux_subcooling


def binary_problem(
    case: Case,
    thermo: ThermoPackage | None = None,
    *,
    reflux_ratio: float | None = None,
    reflux_factor: float | None = None,
    pressure: float | None = None,
    enthalpy_model: str | None = None,
    method: str = "binary",
) -> BinaryProblem:
    """Read a binary case for the shortcut designs (see
    :func:`~solver.shortcut.mccabe_thiele.design_binary`)."""
    if case.component_count != 2:
        raise SpecError(f"the {method} shortcut is for binaries; this case has {case.component_count} components")
    notes = check_simple_column(case, method)
    thermo = thermo or ThermoPackage.from_case(case)
    model = enthalpy_model or thermo.enthalpy_model
    P = float(np.mean(case.column.pressures)) if pressure is None else float(pressure)
    state = feed_condition(case, thermo)
    z_vector = np.asarray(case.feeds[0].composition, dtype=float)
    light_index = _light_index(thermo, P, z_vector)
    curve = EquilibriumCurve.from_thermo(thermo, P, light_index)
    light = case.component_names[light_index]
    z = float(z_vector[light_index])
    F = float(case.feeds[0].flow)

    def latent_heat(x: float) -> float:
        """Saturated vapor of composition x (at its dew point) minus saturated liquid of
        composition x (at its bubble point), J/mol, with the enthalpy model in use."""
        composition = np.zeros((1, 2))
        composition[0, light_index], composition[0, 1 - light_index] = x, 1.0 - x
        T_bubble = curve.temperature_of_x(np.array([x]))
        T_dew = curve.dew_temperature_of_y(np.array([x]))
        h_liquid = thermo.liquid_enthalpy(T_bubble, composition, model=model).molar[0]
        h_vapor = thermo.vapor_enthalpy(T_dew, composition, model=model).molar[0]
        return float(h_vapor - h_liquid)

    D, x_D, x_B, R, split_notes = _solve_split(
        case, light, F, z, state.q, case.column.condenser, latent_heat, reflux_ratio, reflux_factor
    )
    feed_enthalpy = state.enthalpy if model == "rigorous" else (1.0 - state.q) * thermo.cmo_latent_heat
    where = "mean column pressure" if pressure is None else "given"
    notes = notes + split_notes + [f"equilibrium curve at {P / 1e3:.6g} kPa ({where})"]
    return BinaryProblem(
        thermo=thermo, curve=curve, light_index=light_index, pressure=P, condenser=case.column.condenser,
        feed_flow=F, x_feed=z, q=float(state.q), feed_enthalpy=float(feed_enthalpy), distillate_flow=D,
        x_distillate=x_D, x_bottoms=x_B, reflux_ratio=R, reflux_factor=reflux_factor, latent_heat=latent_heat,
        reflux_temperature=_reflux_temperature(case.column, curve, x_D), notes=tuple(notes),
    )
