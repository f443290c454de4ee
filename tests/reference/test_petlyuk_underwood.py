"""Underwood exactness for a thermally coupled (Petlyuk) network.

Halvorsen & Skogestad (Ind. Eng. Chem. Res. 42 (2003) 596, 605 and 616) show that, for constant
relative volatilities and constant molar overflow, a Petlyuk arrangement with infinitely many
stages needs as its minimum vapor the highest peak of the feed's Vmin diagram, when its
prefractionator runs on the diagram's optimal segment. Only the abstract of part 3 (pp. 616-629)
was read here, in a stored copy: "the minimum-energy solution in a complex integrated Petlyuk
arrangement is equal to the most difficult split between any pair of the products ... simply
as the highest peak"; the optimal segment below is derived here. The rigorous network of
:mod:`solver.network_engine` must therefore approach that minimum from above as its sections
grow long. Checked here:

* the thermo gives exactly the model's assumptions: three invented components with Antoine
  vapor pressures of one B and one C (so ``alpha = 10**(A_i - A_j)`` is the same at every
  temperature: 4 : 2 : 1) and ``enthalpy = "cmo"`` (equal constant latent heats, no sensible
  heat), an equimolar saturated-liquid feed: the feed of Halvorsen & Skogestad's ternary example
  (see test_vmin_example.py);
* the prefractionator's two connections carry the flows of the middle of the diagram's optimal
  segment (computed below from the diagram), the main column's specs are distillate and bottoms
  purities of 0.9999 and a side draw of the feed's middle component;
* with 40 and with 50 stages per main-column section (prefractionator 120 stages) the rigorous
  boilup lies within 1 % of the Underwood minimum and above it, and falls as the sections grow;
* the boilup is never below the Underwood minimum of the split the rigorous network actually
  makes (the peaks evaluated with its non-sharp product flows, Underwood's second equation at
  the feed's roots): with products of finite purity the sharp-split minimum is not a strict
  lower bound (at 70 stages per section the rigorous boilup came 0.02 % below it, computed
  here), the actual-split one is.

Every check value is "computed here" from Underwood's equations; the tolerance 1 % is the
issue's; the sections are long enough that the finite-stage excess (0.1 to 0.8 %) is well
inside it.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import case_from_text
from solver.audit.network_vmin import network_vmin_audit
from solver.network_engine import simulate_network
from solver.newton import NewtonOptions
from solver.shortcut.vmin_diagram import minimum_vapor_diagram

ALPHA = np.array([4.0, 2.0, 1.0])
FEED = np.array([1.0, 1.0, 1.0]) / 3.0  # mol/s, saturated liquid
PURITY = 0.9999
PREFRACTIONATOR_STAGES = 120

COMPONENT = """
[components.data.{name}]
molar_mass = "0.08 kg/mol"
critical_temperature = "650 K"
critical_pressure = "4 MPa"
vapor_pressure = {{ form = "antoine", A = {A!r}, B = 1400.0, C = -50.0, base = 10, pressure_unit = "Pa", temperature_unit = "K" }}
ideal_gas_cp = {{ form = "constant", value = "120 J/mol/K" }}
heat_of_vaporization = {{ form = "watson", value = "32 kJ/mol", at = "350 K" }}
source = "invented test component"
"""

NETWORK = """
title = "constant-alpha Petlyuk arrangement (test)"
[components]
names = ["light", "middle", "heavy"]
{components}
[thermo]
liquid = "ideal"
enthalpy = "cmo"

[[columns]]
name = "main"
stages = {main}
condenser = "total"
reboiler = "partial"
pressure = "1 atm"
side_draws = [{{ name = "side", stage = {side}, phase = "liquid", flow = "{side_flow!r} mol/s" }}]
[columns.specs]
distillate = {{ light = {purity} }}
bottoms = {{ heavy = {purity} }}

[[columns]]
name = "prefractionator"
stages = {pre}
condenser = "none"
reboiler = "none"
pressure = "1 atm"

[[connections]]
name = "reflux"
from = {{ column = "main", stage = {upper}, phase = "liquid" }}
to = {{ column = "prefractionator", stage = 1 }}
flow = "{reflux!r} mol/s"
[[connections]]
name = "overhead"
from = {{ column = "prefractionator", stage = 1, phase = "vapor" }}
to = {{ column = "main", stage = {upper} }}
[[connections]]
name = "boilup"
from = {{ column = "main", stage = {lower}, phase = "vapor" }}
to = {{ column = "prefractionator", stage = {pre} }}
flow = "{vapor!r} mol/s"
[[connections]]
name = "underflow"
from = {{ column = "prefractionator", stage = {pre}, phase = "liquid" }}
to = {{ column = "main", stage = {lower} }}

