"""traystack from Python (a notebook, a script): load or change a case without editing its
text, solve it, and get the stage profile as a pandas DataFrame and the figures as matplotlib
``Figure`` objects.

    from solver import api
    case = api.load("cases/methanol_water.toml")
    case = api.with_spec(case, reflux_ratio=2.0)       # a new, checked case; the old one is unchanged
    result = api.solve(case)                           # a Result; its repr is a short summary
    stages = api.stage_table(result)                   # DataFrame, units in the column names
    figure = api.figure(result, "temperature")         # matplotlib Figure

Cases are frozen: :func:`with_spec`, :func:`with_feed`, :func:`with_stages` and
:func:`with_column` return new cases, read again through the case-file reader (a bad value is
a :class:`~solver.errors.CaseError` naming the key and the value). Tables take the screen
units of the case's ``[display]`` table, or ``units`` written as the command line's
``--units`` (``"si"``, ``"flow=kg/h,pressure=barg"``). pandas is imported only by the table
functions.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from .case import Case, load_case, loads_case, with_column, with_feed, with_spec, with_stages
from .results import Result

__all__ = [
    "FIGURES",
    "figure",
    "figures",
    "load",
    "loads",
    "product_table",
    "solve",
    "stage_table",
    "with_column",
    "with_feed",
    "with_spec",
    "with_stages",
]

load = load_case
loads = loads_case

#: The figures of a solution by name (``yx`` for a binary only).
FIGURES = ("temperature", "flows", "compositions", "yx")


def solve(case: Case, *, max_iterations: int | None = None) -> Result:
    """The rigorous solution of ``case`` (:func:`solver.engine.simulate`). A result that did
    not converge says so (``result.converged``, ``result.message``, and its repr)."""
    from .engine import simulate
    from .newton import NewtonOptions

    options = NewtonOptions(max_iterations=max_iterations) if max_iterations else None
    return simulate(case, options=options)


def _pandas():
    try:
        import pandas
    except ImportError:  # a dependency of traystack (and of chemicals); an environment put together by hand may lack it
        raise ImportError(
            "the tables of solver.api are pandas DataFrames, and pandas is not installed here: pip install pandas"
        ) from None
    return pandas


def _units(result: Result, units: str | None):
    from .reports.display import display_units

    return display_units(result.case.get("display"), units)


def stage_table(result: Result, units: str | None = None) -> Any:
    """The stage profile as a pandas DataFrame, one row per stage (index ``stage``, 1 = top):
    role, temperature, pressure, the liquid and vapor leaving the stage (flow units: a mass
    unit gives each stream's mass flow), side draws, duty, Murphree efficiency, and the
    liquid (``x``), vapor-slot (``y``) mole fractions and K-values of every component. The
    units are in the column names ("T / °C"); ``units`` as in the module's description."""
    pandas = _pandas()
    shown = _units(result, units)
    masses = result.molar_masses
    records = result.stage_records()  # the result file's stream conventions
    flows = {key: np.array([record[key] for record in records]) for key in ("L", "V", "liquid_draw", "vapor_draw")}
    flow = f"/ {shown.flow}"
    columns: dict[str, Any] = {
        "role": list(result.roles),
        f"T / {shown.temperature_label}": shown.T(result.temperature),
        f"P / {shown.pressure}": shown.P(result.pressure),
        f"L {flow}": shown.stream(flows["L"], result.x, masses),
        f"V {flow}": shown.stream(flows["V"], result.y, masses),
        f"liquid draw {flow}": shown.stream(flows["liquid_draw"], result.x, masses),
        f"vapor draw {flow}": shown.stream(flows["vapor_draw"], result.y, masses),
        f"duty / {shown.duty}": shown.Q(result.duty),
        "efficiency": result.efficiency,
    }
    for letter, values in (("x", result.x), ("y", result.y), ("K", result.K)):
        for i, name in enumerate(result.components):
            columns[f"{letter} {name}"] = values[:, i]
    index = pandas.Index(np.arange(1, result.stage_count + 1), name="stage")
    return pandas.DataFrame(columns, index=index)


def product_table(result: Result, units: str | None = None) -> Any:
    """The products as a pandas DataFrame (index: product name): stage, phase, flow,
    temperature and composition in the display's basis (``composition=ppm`` in ``units``
    gives molar ppm, ``ppmw`` mass ppm)."""
    pandas = _pandas()
    shown = _units(result, units)
    masses = result.molar_masses
    rows = {}
    for name, product in result.products().items():
        composition = np.asarray(product["composition"])
        row = {"stage": product["stage"], "phase": product["phase"],
               f"flow / {shown.flow}": shown.stream(product["flow"], composition, masses),
               f"T / {shown.temperature_label}": shown.T(product["T"])}
        row.update(zip((f"{shown.composition_label} {c}" for c in result.components), shown.fractions(composition, masses)))
        rows[name] = row
    return pandas.DataFrame.from_dict(rows, orient="index").rename_axis("product")


def figures(result: Result, case: Case | None = None) -> dict[str, Any]:
    """Every figure of a run by name (:data:`FIGURES`), as matplotlib ``Figure`` objects; with
    the ``case``, a binary's y-x diagram also has its equilibrium curve."""
    from .plots import run_figures

    return run_figures(result, thermo=_thermo(case))


def figure(result: Result, name: str = "temperature", case: Case | None = None) -> Any:
    """One figure of a run (a name of :data:`FIGURES`) as a matplotlib ``Figure``."""
    from . import plots

    makers = {"temperature": plots.temperature_figure, "flows": plots.flow_figure,
              "compositions": plots.composition_figure}
    if name == "yx":
        return plots.yx_figure(result, thermo=_thermo(case))
    if name not in makers:
        raise ValueError(f"no figure {name!r}; the figures are " + ", ".join(FIGURES))
    return makers[name](result)


def _thermo(case: Case | None):
    if case is None:
        return None
    from .thermo.package import ThermoPackage

    return ThermoPackage.from_case(case)
