"""The dashboard's one state object: inputs, validation, results, pinned "A".

:class:`DashboardState` holds what the user set (the *inputs*, in SI, kept
exactly as set, even when the model refuses them), the last valid result, the
result pinned as "A" and one message per control. Widgets never compute: they
call :meth:`DashboardState.set`, which

1. validates the value (type, allowed set or range): any visitor of a served
   page can send widget messages, so nothing from the page is trusted;
2. recomputes only what the control affects:

   =============================  ==============================================
   control                        recomputed
   =============================  ==============================================
   climate                        weather, design conditions, every air
                                  handler's design points and hourly year
   design condition (0.4/1/2 %)   every air handler's design points and
                                  outdoor-air sweep; not the hourly years
   an air-handler control         that air handler's design points, sweep and
   (outdoor air, supply air,      hourly year; the others are reused
   economizer, fan, coil)
   air handler shown              nothing (the controls show its values)
   unit system                    nothing (display only)
   =============================  ==============================================

   The plant figures (sums of the air handlers) are rebuilt every time; they
   are sums of arrays already computed.
3. on a model error keeps the last valid result, puts the message beside the
   control it concerns and keeps the input, so fixing that one control
   recovers.

A control that does not apply to an air handler (the economizer of a 100 %
outdoor-air unit, the bypass factor of a coil set by its apparatus dew point,
the leaving dew point of a bypass-factor coil) is refused for it
(:meth:`DashboardState.applies`); a control never changes a setting the page
does not show (moving the bypass factor keeps the coil model).

A state shows one of two *views*: ``"air_handler"`` (headline figures and
charts of the air handler chosen) or ``"plant"`` (of the whole plant: the
coincident sum of every air handler's coil load plus the distribution gain).

Everything here is SI (kW, kWh, °C, kg/kg); the unit system is only carried
for display.

The state's parts live in their own modules, re-exported here:
:mod:`~plantside.dashboard.state_inputs` (the inputs, which controls apply, their
ranges, the validation of a value), :mod:`~plantside.dashboard.state_results` (the
recompute and the assembly of results) and :mod:`~plantside.dashboard.state_messages`
(which control a model error is shown beside, and the display text of messages). This
module holds the update itself (:meth:`DashboardState.set`), uploads, scenarios loaded
and saved, and the pinned "A".
"""

from __future__ import annotations

import io
import time
from collections.abc import Callable
from dataclasses import replace

from plantside.charts.labels import ECONOMIZER_CHOICES, FAN_CHOICES, condition_text
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.climate.weather import Weather
from plantside.climate.weather_csv import read_weather_csv
from plantside.dashboard.state_inputs import (
    _HIDDEN_FIELDS,
    CONTROLS,
    UNIT_CONTROLS,
    ControlRules,
    DashboardInputs,
    UnitInputs,
)
from plantside.dashboard.state_messages import _FIELD_TO_CONTROL, ControlMessages
from plantside.dashboard.state_results import (
    ClimatePart,
    DashboardResult,
    DesignPart,
    ResultAssembly,
    UnitResult,
)
from plantside.errors import InputFileError, InputRangeError, PlantsideError
from plantside.study.design_sweep import DESIGN_KINDS
from plantside.study.figures import PART_LOAD_THRESHOLD, HeadlineFigures, climate_label
from plantside.study.scenario import Scenario
from plantside.units import UnitSystem, UnitText, display_text

__all__ = [
    "CONTROLS",
    "DESIGN_KINDS",
    "ECONOMIZER_CHOICES",
    "FAN_CHOICES",
    "MAX_UPLOAD_BYTES",
    "PART_LOAD_THRESHOLD",
    "UNIT_CONTROLS",
    "ClimatePart",
    "DashboardInputs",
    "DashboardResult",
    "DashboardState",
    "DesignPart",
    "HeadlineFigures",
    "UnitInputs",
    "UnitResult",
    "UnitText",
    "condition_text",
    "display_text",
]


#: Largest weather CSV accepted from the page [bytes] (an 8,784-hour year is ~300 kB).
MAX_UPLOAD_BYTES = 5 * 1024 * 1024
#: Prefix of the climate value of an uploaded weather file.
UPLOAD_PREFIX = "upload: "


