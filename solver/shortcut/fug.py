"""Multicomponent shortcut design of a case: Fenske, Underwood, Gilliland (Molokanov form),
Kirkbride.

The published methods, each in its own module on given relative volatilities, compositions, q
and flows (for textbook checks):

* :mod:`.fenske` -- Fenske (Ind. Eng. Chem. 24 (1932) 482): minimum stages at total reflux and
  the distribution of every component there;
* :mod:`.underwood` -- Underwood (Chem. Eng. Prog. 44 (1948) 603): minimum reflux with
  distributing non-keys;
* :mod:`.gilliland_kirkbride` -- Gilliland (Ind. Eng. Chem. 32 (1940) 1220) in the form of
  Molokanov et al. (Int. Chem. Eng. 12 (1972) 209), and Kirkbride (Petroleum Refiner 23(9)
  (1944) 321).

:func:`design_multicomponent` takes them from a case, in these steps: the specs (two product
specs fix the split, one reflux spec or a keyword the reflux); the keys (the two components the
product specs name, the more volatile at the feed the light key); the relative volatilities,
the geometric mean of those at the top (dew point of the distillate at the top equilibrium
stage's pressure) and at the bottom (bubble point of the bottoms at the reboiler's pressure),
iterated with the Fenske split they give; Underwood's minimum reflux; the reflux ratio;
Gilliland's stages and Kirkbride's feed stage; CMO duty estimates.

All stage counts of the correlations are equilibrium stages, a partial reboiler (and a partial
condenser) included; traystack's count adds a total condenser as stage 1. Units SI: K, Pa,
mol/s, W, J/mol.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from ..case import Case, Spec
from ..errors import SpecError
from ..spec_kinds import spec_kind
from ..thermo.flash import bubble_temperature, dew_temperature
from ..thermo.package import ThermoPackage
from .fenske import fenske_distribution, fenske_minimum_stages, fenske_split
from .gilliland_kirkbride import KIRKBRIDE_EXPONENT, gilliland_molokanov, gilliland_stages, kirkbride_ratio
from .simple_column import check_simple_column, describe_spec, feed_condition
from .underwood import UnderwoodResult, shiras_recoveries, underwood_minimum_reflux, underwood_roots

# The published methods are defined in .fenske, .underwood and .gilliland_kirkbride and stay
# importable from here.
__all__ = [
    "MulticomponentDesign",
    "design_multicomponent",
    "KIRKBRIDE_EXPONENT",
    "UnderwoodResult",
    "fenske_distribution",
    "fenske_minimum_stages",
    "gilliland_molokanov",
    "gilliland_stages",
    "kirkbride_ratio",
    "shiras_recoveries",
    "underwood_minimum_reflux",
    "underwood_roots",
]

#: Most passes of the relative volatilities with the Fenske split they give.
_VOLATILITY_PASSES = 60


@dataclass(frozen=True, eq=False)
class MulticomponentDesign:
    """A Fenske-Underwood-Gilliland-Kirkbride design. Arrays are per component in the case's
    order; flows mol/s, temperatures K, pressures Pa, duties W (heat added).

    ``relative_volatility`` (the geometric mean of ``..._top`` and ``..._bottom``) is relative
    to the heavy key. Product flows are Fenske's distribution at total reflux;
    ``minimum_reflux_distillate_flows`` Underwood's at minimum reflux. ``minimum_equilibrium_stages``
    and ``equilibrium_stages`` are the correlations' counts (reboiler included); ``stages`` and
    ``feed_stage`` count and number as traystack does (a total condenser is stage 1).
    ``condenser_duty`` and ``reboiler_duty`` are CMO estimates: rectifying vapor (or, for a
    partial condenser, the reflux) times the distillate's latent heat, stripping vapor times the
    bottoms'."""

    components: tuple[str, ...]
    light_key: str
    heavy_key: str
    condenser: str
    top_pressure: float
    bottom_pressure: float
    feed_flow: float
    feed_composition: np.ndarray
    q: float
    distillate_flows: np.ndarray
    bottoms_flows: np.ndarray
    distillate_flow: float
    bottoms_flow: float
    x_distillate: np.ndarray
    x_bottoms: np.ndarray
    top_temperature: float
    bottom_temperature: float
    relative_volatility_top: np.ndarray
    relative_volatility_bottom: np.ndarray
    relative_volatility: np.ndarray
    minimum_equilibrium_stages: float
    minimum_stages: float
    underwood_roots: tuple[float, ...]
    distributing_components: tuple[str, ...]
    minimum_reflux: float
    minimum_vapor_flow: float
    minimum_reflux_distillate_flows: np.ndarray
    reflux_ratio: float
    gilliland_x: float
    gilliland_y: float
    equilibrium_stages: float
    stages: int
    rectifying_stages: float
    stripping_stages: float
    feed_stage: int
    condenser_duty: float
    reboiler_duty: float
    notes: tuple[str, ...] = ()

    @property
    def minimum_reflux_ratio(self) -> float:
        return self.minimum_reflux


