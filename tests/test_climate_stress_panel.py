"""The plant page's climate stress panel: the sliders show what the test uses, in the page's units.

1 K = 1.8 °F of temperature difference (NIST SP 811, Appendix B.8). The figures are
those of ``plantside stress`` (one calculation).
"""

from __future__ import annotations

from pathlib import Path

import altair as alt
import pytest
from plantside.charts.climate_stress import climate_stress_rows
from plantside.dashboard.climate_stress_panel import ClimateStressPanel
from plantside.dashboard.state import DashboardState
from plantside.study.climate_stress import climate_stress
from plantside.study.scenario import load_scenario

CLINIC = Path(__file__).resolve().parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


@pytest.fixture
def panel():
    alt.JupyterChart.enable_offline()
    return ClimateStressPanel(DashboardState(load_scenario(CLINIC), view="plant"))


def test_sliders_span_what_the_model_accepts_in_the_page_units(panel):
    # the I-P clinic: 0 to 4 K = 0 to 7.2 °F, 0 to 3 K = 0 to 5.4 °F (1.8 °F per K)
    db, dp = panel.sliders["drybulb_shift"], panel.sliders["dew_point_shift"]
    assert (db.min, db.max, db.step) == (0.0, 7.2, 0.9)
    assert (dp.min, dp.max, dp.step) == (0.0, 5.4, 0.9)
    assert panel.values_k() == pytest.approx({"drybulb_shift": 2.0, "dew_point_shift": 1.0})
    assert "°F" in panel.labels["drybulb_shift"].value
    panel.state.set("unit_system", "SI")  # same steps, now in K
    assert (db.min, db.max, db.value) == (0.0, 4.0, 2.0)
    assert panel.values_k() == pytest.approx({"drybulb_shift": 2.0, "dew_point_shift": 1.0})


def test_a_run_shows_the_command_lines_figures_and_its_steps(panel):
    panel.sliders["drybulb_shift"].value = 7.2  # 4 K
    panel.sliders["dew_point_shift"].value = 5.4  # 3 K
    assert panel.run()
    expected = climate_stress(load_scenario(CLINIC), 4.0, 3.0)
    assert panel.stress.shifted == expected.shifted
    for _, recorded, shifted in climate_stress_rows(expected, "IP"):
        assert recorded in panel.results.value and shifted in panel.results.value
    assert "+7.2 °F DB, +5.4 °F DP" in panel.results.value  # the steps, on show
    assert "licensed engineer" in panel.results.value
    assert panel.chart is not None and "Capacity as sized" in str(panel.chart_spec.to_dict())
    # the page's inputs move: the panel says its figures are of other inputs
    assert panel.state.set("air_handler", 1)  # AHU-2 (the first, OA-1, has no return air)
    assert panel.state.set("outdoor_air_fraction", 0.3)
    assert "inputs changed after this test ran" in panel.stale.value


@pytest.mark.parametrize("raw", [True, "2", float("nan"), float("inf"), 99.0, -1.0, None])
def test_a_value_the_model_would_not_take_is_refused_with_its_range(panel, raw):
    before = panel.sliders["drybulb_shift"].value
    panel.sliders["drybulb_shift"].set_state({"value": raw})
    assert panel.sliders["drybulb_shift"].value == before
    assert "allowed: 0 to 7.2 °F" in panel.message.value
