"""The dashboard a design meeting drives: headline figures, five charts, controls, exports.

``Dashboard(scenario, view=...)`` builds the widgets around one
:class:`~plantside.dashboard.state.DashboardState`; the notebooks in
``dashboards/`` only create it and display it. Layout, top to bottom:

- a header (study, site, what is shown) and the cautions strip (always visible);
- the headline figures (with the pinned "A" beside each when one is pinned)
  and a status line saying whether the charts show the current inputs;
- the controls on the left, each with its message area; the five charts on
  the right, each with PNG and SVG export buttons;
- the model's own cautions at the foot.

Charts are :class:`altair.JupyterChart` widgets (offline mode: the Vega
JavaScript ships with Altair, nothing is fetched from a network) whose spec is
replaced in place when their data change; a chart whose inputs did not change
is not touched. Exports go through :class:`~.download.BrowserDownload`, so the
file lands in the browser user's downloads.
"""

from __future__ import annotations

import functools
import html
import os
import time
from datetime import datetime
from importlib import resources
from pathlib import Path

import altair as alt
import ipywidgets as widgets
import pandas as pd

from plantside import __version__
from plantside.charts.compare import combine_scenarios
from plantside.charts.derivation_html import figure_name
from plantside.charts.export import chart_bytes, safe_filename
from plantside.charts.labels import change_against_a_text, export_stamp
from plantside.charts.palette import WIDTH
from plantside.charts.study_frames import CHARTS, chart_frames, study_chart
from plantside.dashboard.climate_stress_panel import ClimateStressPanel
from plantside.dashboard.controls import (
    Controls,
    GuardedButton,
    GuardedDropdown,
    GuardedToggleButtons,
)
from plantside.dashboard.derivations_panel import DerivationsPanel
from plantside.dashboard.download import BrowserDownload
from plantside.dashboard.offline_charts import use_offline_charts
from plantside.dashboard.panel_width import PanelWidth, fitted_plot_width
from plantside.dashboard.plant_controls import PlantControls
from plantside.dashboard.plant_panel import PLANT_KINDS, PlantPanel
from plantside.dashboard.report_export import DesignReportExport
from plantside.dashboard.serve import SCENARIO_ENVIRONMENT_VARIABLE
from plantside.dashboard.spec import SpecWriter
from plantside.dashboard.state import (
    PART_LOAD_THRESHOLD,
    DashboardResult,
    DashboardState,
    condition_text,
    display_text,
)
from plantside.dashboard.sweep_panel import SweepPanel
from plantside.dashboard.water_side_panel import WaterSidePanel
from plantside.errors import PlantsideError, ScenarioError
from plantside.study.figures import first_recirculating_unit
from plantside.study.scenario import Scenario, dumps_scenario, load_scenario, loads_scenario
from plantside.units import to_display

__all__ = ["CAUTION_TEXT", "CHARTS", "Dashboard", "example_scenario", "first_recirculating_unit"]


#: The cautions strip, always on show.
CAUTION_TEXT = (
    "<b>Preliminary design aid.</b> Final equipment selection and sizing belong to a licensed "
    "engineer working under the local codes. <b>Undersizing</b> risks high indoor humidity, "
    "mould and discomfort; <b>oversizing</b> risks short cycling, wear and poor "
    "dehumidification at part load."
)

_PNG_SCALE = 2  # report resolution: charts are ~800 px wide, so PNGs are ~1,700 px


def example_scenario() -> Scenario:
    """The scenario the dashboard opens with.

    The file named by the ``PLANTSIDE_SCENARIO`` environment variable (set by
    ``python -m plantside.dashboard.serve --scenario FILE``), else the bundled
    example study.
    """
    named = os.environ.get(SCENARIO_ENVIRONMENT_VARIABLE)
    if named:
        return load_scenario(named)
    packaged = resources.files("plantside").joinpath("data", "example_scenario.toml")
    if packaged.is_file():
        return loads_scenario(packaged.read_text("utf-8"), "example_scenario.toml")
    repository = Path(__file__).resolve().parents[3] / "example_data" / "scenarios"
    return load_scenario(repository / "quillon_clinic.toml")


def _css() -> str:
    folder = resources.files("plantside.dashboard")
    return "\n".join(
        folder.joinpath(name).read_text("utf-8") for name in ("dashboard.css", "plant_page.css")
    )


