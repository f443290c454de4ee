"""solver.thermo.activity against an independent implementation of the same models.

Source of the reference values: the open-source package ``thermo`` (Chemical Engineering Design
Library, author Caleb Bell), version 0.6.1 as installed in the test environment, classes
``thermo.wilson.Wilson``, ``thermo.nrtl.NRTL`` and ``thermo.uniquac.UNIQUAC``. Only its model
equations are used: both sides get the same random parameters generated here, none of the
parameter data shipped with thermo.

Parameter conventions of thermo (from its docstrings) and how ours map onto them:
- NRTL: tau_ij = A + B/T + E ln T + F T (+ G/T^2 + H T^2, zero here), alpha_ij = c + d T.
  Ours: tau_ij = constant_term + term_over_temperature/T + term_in_ln_temperature ln T +
  term_times_temperature T, so those four are A, B, E, F; alpha_ij = alpha + alpha_slope
  (T - alpha_reference_temperature), so c = alpha - alpha_reference_temperature alpha_slope and
  d = alpha_slope.
- Wilson: Lambda_ij = exp(a + b/T + c ln T + d T (+ e/T^2 + f T^2)); our four terms are a, b, c, d.
- UNIQUAC: tau_ij = exp(a + b/T + c ln T + d T (+ ...)), z = 10; same mapping, r and q as given.
Both use the exact gas constant 8.31446261815324 J/mol/K (CODATA 2018; ours from
scipy.constants).
thermo's ``dgammas_dns`` are d gamma_i / d n_j at sum(n) = 1; our ln gamma is homogeneous of
degree zero in x, so d ln gamma_i / d x_j = (d gamma_i / d n_j) / gamma_i on the simplex.
"""

from __future__ import annotations

import numpy as np
import pytest

from solver.thermo.activity import NRTL, UNIQUAC, Wilson

thermo = pytest.importorskip("thermo")
from thermo.nrtl import NRTL as ThermoNRTL  # noqa: E402
from thermo.uniquac import UNIQUAC as ThermoUNIQUAC  # noqa: E402
from thermo.wilson import Wilson as ThermoWilson  # noqa: E402

CASES = [(seed, c) for seed in range(6) for c in (3, 4, 5)]
STATES_PER_CASE = 4
ALPHA_REFERENCE = 320.0  # K, the temperature the random alpha slopes are about (invented)


def _off_diagonal(rng: np.random.Generator, c: int, low: float, high: float) -> np.ndarray:
    matrix = rng.uniform(low, high, (c, c))
    np.fill_diagonal(matrix, 0.0)
    return matrix


def _symmetric(rng: np.random.Generator, c: int, low: float, high: float) -> np.ndarray:
    upper = np.triu(rng.uniform(low, high, (c, c)), 1)
    return upper + upper.T


def _states(rng: np.random.Generator, c: int) -> tuple[np.ndarray, np.ndarray]:
    return rng.uniform(290.0, 450.0, STATES_PER_CASE), rng.dirichlet(np.ones(c), STATES_PER_CASE)


def _model_pair(kind: str, c: int, rng: np.random.Generator):
    """Our model and a function T, x -> thermo's model with the same (random) parameters."""
    e = _off_diagonal(rng, c, -0.2, 0.2)
    f = _off_diagonal(rng, c, -1e-3, 1e-3)
    if kind == "nrtl":
        a, b = _off_diagonal(rng, c, -2.0, 2.0), _off_diagonal(rng, c, -500.0, 1500.0)
        alpha, alpha_slope = _symmetric(rng, c, 0.2, 0.47), _symmetric(rng, c, -1e-3, 1e-3)
        ours = NRTL(a, b, e, f, alpha=alpha, alpha_slope=alpha_slope, alpha_reference_temperature=ALPHA_REFERENCE)

        def theirs(temperature, x):
            return ThermoNRTL(
                T=temperature, xs=list(x), tau_as=a.tolist(), tau_bs=b.tolist(), tau_es=e.tolist(),
                tau_fs=f.tolist(), alpha_cs=(alpha - ALPHA_REFERENCE * alpha_slope).tolist(),
                alpha_ds=alpha_slope.tolist(),
            )

    elif kind == "wilson":
        a, b = _off_diagonal(rng, c, -0.5, 0.5), _off_diagonal(rng, c, -800.0, 400.0)
        ours = Wilson(a, b, e, f)

        def theirs(temperature, x):
            return ThermoWilson(
                T=temperature, xs=list(x), lambda_as=a.tolist(), lambda_bs=b.tolist(),
                lambda_cs=e.tolist(), lambda_ds=f.tolist(),
            )

    else:
        a, b = _off_diagonal(rng, c, -0.5, 0.5), _off_diagonal(rng, c, -600.0, 300.0)
        r, q = rng.uniform(0.9, 6.0, c), rng.uniform(0.9, 5.0, c)
        ours = UNIQUAC(a, b, e, f, r=r, q=q)

        def theirs(temperature, x):
            return ThermoUNIQUAC(
                T=temperature, xs=list(x), rs=r.tolist(), qs=q.tolist(), tau_as=a.tolist(),
                tau_bs=b.tolist(), tau_cs=e.tolist(), tau_ds=f.tolist(),
            )

    return ours, theirs


@pytest.mark.parametrize("kind", ["wilson", "nrtl", "uniquac"])
@pytest.mark.parametrize("seed, c", CASES)
def test_against_thermo_package(kind: str, seed: int, c: int) -> None:
    rng = np.random.default_rng([seed, c, len(kind)])
    ours, theirs = _model_pair(kind, c, rng)
    temperature, x = _states(rng, c)
    result = ours.evaluate(temperature, x)
    for s in range(STATES_PER_CASE):
        reference = theirs(float(temperature[s]), x[s])
        gammas = np.array(reference.gammas())
        # ln gamma: 1e-9 absolute or relative
        np.testing.assert_allclose(result.ln_gamma[s], np.log(gammas), rtol=1e-9, atol=1e-9)
        assert result.excess_enthalpy[s] == pytest.approx(reference.HE(), rel=1e-6)
        assert result.d_excess_enthalpy_dT[s] == pytest.approx(reference.dHE_dT(), rel=1e-6)
        np.testing.assert_allclose(result.d_ln_gamma_dT[s], np.array(reference.dgammas_dT()) / gammas, rtol=1e-8, atol=1e-12)
        np.testing.assert_allclose(
            result.d_ln_gamma_dx[s], np.array(reference.dgammas_dns()) / gammas[:, None], rtol=1e-8, atol=1e-10
        )
