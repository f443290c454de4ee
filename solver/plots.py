"""Figures of a column solution: functions that return matplotlib :class:`Figure` objects
(made without pyplot, so a notebook shows them and no window or backend is needed), and thin
savers that write one as PNG, atomically (:func:`save_figure`).

Profiles against stage number (temperature, internal liquid and vapor flows, liquid
compositions), for a binary the y-x diagram, and the figure of a parameter sweep. The y-x
diagram takes extra *layers* (functions that draw on its axes), so that the shortcut design's
straight operating lines and steps can be laid over the rigorous solution
(:func:`shortcut_layer`); :func:`shortcut_yx_diagram` draws a shortcut design alone and
:func:`cmo_flow_profiles` the internal flows against their constant-molar-overflow values.
"""

from __future__ import annotations

import io
from pathlib import Path
from typing import Callable, Mapping, Sequence

import numpy as np
from matplotlib import colormaps
from matplotlib.axes import Axes
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.ticker import MaxNLocator

from .results import Result, write_atomic
from .thermo.flash import bubble_temperature

__all__ = [
    "YXLayer",
    "cmo_flow_figure",
    "cmo_flow_profiles",
    "composition_figure",
    "composition_profiles",
    "equilibrium_curve",
    "flow_figure",
    "flow_profiles",
    "light_component",
    "new_figure",
    "profile_composition_figure",
    "profile_temperature_figure",
    "run_figures",
    "sample_histograms",
    "save_figure",
    "shortcut_layer",
    "shortcut_yx_diagram",
    "shortcut_yx_figure",
    "stage_axis",
    "stage_marks",
    "sweep_figure",
    "sweep_plot",
    "temperature_figure",
    "temperature_profile",
    "write_all",
    "yx_diagram",
    "yx_figure",
]

#: Something that draws on the y-x diagram: called as ``layer(axes, light)``, ``light`` being the
#: index of the component whose mole fractions are on the axes.
YXLayer = Callable[[Axes, int], None]


def new_figure(figsize: tuple[float, float]) -> tuple[Figure, Axes]:
    """A figure with one axes, outside pyplot's figure manager (nothing to close)."""
    figure = Figure(figsize=figsize)
    return figure, figure.subplots()


def save_figure(figure: Figure, path: str | Path) -> Path:
    """Write ``figure`` as a PNG file at ``path`` (atomically); returns the path."""
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=110, bbox_inches="tight")
    return write_atomic(Path(path), buffer.getvalue())


def stage_axis(ax, count: int) -> None:
    """Stage number on the y axis, 1 (the top) uppermost, whole numbers, a light grid."""
    ax.yaxis.set_major_locator(MaxNLocator(integer=True))
    ax.set_ylabel("stage (1 = top)")
    ax.set_ylim(count + 0.5, 0.5)
    ax.grid(True, alpha=0.3)


def _title(figure, result_title: str, what: str) -> None:
    """One title style for every figure: what it shows, then the case's title, above the axes."""
    figure.suptitle(f"{what}\n{result_title}" if result_title else what, fontsize=9)


def stage_marks(result: Result) -> list[tuple[int, str]]:
    """(stage, label) of every stage where the flows jump: feeds, side draws, side heaters
    and coolers (stage numbers from 1)."""
    marks = [(j + 1, "feed") for j, feeds in enumerate(result.stage_feeds) if feeds]
    marks += [(int(j) + 1, "side draw") for j in np.flatnonzero((result.liquid_draw > 0) | (result.vapor_draw > 0))]
    marks += [(duty.stage, "side heater" if duty.duty > 0 else "side cooler") for duty in result.stage_duties]
    return sorted(marks)


_MARK_STYLES = {"feed": ("tab:green", "--"), "side draw": ("tab:purple", "-."), "side heater": ("tab:red", ":"),
                "side cooler": ("tab:blue", ":"), "to a connection": ("tab:orange", "-."),
                "from a connection": ("tab:cyan", "--")}


