"""Evaluation of piecewise polynomial fits for all stages and components in one pass: every
piece as a power series in its local variable u in [0, 1] by Horner's rule, which in numpy takes
about half the array operations of Clenshaw's recurrence (the conversion from the Chebyshev
coefficients costs ~1e-13 relative at the degrees used and is included in the checked error of
each fit, :mod:`solver.thermo.chebyshev_fits`)."""

from __future__ import annotations

from typing import Sequence

import numpy as np

from solver.thermo.chebyshev_fits import PiecewiseFit

__all__ = ["PiecewiseTable"]


class PiecewiseTable:
    """Piecewise polynomials of several quantities and components in one coefficient table
    (padded to the most pieces), evaluated for an (n, c) array of the variable in one Horner pass
    with its derivative. ``fits[q][k]`` is quantity q of component k; the quantities of one
    component share range and pieces, so one piece index serves all. With ``integrate=True``
    the table holds the antiderivatives (in the variable) of the fits, continuous across pieces
    and zero at each fit's lower end."""

    def __init__(self, fits: Sequence[Sequence[PiecewiseFit]], *, integrate: bool = False) -> None:
        first = fits[0]
        count = len(first)
        most = max(f.pieces for f in first)
        fitted_terms = max(f.coefficients.shape[1] for quantity in fits for f in quantity)
        terms = fitted_terms + (1 if integrate else 0)
        table = np.zeros((terms, len(fits), count * most))
        for q, quantity in enumerate(fits):
            for k, fit in enumerate(quantity):
                if (fit.low, fit.high, fit.pieces) != (first[k].low, first[k].high, first[k].pieces):
                    raise ValueError("quantities of one component must share range and pieces")
                local = fit.monomial()
                local = np.pad(local, ((0, 0), (0, fitted_terms - local.shape[1])))
                if integrate:
                    local = _integrate_pieces(local, (fit.high - fit.low) / fit.pieces)
                table[:, q, k * most : k * most + fit.pieces] = local.T
        self.table = table
        self.terms = terms
        self.quantities = len(fits)
        scale = np.array([f.pieces / (f.high - f.low) for f in first])
        self._rows = {
            "scale": scale,
            "low_scaled": np.array([f.low for f in first]) * scale,
            "last_piece": np.array([f.pieces - 1 for f in first], dtype=float),
            "offset": np.arange(count, dtype=float) * most,
        }
        self._by_size: dict[int, dict[str, np.ndarray]] = {}

    def _constants(self, n: int) -> dict[str, np.ndarray]:
        constants = self._by_size.get(n)
        if constants is None:
            if len(self._by_size) > 8:
                self._by_size.clear()
            constants = {k: np.ascontiguousarray(np.broadcast_to(v, (n, v.size))) for k, v in self._rows.items()}
            constants["scale_stacked"] = np.concatenate([constants["scale"]] * self.quantities)
            self._by_size[n] = constants
        return constants

    def locate(self, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(flat piece index, local variable u in [0, 1]) of ``x`` (n, c), which the caller
        has clamped to the fitted range."""
        constants = self._constants(x.shape[0])
        position = x * constants["scale"]
        position -= constants["low_scaled"]
        piece = np.floor(position)
        np.minimum(piece, constants["last_piece"], out=piece)
        np.maximum(piece, 0.0, out=piece)  # rounding may put the lower end just below 0
        u = position - piece
        piece += constants["offset"]
        return piece.astype(np.intp), u

    def evaluate(
        self, index: np.ndarray, u: np.ndarray, derivative: bool = True
    ) -> tuple[np.ndarray, np.ndarray | None]:
        """Values (quantities, n, c) at located points, and derivatives in x if asked."""
        n, c = index.shape
        q = self.quantities
        # mode="clip" keeps a garbage index (from a NaN temperature) inside the table
        a = np.take(self.table, index, axis=2, mode="clip").reshape(self.terms, q * n, c)
        if q > 1:
            u = np.concatenate([u] * q)
        value = a[-1] * u
        value += a[-2]
        if not derivative:
            for k in range(self.terms - 3, -1, -1):
                value *= u
                value += a[k]
            return value.reshape(q, n, c), None
        slope = a[-1].copy()
        for k in range(self.terms - 3, -1, -1):
            slope *= u
            slope += value
            value *= u
            value += a[k]
        slope *= self._constants(n)["scale_stacked"]
        return value.reshape(q, n, c), slope.reshape(q, n, c)

    def __call__(self, x: np.ndarray, derivative: bool = True) -> tuple[np.ndarray, np.ndarray | None]:
        """Values (quantities, n, c) at ``x`` (n, c), and derivatives in x if asked."""
        index, u = self.locate(x)
        return self.evaluate(index, u, derivative)


def _integrate_pieces(local: np.ndarray, width: float) -> np.ndarray:
    """Antiderivatives in the fit variable of local power series in u in [0, 1] (pieces, terms)
    -> (pieces, terms + 1), each piece's constant making the whole continuous and zero at the
    start."""
    pieces, terms = local.shape
    integrated = np.zeros((pieces, terms + 1))
    integrated[:, 1:] = width * local / np.arange(1, terms + 1)
    gains = integrated.sum(axis=1)  # value at u = 1 of each piece's integral from u = 0
    integrated[:, 0] = np.concatenate([[0.0], np.cumsum(gains)[:-1]])
    return integrated