def _choose_keys(
    case: Case, split: Sequence[Spec], alpha: np.ndarray, light_key: str | None, heavy_key: str | None
) -> tuple[int, int]:
    names = list(case.component_names)

    def index(name: str, role: str) -> int:
        lowered = [n.lower() for n in names]
        if name.lower() not in lowered:
            raise SpecError(f"{role} {name!r} is not a component of this case ({', '.join(names)})")
        return lowered.index(name.lower())

    if light_key is not None and heavy_key is not None:
        keys = [index(light_key, "light key"), index(heavy_key, "heavy key")]
    else:
        named: list[int] = []
        for spec in split:
            if spec.component is not None and names.index(spec.component) not in named:
                named.append(names.index(spec.component))
        if light_key is not None or heavy_key is not None:
            if light_key is not None:
                given = index(light_key, "light key")
            else:
                given = index(heavy_key, "heavy key")
            others = [i for i in named if i != given]
            if len(others) != 1:
                raise SpecError("give both keys: the specs do not name exactly one other component")
            keys = [given, others[0]] if light_key is not None else [others[0], given]
        elif len(named) == 2:
            keys = sorted(named, key=lambda i: -alpha[i])
        elif len(names) == 2:
            keys = sorted(range(2), key=lambda i: -alpha[i])
        else:
            raise SpecError(
                "the multicomponent shortcut takes its light and heavy keys from the two components named in the "
                f"product specs; these specs name {len(named)} ({', '.join(names[i] for i in named) or 'none'}): "
                "pass light_key= and heavy_key="
            )
    light, heavy = keys
    if light == heavy:
        raise SpecError(f"the light and heavy key are the same component ({names[light]})")
    if not alpha[light] > alpha[heavy]:
        raise SpecError(
            f"the light key {names[light]} is not more volatile than the heavy key {names[heavy]} at the feed "
            f"(K ratio {alpha[light] / alpha[heavy]:.4g})"
        )
    return light, heavy


def _sort_specs(specs: Sequence[Spec], override: bool) -> tuple[list[Spec], list[Spec], list[str]]:
    """(product specs, reflux specs, notes): two product specs fix the split, one reflux spec
    the reflux unless a reflux keyword replaces it (``override``). Raises :class:`SpecError`
    for any other count."""
    notes = []
    # what each spec fixes is its registry entry's role
    split_specs = [spec for spec in specs if spec_kind(spec.kind).role == "split"]
    energy_specs = [spec for spec in specs if spec_kind(spec.kind).role == "energy"]
    ignored = [spec for spec in specs if spec_kind(spec.kind).role == "other"]
    if ignored:
        notes.append("not used by the shortcut: " + "; ".join(describe_spec(spec) for spec in ignored))
    if len(split_specs) != 2:
        raise SpecError(
            "the multicomponent shortcut needs two product specifications (mole fractions, recoveries or product "
            f"rates) to fix the split; the case gives {len(split_specs)}: "
            + ("; ".join(describe_spec(spec) for spec in split_specs) or "none")
        )
    if override and energy_specs:
        notes.append("the case's " + "; ".join(describe_spec(spec) for spec in energy_specs) + " replaced by the reflux given")
        energy_specs = []
    if not override and len(energy_specs) != 1:
        raise SpecError(
            "the multicomponent shortcut needs one reflux specification (reflux_ratio, boilup_ratio or a duty), or "
            f"reflux_ratio=/reflux_factor= here; the case gives {len(energy_specs)}: "
            + ("; ".join(describe_spec(spec) for spec in energy_specs) or "none")
        )
    return split_specs, energy_specs, notes


def _k_values(thermo: ThermoPackage, T, P, x) -> np.ndarray:
    """K-values of one phase pair at temperature ``T`` K, pressure ``P`` Pa, liquid ``x``."""
    return thermo.k_values(np.atleast_1d(T), np.atleast_1d(P), np.atleast_2d(x), derivatives=False).K[0]


@dataclass(frozen=True)
class _ColumnEnds:
    """The relative volatilities (to the heavy key) at the top (dew point of the distillate),
    the bottom (bubble point of the bottoms) and their geometric mean, the two temperatures (K),
    and the keys' ``ln(d/b)`` of the last Fenske split (the start of the next one)."""

    relative_volatility: np.ndarray
    relative_volatility_top: np.ndarray
    relative_volatility_bottom: np.ndarray
    top_temperature: float
    bottom_temperature: float
    key_ln_ratios: np.ndarray


