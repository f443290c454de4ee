"""The Python API (solver.api): the README's session run as written, case edits that return new
checked cases, the DataFrames, the figures and the Result's short repr."""

from __future__ import annotations

import dataclasses
import re
import shutil
import sys
from pathlib import Path

import numpy as np
import pytest

from solver import api
from solver.case import loads_case
from solver.errors import CaseError

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "cases" / "methanol_water.toml"


def readme_session() -> str:
    """The first python code block of the README's "Python API" section."""
    text = (ROOT / "README.md").read_text()
    section = text.split("\n## Python API\n", 1)[1].split("\n## ", 1)[0]
    blocks = re.findall(r"```python\n(.*?)```", section, re.DOTALL)
    assert blocks, "the Python API section has no python code block"
    return blocks[0]


def test_readme_python_api_session_runs(tmp_path, monkeypatch, capsys):
    (tmp_path / "cases").mkdir()
    shutil.copy(DEMO, tmp_path / "cases" / DEMO.name)
    monkeypatch.chdir(tmp_path)
    namespace: dict = {}
    exec(compile(readme_session(), "README.md (Python API)", "exec"), namespace)
    result, stages, figure = namespace["result"], namespace["stages"], namespace["figure"]
    assert result.converged
    assert result.reflux_ratio == pytest.approx(2.0, rel=1e-9)  # the changed spec was solved
    assert len(stages) == 20 and list(stages.index[:2]) == [1, 2]
    assert (tmp_path / "temperature.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert type(figure).__name__ == "Figure"
    out = capsys.readouterr().out
    assert "converged in" in out and "T / °C" in out and "ppm methanol" in out


@pytest.fixture(scope="module")
def case():
    return api.load(DEMO)


@pytest.fixture(scope="module")
def result(case):
    solved = api.solve(api.with_spec(case, reflux_ratio=2.0))
    assert solved.converged
    return solved


def _same_content(first, second) -> None:
    for item in dataclasses.fields(first):
        if item.name not in ("source_file", "raw"):
            assert getattr(first, item.name) == getattr(second, item.name), item.name


def test_an_edit_equals_the_edited_file_and_leaves_the_case_unchanged(case):
    edited = api.with_spec(case, reflux_ratio=2.0)
    assert [spec.value for spec in case.specs if spec.kind == "reflux_ratio"] == [1.4]
    assert [spec.value for spec in edited.specs if spec.kind == "reflux_ratio"] == [2.0]
    from_text = loads_case(DEMO.read_text().replace("reflux_ratio = 1.4", "reflux_ratio = 2.0"), "x.toml")
    _same_content(edited, from_text)
    with pytest.raises(dataclasses.FrozenInstanceError):
        edited.title = "changed"  # type: ignore[misc]


def test_with_spec_replaces_one_spec_by_another(case):
    edited = api.with_spec(case, boilup_ratio=1.5, replaces="reflux_ratio")
    assert [spec.kind for spec in edited.specs] == ["mole_fraction", "boilup_ratio"]
    purity = api.with_spec(case, bottoms={"methanol": "500 ppm"})
    assert [(spec.component, spec.value) for spec in purity.specs if spec.kind == "mole_fraction"] == [
        ("methanol", pytest.approx(500e-6))
    ]


@pytest.mark.parametrize(
    ("edit", "key", "value"),
    [
        (lambda c: api.with_spec(c, reflux_ratio=-1.0), "specs.reflux_ratio", -1.0),
        (lambda c: api.with_spec(c, reflux_ratoi=2.0), "specs.reflux_ratoi", "reflux_ratoi"),
        (lambda c: api.with_spec(c, boilup_ratio=1.0, replaces="distillate_rate"), "specs.distillate_rate",
         "distillate_rate"),
        (lambda c: api.with_feed(c, flow="6000 kg"), "feeds[0].flow", "6000 kg"),
        (lambda c: api.with_feed(c, "no such feed", flow="1 kmol/h"), "feeds", "no such feed"),
        (lambda c: api.with_feed(c, 3, flow="1 kmol/h"), "feeds", 3),
        (lambda c: api.with_stages(c, 10), "feeds[0].stage", 12),  # the feed stage is below the new column
    ],
)
def test_bad_edits_are_case_errors_naming_key_and_value(case, edit, key, value):
    with pytest.raises(CaseError) as info:
        edit(case)
    assert info.value.key == key
    assert info.value.value == value
    assert info.value.file.startswith(str(DEMO))


def test_with_feed_and_with_stages(case):
    fed = api.with_feed(case, "aqueous methanol", vapor_fraction=0.0, flow="2500 kg/h")
    assert fed.feeds[0].temperature is None and fed.feeds[0].vapor_fraction == 0.0
    assert fed.feeds[0].flow * 3.6 == pytest.approx(109.05, rel=1e-3)  # 2500 kg/h at M = 22.9 g/mol
    back = api.with_feed(fed, 0, temperature="65 degC")
    assert back.feeds[0].vapor_fraction is None and back.feeds[0].temperature == pytest.approx(338.15)
    longer = api.with_stages(case, 24, feed_stage=14)
    assert longer.column.stages == 24 and longer.feeds[0].stage == 14
    assert case.column.stages == 20 and case.feeds[0].stage == 12
    assert api.with_column(case, efficiency=0.7).column.efficiencies[5] == pytest.approx(0.7)


def test_stage_table_has_units_in_its_names_and_the_results_numbers(result):
    table = api.stage_table(result)
    assert table.index.name == "stage" and table.index[0] == 1 and len(table) == result.stage_count
    for name in ("T / °C", "P / bar", "L / kmol/h", "V / kmol/h", "duty / kW", "x methanol", "y water", "K methanol"):
        assert name in table.columns
    assert np.allclose(table["T / °C"], result.temperature - 273.15)
    assert np.allclose(table["x methanol"], result.x[:, 0])
    assert table["duty / kW"].iloc[0] == pytest.approx(result.condenser_duty / 1e3)
    si = api.stage_table(result, units="si")
    assert np.allclose(si["T / K"], result.temperature) and "L / mol/s" in si.columns
    mass = api.stage_table(result, units="flow=kg/h")
    molar_mass = result.x @ result.molar_masses  # kg/mol of each stage's liquid
    assert np.allclose(mass["L / kg/h"], table["L / kmol/h"] * molar_mass * 1000)


def test_product_table_closes_the_balances(result, case):
    products = api.product_table(result, units="flow=kg/h,composition=mass fraction")
    assert list(products.index) == ["distillate", "bottoms"]
    feed_mass = case.feeds[0].flow * np.dot(case.feeds[0].composition, result.molar_masses) * 3600
    assert products["flow / kg/h"].sum() == pytest.approx(feed_mass, rel=1e-6)
    assert products[["w methanol", "w water"]].sum(axis=1).to_numpy() == pytest.approx([1.0, 1.0])


def test_figures_are_matplotlib_figures_outside_pyplot(result, case):
    from matplotlib import _pylab_helpers
    from matplotlib.figure import Figure

    every = api.figures(result, case)
    assert set(every) == {"temperature", "flows", "compositions", "yx"}
    assert all(isinstance(figure, Figure) for figure in every.values())
    assert len(every["yx"].axes[0].lines) > 4  # with the equilibrium curve
    assert not _pylab_helpers.Gcf.get_all_fig_managers()  # nothing left open in pyplot
    with pytest.raises(ValueError, match="temperature"):
        api.figure(result, "pressure")


def test_result_repr_is_short_and_says_what_matters(result):
    text = repr(result)
    assert len(text.splitlines()) <= 6 and len(text) < 800
    assert "converged in" in text and "kW" in text and "distillate" in text and "bottoms" in text
    assert f"{result.condenser_duty / 1e3:.5g} kW" in text
    html = result._repr_html_()
    assert html.startswith("<div>") and "bottoms" in html


def test_an_unconverged_result_says_so_and_html_escapes_the_title(case):
    stopped = api.solve(api.with_spec(case, reflux_ratio=2.0), max_iterations=1)
    assert not stopped.converged
    assert "NOT converged" in repr(stopped)
    titled = dataclasses.replace(stopped, title="Column <rev B> & [draft]")
    assert "Column &lt;rev B&gt; &amp; [draft]" in titled._repr_html_()


def test_missing_pandas_is_a_clear_error(result, monkeypatch):
    monkeypatch.setitem(sys.modules, "pandas", None)  # import pandas then raises ImportError
    with pytest.raises(ImportError, match="pip install pandas"):
        api.stage_table(result)
