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

What the page sends is checked before any widget trait sees it
(:class:`GuardedInput`): ipywidgets would otherwise coerce it (``true`` to 1,
``"1_0"`` to 10) or clamp it to the slider's range. A refused value leaves
the widget as it was, is pushed back to the page and its message is shown
beside the control.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from contextlib import contextmanager
from dataclasses import dataclass

import ipywidgets as widgets

from plantside.climate.bundled import bundled_climate_description
from plantside.dashboard.state import ECONOMIZER_CHOICES, FAN_CHOICES, DashboardState, display_text
from plantside.errors import PlantsideError
from plantside.units import from_display, to_display

__all__ = [
    "SLIDERS",
    "Controls",
    "GuardedCheckbox",
    "GuardedDropdown",
    "GuardedFloatSlider",
    "GuardedInput",
    "GuardedToggleButtons",
    "SliderSpec",
]


class GuardedInput:
    """Mixin for an input widget: checks what the page sends before any trait sees it.

    ``input_key`` is the one trait the page may set (``"value"``, or ``"index"``
    for a selection). ``check(raw)`` returns "" to accept the raw value sent, or
    the message that refuses it; a refused value (or any other trait sent, such as
    ``disabled``) changes nothing and the widget's state is sent back, so the page
    shows the value kept.
    """

    input_key = "value"
    check: Callable[[object], str] | None = None

    def set_state(self, sync_data):
        others = sorted(key for key in sync_data if key != self.input_key)
        if others:
            message = f"the page may set only this control's value, not {', '.join(others)}"
        elif self.check is not None and self.input_key in sync_data:
            message = self.check(sync_data[self.input_key])
        else:
            message = ""
        if not message:
            return super().set_state(sync_data)
        if self.refused is not None:
            self.refused(message)
        self.send_state(key=[key for key in sync_data if key in self.keys])
        return None

    refused: Callable[[str], None] | None = None


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


def _label(text: str) -> widgets.HTML:
    return widgets.HTML(value=f"<span class='plantside-label'>{text}</span>")


def _message() -> widgets.HTML:
    return widgets.HTML(value="", layout=widgets.Layout(width="100%"))


def _message_html(text: str) -> str:
    if not text:
        return ""
    import html

    return f"<div class='plantside-message' role='alert'>⚠ {html.escape(text)}</div>"


