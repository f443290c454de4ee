"""The Monte Carlo study of ``traystack uncertainty``: every sample of the stated uncertainties
(:func:`solver.uncertainty.draw_samples`) solved warm-started from the nominal solution, in two
views (as :mod:`solver.sensitivity` has them): *as specified*, the case's own specs held (what
the design needs: duties, flows, the reflux or boilup it takes), and *as operated*, the
nominal solution's reflux ratio and boilup ratio held (what the products become in a column run
as designed; the chance that each product spec is met). And for each product spec (a mole
fraction or a recovery) of a column with a condenser and a reboiler, the reflux ratio needed to
meet it: the sample solved with that spec and the design's distillate rate held, the reflux
free (:data:`REFLUX_NEEDED`).

Samples go through any :class:`concurrent.futures.Executor` (local worker processes, or the
executor of a Dask ``Client``); what goes to a worker is plain data (the case's TOML document,
the sample's values, the nominal profile), and each sample starts from the nominal solution,
never from another sample, so the study is the same in any order and on any number of workers.
A sample that does not converge from the nominal profile gets the whole fallback chain
(:func:`solver.warm_starts.solve_warm`); one that still does not converge is counted and
listed, and left out of the percentiles (never dropped silently). :class:`SampleLog` writes the
samples as they finish, so that an interrupted study resumes where it stopped.

A column network (``Case.network``) has one view, its own specs held (:data:`NETWORK_VIEWS`;
a network has no single reflux and boilup ratio to hold), its inputs and outputs those of
:mod:`solver.network_sensitivity`, and no reflux needed or spec chances.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import time
from concurrent.futures import FIRST_COMPLETED, Executor, wait
from dataclasses import dataclass
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from .case import Case, Spec, parse_case
from .engine import build_system, stage_profile
from .network_sensitivity import network_inputs, network_output_values, network_system_of, network_unknowns
from .results import json_safe
from .sensitivity import OutputQuantity, output_values
from .sensitivity_inputs import choose_inputs
from .study_log import StudyLog, fingerprint
from .streams import StageProfile
from .thermo.package import ThermoPackage
from .uncertainty import UncertainInput
from .warm_starts import solve_warm

__all__ = ["NETWORK_VIEWS", "NO_REFLUX_NEEDED", "PERCENTILES", "REFLUX_NEEDED", "VIEWS", "MonteCarloStudy", "RefluxNeeded", "SampleLog", "SampleOutcome",
           "SpecChance", "needed_reflux_specs", "product_specs", "run_samples", "solve_sample", "spec_chances",
           "study_fingerprint"]

#: The percentiles reported of every output.
PERCENTILES = (2.5, 5.0, 25.0, 50.0, 75.0, 95.0, 97.5)
VIEWS = ("as_specified", "as_operated")
#: The views of a network's study: its specs held.
NETWORK_VIEWS = ("as_specified",)
#: What the reflux needed to meet a product spec is, in result files and on screen.
REFLUX_NEEDED = "the reflux ratio of the sample solved with the spec and the design's distillate rate held"
#: Why a network's study has no reflux needed.
NO_REFLUX_NEEDED = "not computed for a column network (its specs held only)"
_VIEW_MEANINGS = {"as_specified": "the case's own specs held",
                  "as_operated": "the nominal solution's reflux ratio and boilup ratio held"}


@dataclass(frozen=True)
class SampleOutcome:
    """One sample solved in each view (:data:`VIEWS`, a network's :data:`NETWORK_VIEWS`): per view ``status`` ("converged", "not converged" or
    "failed"), ``message`` and the outputs (SI, in the order of the nominal outputs; empty
    unless converged), and the ratios the as-specified solution has."""

    index: int
    statuses: tuple[str, ...]
    messages: tuple[str, ...]
    outputs: tuple[tuple[float, ...], ...]
    ratios: tuple[float | None, float | None] = (None, None)
    seconds: float = 0.0
    #: per product spec (:func:`product_specs`): (status, message, reflux ratio needed or None)
    needed: tuple[tuple[str, str, float | None], ...] = ()

    @property
    def converged(self) -> bool:
        return all(status == "converged" for status in self.statuses)


def _operated(case: Case, ratios: tuple[float | None, float | None]) -> Case:
    specs = [Spec(kind, value, key=f"operation.{kind}") for kind, value in zip(("reflux_ratio", "boilup_ratio"), ratios)
             if value is not None]
    return dataclasses.replace(case, specs=tuple(specs))


def _solve_view(case: Case, thermo: ThermoPackage, start: StageProfile, outputs: bool = True):
    try:
        result = solve_warm(case, start, thermo=thermo).result
    except Exception as exc:  # a sample that cannot be solved is one failed sample
        return "failed", f"{type(exc).__name__}: {exc}", (), None
    if not result.converged:
        return "not converged", result.message, (), None
    if not outputs:
        return "converged", "", (), result
    if case.network is not None:
        system = network_system_of(case, thermo)
        values = network_output_values(system, network_unknowns(system, result))
    else:
        system = build_system(case, thermo)
        values = output_values(system, system.unknowns(stage_profile(result)))
    return "converged", "", tuple(float(v) for v in values), result


def product_specs(case: Case) -> tuple[Spec, ...]:
    """The specs of ``case`` on a product's composition: mole fractions and recoveries."""
    return tuple(spec for spec in case.specs if spec.kind in ("mole_fraction", "recovery"))


