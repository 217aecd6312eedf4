"""A small sweep from the plant page: outdoor-air fraction x climate, with its chart.

:class:`SweepPanel` holds one widget the dashboard places, ``box``. The user picks an
air handler, a range of minimum outdoor-air fractions and a number of steps, and the
climates (the bundled sites and the page's own weather file); *Run sweep* starts it.
The cases run one by one in a background thread of the kernel, so the page stays
live (each browser session is a kernel of its own, so other sessions never wait);
a progress bar and a line ("12 of 30 cases") follow it, *Stop* ends it after the case
in hand, and the finished cases are kept. Then a chart of the results is drawn, and a
table lists the cases the model refused (their field and reason, never a traceback).

The calculation is that of ``plantside sweep``: the sweep is built by
:func:`plantside.study.sweep.sweep_from_dict` (the ``[sweep]`` table a file would
hold, validated the same way) from the page's current scenario
(:meth:`~plantside.dashboard.state.DashboardState.current_scenario`), run by
:func:`plantside.study.sweep_run.run_sweep` in this process into a temporary folder,
and drawn by :func:`plantside.charts.sweep.sweep_charts`. At most
:data:`MAX_PANEL_CASES` cases run from the page; larger sweeps belong to the command.
"""

from __future__ import annotations

import html
import math
import shutil
import tempfile
import threading
from dataclasses import replace
from pathlib import Path

import altair as alt
import ipywidgets as widgets
import numpy as np
import pandas as pd

from plantside.charts.sweep import sweep_charts
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.dashboard.controls import (
    SLIDERS,
    AccessibleName,
    GuardedButton,
    GuardedCheckbox,
    GuardedDropdown,
    GuardedInput,
)
from plantside.dashboard.offline_charts import use_offline_charts
from plantside.errors import PlantsideError, excerpt
from plantside.study.figures import first_recirculating_unit
from plantside.study.sweep import sweep_from_dict
from plantside.study.sweep_cases import ClimateChoice, _file_digest, _resolved
from plantside.study.sweep_folder import results_table
from plantside.study.sweep_run import run_sweep
from plantside.study.sweep_worker import CASE_FAILED

__all__ = ["MAX_PANEL_CASES", "SweepPanel"]

#: Most cases a sweep started from the page may have (a case takes a few tenths of a
#: second, so 60 is half a minute or so); larger sweeps: ``plantside sweep``.
MAX_PANEL_CASES = 60
#: Steps of the outdoor-air fraction the page offers.
MIN_STEPS, MAX_STEPS = 2, 21
#: The field the sweep varies (per air handler, or ``*`` for all).
FIELD = "minimum_outdoor_air_fraction"
#: The range slider's label: percent, as the page's minimum outdoor-air slider.
FRACTION_LABEL = "Outdoor-air fraction [%]"
#: The help line under it.
FRACTION_HELP = (
    "Minimum outdoor-air fraction from the first to the second value, in percent of "
    "the supply air; both ends are run."
)
#: The fraction's column as the charts and the refused-case table show it (percent).
PERCENT_COLUMN = "Minimum outdoor-air fraction[%]"
#: Words for the sweep's standard charts (:func:`plantside.charts.sweep.sweep_charts`).
CHART_NAMES = {
    "sweep_plant_capacity": "Cooling plant design capacity",
    "sweep_plant_capacity_map": "Cooling plant design capacity, map",
    "sweep_chiller_options_map": "Chilled-water plant options by climate",
}
#: The water-side box's words (shown when the scenario has water-side tables).
WATER_SIDE_LABEL = "Also each chiller and boiler option's year (about a quarter slower)"
CAUTION = (
    "A sweep compares cases of the same model; it does not size equipment. Check the "
    "chosen case in full (its cautions, humidity and part-load hours) and follow local "
    "codes and a licensed engineer's review."
)


class _StopRequestedError(Exception):
    """Raised from the progress callback when the user pressed Stop."""


