"""``traystack uncertainty CASE --samples N --seed S``: the Monte Carlo study of the uncertainties
the case states (:mod:`solver.monte_carlo`) beside their linear propagation
(:mod:`solver.uncertainty`); on screen the headline outputs' spread and the chance of meeting
each product spec; ``uncertainty.json``, ``uncertainty.csv`` and ``uncertainty.png`` in the
output folder (each written atomically), and ``samples.jsonl``, the samples as they finish
(:class:`~solver.monte_carlo.SampleLog`: a rerun into the same folder solves only what is missing). Also the uncertainty lines of ``run --sensitivity``.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import os
import sys
import time
from pathlib import Path

__all__ = ["add_uncertainty_command", "command_uncertainty", "linear_table", "write_histograms"]

#: Unconverged samples listed on screen (all of them are in uncertainty.json).
LISTED = 10


def _headline(outputs, network: bool = False) -> list[int]:
    """The indices of the headline outputs: a single column's, or a network's (each product's
    flow and purity, the duties)."""
    from types import SimpleNamespace

    from .network_sensitivity import network_headline_outputs
    from .sensitivity import headline_outputs

    keys = (network_headline_outputs if network else headline_outputs)(SimpleNamespace(outputs=outputs))
    return [next(k for k, o in enumerate(outputs) if o.key == key) for key in keys]


#: The column header of each view's standard uncertainty.
_VIEW_HEADERS = {"as_specified": "u, specs held", "as_operated": "u, ratios held"}


def linear_table(linear, headline_keys=None):
    """The headline outputs (``headline_keys(view)``, by default a single column's) with their
    linearly propagated standard uncertainties, in every view of ``linear``."""
    from ..reports.display import screen_table

    name, view, deviations = linear.views[0]
    keys = headline_keys(view) if headline_keys else [view.outputs[k].key for k in _headline(view.outputs)]
    rows = []
    for key in keys:
        output = view.outputs[view.output_index(key)]
        cells = [output.label, f"{output.value:.6g}"]
        for _, other, values in linear.views:
            cells.append(f"{values[other.output_index(output.key)]:.3g}")
        rows.append(cells)
    return screen_table("Standard uncertainty of the outputs (linear propagation of the stated uncertainties)",
                        ["output", "value (SI)", *[_VIEW_HEADERS[name] for name, _, _ in linear.views]], rows)


def write_histograms(study, path: Path) -> Path:
    """One histogram per headline output of the as-operated view (a network's: specs held),
    the nominal value and any spec target marked (:func:`solver.plots.sample_histograms`)."""
    from ..plots import sample_histograms

    network = "as_operated" not in study.views
    table = study.matrix(study.views[-1])
    targets = {chance.output: chance.target for chance in study.chances}
    panels = []
    for k in _headline(study.outputs, network):
        output = study.outputs[k]
        label = output.unit if output.unit != "1" else "mole fraction" if "fraction" in output.key else ""
        panels.append((output.label, f"{label} (SI)", table[:, k], output.value, targets.get(output.key)))
    held = "specs held" if network else "reflux and boilup ratios held"
    return sample_histograms(panels, path, f"{study.title}: {len(study.outcomes)} samples, {held}")


def _statistics_table(study, view: str, linear, network: bool = False):
    from ..reports.display import screen_table

    stats = study.statistics(view)
    _, sensitivities, deviations = next(item for item in linear.views if item[0] == view)
    rows = []
    for k in _headline(study.outputs, network):
        output = study.outputs[k]
        rows.append([output.label, f"{output.value:.6g}",
                     f"{deviations[sensitivities.output_index(output.key)]:.3g}",
                     f"{stats['standard_deviation'][k]:.3g}",
                     *[f"{stats[name][k]:.6g}" for name in ("p2.5", "p50", "p97.5")]])
    titles = {"as_specified": "Monte Carlo, specs held", "as_operated": "Monte Carlo, reflux and boilup ratios held"}
    return screen_table(titles[view], ["output", "nominal (SI)", "u linear", "u Monte Carlo", "2.5 %", "median",
                                       "97.5 %"], rows)


def _nominal(case):
    """The nominal solution of ``case``, the start of its samples, the linear propagation, and
    the design's (reflux ratio, boilup ratio) and distillate rate (None for a network, which
    holds its specs only)."""
    from ..uncertainty import linear_uncertainty

    if case.network is not None:
        from ..network_engine import simulate_network
        from ..network_sensitivity import NetworkSensitivityStudy, network_sensitivities
        from ..network_unknowns import network_start

        nominal = simulate_network(case)
        if not nominal.converged:
            return nominal, None, None, (None, None), None
        linear = linear_uncertainty(case, NetworkSensitivityStudy(network_sensitivities(case, nominal)))
        return nominal, network_start(nominal), linear, (None, None), None
    from ..engine import simulate, stage_profile
    from ..sensitivity import sensitivity_study

    nominal = simulate(case)
    if not nominal.converged:
        return nominal, None, None, (None, None), None
    linear = linear_uncertainty(case, sensitivity_study(case, nominal))
    return nominal, stage_profile(nominal), linear, (nominal.reflux_ratio, nominal.boilup_ratio), nominal.distillate_flow


def command_uncertainty(args: argparse.Namespace) -> int:
    from ..caution import CAUTION
    from ..errors import CaseError
    from .common import console_for, output_folder, progress_bar, read_case

    console = console_for()
    case_path, case = read_case(args.case, "uncertainty")
    if not case.uncertainties:
        raise CaseError("the case states no uncertainties", file=str(case_path), key="uncertainty",
                        expected="an [uncertainty] table (README.md, \"Case files\")")
    from ..monte_carlo import (
        NETWORK_VIEWS,
        VIEWS,
        MonteCarloStudy,
        SampleLog,
        needed_reflux_specs,
        run_samples,
        spec_chances,
        study_fingerprint,
    )
    from ..results import write_atomic
    from ..sweep import load_document
    from ..uncertainty import draw_samples
    from ..workers import stop_workers, study_executor

    out = output_folder(args.out, case_path, "_uncertainty")
    network = case.network is not None
    nominal, start, linear, ratios, distillate_rate = _nominal(case)
    if not nominal.converged:
        print(f"traystack: the nominal case does not converge ({nominal.message}); there is no solution to start "
              "the samples from", file=sys.stderr)
        return 3
    samples, clipped = draw_samples(linear.inputs, args.samples, args.seed)
    document = load_document(case_path)
    log = SampleLog(out / "samples.jsonl", study_fingerprint(document, linear.inputs, args.seed), samples)
    if log.done:
        console.print(f"resuming: {len(log.done)} of {args.samples} samples already solved in {log.path}")
    started = time.perf_counter()
    executor = study_executor(args.jobs, args.scheduler)
    try:
        with progress_bar(console) as progress:
            task = progress.add_task(f"{args.samples} samples of {case.title or case_path.name}", total=args.samples,
                                     completed=len(log.done))

            def advance(outcome) -> None:
                log.append(outcome)
                progress.advance(task)
                progress.refresh()

            outcomes = run_samples(document, str(case_path), linear.inputs, samples, start, ratios, executor,
                                   progress=advance, done=log.done, distillate_rate=distillate_rate)
    except KeyboardInterrupt:
        stop_workers(executor)
        log.close()
        print(f"traystack: interrupted; the samples solved so far are kept in {log.path}: run the same command "
              "again to solve only the rest", file=sys.stderr)
        return 130
    except BaseException:
        executor.shutdown(wait=False, cancel_futures=True)
        log.close()
        raise
    executor.shutdown()
    log.close()
    outputs = linear.views[0][1].outputs
    needed_specs = tuple(specs[0] for specs in needed_reflux_specs(case, distillate_rate))
    study = MonteCarloStudy(case.title, args.seed, linear.inputs, samples, clipped, outputs, tuple(outcomes), (),
                            time.perf_counter() - started, needed_specs, NETWORK_VIEWS if network else VIEWS)
    if not network:
        study = dataclasses.replace(study, chances=spec_chances(case, outputs, study.matrix("as_operated")))
    record = {**study.as_json(), "linear": linear.as_json()}
    written = [write_atomic(out / "uncertainty.json", json.dumps(record, indent=1) + "\n"),
               write_atomic(out / "uncertainty.csv", study.csv())]
    if any(o.statuses[-1] == "converged" for o in study.outcomes):
        written.append(write_histograms(study, out / "uncertainty.png"))
    for view in study.views:
        console.print(_statistics_table(study, view, linear, network))
    if network:
        console.print("a column network is solved with its specs held only: the chance of meeting each spec at the "
                      "design's reflux and the reflux needed to meet it are not computed for networks")
    for chance in study.chances:
        console.print(f"chance that {chance.output} is {chance.sense} {chance.target:g} at the design's reflux and "
                      f"boilup ratios: {chance.probability:.1%} ({chance.met} of {chance.converged} samples)")
    for needed in study.reflux_needed():
        stats = needed.statistics()
        console.print(f"reflux ratio needed to meet {needed.key} = {needed.target:g} (the design's distillate rate "
                      f"held): median {stats['p50']:.4g}, 2.5-97.5 % {stats['p2.5']:.4g} to {stats['p97.5']:.4g}, "
                      f"95 % {stats['p95']:.4g} (design {nominal.reflux_ratio:.4g}; {len(needed.values)} of "
                      f"{len(study.outcomes)} samples)")
        if needed.unconverged:
            console.print(f"{len(needed.unconverged)} sample(s) found no reflux meeting {needed.key}: "
                          + "; ".join(f"sample {i}: {message}" for i, _, message in needed.unconverged[:LISTED])
                          + (" ..." if len(needed.unconverged) > LISTED else ""))
    for v, view in enumerate(study.views):
        failed = study.unconverged(view)
        if failed:
            console.print(f"{len(failed)} of {len(study.outcomes)} samples did not converge ({view}): "
                          + "; ".join(f"sample {o.index}: {o.messages[v]}"
                                      for o in failed[:LISTED]) + (" ..." if len(failed) > LISTED else ""))
    if clipped:
        console.print(f"{clipped} drawn value(s) lay outside their input's range and were clipped into it")
    console.print(f"{len(study.outcomes)} samples (seed {args.seed}) in {study.seconds:.1f} s; files written to "
                  f"{out}{os.sep}: " + ", ".join(path.name for path in written))
    console.print(f"Caution: {CAUTION}", style="dim")
    return 0 if any(o.converged for o in study.outcomes) else 3


def add_uncertainty_command(sub) -> None:
    from .common import add_scheduler_option, positive_int

    command = sub.add_parser("uncertainty", help="Monte Carlo over the uncertainties the case states: percentiles, "
                             "histograms, the chance of meeting each product spec")
    command.add_argument("case", help="case file (TOML) with an [uncertainty] table")
    command.add_argument("--samples", type=positive_int, default=200, metavar="N", help="number of samples (default 200)")
    command.add_argument("--seed", type=int, default=1, metavar="S",
                         help="seed of the random draws (default 1); the same seed gives the same study")
    command.add_argument("--jobs", type=positive_int, default=1, metavar="N", help="solve N samples at a time in worker processes (default 1)")
    add_scheduler_option(command)
    command.add_argument("--out", metavar="DIR", help="output folder (default: CASE_uncertainty in the current folder)")
    command.set_defaults(handler=command_uncertainty)
