"""``traystack run NETWORK_CASE --sensitivity``: the sensitivities of a converged column network
(:mod:`solver.network_sensitivity`) on screen (the largest elasticities of each product's flow
and purity and of each duty), all of them in result.json's ``sensitivity`` section and in
``sensitivity.csv``, as for one column (:mod:`solver.cli.sensitivity`); when the case states
uncertainties, their linear propagation (:mod:`solver.uncertainty`) on screen and in
result.json's ``uncertainty`` section."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from .sensitivity import driver_row

__all__ = ["network_headline_outputs", "network_sensitivity_table", "run_network_sensitivities"]


def network_headline_outputs(view) -> list[str]:
    """The keys the screen shows: each product's flow and purity (its largest mole fraction),
    then the duties."""
    keys = []
    for output in view.outputs:
        if output.key.endswith(".flow") and not output.key.startswith(("connection.", "stage.")):
            product = output.key[: -len(".flow")]
            keys.append(output.key)
            fractions = [o for o in view.outputs if o.key.startswith(f"{product}.mole_fraction.")]
            keys.append(max(fractions, key=lambda o: o.value).key)
    return keys + [o.key for o in view.outputs if o.key.startswith("duty.")]


def network_sensitivity_table(view):
    """The screen table: each headline output, its value and its largest drivers with their
    elasticities."""
    from ..reports.display import screen_table

    rows = [driver_row(view, key) for key in network_headline_outputs(view)]
    return screen_table("Sensitivities, specs held (elasticities: % change per % change of the input)",
                        ["output", "value (SI)", "largest drivers (elasticity)"], rows)


def run_network_sensitivities(case, result, out: Path, console):
    """The sensitivities of a converged network ``result``: printed, written to
    ``out/sensitivity.csv`` and returned attached to the result (``extra["sensitivity"]``, for
    result.json), with the linear uncertainties (``extra["uncertainty"]``) when the case states
    any. An unconverged result is returned as it is, with a note."""
    from ..network_sensitivity import NetworkSensitivityStudy, network_sensitivities
    from ..results import write_atomic

    if not result.converged:
        console.print("no sensitivities: the network did not converge", style="yellow")
        (Path(out) / "sensitivity.csv").unlink(missing_ok=True)
        return result
    study = NetworkSensitivityStudy(network_sensitivities(case, result))
    view = study.as_specified
    console.print(network_sensitivity_table(view))
    path = write_atomic(Path(out) / "sensitivity.csv", study.csv())
    console.print(f"sensitivities of {len(view.outputs)} outputs to {len(view.inputs)} inputs in {view.seconds:.2f} s; "
                  f"all of them in result.json (sensitivity) and {path.name}")
    extra = {**result.extra, "sensitivity": study}
    if case.uncertainties:
        from ..uncertainty import linear_uncertainty
        from .uncertainty import linear_table

        extra["uncertainty"] = linear_uncertainty(case, study)
        console.print(linear_table(extra["uncertainty"], network_headline_outputs))
        console.print("the standard uncertainty of every output is in result.json (uncertainty)")
    return dataclasses.replace(result, extra=extra)
