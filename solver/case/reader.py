"""Reading a case file: the TOML text read, checked table by table and converted into a frozen
:class:`~solver.case.model.Case` in SI units. Every error is a
:class:`~solver.errors.CaseError` that names the file, the key path (``feeds[0].composition``),
the value and what was expected; unknown keys are errors with a "did you mean" suggestion."""

from __future__ import annotations

import os
import tomllib
from dataclasses import replace
from types import MappingProxyType
from typing import Any, Mapping

from solver.case.column_table import read_column_table
from solver.case.components_table import read_components_table
from solver.case.feeds_table import read_feeds_table
from solver.case.fields import At, Field, plain, read_fields, read_text
from solver.case.model import Case
from solver.case.network_tables import network_warnings, read_network
from solver.case.options_table import read_audit_table, read_check_table, read_display_table
from solver.case.sizing_table import read_sizing_table
from solver.case.specs_table import read_specs_table
from solver.case.thermo_table import read_thermo_table
from solver.case.uncertainty_table import read_uncertainty_table
from solver.errors import CaseError

__all__ = ["MAX_FILE_BYTES", "load_case", "loads_case", "parse_case"]

#: A case file is a few kilobytes; anything above this is not one.
MAX_FILE_BYTES = 2_000_000

#: The top-level keys; the sections are read by the readers of solver.case.*_table.
_TOP_FIELDS = {
    "title": Field(lambda value, at: read_text(value, at, max_length=500), default=""),
    "components": Field(required=True),
    "thermo": Field(),
    "column": Field(),  # [column], or [[columns]] for a network (solver.case.network_tables)
    "columns": Field(),
    "connections": Field(),
    "heat_links": Field(),
    "feeds": Field(required=True),
    "specs": Field(),
    "check": Field(),
    "display": Field(),
    "audit": Field(),
    "sizing": Field(),
    "uncertainty": Field(),
}


def load_case(path: str | os.PathLike) -> Case:
    """Read the TOML case file at ``path`` into a validated, frozen :class:`Case` (SI units).

    Raises :class:`CaseError` naming the file for a missing file, a directory, a file that is
    not UTF-8 text, broken TOML (with line and column) and every invalid value."""
    if not isinstance(path, (str, os.PathLike)):
        raise CaseError("a case file path is needed", value=path, expected="a path to a .toml file")
    file = os.fspath(path)
    if isinstance(file, bytes):
        file = os.fsdecode(file)
    where = At(file)
    try:
        if os.path.isdir(file):
            where.fail("is a directory, not a case file", expected="a path to a .toml file")
        with open(file, "rb") as handle:
            content = handle.read(MAX_FILE_BYTES + 1)
    except FileNotFoundError:
        where.fail("file not found")
    except IsADirectoryError:
        where.fail("is a directory, not a case file", expected="a path to a .toml file")
    except PermissionError:
        where.fail("no permission to read the file")
    except (OSError, ValueError) as exc:
        where.fail(f"cannot read the file ({getattr(exc, 'strerror', None) or exc})")
    if len(content) > MAX_FILE_BYTES:
        where.fail(f"the file is larger than {MAX_FILE_BYTES} bytes; a case file is a few kilobytes")
    try:
        text = content.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = content[: exc.start].count(b"\n") + 1
        column = exc.start - (content.rfind(b"\n", 0, exc.start) + 1) + 1
        where.fail(
            f"the file is not UTF-8 text (byte 0x{content[exc.start]:02x} at line {line}, column {column})",
            expected="a TOML file saved as UTF-8",
        )
    return loads_case(text, source_file=file)


def loads_case(text: str, source_file: str = "<string>") -> Case:
    """Read TOML ``text`` into a :class:`Case`; ``source_file`` is the name used in messages."""
    where = At(str(source_file))
    if not isinstance(text, str):
        where.fail("case text must be a string", value=type(text).__name__)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        where.fail(f"not valid TOML: {exc}", expected="a TOML file (the case-file format is in README.md, \"Case files\")")
    except RecursionError:
        where.fail("not a case file: values are nested too deeply")
    return parse_case(data, source_file=source_file)


def parse_case(data: Mapping[str, Any], source_file: str = "<string>") -> Case:
    """Check the parsed TOML ``data`` (a dict as :func:`tomllib.loads` returns it) and convert
    it to a frozen :class:`Case` in SI units. Every error is a :class:`CaseError` that names
    ``source_file``, the key path, the value and what was expected."""
    where = At(str(source_file))
    try:
        return _parse(data, where)
    except RecursionError:
        where.fail("not a case file: values are nested too deeply")


def _parse(data: Any, at: At) -> Case:
    title = read_fields(data, at, _TOP_FIELDS, "a case: a TOML document with [components], [column] and [[feeds]]")["title"]
    names, component_data, warnings = read_components_table(data["components"], at.child("components"))
    thermo = read_thermo_table(data.get("thermo", {}), names, at.child("thermo"))
    if "columns" in data:
        network, feeds = read_network(data, names, component_data, at)
        warnings = [*warnings, *network_warnings(network, at.file)]
        column, specs = None, ()
    else:
        network = None
        column, feeds, specs = _read_single_column(data, names, component_data, at)
    check = read_check_table(data.get("check", {}), at.child("check"))
    display = read_display_table(data.get("display", {}), at.child("display"))
    audit = read_audit_table(data["audit"], names, at.child("audit"), component_data) if "audit" in data else None
    sizing = read_sizing_table(data["sizing"], names, at.child("sizing")) if "sizing" in data else None
    uncertainties = (read_uncertainty_table(data["uncertainty"], names, thermo, column, feeds, at.child("uncertainty"),
                                            network)
                     if "uncertainty" in data else ())
    return Case(
        title=title,
        component_names=names,
        component_data=MappingProxyType(component_data),
        thermo=thermo,
        column=column,
        feeds=feeds,
        specs=specs,
        check=MappingProxyType(check),
        display=MappingProxyType(display),
        audit=audit,
        sizing=sizing,
        source_file=at.file,
        raw=MappingProxyType(plain(data)),
        warnings=tuple(warnings),
        network=network,
        uncertainties=uncertainties,
    )


def _read_single_column(data: Mapping[str, Any], names, component_data, at: At):
    """[column], [[feeds]] and [specs] of a single-column case: (column, feeds, specs)."""
    for key in ("connections", "heat_links"):
        if key in data:
            at.child(key).fail("needs a network of columns: [[columns]] in place of [column]", "a list",
                               f"[[columns]] tables, or no [[{key}]]")
    if "column" not in data:
        at.child("column").fail("missing", expected="a value for 'column' (a [column] table, or [[columns]] tables for a network)")
    column = read_column_table(data["column"], at.child("column"))
    feeds = read_feeds_table(data["feeds"], names, component_data, column, at.child("feeds"))
    specs, reflux_temperature, reflux_subcooling = read_specs_table(
        data.get("specs", {}), names, column, at.child("specs"), component_data
    )
    column = replace(column, reflux_temperature=reflux_temperature, reflux_subcooling=reflux_subcooling)
    return column, feeds, specs
