"""Figures: PNG files, the y-x diagram (equilibrium curve, operating curve, layers), the sweep figure."""

from __future__ import annotations

import numpy as np
import pytest

from conftest import case_from_text, methanol_water_case
from solver.plots import _balance_sections, equilibrium_curve, light_component, sweep_plot, write_all, yx_diagram
from solver.engine import simulate
from solver.thermo.package import ThermoPackage

PNG = b"\x89PNG\r\n\x1a\n"

BENZENE_TOLUENE = """
[components]
names = ["benzene", "toluene"]
[column]
stages = 6
condenser = "total"
reboiler = "partial"
pressure = "101.325 kPa"
[[feeds]]
stage = 3
flow = "100 kmol/h"
composition = { benzene = 0.5, toluene = 0.5 }
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.0
distillate_rate = "50 kmol/h"
"""

TERNARY = """
[components]
names = ["n-Pentane", "n-Hexane", "n-Heptane"]
[column]
stages = 8
condenser = "total"
reboiler = "partial"
pressure = "101.325 kPa"
[[feeds]]
stage = 4
flow = "100 kmol/h"
composition = { n-pentane = 0.3, n-hexane = 0.4, n-heptane = 0.3 }
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.0
distillate_rate = "30 kmol/h"
"""


def is_png(path) -> bool:
    data = path.read_bytes()
    return data[:8] == PNG and len(data) > 5000


@pytest.fixture(scope="module")
def binary():
    case = methanol_water_case(stages=10, feed_stage=6)
    return simulate(case), ThermoPackage.from_case(case)


def test_write_all_writes_four_pngs_for_a_binary(binary, tmp_path):
    result, thermo = binary
    written = write_all(result, tmp_path, thermo=thermo)
    assert [path.name for path in written] == ["temperature.png", "flows.png", "compositions.png", "yx.png"]
    assert all(is_png(path) for path in written)


def test_no_yx_diagram_for_a_ternary(tmp_path):
    result = simulate(case_from_text(TERNARY))
    assert result.converged, result.message
    written = write_all(result, tmp_path)
    assert [path.name for path in written] == ["temperature.png", "flows.png", "compositions.png"]
    with pytest.raises(ValueError, match="binary"):
        yx_diagram(result, tmp_path / "yx.png")


def test_equilibrium_curve_of_benzene_toluene_against_raoult_with_nist_antoine():
    thermo = ThermoPackage.from_case(case_from_text(BENZENE_TOLUENE))
    x, y = equilibrium_curve(thermo, 101325.0, light=0, points=11)
    assert y[0] == pytest.approx(0.0, abs=1e-12) and y[-1] == pytest.approx(1.0, abs=1e-12)
    # Raoult's law with the NIST WebBook Antoine constants of Williamham et al., J. Res. NBS 35
    # (1945) 219, at 1 atm: y = 0.3778 at x = 0.2, 0.7141 at x = 0.5, 0.9110 at x = 0.8
    # (computed in our research notes; the constants were recalled, and agree with CoolProp to 0.2 %)
    assert y[[2, 5, 8]] == pytest.approx([0.3778, 0.7141, 0.9110], abs=0.003)
    assert np.all(np.diff(y) > 0)


def test_yx_layers_are_drawn_with_the_light_component(binary, tmp_path):
    result, thermo = binary
    calls = []

    def layer(ax, light):
        calls.append(light)
        ax.plot([0.2, 0.8], [0.3, 0.9], label="shortcut operating line")

    path = yx_diagram(result, tmp_path / "yx.png", thermo=thermo, layers=[layer])
    assert calls == [0] == [light_component(result)]  # methanol, the distillate's component
    assert is_png(path)


def test_operating_curve_sections_break_at_the_feed_stage(binary):
    result, _ = binary
    # pairs (x_j, y_j+1) for j = 1..9; the feed enters stage 6, so pairs j >= 6 lie on the stripping curve
    assert _balance_sections(result).tolist() == [0, 0, 0, 0, 0, 1, 1, 1, 1]