def needed_reflux_specs(case: Case, distillate_rate: float | None) -> tuple[tuple[Spec, ...], ...]:
    """For each product spec, the specs under which its sample's reflux is the one needed to
    meet it: the spec and the distillate rate ``distillate_rate`` (mol/s) held. None for a
    column without both a condenser and a reboiler or without a distillate rate."""
    column = case.column
    if distillate_rate is None or column is None or column.condenser == "none" or column.reboiler == "none":
        return ()
    rate = Spec("distillate_rate", distillate_rate, key="design.distillate_rate")
    return tuple((spec, rate) for spec in product_specs(case))


def _reflux_needed(case: Case, thermo: ThermoPackage, start: StageProfile, specs: tuple[Spec, ...],
                   specified) -> tuple[str, str, float | None]:
    if {(s.kind, s.value, s.component, s.product) for s in specs} == \
            {(s.kind, s.value, s.component, s.product) for s in case.specs}:
        status, message, _, result = specified  # the case's own specs are these: the as-specified solve
    else:
        status, message, _, result = _solve_view(dataclasses.replace(case, specs=specs), thermo, start, outputs=False)
    return status, message, (result.reflux_ratio if result is not None else None)


def solve_sample(document: Mapping, source_file: str, index: int, keys: Sequence[str], values: Sequence[float],
                 start: StageProfile, ratios: tuple[float | None, float | None],
                 distillate_rate: float | None = None) -> SampleOutcome:
    """Solve sample ``index``: the case of the TOML ``document`` with each input ``keys[m]`` set
    to ``values[m]`` (applied in the order of :func:`~solver.sensitivity_inputs.choose_inputs`),
    from the nominal ``start``, as specified and with the nominal ``ratios`` (reflux, boilup)
    held; with the design's ``distillate_rate`` (mol/s), also the reflux needed to meet each
    product spec (:func:`needed_reflux_specs`). A network case (inputs of
    :func:`~solver.network_sensitivity.network_inputs`, ``start`` a
    :class:`~solver.network_unknowns.NetworkStart`) is solved as specified only. Runs in a worker;
    never raises."""
    started = time.perf_counter()
    try:
        case = parse_case(document, source_file=source_file)
        thermo = ThermoPackage.from_case(case)
        moved = dict(zip(keys, values))
        for parameter in (choose_inputs(case) if case.network is None else network_inputs(case)):
            if parameter.key in moved:
                case, thermo = parameter.apply(case, thermo, float(moved[parameter.key]))
    except Exception as exc:
        message = f"{type(exc).__name__}: {exc}"
        return SampleOutcome(index, ("failed", "failed"), (message, message), ((), ()), seconds=time.perf_counter() - started)
    specified = _solve_view(case, thermo, start)
    if case.network is not None:
        return SampleOutcome(index, specified[:1], specified[1:2], specified[2:3], seconds=time.perf_counter() - started)
    operated = _solve_view(_operated(case, ratios), thermo, start)
    needed = tuple(_reflux_needed(case, thermo, start, specs, specified)
                   for specs in needed_reflux_specs(case, distillate_rate))
    result = specified[3]
    return SampleOutcome(
        index, (specified[0], operated[0]), (specified[1], operated[1]), (specified[2], operated[2]),
        (result.reflux_ratio, result.boilup_ratio) if result is not None else (None, None),
        time.perf_counter() - started, needed,
    )


