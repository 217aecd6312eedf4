"""The dashboard's inputs: each control's value in SI, and what a control accepts.

:class:`UnitInputs` (one air handler's control values; applied to the scenario's
settings, carrying along the set points tied to the supply air temperature) and
:class:`DashboardInputs` (every control), :data:`CONTROLS` (what each control makes the
state recompute), and :class:`ControlRules`, the part of
:class:`plantside.dashboard.state.DashboardState` that says which controls apply to an
air handler, their ranges and whether a value sent from the page is allowed
(:meth:`ControlRules.validate`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from types import SimpleNamespace

import numpy as np

from plantside.charts.labels import ECONOMIZER_CHOICES, FAN_CHOICES, inputs_stamp
from plantside.climate.bundled import BUNDLED_CLIMATES
from plantside.climate.design_conditions import COOLING_PERCENTS
from plantside.errors import InputRangeError
from plantside.study.figures import control_values, plant_option_specs
from plantside.units import UnitSystem, to_display

__all__ = [
    "CONTROLS",
    "MARGIN_MAX_PERCENT",
    "PLANT_CONTROLS",
    "UNIT_CONTROLS",
    "ControlRules",
    "DashboardInputs",
    "UnitInputs",
]


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
#: Controls of the plant: sizing margins [%] and the plant option shown (an index).
PLANT_CONTROLS = (
    "cooling_margin_percent",
    "heating_margin_percent",
    "cooling_option",
    "heating_option",
)
#: Highest sizing margin the margin controls offer [%] (a scenario's larger margin
#: widens its control); margins above a few tens of percent are oversizing, not margin
#: (common practice (no source)).
MARGIN_MAX_PERCENT = 50.0
#: Every control -> what it makes the state recompute.
CONTROLS: dict[str, str] = {
    **dict.fromkeys(UNIT_CONTROLS, "unit"),
    "design_percent": "design",
    # the plant's sizing and the option its stage lines draw: the figures only, no year
    **dict.fromkeys(PLANT_CONTROLS, "plant"),
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
    ``cooling_margin_percent`` and ``heating_margin_percent`` [%] size the plants
    (the scenario's, until moved); ``cooling_option`` and ``heating_option`` index the
    plant option whose machines the stage lines and efficiency chart draw.
    """

    units: tuple[UnitInputs, ...]
    air_handler: int
    design_percent: float
    climate: str
    unit_system: str
    cooling_margin_percent: float = 10.0
    heating_margin_percent: float = 10.0
    cooling_option: int = 0
    heating_option: int = 0

    def plant_key(self) -> tuple:
        """The plant controls' values (what a plant-only change moves)."""
        return tuple(getattr(self, name) for name in PLANT_CONTROLS)

    def plant_scenario(self, scenario):
        """``scenario`` with the design condition and sizing margins set here."""
        return replace(
            scenario,
            cooling_design_percent=self.design_percent,
            cooling_margin_percent=self.cooling_margin_percent,
            heating_margin_percent=self.heating_margin_percent,
        )

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
        text = inputs_stamp(
            self.climate,
            self.design_percent,
            units,
            shown=self.air_handler,
            plant_view=plant_view,
            system=system or self.unit_system,
        )
        plant = self.plant_stamp(scenario)
        return f"{text} · {plant}" if plant else text

    def plant_stamp(self, scenario) -> str:
        """The plant settings that differ from ``scenario`` (the file), for the stamp: a
        sizing margin moved, a plant option other than the first shown ("" if none).

        As for the air handlers, the stamp names what differs from the scenario file, so
        an export made before any control moved carries the command line's stamp.
        """
        parts = []
        for kind in ("cooling", "heating"):
            margin = getattr(self, f"{kind}_margin_percent")
            if margin != getattr(scenario, f"{kind}_margin_percent"):
                parts.append(f"{kind} margin {margin:g} %")
            index = getattr(self, f"{kind}_option")
            if index:
                name = plant_option_specs(getattr(scenario, f"{kind}_options"), kind)[index].name
                parts.append(f"{kind} option {name}")
        return ", ".join(parts)


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


class ControlRules:
    """Which controls apply, their ranges and the validation of a value sent from the page.

    Part of :class:`plantside.dashboard.state.DashboardState` (it reads the state's
    ``scenario``, ``inputs``, ``result`` and ``uploaded``).
    """

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

    def margin_max(self, kind: str) -> float:
        """Highest sizing margin the ``kind`` ("cooling"/"heating") control accepts [%]."""
        return max(MARGIN_MAX_PERCENT, float(getattr(self.scenario, f"{kind}_margin_percent")))

    def option_names(self, kind: str) -> tuple[str, ...]:
        """The scenario's ``kind`` plant options by name (one 100 % machine if it has none)."""
        return tuple(
            s.name for s in plant_option_specs(getattr(self.scenario, f"{kind}_options"), kind)
        )

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
        if control in ("cooling_margin_percent", "heating_margin_percent"):
            kind = control.split("_")[0]
            return _finite_float(
                f"{kind.capitalize()} sizing margin", value, 0.0, self.margin_max(kind), "%"
            )
        if control in ("cooling_option", "heating_option"):
            kind = control.split("_")[0]
            names = self.option_names(kind)
            if isinstance(value, bool) or not isinstance(value, int | np.integer):
                raise InputRangeError(
                    f"{kind.capitalize()} plant option",
                    f"{kind} plant option {value!r:.40} is not an option number",
                    f"0..{len(names) - 1}",
                )
            if not 0 <= int(value) < len(names):
                raise InputRangeError(
                    f"{kind.capitalize()} plant option",
                    f"{kind} plant option {value} does not exist; the scenario has "
                    f"{len(names)}: {', '.join(names)}",
                    f"0..{len(names) - 1}",
                )
            return int(value)
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
