"""The hard-case suite: difficult but feasible columns that must converge from the default start.

Every case is a scenario of our own invention. Binary parameters: Smith, Van Ness & Abbott,
*Introduction to Chemical Engineering Thermodynamics*, 7th ed. (2005), Table 12.5 (values
recommended by Gmehling et al., DECHEMA Chemistry Data Series vol. I) — "SVNA"; ethanol-water:
Gmehling, Kolbe, Kleiber & Rarey, *Chemical Thermodynamics for Process Simulation* (2012),
Problem P05.01 — "Gmehling 2012". Minimum refluxes quoted below are estimates by Underwood's
equation for a binary with the relative volatility at the feed's bubble point (computed here).
"""

from __future__ import annotations

NRTL = {
    ("methanol", "water"): ('dg = ["-253.88 cal/mol", "845.21 cal/mol"]', 0.2994, "SVNA"),
    ("acetone", "water"): ('dg = ["631.05 cal/mol", "1197.41 cal/mol"]', 0.5343, "SVNA"),
    ("acetone", "methanol"): ('dg = ["184.70 cal/mol", "222.64 cal/mol"]', 0.3084, "SVNA"),
    ("methanol", "benzene"): ('dg = ["730.09 cal/mol", "1175.41 cal/mol"]', 0.4743, "SVNA"),
    ("ethanol", "toluene"): ('dg = ["713.57 cal/mol", "1147.86 cal/mol"]', 0.5292, "SVNA"),
    ("ethanol", "water"): ("constant_term = [-0.178, 1.963]", 0.2974, "Gmehling 2012"),
}

WILSON = {
    ("methanol", "water"): ('dlambda = ["107.38 cal/mol", "469.55 cal/mol"]', "SVNA"),
}
WILSON_VOLUMES = {"methanol": "40.73 cm**3/mol", "water": "18.07 cm**3/mol"}


def thermo_table(model: str, names: list[str], enthalpy: str = "rigorous") -> str:
    lines = ["[thermo]", f'liquid = "{model}"', f'enthalpy = "{enthalpy}"']
    if model == "nrtl":
        for (i, j), (params, alpha, source) in NRTL.items():
            if i in names and j in names:
                lines += [f"[thermo.nrtl.{i}.{j}]", params, f"alpha = {alpha}", f'source = "{source}"']
    if model == "wilson":
        for (i, j), (params, source) in WILSON.items():
            if i in names and j in names:
                lines += [f"[thermo.wilson.{i}.{j}]", params, f'source = "{source}"']
        lines += ["[thermo.wilson_volumes]"] + [f'{n} = "{v}"' for n, v in WILSON_VOLUMES.items() if n in names]
    return "\n".join(lines)


def quoted(name: str) -> str:
    return f'"{name}"' if not name.replace("_", "").isalnum() else name


def case_text(
    title: str,
    names: list[str],
    feed: dict,
    specs: str,
    *,
    stages: int,
    feed_stage: int,
    model: str = "ideal",
    enthalpy: str = "rigorous",
    pressure: str = "101.325 kPa",
    drop: str = "0 Pa",
    condenser: str = "total",
    efficiency: str = "1.0",
    feed_condition: str = "vapor_fraction = 0.0",
    flow: str = "100 kmol/h",
    extra: str = "",
) -> str:
    composition = ", ".join(f"{quoted(k)} = {v}" for k, v in feed.items())
    names_list = ", ".join(f'"{n}"' for n in names)
    return f"""
title = "{title}"
[components]
names = [{names_list}]
{thermo_table(model, names, enthalpy)}
[column]
stages = {stages}
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "{pressure}"
pressure.drop_per_stage = "{drop}"
efficiency = {efficiency}
{extra}
[[feeds]]
stage = {feed_stage}
flow = "{flow}"
composition = {{ {composition} }}
{feed_condition}
[specs]
{specs}
"""


MW = ["methanol", "water"]
EW = ["ethanol", "water"]
BT = ["benzene", "toluene"]
# ten components whose critical temperatures all lie above the column's (a Psat-based K-value
# needs every component below its critical point)
TEN = ["isopentane", "n-pentane", "cyclopentane", "isohexane", "n-hexane", "benzene", "cyclohexane", "n-heptane", "toluene", "n-octane"]

