"""Wall time of the command as a user meets it: whole processes, each figure the median of
several runs, set beside the wall time of ``python -c pass`` (the interpreter's own start) and
of the solve and plots themselves (timed inside one process after its imports), so that the
overhead reads as a ratio on a machine of any speed or load.

    python benchmarks/latency.py [--runs N] [--root DIR] [--out FILE]

``--root`` times another copy of the code (e.g. an older commit unpacked with ``git archive``)
with the same cases. Writes benchmarks/results/latency.json (or FILE) and prints a table.
Each measured command gets a fresh fit cache (``TRAYSTACK_CACHE_DIR``) for its "first" runs
and a filled one for its "second" runs; ``coolprop_imported`` says whether a second run of the
demo imported CoolProp (``python -X importtime``).
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
DEMO = "cases/methanol_water.toml"
#: inside one process after the imports: what the solve and the plots themselves take
SOLVE_AND_PLOT = """
import sys, time, json
from solver.case import load_case
from solver.engine import simulate
from solver.plots import write_all
from solver.thermo.package import ThermoPackage
case = load_case(sys.argv[1])
ThermoPackage.from_case(case)  # the fits, from the cache
start = time.perf_counter()
result = simulate(case)
solved = time.perf_counter()
write_all(result, sys.argv[2], thermo=ThermoPackage.from_case(case))
plotted = time.perf_counter()
print(json.dumps({"solve": solved - start, "plots": plotted - solved}))
"""


#: the third-party libraries a run of the demo needs, imported and nothing else: the floor of
#: what a run costs beyond the solve and plots
LIBRARIES = ("import matplotlib; matplotlib.use('Agg'); import matplotlib.pyplot, numpy, scipy.optimize, scipy.special, "
             "scipy.sparse.linalg, networkx, pint, rich.table, rich.console")


def timed(command: list[str], env: dict, cwd: Path) -> tuple[float, subprocess.CompletedProcess]:
    start = time.perf_counter()
    done = subprocess.run(command, env=env, cwd=cwd, capture_output=True, text=True, timeout=900)
    return time.perf_counter() - start, done


def median_of(runs: int, command: list[str], env: dict, cwd: Path, fresh_cache: Path | None = None,
              expect: int | None = 0) -> dict:
    times = []
    for _ in range(runs):
        if fresh_cache is not None:
            shutil.rmtree(fresh_cache, ignore_errors=True)
        seconds, done = timed(command, env, cwd)
        if expect is not None and done.returncode != expect:
            raise SystemExit(f"{' '.join(command)} exited {done.returncode}: {done.stderr[-2000:]}")
        times.append(seconds)
    return {"median_s": statistics.median(times), "runs_s": times}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=5, help="runs of each light command (default 5)")
    parser.add_argument("--heavy-runs", type=int, default=3, help="runs of run/audit (default 3)")
    parser.add_argument("--root", default=str(HERE.parent), help="the copy of the code to time (default: this one)")
    parser.add_argument("--out", default=str(HERE / "results" / "latency.json"))
    parser.add_argument("--label", default="", help="a note stored with the figures (e.g. a commit)")
    args = parser.parse_args()
    root = Path(args.root).resolve()
    python = sys.executable
    work = Path(tempfile.mkdtemp(prefix="traystack-latency-"))
    cache = work / "cache"
    env = {**os.environ, "PYTHONPATH": str(root), "TRAYSTACK_CACHE_DIR": str(cache)}
    env.pop("TRAYSTACK_NO_CACHE", None)
    demo = root / DEMO
    unknown_component = work / "unknown_component.toml"
    unknown_component.write_text((root / "cases" / "benzene_toluene.toml").read_text().replace("toluene", "toluol-x"))
    unknown_key = work / "unknown_key.toml"
    unknown_key.write_text(demo.read_text().replace("[column]", "[column]\nstagez = 3", 1))
    cli = [python, "-m", "solver.cli"]
    figures: dict[str, dict] = {}

    figures["python -c pass"] = median_of(args.runs, [python, "-c", "pass"], env, work)
    figures["libraries a run needs (import only)"] = median_of(args.runs, [python, "-c", LIBRARIES], env, work)
    figures["--help"] = median_of(args.runs, cli + ["--help"], env, work)
    figures["refused: unknown component"] = median_of(args.runs, cli + ["run", str(unknown_component)], env, work, expect=2)
    figures["refused: unknown key"] = median_of(args.runs, cli + ["run", str(unknown_key)], env, work, expect=2)
    figures["components"] = median_of(args.runs, cli + ["components"], env, work)
    run = cli + ["run", str(demo), "--out", str(work / "run"), "--quiet"]
    figures["run demo, first (empty cache)"] = median_of(args.heavy_runs, run, env, work, fresh_cache=cache)
    timed(run, env, work)  # fills the cache
    figures["run demo, second (filled cache)"] = median_of(args.heavy_runs, run, env, work)
    figures["shortcut demo, second"] = median_of(args.runs, cli + ["shortcut", str(demo), "--out", str(work / "sc"),
                                                               "--quiet"], env, work)
    figures["audit demo, second"] = median_of(args.heavy_runs, cli + ["audit", str(demo), "--out", str(work / "audit"),
                                                                      "--quiet"], env, work)
    inner = []
    for _ in range(args.heavy_runs):
        _, done = timed([python, "-c", SOLVE_AND_PLOT, str(demo), str(work / "inner")], env, work)
        if done.returncode != 0:
            raise SystemExit(done.stderr[-2000:])
        inner.append(json.loads(done.stdout.strip().splitlines()[-1]))
    solve = statistics.median(i["solve"] for i in inner)
    solve_and_plot = statistics.median(i["solve"] + i["plots"] for i in inner)
    _, traced = timed([python, "-X", "importtime"] + run[1:], env, work)
    coolprop = any(line.split("|")[-1].strip().lower().startswith("coolprop")
                   for line in traced.stderr.splitlines() if line.startswith("import time:"))

    python_start = figures["python -c pass"]["median_s"]
    for name, figure in figures.items():
        figure["over_python_start_s"] = figure["median_s"] - python_start
        figure["ratio_to_python_start"] = figure["median_s"] / python_start
    libraries = figures["libraries a run needs (import only)"]["median_s"]
    for name in ("run demo, first (empty cache)", "run demo, second (filled cache)"):
        figures[name]["over_solve_and_plot_s"] = figures[name]["median_s"] - solve_and_plot
        figures[name]["over_solve_plot_and_libraries_s"] = figures[name]["median_s"] - solve_and_plot - libraries
    goals = {
        "refused case within 1 s of python -c pass": max(figures["refused: unknown component"]["over_python_start_s"],
                                                          figures["refused: unknown key"]["over_python_start_s"]) <= 1.0,
        "--help within 1 s of python -c pass": figures["--help"]["over_python_start_s"] <= 1.0,
        "second demo run at most 2 s above solve and plots":
            figures["run demo, second (filled cache)"]["over_solve_and_plot_s"] <= 2.0,
        "second demo run does not import CoolProp": not coolprop,
    }
    document = {
        "benchmark": "latency of the traystack command (whole processes, medians)",
        "label": args.label,
        "root": str(root),
        "python": platform.python_version(),
        "machine": platform.machine(),
        "cpus": os.cpu_count(),
        "load_average": list(os.getloadavg()) if hasattr(os, "getloadavg") else None,
        "runs": {"light": args.runs, "heavy": args.heavy_runs},
        "solve_s": solve,
        "solve_and_plot_s": solve_and_plot,
        "coolprop_imported_on_second_run": coolprop,
        "figures": figures,
        "goals_met": goals,
    }
    out = Path(args.out)
    out.parent.mkdir(parents=True, exist_ok=True)
    temporary = out.with_name(out.name + ".tmp")
    temporary.write_text(json.dumps(document, indent=2) + "\n")
    os.replace(temporary, out)
    print(f"{'command':36s} {'median / s':>10s} {'- python':>9s} {'x python':>9s}")
    for name, figure in figures.items():
        print(f"{name:36s} {figure['median_s']:10.2f} {figure['over_python_start_s']:9.2f} "
              f"{figure['ratio_to_python_start']:9.1f}")
    second = figures["run demo, second (filled cache)"]
    print(f"solve {solve:.2f} s, solve and plots {solve_and_plot:.2f} s; CoolProp imported on a second run: {coolprop}")
    print(f"second run: {second['over_solve_and_plot_s']:.2f} s above solve and plots, of which the libraries' import "
          f"{libraries:.2f} s; {second['over_solve_plot_and_libraries_s']:.2f} s beyond both")
    for goal, met in goals.items():
        print(f"{'met' if met else 'NOT met'}: {goal}")
    print(f"written to {out}")
    shutil.rmtree(work, ignore_errors=True)


if __name__ == "__main__":
    main()
