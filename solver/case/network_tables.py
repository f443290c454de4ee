"""The tables of a column network: ``[[columns]]`` (each a chain of stages with its own
``[columns.specs]``), ``[[connections]]`` between stages, ``[[heat_links]]`` (one column's
condenser heating another's reboiler), ``[[feeds]]`` that name their column (a make-up's flow
may be "free": its rate is then an unknown that a spec sets) and the top-level
``[[specs]]`` list of specs on connections, products, exchangers and stages anywhere in the
network. Read into a frozen :class:`~solver.case.model.Network` (SI units); every error names
the file, the dotted key and the value.

Whether the specs match the degrees of freedom is counted by :mod:`solver.network_graph`.
"""

from __future__ import annotations

import difflib
from dataclasses import replace
from typing import Any, Mapping

from solver.case.column_table import MAX_STAGES, read_column_table
from solver.case.feeds_table import _read_feed
from solver.case.fields import (
    At,
    Field,
    check_keys,
    component_key,
    read_choice,
    read_fields,
    read_integer,
    read_list,
    read_quantity,
    read_table,
    read_text,
)
from solver.case.model import (
    ColumnSection,
    Connection,
    ConnectionExchanger,
    Feed,
    HeatLink,
    Network,
    NetworkSpec,
)
from solver.case.specs_table import PRODUCTS, read_specs_table
from solver.thermo.data import ComponentData

__all__ = ["MAX_COLUMNS", "NETWORK_TOP_KEYS", "network_warnings", "read_network"]

#: More columns than this is taken as a typing error, not a plant.
MAX_COLUMNS = 50
#: Top-level keys that only a network case has.
NETWORK_TOP_KEYS = ("columns", "connections", "heat_links")
_COLUMN_KEYS = ("name", "stages", "condenser", "reboiler", "pressure", "efficiency", "side_draws", "heaters", "specs")
_SPEC_VALUE_KEYS = (
    "flow", "fraction", "duty", "return_temperature", "temperature", "mole_fraction", "recovery",
    "reflux_ratio", "boilup_ratio",
)
_PARTS = ("condenser", "reboiler", "distillate", "bottoms")


def _read_name(value: Any, at: At) -> str:
    """A name of a column, connection, heat link or side draw: no dots (a dot separates a
    column's name from its part, as in ``main.condenser``)."""
    name = read_text(value, at, allow_empty=False, max_length=100)
    if "." in name or name != name.strip():
        at.fail("a name must not contain a dot or begin or end with a space", value, "a name such as \"main\" or \"to-stripper\"")
    return name


def _column_name(value: Any, columns: Mapping[str, ColumnSection], at: At) -> str:
    name = read_text(value, at, allow_empty=False, max_length=100)
    if name not in columns:
        close = difflib.get_close_matches(name, list(columns), n=1, cutoff=0.6)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        at.fail(f"no column of this name{hint}", value, "one of the [[columns]] names: " + ", ".join(columns))
    return name


def _stage(value: Any, section: ColumnSection, at: At) -> int:
    stages = section.column.stages
    if isinstance(value, int) and not isinstance(value, bool) and not 1 <= value <= stages:
        at.fail(f"column {section.name!r} has {stages} stages", value, f"a stage number from 1 to {stages}")
    return read_integer(value, at, minimum=1, maximum=stages, what="a stage number")


def _read_columns(value: Any, names: tuple[str, ...], at: At, component_data: Mapping[str, Any] | None = None) -> dict[str, ColumnSection]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[columns]], not [columns]", "a table", "[[columns]] tables")
    columns: dict[str, ColumnSection] = {}
    for index, entry in enumerate(read_list(value, at, min_length=1, max_length=MAX_COLUMNS)):
        entry_at = at.item(index)
        table = read_table(entry, entry_at, "a [[columns]] table")
        check_keys(table, entry_at, _COLUMN_KEYS, required=("name",))
        name = _read_name(table["name"], entry_at.child("name"))
        if name in columns:
            entry_at.child("name").fail("another column has this name", name, "a unique name")
        column = read_column_table({k: v for k, v in table.items() if k not in ("name", "specs")}, entry_at)
        specs, reflux_temperature, reflux_subcooling = read_specs_table(
            table.get("specs", {}), names, column, entry_at.child("specs"), component_data
        )
        column = replace(column, reflux_temperature=reflux_temperature, reflux_subcooling=reflux_subcooling)
        columns[name] = ColumnSection(name, column, specs)
    return columns


