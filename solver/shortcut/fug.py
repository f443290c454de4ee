"""Multicomponent shortcut design: Fenske, Underwood, Gilliland (Molokanov form), Kirkbride.

* **Fenske** (Ind. Eng. Chem. 24 (1932) 482): minimum equilibrium stages at total reflux,
  ``N_min = ln[(d/b)_LK / (d/b)_HK] / ln alpha_LK,HK``, and the distribution of every other
  component at total reflux, ``(d/b)_i = (d/b)_HK alpha_i^N_min`` (alpha relative to the heavy
  key). The relative volatilities are the geometric mean of those at the top (dew point of the
  distillate at the top equilibrium stage's pressure) and at the bottom (bubble point of the
  bottoms at the reboiler's pressure), iterated with the product split they give.
* **Underwood** (Chem. Eng. Prog. 44 (1948) 603): the roots ``theta`` of
  ``sum_i alpha_i z_i / (alpha_i - theta) = 1 - q`` lying between the relative volatilities of
  adjacent *distributing* components, and for each root
  ``sum_i alpha_i d_i / (alpha_i - theta) = V_min`` (the rectifying vapor at minimum reflux).
  With m distributing components (the keys, every component between them, and non-keys outside
  them that distribute) there are m - 1 roots and m - 1 unknowns -- ``V_min`` and the distillate
  flows of the m - 2 distributing non-keys -- solved together as one linear system. Which
  non-keys distribute is first estimated by the criterion of Shiras, Hanson & Gibson (Ind.
  Eng. Chem. 42 (1950) 871; from memory: a non-key distributes when its distillate recovery,
  interpolated linearly in alpha between the keys' recoveries, lies between 0 and 1), then
  corrected if the solution puts a non-key's distillate flow outside [0, F_i].
  ``R_min = V_min / D - 1`` with D the distillate at minimum reflux.
* **Gilliland** correlation in the form of Molokanov, Korablina, Mazurina & Nikiforov (Int.
  Chem. Eng. 12 (1972) 209): ``Y = 1 - exp[(1 + 54.4 X)/(11 + 117.2 X) (X - 1)/sqrt(X)]`` with
  ``X = (R - R_min)/(R + 1)`` and ``Y = (N - N_min)/(N + 1)``.
* **Kirkbride** (Petroleum Refiner 23(9) (1944) 321) feed location:
  ``N_R / N_S = [(B/D) (z_HK / z_LK) (x_LK,B / x_HK,D)^2]^0.206``, N_R equilibrium stages above
  the feed stage and N_S from the feed stage down (reboiler included).

All stage counts of the correlations are equilibrium stages, a partial reboiler (and a partial
condenser) included; traystack's count adds a total condenser as stage 1.

The functions taking relative volatilities, compositions, q and flows are the published methods
themselves (for textbook checks with given alphas); :func:`design_multicomponent` takes the
alphas, q and products from a case. Units SI: K, Pa, mol/s, W, J/mol.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np
from scipy.optimize import brentq, root
from scipy.special import expit, log_expit, logit, logsumexp

from ..case import Case, Spec
from ..errors import SpecError
from ..thermo.flash import bubble_temperature, dew_temperature
from ..thermo.package import ThermoPackage
from .simple_column import check_simple_column, describe_spec, feed_condition

__all__ = [
    "KIRKBRIDE_EXPONENT",
    "MulticomponentDesign",
    "UnderwoodResult",
    "design_multicomponent",
    "fenske_distribution",
    "fenske_minimum_stages",
    "gilliland_molokanov",
    "gilliland_stages",
    "kirkbride_ratio",
    "shiras_recoveries",
    "underwood_minimum_reflux",
    "underwood_roots",
]

#: Exponent of Kirkbride's (1944) feed-location equation.
KIRKBRIDE_EXPONENT = 0.206

_ROOT_GAP = 1e-12  # relative distance kept from the poles alpha_i when bracketing a root


# =======================================================================================
# The published methods, on given relative volatilities
# =======================================================================================


def fenske_minimum_stages(relative_volatility: float, light_key_ratio: float, heavy_key_ratio: float) -> float:
    """Fenske (1932): minimum equilibrium stages ``ln[(d/b)_LK / (d/b)_HK] / ln alpha_LK,HK``
    from the keys' distillate-to-bottoms ratios and their relative volatility."""
    if not relative_volatility > 1.0:
        raise SpecError(f"the light key must be more volatile than the heavy key (alpha_LK,HK = {relative_volatility:.6g})")
    return float(np.log(light_key_ratio / heavy_key_ratio) / np.log(relative_volatility))