class SweepPanel:
    """Run a small outdoor-air fraction x climate sweep from the page.

    Parameters
    ----------
    state : DashboardState
        The page's state; the sweep starts from its current scenario (the controls'
        values) when *Run sweep* is pressed.

    Attributes
    ----------
    box : ipywidgets.VBox
        Everything the panel shows.
    table : pandas.DataFrame or None
        The last sweep's table (as ``plantside sweep`` writes it), finished cases only.
    sweep : Sweep or None
        The last sweep run.
    charts : dict
        The last sweep's charts by file name (as ``plantside sweep --charts`` saves them).
    """

    def __init__(self, state):
        use_offline_charts()  # the page fetches nothing from a network (as app.py)
        self.state = state
        self.table: pd.DataFrame | None = None
        self.sweep = None
        self.charts: dict = {}
        self._thread: threading.Thread | None = None
        self._stop = threading.Event()
        self.unit = GuardedDropdown(
            options=[("", "1")], description="Air handler", style={"description_width": "13em"}
        )
        # in percent, as the page's own outdoor-air slider; the sweep gets fractions
        self.fraction = GuardedRangeSlider(
            value=(10.0, 50.0),
            min=0.0,
            max=100.0,
            step=5.0,
            readout_format=".0f",
            description=FRACTION_LABEL,
            style={"description_width": "13em"},
            continuous_update=False,
            layout=widgets.Layout(width="100%", max_width="46em"),  # its readout in reach
        )
        self.steps = GuardedIntText(
            value=5,
            min=MIN_STEPS,
            max=MAX_STEPS,
            description="Steps",
            style={"description_width": "13em"},
            layout=widgets.Layout(width="19em"),
        )
        self.water_side = GuardedCheckbox(
            value=False,
            description=WATER_SIDE_LABEL,
            indent=False,
            layout=widgets.Layout(width="auto"),
        )
        self.climates: dict[str, widgets.Checkbox] = {}
        self._own: ClimateChoice | None = None
        self._climate_box = widgets.VBox([])
        self._note = widgets.HTML("")
        self.count = widgets.HTML()
        self.run_button = GuardedButton(description="Run sweep", button_style="primary")
        self.stop_button = GuardedButton(description="Stop", disabled=True)
        self.progress = widgets.IntProgress(value=0, min=0, max=1, description="")
        self.progress_text = widgets.HTML("")
        self.message = widgets.HTML("")
        self.chart_choice = GuardedDropdown(  # wide enough for the longest chart name
            options=[], description="Chart", layout=widgets.Layout(width="30em")
        )
        self.chart_box = widgets.VBox([])
        self.failed = widgets.HTML("")
        _guard(self.unit, lambda raw: _check_index(raw, self.unit), self._refused)
        _guard(self.chart_choice, lambda raw: _check_index(raw, self.chart_choice), self._refused)
        _guard(self.fraction, _check_range, self._refused)
        _guard(self.steps, _check_steps, self._refused)
        _guard(self.water_side, _check_tick, self._refused)
        for button in (self.run_button, self.stop_button):
            button.refused = self._refused
        self.run_button.on_click(lambda _: self.start())
        self.stop_button.on_click(lambda _: self.stop())
        for control in (self.unit, self.fraction, self.steps):
            control.observe(lambda _: self._show_count(), names="value")
        self.chart_choice.observe(lambda _: self._show_chart(), names="value")
        # the range's two handles are <div role="slider">: named by the label and tied to
        # the help line as the page's own sliders are (AccessibleName, in a control box)
        help_id = f"plantside-sweep-help-{id(self)}"
        self._fraction_box = widgets.VBox(
            [
                self.fraction,
                widgets.HTML(
                    f"<div class='plantside-help' id='{help_id}'>{html.escape(FRACTION_HELP)}</div>"
                ),
                AccessibleName(label=FRACTION_LABEL),
            ]
        )
        self._fraction_box.add_class("plantside-control")
        self.box = widgets.VBox(
            [
                widgets.HTML(
                    "<h2 class='ps-part-title'>Sweep: outdoor-air fraction × climate</h2>"
                    f"<div class='plantside-help'>{html.escape(CAUTION)}</div>"
                ),
                self.unit,
                self._fraction_box,
                self.steps,
                widgets.HTML("<b>Climates</b>"),
                self._climate_box,
                self._note,
                self.water_side,
                self.count,
                widgets.HBox([self.run_button, self.stop_button]),
                widgets.HBox([self.progress, self.progress_text]),
                self.message,
                self.chart_choice,
                self.chart_box,
                self.failed,
            ]
        )
        self.box.add_class("plantside-sweep")
        self.chart_choice.layout.display = "none"
        self._scenario = None
        self._follow_page()
        state.listeners.append(lambda _: self._follow_page())

    def _follow_page(self) -> None:
        """Air handlers of the page's scenario and its weather file among the climates
        (on start, and after a scenario is loaded or another climate picked)."""
        state = self.state
        scenario = state.scenario
        if scenario is not self._scenario:
            self._scenario = scenario
            units = [
                (spec.settings.name, str(i + 1))
                for i, spec in enumerate(scenario.air_handlers)
                if not spec.settings.all_outdoor_air
            ] or [(scenario.air_handlers[0].settings.name, "1")]
            if len(units) == len(scenario.air_handlers) > 1:
                units.append(("All air handlers", "*"))
            first = str(first_recirculating_unit(scenario) + 1)
            self.unit.options = units
            self.unit.value = first if any(v == first for _, v in units) else units[0][1]
        own = self._own_climate()
        if not self.climates or own != self._own:
            ticked = set(self.chosen_climates()) or {str(state.inputs.climate)}
            boxes = {}
            for name in BUNDLED_CLIMATES:
                boxes[name] = self.climates.get(name) or GuardedCheckbox(
                    value=name in ticked, description=name, indent=False
                )
            if own is not None:
                boxes[own.label] = GuardedCheckbox(
                    value=True, description=f"{own.label} (this page's weather file)", indent=False
                )
            for name, box in boxes.items():
                if name not in self.climates:
                    _guard(box, _check_tick, self._refused)
                    box.observe(lambda _: self._show_count(), names="value")
            self.climates, self._own = boxes, own
            self._climate_box.children = tuple(boxes.values())
        # the water side only where the scenario has one (its tables give the options)
        self.water_side.layout.display = None if scenario.water_side is not None else "none"
        uploaded = own is None and str(state.inputs.climate).startswith("upload: ")
        self._note.value = (
            "<div class='plantside-help'>An uploaded weather file is not swept here; put it "
            "in a folder and run <code>plantside sweep</code> with <code>climate_folder</code>."
            "</div>"
            if uploaded
            else ""
        )
        self._show_count()

    @property
    def controls(self) -> dict:
        """Every widget of the panel the page can send a message to, by a name (each a
        :class:`~plantside.dashboard.controls.GuardedInput`; for the widget fuzz test)."""
        found = {
            "sweep_air_handler": self.unit,
            "sweep_fraction": self.fraction,
            "sweep_steps": self.steps,
            "sweep_run": self.run_button,
            "sweep_stop": self.stop_button,
            "sweep_chart": self.chart_choice,
            "sweep_water_side": self.water_side,
        }
        found.update({f"sweep_climate_{name}": box for name, box in self.climates.items()})
        return found

    # ------------------------------------------------------------------ planning
    def _own_climate(self) -> ClimateChoice | None:
        """The page's weather file read from disk (a scenario's ``weather_file``), if any."""
        climate = str(self.state.inputs.climate)
        if climate in BUNDLED_CLIMATES or not climate.startswith("file: "):
            return None
        try:
            path = _resolved(self.state.scenario, climate.split(": ", 1)[1])
            if not path.is_file():
                return None
            return ClimateChoice(path.stem, weather_file=str(path), digest=_file_digest(path))
        except (OSError, ValueError):
            return None

    def chosen_climates(self) -> list[str]:
        """The ticked climates, in the order shown."""
        return [name for name, box in self.climates.items() if box.value]

    def case_count(self) -> int:
        """Cases the current choices make (steps x climates)."""
        return int(self.steps.value) * len(self.chosen_climates())

    def _show_count(self) -> None:
        count, climates = self.case_count(), len(self.chosen_climates())
        steps = int(self.steps.value)

        def counted(number: int, noun: str) -> str:
            return f"{number} {noun}{'' if number == 1 else 's'}"

        text = (
            f"{counted(steps, 'fraction')} × {counted(climates, 'climate')} = "
            f"{counted(count, 'case')}"
        )
        if count > MAX_PANEL_CASES:
            text += f": more than the {MAX_PANEL_CASES} a sweep from the page may run"
        self.count.value = f"<div class='plantside-help'>{html.escape(text)}</div>"

    def build_sweep(self):
        """The sweep of the current choices, as ``plantside sweep`` would read it.

        Raises
        ------
        PlantsideError
            A choice out of range (no climate, too many cases, a value the model refuses),
            the message naming the field and what is allowed.
        """
        from plantside.errors import InputRangeError

        low_percent, high_percent = (float(v) for v in self.fraction.value)
        percent = SLIDERS["outdoor_air_fraction"]  # as the page's own slider converts
        low, high = (percent.from_display(v, "SI") for v in (low_percent, high_percent))
        steps = int(self.steps.value)
        chosen = self.chosen_climates()
        if not chosen:
            raise InputRangeError(
                "climates",
                "Climates: none ticked; tick at least one climate",
                "at least one climate",
            )
        if not (MIN_STEPS <= steps <= MAX_STEPS):
            raise InputRangeError(
                "steps",
                f"Steps: {steps} is outside {MIN_STEPS} to {MAX_STEPS}",
                f"{MIN_STEPS} to {MAX_STEPS}",
            )
        if not (0.0 <= low_percent < high_percent <= 100.0):
            raise InputRangeError(
                "outdoor-air fraction",
                f"Outdoor-air fraction: the range {low_percent:g} % to {high_percent:g} % is "
                "empty or outside 0 % to 100 %; choose two different ends from 0 % to 100 %",
                "a range inside 0 % to 100 % whose ends differ",
            )
        count = steps * len(chosen)
        if count > MAX_PANEL_CASES:
            raise InputRangeError(
                "cases",
                f"Cases: {steps} fractions × {len(chosen)} climates = {count} cases is more than "
                f"the {MAX_PANEL_CASES} a sweep from the page may run; take fewer steps or "
                "climates, or run larger sweeps with the command plantside sweep",
                f"at most {MAX_PANEL_CASES} cases",
            )
        base = self.state.current_scenario()
        bundled = [name for name in chosen if name in BUNDLED_CLIMATES]
        table = {
            "title": f"Outdoor-air sweep of {base.title}",
            "water_side": bool(self.water_side.value) and base.water_side is not None,
            "axes": {
                f"air_handler[{self.unit.value}].{FIELD}": {
                    "start": low,
                    "stop": high,
                    "num": steps,
                }
            },
        }
        own = self._own if self._own is not None and self._own.label in chosen else None
        if bundled:
            table["climates"] = bundled
        elif own is not None:  # the base scenario's own weather file only
            return sweep_from_dict(table, base, "dashboard sweep", base.base_dir)
        sweep = sweep_from_dict(table, base, "dashboard sweep", base.base_dir)
        if own is not None:
            sweep = replace(sweep, climates=(*sweep.climates, own))
        return sweep

    # ------------------------------------------------------------------ running
    @property
    def running(self) -> bool:
        """True while a sweep runs."""
        return self._thread is not None and self._thread.is_alive()

    def start(self) -> bool:
        """Start the sweep of the current choices in a background thread.

        Returns False (with the message shown) when the choices are refused or a sweep
        is already running.
        """
        if self.running:
            self._say("A sweep is running: Stop it, or wait for it, before starting another.")
            return False
        try:
            sweep = self.build_sweep()
        except PlantsideError as error:
            self._say(str(error), warn=True)
            return False
        self.sweep = sweep
        self._stop.clear()
        self.table, self.charts = None, {}  # the last sweep's results go: these are not theirs
        self.chart_box.children = ()
        self.chart_choice.layout.display = "none"
        self.failed.value = ""
        self.progress.max = sweep.size
        self.progress.value = 0
        self.progress_text.value = f"0 of {sweep.size} cases"
        self._say("Running…")
        self.run_button.disabled = True
        self.stop_button.disabled = False
        self._thread = threading.Thread(target=self._work, args=(sweep,), daemon=True)
        self._thread.start()
        return True

    def stop(self) -> None:
        """Stop after the case in hand; the finished cases are kept and drawn."""
        self._stop.set()

    def join(self, timeout: float | None = None) -> bool:
        """Wait for the running sweep (tests, scripts); True when it has ended."""
        if self._thread is not None:
            self._thread.join(timeout)
        return not self.running

    def _progress(self, done: int, total: int) -> None:
        self.progress.value = int(done)
        self.progress_text.value = f"{int(done)} of {int(total)} cases"
        if self._stop.is_set() and done < total:
            raise _StopRequestedError

    def _work(self, sweep) -> None:
        folder = Path(tempfile.mkdtemp(prefix="plantside-sweep-"))
        stopped = False
        try:
            try:
                run = run_sweep(
                    sweep, folder / "out", workers=1, batch_size=1, progress=self._progress
                )
                table = run.table
            except _StopRequestedError:
                stopped = True
                table = results_table(folder / "out", sweep)
            self._finish(sweep, table, stopped)
        except PlantsideError as error:
            self._say(f"The sweep could not run: {error}", warn=True)
        except Exception as error:  # never a traceback on the page
            self._say(f"The sweep stopped on an unexpected error: {excerpt(error, 300)}", warn=True)
        finally:
            shutil.rmtree(folder, ignore_errors=True)
            self.run_button.disabled = False
            self.stop_button.disabled = True

    def _finish(self, sweep, table: pd.DataFrame, stopped: bool) -> None:
        self.table = table
        failed = table[table["status"] == CASE_FAILED]
        ran = table[table["status"] != CASE_FAILED]  # failed cases have no results
        system = self.state.inputs.unit_system
        shown, axes = _in_percent(ran, sweep)
        self.charts = sweep_charts(shown, axes, system=system)
        words = f"{len(table)} of {sweep.size} cases finished"
        if stopped:
            words = f"Stopped: {words}; the finished ones are shown"
        if len(failed):
            words += f"; {len(failed)} failed (listed below)"
        self._say(words + ".", warn=bool(stopped or len(failed)))
        self.failed.value = _failed_html(failed, sweep)
        options = [(_chart_name(name, sweep), name) for name in self.charts]
        self.chart_choice.options = options
        self.chart_choice.layout.display = None if options else "none"
        if options:
            preferred = [v for _, v in options if v == "sweep_plant_capacity"]
            self.chart_choice.value = preferred[0] if preferred else options[0][1]
        self._show_chart()

    def _show_chart(self) -> None:
        chart = self.charts.get(self.chart_choice.value)
        if chart is None:
            self.chart_box.children = ()
            return
        view = alt.JupyterChart(chart, embed_options={"actions": False, "renderer": "canvas"})
        view.add_class("plantside-chart-sweep")
        self.chart_box.children = (view,)

    def _refused(self, message: str) -> None:
        """What the page sent was refused (the control keeps its value): say why."""
        self._say(message, warn=True)

    def _say(self, text: str, warn: bool = False) -> None:
        mark = "⚠ " if warn else ""
        css = "plantside-message" if warn else "plantside-help"
        self.message.value = f"<div class='{css}' role='status'>{mark}{html.escape(text)}</div>"