def _read_exchanger(kind: str, value: Any, at: At) -> ConnectionExchanger:
    table = read_table(value, at, "{ duty = ... } or { return_temperature = ... }")
    check_keys(table, at, ("duty", "return_temperature"))
    if len(table) != 1:
        at.fail("give exactly one of duty and return_temperature", dict(table), "duty = \"-2 MW\" (or \"free\") or return_temperature = \"90 degC\"")
    if "return_temperature" in table:
        temperature = read_quantity(table["return_temperature"], "temperature", at.child("return_temperature"), above=0.0)
        return ConnectionExchanger(kind, return_temperature=temperature)
    if table["duty"] == "free":
        return ConnectionExchanger(kind)
    bounds = {"below": 0.0} if kind == "cooling" else {"above": 0.0}
    duty = read_quantity(table["duty"], "power", at.child("duty"), **bounds)
    return ConnectionExchanger(kind, duty=duty)


def _read_connection(entry: Any, index: int, columns: Mapping[str, ColumnSection], at: At) -> Connection:
    table = read_table(entry, at, "a [[connections]] table")
    check_keys(table, at, ("name", "from", "to", "flow", "fraction", "cooling", "heating"), required=("name", "from", "to"))
    name = _read_name(table["name"], at.child("name"))
    source_at, destination_at = at.child("from"), at.child("to")
    source = read_table(table["from"], source_at, "{ column = ..., stage = ..., phase = \"liquid\" } or { column = ..., product = \"distillate\" }")
    destination = read_table(table["to"], destination_at, "{ column = ..., stage = ... }")
    check_keys(destination, destination_at, ("column", "stage"), required=("column", "stage"))
    from_column, from_stage, phase, from_product = _source(source, columns, source_at)
    to_column = _column_name(destination["column"], columns, destination_at.child("column"))
    to_stage = _stage(destination["stage"], columns[to_column], destination_at.child("stage"))
    if (from_column, from_stage) == (to_column, to_stage):
        destination_at.fail("a connection must lead to another stage", dict(destination), "a stage other than its source")
    if "flow" in table and "fraction" in table:
        at.fail("give flow or fraction, not both", {"flow": table["flow"], "fraction": table["fraction"]},
                "flow = \"40 kmol/h\", flow = \"free\" or fraction = 0.3 (neither: all of that phase)")
    flow = fraction = None
    free = False
    if "flow" in table:
        if table["flow"] == "free":
            free = True
        else:
            flow = read_quantity(table["flow"], "molar_flow", at.child("flow"), above=0.0)
    if "fraction" in table:
        fraction = read_quantity(table["fraction"], "dimensionless", at.child("fraction"), above=0.0, maximum=1.0)
    if (phase, from_stage, from_product, flow, fraction, free) == ("liquid", 1, None, None, None, False) \
            and columns[from_column].column.condenser == "total":
        source_at.fail(f"all the liquid stage 1 of {from_column!r} sends down is its reflux: the column would keep none; "
                       "to send its distillate on, name the product", dict(source),
                       f"from = {{ column = \"{from_column}\", product = \"distillate\" }} (or a flow or fraction of the reflux)")
    if "cooling" in table and "heating" in table:
        at.fail("give cooling or heating, not both", {"cooling": table["cooling"], "heating": table["heating"]}, "one exchanger")
    exchanger = None
    for kind in ("cooling", "heating"):
        if kind in table:
            exchanger = _read_exchanger(kind, table[kind], at.child(kind))
    return Connection(name, from_column, from_stage, phase, to_column, to_stage, flow, fraction, free, exchanger, at.key,
                      from_product)