def _column_ends(
    thermo: ThermoPackage, specs: Sequence[Spec], names: Sequence[str], feed_flows: np.ndarray, feed_alpha: np.ndarray,
    light: int, heavy: int, top_pressure: float, bottom_pressure: float, notes: list[str],
) -> _ColumnEnds:
    """Relative volatilities at the column's ends, iterated with the Fenske split they give
    (from the feed's, ``feed_alpha``), until they move by less than 1e-11 in ln; a note in
    ``notes`` if they still move after the last pass."""
    alpha = feed_alpha
    start = np.array([np.log(99.0), -np.log(99.0)])
    for _ in range(_VOLATILITY_PASSES):
        start, _, d, b = fenske_split(specs, names, feed_flows, alpha, light, heavy, start)
        x_D, x_B = d / d.sum(), b / b.sum()
        T_top, liquid_top = dew_temperature(thermo, np.array([top_pressure]), x_D[None, :])
        T_bottom, _ = bubble_temperature(thermo, np.array([bottom_pressure]), x_B[None, :])
        K_top = _k_values(thermo, T_top, top_pressure, liquid_top[0])
        K_bottom = _k_values(thermo, T_bottom, bottom_pressure, x_B)
        alpha_top, alpha_bottom = K_top / K_top[heavy], K_bottom / K_bottom[heavy]
        new_alpha = np.sqrt(alpha_top * alpha_bottom)
        moved = float(np.max(np.abs(np.log(new_alpha) - np.log(alpha))))
        alpha = new_alpha
        if moved < 1e-11:
            break
    else:
        notes.append(f"relative volatilities still moving by {moved:.2g} (ln) after {_VOLATILITY_PASSES} split iterations")
    return _ColumnEnds(alpha, alpha_top, alpha_bottom, float(T_top[0]), float(T_bottom[0]), start)


def _latent_heat(thermo: ThermoPackage, x: np.ndarray, pressure: float) -> float:
    """Saturated vapor of composition ``x`` (at its dew point) minus saturated liquid of
    composition ``x`` (at its bubble point) at ``pressure`` Pa, J/mol."""
    T_b, _ = bubble_temperature(thermo, np.array([pressure]), x[None, :])
    T_d, _ = dew_temperature(thermo, np.array([pressure]), x[None, :])
    h_v = thermo.vapor_enthalpy(T_d, x[None, :]).molar[0]
    h_l = thermo.liquid_enthalpy(T_b, x[None, :]).molar[0]
    return float(h_v - h_l)


def _reflux_ratio(
    reflux_ratio: float | None, reflux_factor: float | None, energy_specs: Sequence[Spec], minimum_reflux: float, *,
    q: float, feed_flow: float, distillate_flow: float, bottoms_flow: float, latent_top: float, latent_bottom: float,
    condenser: str, notes: list[str],
) -> float:
    """The design reflux ratio: ``reflux_ratio`` given, or ``reflux_factor`` x the minimum, or
    from the case's reflux spec (a boilup ratio through the feed's q, a duty through the
    product's latent heat, by the CMO balances); a note in ``notes`` says which."""
    F, D, B = feed_flow, distillate_flow, bottoms_flow
    if reflux_ratio is not None:
        R = float(reflux_ratio)
    elif reflux_factor is not None:
        R = float(reflux_factor) * minimum_reflux
        notes.append(f"reflux ratio = {reflux_factor:.6g} x minimum reflux ratio {minimum_reflux:.6g}")
    else:
        spec = energy_specs[0]
        if spec.kind == "reflux_ratio":
            R = spec.value
        else:
            if spec.kind == "boilup_ratio":
                V = spec.value * B + (1.0 - q) * F
            elif spec.kind == "condenser_duty":
                V = abs(spec.value) / latent_top + (D if condenser == "partial" else 0.0)
            else:
                V = spec.value / latent_bottom + (1.0 - q) * F
            R = V / D - 1.0
            notes.append(f"reflux ratio {R:.6g} from {describe_spec(spec)} by the CMO balances")
    if not R > 0.0:
        raise SpecError(f"the reflux specification gives a reflux ratio of {R:.6g}; it must be positive")
    return R