def _mark_stages(ax, marks: Sequence[tuple[int, str]]) -> None:
    """A horizontal line at each marked stage (feed, side draw, heater, cooler, connection),
    labelled once per kind."""
    shown = set()
    for stage, kind in marks:
        color, style = _MARK_STYLES[kind]
        ax.axhline(stage, color=color, linestyle=style, linewidth=0.9, alpha=0.8,
                   label=None if kind in shown else kind, gid=f"stage-mark {kind} {stage}")
        shown.add(kind)


def temperature_figure(result: Result) -> Figure:
    """Temperature against stage number, feeds and side streams marked."""
    return profile_temperature_figure(result.title, result.temperature, stage_marks(result))


def profile_temperature_figure(title: str, temperature: np.ndarray, marks: Sequence[tuple[int, str]],
                               what: str = "stage temperatures") -> Figure:
    """Temperature (K, shown in °C) against stage number (1 = top), with ``marks`` ((stage,
    kind) as :func:`stage_marks` gives them) drawn across."""
    count = len(temperature)
    figure, ax = new_figure((5, 6))
    ax.plot(np.asarray(temperature) - 273.15, np.arange(1, count + 1), "o-", color="tab:red", markersize=3, label="temperature")
    ax.set_xlabel("temperature / °C")
    stage_axis(ax, count)
    _mark_stages(ax, marks)
    ax.legend(loc="best", fontsize=8)
    _title(figure, title, what)
    return figure


def flow_figure(result: Result) -> Figure:
    """Liquid and vapor flows leaving each tray (kmol/h); the condenser and reboiler slots
    hold products and are left out so the internal flows can be read. Feed, side-draw and
    side-duty stages are marked, where the flows jump."""
    stages = np.arange(1, result.stage_count + 1)
    inner = np.ones(result.stage_count, dtype=bool)
    if result.condenser != "none":
        inner[0] = False
    if result.reboiler != "none":
        inner[-1] = False
    figure, ax = new_figure((5, 6))
    to_kmol_h = 3.6
    ax.plot(result.liquid_flow[inner] * to_kmol_h, stages[inner], "o-", markersize=3, label="liquid L")
    ax.plot(result.vapor_flow[inner] * to_kmol_h, stages[inner], "s-", markersize=3, label="vapor V")
    ax.set_xlabel("flow leaving the stage / kmol/h")
    stage_axis(ax, result.stage_count)
    _mark_stages(ax, stage_marks(result))
    ax.legend(loc="best", fontsize=8)
    _title(figure, result.title, "internal flows (rigorous)")
    return figure


def composition_figure(result: Result) -> Figure:
    """Liquid mole fractions against stage number, on a linear scale and on a log scale (where
    key impurities of 1e-4 and below can be read); feeds and side streams marked."""
    return profile_composition_figure(result.title, result.components, result.x, stage_marks(result))


def profile_composition_figure(title: str, components: Sequence[str], x: np.ndarray, marks: Sequence[tuple[int, str]],
                               what: str = "liquid compositions") -> Figure:
    """Liquid mole fractions ``x`` (stages, components) against stage number, linear and log
    scale side by side, with ``marks`` drawn across (see :func:`profile_temperature_figure`)."""
    x = np.asarray(x)
    count = len(x)
    stages = np.arange(1, count + 1)
    figure = Figure(figsize=(9, 6))
    linear, logarithmic = figure.subplots(1, 2, sharey=True)
    for i, name in enumerate(components):
        line, = linear.plot(x[:, i], stages, "-", label=f"x {name}")
        logarithmic.plot(np.clip(x[:, i], 1e-300, None), stages, "-", color=line.get_color())
    linear.set_xlabel("liquid mole fraction")
    linear.set_xlim(-0.02, 1.02)
    logarithmic.set_xscale("log")
    logarithmic.set_xlabel("liquid mole fraction (log scale)")
    smallest = float(np.min(x[x > 0])) if np.any(x > 0) else 1e-12
    logarithmic.set_xlim(max(smallest, 1e-15) / 2, 1.5)
    for ax in (linear, logarithmic):
        stage_axis(ax, count)
        _mark_stages(ax, marks)
    logarithmic.set_ylabel("")
    linear.legend(loc="best", fontsize=8)
    _title(figure, title, what)
    return figure


def temperature_profile(result: Result, path: Path) -> Path:
    return save_figure(temperature_figure(result), path)


