"""The dashboard's controls: widgets in the trade's words, each with a message area.

:class:`Controls` builds one widget per input of
:class:`~plantside.dashboard.state.DashboardState`, labels it with its unit,
puts a message area under it and wires it to the state. Callbacks are small:
convert the shown value to SI, hand it to :meth:`DashboardState.set` (which
validates it: any visitor of a served page can send widget messages) and
show the messages. When the unit system changes, sliders switch range, step
and label and show the state's value converted, so nothing is lost to a
round trip through the other unit system.

A slider's range is what the state accepts for the air handler shown
(:meth:`DashboardState.control_range`), so it never shows another value than
the one in use. A control that does not apply to the air handler shown is
disabled (or hidden, for the leaving dew point of a coil that holds none).

Each control is read by a screen reader under its visible label: a select or a
checkbox through ipywidgets' description (the ``<label for>``, kept off screen
where the box shows its own label), a slider handle and a row of toggle buttons
through :class:`AccessibleName` (``accessible_names.js``). Each box shows a short
help line under its control (:data:`HELP`).

What the page sends is checked before any widget trait sees it
(:class:`GuardedInput`): ipywidgets would otherwise coerce it (``true`` to 1,
``"1_0"`` to 10) or clamp it to the slider's range. A refused value leaves
the widget as it was, is pushed back to the page and its message is shown
beside the control. Buttons and file uploads are guarded the same way
(:class:`GuardedButton`, :class:`GuardedFileUpload`).

Every callback a widget runs goes through :meth:`Controls.guarded`: an error
the model raises on purpose is shown beside the control; any other exception
is logged on the server and the page gets a short message, never a
traceback. Messages on the page are at most :data:`MAX_MESSAGE_CHARS` long.
"""

from __future__ import annotations

import html
import itertools
import logging
import math
from collections.abc import Callable
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

import anywidget
import ipywidgets as widgets
import traitlets

from plantside.climate.bundled import bundled_climate_description
from plantside.dashboard.state import ECONOMIZER_CHOICES, FAN_CHOICES, DashboardState, display_text
from plantside.errors import PlantsideError, excerpt
from plantside.units import from_display, to_display

__all__ = [
    "HELP",
    "MAX_MESSAGE_CHARS",
    "MAX_UPLOAD_NAME_CHARS",
    "SLIDERS",
    "UNEXPECTED_MESSAGE",
    "AccessibleName",
    "Controls",
    "GuardedButton",
    "GuardedCheckbox",
    "GuardedDropdown",
    "GuardedFileUpload",
    "GuardedFloatSlider",
    "GuardedInput",
    "GuardedToggleButtons",
    "SliderSpec",
]

#: Server-side log of what the page must never see (exceptions no check foresaw).
LOG = logging.getLogger("plantside.dashboard")

#: Longest message shown beside a control [characters]; a longer one is shown as an
#: excerpt (its start and end), so nothing a page sends is echoed whole.
MAX_MESSAGE_CHARS = 400

#: Longest uploaded file name accepted [characters] (a file name on the common file
#: systems is at most 255 bytes).
MAX_UPLOAD_NAME_CHARS = 255

#: Shown beside a control when its callback failed in a way no check foresaw.
UNEXPECTED_MESSAGE = (
    "this change could not be handled (the details are in the server's log); "
    "the figures show the last valid result"
)


