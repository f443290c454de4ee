"""The two-parameter cubic equations of state this project offers, as constants: the terms
delta1, delta2 of the attractive denominator (v + delta1 b)(v + delta2 b), Omega_a and Omega_b
(the exact solutions of the critical conditions dP/dv = d2P/dv2 = 0 at Tc, which the papers
round), and the slope m(omega) of Soave's alpha function alpha = (1 + m (1 - sqrt(T/Tc)))^2.

* Peng-Robinson: D.-Y. Peng and D. B. Robinson, Ind. Eng. Chem. Fundam. 15 (1976) 59-64; for
  acentric factors above 0.491 the m(omega) of D. B. Robinson and D.-Y. Peng, GPA Research
  Report RR-28 (1978).
* Soave-Redlich-Kwong: G. Soave, Chem. Eng. Sci. 27 (1972) 1197-1203.

The evaluation is in :mod:`solver.thermo.cubic`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

__all__ = ["CubicForm", "CUBIC_FORMS"]


def _peng_robinson_m(omega: np.ndarray) -> np.ndarray:
    omega = np.asarray(omega, dtype=float)
    m_1976 = 0.37464 + omega * (1.54226 - 0.26992 * omega)
    m_1978 = 0.379642 + omega * (1.48503 + omega * (-0.164423 + 0.016666 * omega))
    return np.where(omega > 0.491, m_1978, m_1976)


def _soave_m(omega: np.ndarray) -> np.ndarray:
    omega = np.asarray(omega, dtype=float)
    return 0.480 + omega * (1.574 - 0.176 * omega)


@dataclass(frozen=True)
class CubicForm:
    """One cubic equation: the constants delta1, delta2 of its attractive term, Omega_a,
    Omega_b, and the slope m(omega) of its alpha function."""

    name: str
    delta1: float
    delta2: float
    omega_a: float
    omega_b: float
    m_function: Callable[[np.ndarray], np.ndarray]
    m_text: str
    source: str


_SQRT2 = float(np.sqrt(2.0))
CUBIC_FORMS: dict[str, CubicForm] = {
    "peng-robinson": CubicForm(
        "peng-robinson",
        1.0 + _SQRT2,
        1.0 - _SQRT2,
        0.45723552892138218938,
        0.077796073903888455972,
        _peng_robinson_m,
        "m = 0.37464 + 1.54226 w - 0.26992 w^2 (w <= 0.491); "
        "m = 0.379642 + 1.48503 w - 0.164423 w^2 + 0.016666 w^3 (w > 0.491)",
        "D.-Y. Peng and D. B. Robinson, Ind. Eng. Chem. Fundam. 15 (1976) 59-64; m for w > 0.491: "
        "D. B. Robinson and D.-Y. Peng, GPA Research Report RR-28 (1978)",
    ),
    "soave-redlich-kwong": CubicForm(
        "soave-redlich-kwong",
        1.0,
        0.0,
        0.42748023354034140439,
        0.086640349964957721589,
        _soave_m,
        "m = 0.480 + 1.574 w - 0.176 w^2",
        "G. Soave, Chem. Eng. Sci. 27 (1972) 1197-1203",
    ),
}