def flow_profiles(result: Result, path: Path) -> Path:
    return save_figure(flow_figure(result), path)


def composition_profiles(result: Result, path: Path) -> Path:
    return save_figure(composition_figure(result), path)


def light_component(result: Result) -> int:
    """Index of the component the distillate is richest in, against the bottoms."""
    return int(np.argmax(result.distillate_composition - result.bottoms_composition))


def equilibrium_curve(thermo, pressure: float, light: int = 0, points: int = 101) -> tuple[np.ndarray, np.ndarray]:
    """Liquid ``x`` and equilibrium vapor ``y`` mole fractions of component ``light`` of a
    binary at ``pressure`` [Pa], by bubble points of the case's thermo package (the same
    K-values as the column solution: modified Raoult's law with its activity model)."""
    x = np.linspace(0.0, 1.0, points)
    liquid = np.zeros((points, 2))
    liquid[:, light] = x
    liquid[:, 1 - light] = 1.0 - x
    _, vapor = bubble_temperature(thermo, np.full(points, float(pressure)), liquid)
    return x, vapor[:, light]


def _balance_sections(result: Result) -> np.ndarray:
    """For each pair of stages (j, j+1), top first, the number of stages below the top one
    with a feed, side draw or side heater inside the balance envelope above the pair: the
    operating curve (x_j, y_j+1) jumps where this number changes."""
    special = np.zeros(result.stage_count, dtype=bool)
    special |= np.array([len(feeds) > 0 for feeds in result.stage_feeds])
    special |= (result.liquid_draw > 0) | (result.vapor_draw > 0)
    for heater in result.stage_duties:
        special[heater.stage - 1] = True
    special[0] = False
    return np.cumsum(special)[:-1]


def _yx_frame(ax, name: str) -> None:
    """Axes, limits, grid and legend of a y-x diagram in the light component ``name``."""
    ax.set_xlabel(f"liquid mole fraction {name}")
    ax.set_ylabel(f"vapor mole fraction {name}")
    ax.set_xlim(0, 1)
    ax.set_ylim(0, 1)
    ax.set_aspect("equal")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="lower right", fontsize=7)


def yx_diagram(
    result: Result, path: Path, *, thermo=None, layers: Sequence[YXLayer] = (), rigorous_steps: bool = True
) -> Path:
    """:func:`yx_figure` written to ``path``."""
    return save_figure(yx_figure(result, thermo=thermo, layers=layers, rigorous_steps=rigorous_steps), path)


def yx_figure(result: Result, *, thermo=None, layers: Sequence[YXLayer] = (), rigorous_steps: bool = True) -> Figure:
    """The y-x diagram of a binary column: the equilibrium curve at the mean column pressure
    (when ``thermo`` is given), the rigorous stages (x_j, y_j), the rigorous operating curve
    (x_j, y_j+1) — straight only under constant molar overflow — and (``rigorous_steps``) the
    staircase between them; then each of ``layers``."""
    if len(result.components) != 2:
        raise ValueError(f"a y-x diagram needs a binary, not {len(result.components)} components")
    light = light_component(result)
    x, y = result.x[:, light], result.y[:, light]
    figure, ax = new_figure((6, 6))
    ax.plot([0, 1], [0, 1], color="0.6", linewidth=0.8)
    if thermo is not None:
        pressure = float(np.mean(result.pressure))
        curve_x, curve_y = equilibrium_curve(thermo, pressure, light)
        ax.plot(curve_x, curve_y, color="tab:blue", label=f"equilibrium at {pressure / 1e5:.4g} bar (mean column pressure)")
    first = 1 if result.condenser == "total" else 0  # a total condenser is no equilibrium stage
    steps_x, steps_y = [y[first]], [y[first]]
    for j in range(first, result.stage_count):
        steps_x.append(x[j])
        steps_y.append(y[j])
        if j + 1 < result.stage_count:
            steps_x.append(x[j])
            steps_y.append(y[j + 1])
    if rigorous_steps:
        ax.plot(steps_x, steps_y, color="0.35", linewidth=0.7, label="rigorous stages (staircase)")
    ax.plot(x[first:], y[first:], "o", color="tab:blue", markersize=3.5, label="stage (x_j, y_j)")
    sections = _balance_sections(result)
    for number, section in enumerate(np.unique(sections)):
        pairs = np.flatnonzero(sections == section)
        ax.plot(x[pairs], y[pairs + 1], "s-", color="tab:red", markersize=3, linewidth=1.2,
                label="rigorous operating curve (x_j, y_j+1)" if number == 0 else None)
    for layer in layers:
        layer(ax, light)
    _yx_frame(ax, result.components[light])
    _title(figure, result.title, "y-x diagram")
    return figure