[[feeds]]
name = "feed"
column = "prefractionator"
stage = {feed_stage}
flow = "1 mol/s"
composition = {{ light = {z0!r}, middle = {z1!r}, heavy = {z2!r} }}
vapor_fraction = 0.0
"""


def optimal_segment_middle(diagram) -> tuple[float, float]:
    """The prefractionator's net overhead D1 and vapor V1 (mol/s) at the middle of the optimal
    segment of the Vmin diagram, for a feed whose B/C peak is the higher one (derived here from
    Underwood's equations, after Halvorsen & Skogestad's argument). The segment starts at the
    preferred split P_AC and runs along the line to P_BC (C removed sharply in the
    prefractionator, the B/C root theta_B active) until the main column's top section, which
    needs ``alpha_A d_A / (alpha_A - phi)`` with ``phi`` the prefractionator's own top root
    between alpha_B and alpha_A, needs as much vapor as the B/C peak."""
    (_, theta_b), peak = diagram.roots, diagram.highest_peak.vapor_top
    a, d_a = ALPHA, FEED[0]
    phi = a[0] - a[0] * d_a / peak  # the top root at which the top section needs the peak
    # on the P_AC - P_BC line: V = a_A d_A/(a_A - theta_b) + a_B d_B/(a_B - theta_b), and at the
    # segment's end also V = a_A d_A/(a_A - phi) + a_B d_B/(a_B - phi) = peak + a_B d_B/(a_B - phi)
    base = a[0] * d_a / (a[0] - theta_b)
    d_b_end = (peak - base) / (a[1] / (a[1] - theta_b) - a[1] / (a[1] - phi))
    start = diagram.points[(0, 2)]
    d_b = 0.5 * (start.distillate_flows[1] + d_b_end)
    assert start.distillate_flows[1] < d_b_end < FEED[1]
    vapor = base + a[1] * d_b / (a[1] - theta_b)
    return float(d_a + d_b), float(vapor)


def petlyuk_case(section: int, diagram):
    overhead, vapor = optimal_segment_middle(diagram)
    components = "".join(COMPONENT.format(name=name, A=9.2 + math.log10(float(a))) for name, a in zip(("light", "middle", "heavy"), ALPHA))
    return case_from_text(NETWORK.format(
        components=components, main=4 * section, side=2 * section, upper=section + 1, lower=3 * section,
        pre=PREFRACTIONATOR_STAGES, feed_stage=PREFRACTIONATOR_STAGES // 2, side_flow=float(FEED[1]), purity=PURITY,
        reflux=vapor - overhead, vapor=vapor, z0=float(FEED[0]), z1=float(FEED[1]), z2=float(FEED[2]),
    ), name=f"<constant-alpha Petlyuk, {section} stages a section>")


@pytest.fixture(scope="module")
def diagram():
    return minimum_vapor_diagram(ALPHA, FEED, 1.0)


@pytest.fixture(scope="module")
def solved(diagram):
    runs = {}
    for section in (40, 50):
        case = petlyuk_case(section, diagram)
        result = simulate_network(case, options=NewtonOptions(max_iterations=150))
        assert result.converged, result.message
        runs[section] = (case, result)
    return runs


def test_the_thermo_is_the_model_of_the_diagram(solved):
    case, result = solved[50]
    audit = network_vmin_audit(case, result, sequences=False)
    assert audit.components == ("light", "middle", "heavy")
    assert audit.relative_volatility == pytest.approx(tuple(ALPHA), rel=1e-9)
    assert audit.q == pytest.approx(1.0, abs=1e-9)
    # constant molar overflow: the vapor is the same below the condenser as out of the reboiler
    # (saturated-liquid feed, liquid side draw)
    assert audit.rigorous_vapor_to_condensers == pytest.approx(audit.rigorous_boilup, rel=1e-9)


def test_rigorous_boilup_approaches_the_underwood_minimum_from_above(solved, diagram):
    boilups = {}
    for section, (case, result) in solved.items():
        audit = network_vmin_audit(case, result, sequences=False)
        assert audit.petlyuk_minimum_boilup == pytest.approx(diagram.petlyuk_minimum_vapor, rel=1e-9)  # q = 1
        products = result.products
        assert products["main.distillate"]["composition"][0] >= PURITY - 1e-9
        assert products["main.bottoms"]["composition"][2] >= PURITY - 1e-9
        assert products["side"]["composition"][1] > 0.999  # by the mass balance, all three products are nearly sharp
        assert 1.0 <= audit.boilup_over_minimum <= 1.01, audit.boilup_over_minimum
        boilups[section] = audit.rigorous_boilup
    assert boilups[50] < boilups[40]  # longer sections, closer to the minimum


def test_boilup_never_below_the_minimum_of_the_split_actually_made(solved, diagram):
    theta_a, theta_b = diagram.roots
    for case, result in solved.values():
        top = result.products["main.distillate"]["flow"] * np.asarray(result.products["main.distillate"]["composition"])
        side = result.products["side"]["flow"] * np.asarray(result.products["side"]["composition"])
        peak_ab = float(np.sum(ALPHA * top / (ALPHA - theta_a)))
        peak_bc = float(np.sum(ALPHA * (top + side) / (ALPHA - theta_b)))
        boilup = network_vmin_audit(case, result, sequences=False).rigorous_boilup
        assert boilup >= max(peak_ab, peak_bc)
        # the actual split's minimum is close to the sharp one (products of 0.9999)
        assert max(peak_ab, peak_bc) == pytest.approx(diagram.petlyuk_minimum_vapor, rel=1e-3)
