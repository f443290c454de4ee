"""From stages to hardware: the diameter of each section from the rigorous traffic, beside the
diameter the CMO traffic of the shortcut design would have given, the fraction of flood of
every stage, the pressure drop, and real trays or packed height.

:func:`size_column` takes a converged rigorous solution, its case (with the ``[sizing]`` table,
or the defaults of :class:`~solver.case.sizing_table.SizingOptions`) and the thermo package. For each
traffic (rigorous; CMO where the shortcut applies, :mod:`.traffic`) every tray or packed stage
gets the column area it needs at the design fraction of flood (:mod:`.trays`, :mod:`.packing`);
a section's diameter is the largest its stages need, set by its *controlling stage*. The
column is then rated: the rigorous traffic in the column built to the rigorous diameters (or to
the ``diameter`` the case gives), and in the column built to the CMO diameters -- what would
happen had the CMO traffic sized it. Units are SI.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import Any, Mapping

import numpy as np

from ..case import Case
from ..audit.flags import Flag
from ..case.sizing_table import SizingOptions
from ..errors import SpecError
from ..results import Result
from ..thermo.package import ThermoPackage
from .efficiency import OverallEfficiency, real_trays
from .keys import column_efficiency
from .liquids import PureLiquids
from .mixtures import StageHydraulicProperties, stage_properties
from .packing import ROBBINS_LIQUID_LIMIT, flood_area, hetp_rule_of_thumb, robbins_liquid_load, robbins_pressure_drop
from .traffic import Section, Traffic, cmo_traffic, rigorous_traffic, sections_of
from .trays import TrayLoads, column_area, rate_trays

__all__ = ["BasisSizing", "ColumnSizing", "Rating", "SectionSizing", "attach_sizing", "size_column", "sizing_inputs"]

#: Robbins' correlation is not meant for pressures above this (Pa; Perry's 8th ed., sec. 14).
ROBBINS_PRESSURE_LIMIT = 3e5
#: Weir loading above which a second liquid pass is usually considered (m3/(h m); common
#: practice, Kister 1992 ch. 6, from memory).
WEIR_LOADING_LIMIT = 90.0


@dataclass(frozen=True)
class BasisSizing:
    """One traffic sized: per tray stage its mass flows (kg/s) and the column area (m2) it
    needs at the design fraction of flood; per section the diameter (m, the largest need) and
    the controlling stage."""

    traffic: Traffic
    vapor_mass_flow: np.ndarray
    liquid_mass_flow: np.ndarray
    needed_area: np.ndarray
    section_diameters: tuple[float, ...]
    controlling_stages: tuple[int, ...]

    @property
    def needed_diameter(self) -> np.ndarray:
        return np.sqrt(4.0 * self.needed_area / np.pi)


@dataclass(frozen=True)
class Rating:
    """A traffic in a built column (one diameter per section), per tray stage: the fraction of
    flood, the pressure drop (Pa per tray, or Pa per m of packing) and the weir loading
    (m3/(h m); trays) or Robbins' liquid load factor (packing)."""

    diameter: np.ndarray
    fraction_of_flood: np.ndarray
    pressure_drop: np.ndarray
    liquid_load: np.ndarray


@dataclass(frozen=True)
class SectionSizing:
    """A section of the column as built: ``diameter`` (m), its controlling stage, the largest
    fraction of flood of the rigorous traffic and its stage, the pressure drop (Pa), the
    theoretical stages and the real trays (trays) or the packed height (m, packing)."""

    section: Section
    diameter: float
    controlling_stage: int
    largest_fraction_of_flood: float
    largest_flood_stage: int
    pressure_drop: float
    theoretical_stages: int
    real_trays: int | None
    packed_height: float | None
    hetp: float | None


@dataclass(frozen=True, eq=False)
class ColumnSizing:
    """Everything :func:`size_column` found (SI). ``as_json()`` is result.json's "sizing"."""

    options: SizingOptions
    stages: np.ndarray
    properties: StageHydraulicProperties
    property_sources: tuple[dict[str, str], ...]
    rigorous: BasisSizing
    cmo: BasisSizing | None
    cmo_reason: str
    rating: Rating
    cmo_column_rating: Rating | None
    sections: tuple[SectionSizing, ...]
    efficiency: OverallEfficiency | None
    efficiency_note: str
    notes: tuple[str, ...]

    @property
    def cmo_differences(self) -> tuple[float, ...]:
        """Per section, the CMO-sized diameter over the rigorous one, less 1 (NaN without CMO)."""
        if self.cmo is None:
            return tuple(math.nan for _ in self.sections)
        return tuple(c / r - 1.0 for c, r in zip(self.cmo.section_diameters, self.rigorous.section_diameters))

    @cached_property
    def flags(self) -> tuple[Flag, ...]:
        """The sizing flags (:func:`.record.sizing_flags`), most severe first."""
        from .record import sizing_flags

        return sizing_flags(self)

    def as_json(self) -> Mapping[str, Any]:
        from .record import sizing_record

        return sizing_record(self)


