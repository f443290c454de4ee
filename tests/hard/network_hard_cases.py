"""The network part of the hard-case suite: column networks that must converge from the
network's default start. Every case is a scenario of our own invention. The ones written here
have ideal liquids (Raoult's law with CoolProp vapor pressures: aromatics and n-alkanes, common
practice); the shipped network cases of cases/ join them as they are and in variants (their
thermo models, with sources, are in the case files)."""

from __future__ import annotations

from pathlib import Path

SHIPPED = Path(__file__).resolve().parent.parent.parent / "cases"

AROMATICS = '["benzene", "toluene", "o-xylene"]'
PARAFFINS = '["n-Pentane", "n-Hexane", "n-Heptane", "n-Octane"]'
BTX_FEED = "{ benzene = 0.33, toluene = 0.34, o-xylene = 0.33 }"
PARAFFIN_FEED = "{ n-Pentane = 0.30, n-Hexane = 0.30, n-Heptane = 0.25, n-Octane = 0.15 }"


def _header(title: str, names: str) -> str:
    return f'title = "{title}"\n[components]\nnames = {names}\n[thermo]\nliquid = "ideal"\nenthalpy = "rigorous"\n'


def _column(name: str, stages: int, condenser: str, reboiler: str, top: str, specs: str = "", extra: str = "") -> str:
    text = (f'[[columns]]\nname = "{name}"\nstages = {stages}\ncondenser = "{condenser}"\nreboiler = "{reboiler}"\n'
            f'pressure = {{ top = "{top}", drop_per_stage = "0.5 kPa" }}\n{extra}\n')
    return text + (f"[columns.specs]\n{specs}\n" if specs else "")


def _connection(name: str, source: str, stage: int, phase: str, target: str, to_stage: int, size: str = "") -> str:
    return (f'[[connections]]\nname = "{name}"\nfrom = {{ column = "{source}", stage = {stage}, phase = "{phase}" }}\n'
            f'to = {{ column = "{target}", stage = {to_stage} }}\n{size}\n')


def _feed(column: str, stage: int, composition: str, flow: str = "100 kmol/h", condition: str = "vapor_fraction = 0.0",
          name: str = "feed") -> str:
    return (f'[[feeds]]\nname = "{name}"\ncolumn = "{column}"\nstage = {stage}\nflow = "{flow}"\n'
            f"composition = {composition}\n{condition}\n")


def _spec(on: str, quantity: str) -> str:
    return f'[[specs]]\non = "{on}"\n{quantity}\n'


def shipped(name: str, *changes: tuple[str, str]) -> str:
    """The text of the shipped case ``cases/NAME.toml`` with each (old, new) text replaced."""
    text = (SHIPPED / f"{name}.toml").read_text()
    for old, new in changes:
        if old not in text:
            raise ValueError(f"{name}: {old!r} is not in the case file")
        text = text.replace(old, new)
    return text


