"""The plant page's climate stress test: the plant as sized, in a warmer and more humid year.

:class:`ClimateStressPanel` holds one widget the dashboard places, ``box``: two sliders
(dry-bulb and dew-point steps, in the units on show, spanning exactly what the model
accepts), a *Run stress test* button, then the verdict, the table of the recorded and
the shifted year and their load-duration chart against the capacity as sized. The test
runs the study twice (about a second), so it runs on the button, not on every slider
step; the sliders' values are shown in the panel's own text with the results, and a
line says when the page's inputs changed after the test ran. The calculation is
:func:`plantside.study.climate_stress.climate_stress` on the page's current scenario and
weather, the one ``plantside stress`` prints.
"""

from __future__ import annotations

import html
import math

import altair as alt
import ipywidgets as widgets

from plantside.charts.climate_stress import (
    climate_stress_chart,
    climate_stress_frames,
    climate_stress_rows,
    shifted_label,
)
from plantside.climate.weather_shift import DEW_POINT_SHIFT_RANGE, DRYBULB_SHIFT_RANGE
from plantside.dashboard.controls import GuardedButton, GuardedFloatSlider
from plantside.errors import PlantsideError, excerpt
from plantside.study.climate_stress import STRESS_CAUTION, climate_stress
from plantside.units import from_display, to_display, unit_label

__all__ = ["STEP_K", "ClimateStressPanel"]

#: Slider step [K] (0.9 °F in I-P).
STEP_K = 0.5
#: Steps the sliders open at [K].
START_K = {"drybulb_shift": 2.0, "dew_point_shift": 1.0}
RANGES_K = {"drybulb_shift": DRYBULB_SHIFT_RANGE, "dew_point_shift": DEW_POINT_SHIFT_RANGE}
LABELS = {"drybulb_shift": "Dry-bulb shift", "dew_point_shift": "Dew-point shift"}


