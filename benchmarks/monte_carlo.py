"""Monte Carlo throughput: the samples of cases/methanol_water_uncertain.toml (each solved from
the nominal solution, specs held and reflux/boilup ratios held) on 1 and 2 local worker
processes and on a Dask LocalCluster of 2 worker processes. Figures: samples per second, the
parallel efficiency (throughput on n workers / (n x throughput on 1)), and whether the
percentiles of every output are identical across the three runs. The pools are started and
warmed (one sample each) before the clock starts. Writes benchmarks/results/monte_carlo.json.

    python benchmarks/monte_carlo.py [SAMPLES]   (default 120)
"""

from __future__ import annotations

import dataclasses
import os
import sys
import time
from concurrent.futures import ProcessPoolExecutor

from _common import HERE, save

from solver.case import load_case
from solver.engine import simulate, stage_profile
from solver.monte_carlo import MonteCarloStudy, run_samples, spec_chances
from solver.sensitivity import sensitivity_study
from solver.sweep import load_document
from solver.uncertainty import draw_samples, linear_uncertainty

CASE = HERE.parent / "cases" / "methanol_water_uncertain.toml"
SEED = 7


def measure(executor, arguments, samples) -> tuple[float, MonteCarloStudy]:
    document, inputs, start, ratios, case, outputs = arguments
    run_samples(document, str(CASE), inputs, samples[:1], start, ratios, executor)  # warm the workers
    started = time.perf_counter()
    outcomes = run_samples(document, str(CASE), inputs, samples, start, ratios, executor)
    seconds = time.perf_counter() - started
    study = MonteCarloStudy(case.title, SEED, inputs, samples, 0, outputs, tuple(outcomes), ())
    study = dataclasses.replace(study, chances=spec_chances(case, outputs, study.matrix("as_operated")))
    return seconds, study


def main() -> None:
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 120
    load = os.getloadavg()[0]  # other work on the machine: efficiencies below 1 may be its share
    case = load_case(CASE)
    nominal = simulate(case)
    linear = linear_uncertainty(case, sensitivity_study(case, nominal))
    samples, _ = draw_samples(linear.inputs, count, SEED)
    arguments = (load_document(CASE), linear.inputs, stage_profile(nominal),
                 (nominal.reflux_ratio, nominal.boilup_ratio), case, linear.views[0][1].outputs)
    runs = {}
    for workers in (1, 2):
        with ProcessPoolExecutor(max_workers=workers) as executor:
            runs[f"local_{workers}"] = measure(executor, arguments, samples)
    from distributed import Client, LocalCluster

    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster, \
            Client(cluster) as client:
        runs["local_cluster_2"] = measure(client.get_executor(pure=False), arguments, samples)
    base = runs["local_1"][0]
    figures = {"samples": count, "seed": SEED, "case": CASE.name, "cpu_count": os.cpu_count(),
               "load_average_1min_at_start": load, "load_average_1min_at_end": os.getloadavg()[0],
               "note": "the machine's 2 cores are shared with other work; efficiencies are indicative"}
    reference = runs["local_1"][1].as_json()
    for name, (seconds, study) in runs.items():
        workers = 1 if name == "local_1" else 2
        data = study.as_json()
        figures[name] = {
            "seconds": seconds, "samples_per_second": count / seconds,
            "parallel_efficiency": base / (workers * seconds),
            "percentiles_identical_to_local_1": all(data[v]["outputs"] == reference[v]["outputs"]
                                                   for v in ("as_specified", "as_operated")),
            "not_converged": [len(study.unconverged(v)) for v in ("as_specified", "as_operated")],
        }
        print(f"{name}: {count / seconds:.2f} samples/s, efficiency {figures[name]['parallel_efficiency']:.2f}, "
              f"identical percentiles: {figures[name]['percentiles_identical_to_local_1']}")
    chance = reference["spec_chances"][0]
    figures["bottoms_spec_chance"] = chance
    operated = {o["key"]: o for o in reference["as_operated"]["outputs"]}["bottoms.mole_fraction.water"]
    figures["bottoms_water_as_operated"] = {k: operated[k] for k in ("nominal", "standard_deviation", "p2.5", "p50", "p97.5")}
    figures["bottoms_water_linear_standard_uncertainty"] = linear.deviation("as_operated", "bottoms.mole_fraction.water")
    print(f"chance of meeting {chance['spec']}: {chance['probability']:.1%} ({chance['met']} of {chance['converged']})")
    save("monte_carlo", figures)


if __name__ == "__main__":
    main()
