"""The plant page's water side and the single-unit page's coil schedule.

:class:`WaterSidePanel` holds three widgets the dashboard places: ``tables`` (HTML,
under the headline figures: the water side's key figures on the plant page, the coil
schedule of the air handler shown on the single-unit page) and ``chart`` (the
water-side :class:`altair.JupyterChart`, plant page only). Figures come from the
study's own functions on the state's current result
(:func:`plantside.charts.water_side.water_side_of_units`, i.e.
:func:`plantside.study.water_side_run.run_water_side`;
:func:`plantside.air_handler.coil_schedule.coil_schedule`), so they are those of
``plantside design --json``. Nothing is recomputed while its inputs stay the same.
"""

from __future__ import annotations

import html

import altair as alt
import ipywidgets as widgets

from plantside.air_handler.coil_schedule import coil_schedule
from plantside.charts.compare import SCENARIO_LABELS
from plantside.charts.tables import coil_schedule_html, water_side_html
from plantside.charts.water_side import (
    water_side_chart,
    water_side_efficiency_frame,
    water_side_energy_frame,
    water_side_of_units,
)
from plantside.dashboard.spec import UnsupportedChartError, altair_spec, fast_spec
from plantside.errors import PlantsideError

__all__ = ["WaterSidePanel"]


class WaterSidePanel:
    """Water-side chart and tables (plant page) or coil schedule (single-unit page).

    Parameters
    ----------
    state : DashboardState
    plant : bool
        True on the plant page.

    Attributes
    ----------
    tables : ipywidgets.HTML
    chart : altair.JupyterChart or None
        None on the single-unit page and while the study has no water side.
    box : ipywidgets.VBox
        Holds ``chart`` (empty when there is none), for the chart column.
    water : WaterSideResult or None
        The water side of the result on show (plant page).
    """

    def __init__(self, state, plant: bool):
        self.state = state
        self.plant = plant
        self.water = None
        self.tables = widgets.HTML()
        self.tables.add_class("plantside-tables")
        self.chart = None
        self.chart_spec = None
        self.box = widgets.VBox([])
        self.box.add_class("plantside-chart")
        self._water_key = None
        self._shown = {}

    def _units_key(self, result) -> tuple:
        return (
            tuple(id(u.study) for u in result.units),
            result.climate.source,
            result.inputs.design_percent,
        )

    def water_side(self):
        """The water side of the state's current result (None: no water-side tables)."""
        result = self.state.result
        key = self._units_key(result)
        if key != self._water_key:
            self.water = water_side_of_units(
                self.state.scenario,
                result.climate.weather,
                result.climate.conditions,
                [u.study for u in result.units],
                result.inputs.design_percent,
            )
            self._water_key = key
        return self.water

    def update(self, width: int | None = None) -> bool:
        """Redraw what the current result changed; ``width`` [px] the chart's plot width.

        Returns True when something was redrawn.
        """
        result = self.state.result
        system = self.state.inputs.unit_system
        if not self.plant:
            unit = result.unit.study
            key = ("schedule", id(unit), system)
            if self._shown.get("tables") == key:
                return False
            self.tables.value = _scroll_region(
                coil_schedule_html(coil_schedule([unit]), system, f"Coil schedule of {unit.name}"),
                f"Coil schedule of {unit.name}",
            )
            self._shown["tables"] = key
            return True
        try:
            water = self.water_side()
        except PlantsideError as error:  # shown in place of the tables, never a traceback
            self.tables.value = f"<div class='plantside-message'>⚠ {html.escape(str(error))}</div>"
            self._shown.clear()
            return True
        changed = False
        pinned = self.state.pinned is not None
        key = (self._water_key, system, pinned)
        if self._shown.get("tables") != key:
            self.tables.value = _which_result(pinned) + _scroll_region(
                water_side_html(water, self.state.scenario.water_side, system), "Water side"
            )
            self._shown["tables"] = key
            changed = True
        if water is None or not (water.options["plant"] == "cooling").any():
            if self.chart is not None:
                self.box.children = ()
                self.chart = self.chart_spec = None
            return changed
        chart_key = (self._water_key, system, width)
        if self._shown.get("chart") != chart_key:
            chart = water_side_chart(
                water_side_energy_frame(water, system),
                water_side_efficiency_frame(water, system),
                system,
                width=width,
            )
            self.chart_spec = chart
            if self.chart is None:
                self.chart = alt.JupyterChart(
                    chart, embed_options={"actions": False, "renderer": "canvas"}
                )
                self.chart.add_class("plantside-chart-water_side")
                self.box.children = (self.chart,)
            else:  # the spec written without Altair's to_dict cost (~20 ms), as the five charts
                try:
                    self.chart.spec = fast_spec(chart)
                except UnsupportedChartError:
                    self.chart.spec = altair_spec(chart)
            self._shown["chart"] = chart_key
            changed = True
        return changed


def _which_result(pinned: bool) -> str:
    """A line saying whose water side is shown when "A" is pinned: the current B's only
    (A's water side would be a second year of the water side, not worked out here)."""
    if not pinned:
        return ""
    return (
        "<p class='plantside-help ps-ab-note'>Water side of "
        f"{SCENARIO_LABELS['B']} only; {SCENARIO_LABELS['A']} is not shown here.</p>"
    )


def _scroll_region(table_html: str, name: str) -> str:
    """Tables in a box that scrolls sideways on a narrow page, reachable by keyboard (Tab,
    then the arrow keys) and named for a screen reader (WCAG 2.1 SC 2.1.1)."""
    if not table_html:
        return ""
    label = html.escape(name, quote=True)
    return (
        f"<div class='ps-scroll' tabindex='0' role='region' aria-label='{label}'>{table_html}</div>"
    )
