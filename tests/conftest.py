"""Shared helpers for the tests: small cases written inline as TOML."""

from __future__ import annotations

import os
import tempfile
import textwrap
from pathlib import Path

import pytest

from solver.case import loads_case

# the fitted curves go to a cache folder of this test session (inherited by the commands the
# tests start), never to the user's own cache
os.environ.setdefault("TRAYSTACK_CACHE_DIR", tempfile.mkdtemp(prefix="traystack-test-cache-"))


def case_from_text(text: str, name: str = "<test case>"):
    return loads_case(textwrap.dedent(text), source_file=name)


#: an invented component (Antoine constants of our own, boiling at 362.95 K) with no heat
#: capacity and no heat of vaporization: only the ``cmo`` enthalpy model can take it; ``t_max``
#: the top of its vapor-pressure range
USER_SOLVENT_A = """
[components.data.solvent_a]
molar_mass = "0.08 kg/mol"
critical_temperature = "560 K"
critical_pressure = "4.5 MPa"
vapor_pressure = {{ form = "antoine", A = 4.0, B = 1250.0, C = -50.0, base = 10, pressure_unit = "bar", temperature_unit = "K", T_min = "280 K", T_max = "{t_max}" }}
source = "invented for this test"
"""


BINARY_NRTL = """
title = "methanol-water test column"
[components]
names = ["methanol", "water"]
[thermo]
liquid = "nrtl"
enthalpy = "{enthalpy}"
[thermo.nrtl.methanol.water]
dg = ["-253.88 cal/mol", "845.21 cal/mol"]
alpha = 0.2994
source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
[column]
stages = {stages}
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "101.325 kPa"
pressure.drop_per_stage = "0.5 kPa"
efficiency = {efficiency}
[[feeds]]
stage = {feed_stage}
flow = "100 kmol/h"
composition = {{ methanol = 0.35, water = 0.65 }}
temperature = "{feed_temperature}"
[specs]
{specs}
"""


def methanol_water_case(
    *,
    enthalpy: str = "rigorous",
    stages: int = 12,
    condenser: str = "total",
    efficiency: float = 1.0,
    feed_stage: int = 7,
    feed_temperature: str = "65 degC",
    specs: str = 'reflux_ratio = 1.4\nbottoms = { water = 0.995 }',
):
    return case_from_text(
        BINARY_NRTL.format(
            enthalpy=enthalpy,
            stages=stages,
            condenser=condenser,
            efficiency=efficiency,
            feed_stage=feed_stage,
            feed_temperature=feed_temperature,
            specs=specs,
        )
    )


@pytest.fixture
def make_case():
    return case_from_text


#: The network example of tests/data (two columns, three connections), as parsed TOML.
NETWORK_EXAMPLE = Path(__file__).parent / "data" / "network_side_stripper.toml"


def network_example_case(change=None):
    """The network example read as the case file "net.toml", after ``change(data)`` edits a
    deep copy of its parsed TOML."""
    import tomllib

    from solver.case import parse_case

    data = tomllib.loads(NETWORK_EXAMPLE.read_text())
    if change:
        change(data)
    return parse_case(data, source_file="net.toml")