class DashboardState(ControlRules, ControlMessages, ResultAssembly):
    """Inputs, last valid result, pinned result and messages of one dashboard.

    Parameters
    ----------
    scenario : plantside.study.scenario.Scenario
        The study: site, air handlers with their zone loads, plant options.
    view : {"air_handler", "plant"}
        What the headline figures and the load charts describe.
    air_handler : int
        Index of the air handler the controls show first.

    Attributes
    ----------
    inputs : DashboardInputs
        What the user set (kept even when the model refuses it).
    result : DashboardResult
        The last valid result (the charts show it).
    pinned : DashboardResult or None
        The result pinned as "A".
    messages : dict of str to str
        Control name -> message shown beside it ("" when fine). Besides the
        controls, ``"scenario"`` and ``"export"`` carry file messages.
    last_update : dict
        What the last change did: ``control``, ``recomputed`` (air-handler
        indices whose year was recomputed), ``seconds`` of kernel time, ``ok``.
    listeners : list of callables
        Called with the state after every change (the app redraws).
    """

    def __init__(self, scenario: Scenario, view: str = "air_handler", air_handler: int = 0):
        if view not in ("air_handler", "plant"):
            raise InputRangeError("view", f"view = {view!r}", "'air_handler' or 'plant'")
        self.view = view
        self.messages: dict[str, str] = dict.fromkeys((*CONTROLS, "scenario", "export"), "")
        self.listeners: list[Callable[[DashboardState], None]] = []
        self.last_update: dict = {}
        self.uploaded: dict[str, Weather] = {}
        self._climates: dict[str, ClimatePart] = {}
        self.pinned: DashboardResult | None = None
        self._pinned_view: tuple | None = None
        self._start(scenario, air_handler)

    def _start(self, scenario: Scenario, air_handler: int = 0):
        """Take a scenario: its air handlers, plant and first control values."""
        self.scenario = scenario
        count = len(scenario.air_handlers)
        index = int(air_handler) if 0 <= int(air_handler) < count else 0
        climate = climate_label(scenario)
        if scenario.climate is None:  # a weather file named by a scenario read from disk
            self.uploaded.setdefault(climate, scenario.load_weather())
        self.inputs = DashboardInputs(
            units=tuple(UnitInputs.from_settings(spec.settings) for spec in scenario.air_handlers),
            air_handler=index,
            design_percent=float(scenario.cooling_design_percent),
            climate=climate,
            unit_system=UnitSystem.parse(scenario.unit_system).value,
            cooling_margin_percent=float(scenario.cooling_margin_percent),
            heating_margin_percent=float(scenario.heating_margin_percent),
        )
        self._zone_loads: dict[tuple[str, int], object] = {}
        self._climates = {}  # placed at this scenario's site (the sun on glazed zones)
        self._check_scenario_controls()
        self.result = self._compute(self.inputs, None, "all")

    # ------------------------------------------------------------------ update
    def set(self, control: str, value) -> bool:
        """Set one control and recompute what it affects. True when the results are valid.

        A value of the wrong type or outside the control's range is refused:
        the input keeps its previous value and the message says why. A value
        the model cannot compute with (e.g. a supply temperature the coil
        cannot reach with this bypass factor) is kept as the input; the last
        valid result stays on show with the message beside the control.
        """
        start = time.perf_counter()
        try:
            clean = self.validate(control, value)
        except PlantsideError as error:
            self.messages[control] = str(error)
            self._record(control, (), start, ok=False)
            return False
        self.inputs = self.inputs.with_control(control, clean)
        self.messages[control] = ""
        if CONTROLS[control] == "view":
            shown = self.result
            self.result = self._assemble(
                replace(shown.inputs, air_handler=clean), shown.climate, shown.units
            )
        if CONTROLS[control] in ("none", "view") and not self._failing():
            self._record(control, (), start, ok=True)
            return True
        return self._recompute(control, start)

    def _failing(self) -> bool:
        return any(self.messages[name] for name in CONTROLS)

    def _recompute(self, control: str, start: float) -> bool:
        try:
            result = self._compute(self.inputs, self.result, CONTROLS[control])
        except PlantsideError as error:
            blamed = _FIELD_TO_CONTROL.get(getattr(error, "field", ""))
            if blamed is None:
                # not tied to one field: keep it beside the control already marked (the
                # user is still to fix that one), else beside the control just moved
                marked = [name for name in UNIT_CONTROLS if self.messages[name]]
                blamed = marked[0] if marked else control
            if blamed not in CONTROLS or CONTROLS[blamed] in ("none", "view"):
                recomputing = CONTROLS.get(control, "none") not in ("none", "view")
                blamed = control if recomputing else "climate"
            for name in CONTROLS:
                self.messages[name] = ""
            text = str(error)
            reachable = self._reachable_message(control, error)
            if reachable:
                blamed, text = control, reachable
            elif getattr(error, "field", "") in set(_HIDDEN_FIELDS) - {"leaving_dew_point"}:
                # a scenario setting the page does not show: say which control it concerns
                text = (
                    f"Supply air temperature: conflicts with a setting of this air handler "
                    f"in the scenario file ({_HIDDEN_FIELDS[error.field]}): {text}"
                )
            self.messages[blamed] = text
            self._record(control, (), start, ok=False)
            return False
        recomputed = tuple(
            i
            for i, (new, old) in enumerate(zip(result.units, self.result.units, strict=False))
            if new.hourly is not old.hourly
        )
        self.result = result
        for name in CONTROLS:
            self.messages[name] = ""
        self._record(control, recomputed, start, ok=True)
        return True

    def _record(self, control, recomputed, start, ok):
        self.last_update = {
            "control": control,
            "recomputed": tuple(recomputed),
            "seconds": time.perf_counter() - start,
            "ok": ok,
        }
        for listener in list(self.listeners):
            listener(self)

    @property
    def stale(self) -> bool:
        """True when the result on show is not that of the current inputs."""
        shown = self.result.inputs
        current = self.inputs
        return (shown.units, shown.design_percent, shown.climate, shown.plant_key()) != (
            current.units,
            current.design_percent,
            current.climate,
            current.plant_key(),
        )

    def load_scenario(self, scenario: Scenario) -> None:
        """Replace the study by another scenario (controls take its values)."""
        start = time.perf_counter()
        previous = (self.scenario, self.inputs, self.result, self._zone_loads, self._climates)
        try:
            self._start(scenario, 0)
        except PlantsideError as error:
            self.scenario, self.inputs, self.result, self._zone_loads, self._climates = previous
            self.messages["scenario"] = f"{scenario.source}: {error}"
            self._record("scenario", (), start, ok=False)
            return
        self.pinned = None
        for name in self.messages:
            self.messages[name] = ""
        self._record("scenario", tuple(range(len(self.names))), start, ok=True)

    def current_scenario(self) -> Scenario:
        """The scenario with the controls' current values (what "Save scenario" writes).

        It keeps the scenario's own unit system: the units on screen are a view setting,
        so a study saved while viewing the other system still reads in its own units.
        """
        scenario = self.scenario
        for index, unit in enumerate(self.inputs.units):
            settings = unit.apply(scenario.air_handlers[index].settings)
            specs = list(scenario.air_handlers)
            specs[index] = replace(specs[index], settings=settings)
            scenario = replace(scenario, air_handlers=tuple(specs))
        climate = self.inputs.climate
        site = (
            {"climate": climate, "weather_file": None}
            if climate in BUNDLED_CLIMATES
            else {"climate": None, "weather_file": climate.split(": ", 1)[-1]}
        )
        return replace(self.inputs.plant_scenario(scenario), **site)

    # ---------------------------------------------------------------- climates
    def add_weather_file(self, name: str, content: bytes) -> str:
        """Read an uploaded hourly weather CSV and select it as the climate.

        Parameters
        ----------
        name : str
            File name as uploaded (a label only, never a path).
        content : bytes
            File content, at most :data:`MAX_UPLOAD_BYTES`. Every column's header
            must carry its unit (e.g. ``drybulb_F``, ``Dry bulb (°C)``).

        Returns
        -------
        str
            The climate value of the upload (``"upload: <name>"``), or "" if the
            file was refused (the message is beside the climate control).
        """
        start = time.perf_counter()
        label = UPLOAD_PREFIX + "".join(ch for ch in str(name)[:80] if ch.isprintable())
        try:
            data = bytes(content)
            if len(data) > MAX_UPLOAD_BYTES:
                raise InputFileError(
                    label[len(UPLOAD_PREFIX) :],
                    [f"file is {len(data) / 1e6:.1f} MB; at most {MAX_UPLOAD_BYTES / 1e6:.0f} MB"],
                )
            stream = io.BytesIO(data)
            stream.name = label[len(UPLOAD_PREFIX) :]  # shown in messages; never opened
            weather = read_weather_csv(
                stream, site=label[len(UPLOAD_PREFIX) :], max_bytes=MAX_UPLOAD_BYTES
            )
            # its design conditions and every air handler's zone loads (the sun needs the
            # site's place: the scenario's site.latitude, ...) must work too
            part = self._climate_part(label, weather, cache=False)
            zone_loads = {
                (label, i): self.scenario.zone_loads(i, part.weather)
                for i in range(len(self.names))
            }
        except PlantsideError as error:
            self.messages["climate"] = str(error)
            self._record("climate", (), start, ok=False)
            return ""
        self.uploaded[label] = weather
        self._climates[label] = part  # a file uploaded again under its name replaces it
        self._zone_loads.update(zone_loads)
        self.set("climate", label)
        return label

    # ----------------------------------------------------------------- pinning
    def pinned_result(self) -> DashboardResult | None:
        """The pinned "A", seen on the air handler the result on show is of.

        "A" is a whole study: after another air handler is chosen, B is compared with
        A's same air handler (its figures, loads and charts), never with the one
        that was shown when A was pinned.
        """
        pinned = self.pinned
        if pinned is None:
            return None
        index = self.result.inputs.air_handler
        if pinned.inputs.air_handler == index:
            return pinned
        key = (id(pinned), index)
        if self._pinned_view is None or self._pinned_view[0] != key:
            seen = self._assemble(
                replace(pinned.inputs, air_handler=index), pinned.climate, pinned.units
            )
            self._pinned_view = (key, pinned, seen)  # holds ``pinned`` so its id stays its own
        return self._pinned_view[2]

    def pin(self) -> None:
        """Freeze the current result as "A"."""
        self.pinned = self.result
        self._record("pin", (), time.perf_counter(), ok=not self._failing())

    def unpin(self) -> None:
        """Forget the pinned result."""
        self.pinned = None
        self._record("pin", (), time.perf_counter(), ok=not self._failing())
