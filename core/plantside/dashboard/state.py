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
"""

from __future__ import annotations

import io
import math
import time
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from types import SimpleNamespace

import numpy as np
import pandas as pd

from plantside.air_handler.design import cooling_design_points
from plantside.charts.labels import ECONOMIZER_CHOICES, FAN_CHOICES, condition_text, inputs_stamp
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.design_conditions import COOLING_PERCENTS, design_conditions_from_weather
from plantside.climate.weather import Weather
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError, InputRangeError, PlantsideError
from plantside.study.design_sweep import DESIGN_KINDS, design_outdoor_air_sweep
from plantside.study.figures import (
    PART_LOAD_THRESHOLD,
    HeadlineFigures,
    climate_label,
    control_values,
    headline_figures,
    view_loads,
)
from plantside.study.run import AirHandlerResult, design_zone, run_air_handler
from plantside.study.scenario import Scenario
from plantside.units import UnitSystem, UnitText, display_text, to_display

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

#: Controls that belong to one air handler.
UNIT_CONTROLS = (
    "outdoor_air_fraction",
    "supply_air_temperature",
    "economizer",
    "economizer_integrated",
    "fan_control",
    "bypass_factor",
    "leaving_dew_point",
)
#: Every control -> what it makes the state recompute.
CONTROLS: dict[str, str] = {
    **dict.fromkeys(UNIT_CONTROLS, "unit"),
    "design_percent": "design",
    "climate": "climate",
    "air_handler": "view",
    "unit_system": "none",
}

#: How far below the supply air temperature a carried apparatus dew point goes [K]
#: (the model wants it strictly below; common practice (no source)).
_ADP_BELOW_SUPPLY = 0.5

#: Scenario settings tied to the supply air temperature that the page does not show.
_HIDDEN_FIELDS = {
    "supply_reset_drybulb": "cold-weather supply reset",
    "preheat_drybulb": "preheat set point",
    "leaving_dew_point": "leaving dew point limit",
    "apparatus_dew_point": "apparatus dew point",
}

#: Model field named in an error -> the control whose message shows it.
_FIELD_TO_CONTROL = {
    "minimum_outdoor_air_fraction": "outdoor_air_fraction",
    "outdoor_air_fraction": "outdoor_air_fraction",
    "minimum_outdoor_airflow": "outdoor_air_fraction",
    "supply_drybulb": "supply_air_temperature",
    "supply_air_temperature": "supply_air_temperature",
    "supply_reset_drybulb": "supply_air_temperature",
    "preheat_drybulb": "supply_air_temperature",
    "leaving_dew_point": "leaving_dew_point",
    "apparatus_dew_point": "supply_air_temperature",
    "economizer": "economizer",
    "economizer_integrated": "economizer_integrated",
    "fan_control": "fan_control",
    "bypass_factor": "bypass_factor",
    "design_percent": "design_percent",
    "percent": "design_percent",
}


@dataclass(frozen=True)
class UnitInputs:
    """One air handler's control values in SI.

    ``outdoor_air_fraction`` [-] 0..1 (minimum, of the supply air),
    ``supply_air_temperature`` [°C], ``economizer`` (key of
    :data:`ECONOMIZER_CHOICES`), ``economizer_integrated`` (bool),
    ``fan_control`` (key of :data:`FAN_CHOICES`), ``bypass_factor`` [-],
    ``leaving_dew_point`` [°C] (None unless the coil holds a leaving dew point).
    ``coil_model`` and ``all_outdoor_air`` are the scenario's (no control moves
    them); they say which controls apply.
    """

    outdoor_air_fraction: float
    supply_air_temperature: float
    economizer: str
    economizer_integrated: bool
    fan_control: str
    bypass_factor: float
    leaving_dew_point: float | None = None
    coil_model: str = "bypass_factor"
    all_outdoor_air: bool = False

    @classmethod
    def from_settings(cls, settings) -> UnitInputs:
        """The control values that describe ``settings`` as the scenario gives them.

        A fixed minimum outdoor airflow shows as its fraction of the design supply
        airflow; a 100 % outdoor-air unit shows 100 %.
        """
        dew_point_coil = settings.coil_model == "leaving_dew_point"
        return cls(
            **control_values(settings),
            leaving_dew_point=float(settings.leaving_dew_point) if dew_point_coil else None,
            coil_model=str(settings.coil_model),
            all_outdoor_air=bool(settings.all_outdoor_air),
        )

    def apply(self, settings):
        """The scenario's air-handler settings with the controls the user moved.

        Controls still at the scenario's value leave its settings alone (a fixed
        minimum outdoor airflow); a moved control replaces only its own setting
        (outdoor air as a fraction of supply; the bypass factor or the leaving dew
        point, never the coil model).
        """
        original = UnitInputs.from_settings(settings)
        changes = {}
        if self.outdoor_air_fraction != original.outdoor_air_fraction:
            changes.update(
                minimum_outdoor_air_fraction=self.outdoor_air_fraction,
                minimum_outdoor_airflow=None,
            )
        if self.economizer != original.economizer:
            changes["economizer"] = self.economizer
        if self.economizer_integrated != original.economizer_integrated:
            changes["economizer_integrated"] = self.economizer_integrated
        if self.fan_control != original.fan_control:
            changes["fan_control"] = self.fan_control
        if self.bypass_factor != original.bypass_factor:
            changes["bypass_factor"] = self.bypass_factor
        if self.leaving_dew_point != original.leaving_dew_point:
            changes["leaving_dew_point"] = self.leaving_dew_point
        if self.supply_air_temperature != original.supply_air_temperature:
            changes["supply_drybulb"] = self.supply_air_temperature
            # carried along before the settings are rebuilt (they validate on creation)
            pending = SimpleNamespace(**{**settings.__dict__, **changes})
            changes.update(_carried_with_supply(pending)[0])
        return replace(settings, **changes) if changes else settings

    def carried_notes(self, settings, system: str = "SI") -> tuple[str, ...]:
        """What moving the supply air temperature changed among ``settings`` not on the page."""
        if self.supply_air_temperature == UnitInputs.from_settings(settings).supply_air_temperature:
            return ()
        return _carried_with_supply(self.apply(settings), before=settings, system=system)[1]


def _carried_with_supply(settings, before=None, system="SI") -> tuple[dict, tuple[str, ...]]:
    """Set points the scenario ties to the supply air temperature, carried along with it.

    The model accepts a cold-weather supply reset only at or above the supply set
    point, a preheat set point only at or below it, a leaving dew point limit at
    most equal to it and an apparatus dew point below it (see
    :class:`plantside.air_handler.settings.AirHandlerSettings`). None of them is
    on the page, so moving the supply air temperature carries them along instead
    of refusing the move: ``(changes, notes)``; the notes (with ``before``, the
    scenario's own settings) say what was carried, for the cautions list.
    """
    supply = float(settings.supply_drybulb)
    changes = {}
    if settings.supply_reset_drybulb is not None and settings.supply_reset_drybulb < supply:
        changes["supply_reset_drybulb"] = supply
    if settings.preheat_drybulb is not None and settings.preheat_drybulb > supply:
        changes["preheat_drybulb"] = supply
    if settings.coil_model == "leaving_dew_point" and (settings.leaving_dew_point or 0.0) > supply:
        changes["leaving_dew_point"] = supply
    if (
        settings.coil_model == "apparatus_dew_point"
        and (settings.apparatus_dew_point or 0.0) >= supply - _ADP_BELOW_SUPPLY / 2
    ):
        changes["apparatus_dew_point"] = supply - _ADP_BELOW_SUPPLY
    notes = []
    if before is not None:
        words = _HIDDEN_FIELDS
        unit = to_display("temperature", 0.0, system)[1]

        def shown(value):
            return f"{float(to_display('temperature', value, system)[0]):.1f} {unit}"

        for name, text in words.items():
            old, new = getattr(before, name), getattr(settings, name)
            if old is not None and new is not None and old != new:
                notes.append(
                    f"{settings.name}: supply air temperature {shown(supply)}; the scenario's "
                    f"{text} ({shown(old)}) is taken as {shown(new)} to stay consistent with it."
                )
    return changes, tuple(notes)


@dataclass(frozen=True)
class DashboardInputs:
    """Every control's value, in SI, exactly as the user set it.

    ``units`` holds one :class:`UnitInputs` per air handler; ``air_handler``
    is the index of the one the controls show. The air-handler controls are
    also readable directly (``inputs.outdoor_air_fraction``) for the one shown.
    """

    units: tuple[UnitInputs, ...]
    air_handler: int
    design_percent: float
    climate: str
    unit_system: str

    @property
    def unit(self) -> UnitInputs:
        return self.units[self.air_handler]

    def __getattr__(self, name):
        if name in UNIT_CONTROLS:
            return getattr(self.units[self.air_handler], name)
        raise AttributeError(name)

    def with_control(self, control: str, value) -> DashboardInputs:
        if control in UNIT_CONTROLS:
            units = list(self.units)
            units[self.air_handler] = replace(units[self.air_handler], **{control: value})
            return replace(self, units=tuple(units))
        return replace(self, **{control: value})

    def stamp(self, scenario, plant_view: bool, system: str | None = None) -> str:
        """One line naming the inputs that made the charts, for chart and file stamps.

        Every setting of the air handler shown, and the settings that differ from
        ``scenario`` (the file): of every air handler for the plant, of the one shown
        otherwise (:func:`plantside.charts.labels.inputs_stamp`). Temperatures are in
        ``system`` (default: the unit system set).
        """
        units = [
            (spec.settings, unit.apply(spec.settings))
            for unit, spec in zip(self.units, scenario.air_handlers, strict=True)
        ]
        return inputs_stamp(
            self.climate,
            self.design_percent,
            units,
            shown=self.air_handler,
            plant_view=plant_view,
            system=system or self.unit_system,
        )


@dataclass(frozen=True, eq=False)
class ClimatePart:
    """Weather of the site and its annual design conditions."""

    weather: Weather
    conditions: object
    source: str


@dataclass(frozen=True, eq=False)
class DesignPart:
    """One air handler at the three cooling design conditions, and its sweep.

    ``sweep`` maps a condition label to the coil total load [kW] at each of
    :data:`SWEEP_FRACTIONS`.
    """

    summary: object
    governing: object
    conditions: tuple
    sweep: dict[str, np.ndarray]


@dataclass(frozen=True, eq=False)
class UnitResult:
    """One air handler's results: design part and hourly year.

    ``study`` is the study layer's result of this air handler
    (:func:`plantside.study.run.run_air_handler`), from which the headline figures
    are computed; ``hourly`` is its hourly year.
    """

    name: str
    inputs: UnitInputs
    design: DesignPart
    hourly: pd.DataFrame
    study: AirHandlerResult


@dataclass(frozen=True, eq=False)
class DashboardResult:
    """A consistent set of results for one set of inputs.

    Attributes
    ----------
    inputs : DashboardInputs
    climate : ClimatePart
    units : tuple of UnitResult
        One per air handler, in scenario order.
    view : str
        "air_handler" or "plant": what ``figures``, ``coil_load`` and
        ``zone_load`` describe.
    figures : plantside.study.figures.HeadlineFigures
    coil_load, zone_load : numpy.ndarray
        Hourly coil and zone load of the view [kW].
    design_loads : dict
        The design point's power terms of the view [kW] (``DesignPoint.loads``
        keys ending in ``_kW``; summed over air handlers for the plant, with
        ``distribution_gain_kW`` added and included in ``coil_total_kW``).
    machine_capacities : numpy.ndarray
        Capacities of the machines of the first cooling plant option [kW].
    minimum_turndown : float
        Their minimum turndown [-].
    cautions : tuple of str
    """

    inputs: DashboardInputs
    climate: ClimatePart
    units: tuple[UnitResult, ...]
    view: str
    figures: HeadlineFigures
    coil_load: np.ndarray
    zone_load: np.ndarray
    design_loads: dict
    machine_capacities: np.ndarray
    minimum_turndown: float
    cautions: tuple[str, ...] = field(default=())

    @property
    def unit(self) -> UnitResult:
        """The air handler the controls show."""
        return self.units[self.inputs.air_handler]


def _finite_float(name: str, value, low: float, high: float, unit: str) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float | np.floating | np.integer):
        raise InputRangeError(name, f"{name} must be a number, got {type(value).__name__}", unit)
    number = float(value)
    allowed = f"{low:g} to {high:g} {unit}".strip()
    if not math.isfinite(number) or not low <= number <= high:
        raise InputRangeError(name, f"{name} = {number:g} {unit} is outside {allowed}", allowed)
    return number


def _choice(name: str, value, allowed) -> str:
    keys = tuple(allowed)
    if not isinstance(value, str) or value not in keys:
        shown = value if isinstance(value, str | int | float) else type(value).__name__
        raise InputRangeError(
            name, f"{name} {str(shown)[:60]!r} is not one of: {', '.join(keys)}", ", ".join(keys)
        )
    return value


class DashboardState:
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
        )
        self._zone_loads: dict[tuple[str, int], object] = {}
        self._climates = {}  # placed at this scenario's site (the sun on glazed zones)
        self._check_scenario_controls()
        self.result = self._compute(self.inputs, None, "all")

    # ------------------------------------------------------------------ facts
    @property
    def names(self) -> tuple[str, ...]:
        """Air-handler names, in scenario order."""
        return tuple(spec.settings.name for spec in self.scenario.air_handlers)

    def supply_temperature_range(self, index: int | None = None) -> tuple[float, float]:
        """Allowed supply air temperature of an air handler [°C]: 4 °C to 0.5 K below the zone."""
        index = self.inputs.air_handler if index is None else index
        zone = float(self.scenario.air_handlers[index].settings.zone_cooling_drybulb)
        return 4.0, zone - 0.5

    def carried_notes(self, system: str | None = None) -> tuple[str, ...]:
        """Scenario set points carried along with the supply air temperature (for the page)."""
        system = self.inputs.unit_system if system is None else system
        notes = []
        for unit, spec in zip(self.result.inputs.units, self.scenario.air_handlers, strict=True):
            notes.extend(unit.carried_notes(spec.settings, system))
        return tuple(notes)

    @staticmethod
    def bypass_factor_range() -> tuple[float, float]:
        """Allowed coil bypass factor [-] (common practice: 0.03 to 0.3 for cooling coils)."""
        return 0.0, 0.5

    def leaving_dew_point_range(self, index: int | None = None) -> tuple[float, float]:
        """Allowed leaving dew point of an air handler [°C].

        The model's (:class:`~plantside.air_handler.settings.AirHandlerSettings`): from
        the coil's lowest apparatus dew point (at least 0 °C) to the supply air
        temperature set (at most 25 °C).
        """
        index = self.inputs.air_handler if index is None else index
        settings = self.scenario.air_handlers[index].settings
        supply = self.inputs.units[index].supply_air_temperature
        return max(0.0, float(settings.apparatus_dew_point_min)), min(25.0, supply)

    def control_range(self, control: str, index: int | None = None) -> tuple[float, float]:
        """Lowest and highest value of a slider control in SI (what :meth:`validate` accepts)."""
        if control == "outdoor_air_fraction":
            return 0.0, 1.0
        if control == "supply_air_temperature":
            return self.supply_temperature_range(index)
        if control == "bypass_factor":
            return self.bypass_factor_range()
        if control == "leaving_dew_point":
            return self.leaving_dew_point_range(index)
        raise InputRangeError("control", f"{control!r:.40} is not a slider", "a slider control")

    def applies(self, control: str, index: int | None = None) -> str:
        """ "" when ``control`` applies to the air handler, else why not (shown on the page).

        The outdoor-air fraction and the economizer controls do not apply to a 100 %
        outdoor-air unit, the bypass factor not to a coil set by its apparatus dew
        point, the leaving dew point only to a coil that holds one.
        """
        index = self.inputs.air_handler if index is None else index
        unit, name = self.inputs.units[index], self.names[index]
        if control in ("outdoor_air_fraction", "economizer", "economizer_integrated"):
            if unit.all_outdoor_air:
                return f"{name} is a 100 % outdoor-air unit (no return air, no economizer)"
        if control == "bypass_factor" and unit.coil_model == "apparatus_dew_point":
            return (
                f"{name}'s coil is set by its apparatus dew point (scenario file), "
                "not by a bypass factor"
            )
        if control == "leaving_dew_point" and unit.coil_model != "leaving_dew_point":
            return f"{name}'s coil does not hold a leaving dew point"
        return ""

    def shown_value(self, control: str, index: int | None = None):
        """The value of ``control`` the model uses (SI): what the control must show.

        The input, except a leaving dew point carried down with the supply air
        temperature (the model wants it at most the supply dry bulb).
        """
        index = self.inputs.air_handler if index is None else index
        unit = self.inputs.units[index]
        if control == "leaving_dew_point" and unit.leaving_dew_point is not None:
            return min(unit.leaving_dew_point, unit.supply_air_temperature)
        return getattr(unit, control) if control in UNIT_CONTROLS else getattr(self.inputs, control)

    def _check_scenario_controls(self) -> None:
        """Refuse a scenario whose control values lie outside the dashboard's controls.

        A slider cannot show a value outside its range; rather than show another
        value than the one in use, the scenario is refused naming the air handler,
        the field, its value and the range, in the scenario's units.
        """
        system = UnitSystem.parse(self.scenario.unit_system).value
        for index in range(len(self.inputs.units)):
            for control, field_name, quantity in (
                ("supply_air_temperature", "supply_drybulb", "temperature"),
                ("bypass_factor", "bypass_factor", None),
                ("leaving_dew_point", "leaving_dew_point", "temperature"),
            ):
                if self.applies(control, index):
                    continue
                value = self.shown_value(control, index)
                low, high = self.control_range(control, index)
                if low - 1e-9 <= value <= high + 1e-9:
                    continue

                def shown(v, quantity=quantity):
                    if quantity is None:
                        return f"{v:.2f}"
                    number, unit_text = to_display(quantity, v, system)
                    return f"{float(number):.1f} {unit_text}"

                raise InputRangeError(
                    field_name,
                    f"{self.names[index]}: {field_name} = {shown(value)} is outside what the "
                    f"dashboard's control accepts; allowed: {shown(low)} to {shown(high)}",
                    f"{shown(low)} to {shown(high)}",
                )

    def _reachable_message(self, control: str, error) -> str:
        """The message for a supply temperature or bypass factor the coil cannot reach.

        Says what is wrong at which design condition (as the page shows it) and the
        limit of the control moved: the lowest reachable supply air temperature, or
        the highest bypass factor that reaches the supply air temperature set (found
        by bisection on the model's design points; rounded to the control's
        resolution on the safe side). "" when the error is not that one.
        """
        if getattr(error, "field", "") != "apparatus_dew_point" or control not in (
            "supply_air_temperature",
            "bypass_factor",
        ):
            return ""
        index = self.inputs.air_handler
        unit = self.inputs.units[index]
        if unit.coil_model == "apparatus_dew_point":
            return ""
        scenario_settings = self.scenario.air_handlers[index].settings
        climate = self._climate_part(self.inputs.climate)
        zone = design_zone(self._unit_zone_loads(index, climate), "cooling")
        conditions = [
            climate.conditions.cooling(kind, self.inputs.design_percent) for kind in DESIGN_KINDS
        ]

        def failing(value):
            """The design condition the coil cannot meet with ``control`` = value, or None.

            The model's own design points (as :func:`run_air_handler` computes them).
            """
            settings = replace(unit, **{control: value}).apply(scenario_settings)
            try:
                cooling_design_points(
                    settings, zone, climate.conditions.conditions, self.inputs.design_percent
                )
            except InputRangeError as problem:
                if problem.field != "apparatus_dew_point":
                    raise
                named = [c for c in conditions if str(getattr(c, "label", "")) in str(problem)]
                return (named or conditions)[0]
            return None

        refused = getattr(unit, control)
        condition = failing(refused)
        if condition is None:
            return ""
        supply = control == "supply_air_temperature"
        low, high = self.control_range(control, index)
        bad, good = refused, (high if supply else low)
        try:
            if failing(good) is not None:
                return ""
            for _ in range(40):
                middle = 0.5 * (bad + good)
                if failing(middle) is None:
                    good = middle
                else:
                    bad = middle
                if abs(good - bad) < 1e-3:
                    break
        except PlantsideError:
            return ""
        adp_min = float(scenario_settings.apparatus_dew_point_min)

        def text(system):
            def temperature(value, rounding=round):
                number = float(to_display("temperature", value, system)[0])
                unit_text = to_display("temperature", 0.0, system)[1]
                return f"{rounding(number * 10) / 10:.1f} {unit_text}"

            where = condition_text(condition, system)
            if supply:
                limit = temperature(good, math.ceil)
                return (
                    f"Supply air temperature {temperature(refused)} is below what the coil "
                    f"can reach at {where} with bypass factor {unit.bypass_factor:.2f} (the "
                    f"coil's lowest apparatus dew point is {temperature(adp_min)}). Lowest "
                    f"reachable supply air temperature: {limit}; allowed: {limit} to "
                    f"{temperature(high, math.floor)}."
                )
            limit = math.floor(good * 100) / 100
            return (
                f"Coil bypass factor {refused:.2f} cannot reach the supply air temperature "
                f"{temperature(unit.supply_air_temperature)} at {where} (the coil's lowest "
                f"apparatus dew point is {temperature(adp_min)}). Highest bypass factor "
                f"that reaches it: {limit:.2f}; allowed: 0.00 to {limit:.2f}."
            )

        return UnitText(text("SI"), text("IP"))

    def climate_choices(self) -> tuple[str, ...]:
        """Bundled fictional sites, then uploaded files."""
        return tuple(BUNDLED_CLIMATES) + tuple(self.uploaded)

    # -------------------------------------------------------------- validation
    def validate(self, control: str, value):
        """The value of ``control`` in SI if allowed; raise InputRangeError otherwise."""
        if control in UNIT_CONTROLS and (reason := self.applies(control)):
            label = {"leaving_dew_point": "Leaving dew point"}.get(control, control)
            raise InputRangeError(
                control,
                f"{label.replace('_', ' ').capitalize()} does not apply: {reason}",
                "not adjustable for this air handler",
            )
        if control == "leaving_dew_point":
            low, high = self.leaving_dew_point_range()
            return _finite_float("Leaving dew point", value, low, high, "°C")
        if control == "outdoor_air_fraction":
            return _finite_float("Outdoor-air fraction", value, 0.0, 1.0, "")
        if control == "supply_air_temperature":
            low, high = self.supply_temperature_range()
            return _finite_float("Supply air temperature", value, low, high, "°C")
        if control == "bypass_factor":
            low, high = self.bypass_factor_range()
            return _finite_float("Coil bypass factor", value, low, high, "")
        if control == "economizer":
            return _choice("Economizer control", value, ECONOMIZER_CHOICES)
        if control == "fan_control":
            return _choice("Fan control", value, FAN_CHOICES)
        if control == "economizer_integrated":
            if not isinstance(value, bool | np.bool_):
                raise InputRangeError(
                    "Integrated economizer", f"expected on or off, got {value!r:.40}", "on/off"
                )
            return bool(value)
        if control == "design_percent":
            number = _finite_float("Design condition", value, 0.0, 100.0, "%")
            for allowed in COOLING_PERCENTS:
                if math.isclose(number, allowed):
                    return float(allowed)
            raise InputRangeError(
                "Design condition",
                f"design condition {number:g} % is not one of 0.4, 1, 2 %",
                "0.4, 1 or 2 %",
            )
        if control == "climate":
            return _choice("Climate", value, self.climate_choices())
        if control == "air_handler":
            if isinstance(value, bool) or not isinstance(value, int | np.integer):
                raise InputRangeError("Air handler", f"air handler {value!r:.40}", "an index")
            if not 0 <= int(value) < len(self.names):
                raise InputRangeError(
                    "Air handler",
                    f"air handler {value} does not exist",
                    f"0..{len(self.names) - 1}",
                )
            return int(value)
        if control == "unit_system":
            if not isinstance(value, str):
                raise InputRangeError("Units", f"unit system {value!r:.40}", "'SI' or 'IP'")
            return UnitSystem.parse(value).value
        raise InputRangeError("control", f"unknown control {control!r:.40}", ", ".join(CONTROLS))

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
        return (shown.units, shown.design_percent, shown.climate) != (
            current.units,
            current.design_percent,
            current.climate,
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
        return replace(scenario, cooling_design_percent=self.inputs.design_percent, **site)

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

    def _climate_part(
        self, climate: str, weather: Weather | None = None, cache: bool = True
    ) -> ClimatePart:
        """Weather and design conditions of ``climate``, placed as the command line does.

        The scenario's own climate and an uploaded year take the scenario's site
        latitude, longitude and time zone where given
        (:meth:`plantside.study.scenario.Scenario.located_weather`, as
        :meth:`~plantside.study.scenario.Scenario.load_weather`); another bundled
        site is where that site is.
        """
        cached = self._climates.get(climate) if cache else None
        if cached is not None:
            return cached
        if weather is None:
            weather = self.uploaded.get(climate) or load_bundled_climate(climate)
        if climate == self.scenario.climate or climate not in BUNDLED_CLIMATES:
            weather = self.scenario.located_weather(weather)
        part = ClimatePart(weather, design_conditions_from_weather(weather), climate)
        if cache:
            self._climates[climate] = part
        return part

    def _unit_zone_loads(self, index: int, climate: ClimatePart):
        key = (climate.source, index)
        if key not in self._zone_loads:
            self._zone_loads[key] = self.scenario.zone_loads(index, climate.weather)
        return self._zone_loads[key]

    # ----------------------------------------------------------------- compute
    def _compute(self, inputs: DashboardInputs, previous: DashboardResult | None, scope: str):
        """Results for ``inputs``, reusing parts of ``previous`` the change left alone.

        ``scope``: "all"/"climate" (everything), "design" (design parts of every
        air handler), "unit" (design part and year of the air handler shown).
        """
        if (
            previous is None
            or scope in ("all", "climate")
            or previous.climate.source != inputs.climate
        ):
            climate = self._climate_part(inputs.climate)
            previous = None
        else:
            climate = previous.climate
        units = []
        for index, spec in enumerate(self.scenario.air_handlers):
            unit_inputs = inputs.units[index]
            old = previous.units[index] if previous is not None else None
            reuse_year = old is not None and old.inputs == unit_inputs
            reuse_design = reuse_year and scope != "design"
            if reuse_design:
                units.append(old)
                continue
            settings = unit_inputs.apply(spec.settings)
            zone_loads = self._unit_zone_loads(index, climate)
            study = run_air_handler(
                settings,
                zone_loads,
                climate.weather,
                climate.conditions,
                inputs.design_percent,
                self.scenario.heating_design_percent,
                hourly=old.hourly if reuse_year else None,
            )
            summary = study.cooling_design
            design = DesignPart(
                summary,
                summary.points[summary.governing],
                tuple(
                    climate.conditions.cooling(kind, inputs.design_percent) for kind in DESIGN_KINDS
                ),
                design_outdoor_air_sweep(
                    settings, zone_loads, climate.conditions, inputs.design_percent
                ),
            )
            units.append(UnitResult(spec.settings.name, unit_inputs, design, study.hourly, study))
        return self._assemble(inputs, climate, tuple(units))

    def _assemble(self, inputs, climate, units) -> DashboardResult:
        """The view's figures and loads, by the study layer's functions (as the CLI's)."""
        scenario = self.scenario
        studies = [unit.study for unit in units]
        index = inputs.air_handler if self.view == "air_handler" else None
        loads = view_loads(studies, scenario.distribution_gain_percent, index)
        figures = headline_figures(
            scenario, studies, climate.conditions, inputs.design_percent, index, loads
        )
        numbers = (
            figures.design_zone_load,
            figures.design_coil_load,
            figures.peak_coil_load,
            figures.cooling_energy,
            figures.recommended_capacity,
        )
        if not (np.all(np.isfinite(loads.coil)) and np.all(np.isfinite(loads.zone))) or not all(
            math.isfinite(x) for x in (*numbers, *figures.design_loads.values())
        ):
            # never draw or show a NaN: refuse the result, keep the last valid one
            raise InputRangeError(
                "results",
                "the model gave a non-finite load for these inputs; the last valid result "
                "is kept (please report the inputs)",
                "finite loads",
            )
        cautions = []
        for unit in units:
            for text in (*unit.design.governing.cautions, *unit.hourly.attrs.get("cautions", ())):
                named = f"{unit.name}: {text}"  # which air handler, as the command line says
                if named not in cautions:
                    cautions.append(named)
        return DashboardResult(
            inputs=inputs,
            climate=climate,
            units=units,
            view=self.view,
            figures=figures,
            coil_load=loads.coil,
            zone_load=loads.zone,
            design_loads=figures.design_loads,
            machine_capacities=np.asarray(figures.machine_capacities, dtype=float),
            minimum_turndown=figures.minimum_turndown,
            cautions=tuple(cautions),
        )

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