def shortcut_layer(design, *, curve: bool = True, steps: bool = True, q_line: bool = True, pinch: bool = True,
                   linestyle: str = "-") -> YXLayer:
    """A y-x layer of a binary shortcut design (a :class:`~solver.shortcut.BinaryDesign`): its
    equilibrium curve at the design pressure (``curve``), the q-line, both operating lines
    (straight for McCabe-Thiele; the curved ones of the enthalpy construction for
    Ponchon-Savarit), the operating line at minimum reflux through its pinch (``pinch``) and
    (``steps``) its staircase. Drawn beneath the rigorous points."""

    def draw(ax: Axes, light: int) -> None:
        method = design.method
        if curve:
            ax.plot(design.curve.x, design.curve.y, color="tab:blue", linewidth=1.2, zorder=1.4,
                    label=f"equilibrium at {design.pressure / 1e5:.4g} bar (shortcut)")
        x_int, y_int = design.intersection
        if q_line:
            ax.plot([design.x_feed, x_int], [design.x_feed, y_int], color="tab:purple", linewidth=1.0, zorder=1.5,
                    label=f"q-line (q = {design.q:.3g})")
        if design.rectifying_line is not None:
            ax.plot([x_int, design.x_distillate], [y_int, design.x_distillate], color="tab:green", linewidth=1.2,
                    linestyle=linestyle, zorder=1.5, label=f"{method} rectifying line")
            ax.plot([design.x_bottoms, x_int], [design.x_bottoms, y_int], color="tab:olive", linewidth=1.2,
                    linestyle=linestyle, zorder=1.5, label=f"{method} stripping line")
        elif design.enthalpy is not None:
            e = design.enthalpy
            ax.plot(e.operating_x, e.rectifying_y, color="tab:green", linewidth=1.2, linestyle=linestyle, zorder=1.5,
                    label=f"{method} rectifying curve")
            ax.plot(e.operating_x, e.stripping_y, color="tab:olive", linewidth=1.2, linestyle=linestyle, zorder=1.5,
                    label=f"{method} stripping curve")
        if pinch:
            p = design.minimum_reflux
            end = design.x_bottoms if p.section == "stripping" else design.x_distillate
            ax.plot([end, p.x], [end, p.y], color="tab:red", linewidth=0.9, linestyle=":", zorder=1.5,
                    label=f"{method} at minimum reflux {p.ratio:.3g} ({p.pinch} pinch)")
            ax.plot([p.x], [p.y], "x", color="tab:red", markersize=6, zorder=1.7)
        if steps:
            stairs = np.asarray(design.staircase)
            ax.plot(stairs[:, 0], stairs[:, 1], color="0.3", linewidth=0.8, linestyle=linestyle, zorder=1.6,
                    label=f"{method} steps ({design.stages} stages, feed on {design.feed_stage})")
        for x_mark in (design.x_distillate, design.x_bottoms, design.x_feed):
            ax.plot([x_mark], [x_mark], "k.", markersize=4, zorder=1.7)

    return draw


def shortcut_yx_diagram(design, path: Path, *, title: str = "", layers: Sequence[YXLayer] = ()) -> Path:
    """:func:`shortcut_yx_figure` written to ``path``."""
    return save_figure(shortcut_yx_figure(design, title=title, layers=layers), path)