def fenske_distribution(
    relative_volatility, feed_flows, minimum_stages: float, heavy_key_ratio: float
) -> tuple[np.ndarray, np.ndarray]:
    """Distillate and bottoms component flows at total reflux, ``(d/b)_i = (d/b)_HK
    alpha_i^N_min`` with ``relative_volatility`` relative to the heavy key (Fenske 1932)."""
    alpha = np.asarray(relative_volatility, dtype=float)
    feed_flows = np.asarray(feed_flows, dtype=float)
    ln_ratio = np.log(heavy_key_ratio) + minimum_stages * np.log(alpha)
    return feed_flows * expit(ln_ratio), feed_flows * expit(-ln_ratio)


def _feed_function(alpha: np.ndarray, z: np.ndarray, theta):
    return np.sum(alpha * z / (alpha - theta))


def underwood_roots(
    relative_volatility, feed_composition, q: float, *, low: float | None = None, high: float | None = None
) -> np.ndarray:
    """Roots of Underwood's first equation ``sum_i alpha_i z_i / (alpha_i - theta) = 1 - q``
    lying between adjacent relative volatilities of components present in the feed (one in
    each interval: the left side rises from -inf to +inf between poles), restricted to
    ``(low, high)`` if given; in descending order."""
    alpha = np.asarray(relative_volatility, dtype=float)
    z = np.asarray(feed_composition, dtype=float)
    present = z > 0.0
    poles = np.unique(alpha[present])[::-1]
    roots = []
    target = 1.0 - q
    for upper, lower in zip(poles[:-1], poles[1:]):
        if high is not None and lower >= high:
            continue
        if low is not None and upper <= low:
            continue
        gap = _ROOT_GAP * (upper - lower)

        def residual(theta: float) -> float:
            return float(_feed_function(alpha[present], z[present], theta) - target)

        roots.append(brentq(residual, lower + gap, upper - gap, xtol=1e-15 * max(1.0, upper), rtol=1e-15, maxiter=500))
    return np.array(roots)


def shiras_recoveries(
    relative_volatility, light_key: int, heavy_key: int, light_key_recovery: float, heavy_key_recovery: float
) -> np.ndarray:
    """Distillate recoveries at minimum reflux interpolated linearly in alpha between the keys'
    (Shiras, Hanson & Gibson 1950): a component whose value lies outside (0, 1) does not
    distribute."""
    alpha = np.asarray(relative_volatility, dtype=float)
    a_l, a_h = alpha[light_key], alpha[heavy_key]
    return (alpha - a_h) / (a_l - a_h) * light_key_recovery + (a_l - alpha) / (a_l - a_h) * heavy_key_recovery


@dataclass(frozen=True)
class UnderwoodResult:
    """Underwood's minimum reflux: ``minimum_reflux`` (L/D), ``minimum_vapor_flow`` (rectifying
    vapor at minimum reflux, mol/s), ``distillate_flows`` (c,) at minimum reflux (keys as
    specified, distributing non-keys solved, others all in one product), ``distillate_flow``,
    the roots used (descending) and the indices of the distributing components."""

    minimum_reflux: float
    minimum_vapor_flow: float
    distillate_flows: np.ndarray
    distillate_flow: float
    roots: tuple[float, ...]
    distributing: tuple[int, ...]