def _source(source: Mapping[str, Any], columns: Mapping[str, ColumnSection], at: At) -> tuple[str, int, str, str | None]:
    """(column, stage, phase, product) of a connection's ``from``: a stage and its phase, or a
    column's product. The distillate leaves stage 1 in the vapor slot, which on a total
    condenser holds the liquid distillate; the bottoms is the last stage's liquid."""
    if "product" in source:
        check_keys(source, at, ("column", "product"), required=("column", "product"))
        column_name = _column_name(source["column"], columns, at.child("column"))
        product = read_choice(source["product"], at.child("product"), ("distillate", "bottoms"))
        column = columns[column_name].column
        if product == "distillate" and column.condenser == "none":
            at.child("product").fail(f"{column_name!r} has no condenser, so no distillate: name its top stage's vapor",
                                     product, "{ column = ..., stage = 1, phase = \"vapor\" }")
        return (column_name, 1, "vapor", product) if product == "distillate" else (column_name, column.stages, "liquid", product)
    check_keys(source, at, ("column", "stage", "phase"), required=("column", "stage", "phase"))
    column_name = _column_name(source["column"], columns, at.child("column"))
    stage = _stage(source["stage"], columns[column_name], at.child("stage"))
    phase = read_choice(source["phase"], at.child("phase"), ("liquid", "vapor"))
    if phase == "vapor" and stage == 1 and columns[column_name].column.condenser == "total":
        at.child("phase").fail(f"stage 1 of {column_name!r} is a total condenser: it sends no vapor; to send its "
                               "distillate on, name the product", source["phase"],
                               f"from = {{ column = \"{column_name}\", product = \"distillate\" }}")
    return column_name, stage, phase, None


def _check_splits(connections: list[Connection], at: At) -> None:
    """The fractions taken from one stage's liquid (or vapor) add up to at most 1, and a
    connection taking all of a phase is the only one taking a share of it."""
    shares: dict[tuple[str, int, str], list[Connection]] = {}
    for connection in connections:
        if connection.flow is None and not connection.free:
            shares.setdefault((connection.from_column, connection.from_stage, connection.phase), []).append(connection)
    for (column, stage, phase), group in shares.items():
        total = sum(1.0 if c.takes_all else c.fraction for c in group)
        if len(group) > 1 and (any(c.takes_all for c in group) or total > 1.0 + 1e-12):
            last = group[-1]
            At(at.file, last.key).fail(
                f"the connections {', '.join(repr(c.name) for c in group)} take more than all the {phase} of "
                f"stage {stage} of {column!r} (fractions add up to {total:g}; one without flow or fraction takes all)",
                last.name, "fractions adding up to at most 1",
            )


def _read_connections(value: Any, columns: Mapping[str, ColumnSection], at: At) -> tuple[Connection, ...]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[connections]], not [connections]", "a table", "[[connections]] tables")
    connections: list[Connection] = []
    for index, entry in enumerate(read_list(value, at, max_length=MAX_STAGES)):
        connection = _read_connection(entry, index, columns, at.item(index))
        if any(c.name == connection.name for c in connections):
            at.item(index).child("name").fail("another connection has this name", connection.name, "a unique name")
        connections.append(connection)
    _check_splits(connections, at)
    return tuple(connections)


def _part(value: Any, part: str, columns: Mapping[str, ColumnSection], at: At) -> str:
    """``COLUMN.condenser`` or ``COLUMN.reboiler`` (``part``) of a column that has one."""
    text = read_text(value, at, allow_empty=False, max_length=200)
    column, dot, written = text.rpartition(".")
    if not dot or written != part:
        at.fail(f"must name a column's {part}", value, f"\"COLUMN.{part}\" with COLUMN one of: " + ", ".join(columns))
    name = _column_name(column, columns, at)
    kind = columns[name].column.condenser if part == "condenser" else columns[name].column.reboiler
    if kind == "none":
        at.fail(f"column {name!r} has no {part} ({part} = 'none')", value, f"a column with a {part}")
    return name