class GuardedInput:
    """Mixin for an input widget: checks what the page sends before any trait sees it.

    ``input_key`` is the one trait the page may set (``"value"``, or ``"index"``
    for a selection). ``check(raw)`` returns "" to accept the raw value sent, or
    the message that refuses it; a refused value (or any other trait sent, such as
    ``disabled``) changes nothing and the widget's state is sent back, so the page
    shows the value kept.
    """

    input_key: str | None = "value"
    check: Callable[[object], str] | None = None
    refused: Callable[[str], None] | None = None

    def set_state(self, sync_data):
        if not isinstance(sync_data, dict):
            self._refuse(f"expected the control's state, got {excerpt(repr(sync_data), 40)}", {})
            return None
        others = sorted(str(key) for key in sync_data if key != self.input_key)
        if others:
            names = excerpt(", ".join(others), 80)
            message = f"the page may set only this control's value, not {names}"
        elif self.check is not None and self.input_key in sync_data:
            try:
                message = self.check(sync_data[self.input_key])
            except Exception:  # a check that failed refuses; never a traceback to the page
                LOG.exception("checking %s of %s failed", self.input_key, type(self).__name__)
                message = UNEXPECTED_MESSAGE
        else:
            message = ""
        if not message:
            try:
                return super().set_state(sync_data)
            except Exception:  # the callbacks are guarded; this is the trait machinery
                LOG.exception("setting %s of %s failed", self.input_key, type(self).__name__)
                message = UNEXPECTED_MESSAGE
        self._refuse(message, sync_data)
        return None

    def _refuse(self, message: str, sync_data: dict) -> None:
        """Show ``message`` beside the control and send the kept state back to the page."""
        if self.refused is not None:
            self.refused(message)
        keys = [key for key in sync_data if key in self.keys] or (
            [self.input_key] if self.input_key else []
        )
        if keys:
            self.send_state(key=keys)

    def _handle_custom_msg(self, content, buffers):
        """Custom messages: only a button's ``{"event": "click"}``; anything else is dropped."""
        if isinstance(self, widgets.Button) and isinstance(content, dict):
            if content.get("event") == "click" and len(content) == 1:
                return super()._handle_custom_msg(content, buffers)
        return None


class GuardedFloatSlider(GuardedInput, widgets.FloatSlider):
    """A FloatSlider whose page messages are checked first (:class:`GuardedInput`)."""


class GuardedDropdown(GuardedInput, widgets.Dropdown):
    """A Dropdown whose page messages are checked first (the page sends ``index``)."""

    input_key = "index"


class GuardedToggleButtons(GuardedInput, widgets.ToggleButtons):
    """ToggleButtons whose page messages are checked first (the page sends ``index``)."""

    input_key = "index"


class GuardedCheckbox(GuardedInput, widgets.Checkbox):
    """A Checkbox whose page messages are checked first (:class:`GuardedInput`)."""


class GuardedButton(GuardedInput, widgets.Button):
    """A Button the page can only click: no state is taken from the page."""

    input_key = None


class AccessibleName(GuardedInput, anywidget.AnyWidget):
    """Invisible widget in a control's box: names its slider handle or button row.

    ``label`` is the box's visible label; the script (``accessible_names.js``) sets it as
    the ``aria-label`` of the box's slider handle (a ``<div role="slider">`` no
    ``<label>`` can name) and of its toggle-button row, ties them to the box's help
    line (``aria-describedby``), and names the file-upload buttons by their title,
    without ipywidgets' "(0)" counter. The page may set nothing.
    """

    input_key = None
    _esm = Path(__file__).with_name("accessible_names.js")
    label = traitlets.Unicode("").tag(sync=True)