def underwood_minimum_reflux(
    relative_volatility,
    feed_flows,
    q: float,
    light_key: int,
    heavy_key: int,
    light_key_distillate: float,
    heavy_key_distillate: float,
) -> UnderwoodResult:
    """Underwood (1948) minimum reflux with every root between the relative volatilities of
    adjacent distributing components and the distillate flows of distributing non-keys solved
    with ``V_min`` (see the module docstring). ``feed_flows`` mol/s; the keys' distillate flows
    are the specified ones."""
    alpha = np.asarray(relative_volatility, dtype=float)
    feed_flows = np.asarray(feed_flows, dtype=float)
    F = float(feed_flows.sum())
    z = feed_flows / F
    if not alpha[light_key] > alpha[heavy_key]:
        raise SpecError("the light key must be more volatile than the heavy key")
    present = feed_flows > 0.0
    recovery = shiras_recoveries(
        alpha, light_key, heavy_key, light_key_distillate / feed_flows[light_key], heavy_key_distillate / feed_flows[heavy_key]
    )
    is_key = np.isin(np.arange(alpha.size), (light_key, heavy_key))
    distributing = present & (((recovery > 0.0) & (recovery < 1.0)) | is_key)
    fixed = np.where(alpha > alpha[light_key], feed_flows, 0.0)  # non-distributing: lighter all up, heavier all down
    fixed[light_key], fixed[heavy_key] = light_key_distillate, heavy_key_distillate
    roots_all = underwood_roots(alpha, z, q)
    for _ in range(alpha.size + 1):
        members = np.nonzero(distributing)[0]
        members = members[np.argsort(-alpha[members])]
        unknown = [i for i in members if i not in (light_key, heavy_key)]
        top, bottom = alpha[members[0]], alpha[members[-1]]
        roots = roots_all[(roots_all < top) & (roots_all > bottom)]
        if roots.size != members.size - 1:
            raise SpecError(
                f"Underwood: expected {members.size - 1} roots between the distributing volatilities, found {roots.size}"
            )
        d = np.where(distributing, 0.0, fixed)
        d[light_key], d[heavy_key] = light_key_distillate, heavy_key_distillate
        # rows: sum_{unknown} alpha_i/(alpha_i - theta) d_i - V = -sum_{known} alpha_i d_i/(alpha_i - theta)
        matrix = np.empty((roots.size, len(unknown) + 1))
        for j, theta in enumerate(roots):
            matrix[j, :-1] = alpha[unknown] / (alpha[unknown] - theta)
            matrix[j, -1] = -1.0
        known = d.copy()
        known[unknown] = 0.0
        rhs = -np.array([np.sum(alpha[present] * known[present] / (alpha[present] - theta)) for theta in roots])
        solution = np.linalg.solve(matrix, rhs)
        V = float(solution[-1])
        d[unknown] = solution[:-1]
        over = [i for i in unknown if d[i] > feed_flows[i]]
        under = [i for i in unknown if d[i] < 0.0]
        if not over and not under:
            break
        # the outermost offender leaves the distributing set, all in one product
        if over:
            worst = max(over, key=lambda i: alpha[i])
            fixed[worst] = feed_flows[worst]
        else:
            worst = min(under, key=lambda i: alpha[i])
            fixed[worst] = 0.0
        distributing[worst] = False
    D = float(d.sum())
    return UnderwoodResult(V / D - 1.0, V, d, D, tuple(float(r) for r in roots), tuple(int(i) for i in members))


def gilliland_molokanov(X):
    """Gilliland's correlation as fitted by Molokanov et al. (1972):
    ``Y = 1 - exp[(1 + 54.4 X)/(11 + 117.2 X) (X - 1)/sqrt(X)]``, X = (R - R_min)/(R + 1) in
    (0, 1], Y = (N - N_min)/(N + 1)."""
    X = np.asarray(X, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        Y = 1.0 - np.exp((1.0 + 54.4 * X) / (11.0 + 117.2 * X) * (X - 1.0) / np.sqrt(X))
    return np.where(X <= 0.0, 1.0, Y)


def gilliland_stages(minimum_stages: float, minimum_reflux: float, reflux_ratio: float) -> float:
    """Equilibrium stages at ``reflux_ratio`` from the Gilliland-Molokanov correlation,
    ``N = (N_min + Y) / (1 - Y)``."""
    if not reflux_ratio > minimum_reflux:
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} is not above the minimum reflux ratio {minimum_reflux:.6g}: "
            "no number of stages meets the specifications"
        )
    X = (reflux_ratio - minimum_reflux) / (reflux_ratio + 1.0)
    Y = float(gilliland_molokanov(X))
    return (minimum_stages + Y) / (1.0 - Y)


def kirkbride_ratio(
    bottoms_to_distillate: float,
    z_heavy_key: float,
    z_light_key: float,
    x_light_key_bottoms: float,
    x_heavy_key_distillate: float,
) -> float:
    """Kirkbride (1944): ``N_R / N_S = [(B/D)(z_HK/z_LK)(x_LK,B/x_HK,D)^2]^0.206``."""
    return float(
        (bottoms_to_distillate * (z_heavy_key / z_light_key) * (x_light_key_bottoms / x_heavy_key_distillate) ** 2)
        ** KIRKBRIDE_EXPONENT
    )