def _read_heat_links(value: Any, columns: Mapping[str, ColumnSection], at: At) -> tuple[HeatLink, ...]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[heat_links]], not [heat_links]", "a table", "[[heat_links]] tables")
    links: list[HeatLink] = []
    for index, entry in enumerate(read_list(value, at, max_length=MAX_COLUMNS)):
        entry_at = at.item(index)
        fields = {
            "name": Field(_read_name, default=f"heat_link_{index + 1}"),
            "from": Field(lambda v, where: _part(v, "condenser", columns, where), required=True),
            "to": Field(lambda v, where: _part(v, "reboiler", columns, where), required=True),
        }
        read = read_fields(entry, entry_at, fields, "{ from = \"A.condenser\", to = \"B.reboiler\" }")
        link = HeatLink(read["name"], read["from"], read["to"], entry_at.key)
        if link.from_column == link.to_column:
            entry_at.child("to").fail("a column's condenser cannot boil its own reboiler (it is colder)", entry["to"], "another column's reboiler")
        for other in links:
            if other.name == link.name:
                entry_at.child("name").fail("another heat link has this name", link.name, "a unique name")
            if other.from_column == link.from_column:
                entry_at.child("from").fail(f"this condenser already heats {other.to_column!r}.reboiler", entry["from"], "one link per condenser")
            if other.to_column == link.to_column:
                entry_at.child("to").fail(f"this reboiler is already heated by {other.from_column!r}.condenser", entry["to"], "one link per reboiler")
        links.append(link)
    return tuple(links)


def _read_network_feeds(value: Any, names: tuple[str, ...], component_data: Mapping[str, ComponentData],
                        columns: Mapping[str, ColumnSection], at: At) -> tuple[tuple[Feed, ...], tuple[str, ...]]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[feeds]], not [feeds]", "a table", "[[feeds]] tables")
    feeds: list[Feed] = []
    feed_columns: list[str] = []
    for index, entry in enumerate(read_list(value, at, min_length=1, max_length=MAX_STAGES)):
        entry_at = at.item(index)
        table = read_table(entry, entry_at, "a [[feeds]] table")
        if "column" not in table:
            entry_at.child("column").fail("missing: in a network each feed names its column", expected="one of: " + ", ".join(columns))
        column = _column_name(table["column"], columns, entry_at.child("column"))
        rest = {k: v for k, v in table.items() if k != "column"}
        free = rest.get("flow") == "free"  # a make-up: its rate is left to a spec
        if free:
            rest["flow"] = "1 mol/s"
        feed = _read_feed(rest, index, names, component_data, columns[column].column, entry_at)
        if free:
            feed = replace(feed, flow=0.0, free=True)
        if any(f.name == feed.name for f in feeds):
            entry_at.child("name").fail("another feed has this name", feed.name, "a unique name")
        feeds.append(feed)
        feed_columns.append(column)
    return tuple(feeds), tuple(feed_columns)


def _equipment(written: str, columns: Mapping[str, ColumnSection], connections: Mapping[str, Connection],
               side_draws: Mapping[str, str], at: At) -> tuple[str, str | None, str]:
    """(what kind of equipment, its column or None, its part) for the name after ``on``."""
    if written in connections:
        return "connection", None, written
    if written in side_draws:
        return "product", side_draws[written], written
    if written in columns:
        return "column", written, ""
    column, dot, part = written.rpartition(".")
    if dot and column in columns and part in _PARTS:
        return ("product" if part in PRODUCTS else "exchanger"), column, part
    known = list(connections) + list(side_draws) + list(columns) + [f"{c}.{p}" for c in columns for p in _PARTS]
    close = difflib.get_close_matches(written, known, n=1, cutoff=0.6)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    at.fail(f"nothing in the network has this name{hint}", written,
            "a connection, a side draw, a column, or COLUMN.distillate|bottoms|condenser|reboiler")