C2_C5 = ["ethane", "propane", "isobutane", "n-butane", "n-pentane"]

HARD_CASES: dict[str, str] = {
    # --- purities at 99.99 %
    "bt-9999-both-ends": case_text("benzene/toluene, 99.99 % at both ends", BT, {"benzene": 0.5, "toluene": 0.5},
        "distillate = { benzene = 0.9999 }\nbottoms = { toluene = 0.9999 }", stages=45, feed_stage=23),
    "mw-9999-methanol": case_text("methanol 99.99 % overhead", MW, {"methanol": 0.4, "water": 0.6},
        "reflux_ratio = 2.5\ndistillate = { methanol = 0.9999 }", stages=40, feed_stage=25, model="nrtl"),
    "mw-9999-water": case_text("water 99.99 % bottoms", MW, {"methanol": 0.3, "water": 0.7},
        "reflux_ratio = 1.2\nbottoms = { water = 0.9999 }", stages=30, feed_stage=15, model="nrtl"),
    "acetone-water-99": case_text("acetone 99 % from water (wide boiling, strongly non-ideal, tangent pinch near pure acetone)", ["acetone", "water"],
        {"acetone": 0.2, "water": 0.8}, "reflux_ratio = 6.0\ndistillate = { acetone = 0.99 }", stages=35, feed_stage=25, model="nrtl"),
    # --- reflux close to the minimum (binary Underwood estimate, alpha at the feed bubble point)
    "bt-reflux-1.05-min": case_text("benzene/toluene at 1.05 x minimum reflux (R_min ~ 1.15)", BT, {"benzene": 0.5, "toluene": 0.5},
        "reflux_ratio = 1.21\ndistillate = { benzene = 0.95 }", stages=80, feed_stage=40),
    "mw-reflux-near-min": case_text("methanol/water near minimum reflux", MW, {"methanol": 0.5, "water": 0.5},
        "reflux_ratio = 0.75\ndistillate = { methanol = 0.95 }", stages=60, feed_stage=40, model="nrtl"),
    # --- azeotropic systems operated near the azeotrope
    "ew-near-azeotrope": case_text("ethanol/water, distillate 0.86 (azeotrope ~0.90)", EW, {"ethanol": 0.1, "water": 0.9},
        "reflux_ratio = 6.0\ndistillate = { ethanol = 0.86 }", stages=50, feed_stage=40, model="nrtl"),
    "ew-tangent-pinch": case_text("ethanol/water, distillate 0.88, high reflux", EW, {"ethanol": 0.2, "water": 0.8},
        "reflux_ratio = 12.0\ndistillate = { ethanol = 0.88 }", stages=70, feed_stage=60, model="nrtl"),
    "acetone-methanol-azeotrope": case_text("acetone/methanol, distillate 0.76 (azeotrope ~0.79)", ["acetone", "methanol"],
        {"acetone": 0.5, "methanol": 0.5}, "reflux_ratio = 6.0\ndistillate = { acetone = 0.76 }", stages=50, feed_stage=30, model="nrtl"),
    "methanol-benzene-azeotrope": case_text("methanol/benzene, distillate near the azeotrope", ["methanol", "benzene"],
        {"methanol": 0.3, "benzene": 0.7}, "reflux_ratio = 3.0\nbottoms = { benzene = 0.995 }", stages=30, feed_stage=12, model="nrtl"),
    "ethanol-toluene-azeotrope": case_text("ethanol/toluene, toluene bottoms", ["ethanol", "toluene"],
        {"ethanol": 0.4, "toluene": 0.6}, "reflux_ratio = 2.0\nbottoms = { toluene = 0.995 }", stages=30, feed_stage=12, model="nrtl"),
    # --- wide boiling
    "pentane-nonane-wide": case_text("n-pentane/n-nonane (wide boiling: 36 to 151 degC)", ["n-pentane", "n-nonane"],
        {"n-pentane": 0.3, "n-nonane": 0.7}, 'reflux_ratio = 0.5\ndistillate = { "n-pentane" = 0.999 }',
        stages=15, feed_stage=6),
    # --- many components
    "ten-hydrocarbons": case_text("ten C5-C8 hydrocarbons at 2 bar", TEN, {n: 0.1 for n in TEN},
        'reflux_ratio = 2.0\nrecovery = { "n-hexane" = { distillate = 0.99 } }', stages=40, feed_stage=20, pressure="2 bar"),
    "twelve-hydrocarbons": case_text("twelve C5-C9 hydrocarbons", TEN + ["n-nonane", "p-xylene"],
        {n: round(1 / 12, 10) for n in TEN + ["n-nonane", "p-xylene"]},
        'reflux_ratio = 1.5\ndistillate_rate = "50 kmol/h"', stages=30, feed_stage=15).replace("composition = {", "normalize = true\ncomposition = {"),
    # --- long columns
    "propylene-propane-150": case_text("propylene/propane splitter, 150 stages at 18 bar (ideal vapor: rough)", ["propylene", "n-propane"],
        {"propylene": 0.6, "n-propane": 0.4}, 'reflux_ratio = 15.0\ndistillate = { propylene = 0.995 }', stages=150, feed_stage=100, pressure="18 bar", drop="500 Pa"),
    "ethylbenzene-xylene-200": case_text("ethylbenzene/p-xylene (relative volatility ~1.06), 200 stages", ["ethylbenzene", "p-xylene"],
        {"ethylbenzene": 0.5, "p-xylene": 0.5}, 'reflux_ratio = 60.0\ndistillate = { ethylbenzene = 0.95 }', stages=200, feed_stage=100),
    "isobutane-butane-120": case_text("isobutane/n-butane at 7 bar, 120 stages", ["isobutane", "n-butane"],
        {"isobutane": 0.4, "n-butane": 0.6}, 'reflux_ratio = 10.0\nbottoms = { "n-butane" = 0.98 }', stages=120, feed_stage=60, pressure="7 bar", drop="300 Pa"),
    # --- feed condition
    "mw-cold-feed": case_text("methanol/water, feed at 15 degC", MW, {"methanol": 0.35, "water": 0.65},
        "reflux_ratio = 1.5\nbottoms = { water = 0.999 }", stages=20, feed_stage=10, model="nrtl", feed_condition='temperature = "15 degC"'),
    "bt-superheated-feed": case_text("benzene/toluene, superheated vapor feed at 160 degC", BT, {"benzene": 0.5, "toluene": 0.5},
        "reflux_ratio = 4.5\ndistillate = { benzene = 0.99 }", stages=25, feed_stage=12, feed_condition='temperature = "160 degC"'),
    "mw-subcooled-reflux": case_text("methanol/water with 20 K subcooled reflux", MW, {"methanol": 0.35, "water": 0.65},
        'reflux_ratio = 1.4\nbottoms = { water = 0.995 }\nreflux_subcooling = "20 K"', stages=20, feed_stage=12, model="nrtl"),
    # --- side draws, efficiency
    "ternary-side-draws": case_text("acetone/methanol/water with side draws and a cooler", ["acetone", "methanol", "water"],
        {"acetone": 0.3, "methanol": 0.3, "water": 0.4}, "reflux_ratio = 4.0\nbottoms = { water = 0.99 }", stages=35, feed_stage=18, model="nrtl",
        extra='[[column.side_draws]]\nstage = 8\nphase = "liquid"\nflow = "10 kmol/h"\n[[column.side_draws]]\nstage = 28\nphase = "vapor"\nflow = "5 kmol/h"\n[[column.heaters]]\nstage = 14\nduty = "-100 kW"'),
    "mw-murphree-0.5": case_text("methanol/water, Murphree efficiency 0.5", MW, {"methanol": 0.35, "water": 0.65},
        "reflux_ratio = 2.0\nbottoms = { water = 0.999 }", stages=50, feed_stage=30, model="nrtl", efficiency="0.5"),
    "alkanes-murphree-0.5": case_text("five alkanes, Murphree efficiency 0.5", ["n-pentane", "n-hexane", "n-heptane", "n-octane", "n-nonane"],
        {"n-pentane": 0.2, "n-hexane": 0.2, "n-heptane": 0.2, "n-octane": 0.2, "n-nonane": 0.2},
        'reflux_ratio = 2.0\ndistillate_rate = "40 kmol/h"', stages=40, feed_stage=20, efficiency="0.5"),
    "alkanes-200-distributing": case_text("five alkanes, 200 stages, n-hexane/n-octane at 99.9 % with n-heptane distributing "
        "(long pinch zones near minimum reflux)", ["n-pentane", "n-hexane", "n-heptane", "n-octane", "n-nonane"],
        {"n-pentane": 0.2, "n-hexane": 0.2, "n-heptane": 0.2, "n-octane": 0.2, "n-nonane": 0.2},
        "recovery = { n-hexane = { distillate = 0.999 }, n-octane = { bottoms = 0.999 } }", stages=200, feed_stage=100),
    # --- pressure
    "bt-vacuum": case_text("benzene/toluene under vacuum (15 kPa top)", BT, {"benzene": 0.5, "toluene": 0.5},
        "reflux_ratio = 2.5\ndistillate = { benzene = 0.99 }", stages=30, feed_stage=15, pressure="15 kPa", drop="300 Pa"),
    "toluene-xylene-vacuum": case_text("toluene/o-xylene at 10 kPa", ["toluene", "o-xylene"], {"toluene": 0.5, "o-xylene": 0.5},
        'reflux_ratio = 2.0\ndistillate = { toluene = 0.995 }', stages=40, feed_stage=20, pressure="10 kPa", drop="200 Pa"),
    "pentane-hexane-pressure": case_text("n-pentane/n-hexane at 10 bar", ["n-pentane", "n-hexane"], {"n-pentane": 0.5, "n-hexane": 0.5},
        'reflux_ratio = 3.0\ndistillate = { "n-pentane" = 0.98 }', stages=40, feed_stage=20, pressure="10 bar"),
    # --- pressure columns, both phases from an equation of state (k_ij = 0; components above
    # their critical temperature on some stages)
    "c2-c5-depropanizer-pr": case_text("depropanizer at 16 bar, Peng-Robinson", C2_C5, {"ethane": 0.02, "propane": 0.38,
        "isobutane": 0.15, "n-butane": 0.25, "n-pentane": 0.20}, "recovery = { propane = { distillate = 0.99 }, isobutane = { bottoms = 0.98 } }",
        stages=40, feed_stage=20, model="peng-robinson", pressure="16 bar", drop="0.7 kPa"),
    "c3-splitter-pr": case_text("propylene/propane at 18 bar, 150 stages, reflux about 14", ["propylene", "propane"],
        {"propylene": 0.65, "propane": 0.35}, "distillate = { propylene = 0.995 }\nrecovery = { propylene = { distillate = 0.98 } }",
        stages=150, feed_stage=95, model="peng-robinson", pressure="18 bar", drop="0.5 kPa"),
    "deethanizer-partial-srk": case_text("deethanizer at 25 bar, partial condenser, SRK", ["methane"] + C2_C5,
        {"methane": 0.01, "ethane": 0.24, "propane": 0.36, "isobutane": 0.12, "n-butane": 0.17, "n-pentane": 0.10},
        "recovery = { ethane = { distillate = 0.98 }, propane = { bottoms = 0.99 } }", stages=30, feed_stage=12,
        model="soave-redlich-kwong", pressure="25 bar", drop="0.7 kPa", condenser="partial"),
    "debutanizer-wide-boiling-pr": case_text("debutanizer at 10 bar, propane to n-octane feed", ["propane", "n-butane", "n-pentane",
        "n-hexane", "n-octane"], {"propane": 0.1, "n-butane": 0.3, "n-pentane": 0.25, "n-hexane": 0.2, "n-octane": 0.15},
        "recovery = { n-butane = { distillate = 0.99 }, n-pentane = { bottoms = 0.98 } }", stages=30, feed_stage=14,
        model="peng-robinson", pressure="10 bar", drop="0.7 kPa"),
    "deethanizer-near-critical-top-pr": case_text("deethanizer at 38 bar: the top stage 12 K below the critical temperature of its vapor (about 30 degC at 53 bar, Peng-Robinson)",
        ["methane"] + C2_C5[:3], {"methane": 0.03, "ethane": 0.35, "propane": 0.42, "isobutane": 0.20},
        "recovery = { ethane = { distillate = 0.97 }, propane = { bottoms = 0.98 } }", stages=30, feed_stage=12,
        model="peng-robinson", pressure="38 bar", drop="0.7 kPa", condenser="partial"),
    "c4-splitter-pr": case_text("isobutane/n-butane at 7 bar, 100 stages, Peng-Robinson with the pair's k_ij",
        ["isobutane", "n-butane"], {"isobutane": 0.4, "n-butane": 0.6},
        'distillate = { isobutane = 0.97 }\nbottoms = { "n-butane" = 0.98 }', stages=100, feed_stage=50,
        model="peng-robinson", pressure="7 bar", drop="0.5 kPa",
        extra='[thermo.interaction.isobutane.n-butane]\nk = -0.0004\nsource = "Knapp et al. 1982, DECHEMA VI (from memory)"'),
    "lpg-splitter-srk-17bar": case_text("propane/n-butane at 17 bar (reboiler within 25 K of n-butane's critical temperature), SRK",
        ["propane", "n-butane"], {"propane": 0.5, "n-butane": 0.5},
        "distillate = { propane = 0.98 }\nrecovery = { propane = { distillate = 0.98 } }", stages=30, feed_stage=15,
        model="soave-redlich-kwong", pressure="17 bar", drop="0.7 kPa"),
    "ethane-propane-30bar-pr": case_text("ethane/propane at 30 bar: ethane above its critical temperature below the top",
        ["ethane", "propane"], {"ethane": 0.4, "propane": 0.6}, "distillate = { ethane = 0.98 }\nbottoms = { propane = 0.99 }",
        stages=40, feed_stage=18, model="peng-robinson", pressure="30 bar", drop="0.7 kPa"),
    # --- models and specs
    "mw-wilson-high-purity": case_text("methanol/water, Wilson, 99.9 % both ends", MW, {"methanol": 0.5, "water": 0.5},
        "distillate = { methanol = 0.999 }\nbottoms = { water = 0.999 }", stages=40, feed_stage=25, model="wilson"),
    "ew-cmo": case_text("ethanol/water, CMO enthalpies", EW, {"ethanol": 0.1, "water": 0.9},
        "reflux_ratio = 4.0\nbottoms = { water = 0.999 }", stages=30, feed_stage=22, model="nrtl", enthalpy="cmo"),
    "mw-duties": case_text("methanol/water specified by reboiler duty and reflux", MW, {"methanol": 0.35, "water": 0.65},
        'reflux_ratio = 1.6\nreboiler_duty = "1000 kW"', stages=20, feed_stage=12, model="nrtl"),
}