def petlyuk(title: str, main: int, prefractionator: int, specs: str, *, liquid: float = 0.35, vapor: str = "fraction = 0.4",
            draw: str = "33 kmol/h", extra_specs: str = "") -> str:
    """A prefractionator (no condenser, no reboiler) coupled to a main column at its stages
    ``main // 6 + 1`` (liquid out, vapor in) and ``5 main // 6`` (vapor out, liquid in), with
    a liquid side product in the middle. The prefractionator's top is at the pressure of main
    stage ``top + 1`` (as the feed side of a wall), so that both vapor connections flow to a
    lower pressure."""
    top, bottom = main // 6 + 1, 5 * main // 6
    return (_header(title, AROMATICS)
            + _column("main", main, "total", "partial", "1.1 bar", specs,
                      f'side_draws = [{{ name = "toluene", stage = {main // 2}, phase = "liquid", flow = "{draw}" }}]')
            + _column("prefractionator", prefractionator, "none", "none", f"{110 + 0.5 * top:g} kPa")
            + _connection("reflux", "main", top, "liquid", "prefractionator", 1, f"fraction = {liquid}")
            + _connection("overhead", "prefractionator", 1, "vapor", "main", top)
            + _connection("boilup", "main", bottom, "vapor", "prefractionator", prefractionator, vapor)
            + _connection("underflow", "prefractionator", prefractionator, "liquid", "main", bottom)
            + _feed("prefractionator", prefractionator // 2, BTX_FEED) + extra_specs)


def side_stripper(title: str, main_specs: str, stripper_specs: str, network_specs: str) -> str:
    return (_header(title, PARAFFINS)
            + _column("main", 30, "total", "partial", "101.325 kPa", main_specs)
            + _column("stripper", 5, "none", "partial", "110 kPa", stripper_specs)
            + _connection("stripper-feed", "main", 14, "liquid", "stripper", 1, 'flow = "free"')
            + _connection("stripper-vapor", "stripper", 1, "vapor", "main", 13)
            + _feed("main", 18, PARAFFIN_FEED) + network_specs)


def pumparound(title: str, size: str, cooling: str, specs: str = "") -> str:
    return (_header(title, AROMATICS)
            + _column("main", 24, "total", "partial", "1.1 bar", 'reflux_ratio = 2.5\ndistillate = { benzene = 0.98 }')
            + _connection("pumparound", "main", 9, "liquid", "main", 6, f"{size}\ncooling = {cooling}")
            + _feed("main", 12, "{ benzene = 0.40, toluene = 0.35, o-xylene = 0.25 }") + specs)


NETWORK_HARD_CASES: dict[str, str] = {
    "petlyuk_purities": petlyuk("Petlyuk at two purities", 36, 14,
                                "distillate = { benzene = 0.95 }\nbottoms = { o-xylene = 0.96 }"),
    "divided_wall_120": petlyuk("Four-section divided-wall column of 120 stages", 84, 36, "reflux_ratio = 5.0\ndistillate_rate = \"33 kmol/h\""),
    "petlyuk_free_vapor_split": petlyuk("Petlyuk with its vapor split set by a fraction spec", 36, 14,
                                        "reflux_ratio = 5.0\ndistillate_rate = \"33 kmol/h\"", vapor='flow = "free"',
                                        extra_specs=_spec("boilup", "fraction = 0.4")),
    "side_stripper_purity": side_stripper("Side stripper to a hexane purity", "reflux_ratio = 3.0\ndistillate_rate = \"30 kmol/h\"",
                                          "boilup_ratio = 0.6", _spec("stripper.bottoms", "mole_fraction = { n-Hexane = 0.85 }")),
    "side_stripper_duty": side_stripper("Side stripper at a reboiler duty", "reflux_ratio = 3.0\ndistillate_rate = \"30 kmol/h\"",
                                        'reboiler_duty = "100 kW"', _spec("stripper.bottoms", 'flow = "25 kmol/h"')),
    "side_stripper_recovery": side_stripper("Main column to a pentane recovery", "reflux_ratio = 3.0\nrecovery = { n-Pentane = { distillate = 0.98 } }",
                                            "boilup_ratio = 0.6", _spec("stripper.bottoms", 'flow = "25 kmol/h"')),
    "pumparound_free_rate": pumparound("Pumparound rate set by a fraction", 'flow = "free"', '{ return_temperature = "60 degC" }',
                                       _spec("pumparound", "fraction = 0.3")),
    "pumparound_free_duty": pumparound("Pumparound duty set by its return temperature", 'flow = "50 kmol/h"', '{ duty = "free" }',
                                       _spec("pumparound", 'return_temperature = "50 degC"')),
    "pumparound_large_duty": pumparound("Pumparound taking most of the top heat", 'fraction = 0.5', '{ duty = "-600 kW" }'),
    "direct_sequence": (_header("Direct sequence: benzene first, then toluene from xylene", AROMATICS)
                        + _column("first", 30, "total", "partial", "1.1 bar", 'reflux_ratio = 2.5\ndistillate = { benzene = 0.98 }')
                        + _column("second", 30, "total", "partial", "1.15 bar", 'reflux_ratio = 2.5\nbottoms = { o-xylene = 0.97 }')
                        + _connection("first-bottoms", "first", 30, "liquid", "second", 15)
                        + _feed("first", 15, BTX_FEED)),
    # the low column under vacuum, so that it boils below the high column's condensing benzene
    "heat_integrated_pair": (_header("Two aromatics splitters at two pressures, one condenser boiling the other's reboiler", AROMATICS)
                             + _column("high", 30, "total", "partial", "3 bar", 'reflux_ratio = 2.0\ndistillate = { benzene = 0.97 }')
                             + _column("low", 30, "total", "partial", "0.6 bar", 'distillate = { benzene = 0.97 }')
                             + '[[heat_links]]\nname = "integration"\nfrom = "high.condenser"\nto = "low.reboiler"\n'
                             + _feed("high", 15, BTX_FEED, name="high feed") + _feed("low", 15, BTX_FEED, name="low feed")),
    # the shipped cases and variants: side strippers (one steam-stripped), a side rectifier, a
    # heat-integrated pair, extractive distillation with its solvent recycle and a free make-up
    "crude_side_strippers": shipped("crude_like_side_strippers"),
    "crude_more_steam": shipped("crude_like_side_strippers", ('flow = "2 kmol/h"', 'flow = "4 kmol/h"')),
    "crude_steam_stripper_purity": shipped("crude_like_side_strippers", (
        'on = "steam-stripper.bottoms"\nflow = "27 kmol/h"', 'on = "steam-stripper.bottoms"\nmole_fraction = { n-Octane = 0.96 }')),
    "side_rectifier": shipped("aromatics_side_rectifier"),
    "side_rectifier_purity": shipped("aromatics_side_rectifier", (
        'reflux_ratio = 3.0\ndistillate_rate = "33 kmol/h"\n\n[[connections]]', 'reflux_ratio = 3.0\ndistillate = { toluene = 0.99 }\n\n[[connections]]')),
    "side_rectifier_lower_draw": shipped("aromatics_side_rectifier", ('stage = 21, phase = "vapor"', 'stage = 22, phase = "vapor"'),
                                         ('to = { column = "main", stage = 21 }', 'to = { column = "main", stage = 22 }')),
    "methanol_pressure_pair": shipped("methanol_water_pressure_pair"),
    "methanol_pressure_pair_bottoms_spec": shipped("methanol_water_pressure_pair", (
        '[columns.specs]\ndistillate = { methanol = 0.995 }', '[columns.specs]\nbottoms = { water = 0.995 }')),
    "extractive_with_recycle": shipped("acetone_methanol_extractive"),
    "extractive_more_reflux": shipped("acetone_methanol_extractive", ('reflux_ratio = 4.0', 'reflux_ratio = 5.0')),
    "extractive_more_solvent": shipped("acetone_methanol_extractive", ('flow = "200 kmol/h"', 'flow = "250 kmol/h"')),
    # pressure swing: each column's distillate goes on whole, one of them as the recycle
    "pressure_swing": shipped("acetone_methanol_pressure_swing"),
    "pressure_swing_purer": shipped("acetone_methanol_pressure_swing", ("bottoms = { methanol = 0.995 }", "bottoms = { methanol = 0.998 }"),
                                    ("bottoms = { acetone = 0.995 }", "bottoms = { acetone = 0.998 }")),
    "pressure_swing_less_reflux": shipped("acetone_methanol_pressure_swing", ("reflux_ratio = 3.0", "reflux_ratio = 2.2")),
    "indirect_sequence_purities": (_header("Indirect sequence: o-xylene first, then benzene from toluene", AROMATICS)
                                   + _column("first", 30, "total", "partial", "1.1 bar", 'reflux_ratio = 2.5\nbottoms = { o-xylene = 0.97 }')
                                   + _column("second", 30, "total", "partial", "1.05 bar", 'distillate = { benzene = 0.97 }\nbottoms = { toluene = 0.95 }')
                                   + '[[connections]]\nname = "first-distillate"\nfrom = { column = "first", product = "distillate" }\n'
                                     'to = { column = "second", stage = 15 }\n'
                                   + _feed("first", 15, BTX_FEED)),
}