# =======================================================================================
# From a case
# =======================================================================================


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


_SPLIT_KINDS = ("mole_fraction", "recovery", "distillate_rate", "bottoms_rate")
_ENERGY_KINDS = ("reflux_ratio", "boilup_ratio", "condenser_duty", "reboiler_duty")


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


def _split_residuals(u, specs, names, feed_flows, ln_alpha_h, light, heavy):
    """Residuals of the two product specs for key ratios u = ln(d/b) of (LK, HK), with every
    component distributed by Fenske."""
    u_l, u_h = u
    n_min = (u_l - u_h) / (ln_alpha_h[light] - ln_alpha_h[heavy])
    s = u_h + n_min * (ln_alpha_h - ln_alpha_h[heavy])
    with np.errstate(divide="ignore"):
        ln_f = np.log(feed_flows)
    ln_d = ln_f + log_expit(s)
    ln_b = ln_f + log_expit(-s)
    ln_D, ln_B = logsumexp(ln_d), logsumexp(ln_b)
    residuals = []
    for spec in specs:
        if spec.kind in ("mole_fraction", "recovery"):
            i = names.index(spec.component)
            target = logit(spec.value)
            mine, theirs = (ln_d, ln_b) if spec.product == "distillate" else (ln_b, ln_d)
            if spec.kind == "mole_fraction":
                rest = logsumexp(np.delete(mine, i))
                residuals.append(mine[i] - rest - target)
            else:
                residuals.append(mine[i] - theirs[i] - target)
        elif spec.kind == "distillate_rate":
            residuals.append(ln_D - np.log(spec.value))
        else:  # bottoms_rate
            residuals.append(ln_B - np.log(spec.value))
    return np.array(residuals), n_min, s


def _fenske_split(specs, names, feed_flows, alpha_h, light, heavy, start):
    ln_alpha_h = np.log(alpha_h)
    solution = root(lambda u: _split_residuals(u, specs, names, feed_flows, ln_alpha_h, light, heavy)[0], start, method="hybr")
    residuals, n_min, s = _split_residuals(solution.x, specs, names, feed_flows, ln_alpha_h, light, heavy)
    if not np.all(np.isfinite(residuals)) or np.max(np.abs(residuals)) > 1e-9:
        raise SpecError(
            "the product specifications cannot be met by a Fenske split of this feed: "
            + "; ".join(describe_spec(s_) for s_ in specs)
        )
    if not n_min > 0.0:
        raise SpecError(
            "the product specifications ask for no separation of the keys (Fenske minimum stages "
            f"{n_min:.4g}): " + "; ".join(describe_spec(s_) for s_ in specs)
        )
    return solution.x, n_min, feed_flows * expit(s), feed_flows * expit(-s)