def _read_network_spec(entry: Any, names: tuple[str, ...], columns: Mapping[str, ColumnSection],
                       connections: Mapping[str, Connection], side_draws: Mapping[str, str], at: At) -> list[NetworkSpec]:
    table = read_table(entry, at, "{ on = \"NAME\", flow = ... }")
    check_keys(table, at, ("on", "stage") + _SPEC_VALUE_KEYS, required=("on",))
    given = [key for key in _SPEC_VALUE_KEYS if key in table]
    if len(given) != 1:
        at.fail("give exactly one quantity per spec" + (f" (got {', '.join(given)})" if given else ""),
                None if not given else {k: table[k] for k in given}, "one of: " + ", ".join(_SPEC_VALUE_KEYS))
    key = given[0]
    key_at = at.child(key)
    written = read_text(table["on"], at.child("on"), allow_empty=False, max_length=200)
    kind_of, column, part = _equipment(written, columns, connections, side_draws, at.child("on"))
    connection = connections.get(written)
    allowed = {
        "flow": ("connection", "product"), "fraction": ("connection",), "duty": ("connection", "exchanger"),
        "return_temperature": ("connection",), "temperature": ("column",), "mole_fraction": ("product",),
        "recovery": ("product",), "reflux_ratio": ("column",), "boilup_ratio": ("column",),
    }[key]
    if kind_of not in allowed:
        key_at.fail(f"{written!r} is a {kind_of}; this spec applies to a " + " or a ".join(allowed), table[key])
    if ("stage" in table) != (key == "temperature"):
        at.child("stage").fail("a stage goes with temperature, and temperature with a stage", table.get("stage"),
                               "on = \"COLUMN\", stage = N, temperature = \"120 degC\"")

    def spec(kind: str, value: float, component: str | None = None, stage: int | None = None, where: At = key_at) -> NetworkSpec:
        return NetworkSpec(kind, value, written, column, stage, component, where.key)

    if key == "flow":
        number = read_quantity(table[key], "molar_flow", key_at, above=0.0)
        return [spec("connection_flow" if connection else "product_flow", number)]
    if key == "fraction":
        return [spec("connection_fraction", read_quantity(table[key], "dimensionless", key_at, above=0.0, maximum=1.0))]
    if key in ("duty", "return_temperature"):
        if connection is not None and connection.exchanger is None:
            key_at.fail(f"connection {written!r} has no cooling or heating", table[key], "a connection with cooling = {...} or heating = {...}")
        if key == "return_temperature":
            return [spec("return_temperature", read_quantity(table[key], "temperature", key_at, above=0.0))]
        number = read_quantity(table[key], "power", key_at)
        cooling = part == "condenser" or (connection is not None and connection.exchanger.kind == "cooling")
        if (number >= 0.0) if cooling else (number <= 0.0):
            key_at.fail("a cooler's or condenser's duty is negative (heat added), a heater's or reboiler's positive", table[key],
                        "a negative power such as '-2 MW'" if cooling else "a positive power such as '2 MW'")
        return [spec("exchanger_duty", number)]
    if key == "temperature":
        stage = _stage(table["stage"], columns[column], at.child("stage"))
        return [spec("stage_temperature", read_quantity(table[key], "temperature", key_at, above=0.0), stage=stage)]
    if key in ("reflux_ratio", "boilup_ratio"):
        part_needed = "condenser" if key == "reflux_ratio" else "reboiler"
        section = columns[column].column
        if (section.condenser if part_needed == "condenser" else section.reboiler) == "none":
            key_at.fail(f"column {column!r} has no {part_needed}", table[key], f"a column with a {part_needed}")
        return [spec(key, read_quantity(table[key], "dimensionless", key_at, above=0.0))]
    specs = []
    bounds = {"above": 0.0, "below": 1.0} if key == "mole_fraction" else {"above": 0.0, "maximum": 1.0}
    for name_written, number in read_table(table[key], key_at, "a table such as { water = 0.995 }").items():
        item_at = key_at.child(name_written)
        name = component_key(name_written, names, item_at)
        specs.append(spec(key, read_quantity(number, "dimensionless", item_at, **bounds), component=name, where=item_at))
    return specs


