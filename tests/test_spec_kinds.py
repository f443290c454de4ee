"""The registry of spec kinds (solver/spec_kinds.py), shared by one column and networks: every
kind's residual row against central finite differences on a small single column and on a small
network, and every kind of a case file's specs mapped to a complete registry entry."""

from __future__ import annotations

import numpy as np
import pytest

from conftest import methanol_water_case, network_example_case
from solver.case import NETWORK_SPEC_KINDS, SPEC_KINDS
from solver.network_engine import build_network_system
from solver.network_start import network_initial_estimate
from solver.spec_kinds import COLUMN_SPEC_KINDS, NETWORK_ROW_KINDS, SPEC_REGISTRY, SpecRow
from test_mesh import SPEC_VARIANTS, _system_and_start
from test_network_mesh import VARIANTS

#: Network variants (tests/test_network_mesh.py) that together hold every kind of row.
NETWORK_VARIANTS = (
    "example (free rate, fraction with fixed cooling duty, all of a vapor)",
    "free pumparound rate by connection_flow",
    "free pumparound rate by connection_fraction",
    "free cooler by exchanger_duty",
    "free cooler by return_temperature",
    "recovery, bottoms purity",
    "stage temperature and condenser duty",
    "side draw recovery",
)


def _row_derivatives(system, X, rows, step):
    """Central differences of the residual ``rows`` in every unknown."""
    numeric = np.zeros((len(rows), len(X)))
    for k in range(len(X)):
        h = step(k, X)
        up, down = X.copy(), X.copy()
        up[k] += h
        down[k] -= h
        numeric[:, k] = (system.evaluate(up, False).residuals[rows] - system.evaluate(down, False).residuals[rows]) / (2 * h)
    return numeric


def _assert_rows_match(system, X, rows, names, step, rel, abs_):
    analytic = system.evaluate(X, True).jacobian.toarray()[rows]
    numeric = _row_derivatives(system, X, rows, step)
    error = np.abs(analytic - numeric)
    bad = error > abs_ + rel * np.abs(numeric)
    if bad.any():
        r, k = np.argwhere(bad)[0]
        raise AssertionError(f"{names[r]} by {system.variable_name(k)}: {analytic[r, k]} analytic, {numeric[r, k]} numeric")


def _single_column_rows():
    for specs in SPEC_VARIANTS:
        system, X = _system_and_start(methanol_water_case(stages=6, feed_stage=3, specs=specs), seed=1)
        yield system, X, [placed.stage * system.width + 2 * system.c for placed in system.spec_rows], [p.row for p in system.spec_rows]


def test_every_single_column_kind_matches_finite_differences():
    seen = set()
    for system, X, rows, spec_rows in _single_column_rows():
        seen |= {row.kind for row in spec_rows}
        # the step and the bound of tests/test_mesh.py, row by row
        def step(k, X, w=system.width):
            return 1e-7 * max(abs(X[k]), 1e-3 if k % w else 1.0)

        analytic = system.evaluate(X, True).jacobian.toarray()[rows]
        numeric = _row_derivatives(system, X, rows, step)
        scale = np.maximum(np.abs(numeric), np.abs(analytic)).max(axis=1, keepdims=True) + 1e-12
        assert (np.abs(analytic - numeric) / scale).max() < 2e-5, [row.label for row in spec_rows]
    # a single column offers every kind but those of connections
    assert seen == set(SPEC_REGISTRY) - {"connection_flow", "connection_fraction", "return_temperature"}


def test_every_network_kind_matches_finite_differences():
    seen = set()
    for name in NETWORK_VARIANTS:
        system = build_network_system(network_example_case(VARIANTS[name]))
        X = network_initial_estimate(system)
        first_internal = len(system.specs) + len(system.heat_links)
        rows = [system.stage_size + k for k in range(len(system.specs))]
        rows += [system.stage_size + first_internal + k for k in range(len(system.internal_rows))]
        spec_rows = list(system.specs) + list(system.internal_rows)
        seen |= {row.kind for row in spec_rows}
        # the step and the bound of tests/test_network_mesh.py
        _assert_rows_match(system, X, rows, [row.label for row in spec_rows], lambda k, X: 1e-7 * max(1.0, abs(X[k])), 1e-6, 1e-6)
    assert seen == set(SPEC_REGISTRY)


@pytest.mark.parametrize("kind", sorted(set(SPEC_KINDS) | set(NETWORK_SPEC_KINDS)))
def test_every_case_file_kind_has_a_complete_registry_entry(kind):
    row_kinds = set()
    if kind in SPEC_KINDS:
        row_kinds.add(COLUMN_SPEC_KINDS[kind].row_kind)
    if kind in NETWORK_SPEC_KINDS:
        row_kinds.add(NETWORK_ROW_KINDS[kind])
    for row_kind in row_kinds:
        entry = SPEC_REGISTRY[row_kind]
        assert entry.words and entry.quantity in ("ratio", "flow", "fraction", "temperature", "duty")
        assert callable(entry.residual) and callable(entry.start.relation)
        assert entry.role in ("split", "energy", "other") and "{value}" in entry.phrase
        if kind in SPEC_KINDS:
            # a single column's start hears from it: the overhead rate, the top vapor, or a split
            # or profile to meet
            start = entry.start
            assert any(f is not None for f in (start.overhead, start.top_vapor, start.split_error, start.profile_error))


@pytest.mark.parametrize("kind", ["mole_fraction", "recovery"])
def test_a_composition_kind_tells_the_network_start_its_rate_and_its_error(kind):
    """The network start guesses a composition spec's product rate and measures a swept
    profile against it through the entry (one column of 30 mol/s: 20 of the components on the
    product's side, 10 of the spec's component)."""
    start = SPEC_REGISTRY[kind].start
    row = SpecRow(kind, 0.9, "spec", component=1)
    rate = start.guessed_rate(row, 20.0, 10.0)
    assert rate == pytest.approx(20.0 + 0.97 * 10.0 if kind == "mole_fraction" else 20.0 + 0.9 * 10.0)
    composition = np.array([0.2, 0.8])
    error = start.stream_error(row, composition, 12.0, np.array([5.0, 10.0]))
    assert error == pytest.approx(0.8 - 0.9 if kind == "mole_fraction" else 12.0 * 0.8 / 10.0 - 0.9)
