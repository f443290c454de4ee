"""Sparse linear solves that report a singular or overflowing system as None, with the reason,
instead of scipy's raw ``MatrixRankWarning`` on the user's screen or an answer of inf and NaN.
The callers (Newton's step, the bubble-point sweeps of the starts) treat None as a failed step
and go on with what they have. Imports nothing of ours."""

from __future__ import annotations

import warnings

import numpy as np
import scipy.sparse.linalg as spla

__all__ = ["lu_solve", "sparse_solve"]


def sparse_solve(matrix, rhs: np.ndarray, **options) -> np.ndarray | None:
    """``spla.spsolve(matrix, rhs, **options)``, or None when the matrix is singular or the
    answer is not finite (an elimination that overflowed)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", spla.MatrixRankWarning)
        warnings.simplefilter("ignore", RuntimeWarning)  # overflow inside the elimination: the answer is checked below
        try:
            solution = spla.spsolve(matrix, rhs, **options)
        except (spla.MatrixRankWarning, RuntimeError, ValueError, ZeroDivisionError):
            return None
    return solution if np.all(np.isfinite(solution)) else None


def lu_solve(matrix, rhs: np.ndarray) -> tuple[np.ndarray | None, str]:
    """``matrix^-1 rhs`` by sparse LU (SuperLU through ``spla.splu``): (the solution, "") or
    (None, why there is none: a singular or an ill-conditioned matrix)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error", spla.MatrixRankWarning)
        warnings.simplefilter("ignore", RuntimeWarning)
        try:
            solution = spla.splu(matrix).solve(rhs)
        except (spla.MatrixRankWarning, RuntimeError) as exc:  # exactly singular
            return None, f"singular ({exc})"
    if not np.all(np.isfinite(solution)):
        return None, "ill-conditioned (the solution is not finite)"
    return solution, ""