def _read_network_specs(value: Any, names: tuple[str, ...], columns: Mapping[str, ColumnSection],
                        connections: tuple[Connection, ...], at: At) -> tuple[NetworkSpec, ...]:
    if isinstance(value, Mapping):
        at.fail("in a network, a column's own specs sit in its [columns.specs]; the top level holds a list [[specs]]",
                "a table", "[[specs]] tables, each { on = \"NAME\", QUANTITY = value }")
    by_name = {c.name: c for c in connections}
    side_draws = {draw.name: section.name for section in columns.values() for draw in section.column.side_draws}
    specs: list[NetworkSpec] = []
    for index, entry in enumerate(read_list(value, at, max_length=MAX_STAGES)):
        specs.extend(_read_network_spec(entry, names, columns, by_name, side_draws, at.item(index)))
    return tuple(specs)


def _check_unique_names(columns: Mapping[str, ColumnSection], connections: tuple[Connection, ...],
                        heat_links: tuple[HeatLink, ...], at: At) -> None:
    """A name after ``on`` must mean one thing: columns, connections, side draws and heat links
    have names distinct from each other's."""
    seen: dict[str, str] = {name: "column" for name in columns}
    entries = [(c.name, "connection", At(at.file, c.key).child("name")) for c in connections]
    entries += [(d.name, "side draw", at.child("columns")) for s in columns.values() for d in s.column.side_draws]
    entries += [(h.name, "heat link", At(at.file, h.key).child("name")) for h in heat_links]
    for name, what, where in entries:
        if name in seen:
            where.fail(f"this name is already used by a {seen[name]}", name, "a name unique across columns, connections, side draws and heat links")
        seen[name] = what


def read_network(data: Mapping[str, Any], names: tuple[str, ...], component_data: Mapping[str, ComponentData],
                 at: At) -> tuple[Network, tuple[Feed, ...]]:
    """The network of a case file with ``[[columns]]`` (``data`` the whole parsed file) and its
    feeds (stages counted in their own column)."""
    if "column" in data:
        at.child("column").fail("a case has either [column] (one column) or [[columns]] (a network), not both", "a table",
                                "[[columns]] tables only")
    columns = _read_columns(data["columns"], names, at.child("columns"), component_data)
    connections = _read_connections(data.get("connections", []), columns, at.child("connections"))
    heat_links = _read_heat_links(data.get("heat_links", []), columns, at.child("heat_links"))
    _check_unique_names(columns, connections, heat_links, at)
    feeds, feed_columns = _read_network_feeds(data["feeds"], names, component_data, columns, at.child("feeds"))
    specs = _read_network_specs(data.get("specs", []), names, columns, connections, at.child("specs"))
    return Network(tuple(columns.values()), connections, heat_links, feed_columns, specs), feeds


def network_warnings(network: Network, source_file: str = "<case>") -> list[str]:
    """Warnings on a network that is valid but not as built: vapor sent through a connection to
    a stage at a higher pressure than the stage it leaves (vapor flows only down a pressure
    gradient; a compressor, which the network does not model, would be needed)."""
    sections = {section.name: section.column for section in network.columns}
    found = []
    for connection in network.connections:
        pumped = connection.from_stage == 1 and sections[connection.from_column].condenser == "total"  # liquid distillate
        if connection.phase != "vapor" or pumped:
            continue
        source = sections[connection.from_column].pressures[connection.from_stage - 1]
        destination = sections[connection.to_column].pressures[connection.to_stage - 1]
        if destination > source:
            found.append(
                f"{source_file}: {connection.key} ({connection.name!r}): vapor from {connection.from_column} stage {connection.from_stage} "
                f"at {source / 1e3:.5g} kPa is sent up to {connection.to_column} stage {connection.to_stage} at "
                f"{destination / 1e3:.5g} kPa; vapor flows only to a lower pressure, so set the columns' pressures so "
                "that the receiving stage is lower (no compressor is modelled)"
            )
    return found