def size_column(case: Case, result: Result, thermo: ThermoPackage, liquids: PureLiquids | None = None) -> ColumnSizing:
    """Size the column of the converged ``result`` of ``case`` (module docstring).
    :class:`SpecError` for an unconverged result or a column without trays."""
    if not result.converged:
        raise SpecError("the column did not converge; its traffic cannot size hardware")
    options = case.sizing or SizingOptions()
    liquids = liquids or PureLiquids.from_case(case, thermo, need_viscosity=True)
    props = stage_properties(result.temperature, result.pressure, result.x, result.y, liquids, thermo)
    sections = sections_of(result)
    rigorous = _size(options, rigorous_traffic(result), props, sections)
    cmo, cmo_reason = None, ""
    try:
        cmo = _size(options, cmo_traffic(result), props, sections)
    except SpecError as exc:
        cmo_reason = str(exc)
    built = _built_diameters(options, rigorous, sections)
    rating = _rate(options, rigorous.traffic, rigorous, props, built)
    cmo_rating = None
    if cmo is not None:
        cmo_rating = _rate(options, rigorous.traffic, rigorous, props, _per_stage(cmo.section_diameters, sections,
                                                                               rigorous.traffic.stages))
    efficiency, efficiency_note = column_efficiency(case, result, thermo, liquids)
    section_sizings = tuple(_section(options, s, k, rigorous, rating, result, efficiency)
                            for k, s in enumerate(sections))
    notes = _notes(options, props, rating, result, rigorous)
    return ColumnSizing(options, rigorous.traffic.stages, props, tuple(liquids.describe()), rigorous, cmo, cmo_reason,
                        rating, cmo_rating, section_sizings, efficiency, efficiency_note, notes)


def sizing_inputs(case: Case) -> tuple[ThermoPackage, PureLiquids]:
    """The thermo package and pure-liquid properties a sizing of ``case`` needs, built before
    solving so that a property nobody gives is bad input (CaseError, exit 2) up front."""
    thermo = ThermoPackage.from_case(case)
    return thermo, PureLiquids.from_case(case, thermo)


def attach_sizing(case: Case, result: Result, inputs: tuple[ThermoPackage, PureLiquids]) -> tuple[Result, str]:
    """(``result`` with ``extra["sizing"]``, "") or, for a column that cannot be sized
    (:class:`SpecError`), (``result`` unchanged, the reason)."""
    try:
        return result.with_extra(sizing=size_column(case, result, *inputs)), ""
    except SpecError as exc:
        return result, str(exc)


# --- sizing and rating one traffic ----------------------------------------------------------


def _mass_flows(traffic: Traffic, props: StageHydraulicProperties) -> tuple[np.ndarray, np.ndarray]:
    j = traffic.stages - 1
    return traffic.vapor_flow * props.vapor_molar_mass[j], traffic.liquid_flow * props.liquid_molar_mass[j]


def _loads(vapor: np.ndarray, liquid: np.ndarray, props: StageHydraulicProperties, stages: np.ndarray) -> TrayLoads:
    j = stages - 1
    return TrayLoads(vapor, liquid, props.vapor_density[j], props.liquid_density[j], props.surface_tension[j])


def _size(options: SizingOptions, traffic: Traffic, props: StageHydraulicProperties,
          sections: tuple[Section, ...]) -> BasisSizing:
    vapor, liquid = _mass_flows(traffic, props)
    if np.any(vapor <= 0.0) or np.any(liquid <= 0.0):
        dry = int(traffic.stages[np.flatnonzero((vapor <= 0.0) | (liquid <= 0.0))[0]])
        raise SpecError(f"stage {dry} carries no {'vapor' if vapor[dry - traffic.stages[0]] <= 0 else 'liquid'} in the "
                        f"{traffic.basis} traffic; a dry stage cannot be sized")
    loads = _loads(vapor, liquid, props, traffic.stages)
    if options.packed:
        packing = options.packing
        j = traffic.stages - 1
        area = flood_area(vapor, liquid, loads.vapor_density, loads.liquid_density, props.liquid_viscosity[j],
                          packing.packing_factor, packing.flood_packing_factor) / options.flood_fraction
    else:
        area = column_area(loads, options.downcomer, options.tray_spacing, options.flood_fraction,
                           options.system_factor, options.hole_area_fraction)
    diameters, controlling = [], []
    for section in sections:
        mask = section.mask(traffic.stages)
        k = int(np.argmax(np.where(mask, area, -np.inf)))
        diameters.append(float(np.sqrt(4.0 * area[k] / np.pi)))
        controlling.append(int(traffic.stages[k]))
    return BasisSizing(traffic, vapor, liquid, area, tuple(diameters), tuple(controlling))


