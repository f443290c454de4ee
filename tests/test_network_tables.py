"""Reading column networks (solver/case/network_tables.py): [[columns]], [[connections]],
[[heat_links]], feeds that name their column, and the top-level [[specs]] list. Every bad value
is a CaseError naming the file, the dotted key and the value."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import NETWORK_EXAMPLE, network_example_case
from solver.case import load_case, parse_case
from solver.errors import CaseError

# the shipped single-column cases (the network cases are [[columns]] files)
CASES = sorted(p for p in (Path(__file__).parent.parent / "cases").glob("*.toml") if "[[columns]]" not in p.read_text())
EXAMPLE = NETWORK_EXAMPLE
parsed = network_example_case


def refused(change, *parts):
    with pytest.raises(CaseError) as caught:
        parsed(change)
    message = str(caught.value)
    assert message.startswith("net.toml: ")
    for part in parts:
        assert part in message, message
    return message


def test_example_network_is_read_in_si():
    case = load_case(EXAMPLE)
    network = case.network
    assert case.column is None and case.specs == ()
    assert [s.name for s in network.columns] == ["main", "stripper"]
    main, stripper = network.columns
    assert main.column.stages == 20 and main.column.condenser == "total"
    assert main.column.pressures[0] == pytest.approx(1.1e5) and main.column.pressures[1] == pytest.approx(1.107e5)
    assert main.column.efficiencies[5] == 0.8 and main.column.efficiencies[0] == 1.0
    assert [spec.kind for spec in main.specs] == ["reflux_ratio", "mole_fraction"]
    assert stripper.column.condenser == "none" and [spec.kind for spec in stripper.specs] == ["boilup_ratio"]
    to_stripper, vapor_back, pumparound = network.connections
    assert to_stripper.free and to_stripper.flow is None and to_stripper.key == "connections[0]"
    assert vapor_back.takes_all and vapor_back.phase == "vapor"
    assert pumparound.fraction == 0.3 and pumparound.exchanger.kind == "cooling"
    assert pumparound.exchanger.duty == pytest.approx(-5e5)
    assert network.feed_columns == ("main",)
    assert case.feeds[0].flow == pytest.approx(100 / 3.6)
    (spec,) = network.specs
    assert (spec.kind, spec.equipment, spec.column) == ("product_flow", "stripper.bottoms", "stripper")
    assert spec.value == pytest.approx(30 / 3.6)


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_single_column_cases_are_unchanged(path):
    """A single-column file reads as before: no network, its [column] and specs as they were."""
    case = load_case(path)
    assert case.network is None and case.column is not None
    assert case.column.stages >= 2 and len(case.specs) >= 1


def _set(path, value):
    def change(data):
        node = data
        for part in path[:-1]:
            node = node[part]
        node[path[-1]] = value
    return change


@pytest.mark.parametrize(
    "path, value, parts",
    [
        (("connections", 0, "to", "stage"), 9, ["connections[0].to.stage", "column 'stripper' has 5 stages", "9"]),
        (("connections", 0, "to", "column"), "striper", ["connections[0].to.column", "did you mean 'stripper'"]),
        (("connections", 0, "from", "phase"), "vapour", ["connections[0].from.phase", "'vapour'", "did you mean 'vapor'"]),
        (("connections", 0, "from", "phase"), "solid", ["connections[0].from.phase", "'liquid', 'vapor'"]),
        (("connections", 0, "flow"), "-3 kmol/h", ["connections[0].flow", "out of range"]),
        (("connections", 0, "flow"), "3 kW", ["connections[0].flow"]),
        (("connections", 2, "fraction"), 1.5, ["connections[2].fraction", "1.5"]),
        (("connections", 2, "cooling"), {"duty": "2 MW"}, ["connections[2].cooling.duty", "2 MW"]),
        (("connections", 2, "cooling"), {"duty": "-2 MW", "return_temperature": "90 degC"}, ["connections[2].cooling", "exactly one"]),
        (("connections", 1, "name"), "pumparound", ["connections[2].name", "another connection has this name", "pumparound"]),
        (("connections", 1, "name"), "main", ["connections[1].name", "already used by a column"]),
        (("connections", 1, "name"), "a.b", ["connections[1].name", "dot"]),
        (("columns", 1, "name"), "main", ["columns[1].name", "another column has this name"]),
        (("columns", 1, "stages"), 0, ["columns[1].stages"]),
        (("columns", 1, "reboiler"), "total", ["columns[1].reboiler", "'total'"]),
        (("columns", 0, "specs", "reflux_ratio"), -1, ["columns[0].specs.reflux_ratio", "-1"]),
        (("columns", 1, "specs", "reflux_ratio"), 2.0, ["columns[1].specs.reflux_ratio", "no condenser"]),
        (("columns", 0, "tray_spacing"), "0.6 m", ["columns[0].tray_spacing", "unknown key"]),
        (("feeds", 0, "column"), "mian", ["feeds[0].column", "did you mean 'main'"]),
        (("feeds", 0, "stage"), 30, ["feeds[0].stage", "30"]),
        (("specs", 0, "on"), "stripper.botoms", ["specs[0].on", "did you mean 'stripper.bottoms'"]),
        (("specs", 0, "on"), "to-stripper", []),  # a free connection's rate: allowed
        (("specs",), {"reflux_ratio": 2.0}, ["specs", "[[specs]]"]),
        (("heat_links",), [{"from": "main.condenser", "to": "stripper.condenser"}], ["heat_links[0].to", "stripper.condenser"]),
        (("heat_links",), [{"from": "stripper.condenser", "to": "main.reboiler"}], ["heat_links[0].from", "no condenser"]),
        (("heat_links",), [{"from": "main.condenser", "to": "main.reboiler"}], ["heat_links[0].to", "its own reboiler"]),
        (("heat_links",), [{"from": "nowhere.condenser", "to": "stripper.reboiler"}], ["heat_links[0].from", "no column of this name"]),
        (("column",), {"stages": 5}, ["column", "not both"]),
    ],
)
def test_bad_network_values_name_file_key_and_value(path, value, parts):
    if not parts:
        assert parsed(_set(path, value)).network.specs[0].equipment == "to-stripper"
        return
    refused(_set(path, value), *parts)


def test_both_flow_and_fraction_is_an_error():
    refused(_set(("connections", 2, "flow"), "10 kmol/h"), "connections[2]", "flow or fraction, not both")


def test_shares_of_one_stage_cannot_exceed_all_of_it():
    def change(data):
        data["connections"].append({"name": "second-draw", "from": {"column": "main", "stage": 8, "phase": "liquid"},
                                    "to": {"column": "main", "stage": 3}, "fraction": 0.8})
    refused(change, "connections", "'pumparound', 'second-draw'", "more than all the liquid of stage 8")


def test_a_total_condenser_sends_no_vapor():
    refused(_set(("connections", 2, "from"), {"column": "main", "stage": 1, "phase": "vapor"}),
            "connections[2].from.phase", "total condenser")


def test_a_connection_to_its_own_stage():
    refused(_set(("connections", 2, "to"), {"column": "main", "stage": 8}), "connections[2].to", "another stage")


def test_network_feed_needs_its_column():
    refused(lambda data: data["feeds"][0].pop("column"), "feeds[0].column", "missing")


def test_connections_need_columns():
    def change(data):
        data["column"] = {"stages": 5, "condenser": "total", "reboiler": "partial", "pressure": "1 bar"}
        data.pop("columns")
    refused(change, "connections", "[[columns]]")


@pytest.mark.parametrize(
    "spec, parts",
    [
        ({"on": "pumparound", "fraction": 0.2, "flow": "3 kmol/h"}, ["specs[0]", "exactly one quantity"]),
        ({"on": "stripper-vapor", "duty": "-1 MW"}, ["specs[0].duty", "no cooling or heating"]),
        ({"on": "main.condenser", "duty": "1 MW"}, ["specs[0].duty", "negative"]),
        ({"on": "main.reboiler", "duty": "-1 MW"}, ["specs[0].duty", "positive"]),
        ({"on": "main.distillate", "fraction": 0.2}, ["specs[0].fraction", "is a product"]),
        ({"on": "main", "temperature": "90 degC"}, ["specs[0].stage"]),
        ({"on": "main", "stage": 25, "temperature": "90 degC"}, ["specs[0].stage", "20 stages"]),
        ({"on": "main.bottoms", "mole_fraction": {"xylene": 0.5}}, ["specs[0].mole_fraction.xylene", "did you mean 'o-xylene'"]),
        ({"on": "stripper", "reflux_ratio": 2.0}, ["specs[0].reflux_ratio", "no condenser"]),
    ],
)
def test_bad_network_specs(spec, parts):
    refused(_set(("specs",), [spec]), *parts)


def test_network_specs_of_every_kind_are_read():
    specs = [
        {"on": "main", "stage": 15, "temperature": "120 degC"},
        {"on": "main.distillate", "recovery": {"benzene": 0.99}},
        {"on": "main.bottoms", "mole_fraction": {"o-xylene": 0.3}},
        {"on": "main.condenser", "duty": "-3 MW"},
        {"on": "to-stripper", "fraction": 0.4},
        {"on": "main", "boilup_ratio": 2.0},
    ]
    case = parsed(_set(("specs",), specs))
    kinds = [(s.kind, s.equipment, s.column, s.stage, s.component) for s in case.network.specs]
    assert kinds == [
        ("stage_temperature", "main", "main", 15, None),
        ("recovery", "main.distillate", "main", None, "benzene"),
        ("mole_fraction", "main.bottoms", "main", None, "o-xylene"),
        ("exchanger_duty", "main.condenser", "main", None, None),
        ("connection_fraction", "to-stripper", None, None, None),
        ("boilup_ratio", "main", "main", None, None),
    ]
    assert case.network.specs[0].value == pytest.approx(393.15)


@settings(max_examples=80, deadline=None)
@given(st.one_of(st.integers(-10**6, 10**6), st.floats(allow_nan=True), st.text(max_size=12), st.booleans(),
                 st.lists(st.integers(), max_size=2), st.dictionaries(st.text(max_size=3), st.integers(), max_size=2)))
def test_hostile_connection_values_never_escape_as_other_errors(value):
    """Any value in any connection key is read or refused with a CaseError, never a traceback."""
    for path in (("connections", 0, "to", "stage"), ("connections", 2, "fraction"), ("connections", 0, "flow"),
                 ("connections", 1, "from", "phase"), ("connections", 0, "to", "column"), ("heat_links",),
                 ("connections", 2, "cooling"), ("specs", 0, "on"), ("feeds", 0, "column")):
        try:
            parsed(_set(path, value))
        except CaseError as exc:
            assert str(exc).startswith("net.toml: ")


def test_readme_network_example_reads():
    """The network example of README.md ("Column networks") is a valid case with these
    components, and its degrees of freedom match its specs."""
    from solver.network_graph import check_network

    readme = (Path(__file__).parent.parent / "README.md").read_text()
    section = readme[readme.index("### Column networks"):]
    block = section[section.index("```toml") + len("```toml"): section.index("```", section.index("```toml") + 7)]
    header = '[components]\nnames = ["benzene", "toluene", "o-xylene"]\n'
    case = parse_case(tomllib.loads(header + block), source_file="README.md")
    assert [s.name for s in case.network.columns] == ["main", "stripper"]
    assert [c.name for c in case.network.connections] == ["to-stripper", "stripper-vapor", "pumparound"]
    assert len(check_network(case).degrees_of_freedom) == 4


def test_vapor_sent_to_a_higher_pressure_is_a_warning_naming_both_pressures():
    """Vapor flows only to a lower pressure. The example's stripper (top 1.15 bar) sends its
    vapor to main stage 11 (1.1 bar + 10 x 0.7 kPa = 1.17 bar): the case is read, with a warning
    naming the connection and both pressures. With the stripper at 1.18 bar there is none."""
    (warning,) = parsed().warnings
    for part in ("net.toml", "connections[1]", "'stripper-vapor'", "stripper stage 1 at 115 kPa", "main stage 11 at 117 kPa"):
        assert part in warning, warning

    def raised(data):
        data["columns"][1]["pressure"] = {"top": "1.18 bar", "drop_per_stage": "0.5 kPa"}

    assert parsed(raised).warnings == ()


def test_a_connection_may_name_a_product_instead_of_a_stage():
    """``from = { column, product }``: the distillate leaves stage 1 in its vapor slot (on a
    total condenser, the liquid distillate), the bottoms the last stage's liquid."""
    def products(data):
        data["connections"][1]["from"] = {"column": "main", "product": "distillate"}
        data["connections"][0]["from"] = {"column": "main", "product": "bottoms"}

    to_stripper, sent = parsed(products).network.connections[:2]
    assert (sent.from_column, sent.from_stage, sent.phase, sent.from_product) == ("main", 1, "vapor", "distillate")
    assert (to_stripper.from_stage, to_stripper.phase, to_stripper.from_product) == (20, "liquid", "bottoms")