def _ratios(thermo, T, P, x) -> np.ndarray:
    return thermo.k_values(np.atleast_1d(T), np.atleast_1d(P), np.atleast_2d(x), derivatives=False).K[0]


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
    feed = case.feeds[0]
    F = float(feed.flow)
    z = np.asarray(feed.composition, dtype=float)
    feed_flows = F * z
    state = feed_condition(case, thermo)
    q = float(state.q)
    top_pressure = float(column.pressures[1] if column.condenser == "total" and column.stages > 1 else column.pressures[0])
    bottom_pressure = float(column.pressures[-1])
    mean_pressure = float(np.mean(column.pressures))
    split_specs = [s for s in case.specs if s.kind in _SPLIT_KINDS]
    energy_specs = [s for s in case.specs if s.kind in _ENERGY_KINDS]
    ignored = [s for s in case.specs if s.kind not in _SPLIT_KINDS + _ENERGY_KINDS]
    if ignored:
        notes.append("not used by the shortcut: " + "; ".join(describe_spec(s) for s in ignored))
    if len(split_specs) != 2:
        raise SpecError(
            "the multicomponent shortcut needs two product specifications (mole fractions, recoveries or product "
            f"rates) to fix the split; the case gives {len(split_specs)}: "
            + ("; ".join(describe_spec(s) for s in split_specs) or "none")
        )
    override = reflux_ratio is not None or reflux_factor is not None
    if override and energy_specs:
        notes.append("the case's " + "; ".join(describe_spec(s) for s in energy_specs) + " replaced by the reflux given")
        energy_specs = []
    if not override and len(energy_specs) != 1:
        raise SpecError(
            "the multicomponent shortcut needs one reflux specification (reflux_ratio, boilup_ratio or a duty), or "
            f"reflux_ratio=/reflux_factor= here; the case gives {len(energy_specs)}: "
            + ("; ".join(describe_spec(s) for s in energy_specs) or "none")
        )

    bubble_feed, _ = bubble_temperature(thermo, np.array([mean_pressure]), z[None, :])
    K_feed = _ratios(thermo, bubble_feed, mean_pressure, z)
    light, heavy = _choose_keys(case, split_specs, K_feed, light_key, heavy_key)
    if z[light] <= 0.0 or z[heavy] <= 0.0:
        raise SpecError("both keys must be in the feed")

    alpha = K_feed / K_feed[heavy]
    start = np.array([np.log(99.0), -np.log(99.0)])
    for _ in range(60):
        u, n_min, d, b = _fenske_split(split_specs, names, feed_flows, alpha, light, heavy, start)
        start = u
        x_D, x_B = d / d.sum(), b / b.sum()
        T_top, liquid_top = dew_temperature(thermo, np.array([top_pressure]), x_D[None, :])
        T_bottom, _ = bubble_temperature(thermo, np.array([bottom_pressure]), x_B[None, :])
        K_top = _ratios(thermo, T_top, top_pressure, liquid_top[0])
        K_bottom = _ratios(thermo, T_bottom, bottom_pressure, x_B)
        alpha_top, alpha_bottom = K_top / K_top[heavy], K_bottom / K_bottom[heavy]
        new_alpha = np.sqrt(alpha_top * alpha_bottom)
        moved = float(np.max(np.abs(np.log(new_alpha) - np.log(alpha))))
        alpha = new_alpha
        if moved < 1e-11:
            break
    else:
        notes.append(f"relative volatilities still moving by {moved:.2g} (ln) after 60 split iterations")
    u, n_min, d, b = _fenske_split(split_specs, names, feed_flows, alpha, light, heavy, start)
    D, B = float(d.sum()), float(b.sum())
    x_D, x_B = d / D, b / B

    def latent_heat(x: np.ndarray, pressure: float) -> float:
        T_b, _ = bubble_temperature(thermo, np.array([pressure]), x[None, :])
        T_d, _ = dew_temperature(thermo, np.array([pressure]), x[None, :])
        h_v = thermo.vapor_enthalpy(T_d, x[None, :]).molar[0]
        h_l = thermo.liquid_enthalpy(T_b, x[None, :]).molar[0]
        return float(h_v - h_l)

    latent_top = latent_heat(x_D, top_pressure)
    latent_bottom = latent_heat(x_B, bottom_pressure)

    underwood = underwood_minimum_reflux(alpha, feed_flows, q, light, heavy, float(d[light]), float(d[heavy]))
    R_min = underwood.minimum_reflux
    if reflux_ratio is not None:
        R = float(reflux_ratio)
    elif reflux_factor is not None:
        R = float(reflux_factor) * R_min
        notes.append(f"reflux ratio = {reflux_factor:.6g} x minimum reflux ratio {R_min:.6g}")
    else:
        spec = energy_specs[0]
        if spec.kind == "reflux_ratio":
            R = spec.value
        else:
            if spec.kind == "boilup_ratio":
                V = spec.value * B + (1.0 - q) * F
            elif spec.kind == "condenser_duty":
                V = abs(spec.value) / latent_top + (D if column.condenser == "partial" else 0.0)
            else:
                V = spec.value / latent_bottom + (1.0 - q) * F
            R = V / D - 1.0
            notes.append(f"reflux ratio {R:.6g} from {describe_spec(spec)} by the CMO balances")
    if not R > 0.0:
        raise SpecError(f"the reflux specification gives a reflux ratio of {R:.6g}; it must be positive")
    N = gilliland_stages(n_min, R_min, R)
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
        top_temperature=float(T_top[0]),
        bottom_temperature=float(T_bottom[0]),
        relative_volatility_top=alpha_top,
        relative_volatility_bottom=alpha_bottom,
        relative_volatility=alpha,
        minimum_equilibrium_stages=float(n_min),
        minimum_stages=float(n_min) + offset,
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
