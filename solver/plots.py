"""Figures of a column solution (matplotlib, Agg backend, PNG files written atomically)."""

from __future__ import annotations

import io
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.ticker import MaxNLocator  # noqa: E402

from .results import Result, write_atomic  # noqa: E402


def _save(figure, path: Path) -> Path:
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=110, bbox_inches="tight")
    plt.close(figure)
    return write_atomic(path, buffer.getvalue())


def _stage_axis(ax, count: int) -> None:
    ax.yaxis.set_major_locator(MaxNLocator(integer=True))
    ax.set_ylabel("stage (1 = top)")
    ax.set_ylim(count + 0.5, 0.5)
    ax.grid(True, alpha=0.3)


def temperature_profile(result: Result, path: Path) -> Path:
    stages = np.arange(1, result.stage_count + 1)
    figure, ax = plt.subplots(figsize=(5, 6))
    ax.plot(result.temperature - 273.15, stages, "o-", color="tab:red", markersize=3)
    ax.set_xlabel("temperature / °C")
    _stage_axis(ax, result.stage_count)
    ax.set_title(result.title, fontsize=9)
    return _save(figure, path)


def flow_profiles(result: Result, path: Path) -> Path:
    """Liquid and vapor flows leaving each tray (kmol/h); the condenser and reboiler slots
    hold products and are left out so the internal flows can be read."""
    stages = np.arange(1, result.stage_count + 1)
    inner = np.ones(result.stage_count, dtype=bool)
    if result.condenser != "none":
        inner[0] = False
    if result.reboiler != "none":
        inner[-1] = False
    figure, ax = plt.subplots(figsize=(5, 6))
    to_kmol_h = 3.6
    ax.plot(result.liquid_flow[inner] * to_kmol_h, stages[inner], "o-", markersize=3, label="liquid L")
    ax.plot(result.vapor_flow[inner] * to_kmol_h, stages[inner], "s-", markersize=3, label="vapor V")
    ax.set_xlabel("flow leaving the stage / kmol/h")
    _stage_axis(ax, result.stage_count)
    ax.legend(loc="best", fontsize=8)
    ax.set_title("internal flows (rigorous)", fontsize=9)
    return _save(figure, path)


def composition_profiles(result: Result, path: Path) -> Path:
    stages = np.arange(1, result.stage_count + 1)
    figure, ax = plt.subplots(figsize=(5, 6))
    for i, name in enumerate(result.components):
        ax.plot(result.x[:, i], stages, "-", label=f"x {name}")
    ax.set_xlabel("liquid mole fraction")
    ax.set_xlim(-0.02, 1.02)
    _stage_axis(ax, result.stage_count)
    ax.legend(loc="best", fontsize=8)
    return _save(figure, path)


def write_all(result: Result, folder: Path) -> list[Path]:
    folder = Path(folder)
    return [
        temperature_profile(result, folder / "temperature.png"),
        flow_profiles(result, folder / "flows.png"),
        composition_profiles(result, folder / "compositions.png"),
    ]
