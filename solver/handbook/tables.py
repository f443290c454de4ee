"""The handbook tables read through the registry package ``chemicals``, one function per
property, each returning the rows a compound has, in the order of preference of
:data:`solver.handbook.sources.PREFERENCE`, as correlations in the forms traystack evaluates
(:mod:`solver.thermo.correlations`, :mod:`solver.thermo.handbook_forms`), all in SI.

``chemicals`` is imported on first use (it loads its tables with pandas, about a second).
Each table is asked for by its own name, never through ``chemicals``' automatic choice of
method, which would also draw on the tables :data:`solver.handbook.sources.EXCLUDED` leaves out.
"""

from __future__ import annotations

from scipy.constants import R as GAS_CONSTANT
import math
from dataclasses import dataclass
from types import MappingProxyType
from typing import Any

from solver.thermo.data import Correlation
from solver.handbook.sources import PREFERENCE

__all__ = [
    "Constant",
    "critical_constants",
    "heat_of_vaporization",
    "ideal_gas_cp",
    "liquid_molar_volume",
    "normal_boiling_point",
    "vapor_pressure",
]



@dataclass(frozen=True)
class Constant:
    """A constant from a table: ``values`` by name (SI), ``table`` its key in the sources."""

    table: str
    values: dict[str, float]


def critical_constants(cas: str) -> list[Constant]:
    """Critical temperature (K), pressure (Pa) and, where given, volume (m3/mol) from each
    critical table that has both Tc and Pc of the compound (Tc and Pc always from one table)."""
    from chemicals import critical

    frames = {
        "iupac": critical.critical_data_IUPAC,
        "crc-critical": critical.critical_data_CRC,
        "psrk": critical.critical_data_PSRKR4,
        "passut-danner": critical.critical_data_PassutDanner,
    }
    found = []
    for key in PREFERENCE["critical constants"]:
        row = _row(frames[key], cas)
        if row is None or not (_number(row, "Tc") and _number(row, "Pc")):
            continue
        values = {"Tc": _number(row, "Tc"), "Pc": _number(row, "Pc")}
        if _number(row, "Vc"):
            values["Vc"] = _number(row, "Vc")
        found.append(Constant(key, values))
    return found


def normal_boiling_point(cas: str) -> list[Constant]:
    """Normal boiling point (K) from the CRC Handbook's tables of physical constants."""
    from chemicals import miscdata

    frames = {"crc-organic": miscdata.CRC_organic_data, "crc-inorganic": miscdata.CRC_inorganic_data}
    found = []
    for key in PREFERENCE["normal boiling point"]:
        row = _row(frames[key], cas)
        if row is not None and _number(row, "Tb"):
            found.append(Constant(key, {"Tb": _number(row, "Tb")}))
    return found


def vapor_pressure(cas: str) -> list[tuple[str, Correlation]]:
    """Vapor-pressure correlations (Pa) of the compound, by preference."""
    from chemicals import vapor_pressure as vp

    readers = {
        "wagner-poling": (vp.Psat_data_WagnerPoling, _wagner_poling),
        "wagner-mcgarry": (vp.Psat_data_WagnerMcGarry, _wagner_mcgarry),
        "perry-2-8": (vp.Psat_data_Perrys2_8, _perry_2_8),
        "vdi-wagner": (vp.Psat_data_VDI_PPDS_3, _vdi_wagner),
        "antoine-poling": (vp.Psat_data_AntoinePoling, lambda row: _antoine(row, 10.0)),
        "landolt-antoine": (vp.Psat_data_Landolt_Antoine, lambda row: _antoine(row, math.e)),
    }
    return _read_all("vapor pressure", readers, cas)


def heat_of_vaporization(cas: str) -> list[tuple[str, Correlation]]:
    """Heat-of-vaporization correlations (J/mol) of the compound, by preference."""
    from chemicals import phase_change

    readers = {
        "perry-2-150": (phase_change.phase_change_data_Perrys2_150, _perry_2_150),
        "crc-hvap": (phase_change.Hvap_data_CRC, _crc_hvap),
    }
    return _read_all("heat of vaporization", readers, cas)


def ideal_gas_cp(cas: str) -> list[tuple[str, Correlation]]:
    """Ideal-gas heat-capacity correlations (J/(mol K)) of the compound, by preference."""
    from chemicals import heat_capacity

    readers = {
        "poling-cp": (heat_capacity.Cp_data_Poling, _poling_cp),
        "trc-cp": (heat_capacity.TRC_gas_data, _trc_cp),
    }
    return _read_all("ideal-gas heat capacity", readers, cas)


def liquid_molar_volume(cas: str, critical: Constant | None) -> list[tuple[str, Correlation]]:
    """Liquid molar-volume correlations of the compound, by preference; the last is the
    Rackett equation with the critical constants ``critical`` (when they include Vc)."""
    from chemicals import volume

    found = _read_all("liquid molar volume", {"perry-105": (volume.rho_data_Perry_8E_105_l, _perry_105)}, cas)
    if critical is not None and "Vc" in critical.values:
        found.append(("rackett", rackett_correlation(critical.values["Tc"], critical.values["Pc"], critical.values["Vc"])))
    return found