def run_samples(document: Mapping, source_file: str, inputs: Sequence[UncertainInput], samples: np.ndarray,
                start: StageProfile, ratios: tuple[float | None, float | None], executor: Executor, *,
                progress: Callable[[SampleOutcome], None] | None = None,
                done: Mapping[int, SampleOutcome] | None = None,
                distillate_rate: float | None = None) -> list[SampleOutcome]:
    """Every sample (a row of ``samples``) solved through ``executor``; the outcomes in sample
    order. ``done`` holds samples already solved (a resumed study); they are not solved again.
    ``distillate_rate``: the design's (mol/s), for the reflux needed to meet each product spec."""
    keys = [item.parameter.key for item in inputs]
    outcomes: dict[int, SampleOutcome] = dict(done or {})
    futures = {executor.submit(solve_sample, document, source_file, index, keys, tuple(float(v) for v in row), start,
                               ratios, distillate_rate): index
               for index, row in enumerate(samples) if index not in outcomes}
    try:
        while futures:
            finished, _ = wait(futures, return_when=FIRST_COMPLETED)
            for future in finished:
                index = futures.pop(future)
                try:
                    outcome = future.result()
                except Exception as exc:  # a worker that died is one failed sample
                    message = f"{type(exc).__name__}: {exc}"
                    outcome = SampleOutcome(index, ("failed", "failed"), (message, message), ((), ()))
                outcomes[index] = outcome
                if progress is not None:
                    progress(outcome)
    except KeyboardInterrupt:
        for future in futures:
            future.cancel()
        raise
    return [outcomes[index] for index in sorted(outcomes)]


@dataclass(frozen=True)
class SpecChance:
    """The chance that a product spec is met in the as-operated view: ``sense`` "at least" (a
    purity or a recovery) or "at most" (an impurity); ``met`` of ``converged`` samples."""

    key: str
    output: str
    target: float
    sense: str
    met: int
    converged: int

    @property
    def probability(self) -> float:
        return self.met / self.converged if self.converged else float("nan")


def spec_chances(case: Case, outputs: Sequence[OutputQuantity], operated: np.ndarray) -> tuple[SpecChance, ...]:
    """The chance of meeting every product-composition and recovery spec of ``case`` in the
    converged as-operated samples (rows of ``operated``, NaN rows for unconverged ones)."""
    keys = [o.key for o in outputs]
    rows = operated[~np.isnan(operated).any(axis=1)] if operated.size else operated
    chances = []
    for spec in product_specs(case):
        if spec.kind == "mole_fraction":
            output = f"{spec.product}.mole_fraction.{spec.component}"
            largest = max((o for o in outputs if o.key.startswith(f"{spec.product}.mole_fraction.")), key=lambda o: o.value)
            sense = "at least" if largest.key == output else "at most"
        else:
            output, sense = f"{spec.product}.recovery.{spec.component}", "at least"
        column = rows[:, keys.index(output)] if len(rows) else np.array([])
        met = column >= spec.value if sense == "at least" else column <= spec.value
        chances.append(SpecChance(spec.key, output, spec.value, sense, int(np.sum(met)), len(column)))
    return tuple(chances)


