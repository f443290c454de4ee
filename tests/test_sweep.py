"""Parametric sweeps: keys, ranges with units, writing into the TOML document, points through an
Executor (threads, processes, any Executor), failed points, CSV and plot."""

from __future__ import annotations

import csv
import io
import pickle
import tomllib
from concurrent.futures import Executor, ProcessPoolExecutor, ThreadPoolExecutor

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.errors import CaseError
from solver.sweep import (
    PointOutcome,
    parse_key,
    parse_variation,
    run_sweep,
    set_value,
    solve_point,
    sweep_points,
)
from solver.sweep_output import sweep_csv, write_sweep_plot

# a small ideal column that solves in a fraction of a second
CASE = """
title = "pentane-hexane test column"
[components]
names = ["n-Pentane", "n-Hexane"]
[column]
stages = 8
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 4
flow = "100 kmol/h"
composition = { n-pentane = 0.5, n-hexane = 0.5 }
vapor_fraction = 0.0
[specs]
reflux_ratio = 1.5
distillate_rate = "50 kmol/h"
"""


@pytest.fixture
def document():
    return tomllib.loads(CASE)


# ------------------------------------------------------------------ keys


def test_parse_key_reads_tables_and_array_items():
    assert parse_key("feeds[0].temperature") == ("feeds", 0, "temperature")
    assert parse_key("column.pressure.top") == ("column", "pressure", "top")
    assert parse_key("a[1][2].b-c") == ("a", 1, 2, "b-c")
    for bad in ("feeds[x].stage", "specs..reflux_ratio", "", "specs.reflux ratio"):
        with pytest.raises(CaseError, match="--vary"):
            parse_key(bad)


def test_set_value_writes_into_existing_tables(document):
    set_value(document, parse_key("column.pressure.top"), "2 bar")
    set_value(document, parse_key("specs.reflux_subcooling"), "5 K")  # a new key of an existing table
    set_value(document, parse_key("feeds[0].temperature"), "60 degC")  # replaces the exclusive vapor_fraction
    assert document["column"]["pressure"]["top"] == "2 bar"
    assert document["specs"]["reflux_subcooling"] == "5 K"
    assert document["feeds"][0]["temperature"] == "60 degC" and "vapor_fraction" not in document["feeds"][0]


@pytest.mark.parametrize(
    "key, problem",
    [
        ("feeds[1].stage", "has no feeds[1]"),
        ("colum.stages", "has no colum"),
        ("column.stages.top", "column.stages is a value"),
        ("feeds.stage", "feeds is an array"),
    ],
)
def test_set_value_names_what_is_missing(document, key, problem):
    with pytest.raises(CaseError, match=problem.replace("[", r"\[").replace("]", r"\]")):
        set_value(document, parse_key(key), 1, key)


# ------------------------------------------------------------------ ranges


def test_ranges_of_numbers_whole_numbers_and_quantities():
    reflux = parse_variation("specs.reflux_ratio=1:2:3")
    assert reflux.values == (1.0, 1.5, 2.0) and reflux.unit == ""
    stages = parse_variation("column.stages=10:20:3")
    assert stages.values == (10, 15, 20) and all(isinstance(v, int) for v in stages.values)
    uneven = parse_variation("column.stages=10:20:4").values  # not whole steps: plain numbers
    assert uneven == pytest.approx((10.0, 10 + 10 / 3, 10 + 20 / 3, 20.0), rel=1e-11) and isinstance(uneven[0], float)
    assert parse_variation("x=0:0.3:4").values == (0.0, 0.1, 0.2, 0.3)  # no 0.30000000000000004
    temperature = parse_variation("feeds[0].temperature=40 degC:70 degC:4")
    assert temperature.values == ("40 degC", "50 degC", "60 degC", "70 degC")
    assert temperature.magnitudes == (40.0, 50.0, 60.0, 70.0)
    assert temperature.label == "feeds[0].temperature [degC]"
    assert parse_variation("column.pressure.top=1 bar:1 bar:1").values == ("1 bar",)


@pytest.mark.parametrize(
    "text, problem",
    [
        ("specs.reflux_ratio", "cannot read the variation"),
        ("specs.reflux_ratio=1:2", "cannot read the variation"),
        ("feeds[0].temperature=40 degC:343 K:3", "same unit"),
        ("specs.reflux_ratio=1:2:0", "COUNT"),
        ("specs.reflux_ratio=1:2:2.5", "COUNT"),
        ("specs.reflux_ratio=1:2:1", "one point needs START = STOP"),
        ("specs.reflux_ratio=one:2:3", "START and STOP must be numbers"),
    ],
)
def test_bad_ranges_are_case_errors(text, problem):
    with pytest.raises(CaseError, match=problem):
        parse_variation(text)