#: The plant page's parts, one shown at a time (the water side's year is worked out only
#: when its part is shown). More parts are added with :meth:`Dashboard.add_page`.
PLANT_PAGES = ("Design & year", "Plant: cooling | heating", "Water side")


def _quantity(quantity: str, value_si: float, system: str, digits: int | None = None):
    value, unit = to_display(quantity, value_si, system)
    value = float(value)
    if digits is None:
        digits = 0 if abs(value) >= 100 else 1
    return f"{value:,.{digits}f}", unit


class Dashboard:
    """The whole dashboard for one scenario.

    Parameters
    ----------
    scenario : Scenario, optional
        The study; default :func:`example_scenario`.
    view : {"air_handler", "plant"}
        Headline figures and load charts of one air handler, or of the plant.
    air_handler : int, optional
        Air handler the controls show first (default: the first with return air).

    Attributes
    ----------
    state : DashboardState
    controls : Controls
    charts : dict of str to altair.JupyterChart
    chart_specs : dict of str to altair chart
        The chart objects on show (what the export buttons render).
    widget : ipywidgets.VBox
        The layout; displaying the dashboard displays it.
    timings : dict of str to float
        Kernel time of the last update [s]: ``model`` and ``charts``.
    """

    def __init__(
        self, scenario: Scenario | None = None, view: str = "air_handler", air_handler=None
    ):
        use_offline_charts()
        scenario = scenario if scenario is not None else example_scenario()
        index = first_recirculating_unit(scenario) if air_handler is None else int(air_handler)
        self.view = view
        self.state = DashboardState(scenario, view=view, air_handler=index)
        self.controls = Controls(self.state)
        self.controls.on_scenario_upload = self.load_scenario_file
        self.controls.on_message = self._show_text  # e.g. an export's message
        self.download = BrowserDownload()
        # plot width of each chart on screen [px]: the builders' width until the page
        # reports its panels (exports keep the builders' fixed width)
        self.widths: dict[str, int] = dict.fromkeys(CHARTS, WIDTH)
        self.panel_width = PanelWidth(names=list(CHARTS))
        self.panel_width.observe(self._on_panel_width, names="report")
        # per chart, the (offered, drawn) widths [px] of the report that last narrowed it
        self._narrowed_at: dict[str, tuple[float, float]] = {}
        self.timings: dict[str, float] = {"model": 0.0, "charts": 0.0}
        self._chart_keys: dict[str, tuple] = {}
        self.chart_specs: dict[str, object] = {}
        self.spec_writer = SpecWriter()
        self._backgrounds: dict = {}
        self._pinned_frames: dict = {}
        self.header = widgets.HTML()
        self.header.add_class("plantside-header")
        self.caution = widgets.HTML(CAUTION_TEXT)
        self.caution.add_class("plantside-caution")
        self.figures = widgets.HTML()
        self.figures.add_class("plantside-figures")
        self.status = widgets.HTML()
        self.status.add_class("plantside-status")
        self.mini_figures = widgets.HTML()  # the key figures, beside the controls
        self.mini_figures.add_class("plantside-mini")
        self.model_cautions = widgets.HTML()
        self.model_cautions.add_class("plantside-cautions")
        self.charts: dict[str, alt.JupyterChart] = {}
        for name in CHARTS:
            chart = self._build_chart(name, self.widths[name])
            self.chart_specs[name] = chart
            # validated once against the schema; no vega-embed menu (it links to web editors)
            self.charts[name] = alt.JupyterChart(
                chart, embed_options={"actions": False, "renderer": "canvas"}
            )
            self.charts[name].add_class(f"plantside-chart-{name}")
            self._chart_keys[name] = self._drawn_key(name)
            self.spec_writer.seed(name, chart, self._structure(name), self.charts[name].spec)
        self.export_buttons = self._export_buttons()
        # water side (plant page) or coil schedule (single-unit page), under the figures
        self.water_side = WaterSidePanel(self.state, plant=view == "plant")
        self.plant_controls = self.plant_panel = None
        self.page_choice = self.pages = None
        self.stress_panel = self.sweep_panel = None
        # "how this is worked out" under the figures and each chart (the water side's only
        # when its part is on show)
        self.derivations = DerivationsPanel(
            self.state,
            plant=view == "plant",
            water_side=self.water_side.water_side if view == "plant" else None,
        )
        self.report_export = DesignReportExport(self.state, self.download)
        if view == "plant":
            # the whole plant (cooling and heating) and the water side: each part is worked
            # out only when shown, off the critical path of a slider move
            self.plant_controls = PlantControls(self.state, self.controls.guarded)
            self.plant_panel = PlantPanel(self.state)
            self._plant_export_buttons()
            self.stress_panel = ClimateStressPanel(self.state)  # runs on its own button
            self.stress_panel.width = self.widths["distribution"]  # the same chart builder
            self.sweep_panel = SweepPanel(self.state)  # runs in a thread on its own button
        else:
            self.water_side.update(self.widths["design"])
        self.widget = self._layout()
        if view == "plant":
            self.add_page("Climate stress test", self.stress_panel.box)
            self.add_page("Sweep", self.sweep_panel.box)
        self.state.listeners.append(self._on_state)
        self._show_text()

    # ------------------------------------------------------------------ display
    def _repr_mimebundle_(self, **kwargs):
        return self.widget._repr_mimebundle_(**kwargs)

    def _layout(self) -> widgets.VBox:
        c = self.controls
        air_handler = GuardedDropdown(
            options=[(name, i) for i, name in enumerate(self.state.names)],
            value=self.state.inputs.air_handler,
            description="Air handler",  # its <label for>, off screen (controls.py)
        )
        c.guard("air_handler", air_handler)  # what the page sends is checked first
        air_handler.add_class("plantside-air-handler")
        air_handler.add_class("plantside-sr-label")
        air_handler.observe(c.guarded("air_handler", self._on_air_handler), names="value")
        self.air_handler_choice = air_handler
        group = lambda text: widgets.HTML(f"<div class='ps-group'>{text}</div>")  # noqa: E731
        label = (
            "Air handler shown"
            if self.view == "air_handler"
            else "Air handler the controls below adjust"
        )
        sidebar_parts = [
            self.mini_figures,
            group("Air handler"),
            widgets.VBox(
                [
                    widgets.HTML(f"<span class='plantside-label'>{label}</span>"),
                    air_handler,
                    c.messages["air_handler"],
                ]
            ),
        ]
        plant_boxes = []
        if self.plant_controls is not None:
            boxes = self.plant_controls.boxes
            plant_boxes = [
                group("Plant"),
                boxes["cooling_option"],
                boxes["cooling_margin_percent"],
                boxes["heating_option"],
                boxes["heating_margin_percent"],
            ]
        sidebar_parts += [
            c.box("outdoor_air_fraction"),
            c.box("supply_air_temperature"),
            c.box("bypass_factor"),
            c.box("leaving_dew_point"),  # shown only for a coil that holds a dew point
            c.box("economizer"),
            c.box("economizer_integrated"),
            c.box("fan_control"),
            group("Site and design"),
            c.box("climate"),
            c.box("design_percent"),
            *plant_boxes,
            group("Compare, units and files"),
            c.box("pin"),
            c.box("unit_system"),
            c.box("scenario"),
            self._files_box(),
        ]
        sidebar = widgets.VBox(sidebar_parts)
        sidebar.add_class("plantside-sidebar")
        panels = []
        for name in CHARTS:
            tools = widgets.HBox(self.export_buttons[name])
            tools.add_class("plantside-chart-tools")
            panel = widgets.VBox([tools, self.charts[name], self.derivations.for_chart(name)])
            panel.add_class("plantside-chart")
            panels.append(panel)
        if self.view == "plant":
            design_page = widgets.VBox(panels)
            water_page = widgets.VBox(
                [self.water_side.tables, self.water_side.box, self.derivations.for_chart("water")]
            )
            water_page.add_class("plantside-water-page")
            self._page_widgets = [design_page, self.plant_panel.box, water_page]
            self.pages = widgets.Stack(self._page_widgets, selected_index=0)
            self.pages.add_class("plantside-pages")
            self.page_choice = GuardedToggleButtons(
                options=[(title, i) for i, title in enumerate(PLANT_PAGES)],
                value=0,
                style={"button_width": "auto"},
            )
            self.page_choice.add_class("plantside-page-choice")
            self.page_choice.check = self._check_page
            self.page_choice.refused = lambda message: self.controls.show_message("export", message)
            self.page_choice.observe(self.controls.guarded("export", self._on_page), names="value")
            chart_column = widgets.VBox([self.page_choice, self.pages])
        else:
            chart_column = widgets.VBox([*panels, self.water_side.box])
        chart_column.add_class("plantside-charts")
        body = widgets.HBox(
            [sidebar, chart_column], layout=widgets.Layout(align_items="flex-start")
        )
        body.add_class("plantside-body")
        style = widgets.HTML(f"<style>{_css()}</style>")
        app = widgets.VBox(
            [
                style,
                self.header,
                self.caution,
                self.figures,
                self.derivations.figures,
                *([self.water_side.tables] if self.view != "plant" else []),
                self.status,
                body,
                self.model_cautions,
                self.download,
                self.panel_width,
            ]
        )
        app.add_class("plantside-app")
        return app

    def _files_box(self) -> widgets.VBox:
        wide = widgets.Layout(width="96%")
        csv_button = GuardedButton(description="Hourly results (CSV)", layout=wide)
        csv_button.add_class("plantside-export-csv")
        csv_button.on_click(self.controls.guarded("export", lambda _: self.export_hourly_csv()))
        toml_button = GuardedButton(
            description="Save scenario with these settings (TOML)", layout=wide
        )
        toml_button.add_class("plantside-export-toml")
        toml_button.on_click(self.controls.guarded("export", lambda _: self.export_scenario()))
        report_button = GuardedButton(
            description="Design report (HTML)",
            tooltip="One HTML file of what is on show: figures, charts, derivations, inputs, "
            "cautions; prints to PDF from the browser",
            layout=wide,
        )
        report_button.add_class("plantside-export-report")
        report_button.on_click(
            self.controls.guarded("export", lambda _: self.report_export.export())
        )
        self.file_buttons = {"csv": csv_button, "toml": toml_button, "report": report_button}
        self.export_message = widgets.HTML()
        box = widgets.VBox(
            [
                widgets.HTML("<span class='plantside-label'>Download</span>"),
                csv_button,
                toml_button,
                report_button,
                self.export_message,
            ]
        )
        box.add_class("plantside-files")
        return box

    def _plant_export_buttons(self) -> None:
        """PNG and SVG buttons of the two plants' load-duration charts."""
        for kind in PLANT_KINDS:
            self.plant_panel.export_rows[kind].children = tuple(
                self._chart_export_row(
                    f"plant_{kind}",
                    f"the {kind} plant chart",
                    lambda fmt, k=kind: self.export_plant_chart(k, fmt),
                )
            )

    def _chart_export_row(self, key: str, what: str, export) -> list[widgets.Button]:
        """PNG and SVG buttons (class ``plantside-export-<key>-<fmt>``) that call
        ``export(fmt)``, guarded as every export."""
        row = []
        for fmt in ("png", "svg"):
            button = GuardedButton(
                description=fmt.upper(),
                tooltip=f"Download {what} as {fmt.upper()}, stamped with its inputs",
                layout=widgets.Layout(width="84px"),
            )
            button.add_class(f"plantside-export-{key}-{fmt}")
            button.on_click(self.controls.guarded("export", lambda _, f=fmt: export(f)))
            row.append(button)
        return row

    def export_plant_chart(self, kind: str, fmt: str) -> str:
        """Send the ``kind`` plant's load-duration chart as PNG or SVG, stamped."""
        if kind not in PLANT_KINDS or fmt not in ("png", "svg"):
            self.state.messages["export"] = f"unknown export {kind!r} as {fmt!r}"
            self._show_text()
            return ""
        self.plant_panel.update()  # the chart of the current inputs, even if not on show
        name = f"{self._file_stem()}-{kind}-plant-load-duration.{fmt}"
        return self._send_chart(lambda: self.plant_panel.chart_specs[kind], fmt, name)

    def _send_chart(self, chart, fmt: str, name: str) -> str:
        """Render ``chart()`` (a chart or a spec) as ``fmt``, stamped, and send it as ``name``;
        a refusal shows in the message line. Returns the file name sent, or ""."""
        try:
            # drawn in a child process: the kernel does not keep vl-convert's engine (~90 MB)
            data = chart_bytes(
                chart(), fmt, stamp=self.stamp(), scale=_PNG_SCALE, separate_process=True
            )
        except PlantsideError as error:
            self.state.messages["export"] = str(error)
            self._show_text()
            return ""
        self.state.messages["export"] = ""
        mime = "image/png" if fmt == "png" else "image/svg+xml"
        return self.download.send_file(data, name, mime)

    def _export_buttons(self) -> dict[str, list[widgets.Button]]:
        return {
            name: self._chart_export_row(
                name, "this chart", lambda fmt, n=name: self.export_chart(n, fmt)
            )
            for name in CHARTS
        }

    # ------------------------------------------------------------------ events
    def _on_air_handler(self, change):
        value = change["new"]
        self.state.set("air_handler", value)

    def _on_state(self, state: DashboardState):
        start = time.perf_counter()
        self.timings["model"] = float(state.last_update.get("seconds", 0.0))
        if self.air_handler_choice.value != state.inputs.air_handler:
            self.air_handler_choice.value = state.inputs.air_handler
        self.update_charts()
        self._show_text()
        self.timings["charts"] = time.perf_counter() - start

    def _on_panel_width(self, change):
        """The page measured its chart panels: redraw the charts that do not fit theirs.

        A panel as wide as its chart (a layout that sizes it by its content) would report
        the same shortfall after every narrowing, and the charts would shrink without end,
        one redraw per report: a chart is not narrowed again when its panel shrank by just
        as much as the chart did since the last narrowing (the panel followed the chart).
        """
        resized = False
        for name, (offered, drawn) in change["new"].items():
            width = fitted_plot_width(self.widths[name], offered, drawn)
            if width is not None and width < self.widths[name]:
                before = self._narrowed_at.get(name)
                if before is not None and offered < before[0]:
                    if abs((before[0] - offered) - (before[1] - drawn)) < 1.0:
                        continue  # the panel followed the chart: narrowing cannot fit it
                self._narrowed_at[name] = (offered, drawn)
            if width is not None:
                self.widths[name] = width
                resized = True
        if resized:
            self.update_charts()
            if (
                self.stress_panel is not None
                and self.stress_panel.width != self.widths["distribution"]
            ):
                self.stress_panel.width = self.widths["distribution"]
                if self.stress_panel.stress is not None:
                    self.stress_panel.update()

    def update_charts(self) -> list[str]:
        """Rebuild the charts whose data or width changed; return their names."""
        changed = []
        for name in CHARTS:
            key = self._drawn_key(name)
            if self._chart_keys.get(name) == key:
                continue
            chart = self._build_chart(name, self.widths[name])
            self.chart_specs[name] = chart
            self.charts[name].spec = self.spec_writer.spec(name, chart, self._structure(name))
            self._chart_keys[name] = key
            changed.append(name)
        self._update_page()  # after the five charts: the part of the plant page on show
        return changed

    # ------------------------------------------------------------------ plant page parts
    def page_shown(self) -> str:
        """Title of the plant page's part on show ("" on the single-unit page)."""
        if self.page_choice is None:
            return ""
        return self.page_choice.options[self.page_choice.value][0]

    def show_page(self, title: str) -> None:
        """Show the plant page's part named ``title`` (a title of :data:`PLANT_PAGES` or
        of a part added with :meth:`add_page`)."""
        titles = [label for label, _ in self.page_choice.options]
        self.page_choice.value = titles.index(title)

    def add_page(self, title: str, widget) -> None:
        """Add a part to the plant page (e.g. a stress test, a sweep), with its switch."""
        self._page_widgets.append(widget)
        self.pages.children = tuple(self._page_widgets)
        options = [*self.page_choice.options, (title, len(self._page_widgets) - 1)]
        self.page_choice.options = options

    def _check_page(self, raw) -> str:
        if type(raw) is not int or not 0 <= raw < len(self.page_choice.options):
            return f"Page: {str(raw)[:40]!r} is not one of the parts of the page"
        return ""

    def _on_page(self, change):
        self.pages.selected_index = change["new"]
        self._update_page()

    def _update_page(self) -> None:
        """Work out and draw the part on show: the water side's year (and the plants) only
        when their part is on show, never on a slider move's path otherwise."""
        shown = self.page_shown()
        if self.view != "plant" or shown == "Water side":
            self.water_side.update(self.widths["design"])
            self.derivations.update(water=self.view == "plant")
        if shown == PLANT_PAGES[1]:
            self.plant_panel.update()

    # ------------------------------------------------------------------ charts
    def _structure(self, name: str) -> tuple:
        """What may change a chart's shape (not only its data): checked against Altair."""
        state = self.state
        return (
            name,
            state.inputs.unit_system,
            state.pinned is not None,
            state.inputs.air_handler,
            self.widths[name],
        )

    def _drawn_key(self, name: str) -> tuple:
        """What the chart on screen was drawn from: its inputs and its plot width."""
        return (self._chart_key(name), self.widths[name])

    def _chart_key(self, name: str) -> tuple:
        result, pinned = self.state.result, self.state.pinned_result()
        system = self.state.inputs.unit_system
        base = (system, id(pinned), result.inputs.air_handler if self.view == "air_handler" else -1)
        units = tuple(id(u.hourly) for u in result.units)
        designs = tuple(id(u.design) for u in result.units)
        shown = result.unit
        if name == "design":
            return (*base, designs)
        if name == "year":
            return (*base, units, result.inputs.air_handler)
        if name == "distribution":  # the plant option's machines: its stage lines and weights
            machines = (result.figures.option_name, result.figures.machine_capacities)
            return (*base, units, designs, machines)
        if name == "psychrometric":
            return (*base, id(shown.design), result.climate.source, result.inputs.air_handler)
        return (
            *base,
            id(shown.design),
            shown.inputs.outdoor_air_fraction,
            result.inputs.air_handler,
        )

    def _frames(self, name: str, result: DashboardResult, system: str) -> dict:
        """The chart frames of one result (SI model output -> display units)."""
        return chart_frames(name, result.chart_view, system, self._backgrounds)

    def _combined(self, name: str, system: str) -> dict:
        current = self._frames(name, self.state.result, system)
        pinned = self.state.pinned_result()  # A's same air handler as the one shown
        if pinned is None:
            return current
        key = (id(pinned), name, system, self._chart_key(name)[2])
        if key not in self._pinned_frames:  # the pinned result never changes: frame it once
            if len(self._pinned_frames) > 20:
                self._pinned_frames.clear()
            self._pinned_frames[key] = (pinned, self._frames(name, pinned, system))
        before = self._pinned_frames[key][1]
        combined = {}
        for key, frame in current.items():
            if name == "psychrometric" and key in ("grid", "density"):
                combined[key] = frame  # the chart's background: the current site only
            else:
                combined[key] = combine_scenarios({"A": before[key], "B": frame})
        return combined

    def _build_chart(self, name: str, width: int | None = None):
        """Chart ``name`` of the current (and pinned) result, ``width`` [px] its plot width
        (None: the builders' fixed width, as exported)."""
        system = self.state.inputs.unit_system
        return study_chart(
            name, self._combined(name, system), system, self.state.result.chart_view, width
        )

    # ------------------------------------------------------------------ text
    def _show_text(self):
        state = self.state
        result = state.result
        scenario = state.scenario
        shown = (
            f"air handler {html.escape(result.unit.name)}"
            if self.view == "air_handler"
            else f"the plant of {len(result.units)} air handlers"
        )
        self.header.value = (
            f"<h1>plantside · {html.escape(scenario.title)}</h1>"
            f"<div class='ps-sub'>Site: {html.escape(result.climate.weather.site)} · "
            f"showing {shown} · cooling design {result.inputs.design_percent:g} % · "
            f"plantside {__version__}</div>"
        )
        self.figures.value = self._figures_html()
        self.derivations.update(water=self.page_shown() == "Water side")
        self.mini_figures.value = self._mini_html()
        if state.stale:
            self.status.value = (
                "<span class='ps-stale'>⚠ The figures and charts show the last valid result; "
                "the control marked below needs a change.</span>"
            )
        else:
            self.status.value = (
                "<span class='ps-fresh'>Figures and charts show the current inputs.</span>"
            )
        system = state.inputs.unit_system
        notes = (*state.carried_notes(), *result.cautions)
        items = "".join(f"<li>{html.escape(display_text(text, system))}</li>" for text in notes)
        self.model_cautions.value = (
            f"<b>Model cautions for these inputs</b><ul>{items}</ul>"
            if items
            else "<b>Model cautions for these inputs:</b> none."
        )
        self.export_message.value = (
            f"<div class='plantside-message'>⚠ "
            f"{html.escape(display_text(state.messages['export'], system))}</div>"
            if state.messages.get("export")
            else ""
        )

    def _mini_html(self) -> str:
        """Design coil load, its ratio to the zone load and the capacity, for the sidebar."""
        system = self.state.inputs.unit_system
        now = self.state.result.figures
        coil, unit = _quantity("power", now.design_coil_load, system)
        capacity, _ = _quantity("power", now.recommended_capacity, system)
        stale = "<div class='ps-stale'>⚠ last valid result shown</div>" if self.state.stale else ""
        return (
            f"{self._design_load_label()} <b>{coil}</b> {unit} "
            f"({now.coil_to_zone_ratio:.2f} × the zone load)<br>"
            f"Recommended capacity <b>{capacity}</b> {unit}{stale}"
        )

    def _figures_html(self) -> str:
        system = self.state.inputs.unit_system
        now = self.state.result.figures
        pinned_result = self.state.pinned_result()
        pinned = pinned_result.figures if pinned_result is not None else None
        margin = self.state.result.inputs.cooling_margin_percent  # as set on the page

        def power(v):
            return _quantity("power", v, system)

        def energy(v):
            return _quantity("energy", v, system)

        plant = self.view == "plant"

        def name(key: str) -> str:
            return figure_name(key, plant)

        cards = [
            (name("design_zone_load"), "ps-zone", "design_zone_load", power, "sensible + latent"),
            (
                name("design_coil_load"),
                "",
                "design_coil_load",
                power,
                f"{now.coil_to_zone_ratio:.2f} × the zone load",
            ),
            (
                name("recommended_capacity"),
                "",
                "recommended_capacity",
                power,
                f"{name('design_coil_load').lower()} + {margin:g} % margin",
            ),
            (name("peak_coil_load"), "", "peak_coil_load", power, "highest hour of the year"),
            (name("governing_condition"), "ps-wide ps-neutral", "governing", None, ""),
            (
                name("cooling_energy"),
                "ps-neutral",
                "cooling_energy",
                energy,
                "plant, whole year" if plant else "coil, whole year",
            ),
            (
                f"Hours above {100 * PART_LOAD_THRESHOLD:.0f} % of capacity",
                "ps-neutral",
                "hours_above_threshold",
                lambda v: (f"{int(v):,}", "h"),
                "of the year",
            ),
        ]
        html_cards = []
        for label, css, field, fmt, note in cards:
            value = getattr(now, field)
            before = getattr(pinned, field) if pinned is not None else None
            if fmt is None:  # a design condition, in the units on show
                text, unit = html.escape(condition_text(value, system)), ""
                extra = (
                    f"<div class='ps-pinned'><span class='ps-tag'>A</span> "
                    f"{html.escape(condition_text(before, system))}</div>"
                    if pinned is not None
                    else ""
                )
            else:
                text, unit = fmt(value)
                extra = ""
                if pinned is not None:
                    before_text, _ = fmt(before)
                    change = change_against_a_text(value, before)
                    extra = (
                        f"<div class='ps-pinned'><span class='ps-tag'>A</span> {before_text} "
                        f"{unit} · <span class='ps-tag'>B</span> {change} against A</div>"
                    )
            unit_html = f"<span class='ps-unit'>{unit}</span>" if unit else ""
            note_html = f"<div class='ps-note'>{note}</div>" if note else ""
            html_cards.append(
                f"<div class='ps-card {css}'><div class='ps-name'>{label}</div>"
                f"<div class='ps-value'>{text}{unit_html}</div>{note_html}{extra}</div>"
            )
        return f"<div class='ps-cards'>{''.join(html_cards)}</div>"

    # ------------------------------------------------------------------ exports
    def stamp(self) -> str:
        """Text stamped on every export: study, inputs (A's and B's when pinned), version, time."""
        state = self.state
        system = state.inputs.unit_system
        plant = self.view == "plant"
        pinned = state.pinned_result()
        return export_stamp(
            state.scenario.title,
            plant,
            state.result.inputs.stamp(state.scenario, plant, system),
            state.result.figures.governing,
            system,
            datetime.now().strftime("%Y-%m-%d %H:%M"),
            pinned_inputs=(
                pinned.inputs.stamp(state.scenario, plant, system) if pinned is not None else None
            ),
        )

    def _design_load_label(self) -> str:
        """The design load's name: a plant's includes the distribution gain (plant load)."""
        return figure_name("design_coil_load", self.view == "plant")

    def _file_stem(self, chart: str | None = None) -> str:
        """Start of an export's file name: the study, then what it shows (the plant or the
        air handler; on the plant page, the air handler a per-unit chart draws)."""
        title = self.state.scenario.title.split(":")[0]
        unit = self.state.result.unit.name
        if self.view == "plant":
            shown = f"plant-{unit}" if chart in ("psychrometric", "sweep") else "plant"
        else:
            shown = unit
        return safe_filename(f"{title}-{shown}".replace(" ", "-").lower())

    def export_chart(self, name: str, fmt: str) -> str:
        """Send chart ``name`` to the browser as PNG or SVG, stamped. Returns the file name."""
        if name not in CHARTS or fmt not in ("png", "svg"):
            self.state.messages["export"] = f"unknown export {name!r} as {fmt!r}"
            self._show_text()
            return ""
        # the builders' fixed width, whatever the width of the screen it was asked from
        chart = functools.partial(self._build_chart, name)
        return self._send_chart(chart, fmt, f"{self._file_stem(name)}-{CHARTS[name]}.{fmt}")

    def hourly_csv(self) -> bytes:
        """The hourly results on show as CSV, with the stamp as comment lines."""
        result = self.state.result
        if self.view == "air_handler":
            table = result.unit.hourly.copy()
        else:
            table = pd.DataFrame(index=result.units[0].hourly.index)
            for unit in result.units:
                table[f"{unit.name} coil_total_kW"] = unit.hourly["coil_total_kW"]
            table["plant_load_kW"] = result.coil_load
            table["zone_load_kW"] = result.zone_load
        table["economizer_mode"] = (
            table["economizer_mode"].astype(str) if "economizer_mode" in table else None
        )
        if table["economizer_mode"].isna().all():
            table = table.drop(columns="economizer_mode")
        header = (
            f"# {self.stamp()}\n# Columns carry their SI unit in the name "
            "(_C, _kgkg, _kJkg, _Pa, _m3s, _kgs, _kW); one row per hour.\n"
        )
        return (header + table.to_csv(float_format="%.6g")).encode("utf-8")

    def export_hourly_csv(self) -> str:
        """Send the hourly results to the browser as CSV."""
        return self.download.send_file(
            self.hourly_csv(), f"{self._file_stem()}-hourly.csv", "text/csv"
        )

    def scenario_toml(self) -> str:
        """The scenario with the controls' current values, as TOML text."""
        return dumps_scenario(self.state.current_scenario())

    def export_scenario(self) -> str:
        """Send the current scenario to the browser as TOML."""
        return self.download.send_file(
            self.scenario_toml().encode("utf-8"),
            safe_filename(self.state.scenario.title.split(":")[0].replace(" ", "-").lower())
            + ".toml",
            "application/toml",
        )

    def load_scenario_file(self, name: str, data: bytes) -> bool:
        """Open an uploaded scenario TOML (bundled climates only: no file paths from a page)."""
        from plantside.study.toml_input import parse_toml_text, read_toml_text

        label = safe_filename(name)
        try:
            # the same guard as the command line: size, UTF-8, nesting depth before parsing
            text = read_toml_text(bytes(data), label)
            parsed = parse_toml_text(text, label)
            site = parsed.get("site", {}) if isinstance(parsed.get("site"), dict) else {}
            if "weather_file" in site:
                raise ScenarioError(
                    label,
                    "site.weather_file",
                    "a scenario opened in the dashboard must name a bundled climate; upload "
                    "the weather CSV with the climate control instead",
                )
            units = parsed.get("air_handler", [])
            if isinstance(units, list) and any(
                isinstance(u, dict) and "zone_load_file" in u for u in units
            ):
                raise ScenarioError(
                    label,
                    "air_handler.zone_load_file",
                    "zone-load files cannot be opened from the page; use zone-load models",
                )
            scenario = loads_scenario(text, label)
        except PlantsideError as error:
            self.state.messages["scenario"] = str(error)
            self.controls.refresh()
            return False
        self.state.load_scenario(scenario)
        self._rebuild_air_handler_choice()
        self.controls.refresh()
        return not self.state.messages.get("scenario")

    def _rebuild_air_handler_choice(self):
        options = [(name, i) for i, name in enumerate(self.state.names)]
        if list(self.air_handler_choice.options) != options:
            self.air_handler_choice.options = options
        self.air_handler_choice.value = self.state.inputs.air_handler