def _per_stage(diameters: tuple[float, ...], sections: tuple[Section, ...], stages: np.ndarray) -> np.ndarray:
    built = np.empty(stages.size)
    for diameter, section in zip(diameters, sections):
        built[section.mask(stages)] = diameter
    return built


def _built_diameters(options: SizingOptions, rigorous: BasisSizing, sections: tuple[Section, ...]) -> np.ndarray:
    if options.diameter is not None:
        return np.full(rigorous.traffic.stages.size, options.diameter)
    return _per_stage(rigorous.section_diameters, sections, rigorous.traffic.stages)


def _rate(options: SizingOptions, traffic: Traffic, sized: BasisSizing, props: StageHydraulicProperties,
          diameter: np.ndarray) -> Rating:
    """``traffic`` (the one ``sized`` holds the mass flows of) in a column of ``diameter``."""
    area = np.pi * diameter**2 / 4.0
    vapor, liquid = sized.vapor_mass_flow, sized.liquid_mass_flow
    loads = _loads(vapor, liquid, props, traffic.stages)
    if options.packed:
        packing = options.packing
        viscosity = props.liquid_viscosity[traffic.stages - 1]
        fraction = sized.needed_area * options.flood_fraction / area
        drop = robbins_pressure_drop(vapor / area, liquid / area, loads.vapor_density, loads.liquid_density, viscosity,
                                     packing.packing_factor)
        load = robbins_liquid_load(liquid / area, loads.liquid_density, viscosity, packing.packing_factor)
        return Rating(diameter, fraction, drop, load)
    trays = rate_trays(loads, area, options.downcomer, options.tray_spacing, options.system_factor,
                       options.hole_area_fraction, options.weir_height)
    return Rating(diameter, trays.fraction_of_flood, trays.pressure_drop, trays.weir_loading)


# --- sections --------------------------------------------------------------------------------


def _section(options: SizingOptions, section: Section, k: int, rigorous: BasisSizing, rating: Rating, result: Result,
             efficiency: OverallEfficiency | None) -> SectionSizing:
    mask = section.mask(rigorous.traffic.stages)
    stages = rigorous.traffic.stages[mask]
    fractions = rating.fraction_of_flood[mask]
    worst = int(np.argmax(fractions))
    theoretical = int(mask.sum())
    trays = packed = hetp = None
    if options.packed:
        packing = options.packing
        hetp = packing.hetp or hetp_rule_of_thumb(options.internals, packing.nominal_size, packing.specific_area)
        packed = theoretical * hetp
        drop = float(np.sum(rating.pressure_drop[mask]) * hetp)
    else:
        murphree = result.stated_efficiencies[stages - 1]
        if np.any(murphree < 1.0) or efficiency is None:
            trays = theoretical  # the case's stages are real trays already (or no efficiency is known)
        else:
            trays = real_trays(theoretical, efficiency.value)
        drop = float(np.mean(rating.pressure_drop[mask]) * trays)
    return SectionSizing(section, float(rating.diameter[mask][0]), rigorous.controlling_stages[k],
                         float(fractions[worst]), int(stages[worst]), drop, theoretical, trays, packed, hetp)


def _notes(options: SizingOptions, props: StageHydraulicProperties, rating: Rating, result: Result,
           rigorous: BasisSizing) -> tuple[str, ...]:
    notes = []
    stages = rigorous.traffic.stages
    if options.packed:
        over = stages[rating.liquid_load > ROBBINS_LIQUID_LIMIT]
        if over.size:
            notes.append(f"Robbins' liquid load factor exceeds {ROBBINS_LIQUID_LIMIT:.0f} on stages "
                         f"{', '.join(map(str, over))}: his equation is outside its range there (his chart holds)")
        if float(np.max(result.pressure)) > ROBBINS_PRESSURE_LIMIT:
            notes.append("Robbins' correlation is meant for atmospheric pressure and vacuum, not above about 3 bar; "
                         "use the packing maker's capacity data")
    else:
        heavy = stages[rating.liquid_load > WEIR_LOADING_LIMIT]
        if heavy.size:
            notes.append(f"weir loading above {WEIR_LOADING_LIMIT:.0f} m3/(h m) on stages {', '.join(map(str, heavy))}: "
                         "a two-pass tray is usually considered there (common practice)")
        if options.hole_area_fraction < 0.1:
            notes.append(f"hole area {100 * options.hole_area_fraction:.3g} % of the active area: Fair's capacity is "
                         "reduced by the hole-area factor")
        if options.internals == "valve":
            notes.append("valve trays: capacity by Fair's correlation (valid for crossflow trays), pressure drop "
                         "estimated as a sieve tray of the same open area; the valve maker's data rule")
    return tuple(notes)
