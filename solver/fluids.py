"""CoolProp's pure fluids without loading CoolProp: one index of names, aliases and constants
for every module that looks a fluid up (the case reader for molar masses on a mass basis, the
component registry, ``traystack components``).

The index ships with the package (``solver/data/coolprop_fluids.json``, written by
``scripts/build_coolprop_index.py`` from CoolProp itself and stating the CoolProp version it
was made with). It is used when the installed CoolProp has that version (read from the
installed package's metadata, which does not import CoolProp, whose import takes seconds);
with any other version the same index is built live from CoolProp (:func:`live_index`), so
the constants always are those of the CoolProp that computes the fits.

Names match ignoring case; spaces, hyphens and underscores are optional where that leaves the
name unambiguous.
"""

from __future__ import annotations

import json
import math
import re
from functools import lru_cache
from pathlib import Path

__all__ = [
    "INDEX_FILE",
    "coolprop_name",
    "coolprop_version",
    "fluid_aliases",
    "fluid_entry",
    "fluid_names",
    "fluid_parameter",
    "fluid_index",
    "live_index",
    "loose_key",
    "name_index",
]

#: The shipped index of CoolProp's fluids.
INDEX_FILE = Path(__file__).with_name("data") / "coolprop_fluids.json"
#: The atmosphere (Pa, exact by definition), the pressure of the normal boiling point.
_ATMOSPHERE = 101325.0


def coolprop_name(name: str) -> str | None:
    """CoolProp's name of the fluid called ``name`` (a CoolProp name or alias, any case,
    spaces, hyphens and underscores optional), or None if CoolProp has no such fluid."""
    key = name.strip().lower()
    exact, loose = name_index()
    if key in exact:
        return exact[key]
    return loose.get(loose_key(key))


def loose_key(text: str) -> str:
    return re.sub(r"[\s_\-]", "", text.lower())


@lru_cache(maxsize=1)
def coolprop_version() -> str:
    """The installed CoolProp's version, from its package metadata (CoolProp is not imported)."""
    from importlib import metadata

    try:
        return metadata.version("CoolProp")
    except metadata.PackageNotFoundError:
        import CoolProp

        return str(CoolProp.__version__)


@lru_cache(maxsize=1)
def fluid_index() -> dict:
    """``{"coolprop_version": ..., "fluids": {CoolProp name: entry}}``: the shipped index if
    it was made with the installed CoolProp's version, else the index built live."""
    try:
        shipped = json.loads(INDEX_FILE.read_text(encoding="utf-8"))
        if shipped.get("coolprop_version") == coolprop_version() and isinstance(shipped.get("fluids"), dict):
            return shipped
    except (OSError, ValueError):  # a missing or damaged file: CoolProp answers instead
        pass
    return live_index()


def fluid_names() -> tuple[str, ...]:
    return tuple(fluid_index()["fluids"])


def fluid_entry(fluid: str) -> dict:
    """The index entry of CoolProp's fluid ``fluid``: ``aliases``, ``pure``, ``unusable``
    (why a column cannot use it, or None), ``molar_mass`` (kg/mol), ``critical_temperature``
    (K), ``critical_pressure`` (Pa), ``normal_boiling_point`` (K or None),
    ``triple_temperature`` (K), ``bibtex_eos``, ``bibtex_cp0``."""
    return fluid_index()["fluids"][fluid]


def fluid_aliases(fluid: str) -> tuple[str, ...]:
    return tuple(fluid_entry(fluid)["aliases"])


def fluid_parameter(fluid: str, key: str) -> str:
    """CoolProp's text parameter ``key`` of the fluid (``aliases``, ``pure``, ``BibTeX-EOS``,
    ``BibTeX-CP0``) from the index; "" if the fluid has none."""
    entry = fluid_entry(fluid)
    if key == "aliases":
        return ", ".join(entry["aliases"])
    if key == "pure":
        return "true" if entry["pure"] else "false"
    return {"BibTeX-EOS": entry["bibtex_eos"], "BibTeX-CP0": entry["bibtex_cp0"]}.get(key, "")


