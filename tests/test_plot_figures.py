"""The figures as objects (not pixels): marked feed and side-stream stages, a log-scale
composition panel, one title style, the two-key sweep plot's colours and legend."""

from __future__ import annotations

from pathlib import Path

import matplotlib.pyplot as plt
import numpy as np
import pytest

from solver.case import load_case
from solver.engine import simulate
from solver.plots import composition_figure, flow_figure, stage_marks, sweep_figure, temperature_figure
from solver.sweep import parse_variation

CASES = Path(__file__).resolve().parent.parent / "cases"


@pytest.fixture(scope="module")
def side_draw_result():
    result = simulate(load_case(CASES / "naphtha_side_draw.toml"))
    assert result.converged
    return result


def marks_on(ax) -> set[str]:
    return {line.get_gid() for line in ax.get_lines() if (line.get_gid() or "").startswith("stage-mark")}


def test_feed_and_side_draw_stages_are_marked_on_every_profile(side_draw_result):
    result = side_draw_result
    feeds = {j + 1 for j, feeds in enumerate(result.stage_feeds) if feeds}
    draws = {int(j) + 1 for j in np.flatnonzero((result.liquid_draw > 0) | (result.vapor_draw > 0))}
    assert feeds and draws
    assert {stage for stage, kind in stage_marks(result) if kind == "feed"} == feeds
    assert {stage for stage, kind in stage_marks(result) if kind == "side draw"} == draws
    expected = {f"stage-mark feed {s}" for s in feeds} | {f"stage-mark side draw {s}" for s in draws}
    for make in (temperature_figure, flow_figure, composition_figure):
        figure = make(result)
        for ax in figure.axes:
            assert marks_on(ax) == expected, make.__name__
        plt.close(figure)


def test_compositions_have_a_log_scale_panel_and_the_common_title(side_draw_result):
    figure = composition_figure(side_draw_result)
    scales = [ax.get_xscale() for ax in figure.axes]
    assert scales == ["linear", "log"]
    low, _ = figure.axes[1].get_xlim()
    assert low <= max(float(np.min(side_draw_result.x)), 1e-15)  # every mole fraction down to 1e-15 is inside
    assert figure._suptitle.get_text().startswith("liquid compositions\n")
    assert side_draw_result.title in figure._suptitle.get_text()
    plt.close(figure)


def test_two_key_sweep_plot_has_one_colour_per_second_value_and_a_legend_outside():
    first = parse_variation("specs.reflux_ratio=1.2:2.0:3")
    second = parse_variation("feeds[0].temperature=40.5 degC:70 degC:3")
    assert second.shown() == ["40.5 degC", "55.2 degC", "70.0 degC"] or second.shown() == ["40.5 degC", "55.3 degC", "70.0 degC"]
    x = np.asarray(first.magnitudes)
    groups = {f"T = {label}": {"a": x * (k + 1), "b": x + k} for k, label in enumerate(second.shown())}
    panels = [("duty / kW", [("a", "reboiler"), ("b", "condenser")])]
    figure = sweep_figure(x, first.label, groups, panels, "test", failed_x={"T = 40.5 degC": [1.6]})
    ax = figure.axes[0]
    data_lines = [line for line in ax.get_lines() if len(line.get_xdata()) == len(x)]
    colours = {tuple(np.round(line.get_color(), 6)) if not isinstance(line.get_color(), str) else line.get_color()
               for line in data_lines}
    assert len(colours) == 3  # one per value of the second key, both columns in it
    assert not [line for line in ax.get_lines() if line.get_xdata() is not None and len(set(line.get_xdata())) == 1
                and len(line.get_xdata()) == 2]  # no vertical reference lines
    figure.canvas.draw()
    legend = figure.legends[0]
    assert [text.get_text() for text in legend.get_texts()] == list(groups)
    box = legend.get_window_extent()
    assert box.x0 >= ax.get_window_extent().x1 - 1  # outside the axes
    plt.close(figure)