class Controls:
    """All input widgets of one dashboard, wired to one :class:`DashboardState`.

    Attributes
    ----------
    widgets : dict of str to ipywidgets.Widget
        Control name -> the widget the user moves.
    labels, messages : dict of str to ipywidgets.HTML
        Control name -> its label (with unit) and its message area.
    boxes : dict of str to ipywidgets.VBox
        Control name -> label, widget and message stacked.
    """

    def __init__(self, state: DashboardState):
        self.state = state
        self._muted = False
        self.on_scenario_upload: Callable[[str, bytes], None] | None = None
        system = state.inputs.unit_system
        self.widgets: dict[str, widgets.Widget] = {}
        self.labels: dict[str, widgets.HTML] = {}
        self.messages: dict[str, widgets.HTML] = {}
        self.boxes: dict[str, widgets.VBox] = {}
        for name, spec in SLIDERS.items():
            low, high, step = self._limits(name, system)
            slider = GuardedFloatSlider(
                value=min(max(spec.to_display(state.shown_value(name), system), low), high),
                min=low,
                max=high,
                step=step,
                readout_format=spec.readout,
                continuous_update=False,
                description="",
                tooltip=spec.help,
                layout=widgets.Layout(width="96%"),
            )
            slider.add_class(f"plantside-{name.replace('_', '-')}")
            self.widgets[name] = slider
        self.widgets["climate"] = GuardedDropdown(
            options=self._climate_options(), value=state.inputs.climate, description=""
        )
        self.widgets["climate"].add_class("plantside-climate")
        self.widgets["weather_upload"] = widgets.FileUpload(
            accept=".csv,text/csv",
            multiple=False,
            description="Upload hourly CSV",
            icon="",
            layout=widgets.Layout(width="auto"),
        )
        self.widgets["weather_upload"].add_class("plantside-weather-upload")
        self.widgets["economizer"] = GuardedDropdown(
            options=[(label, key) for key, label in ECONOMIZER_CHOICES.items()],
            value=state.inputs.economizer,
        )
        self.widgets["economizer"].add_class("plantside-economizer")
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
        self.widgets["scenario_upload"] = widgets.FileUpload(
            accept=".toml",
            multiple=False,
            description="Open scenario (TOML)",
            icon="",
            layout=widgets.Layout(width="auto"),
        )
        self.widgets["scenario_upload"].add_class("plantside-scenario-upload")
        self.widgets["pin"] = widgets.Button(
            description="Pin as A", tooltip="Freeze these results to compare with"
        )
        self.widgets["pin"].add_class("plantside-pin")
        self.widgets["unpin"] = widgets.Button(description="Clear A", disabled=True)
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
        for name in (*SLIDERS, *label_text):
            text = label_text.get(name) or self._slider_label(name, system)
            self.labels[name] = _label(text)
            self.messages[name] = _message()
            self.messages[name].add_class(f"plantside-message-{name.replace('_', '-')}")
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
        box = widgets.VBox([self.labels[name], *parts, self.messages[name]])
        box.add_class("plantside-control")
        self.boxes[name] = box
        self._show_applicable()
        return box

    def _slider_label(self, name: str, system: str) -> str:
        spec = SLIDERS[name]
        return f"{spec.label} [{spec.unit(system)}]"

    def _limits(self, name: str, system: str) -> tuple[float, float, float]:
        """A slider's (min, max, step) in display units: the state's range for the unit shown."""
        return SLIDERS[name].limits(*self.state.control_range(name), system)

    # ------------------------------------------------------------------ guards
    def guard(self, name: str, widget: GuardedInput) -> None:
        """Check what the page sends to ``widget`` (control ``name``) before it is taken."""
        widget.check = lambda raw: self._check(name, widget, raw)
        widget.refused = lambda message: self._refused(name, message)

    def _refused(self, name: str, message: str) -> None:
        self.state.messages[name] = message
        self.refresh()

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
            value = SLIDERS[name].from_display(float(raw), system)
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
    @contextmanager
    def muted(self):
        """Change widgets from the kernel without their callbacks firing."""
        before, self._muted = self._muted, True
        try:
            yield
        finally:
            self._muted = before

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
        for name in SLIDERS:
            self.widgets[name].observe(self._slider_callback(name), names="value")
        for name in ("climate", "economizer", "economizer_integrated", "fan_control"):
            self.widgets[name].observe(self._choice_callback(name), names="value")
        self.widgets["design_percent"].observe(self._choice_callback("design_percent"), "value")
        self.widgets["unit_system"].observe(self._on_unit_system, names="value")
        self.widgets["weather_upload"].observe(self._on_weather_upload, names="value")
        self.widgets["scenario_upload"].observe(self._on_scenario_upload, names="value")
        self.widgets["pin"].on_click(lambda _: self._pin(True))
        self.widgets["unpin"].on_click(lambda _: self._pin(False))

    def _slider_callback(self, name: str):
        spec = SLIDERS[name]

        def callback(change):
            if self._muted:
                return
            system = self.state.inputs.unit_system
            try:
                value_si = spec.from_display(float(change["new"]), system)
            except (TypeError, ValueError):
                self.state.messages[name] = f"{spec.label}: not a number"
                self.refresh()
                return
            step = self._limits(name, system)[2]
            step_si = abs(spec.from_display(step, system) - spec.from_display(0.0, system))
            if abs(value_si - self.state.shown_value(name)) < 0.5 * step_si - 1e-12:
                # the page snapped a converted value to the slider's step: keep the exact value
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
            for name, spec in SLIDERS.items():
                slider = self.widgets[name]
                low, high, step = self._limits(name, system)
                shown = spec.to_display(state.shown_value(name), system)
                with slider.hold_sync():
                    if (slider.min, slider.max, slider.step) != (low, high, step):
                        slider.max = max(high, slider.min)
                        slider.min = low
                        slider.max = high
                        slider.step = step
                    shown = min(max(shown, low), high)
                    if not abs(slider.value - shown) <= 1e-9:  # also replaces a NaN
                        slider.value = shown
                self.labels[
                    name
                ].value = f"<span class='plantside-label'>{self._slider_label(name, system)}</span>"
            options = self._climate_options()
            if list(self.widgets["climate"].options) != options:
                self.widgets["climate"].options = options
            self.widgets["climate"].value = state.inputs.climate
            self.widgets["climate"].tooltip = self._climate_tooltip(state.inputs.climate)
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

        The leaving dew point is shown only for a coil that holds one.
        """
        state = self.state
        for name in (*SLIDERS, *_UNIT_CHOICES):
            reason = state.applies(name)
            self.widgets[name].disabled = bool(reason)
            if name == "leaving_dew_point" and name in self.boxes:
                self.boxes[name].layout.display = "none" if reason else None
            if name not in self.labels:
                continue
            if reason:
                title = SLIDERS[name].label if name in SLIDERS else self._label_text[name]
                text = f"{title}: not used ({reason})"
                self.labels[name].value = _label(text).value
            elif name in _UNIT_CHOICES:
                self.labels[name].value = _label(self._label_text[name]).value

    @staticmethod
    def _climate_tooltip(climate: str) -> str:
        try:
            return bundled_climate_description(climate)
        except Exception:  # an uploaded file has no bundled description
            return climate