# ---------------------------------------------------------------------------------------
# controls that check what the page sends (plantside.dashboard.controls.GuardedInput)
# ---------------------------------------------------------------------------------------
class GuardedRangeSlider(GuardedInput, widgets.FloatRangeSlider):
    """A FloatRangeSlider whose page messages are checked first."""


class GuardedIntText(GuardedInput, widgets.BoundedIntText):
    """A BoundedIntText whose page messages are checked first."""


def _guard(widget, check, refused) -> None:
    widget.check = check
    widget.refused = refused


def _is_number(value) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool) and math.isfinite(value)


def _check_index(raw, widget) -> str:
    count = len(widget.options)
    if isinstance(raw, int) and not isinstance(raw, bool) and 0 <= raw < count:
        return ""
    return f"{widget.description}: expected one of the {count} choices shown"


def _check_range(raw) -> str:
    if (
        isinstance(raw, list | tuple)
        and len(raw) == 2
        and all(_is_number(v) for v in raw)
        and 0.0 <= raw[0] <= raw[1] <= 100.0
    ):
        return ""
    return (
        "Outdoor-air fraction: expected two percentages from 0 % to 100 %, "
        "the first not above the second"
    )


def _check_steps(raw) -> str:
    if isinstance(raw, int) and not isinstance(raw, bool) and MIN_STEPS <= raw <= MAX_STEPS:
        return ""
    return f"Steps: expected a whole number from {MIN_STEPS} to {MAX_STEPS}"