@dataclass(frozen=True)
class RefluxNeeded:
    """The reflux ratio needed to meet one product spec (``key``, ``target``) over the samples:
    the values of the samples that converged (in sample order) and the others (sample, status,
    message)."""

    key: str
    target: float
    values: tuple[float, ...]
    unconverged: tuple[tuple[int, str, str], ...]

    def statistics(self) -> dict[str, float]:
        """Mean, standard deviation (n - 1) and :data:`PERCENTILES` (NaN without values)."""
        values = np.array(self.values)
        if not len(values):
            return {"mean": float("nan"), "standard_deviation": float("nan"),
                    **{f"p{p:g}": float("nan") for p in PERCENTILES}}
        return {"mean": float(values.mean()),
                "standard_deviation": float(values.std(ddof=1)) if len(values) > 1 else 0.0,
                **{f"p{p:g}": float(np.percentile(values, p)) for p in PERCENTILES}}

    def as_json(self) -> dict[str, Any]:
        return {"spec": self.key, "target": self.target, "converged": len(self.values), **self.statistics(),
                "not_converged": [{"sample": i, "status": status, "message": message}
                                  for i, status, message in self.unconverged]}


@dataclass(frozen=True)
class MonteCarloStudy:
    """A Monte Carlo study: the stated inputs, the samples drawn (``seed``), the nominal
    outputs, every sample's outcome, and the figures drawn from them."""

    title: str
    seed: int
    inputs: tuple[UncertainInput, ...]
    samples: np.ndarray
    clipped: int
    outputs: tuple[OutputQuantity, ...]
    outcomes: tuple[SampleOutcome, ...]
    chances: tuple[SpecChance, ...]
    seconds: float = 0.0
    needed_specs: tuple[Spec, ...] = ()  # the product specs whose needed reflux the outcomes hold
    views: tuple[str, ...] = VIEWS  # a network's: NETWORK_VIEWS

    def reflux_needed(self) -> tuple[RefluxNeeded, ...]:
        """The reflux ratio needed to meet each of :attr:`needed_specs` over the samples."""
        found = []
        for k, spec in enumerate(self.needed_specs):
            values, unconverged = [], []
            for outcome in self.outcomes:
                status, message, reflux = outcome.needed[k] if k < len(outcome.needed) else ("failed", "not solved", None)
                if status == "converged" and reflux is not None:
                    values.append(float(reflux))
                else:
                    unconverged.append((outcome.index, status, message))
            found.append(RefluxNeeded(spec.key, spec.value, tuple(values), tuple(unconverged)))
        return tuple(found)

    def matrix(self, view: str) -> np.ndarray:
        """Outputs of every sample in ``view`` (rows), NaN where it did not converge."""
        v = self.views.index(view)
        table = np.full((len(self.outcomes), len(self.outputs)), np.nan)
        for row, outcome in enumerate(self.outcomes):
            if outcome.statuses[v] == "converged":
                table[row] = outcome.outputs[v]
        return table

    def unconverged(self, view: str) -> list[SampleOutcome]:
        v = self.views.index(view)
        return [o for o in self.outcomes if o.statuses[v] != "converged"]

    def statistics(self, view: str) -> dict[str, np.ndarray]:
        """Mean, standard deviation (n - 1) and :data:`PERCENTILES` of every output over the
        converged samples of ``view``."""
        table = self.matrix(view)
        rows = table[~np.isnan(table).any(axis=1)]
        if not len(rows):
            empty = np.full(len(self.outputs), np.nan)
            return {"mean": empty, "standard_deviation": empty, **{f"p{p:g}": empty for p in PERCENTILES}}
        return {"mean": rows.mean(axis=0),
                "standard_deviation": rows.std(axis=0, ddof=1) if len(rows) > 1 else np.zeros(len(self.outputs)),
                **{f"p{p:g}": np.percentile(rows, p, axis=0) for p in PERCENTILES}}

    def as_json(self) -> dict[str, Any]:
        views = {}
        for v, view in enumerate(self.views):
            stats = self.statistics(view)
            views[view] = {
                "converged": len(self.outcomes) - len(self.unconverged(view)),
                "not_converged": [{"sample": o.index, "status": o.statuses[v], "message": o.messages[v]}
                                  for o in self.unconverged(view)],
                "outputs": [{"key": o.key, "label": o.label, "unit": o.unit, "nominal": o.value,
                             **{name: values[k] for name, values in stats.items()}}
                            for k, o in enumerate(self.outputs)],
            }
        return json_safe({
            "schema": "traystack-monte-carlo/1",
            "title": self.title,
            "method": "Monte Carlo propagation (JCGM 101:2008): independent normal inputs, each sample solved from "
                      "the nominal solution",
            "seed": self.seed,
            "samples": len(self.outcomes),
            "clipped_draws": self.clipped,
            "seconds": self.seconds,
            "inputs": [{"key": i.parameter.key, "label": i.parameter.label, "value": i.parameter.value,
                        "unit": i.parameter.unit, "standard_uncertainty": i.deviation} for i in self.inputs],
            "views": {view: _VIEW_MEANINGS[view] for view in self.views},
            "spec_chances": [{"spec": c.key, "output": c.output, "target": c.target, "sense": c.sense, "met": c.met,
                              "converged": c.converged, "probability": c.probability} for c in self.chances],
            "reflux_needed": ({"method": REFLUX_NEEDED, "specs": [item.as_json() for item in self.reflux_needed()]}
                              if self.views == VIEWS else {"method": NO_REFLUX_NEEDED, "specs": []}),
            **views,
        })

    def csv(self) -> str:
        """One row per sample: its input values, each view's status and outputs."""
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\n")
        writer.writerow(["sample", *[i.parameter.key for i in self.inputs], "reflux_ratio", "boilup_ratio",
                         *[f"{view}.status" for view in self.views],
                         *[f"{view}.{o.key}" for view in self.views for o in self.outputs],
                         *[f"reflux_needed.{spec.key}" for spec in self.needed_specs]])
        for outcome, row in zip(self.outcomes, self.samples):
            cells = [outcome.index, *[f"{v:.10g}" for v in row],
                     *["" if r is None else f"{r:.10g}" for r in outcome.ratios], *outcome.statuses]
            for v in range(len(self.views)):
                cells += [f"{x:.10g}" for x in outcome.outputs[v]] or [""] * len(self.outputs)
            needed = list(outcome.needed) + [("failed", "", None)] * (len(self.needed_specs) - len(outcome.needed))
            cells += ["" if reflux is None else f"{reflux:.10g}" for _, _, reflux in needed[:len(self.needed_specs)]]
            writer.writerow(cells)
        return buffer.getvalue()