def rackett_correlation(Tc: float, Pc: float, Vc: float) -> Correlation:
    """The Rackett equation ``V = (R Tc/Pc) Zc^(1 + (1 - T/Tc)^(2/7))`` (Rackett 1970,
    J. Chem. Eng. Data 15, 514-517) with ``Zc = Pc Vc/(R Tc)``, written as the molar density
    of DIPPR equation 105: ``A = Pc/(R Tc)``, ``B = Zc``, ``C = Tc``, ``D = 2/7``."""
    Zc = Pc * Vc / (GAS_CONSTANT * Tc)
    return _correlation("dippr105", {"A": Pc / (GAS_CONSTANT * Tc), "B": Zc, "C": Tc, "D": 2.0 / 7.0}, None, Tc)


# --- one reader per table: a row (pandas Series) -> Correlation ------------------------------


def _wagner_poling(row) -> Correlation:
    coefficients = {k: _number(row, k) for k in ("A", "B", "C", "D", "Tc", "Pc")}
    return _correlation("wagner", coefficients, _number(row, "Tmin"), _number(row, "Tmax"))


def _wagner_mcgarry(row) -> Correlation:
    coefficients = {k: _number(row, k) for k in ("A", "B", "C", "D", "Tc", "Pc")}
    coefficients.update(exponent_C=3.0, exponent_D=6.0)
    return _correlation("wagner", coefficients, _number(row, "Tmin"), _number(row, "Tc"))


def _vdi_wagner(row) -> Correlation:
    coefficients = {k: _number(row, k) for k in ("A", "B", "C", "D", "Tc", "Pc")}
    return _correlation("wagner", coefficients, _number(row, "Tm"), _number(row, "Tc"))


def _perry_2_8(row) -> Correlation:
    coefficients = {name: _number(row, f"C{k + 1}") for k, name in enumerate("ABCDE")}
    return _correlation("dippr101", coefficients, _number(row, "Tmin"), _number(row, "Tmax"), optional="CDE")


def _antoine(row, base: float) -> Correlation:
    coefficients = {k: _number(row, k) for k in ("A", "B", "C")}
    # the tables' form is log P = A - B/(T + C) (T in K, P in Pa)
    return _correlation("antoine", coefficients, _number(row, "Tmin"), _number(row, "Tmax"), log_base=base)


def _perry_2_150(row) -> Correlation:
    coefficients = {name: _number(row, f"C{k + 1}") for k, name in enumerate("ABCD")}
    coefficients.update(E=0.0, Tc=_number(row, "Tc"))
    return _correlation("dippr106", coefficients, _number(row, "Tmin"), _number(row, "Tmax"), optional="CD")


def _crc_hvap(row) -> Correlation | None:
    if not (_number(row, "Tb") and _number(row, "HvapTb")):
        return None
    return _correlation("watson", {"value": _number(row, "HvapTb"), "at": _number(row, "Tb"), "exponent": 0.38}, None, None)


def _poling_cp(row) -> Correlation | None:
    if not _number(row, "a0") and not _number(row, "a1"):
        return None  # the table's rows with only a value at 298.15 K
    coefficients = {f"c{k}": _number(row, f"a{k}") for k in range(5)}
    return _correlation(
        "polynomial", coefficients, _number(row, "Tmin"), _number(row, "Tmax"), value_factor=GAS_CONSTANT,
        optional=tuple(coefficients),
    )


def _trc_cp(row) -> Correlation:
    coefficients = {f"a{k}": _number(row, f"a{k}") for k in range(8)}
    return _correlation(
        "trc_gas", coefficients, _number(row, "Tmin"), _number(row, "Tmax"), value_factor=GAS_CONSTANT,
        optional=tuple(coefficients),
    )


def _perry_105(row) -> Correlation:
    coefficients = {name: _number(row, f"C{k + 1}") for k, name in enumerate("ABCD")}
    return _correlation("dippr105", coefficients, _number(row, "Tmin"), _number(row, "Tmax"))


# --- plumbing --------------------------------------------------------------------------------


def _correlation(
    form: str, coefficients: dict, T_min, T_max, *, value_factor: float = 1.0, log_base=None, optional=()
) -> Correlation | None:
    """A correlation, or None when a coefficient other than the ``optional`` ones (blank in the
    table: 0) is missing."""
    if any(value is None for key, value in coefficients.items() if key not in optional):
        return None
    return Correlation(
        form=form,
        coefficients=MappingProxyType({k: float(v or 0.0) for k, v in coefficients.items()}),
        value_factor=value_factor,
        log_base=log_base,
        T_min=float(T_min) if T_min else None,
        T_max=float(T_max) if T_max else None,
    )


def _read_all(prop: str, readers: dict[str, tuple[Any, Any]], cas: str) -> list[tuple[str, Correlation]]:
    found = []
    for key in PREFERENCE[prop]:
        if key not in readers:
            continue
        frame, read = readers[key]
        row = _row(frame, cas)
        corr = read(row) if row is not None else None
        if corr is not None:
            found.append((key, corr))
    return found


def _row(frame, cas: str):
    if cas not in frame.index:
        return None
    row = frame.loc[cas]
    return row.iloc[0] if getattr(row, "ndim", 1) == 2 else row


def _number(row, column: str) -> float | None:
    try:
        value = float(row[column])
    except (KeyError, TypeError, ValueError):
        return None
    return value if math.isfinite(value) else None
