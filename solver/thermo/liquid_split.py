"""Would a column's liquids split into two liquid phases? The tangent-plane test of
:mod:`.stability` (Michelsen, Fluid Phase Equilib. 9 (1982) 1-19) applied to every stage's
liquid at once, with the case's activity model.

A rigorous solution of the MESH equations with one liquid per stage is only physical where
each stage's liquid is stable; where the test finds a trial liquid of lower Gibbs energy, the
stage would hold two liquids (a decanter's job) and the single-liquid answer is wrong there.
The ideal solution and Wilson's equation cannot predict two liquids (Wilson 1964): for them the
test is skipped and recorded as such.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from solver.thermo.stability import SPLIT_TOLERANCE, liquid_stability

__all__ = ["LiquidSplitCheck", "check_liquids"]

#: activity models that cannot predict two liquid phases
_NEVER_SPLIT = ("ideal", "wilson")


@dataclass(frozen=True, eq=False)
class LiquidSplitCheck:
    """The stability test of a set of liquids (stages, or the points of an equilibrium curve).

    ``tested`` False (with ``reason``) for a model that cannot split. ``labels`` name each
    liquid (stage numbers, or the curve's x); ``minimum_tpd`` (n,) the lowest tangent-plane
    distance / RT found for each; ``split`` the indices of the liquids that would split;
    ``compositions`` (n, c) the liquids tested and ``trial_compositions`` (n, c) the incipient
    second liquid found for each."""

    tested: bool
    model: str
    components: tuple[str, ...]
    reason: str = ""
    labels: tuple[Any, ...] = ()
    temperature: np.ndarray | None = None
    compositions: np.ndarray | None = None
    trial_compositions: np.ndarray | None = None
    minimum_tpd: np.ndarray | None = None
    converged: np.ndarray | None = None

    @property
    def split(self) -> tuple[int, ...]:
        if not self.tested:
            return ()
        return tuple(int(k) for k in np.flatnonzero(self.minimum_tpd < -SPLIT_TOLERANCE))

    @property
    def split_labels(self) -> tuple[Any, ...]:
        return tuple(self.labels[k] for k in self.split)

    def as_json(self) -> dict[str, Any]:
        record: dict[str, Any] = {
            "method": "tangent-plane distance, Michelsen, Fluid Phase Equilib. 9 (1982) 1-19",
            "model": self.model,
            "tested": self.tested,
        }
        if not self.tested:
            record["reason"] = self.reason
            return record
        names = self.components
        record.update(
            split=[self.labels[k] for k in self.split],
            liquids=[
                {
                    "label": self.labels[k],
                    "T": float(self.temperature[k]),
                    "minimum_tpd": float(self.minimum_tpd[k]),
                    "converged": bool(self.converged[k]),
                    **(
                        {
                            "liquid": dict(zip(names, self.compositions[k].tolist())),
                            "second_liquid": dict(zip(names, self.trial_compositions[k].tolist())),
                        }
                        if k in self.split
                        else {}
                    ),
                }
                for k in range(len(self.labels))
            ],
        )
        return record


def check_liquids(
    activity, temperature: np.ndarray, x: np.ndarray, labels: Sequence[Any], components: Sequence[str]
) -> LiquidSplitCheck:
    """Test the liquids ``x (n, c)`` at ``temperature (n,)`` K under ``activity`` (any model
    of :mod:`.activity` or :mod:`.unifac`), all states in one vectorized call."""
    model = getattr(activity, "name", type(activity).__name__.lower())
    if model in _NEVER_SPLIT or len(components) < 2:
        return LiquidSplitCheck(False, model, tuple(components),
                                reason=f"the {model} liquid model cannot predict two liquid phases")
    temperature = np.asarray(temperature, dtype=float)
    x = np.clip(np.asarray(x, dtype=float), 0.0, None)
    found = liquid_stability(activity, temperature, x)
    return LiquidSplitCheck(
        True, model, tuple(components),
        labels=tuple(labels),
        temperature=temperature.copy(),
        compositions=x / x.sum(axis=1, keepdims=True),
        trial_compositions=np.array([f.trial_composition for f in found]),
        minimum_tpd=np.array([f.minimum_tpd for f in found]),
        converged=np.array([f.converged for f in found]),
    )
