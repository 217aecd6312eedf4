"""The dashboard's messages: which control a model error is shown beside, and its text.

:data:`_FIELD_TO_CONTROL` (the model field an error names -> the control whose message
shows it) and :class:`ControlMessages`, the part of
:class:`plantside.dashboard.state.DashboardState` that writes display text: the
message for a supply air temperature or bypass factor the coil cannot reach (with the
reachable limit), and the notes on scenario set points carried along with the supply
air temperature.
"""

from __future__ import annotations

import math
from dataclasses import replace

from plantside.air_handler.design import cooling_design_points
from plantside.charts.labels import condition_text
from plantside.errors import InputRangeError, PlantsideError
from plantside.study.design_sweep import DESIGN_KINDS
from plantside.study.run import design_zone
from plantside.units import UnitText, to_display

__all__ = ["ControlMessages"]


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


class ControlMessages:
    """Messages and notes shown on the page, in the unit system set.

    Part of :class:`plantside.dashboard.state.DashboardState` (it reads the state's
    ``scenario``, ``inputs`` and ``result``, its control ranges and its climates).
    """

    def carried_notes(self, system: str | None = None) -> tuple[str, ...]:
        """Scenario set points carried along with the supply air temperature (for the page)."""
        system = self.inputs.unit_system if system is None else system
        notes = []
        for unit, spec in zip(self.result.inputs.units, self.scenario.air_handlers, strict=True):
            notes.extend(unit.carried_notes(spec.settings, system))
        return tuple(notes)

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
