"""Where every handbook property comes from: the published tables, their order of
preference per property, and the tables of the registry package ``chemicals`` that the
library leaves out, with the reason.

The tables are read through ``chemicals`` (Bell, C. and contributors, Chemical Engineering
Design Library), whose source files name the origin of each; the citations below are those
origins. For each property the first table in :data:`PREFERENCE` that has the compound (and,
for the vapor pressure, reproduces its handbook normal boiling point) is used.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["EXCLUDED", "PREFERENCE", "TABLES", "Table"]


@dataclass(frozen=True)
class Table:
    """One published table: ``key`` (ours), ``title`` (short, for screens) and ``citation``."""

    key: str
    title: str
    citation: str


_POLING = "Poling, B. E., Prausnitz, J. M. and O'Connell, J. P. (2001), The Properties of Gases and Liquids, 5th ed., McGraw-Hill"
_PERRY = "Green, D. W. and Perry, R. H. (eds.) (2008), Perry's Chemical Engineers' Handbook, 8th ed., McGraw-Hill, Section 2"
_CRC = "Haynes, W. M., Bruno, T. J. and Lide, D. R. (eds.) (2014), CRC Handbook of Chemistry and Physics, 95th ed., CRC Press"

TABLES: dict[str, Table] = {t.key: t for t in (
    Table("iupac", "IUPAC critical-data series",
          "Vapor-Liquid Critical Properties of Elements and Compounds, parts 1-12, J. Chem. Eng. Data 40 (1995) "
          "to 60 (2015) (Ambrose, Young, Tsonopoulos, Gude, Teja, Daubert, Kudchadker, Marsh, Nikitin, Morton et al.)"),
    Table("crc-critical", "CRC Handbook, critical constants of organic compounds",
          _CRC + ", 'Critical Constants of Organic Compounds' (TRC evaluation)"),
    Table("psrk", "PSRK revision IV appendix",
          "Horstmann, S., Jabloniec, A., Krafczyk, J., Fischer, K. and Gmehling, J. (2005), Fluid Phase Equilib. "
          "227, 157-164, appendix of critical constants"),
    Table("passut-danner", "Passut and Danner (1973)",
          "Passut, C. A. and Danner, R. P. (1973), Ind. Eng. Chem. Process Des. Dev. 12, 365-368"),
    Table("crc-organic", "CRC Handbook, physical constants of organic compounds",
          _CRC + ", 'Physical Constants of Organic Compounds'"),
    Table("crc-inorganic", "CRC Handbook, physical constants of inorganic compounds",
          _CRC + ", 'Physical Constants of Inorganic Compounds'"),
    Table("atomic-weights", "IUPAC standard atomic weights",
          "molecular formula with the standard atomic weights of IUPAC CIAAW (Prohaska, T. et al. (2022), "
          "Pure Appl. Chem. 94, 573-600; conventional values)"),
    Table("wagner-poling", "Wagner constants, Poling et al. Appendix A",
          _POLING + ", Appendix A, Wagner equation (2.5, 5 form)"),
    Table("wagner-mcgarry", "Wagner constants, McGarry (1983)",
          "McGarry, J. (1983), Ind. Eng. Chem. Process Des. Dev. 22, 313-322, Wagner equation (3, 6 form)"),
    Table("perry-2-8", "Perry's Table 2-8 (DIPPR equation 101)",
          _PERRY + ", Table 2-8, Vapor Pressure of Inorganic and Organic Liquids"),
    Table("vdi-wagner", "VDI Heat Atlas, Wagner constants",
          "VDI e.V. (ed.) (2010), VDI Heat Atlas, 2nd ed., Springer, section D3.1, Wagner equation (2.5, 5 form)"),
    Table("antoine-poling", "Antoine constants, Poling et al. Appendix A",
          _POLING + ", Appendix A, Antoine equation"),
    Table("landolt-antoine", "Landolt-Boernstein Antoine constants",
          "Landolt-Boernstein New Series IV/20: Hall, K. R. (ed.) (1999, 2001) and Dykyj, J. et al. (2000), "
          "Vapor Pressure and Antoine Constants, Springer"),
    Table("perry-2-150", "Perry's Table 2-150 (DIPPR equation 106)",
          _PERRY + ", Table 2-150, Heats of Vaporization of Inorganic and Organic Liquids"),
    Table("crc-hvap", "CRC Handbook enthalpy of vaporization at Tb, with Watson's law",
          _CRC + ", 'Enthalpy of Vaporization' (value at the normal boiling point), carried in temperature by "
          "Watson, K. M. (1943), Ind. Eng. Chem. 35, 398-406"),
    Table("poling-cp", "Ideal-gas heat capacity polynomials, Poling et al. Appendix A",
          _POLING + ", Appendix A, ideal-gas heat capacity polynomial"),
    Table("trc-cp", "TRC ideal-gas heat capacity",
          "Frenkel, M., Kabo, G. J., Marsh, K. N., Roganov, G. N. and Wilhoit, R. C. (1994), Thermodynamics of "
          "Organic Compounds in the Gas State, TRC Data Series, Thermodynamics Research Center"),
    Table("perry-105", "Perry's liquid densities (DIPPR equation 105)",
          _PERRY + ", Densities of Inorganic and Organic Liquids (DIPPR equation 105)"),
    Table("rackett", "Rackett equation with the critical compressibility",
          "Rackett, H. G. (1970), J. Chem. Eng. Data 15, 514-517, with Zc = Pc Vc/(R Tc) from the critical table used"),
)}

#: Order of preference per property (table keys).
PREFERENCE: dict[str, tuple[str, ...]] = {
    "critical constants": ("iupac", "crc-critical", "psrk", "passut-danner"),
    "normal boiling point": ("crc-organic", "crc-inorganic"),
    "vapor pressure": ("wagner-poling", "wagner-mcgarry", "perry-2-8", "vdi-wagner", "antoine-poling", "landolt-antoine"),
    "heat of vaporization": ("perry-2-150", "crc-hvap"),
    "ideal-gas heat capacity": ("poling-cp", "trc-cp"),
    "liquid molar volume": ("perry-105", "rackett"),
}

#: Tables of ``chemicals`` (file, and the method name its functions use) left out, with the reason.
EXCLUDED: tuple[tuple[str, str], ...] = (
    ("Misc/ChemSep8.32.xml", "the pure-component data bank of the ChemSep column simulator (Kooijman and Taylor); "
     "data from a simulator's data bank are not used"),
    ("Misc/chemsep_radius_of_gyrations.tsv (method CHEMSEP)", "taken from the ChemSep column simulator's data bank"),
    ("Misc/heos_constants.tsv (method HEOS)", "constants of CoolProp/REFPROP reference equations of state: CoolProp "
     "is used directly for its own fluids, and the handbook must stay independent of it (its vapor pressures are "
     "checked against CoolProp)"),
    ("Critical Properties/DIPPRPinaMartines.tsv (method PINAMARTINES)", "critical constants copied from a property "
     "data bank into a paper's supplement (Pina-Martinez et al., AIChE J. 2022) as pseudo-experimental data, "
     "without a primary source per value"),
    ("Critical Properties/Yaws Collection.tsv, Phase Change/Yaws Boiling Points.tsv (method YAWS)",
     "a compilation that names no source for its values"),
    ("Misc/joback_predictions.tsv, wilson_jasperson_*, fedors_*, omega_Psat_Tc_predictions.tsv",
     "group-contribution estimates, not measured or evaluated data"),
    ("Misc/wikidata_properties.tsv, common_chemistry_data.tsv, webbook_constants.tsv",
     "web databases without an evaluation per value; the CRC tables cover the library's compounds"),
    ("Phase Change/Alibakhshi one-coefficient enthalpy of vaporization.tsv",
     "a one-constant regression of a data bank's values, valid only from 50 K below Tb to 100 K below Tc; "
     "Perry's Table 2-150 gives a full-range correlation"),
    ("Density/COSTALD Parameters.tsv (Z_RA column)", "the source of its Rackett parameters is not stated; the Rackett "
     "equation uses the critical compressibility of the critical table instead"),
)