class ClimateStressPanel:
    """Stress-test controls, verdict, table and chart (plant page).

    Parameters
    ----------
    state : DashboardState

    Attributes
    ----------
    box : ipywidgets.VBox
    sliders : dict of str to GuardedFloatSlider
        ``drybulb_shift`` and ``dew_point_shift``, in the units on show.
    stress : ClimateStress or None
        The last test run.
    """

    def __init__(self, state):
        self.state = state
        self.stress = None
        self._ran_for = None
        self._system = state.inputs.unit_system
        self.sliders: dict[str, GuardedFloatSlider] = {}
        self.labels: dict[str, widgets.HTML] = {}
        for name in START_K:
            slider = GuardedFloatSlider(
                continuous_update=False,
                readout_format=".1f",
                layout=widgets.Layout(width="320px"),
                description=LABELS[name],
                style={"description_width": "0px"},  # the visible label is the HTML above
            )
            slider.add_class(f"plantside-stress-{name.replace('_', '-')}")
            slider.check = lambda raw, n=name: self._check(n, raw)
            slider.refused = self._show_message
            self.sliders[name] = slider
            self.labels[name] = widgets.HTML()
        self._set_units(self._system, {name: START_K[name] for name in START_K})
        self.run_button = GuardedButton(
            description="Run stress test", tooltip="Run the study on the shifted year"
        )
        self.run_button.add_class("plantside-stress-run")
        self.run_button.on_click(lambda _: self.run())
        self.message = widgets.HTML()
        #: Plot width of the chart [px] (the page sets it to fit its panel; None: the
        #: builders' own).
        self.width: int | None = None
        self.stale = widgets.HTML()
        self.results = widgets.HTML()
        self.results.add_class("plantside-stress-results")
        self.chart = None
        self.chart_box = widgets.VBox([])
        intro = widgets.HTML(
            "<div class='plantside-stress-intro'><b>Climate stress test.</b> The year shifted "
            "warmer (dry bulb) and more humid (dew point), every hour by the same step (the "
            "shift of the morphing method, Belcher, Hacker and Powell 2005); the study is run "
            "on it and the cooling plant is held at the capacity sized on the recorded year."
            "</div>"
        )
        controls = [widgets.VBox([self.labels[name], self.sliders[name]]) for name in self.sliders]
        self.box = widgets.VBox(
            [
                intro,
                widgets.HBox(controls),
                self.run_button,
                self.message,
                self.stale,
                self.results,
                self.chart_box,
            ]
        )
        self.box.add_class("plantside-stress")
        state.listeners.append(self._on_state)

    # ------------------------------------------------------------------ units
    def _set_units(self, system: str, values_k: dict[str, float]) -> None:
        self._system = system
        unit = unit_label("temperature_difference", system)
        for name, slider in self.sliders.items():
            low, high = (self._shown(v, system) for v in RANGES_K[name])
            step = self._shown(STEP_K, system)
            with slider.hold_trait_notifications():
                slider.min, slider.max, slider.step = low, high, step
                slider.value = self._shown(values_k[name], system)
            self.labels[
                name
            ].value = f"<span class='plantside-label'>{LABELS[name]} [{html.escape(unit)}]</span>"

    @staticmethod
    def _shown(value_k: float, system: str) -> float:
        return round(float(to_display("temperature_difference", value_k, system)[0]), 6)

    def values_k(self) -> dict[str, float]:
        """The sliders' values [K]."""
        return {
            name: float(from_display("temperature_difference", slider.value, self._system))
            for name, slider in self.sliders.items()
        }

    def _check(self, name: str, raw) -> str:
        """ "" for a number within the slider's range, else the message that refuses it."""
        slider = self.sliders[name]
        unit = unit_label("temperature_difference", self._system)
        allowed = f"allowed: {slider.min:g} to {slider.max:g} {unit}"
        if isinstance(raw, bool) or not isinstance(raw, (int, float)) or not math.isfinite(raw):
            return f"{LABELS[name]}: expected a number, got {excerpt(repr(raw), 40)}; {allowed}"
        if not slider.min - 1e-9 <= raw <= slider.max + 1e-9:
            return f"{LABELS[name]} = {raw:g} {unit} is outside the range; {allowed}"
        return ""

    def _show_message(self, text: str) -> None:
        self.message.value = (
            f"<div class='plantside-message'>⚠ {html.escape(text)}</div>" if text else ""
        )

    # ------------------------------------------------------------------ running
    def run(self) -> bool:
        """Run the test for the sliders' steps on the page's current inputs; True when done."""
        state = self.state
        self._show_message("")
        self.results.value = "<i>Running the study on the shifted year…</i>"
        try:
            steps = self.values_k()
            self.stress = climate_stress(
                state.current_scenario(),
                steps["drybulb_shift"],
                steps["dew_point_shift"],
                weather=state.result.climate.weather,
            )
        except PlantsideError as error:  # shown beside the button, never a traceback
            self.results.value = ""
            self._show_message(str(error))
            return False
        self._ran_for = state.result
        self.update()
        return True

    def _on_state(self, state) -> None:
        """A move on the page: only the stale line (cheap, off the move's path), unless the
        units changed, which redraws the results in the new units."""
        if state.inputs.unit_system != self._system:
            self._set_units(state.inputs.unit_system, self.values_k())
            self.update()
        else:
            self._show_stale()

    def _show_stale(self) -> None:
        stale = self.stress is not None and self._ran_for is not self.state.result
        self.stale.value = (
            "<p class='plantside-stale'>The page's inputs changed after this test ran: run "
            "it again for the figures of the current inputs.</p>"
            if stale
            else ""
        )

    def update(self, width: int | None = None) -> None:
        """Redraw the results in the units on show (nothing to draw before a run)."""
        stress, system = self.stress, self.state.inputs.unit_system
        if stress is None:
            self.results.value = ""
            return
        rows = climate_stress_rows(stress, system)
        body = "".join(
            "<tr>" + "".join(f"<td>{html.escape(cell)}</td>" for cell in row) + "</tr>"
            for row in rows
        )
        verdict = stress.verdict.ip if system == "IP" else str(stress.verdict)
        self._show_stale()
        held = (
            f" {stress.saturated_hours} shifted hours were held at saturation."
            if stress.saturated_hours
            else ""
        )
        self.results.value = (
            f"<p class='plantside-stress-verdict'><b>{html.escape(verdict)}</b>"
            f"{held}</p>"
            f"<table class='plantside-table'><caption>{html.escape(shifted_label(stress, system))}"
            " against the recorded year</caption><thead><tr><th></th><th>Recorded year</th>"
            f"<th>Shifted year</th></tr></thead><tbody>{body}</tbody></table>"
            f"<p class='plantside-caution-text'>⚠ {html.escape(STRESS_CAUTION)}</p>"
        )
        frames = climate_stress_frames(stress, system)
        width = self.width if width is None else width
        chart = climate_stress_chart(
            frames["curves"], frames["lines"], system, frames["title"], width=width
        )
        self.chart_spec = chart
        if self.chart is None:
            self.chart = alt.JupyterChart(
                chart, embed_options={"actions": False, "renderer": "canvas"}
            )
            self.chart.add_class("plantside-chart-stress")
            self.chart_box.children = (self.chart,)
        else:
            self.chart.chart = chart