@settings(max_examples=60, deadline=None)
@given(
    start=st.floats(-1e6, 1e6, allow_nan=False),
    span=st.floats(1e-3, 1e6, allow_nan=False),
    count=st.integers(2, 50),
)
def test_a_range_has_count_increasing_values_from_start_to_stop(start, span, count):
    stop = start + span
    variation = parse_variation(f"specs.reflux_ratio={start!r}:{stop!r}:{count}")
    values = variation.values
    assert len(values) == count
    assert values[0] == pytest.approx(start, rel=1e-11, abs=1e-11 * span)
    assert values[-1] == pytest.approx(stop, rel=1e-11, abs=1e-11 * span)
    assert all(b > a for a, b in zip(values, values[1:]))


def test_grid_of_two_keys_first_key_slowest():
    first, second = parse_variation("a=1:2:2"), parse_variation("b=10:30:3")
    assert sweep_points([first, second]) == [(1, 10), (1, 20), (1, 30), (2, 10), (2, 20), (2, 30)]


# ------------------------------------------------------------------ running points


class CountingExecutor(Executor):
    """Any Executor will do: this one runs each call at once in the caller's thread."""

    def __init__(self):
        self.calls = 0

    def submit(self, fn, /, *args, **kwargs):
        from concurrent.futures import Future

        self.calls += 1
        future = Future()
        future.set_result(fn(*args, **kwargs))
        return future


def test_sweep_through_any_executor_reports_failed_points(document, tmp_path):
    variations = [parse_variation("specs.reflux_ratio=-1:3:3")]  # -1 is not a reflux ratio
    executor, seen = CountingExecutor(), []
    result = run_sweep(document, variations, executor, source_file="column.toml", progress=seen.append)
    assert executor.calls == 2  # the invalid point is never sent to a worker
    assert [o.index for o in result.outcomes] == [0, 1, 2] and len(seen) == 3
    bad = result.outcomes[0]
    assert bad.status == "bad input" and "specs.reflux_ratio" in bad.message and "column.toml" in bad.message
    assert [o.status for o in result.outcomes[1:]] == ["converged", "converged"]
    assert result.outcomes[2].reflux_ratio == pytest.approx(3.0)
    assert result.outcomes[2].reboiler_duty > result.outcomes[1].reboiler_duty  # more reflux, more boilup
    assert result.failed == (bad,)

    rows = list(csv.DictReader(io.StringIO(sweep_csv(result))))
    assert [row["specs.reflux_ratio"] for row in rows] == ["-1", "1", "3"]
    assert rows[0]["converged"] == "false" and rows[0]["reboiler_duty_W"] == "" and rows[0]["message"] == bad.message
    assert float(rows[2]["x_distillate_n-pentane"]) == pytest.approx(result.outcomes[2].products["distillate"][1][0])
    assert float(rows[1]["distillate_flow_mol_s"]) == pytest.approx(50 / 3.6)
    path = write_sweep_plot(result, tmp_path / "sweep.png", "test")
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_points_that_do_not_converge_keep_no_numbers(document):
    variations = [parse_variation("specs.reflux_ratio=1.5:1.5:1"), parse_variation("column.stages=8:8:1")]
    with ThreadPoolExecutor(max_workers=1) as executor:
        result = run_sweep(document, variations, executor)
    assert result.outcomes[0].converged
    failing = solve_point(0, dict(document, specs={"reflux_ratio": 0.05, "distillate": {"n-pentane": 0.9999}}), ())
    assert failing.status in ("not converged", "infeasible") and failing.message
    assert failing.products is None and failing.reboiler_duty is None


def test_points_and_outcomes_pickle_and_run_in_worker_processes(document):
    variations = [parse_variation("column.pressure.top=1 bar:2 bar:2")]
    with ProcessPoolExecutor(max_workers=2) as executor:
        result = run_sweep(document, variations, executor)
    assert all(o.converged for o in result.outcomes), [o.message for o in result.outcomes]
    # distillate rate and reflux ratio fixed: the same product rates at both pressures, other purities
    assert result.outcomes[1].products["bottoms"][0] == pytest.approx(result.outcomes[0].products["bottoms"][0])
    assert result.outcomes[1].products["distillate"][1][0] < result.outcomes[0].products["distillate"][1][0]
    outcome = result.outcomes[0]
    assert pickle.loads(pickle.dumps(outcome)) == outcome and isinstance(outcome, PointOutcome)


def test_a_sweep_with_no_valid_point_is_bad_input(document):
    with pytest.raises(CaseError, match="no point of the sweep is a valid case"):
        run_sweep(document, [parse_variation("column.stages=0:1:2")], CountingExecutor())
    with pytest.raises(CaseError, match="varied twice"):
        run_sweep(document, [parse_variation("a=1:2:2"), parse_variation("a=1:2:2")], CountingExecutor())