@lru_cache(maxsize=1)
def name_index() -> tuple[dict[str, str], dict[str, str]]:
    """(exact lower-case name or alias -> CoolProp name, loose key -> CoolProp name). A loose
    key (spaces, hyphens and underscores removed) that two fluids share is dropped."""
    exact: dict[str, str] = {}
    for fluid in fluid_names():
        exact.setdefault(fluid.lower(), fluid)
    for fluid in fluid_names():
        for alias in fluid_aliases(fluid):
            exact.setdefault(alias.lower(), fluid)
    loose: dict[str, str] = {}
    clashes: set[str] = set()
    for key, fluid in exact.items():
        lk = loose_key(key)
        if lk in loose and loose[lk] != fluid:
            clashes.add(lk)
        loose.setdefault(lk, fluid)
    for lk in clashes:
        del loose[lk]
    return exact, loose


# --- the index from CoolProp itself ------------------------------------------------------------


@lru_cache(maxsize=1)
def live_index() -> dict:
    """The index built from the installed CoolProp (takes seconds: CoolProp loads every
    fluid). Constants from ``AbstractState("HEOS", fluid)`` (Bell et al. 2014, Ind. Eng. Chem.
    Res. 53, 2498-2508); the normal boiling point by a saturation flash at 101325 Pa."""
    import CoolProp
    import CoolProp.CoolProp as CP

    fluids = {}
    for fluid in CP.get_global_param_string("FluidsList").split(","):
        text = _live_parameter(CP, fluid, "aliases")
        entry = {
            "aliases": [a.strip() for a in text.split(",") if a.strip()],
            "pure": _live_parameter(CP, fluid, "pure") == "true",
            "bibtex_eos": _live_parameter(CP, fluid, "BibTeX-EOS"),
            "bibtex_cp0": _live_parameter(CP, fluid, "BibTeX-CP0"),
        }
        entry["unusable"] = _unusable_reason(CP, fluid, entry["pure"])
        entry.update(_constants(CP, fluid))
        fluids[fluid] = entry
    return {"coolprop_version": str(CoolProp.__version__), "fluids": fluids}


def _live_parameter(CP, fluid: str, key: str) -> str:
    try:
        return CP.get_fluid_param_string(fluid, key).strip()
    except Exception:  # CoolProp raises ValueError for keys a fluid lacks
        return ""


def _unusable_reason(CP, fluid: str, pure: bool) -> str | None:
    if not pure:
        return "CoolProp models it as a pseudo-pure mixture, without a vapor-liquid saturation curve of its own"
    try:
        state = CP.AbstractState("HEOS", fluid)
        Tc = state.T_critical()
        T_low = max(state.Ttriple(), state.Tmin())
        for T in (T_low, 0.5 * (T_low + Tc), Tc * (1.0 - 1e-3)):
            state.update(CP.QT_INPUTS, 0.0, T)
            if not (math.isfinite(state.p()) and state.p() > 0.0):
                return f"CoolProp gives no saturation pressure at {T:.2f} K"
    except Exception as exc:  # CoolProp raises ValueError with its own message
        return f"CoolProp cannot compute its saturation curve ({exc})"
    return None


def _constants(CP, fluid: str) -> dict:
    try:
        state = CP.AbstractState("HEOS", fluid)
    except Exception:  # a fluid CoolProp lists but cannot set up: unusable, no constants
        return {"molar_mass": math.nan, "critical_temperature": math.nan, "critical_pressure": math.nan,
                "normal_boiling_point": None, "triple_temperature": math.nan}
    normal_boiling_point: float | None
    try:
        if state.p_triple() < _ATMOSPHERE < state.p_critical():
            state.update(CP.PQ_INPUTS, _ATMOSPHERE, 0.0)
            normal_boiling_point = float(state.T())
        else:
            normal_boiling_point = None
    except Exception:
        normal_boiling_point = None
    return {
        "molar_mass": float(state.molar_mass()),
        "critical_temperature": float(state.T_critical()),
        "critical_pressure": float(state.p_critical()),
        "normal_boiling_point": normal_boiling_point,
        "triple_temperature": float(state.Ttriple()),
    }