def test_a_connection_from_a_product_is_refused_where_there_is_none():
    def no_condenser(data):
        data["connections"][1]["from"] = {"column": "stripper", "product": "distillate"}

    refused(no_condenser, "connections[1].from.product", "'stripper' has no condenser", "stage = 1, phase")

    def unknown(data):
        data["connections"][1]["from"] = {"column": "main", "product": "side"}

    refused(unknown, "connections[1].from.product", "'side'", "distillate")

    def both(data):
        data["connections"][1]["from"] = {"column": "main", "product": "distillate", "stage": 1}

    refused(both, "connections[1].from.stage", "unknown key")


def test_vapor_from_a_total_condenser_is_refused_with_the_product_form():
    def vapor(data):
        data["connections"][1]["from"] = {"column": "main", "stage": 1, "phase": "vapor"}

    refused(vapor, "connections[1].from.phase", "total condenser", 'product = "distillate"')


def test_taking_all_of_a_total_condensers_reflux_is_refused_with_the_product_form():
    def all_reflux(data):
        data["connections"][1]["from"] = {"column": "main", "stage": 1, "phase": "liquid"}

    refused(all_reflux, "connections[1].from", "its reflux", 'product = "distillate"')

    def share_of_reflux(data):
        data["connections"][1]["from"] = {"column": "main", "stage": 1, "phase": "liquid"}
        data["connections"][1]["fraction"] = 0.1

    assert parsed(share_of_reflux).network.connections[1].fraction == 0.1  # a share of the reflux stays possible