#: Pressure columns that have no answer, each refused (an error, or a result marked not
#: converged) with a message that must name the reason (a regular expression).
REFUSED_CASES: dict[str, tuple[str, str]] = {
    "deethanizer-above-critical-pressure-pr": (
        case_text("deethanizer at 60 bar: above the critical pressure of its feed's mixture (about 50 bar, Peng-Robinson)",
            ["methane"] + C2_C5, {"methane": 0.01, "ethane": 0.24, "propane": 0.36, "isobutane": 0.12, "n-butane": 0.17,
            "n-pentane": 0.10}, "recovery = { ethane = { distillate = 0.98 }, propane = { bottoms = 0.99 } }", stages=30,
            feed_stage=12, model="peng-robinson", pressure="60 bar", drop="0.7 kPa", condenser="partial"),
        r"above the critical pressure of its mixture, [0-9.]+ bar \(critical temperature [0-9.]+ K",
    ),
    "lpg-splitter-above-critical-pressure-pr": (
        case_text("propane/n-butane at 45 bar: above every critical pressure of the pair (at most about 43 bar)",
            ["propane", "n-butane"], {"propane": 0.5, "n-butane": 0.5},
            "distillate = { propane = 0.98 }\nrecovery = { propane = { distillate = 0.98 } }", stages=20, feed_stage=10,
            model="peng-robinson", pressure="45 bar", drop="0.7 kPa"),
        r"above the critical pressure of its mixture, [0-9.]+ bar",
    ),
}