class GuardedFileUpload(GuardedInput, widgets.FileUpload):
    """A FileUpload that takes only one well-formed file from the page.

    The page sends ``value`` as a list of ``{name, type, size, content,
    last_modified}``; anything else (another shape, a name longer than
    :data:`MAX_UPLOAD_NAME_CHARS`, content that is not bytes) is refused before
    ipywidgets reads it.
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.check = upload_problem


def upload_problem(raw) -> str:
    """ "" if ``raw`` is a FileUpload value the page may send (at most one file), else why not."""
    if not isinstance(raw, list | tuple) or len(raw) > 1:
        return "the upload must be one file"
    for item in raw:
        if not isinstance(item, dict) or set(item) != {
            "name",
            "type",
            "size",
            "content",
            "last_modified",
        }:
            return "the upload is not a file"
        name = item["name"]
        if not isinstance(name, str) or not name:
            return "the uploaded file has no name"
        if len(name) > MAX_UPLOAD_NAME_CHARS:
            return (
                f"the file name {excerpt(name, 40)!r} is longer than the "
                f"{MAX_UPLOAD_NAME_CHARS} characters allowed"
            )
        if not isinstance(item["content"], bytes | bytearray | memoryview):
            return "the upload carries no file content"
        if not isinstance(item["type"], str) or len(item["type"]) > MAX_UPLOAD_NAME_CHARS:
            return "the upload's file type is not text"
        for key in ("size", "last_modified"):
            value = item[key]
            if type(value) not in (int, float) or not math.isfinite(value) or value < 0:
                return f"the upload's {key.replace('_', ' ')} is not a number"
            if key == "last_modified" and value > 1e14:  # ms since 1970: beyond year 5000
                return "the upload's last modified time is not a date"
    return ""


@dataclass(frozen=True)
class SliderSpec:
    """A slider's label and its step in each unit system (display units).

    ``quantity`` is a :data:`plantside.units.QUANTITIES` key, ``"percent"``
    (SI value is a fraction 0..1, shown as %) or ``"ratio"`` (shown as is). The
    range is the state's for the air handler shown
    (:meth:`DashboardState.control_range`).
    """

    label: str
    quantity: str
    step_si: float
    step_ip: float
    readout: str = ".1f"
    help: str = ""

    def to_display(self, value_si: float, system: str) -> float:
        if self.quantity == "percent":
            return 100.0 * value_si
        if self.quantity == "ratio":
            return value_si
        return float(to_display(self.quantity, value_si, system)[0])

    def from_display(self, value: float, system: str) -> float:
        if self.quantity == "percent":
            return value / 100.0
        if self.quantity == "ratio":
            return value
        return float(from_display(self.quantity, value, system))

    def unit(self, system: str) -> str:
        if self.quantity == "percent":
            return "%"
        if self.quantity == "ratio":
            return "–"
        return to_display(self.quantity, 0.0, system)[1]

    def limits(self, low_si: float, high_si: float, system: str) -> tuple[float, float, float]:
        """(min, max, step) in display units for the SI range ``low_si``..``high_si``."""
        step = self.step_ip if system == "IP" else self.step_si
        return self.to_display(low_si, system), self.to_display(high_si, system), step


#: The sliders: state field -> spec. Ranges are the state's (what the model accepts).
SLIDERS = {
    "outdoor_air_fraction": SliderSpec(
        "Minimum outdoor-air fraction",
        "percent",
        1.0,
        1.0,
        readout=".0f",
        help="Share of the supply air taken from outdoors at minimum damper position.",
    ),
    "supply_air_temperature": SliderSpec(
        "Supply air temperature",
        "temperature",
        0.5,
        1.0,
        readout=".1f",
        help="Dry bulb leaving the air handler at design (cooling).",
    ),
    "bypass_factor": SliderSpec(
        "Coil bypass factor",
        "ratio",
        0.01,
        0.01,
        readout=".2f",
        help="Share of the air passing the coil as if untouched; sets the apparatus dew point.",
    ),
    "leaving_dew_point": SliderSpec(
        "Coil leaving dew point",
        "temperature",
        0.5,
        1.0,
        readout=".1f",
        help="Dew point the coil holds the air at (then reheated to the supply set point).",
    ),
}


#: Choice controls of one air handler (disabled where they do not apply).
_UNIT_CHOICES = ("economizer", "economizer_integrated")

#: The help line under each control that is not a slider (sliders: ``SliderSpec.help``).
#: The climate's help line is the site's own description.
HELP = {
    "economizer": "The high limit above which outdoor air no longer cools for free.",
    "economizer_integrated": "Integrated: outdoor air keeps cooling while the coil runs.",
    "fan_control": "Constant volume: airflow fixed. VAV: airflow follows the load.",
    "design_percent": "Share of the year's hours above the design condition "
    "(0.4 % = 35 h, 1 % = 88 h, 2 % = 175 h).",
    "unit_system": "Units on show; a view setting, the scenario file keeps its own.",
    "scenario": "Open a scenario file to study your own building.",
    "pin": "Pin freezes these results as A; then move the controls to compare B with it.",
}

#: Numbers the help lines' element ids, unique on the page.
_HELP_IDS = itertools.count(1)


def _label(text: str) -> widgets.HTML:
    return widgets.HTML(value=f"<span class='plantside-label'>{text}</span>")


def _help_html(text: str, element_id: str) -> str:
    if not text:
        return ""
    return f"<div class='plantside-help' id='{element_id}'>{html.escape(text)}</div>"


def _message() -> widgets.HTML:
    return widgets.HTML(value="", layout=widgets.Layout(width="100%"))


def _message_html(text: str) -> str:
    if not text:
        return ""
    shown = html.escape(excerpt(text, MAX_MESSAGE_CHARS))
    return f"<div class='plantside-message' role='alert'>⚠ {shown}</div>"


class MutedCallbacks:
    """Widgets the kernel may change without their callbacks firing (``with self.muted():``);
    every callback returns at once while ``self._muted`` is set."""

    _muted = False

    @contextmanager
    def muted(self):
        """Change widgets from the kernel without their callbacks firing."""
        before, self._muted = self._muted, True
        try:
            yield
        finally:
            self._muted = before


class Controls(MutedCallbacks):
    """All input widgets of one dashboard, wired to one :class:`DashboardState`.

    Attributes
    ----------
    widgets : dict of str to ipywidgets.Widget
        Control name -> the widget the user moves.
    labels, helps, messages : dict of str to ipywidgets.HTML
        Control name -> its label (with unit), its help line and its message area.
    names : dict of str to AccessibleName
        Control name -> the widget that names its slider handle or buttons for a
        screen reader.
    boxes : dict of str to ipywidgets.VBox
        Control name -> label, widget and message stacked.
    """

    def __init__(self, state: DashboardState):
        self.state = state
        self._muted = False
        self.on_scenario_upload: Callable[[str, bytes], None] | None = None
        #: Called after :meth:`show_message` (the dashboard shows messages it lays out).
        self.on_message: Callable[[], None] | None = None
        system = state.inputs.unit_system
        self.widgets: dict[str, widgets.Widget] = {}
        self.labels: dict[str, widgets.HTML] = {}
        self.helps: dict[str, widgets.HTML] = {}
        self.names: dict[str, AccessibleName] = {}
        self.messages: dict[str, widgets.HTML] = {}
        self.boxes: dict[str, widgets.VBox] = {}
        for name, spec in SLIDERS.items():
            low, high, step = self._limits(name, system)
            slider = GuardedFloatSlider(
                value=self._slider_value(name, system, low, high),
                min=low,
                max=high,
                step=step,
                readout_format=spec.readout,
                continuous_update=False,
                description="",
                layout=widgets.Layout(width="96%"),
            )
            slider.add_class(f"plantside-{name.replace('_', '-')}")
            self.widgets[name] = slider
        # selects are named by their description (a <label for>, kept off screen: the box
        # shows the label above); the climate's description is its help line, not a title
        self.widgets["climate"] = GuardedDropdown(
            options=self._climate_options(),
            value=state.inputs.climate,
            description="Climate",
        )
        self.widgets["climate"].add_class("plantside-climate")
        self.widgets["climate"].add_class("plantside-sr-label")
        # the upload buttons show their title (the style sheet hides ipywidgets' "(0)")
        self.widgets["weather_upload"] = GuardedFileUpload(
            accept=".csv,text/csv",
            multiple=False,
            description="Upload hourly CSV",
            tooltip="Upload hourly CSV",
            icon="",
            layout=widgets.Layout(width="auto"),
        )
        self.widgets["weather_upload"].add_class("plantside-weather-upload")
        self.widgets["weather_upload"].add_class("plantside-upload")
        self.widgets["economizer"] = GuardedDropdown(
            options=[(label, key) for key, label in ECONOMIZER_CHOICES.items()],
            value=state.inputs.economizer,
            description="Economizer control",
        )
        self.widgets["economizer"].add_class("plantside-economizer")
        self.widgets["economizer"].add_class("plantside-sr-label")
        self.widgets["economizer_integrated"] = GuardedCheckbox(
            value=state.inputs.economizer_integrated,
            description="Integrated (runs with the cooling coil)",
            indent=False,
        )
        self.widgets["fan_control"] = GuardedToggleButtons(
            options=[(label, key) for key, label in FAN_CHOICES.items()],
            value=state.inputs.fan_control,
            style={"button_width": "auto"},
        )
        self.widgets["fan_control"].add_class("plantside-fan-control")
        self.widgets["design_percent"] = GuardedToggleButtons(
            options=[("0.4 %", 0.4), ("1 %", 1.0), ("2 %", 2.0)],
            value=state.inputs.design_percent,
            style={"button_width": "64px"},
            tooltips=[
                "Exceeded 35 hours a year",
                "Exceeded 88 hours a year",
                "Exceeded 175 hours a year",
            ],
        )
        self.widgets["design_percent"].add_class("plantside-design-percent")
        self.widgets["unit_system"] = GuardedToggleButtons(
            options=[("SI (kW, °C)", "SI"), ("IP (tons, °F)", "IP")],
            value=system,
            style={"button_width": "auto"},
        )
        self.widgets["unit_system"].add_class("plantside-unit-system")
        self.widgets["scenario_upload"] = GuardedFileUpload(
            accept=".toml",
            multiple=False,
            description="Open scenario (TOML)",
            tooltip="Open scenario (TOML)",
            icon="",
            layout=widgets.Layout(width="auto"),
        )
        self.widgets["scenario_upload"].add_class("plantside-scenario-upload")
        self.widgets["scenario_upload"].add_class("plantside-upload")
        self.widgets["pin"] = GuardedButton(
            description="Pin as A", tooltip="Freeze these results to compare with"
        )
        self.widgets["pin"].add_class("plantside-pin")
        self.widgets["unpin"] = GuardedButton(description="Clear A", disabled=True)
        self.widgets["unpin"].add_class("plantside-unpin")

        label_text = {
            "climate": "Climate (bundled fictional site or your hourly CSV)",
            "economizer": "Economizer control",
            "economizer_integrated": "Economizer operation",
            "fan_control": "Supply fan control",
            "design_percent": "Cooling design condition [annual % exceeded]",
            "unit_system": "Units",
            "scenario": "Scenario file [TOML]",
            "pin": "Compare",
        }
        self._label_text = label_text
        self._help_ids: dict[str, str] = {}
        for name in (*SLIDERS, *label_text):
            text = label_text.get(name) or self._slider_label(name, system)
            self.labels[name] = _label(text)
            help_text = SLIDERS[name].help if name in SLIDERS else HELP.get(name, "")
            if name == "climate":
                help_text = self._climate_tooltip(state.inputs.climate)
            help_id = f"plantside-help-{next(_HELP_IDS)}"
            self.helps[name] = widgets.HTML(value=_help_html(help_text, help_id))
            self.helps[name].add_class("plantside-help-line")
            self._help_ids[name] = help_id
            self.names[name] = AccessibleName(label=text)
            self.messages[name] = _message()
            self.messages[name].add_class(f"plantside-message-{name.replace('_', '-')}")
        # the air handler choice is laid out by the dashboard; its message area is here
        self.messages["air_handler"] = _message()
        self.messages["air_handler"].add_class("plantside-message-air-handler")
        self._wire()
        state.listeners.append(lambda _state: self.refresh())
        self.refresh()

    # ------------------------------------------------------------------ layout
    def box(self, name: str) -> widgets.VBox:
        """Label, widget(s) and message of one control, stacked."""
        parts = {
            "climate": [self.widgets["climate"], self.widgets["weather_upload"]],
            "economizer": [self.widgets["economizer"]],
            "economizer_integrated": [self.widgets["economizer_integrated"]],
            "scenario": [self.widgets["scenario_upload"]],
            "pin": [widgets.HBox([self.widgets["pin"], self.widgets["unpin"]])],
        }.get(name, [self.widgets.get(name)])
        box = widgets.VBox(
            [self.labels[name], *parts, self.helps[name], self.messages[name], self.names[name]]
        )
        box.add_class("plantside-control")
        self.boxes[name] = box
        self._show_applicable()
        return box

    def _slider_label(self, name: str, system: str) -> str:
        spec = SLIDERS[name]
        return f"{spec.label} [{spec.unit(system)}]"

    def _slider_value(self, name: str, system: str, low: float, high: float) -> float:
        """What slider ``name`` shows (display units): the state's value, within its range.

        A control with no value for the air handler shown (the leaving dew point of a coil
        that holds none; its box is hidden, the slider disabled) shows the range's low end:
        a slider given no number is not drawn at all on the page (noUiSlider refuses it),
        and stays broken when a unit that has the setting is chosen.
        """
        value = self.state.shown_value(name)
        shown = math.nan if value is None else SLIDERS[name].to_display(value, system)
        return min(max(shown, low), high) if math.isfinite(shown) else low

    def _slider_si(self, name: str, shown: float, system: str) -> float:
        """The SI value of slider ``name`` showing ``shown`` (display units).

        The slider's ends are the state's range converted to the display units; an end
        converted back is the range's end again, not a value off it by round-off
        (74.3 °F back to 23.500000000000004 °C would be refused as outside 23.5 °C).
        """
        widget = self.widgets[name]
        low, high = self.state.control_range(name)
        if shown == widget.min:
            return low
        if shown == widget.max:
            return high
        return SLIDERS[name].from_display(shown, system)

    def _limits(self, name: str, system: str) -> tuple[float, float, float]:
        """A slider's (min, max, step) in display units: the state's range for the unit shown."""
        return SLIDERS[name].limits(*self.state.control_range(name), system)

    # ------------------------------------------------------------------ guards
    def guard(self, name: str, widget: GuardedInput) -> None:
        """Check what the page sends to ``widget`` (control ``name``) before it is taken."""
        widget.check = lambda raw: self._check(name, widget, raw)
        widget.refused = lambda message: self._refused(name, message)

    def _refused(self, name: str, message: str) -> None:
        self.show_message(name, message)

    def show_message(self, name: str, message: str) -> None:
        """Show ``message`` (an excerpt of it) beside control ``name``; never raises."""
        self.state.messages[name] = excerpt(message, MAX_MESSAGE_CHARS)
        try:
            self.refresh()
            if self.on_message is not None:
                self.on_message()
        except Exception:  # the page keeps what it shows; the server log has the cause
            LOG.exception("refreshing the controls after a message for %s failed", name)

    def guarded(self, name: str, callback: Callable) -> Callable:
        """``callback`` run so that nothing it raises reaches the page.

        A :class:`~plantside.errors.PlantsideError` is shown beside control ``name``;
        any other exception is logged on the server (with its traceback) and the
        control shows :data:`UNEXPECTED_MESSAGE`. Every widget callback of the
        dashboard is wrapped in this.
        """

        def run(*args, **kwargs):
            try:
                return callback(*args, **kwargs)
            except PlantsideError as error:
                self.show_message(name, str(error))
            except Exception:
                LOG.exception("dashboard callback for %s failed", name)
                self.show_message(name, UNEXPECTED_MESSAGE)
            return None

        return run

    def _check(self, name: str, widget, raw) -> str:
        """ "" if the raw value the page sent for control ``name`` may be taken, else why not.

        Only the exact JSON type is accepted (a number for a slider, an index for a
        selection, true/false for a checkbox; never a bool for a number), finite,
        inside the widget's range, for a control that applies to the air handler
        shown; then the state's own check (:meth:`DashboardState.validate`).
        """
        state = self.state
        system = state.inputs.unit_system
        label = SLIDERS[name].label if name in SLIDERS else name.replace("_", " ").capitalize()
        if getattr(widget, "disabled", False):
            reason = state.applies(name) if name in SLIDERS or name in _UNIT_CHOICES else ""
            return f"{label} cannot be changed here" + (f": {reason}" if reason else "")
        if isinstance(widget, GuardedFloatSlider):
            if type(raw) not in (int, float) or not math.isfinite(raw):
                return f"{label}: expected a number, got {str(raw)[:40]!r}"
            unit = SLIDERS[name].unit(system)
            unit = "" if unit == "–" else f" {unit}"
            if not widget.min <= raw <= widget.max:
                low, high = (f"{v:{SLIDERS[name].readout}}" for v in (widget.min, widget.max))
                return f"{label} {raw:g}{unit} is outside the allowed {low} to {high}{unit}"
            value = self._slider_si(name, float(raw), system)
        elif isinstance(widget, GuardedCheckbox):
            if type(raw) is not bool:
                return f"{label}: expected on or off, got {str(raw)[:40]!r}"
            value = raw
        else:
            options = widget.options
            if type(raw) is not int or not 0 <= raw < len(options):
                return f"{label}: {str(raw)[:40]!r} is not one of the {len(options)} choices"
            value = options[raw][1] if isinstance(options[raw], tuple) else options[raw]
        try:
            state.validate(name, value)
        except PlantsideError as error:
            return display_text(str(error), system)
        return ""

    def _climate_options(self):
        options = []
        for name in self.state.climate_choices():
            if name in self.state.uploaded:
                options.append((name, name))
            else:
                options.append((f"{name} (fictional)", name))
        return options

    # ------------------------------------------------------------------ wiring
    def _wire(self):
        for name in (
            *SLIDERS,
            "climate",
            "economizer",
            "economizer_integrated",
            "fan_control",
            "design_percent",
            "unit_system",
        ):
            self.guard(name, self.widgets[name])
        for widget, name in (
            ("weather_upload", "climate"),
            ("scenario_upload", "scenario"),
            ("pin", "pin"),
            ("unpin", "pin"),
        ):
            self.widgets[widget].refused = lambda message, n=name: self._refused(n, message)
        guarded = self.guarded
        for name in SLIDERS:
            self.widgets[name].observe(guarded(name, self._slider_callback(name)), names="value")
        for name in ("climate", "economizer", "economizer_integrated", "fan_control"):
            self.widgets[name].observe(guarded(name, self._choice_callback(name)), names="value")
        self.widgets["design_percent"].observe(
            guarded("design_percent", self._choice_callback("design_percent")), names="value"
        )
        self.widgets["unit_system"].observe(
            guarded("unit_system", self._on_unit_system), names="value"
        )
        self.widgets["weather_upload"].observe(
            guarded("climate", self._on_weather_upload), names="value"
        )
        self.widgets["scenario_upload"].observe(
            guarded("scenario", self._on_scenario_upload), names="value"
        )
        self.widgets["pin"].on_click(guarded("pin", lambda _: self._pin(True)))
        self.widgets["unpin"].on_click(guarded("pin", lambda _: self._pin(False)))

    def _slider_callback(self, name: str):
        spec = SLIDERS[name]

        def callback(change):
            if self._muted:
                return
            system = self.state.inputs.unit_system
            try:
                value_si = self._slider_si(name, float(change["new"]), system)
            except (TypeError, ValueError):
                self.state.messages[name] = f"{spec.label}: not a number"
                self.refresh()
                return
            step = self._limits(name, system)[2]
            step_si = abs(spec.from_display(step, system) - spec.from_display(0.0, system))
            if abs(value_si - self.state.shown_value(name)) < 0.5 * step_si - 1e-12:
                # the page snapped a converted value to the slider's step: keep the exact
                # value, and show it (a value sent off the step must not stay on show)
                self.refresh()
                return
            self.state.set(name, value_si)

        return callback

    def _choice_callback(self, name: str):
        def callback(change):
            if self._muted:
                return
            self.state.set(name, change["new"])

        return callback

    def _on_unit_system(self, change):
        if self._muted:
            return
        self.state.set("unit_system", change["new"])

    @staticmethod
    def _first_file(value):
        """(name, bytes) of the first file of a FileUpload value, or None if malformed."""
        if not isinstance(value, list | tuple) or not value:
            return None
        item = value[0]
        try:
            name = str(item["name"])
            content = item["content"]
            data = content.tobytes() if hasattr(content, "tobytes") else bytes(content)
        except (KeyError, TypeError, ValueError):
            return None
        return name, data

    def _on_weather_upload(self, change):
        if self._muted:
            return
        upload = self._first_file(change["new"])
        if upload is None:
            return
        name, data = upload
        self.state.add_weather_file(name, data)
        with self.muted():
            self.widgets["climate"].options = self._climate_options()
        self.refresh()
        with self.muted():
            self.widgets["weather_upload"].value = ()

    def _on_scenario_upload(self, change):
        if self._muted:
            return
        upload = self._first_file(change["new"])
        if upload is None:
            return
        if self.on_scenario_upload is not None:
            self.on_scenario_upload(*upload)
        with self.muted():
            self.widgets["scenario_upload"].value = ()
        self.refresh()

    def _pin(self, pin: bool):
        if pin:
            self.state.pin()
        else:
            self.state.unpin()

    # ----------------------------------------------------------------- refresh
    def refresh(self):
        """Show the state: values (in the current units), labels, ranges, messages."""
        state = self.state
        system = state.inputs.unit_system
        with self.muted():
            for name in SLIDERS:
                slider = self.widgets[name]
                low, high, step = self._limits(name, system)
                shown = self._slider_value(name, system, low, high)
                with slider.hold_sync():
                    if (slider.min, slider.max, slider.step) != (low, high, step):
                        slider.max = max(high, slider.min)
                        slider.min = low
                        slider.max = high
                        slider.step = step
                    if not abs(slider.value - shown) <= 1e-9:  # also replaces a NaN
                        slider.value = shown
                text = self._slider_label(name, system)
                self.labels[name].value = _label(text).value
                self.names[name].label = text
            options = self._climate_options()
            if list(self.widgets["climate"].options) != options:
                self.widgets["climate"].options = options
            self.widgets["climate"].value = state.inputs.climate
            help_text = self._climate_tooltip(state.inputs.climate)
            help_html = _help_html(help_text, self._help_ids["climate"])
            if self.helps["climate"].value != help_html:
                self.helps["climate"].value = help_html
            for name in ("economizer", "economizer_integrated", "fan_control", "design_percent"):
                if self.widgets[name].value != getattr(state.inputs, name):
                    self.widgets[name].value = getattr(state.inputs, name)
            self.widgets["unit_system"].value = system
            self.widgets["unpin"].disabled = state.pinned is None
            self._show_applicable()
        for name, area in self.messages.items():
            area.value = _message_html(display_text(state.messages.get(name, ""), system))

    def _show_applicable(self) -> None:
        """Disable the controls that do not apply to the air handler shown, saying why.

        The leaving dew point is shown only for a coil that holds one. A unit with no
        economizer (100 % outdoor air) shows no economizer choice at all: one line says
        it has none, and the economizer-operation box is hidden.
        """
        state = self.state
        for name in (*SLIDERS, *_UNIT_CHOICES):
            reason = state.applies(name)
            self.widgets[name].disabled = bool(reason)
            if name == "leaving_dew_point" and name in self.boxes:
                self.boxes[name].layout.display = "none" if reason else None
            if name in _UNIT_CHOICES:
                self._show_economizer(name, reason)
                continue
            if name not in self.labels:
                continue
            if reason:
                text = f"{SLIDERS[name].label}: not used ({reason})"
                self.labels[name].value = _label(text).value
                self.names[name].label = text

    def _show_economizer(self, name: str, reason: str) -> None:
        """Economizer choice ``name`` shown, or hidden with a line saying the unit has none."""
        self.widgets[name].layout.display = "none" if reason else None
        self.helps[name].layout.display = "none" if reason else None
        if name == "economizer_integrated" and name in self.boxes:
            self.boxes[name].layout.display = "none" if reason else None
        if reason:
            text = f"Economizer: none. {reason[:1].upper()}{reason[1:]}."
        else:
            text = self._label_text[name]
        self.labels[name].value = _label(text).value
        self.names[name].label = text

    @staticmethod
    def _climate_tooltip(climate: str) -> str:
        try:
            return bundled_climate_description(climate)
        except Exception:  # an uploaded file has no bundled description
            return climate