def _check_tick(raw) -> str:
    return "" if isinstance(raw, bool) else "Climates: expected ticked or not"


def _in_percent(table: pd.DataFrame, sweep) -> tuple[pd.DataFrame, list[str]]:
    """The table with the outdoor-air fraction axis in percent (as the page shows it),
    and the axis columns for :func:`~plantside.charts.sweep.sweep_charts`."""
    column = sweep.axes[0].column
    shown = table.rename(columns={column: PERCENT_COLUMN})
    shown[PERCENT_COLUMN] = 100.0 * table[column].to_numpy(float)
    axes = [PERCENT_COLUMN if a.column == column else a.column for a in sweep.axes]
    return shown, axes


def _chart_name(name: str, sweep) -> str:
    if name in CHART_NAMES:
        return CHART_NAMES[name]
    if name.startswith("sweep_coil_load_"):
        index = int(name.rsplit("_", 1)[1]) - 1
        units = sweep.base.air_handlers
        if 0 <= index < len(units):
            return f"Design coil load: {units[index].settings.name}"
    return name


def _failed_html(failed: pd.DataFrame, sweep) -> str:
    """The refused cases as rows: climate, fraction, field and reason."""
    if failed.empty:
        return ""
    column = sweep.axes[0].column
    rows = "".join(
        "<tr>"
        f"<td>{html.escape(str(row['climate']))}</td>"
        f"<td>{'' if np.isnan(row[column]) else f'{100.0 * row[column]:.3g}'}</td>"
        f"<td>failed</td>"
        f"<td>{html.escape(str(row['error_field']))}</td>"
        f"<td>{html.escape(str(row['error_message']))}</td>"
        "</tr>"
        for _, row in failed.iterrows()
    )
    return (
        "<table class='plantside-table'><caption>Cases the model refused</caption>"
        "<tr><th>Climate</th><th>Outdoor-air fraction [%]</th><th>Status</th><th>Field</th>"
        f"<th>Reason</th></tr>{rows}</table>"
    )