def design_multicomponent(
    case: Case,
    thermo: ThermoPackage | None = None,
    *,
    light_key: str | None = None,
    heavy_key: str | None = None,
    reflux_ratio: float | None = None,
    reflux_factor: float | None = None,
) -> MulticomponentDesign:
    """Fenske-Underwood-Gilliland-Kirkbride design of a case.

    Two product specs (mole fractions, recoveries or product rates of any components) fix the
    split; the keys are the two components they name (the more volatile at the feed is the light
    key) unless ``light_key``/``heavy_key`` are given. The reflux comes from ``reflux_ratio``
    (here or in the case), a boilup ratio (CMO balances with the feed's q), a duty (through the
    products' latent heats), or ``reflux_factor`` x the minimum reflux ratio."""
    notes = check_simple_column(case, "multicomponent")
    thermo = thermo or ThermoPackage.from_case(case)
    names = list(case.component_names)
    column = case.column
    F = float(case.feeds[0].flow)
    z = np.asarray(case.feeds[0].composition, dtype=float)
    feed_flows = F * z
    q = float(feed_condition(case, thermo).q)
    top_pressure = float(column.pressures[1] if column.condenser == "total" and column.stages > 1 else column.pressures[0])
    bottom_pressure = float(column.pressures[-1])
    mean_pressure = float(np.mean(column.pressures))
    split_specs, energy_specs, spec_notes = _sort_specs(case.specs, reflux_ratio is not None or reflux_factor is not None)
    notes += spec_notes

    bubble_feed, _ = bubble_temperature(thermo, np.array([mean_pressure]), z[None, :])
    K_feed = _k_values(thermo, bubble_feed, mean_pressure, z)
    light, heavy = _choose_keys(case, split_specs, K_feed, light_key, heavy_key)
    if z[light] <= 0.0 or z[heavy] <= 0.0:
        raise SpecError("both keys must be in the feed")
    ends = _column_ends(
        thermo, split_specs, names, feed_flows, K_feed / K_feed[heavy], light, heavy, top_pressure, bottom_pressure, notes
    )
    alpha = ends.relative_volatility
    _, N_min, d, b = fenske_split(split_specs, names, feed_flows, alpha, light, heavy, ends.key_ln_ratios)
    D, B = float(d.sum()), float(b.sum())
    x_D, x_B = d / D, b / B
    latent_top = _latent_heat(thermo, x_D, top_pressure)
    latent_bottom = _latent_heat(thermo, x_B, bottom_pressure)

    underwood = underwood_minimum_reflux(alpha, feed_flows, q, light, heavy, float(d[light]), float(d[heavy]))
    R_min = underwood.minimum_reflux
    R = _reflux_ratio(
        reflux_ratio, reflux_factor, energy_specs, R_min, q=q, feed_flow=F, distillate_flow=D, bottoms_flow=B,
        latent_top=latent_top, latent_bottom=latent_bottom, condenser=column.condenser, notes=notes,
    )
    N = gilliland_stages(N_min, R_min, R)
    X = (R - R_min) / (R + 1.0)
    Y = float(gilliland_molokanov(X))
    ratio = kirkbride_ratio(B / D, z[heavy], z[light], x_B[light], x_D[heavy])
    N_R = N * ratio / (1.0 + ratio)
    N_S = N - N_R
    offset = 1 if column.condenser == "total" else 0
    stages = int(np.ceil(N - 1e-9)) + offset
    feed_stage = int(min(max(int(round(N_R)) + 1 + offset, 1 + offset), stages))
    V = (R + 1.0) * D
    V_strip = V - (1.0 - q) * F
    condenser_duty = -(V if column.condenser == "total" else R * D) * latent_top
    reboiler_duty = V_strip * latent_bottom
    notes.append(
        f"alphas: geometric mean of the top ({top_pressure / 1e3:.6g} kPa, dew point of the distillate) and the "
        f"bottom ({bottom_pressure / 1e3:.6g} kPa, bubble point of the bottoms)"
    )
    return MulticomponentDesign(
        components=tuple(names),
        light_key=names[light],
        heavy_key=names[heavy],
        condenser=column.condenser,
        top_pressure=top_pressure,
        bottom_pressure=bottom_pressure,
        feed_flow=F,
        feed_composition=z,
        q=q,
        distillate_flows=d,
        bottoms_flows=b,
        distillate_flow=D,
        bottoms_flow=B,
        x_distillate=x_D,
        x_bottoms=x_B,
        top_temperature=ends.top_temperature,
        bottom_temperature=ends.bottom_temperature,
        relative_volatility_top=ends.relative_volatility_top,
        relative_volatility_bottom=ends.relative_volatility_bottom,
        relative_volatility=alpha,
        minimum_equilibrium_stages=float(N_min),
        minimum_stages=float(N_min) + offset,
        underwood_roots=underwood.roots,
        distributing_components=tuple(names[i] for i in underwood.distributing),
        minimum_reflux=float(R_min),
        minimum_vapor_flow=underwood.minimum_vapor_flow,
        minimum_reflux_distillate_flows=underwood.distillate_flows,
        reflux_ratio=float(R),
        gilliland_x=float(X),
        gilliland_y=Y,
        equilibrium_stages=float(N),
        stages=stages,
        rectifying_stages=float(N_R),
        stripping_stages=float(N_S),
        feed_stage=feed_stage,
        condenser_duty=float(condenser_duty),
        reboiler_duty=float(reboiler_duty),
        notes=tuple(notes),
    )