def shortcut_yx_figure(design, *, title: str = "", layers: Sequence[YXLayer] = ()) -> Figure:
    """The McCabe-Thiele diagram of a binary shortcut design alone: equilibrium curve,
    diagonal, q-line, operating lines, steps; then each of ``layers``."""
    figure, ax = new_figure((6, 6))
    ax.plot([0, 1], [0, 1], color="0.6", linewidth=0.8)
    shortcut_layer(design)(ax, 0)
    for layer in layers:
        layer(ax, 0)
    _yx_frame(ax, design.light)
    pinch = design.minimum_reflux
    _title(figure, title, f"shortcut design: R = {design.reflux_ratio:.4g}, R_min = {pinch.ratio:.4g} ({pinch.pinch} pinch), "
           f"N_min = {design.minimum_stages:.3g}")
    return figure


def _stage_steps(values: np.ndarray, stages: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """A value per stage as a step line against stage number: each value held from half a
    stage above to half a stage below its stage."""
    return np.repeat(values, 2), np.column_stack([stages - 0.5, stages + 0.5]).ravel()


def cmo_flow_profiles(result: Result, liquid_cmo: np.ndarray, vapor_cmo: np.ndarray, path: Path) -> Path:
    """:func:`cmo_flow_figure` written to ``path``."""
    return save_figure(cmo_flow_figure(result, liquid_cmo, vapor_cmo), path)


def cmo_flow_figure(result: Result, liquid_cmo: np.ndarray, vapor_cmo: np.ndarray) -> Figure:
    """Liquid and vapor flows leaving each tray (kmol/h), rigorous (markers) against their
    constant-molar-overflow values (dashed steps); the condenser's and reboiler's slots hold
    products and are left out."""
    stages = np.arange(1, result.stage_count + 1)
    inner = np.ones(result.stage_count, dtype=bool)
    inner[0] = result.condenser == "none"
    inner[-1] = result.reboiler == "none"
    to_kmol_h = 3.6
    figure, ax = new_figure((5.5, 6))
    ax.plot(result.liquid_flow[inner] * to_kmol_h, stages[inner], "o-", color="tab:blue", markersize=3,
            label="liquid L, rigorous")
    ax.plot(*_stage_steps(np.asarray(liquid_cmo)[inner] * to_kmol_h, stages[inner]), "--", color="tab:blue",
            linewidth=1.0, label="liquid L, CMO")
    ax.plot(result.vapor_flow[inner] * to_kmol_h, stages[inner], "s-", color="tab:orange", markersize=3,
            label="vapor V, rigorous")
    ax.plot(*_stage_steps(np.asarray(vapor_cmo)[inner] * to_kmol_h, stages[inner]), "--", color="tab:orange",
            linewidth=1.0, label="vapor V, CMO")
    ax.set_xlabel("flow leaving the stage / kmol/h")
    stage_axis(ax, result.stage_count)
    _mark_stages(ax, stage_marks(result))
    ax.legend(loc="best", fontsize=8)
    _title(figure, result.title, "internal flows: rigorous against constant molar overflow")
    return figure


def run_figures(result: Result, *, thermo=None, yx_layers: Sequence[YXLayer] = ()) -> dict[str, Figure]:
    """Every figure of a run by name: temperature, flows, compositions and, for a binary, yx
    (with the equilibrium curve when ``thermo`` is given)."""
    figures = {
        "temperature": temperature_figure(result),
        "flows": flow_figure(result),
        "compositions": composition_figure(result),
    }
    if len(result.components) == 2:
        figures["yx"] = yx_figure(result, thermo=thermo, layers=yx_layers)
    return figures


def write_all(result: Result, folder: Path, *, thermo=None, yx_layers: Sequence[YXLayer] = ()) -> list[Path]:
    """Every figure of a run (:func:`run_figures`) into ``folder`` as NAME.png."""
    folder = Path(folder)
    return [save_figure(figure, folder / f"{name}.png")
            for name, figure in run_figures(result, thermo=thermo, yx_layers=yx_layers).items()]


def sweep_plot(
    x: np.ndarray,
    x_label: str,
    groups: Mapping[str, Mapping[str, np.ndarray]],
    panels: Sequence[tuple[str, Sequence[tuple[str, str]]]],
    path: Path,
    title: str = "",
    failed_x: Sequence[float] | Mapping[str, Sequence[float]] = (),
) -> Path:
    """:func:`sweep_figure` saved as PNG in ``path``."""
    return save_figure(sweep_figure(x, x_label, groups, panels, title, failed_x), path)


def sweep_figure(
    x: np.ndarray,
    x_label: str,
    groups: Mapping[str, Mapping[str, np.ndarray]],
    panels: Sequence[tuple[str, Sequence[tuple[str, str]]]],
    title: str = "",
    failed_x: Sequence[float] | Mapping[str, Sequence[float]] = (),
) -> Figure:
    """Results of a parameter sweep against the first varied key.

    ``groups`` maps a label (a value of the second varied key, or "" for a one-key sweep) to
    columns of values along ``x`` (NaN where a point failed, which leaves a gap); ``panels``
    is one ``(axis label, [(column, line label), ...])`` per subplot. Each group has one colour
    (the columns of a panel differ by line style), named in one short legend outside the axes.
    ``failed_x`` (per group, or for all) are marked by crosses on the x axis, not by lines."""
    x = np.asarray(x, dtype=float)
    figure = Figure(figsize=(7.5, 2.8 * len(panels)))
    axes = figure.subplots(len(panels), 1, sharex=True, squeeze=False)
    labels = list(groups)
    colours = colormaps["viridis"](np.linspace(0.0, 0.85, max(len(labels), 1))) if len(labels) > 1 else ["tab:blue"]
    styles = ["-", "--", ":", "-."]
    failed = failed_x if isinstance(failed_x, Mapping) else {label: failed_x for label in labels}
    for ax, (axis_label, columns) in zip(axes[:, 0], panels):
        for colour, group in zip(colours, labels):
            for style, (column, line_label) in zip(styles, columns):
                ax.plot(x, groups[group][column], "o", linestyle=style, color=colour, markersize=3.5,
                        label=line_label if len(labels) == 1 else None)
            spots = sorted(set(failed.get(group, ())))
            if spots:
                ax.plot(spots, [0.0] * len(spots), "x", color=colour, markersize=7, clip_on=False,
                        transform=ax.get_xaxis_transform(), label="failed point" if group == labels[0] else None)
        if len(labels) > 1:  # the line styles once, in black; the colours in the figure's legend
            for style, (_, line_label) in zip(styles, columns):
                ax.plot([], [], linestyle=style, color="black", label=line_label)
        ax.set_ylabel(axis_label)
        ax.grid(True, alpha=0.3)
        ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=7, borderaxespad=0.0)
    if len(labels) > 1:
        handles = [Line2D([], [], color=colour, marker="o", linestyle="-") for colour in colours]
        figure.legend(handles, labels, loc="lower left", bbox_to_anchor=(0.91, 0.02), fontsize=7,
                      title="second key", title_fontsize=7)
    axes[-1, 0].set_xlabel(x_label)
    if np.all(x == np.round(x)):
        axes[-1, 0].xaxis.set_major_locator(MaxNLocator(integer=True))
    figure.suptitle(f"parameter sweep\n{title}" if title else "parameter sweep", fontsize=9)
    return figure


