"""A picture of a column network's solution (a matplotlib Figure made without pyplot, saved as
PNG atomically by :func:`solver.plots.save_figure`):
each column a box spanning its stages (stage 1 at the top, condenser and reboiler marked), each
connection an arrow from its stage to its destination labelled with its name and rate, feeds
and products as arrows in and out with their rates; the temperature profile of every column
beside it. The layout follows the network graph (networkx) only in which stages the arrows
join; the columns stand side by side in file order.

Beside it, the profiles of each column as for one column (:mod:`solver.plots`): its stage
temperatures and its liquid compositions against its own stage numbers, with its feeds, side
draws and the stages that send to or take from a connection marked
(``temperature_COLUMN.png``, ``compositions_COLUMN.png``)."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
from matplotlib.figure import Figure
from matplotlib.patches import FancyArrowPatch, Rectangle

from .network_results import NetworkResult
from .plots import profile_composition_figure, profile_temperature_figure, save_figure

__all__ = ["column_marks", "column_profile_files", "column_profiles", "file_stem", "network_figure"]

_KMOL_PER_H = 3.6  # mol/s to kmol/h


def column_marks(result: NetworkResult, column: str) -> list[tuple[int, str]]:
    """(stage of the column, kind) of its feeds, side draws and connection ends, as
    :func:`solver.plots.stage_marks` gives them for one column."""
    marks = []
    for g in result.column_stages(column):
        number = result.stage_number[g]
        if result.stage_feeds[g]:
            marks.append((number, "feed"))
        if result.liquid_draw[g] > 0 or result.vapor_draw[g] > 0:
            marks.append((number, "side draw"))
    for connection in result.connections.values():
        if connection["from"]["column"] == column:
            marks.append((connection["from"]["stage"], "to a connection"))
        if connection["to"]["column"] == column:
            marks.append((connection["to"]["stage"], "from a connection"))
    return sorted(set(marks))


def file_stem(column: str) -> str:
    """A column's name as it stands in file names (``temperature_STEM.png``): characters other
    than letters, digits, '-', '_' and '.' become '-'."""
    return re.sub(r"[^A-Za-z0-9_.-]+", "-", column)


def column_profile_files(result: NetworkResult) -> dict[str, tuple[str, str]]:
    """Column name -> the file names of its temperature and composition profiles."""
    return {c["name"]: (f"temperature_{file_stem(c['name'])}.png", f"compositions_{file_stem(c['name'])}.png")
            for c in result.columns}


def column_profiles(result: NetworkResult, folder: Path) -> list[Path]:
    """Write the temperature and composition profiles of every column into ``folder``
    (atomically); returns the paths, column by column."""
    written = []
    for name, (temperature_file, composition_file) in column_profile_files(result).items():
        stages = result.column_stages(name)
        marks = column_marks(result, name)
        what = f"column {name!r}"
        written.append(save_figure(profile_temperature_figure(result.title, result.temperature[stages], marks,
                                                              f"stage temperatures of {what}"), folder / temperature_file))
        written.append(save_figure(profile_composition_figure(result.title, result.components, result.x[stages], marks,
                                                              f"liquid compositions of {what}"), folder / composition_file))
    return written


def _position(result: NetworkResult, column: str, stage: int) -> tuple[float, float]:
    index = [c["name"] for c in result.columns].index(column)
    return 3.0 * index, -float(stage)


def network_figure(result: NetworkResult, path: Path) -> Path:
    """Draw the network of ``result`` (see the module docstring) into ``path`` (PNG)."""
    count = len(result.columns)
    tallest = max(c["stages"] for c in result.columns)
    figure = Figure(figsize=(4.0 + 3.0 * count, 0.18 * tallest + 3.0))
    ax, ax_T = figure.subplots(1, 2, gridspec_kw={"width_ratios": [2.0 + count, 2.0]})
    for column in result.columns:
        x, _ = _position(result, column["name"], 1)
        ax.add_patch(Rectangle((x - 0.4, -column["stages"] - 0.5), 0.8, column["stages"], fill=False, linewidth=1.5))
        ax.text(x, 0.2, column["name"], ha="center", va="bottom", fontsize=10, weight="bold")
        for stage, word in ((1, column["condenser"]), (column["stages"], column["reboiler"])):
            if word != "none":
                ax.text(x, -stage, "condenser" if stage == 1 else "reboiler", ha="center", va="center", fontsize=7)
        stages = result.column_stages(column["name"])
        ax_T.plot(result.temperature[stages] - 273.15, np.arange(1, len(stages) + 1), marker=".", label=column["name"])
    for k, (name, connection) in enumerate(result.connections.items()):
        start = _position(result, connection["from"]["column"], connection["from"]["stage"])
        end = _position(result, connection["to"]["column"], connection["to"]["stage"])
        side = np.sign(end[0] - start[0])  # 0: within one column, drawn on its right
        tail = (start[0] + (0.4 if side >= 0 else -0.4), start[1])
        head = (end[0] + (0.4 if side == 0 else -0.4 * side), end[1])
        ax.add_patch(FancyArrowPatch(tail, head, connectionstyle=f"arc3,rad={0.35 if side == 0 else 0.15}",
                                     arrowstyle="-|>", mutation_scale=10, color="tab:blue"))
        label_x = 0.7 * tail[0] + 0.3 * head[0] + (0.5 if side == 0 else 0.1)
        label_y = 0.7 * tail[1] + 0.3 * head[1] + (0.9 if k % 2 else -0.9)
        ax.text(label_x, label_y, f"{name}\n{connection['flow'] * _KMOL_PER_H:.4g} kmol/h", fontsize=7, color="tab:blue", va="center")
    for stage_index, feeds in enumerate(result.stage_feeds):
        for feed in feeds:
            x, y = _position(result, result.stage_column[stage_index], result.stage_number[stage_index])
            ax.annotate(f"{feed.name or 'feed'}\n{feed.flow * _KMOL_PER_H:.4g} kmol/h", xy=(x - 0.4, y), xytext=(x - 1.5, y),
                        arrowprops={"arrowstyle": "-|>", "color": "tab:green"}, fontsize=7, color="tab:green", va="center")
    for name, product in result.products.items():
        x, y = _position(result, product["column"], product["stage"])
        ax.annotate(f"{name}\n{product['flow'] * _KMOL_PER_H:.4g} kmol/h", xy=(x + 1.4, y), xytext=(x + 0.4, y),
                    arrowprops={"arrowstyle": "-|>", "color": "tab:red"}, fontsize=7, color="tab:red", va="center")
    ax.set_xlim(-2.0, 3.0 * (count - 1) + 2.2)
    ax.set_ylim(-tallest - 1.5, 1.2)
    ax.set_yticks([])
    ax.set_xticks([])
    ax.set_title(result.title + ("" if result.converged else " (NOT CONVERGED)"), fontsize=9)
    ax_T.set_ylim(tallest + 0.5, 0.5)
    ax_T.set_xlabel("temperature / °C")
    ax_T.set_ylabel("stage of its column (1 = top)")
    ax_T.grid(True, alpha=0.3)
    ax_T.legend(fontsize=7)
    return save_figure(figure, path)
