"""``traystack run CASE --sensitivity``: the sensitivities of the converged column on screen (the
largest elasticities of the products and duties), all of them in result.json's ``sensitivity``
section and in ``sensitivity.csv`` (:mod:`solver.sensitivity`); when the case states
uncertainties, their linear propagation (:mod:`solver.uncertainty`) in result.json's
``uncertainty`` section."""

from __future__ import annotations

from pathlib import Path

import numpy as np

__all__ = ["DRIVERS_SHOWN", "driver_row", "headline_outputs", "run_sensitivities", "sensitivity_tables"]

#: How many drivers the screen shows per output.
DRIVERS_SHOWN = 3


def headline_outputs(view) -> list[str]:
    """The keys of the outputs the screen shows: product flows, each product's purity (its
    largest mole fraction) and the duties."""
    keys = ["distillate.flow", "bottoms.flow"]
    for product in ("distillate", "bottoms"):
        fractions = [o for o in view.outputs if o.key.startswith(f"{product}.mole_fraction.")]
        if fractions:
            keys.append(max(fractions, key=lambda o: o.value).key)
    keys += [o.key for o in view.outputs if o.key.startswith("duty.")]
    return keys


def driver_row(view, key: str) -> list[str]:
    """One screen row: the output ``key``'s label, its value and its largest drivers with
    their elasticities, one a line."""
    output = view.outputs[view.output_index(key)]
    drivers = [f"{item.key} {elasticity:+.3g}" for item, elasticity, _ in view.largest_drivers(key, DRIVERS_SHOWN)
               if np.isfinite(elasticity) and abs(elasticity) > 1e-9]
    unit = "" if output.unit == "1" else f" {output.unit}"
    return [output.label, f"{output.value:.6g}{unit}", "\n".join(drivers) or "-"]


def sensitivity_tables(study) -> list:
    """One screen table per view: each headline output, its value and its largest drivers with
    their elasticities."""
    from ..reports.display import screen_table

    titles = {"as_specified": "Sensitivities, specs held (elasticities: % change per % change of the input)",
              "as_operated": "Sensitivities, reflux and boilup ratios held"}
    tables = []
    for name, view in study.views():
        rows = [driver_row(view, key) for key in headline_outputs(view)]
        tables.append(screen_table(titles[name], ["output", "value (SI)", "largest drivers (elasticity)"], rows))
    return tables


def run_sensitivities(case, result, out: Path, console):
    """The sensitivities of a converged ``result``: printed, written to ``out/sensitivity.csv``
    and returned attached to the result (``extra["sensitivity"]``, for result.json). An
    unconverged result is returned as it is, with a note (there is nothing to differentiate)."""
    from ..results import write_atomic
    from ..sensitivity import sensitivity_study

    if not result.converged:
        console.print("no sensitivities: the column did not converge", style="yellow")
        return result
    study = sensitivity_study(case, result)
    for table in sensitivity_tables(study):
        console.print(table)
    path = write_atomic(Path(out) / "sensitivity.csv", study.csv())
    seconds = study.as_specified.seconds + study.as_operated.seconds
    console.print(f"sensitivities of {len(study.as_specified.outputs)} outputs to {len(study.as_specified.inputs)} "
                  f"inputs in {seconds:.2f} s; all of them in result.json (sensitivity) and {path.name}")
    if not case.uncertainties:
        return result.with_extra(sensitivity=study)
    from ..uncertainty import linear_uncertainty
    from .uncertainty import linear_table

    linear = linear_uncertainty(case, study)
    console.print(linear_table(linear))
    console.print("the standard uncertainty of every output is in result.json (uncertainty)")
    return result.with_extra(sensitivity=study, uncertainty=linear)