def sample_histograms(panels: Sequence[tuple[str, str, np.ndarray, float, float | None]], path: Path,
                      title: str = "") -> Path:
    """Histograms of the samples of a Monte Carlo study, one per ``(title, axis label, values,
    nominal, target or None)``; the nominal value a black line, a spec target a red dashed one."""
    columns = 3
    rows = -(-len(panels) // columns)
    figure = Figure(figsize=(4.2 * columns, 3.2 * rows))
    axes = figure.subplots(rows, columns, squeeze=False)
    for ax, (panel_title, axis_label, values, nominal, target) in zip(axes.flat, panels):
        values = np.asarray(values, dtype=float)
        values = values[np.isfinite(values)]
        if len(values):
            ax.hist(values, bins=max(10, min(50, len(values) // 10)), color="tab:blue", alpha=0.8)
        ax.axvline(nominal, color="black", linewidth=1, label="nominal")
        if target is not None:
            ax.axvline(target, color="tab:red", linestyle="--", label="spec")
        ax.set_title(panel_title, fontsize=9)
        ax.set_xlabel(axis_label)
        ax.legend(fontsize=7)
    for ax in list(axes.flat)[len(panels):]:
        ax.set_visible(False)
    if title:
        figure.suptitle(title, fontsize=10)
    figure.tight_layout()
    return save_figure(figure, path)