def test_sweep_plot_tolerates_failed_points(tmp_path):
    x = np.array([1.0, 2.0, 3.0, 4.0])
    groups = {"": {"duty": np.array([1.0, np.nan, 3.0, 4.0]), "purity": np.array([0.9, np.nan, 0.95, 0.97])}}
    panels = [("duty / kW", [("duty", "reboiler")]), ("mole fraction", [("purity", "distillate")])]
    path = sweep_plot(x, "specs.reflux_ratio", groups, panels, tmp_path / "sweep.png", "test", failed_x=[2.0])
    assert is_png(path)


# ------------------------------------------------------------------ the audit's figures


@pytest.fixture(scope="module")
def designs():
    from solver.shortcut import design_binary, design_ponchon_savarit

    case = methanol_water_case(specs="reflux_ratio = 1.4\ndistillate = { methanol = 0.99 }\nbottoms = { water = 0.995 }")
    return design_binary(case), design_ponchon_savarit(case)


def captured(monkeypatch):
    """Keep the figures a plot function saves, to look at what it drew."""
    import solver.plots as plots

    figures = []

    def keep(figure, path):
        figures.append(figure)
        path.write_bytes(PNG)
        return path

    monkeypatch.setattr(plots, "save_figure", keep)
    return figures


def labels(figure) -> list[str]:
    return [line.get_label() for line in figure.axes[0].get_lines() if not line.get_label().startswith("_")]


def test_shortcut_layer_draws_lines_q_line_pinch_and_steps(designs, monkeypatch, tmp_path):
    from solver.plots import shortcut_layer, shortcut_yx_diagram

    design, enthalpy = designs
    figures = captured(monkeypatch)
    shortcut_yx_diagram(design, tmp_path / "yx.png", title="t",
                        layers=[shortcut_layer(enthalpy, curve=False, steps=False, q_line=False, linestyle="--")])
    drawn = labels(figures[0])
    assert f"McCabe-Thiele steps ({design.stages} stages, feed on {design.feed_stage})" in drawn
    assert "McCabe-Thiele rectifying line" in drawn and "McCabe-Thiele stripping line" in drawn
    assert "Ponchon-Savarit rectifying curve" in drawn and sum("q-line" in text for text in drawn) == 1
    assert any(text.startswith("McCabe-Thiele at minimum reflux") and "feed pinch" in text for text in drawn)
    steps = next(line for line in figures[0].axes[0].get_lines() if line.get_label().startswith("McCabe-Thiele steps"))
    assert np.allclose(steps.get_xdata(), design.staircase[:, 0]) and np.allclose(steps.get_ydata(), design.staircase[:, 1])


def test_audit_yx_diagram_can_leave_out_the_rigorous_staircase(binary, designs, monkeypatch, tmp_path):
    from solver.plots import shortcut_layer

    result, _ = binary
    figures = captured(monkeypatch)
    yx_diagram(result, tmp_path / "a.png", layers=[shortcut_layer(designs[0])], rigorous_steps=False)
    yx_diagram(result, tmp_path / "b.png")
    assert "rigorous stages (staircase)" not in labels(figures[0]) and "rigorous stages (staircase)" in labels(figures[1])
    assert "rigorous operating curve (x_j, y_j+1)" in labels(figures[0])


def test_cmo_flow_profiles_draw_the_cmo_values_as_steps(binary, monkeypatch, tmp_path):
    from solver.plots import _stage_steps, cmo_flow_profiles

    result, _ = binary
    x, y = _stage_steps(np.array([1.0, 2.0]), np.array([2, 3]))
    assert x.tolist() == [1.0, 1.0, 2.0, 2.0] and y.tolist() == [1.5, 2.5, 2.5, 3.5]
    path = cmo_flow_profiles(result, result.liquid_flow * 1.05, result.vapor_flow * 0.95, tmp_path / "cmo.png")
    assert is_png(path)
    figures = captured(monkeypatch)
    cmo_flow_profiles(result, result.liquid_flow, result.vapor_flow, tmp_path / "cmo2.png")
    assert labels(figures[0]) == ["liquid L, rigorous", "liquid L, CMO", "vapor V, rigorous", "vapor V, CMO", "feed"]
