"""Sparse solves that say "no answer" instead of printing scipy's MatrixRankWarning (each test
failed before: the warning reached the screen, or inf and NaN went on)."""

from __future__ import annotations

import warnings

import numpy as np
import scipy.sparse as sp

from solver.sparse_solve import lu_solve, sparse_solve


def test_a_singular_matrix_gives_none_and_no_warning():
    singular = sp.csc_matrix(np.array([[1.0, 1.0], [2.0, 2.0]]))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert sparse_solve(singular, np.array([1.0, 3.0])) is None
        solution, reason = lu_solve(singular, np.array([1.0, 3.0]))
    assert solution is None and reason.startswith("singular")


def test_an_overflowing_elimination_gives_none():
    """A chain whose pivots grow like 1e200 per row: the answer overflows to inf."""
    n = 6
    matrix = sp.diags([np.full(n, 1e-200), np.full(n - 1, 1.0)], [0, 1], format="csc")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert sparse_solve(matrix, np.ones(n), permc_spec="NATURAL") is None
        assert lu_solve(matrix, np.ones(n))[0] is None


def test_a_regular_matrix_is_solved_as_numpy_does():
    matrix = np.array([[4.0, 1.0, 0.0], [1.0, 3.0, 1.0], [0.0, 1.0, 2.0]])
    rhs = np.array([1.0, 2.0, 3.0])
    expected = np.linalg.solve(matrix, rhs)
    assert np.allclose(sparse_solve(sp.csc_matrix(matrix), rhs), expected, rtol=1e-13)
    assert np.allclose(lu_solve(sp.csc_matrix(matrix), rhs)[0], expected, rtol=1e-13)
