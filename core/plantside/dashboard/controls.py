"""The dashboard's controls: widgets in the trade's words, each with a message area.

:class:`Controls` builds one widget per input of
:class:`~plantside.dashboard.state.DashboardState`, labels it with its unit,
puts a message area under it and wires it to the state. Callbacks are small:
convert the shown value to SI, hand it to :meth:`DashboardState.set` (which
validates it: any visitor of a served page can send widget messages) and
show the messages. When the unit system changes, sliders switch range, step
and label and show the state's value converted, so nothing is lost to a
round trip through the other unit system.
"""

from __future__ import annotations

from collections.abc import Callable
from contextlib import contextmanager
from dataclasses import dataclass

import ipywidgets as widgets

from plantside.climate.bundled import bundled_climate_description
from plantside.dashboard.state import ECONOMIZER_CHOICES, FAN_CHOICES, DashboardState, display_text
from plantside.units import from_display, to_display

__all__ = ["SLIDERS", "Controls", "SliderSpec"]


@dataclass(frozen=True)
class SliderSpec:
    """A slider's label and its range in each unit system (display units).

    ``quantity`` is a :data:`plantside.units.QUANTITIES` key, ``"percent"``
    (SI value is a fraction 0..1, shown as %) or ``"ratio"`` (shown as is).
    """

    label: str
    quantity: str
    si: tuple[float, float, float]
    ip: tuple[float, float, float]
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

    def limits(self, system: str) -> tuple[float, float, float]:
        return self.ip if system == "IP" else self.si


#: The sliders: state field -> spec. Ranges stay inside what the state accepts.
SLIDERS = {
    "outdoor_air_fraction": SliderSpec(
        "Minimum outdoor-air fraction",
        "percent",
        (0.0, 100.0, 1.0),
        (0.0, 100.0, 1.0),
        readout=".0f",
        help="Share of the supply air taken from outdoors at minimum damper position.",
    ),
    "supply_air_temperature": SliderSpec(
        "Supply air temperature",
        "temperature",
        (6.0, 18.0, 0.5),
        (43.0, 64.0, 1.0),
        readout=".1f",
        help="Dry bulb leaving the air handler at design (cooling).",
    ),
    "bypass_factor": SliderSpec(
        "Coil bypass factor",
        "ratio",
        (0.0, 0.30, 0.01),
        (0.0, 0.30, 0.01),
        readout=".2f",
        help="Share of the air passing the coil as if untouched; sets the apparatus dew point.",
    ),
}


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
        for name, spec in SLIDERS.items():
            low, high, step = spec.limits(system)
            slider = widgets.FloatSlider(
                value=min(max(spec.to_display(getattr(state.inputs, name), system), low), high),
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
        self.widgets["climate"] = widgets.Dropdown(
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
        self.widgets["economizer"] = widgets.Dropdown(
            options=[(label, key) for key, label in ECONOMIZER_CHOICES.items()],
            value=state.inputs.economizer,
        )
        self.widgets["economizer"].add_class("plantside-economizer")
        self.widgets["economizer_integrated"] = widgets.Checkbox(
            value=state.inputs.economizer_integrated,
            description="Integrated (runs with the cooling coil)",
            indent=False,
        )
        self.widgets["fan_control"] = widgets.ToggleButtons(
            options=[(label, key) for key, label in FAN_CHOICES.items()],
            value=state.inputs.fan_control,
            style={"button_width": "auto"},
        )
        self.widgets["fan_control"].add_class("plantside-fan-control")
        self.widgets["design_percent"] = widgets.ToggleButtons(
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
        self.widgets["unit_system"] = widgets.ToggleButtons(
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
        return box

    def _slider_label(self, name: str, system: str) -> str:
        spec = SLIDERS[name]
        return f"{spec.label} [{spec.unit(system)}]"

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
            step = spec.limits(system)[2]
            step_si = abs(spec.from_display(step, system) - spec.from_display(0.0, system))
            if abs(value_si - getattr(self.state.inputs, name)) < 0.5 * step_si - 1e-12:
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
                low, high, step = spec.limits(system)
                shown = spec.to_display(getattr(state.inputs, name), system)
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
            all_outdoor = bool(
                state.scenario.air_handlers[state.inputs.air_handler].settings.all_outdoor_air
            )
            for name in ("outdoor_air_fraction", "economizer", "economizer_integrated"):
                self.widgets[name].disabled = all_outdoor
            if all_outdoor:
                self.labels["outdoor_air_fraction"].value = (
                    "<span class='plantside-label'>Outdoor-air fraction [%]: 100 % outdoor-air "
                    "unit (no return air, no economizer)</span>"
                )
        for name, area in self.messages.items():
            area.value = _message_html(display_text(state.messages.get(name, ""), system))

    @staticmethod
    def _climate_tooltip(climate: str) -> str:
        try:
            return bundled_climate_description(climate)
        except Exception:  # an uploaded file has no bundled description
            return climate
