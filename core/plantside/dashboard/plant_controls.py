"""The plant page's own controls: the plant option shown and the sizing margins.

:class:`PlantControls` holds four guarded widgets (:mod:`plantside.dashboard.controls`):
the cooling and heating plant option (a select each: which of the scenario's options
the stage lines, the staging table and the efficiency chart draw) and the cooling and
heating sizing margin (a slider each, [%]: design capacity = design load x (1 + margin /
100)). What the page sends is checked before it is taken (exact type, range, the
state's own :meth:`~plantside.dashboard.state.DashboardState.validate`); a refused value
is sent back and the message shows beside the control. The margins are saved with the
scenario; the option shown is a view setting, named in every stamp.
"""

from __future__ import annotations

import html
import itertools
import math
from collections.abc import Callable

import ipywidgets as widgets

from plantside.dashboard.controls import (
    AccessibleName,
    GuardedDropdown,
    GuardedFloatSlider,
    GuardedInput,
    MutedCallbacks,
)
from plantside.dashboard.state import display_text
from plantside.dashboard.state_inputs import PLANT_CONTROLS
from plantside.errors import PlantsideError

__all__ = ["PLANT_CONTROL_LABELS", "PlantControls"]

#: Each plant control's label and help line.
PLANT_CONTROL_LABELS = {
    "cooling_option": (
        "Cooling plant option shown",
        "The scenario's chiller arrangements: the stage lines, staging and efficiency "
        "charts draw this one.",
    ),
    "cooling_margin_percent": (
        "Cooling sizing margin [%]",
        "Design capacity = design plant load × (1 + margin / 100); saved with the scenario.",
    ),
    "heating_option": (
        "Heating plant option shown",
        "The scenario's boiler arrangements: the heating staging draws this one.",
    ),
    "heating_margin_percent": (
        "Heating sizing margin [%]",
        "Heating design capacity = heating design load × (1 + margin / 100); saved.",
    ),
}


#: Numbers the help lines' element ids, unique on the page (a slider handle and a select
#: are described by their help line, ``aria-describedby``).
_HELP_IDS = itertools.count(1)


def _message_html(text: str) -> str:
    if not text:
        return ""
    return f"<div class='plantside-message' role='alert'>⚠ {html.escape(text[:400])}</div>"


class PlantControls(MutedCallbacks):
    """Option choosers and margin sliders of the plant, wired to one dashboard state.

    Parameters
    ----------
    state : DashboardState
    guarded : callable
        ``guarded(name, callback)``: the dashboard's wrapper that keeps any exception of a
        callback off the page (:meth:`~plantside.dashboard.controls.Controls.guarded`).

    Attributes
    ----------
    widgets, messages, boxes : dict of str to ipywidgets.Widget
        Control name (:data:`~plantside.dashboard.state_inputs.PLANT_CONTROLS`) -> its
        widget, its message area and its box (label, widget, help line, message).
    """

    def __init__(self, state, guarded: Callable[[str, Callable], Callable]):
        self.state = state
        self._muted = False
        self.widgets: dict[str, widgets.Widget] = {}
        self.messages: dict[str, widgets.HTML] = {}
        self.boxes: dict[str, widgets.VBox] = {}
        for kind in ("cooling", "heating"):
            name = f"{kind}_option"
            choice = GuardedDropdown(
                options=self._options(kind),
                value=getattr(state.inputs, name),
                description=PLANT_CONTROL_LABELS[name][0],  # its <label for>, off screen
            )
            choice.add_class("plantside-sr-label")
            self.widgets[name] = choice
            name = f"{kind}_margin_percent"
            self.widgets[name] = GuardedFloatSlider(
                value=getattr(state.inputs, name),
                min=0.0,
                max=state.margin_max(kind),
                step=1.0,
                readout_format=".0f",
                continuous_update=False,
                layout=widgets.Layout(width="96%"),
            )
        for name in PLANT_CONTROLS:
            widget = self.widgets[name]
            widget.add_class(f"plantside-{name.replace('_', '-')}")
            widget.check = lambda raw, n=name: self._check(n, raw)
            widget.refused = lambda message, n=name: self._show(n, message)
            widget.observe(guarded(name, self._callback(name)), names="value")
            label, help_text = PLANT_CONTROL_LABELS[name]
            self.messages[name] = widgets.HTML(layout=widgets.Layout(width="100%"))
            self.messages[name].add_class(f"plantside-message-{name.replace('_', '-')}")
            parts = [
                widgets.HTML(f"<span class='plantside-label'>{html.escape(label)}</span>"),
                widget,
                widgets.HTML(
                    f"<div class='plantside-help' id='plantside-plant-help-{next(_HELP_IDS)}'>"
                    f"{html.escape(help_text)}</div>"
                ),
                self.messages[name],
                AccessibleName(label=label),  # names a slider's handle, ties the help line
            ]
            box = widgets.VBox(parts)
            box.add_class("plantside-control")
            self.boxes[name] = box
        state.listeners.append(lambda _state: self.refresh())

    def _options(self, kind: str) -> list[tuple[str, int]]:
        return [(name, i) for i, name in enumerate(self.state.option_names(kind))]

    def _callback(self, name: str):
        def callback(change):
            if self._muted:
                return
            self.state.set(name, change["new"])

        return callback

    def _check(self, name: str, raw) -> str:
        """ "" when the raw value the page sent for ``name`` may be taken, else why not."""
        widget: GuardedInput = self.widgets[name]
        label = PLANT_CONTROL_LABELS[name][0]
        if isinstance(widget, GuardedFloatSlider):
            if type(raw) not in (int, float) or not math.isfinite(raw):
                return f"{label}: expected a number, got {str(raw)[:40]!r}"
            value = float(raw)
        else:
            options = widget.options
            if type(raw) is not int or not 0 <= raw < len(options):
                return f"{label}: {str(raw)[:40]!r} is not one of the {len(options)} choices"
            value = options[raw][1]
        try:
            self.state.validate(name, value)
        except PlantsideError as error:
            return str(error)
        return ""

    def _show(self, name: str, message: str) -> None:
        self.state.messages[name] = message
        self.refresh()

    def refresh(self) -> None:
        """Show the state's values, the scenario's options and the messages."""
        state = self.state
        with self.muted():
            for kind in ("cooling", "heating"):
                choice = self.widgets[f"{kind}_option"]
                options = self._options(kind)
                if list(choice.options) != options:
                    choice.options = options
                if choice.value != getattr(state.inputs, f"{kind}_option"):
                    choice.value = getattr(state.inputs, f"{kind}_option")
                slider = self.widgets[f"{kind}_margin_percent"]
                high = state.margin_max(kind)
                value = getattr(state.inputs, f"{kind}_margin_percent")
                with slider.hold_sync():
                    if slider.max != high:
                        slider.max = high
                    if not abs(slider.value - value) <= 1e-9:
                        slider.value = value
        system = state.inputs.unit_system
        for name, area in self.messages.items():
            text = _message_html(display_text(state.messages.get(name, ""), system))
            if area.value != text:
                area.value = text