def study_fingerprint(document: Mapping, inputs: Sequence[UncertainInput], seed: int) -> str:
    """What a sample's outcome depends on besides its index: the case as read, the stated
    inputs and the seed (a SHA-256 of them)."""
    return fingerprint({"case": document, "seed": seed, "inputs": [[i.parameter.key, i.deviation] for i in inputs]})


class SampleLog:
    """The samples of a study written as they finish (:class:`~solver.study_log.StudyLog`), so
    that a study run again into the same folder solves only the samples the log lacks
    (:func:`run_samples` ``done``). A line whose values differ from the sample drawn is ignored."""

    def __init__(self, path, fingerprint: str, samples: np.ndarray) -> None:
        self._samples = samples

        def read(record: dict) -> tuple[int, SampleOutcome] | None:
            index = int(record["sample"])
            if not (0 <= index < len(samples) and np.array_equal(np.array(record["values"]), samples[index])):
                return None
            return index, SampleOutcome(
                index, tuple(record["statuses"]), tuple(record["messages"]),
                tuple(tuple(float(x) for x in view) for view in record["outputs"]),
                tuple(record["ratios"]), float(record["seconds"]),
                tuple((str(status), str(message), None if reflux is None else float(reflux))
                      for status, message, reflux in record["needed"]))

        self._log = StudyLog(path, fingerprint, read)
        self.path, self.done = self._log.path, self._log.done

    def append(self, outcome: SampleOutcome) -> None:
        self._log.append(outcome.index, {
            "sample": outcome.index, "values": [float(v) for v in self._samples[outcome.index]],
            "statuses": list(outcome.statuses), "messages": list(outcome.messages),
            "outputs": [list(view) for view in outcome.outputs], "ratios": list(outcome.ratios),
            "seconds": outcome.seconds, "needed": [list(item) for item in outcome.needed]})

    def close(self) -> None:
        self._log.close()
