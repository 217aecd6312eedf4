"""Settings of one air handler, validated where they enter.

Every field is SI. Each out-of-range value raises
:class:`plantside.errors.InputRangeError` naming the field and its allowed range.
The settings are frozen; use :func:`dataclasses.replace` to vary them (the new
object is validated again).

Airflow basis
-------------
``supply_airflow`` and ``minimum_outdoor_airflow`` are volume flows on the basis
named by ``airflow_basis``:

- ``"standard"``: standard air, 1.2014 kg of dry air per m³ (0.075 lb/ft³, the
  basis of the trade's 1.08 / 0.68 / 4.5 factors; common practice). The dry-air
  mass flow is Q x 1.2014 whatever the altitude.
- ``"actual"``: volume at the supply fan, taken as saturated air at the supply
  dry-bulb set point and the site pressure of each hour, m = Q / v (specific
  volume per kg dry air, ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 26). At
  1,500 m the same actual airflow carries about 16 % less air than at sea level.

Fan part-load power (variable volume)
-------------------------------------
P/P_design = (0.0013 + 0.1470 r + 0.9506 r² - 0.0998 r³) / 0.9991, r = airflow
fraction: the variable-speed-drive curve of ASHRAE 90.1-2019 Appendix G, Table
G3.1.3.15 (from memory), normalised to 1 at design airflow.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.air.economizer import (
    DEFAULT_DRYBULB_LIMIT,
    DEFAULT_ENTHALPY_LIMIT,
    EconomizerControl,
)
from plantside.constants import STANDARD_AIR_DENSITY
from plantside.errors import InputRangeError, check_range

__all__ = [
    "AIRFLOW_BASES",
    "COIL_MODELS",
    "DESIGN_AIRFLOWS",
    "FAN_CONTROLS",
    "FAN_POSITIONS",
    "FAN_SCHEDULES",
    "LOW_LOAD_RESPONSES",
    "REHEAT_SOURCES",
    "UNOCCUPIED_HEATING",
    "AirHandlerSettings",
    "fan_power_fraction",
]

AIRFLOW_BASES = ("standard", "actual")
FAN_CONTROLS = ("variable_volume", "constant_volume")
FAN_POSITIONS = ("draw_through", "blow_through")
COIL_MODELS = ("bypass_factor", "apparatus_dew_point", "leaving_dew_point")
FAN_SCHEDULES = ("always", "occupied")
LOW_LOAD_RESPONSES = ("raise_supply_temperature", "reheat")
REHEAT_SOURCES = ("hot_water", "condenser_heat")
#: Airflow of the cooling design points: the unit's scheduled ``supply_airflow`` (the
#: coil's selection point) or the airflow the zone load asks for.
DESIGN_AIRFLOWS = ("scheduled", "load")
#: Who serves the zone's heat while the fan is off (``fan_schedule="occupied"``).
UNOCCUPIED_HEATING = ("terminal", "night_cycle")

# ASHRAE 90.1-2019 Appendix G Table G3.1.3.15, VAV fan with variable-speed drive
# (coefficients from memory).
_FAN_CURVE = (0.0013, 0.1470, 0.9506, -0.0998)
_FAN_CURVE_AT_DESIGN = sum(_FAN_CURVE)


def fan_power_fraction(airflow_fraction):
    """Fan power as a fraction of design power for a variable-speed fan.

    Parameters
    ----------
    airflow_fraction : array_like
        Airflow as a fraction of design [-].

    Returns
    -------
    numpy.ndarray
        Power fraction [-], 1 at design airflow.

    References
    ----------
    ASHRAE 90.1-2019 Appendix G, Table G3.1.3.15 (from memory), normalised by its value
    at full flow (0.9991).
    """
    r = np.asarray(airflow_fraction, dtype=float)
    a, b, c, d = _FAN_CURVE
    return (a + r * (b + r * (c + r * d))) / _FAN_CURVE_AT_DESIGN


def _choice(field, value, allowed):
    if value not in allowed:
        text = ", ".join(repr(a) for a in allowed)
        raise InputRangeError(field, f"{field} = {value!r}; allowed: {text}", text)


_TEXT_FIELDS = ("name", "airflow_basis", "fan_control", "fan_position", "economizer",
                "coil_model", "fan_schedule", "low_load_response", "reheat_source")  # fmt: skip
_TEXT_FIELDS += ("design_airflow", "unoccupied_heating")
_FLAG_FIELDS = ("all_outdoor_air", "economizer_integrated")


def _check_types(settings):
    """Numbers must be numbers (not text, not true/false) and flags true or false."""
    for field, value in vars(settings).items():
        if field in _TEXT_FIELDS:
            if not isinstance(value, str):
                raise InputRangeError(field, f"{field} = {value!r} must be text", "text")
        elif field in _FLAG_FIELDS:
            if not isinstance(value, bool | np.bool_):
                raise InputRangeError(
                    field, f"{field} = {value!r} must be true or false", "true or false"
                )
        elif value is not None and (
            isinstance(value, bool | np.bool_) or not isinstance(value, int | float | np.number)
        ):
            raise InputRangeError(
                field, f"{field} = {value!r} must be a number, not text or true/false", "a number"
            )


def _optional(field, value, low, high, unit):
    if value is not None:
        check_range(field, value, low, high, unit)


@dataclass(frozen=True)
class AirHandlerSettings:
    """One air handler: airflow, outdoor air, set points, fan, economizer, recovery, coil.

    Parameters
    ----------
    name : str
        Display name.
    supply_airflow : float
        Design supply airflow [m³/s], > 0 to 500, on ``airflow_basis``.
    airflow_basis : str
        ``"standard"`` (1.2014 kg/m³) or ``"actual"`` (at site pressure and supply state).
    fan_control : str
        ``"variable_volume"`` (airflow follows the zone sensible load down to the
        minimum) or ``"constant_volume"``.
    minimum_airflow_fraction : float
        Lowest airflow of a variable-volume unit as a fraction of design [-], 0.05 to 1.
    minimum_outdoor_air_fraction : float
        Minimum outdoor air as a fraction of the hour's supply airflow [-], 0 to 1.
        Used when ``minimum_outdoor_airflow`` is None.
    minimum_outdoor_airflow : float or None
        Fixed minimum outdoor airflow [m³/s], 0 to ``supply_airflow``, same basis. With
        variable volume it becomes a larger fraction as the supply airflow drops.
    ventilation_airflow_required : float or None
        The zone's outdoor-air need [m³/s, same basis], 0 to ``supply_airflow`` (e.g. from
        the ASHRAE 62.1 ventilation rate procedure, worked out by the engineer). When given,
        settings whose minimum outdoor air falls below it at the lowest supply airflow are
        refused.
    all_outdoor_air : bool
        A 100 % outdoor-air unit (no return air, no economizer).
    zone_cooling_drybulb : float
        Zone dry-bulb set point when cooling [°C], 15 to 32.
    zone_heating_drybulb : float
        Zone dry-bulb set point when heating [°C], 5 to ``zone_cooling_drybulb``.
    zone_relative_humidity_limit : float
        Zone relative humidity above which an hour is flagged [-], 0.3 to 1 (caution only;
        the zone humidity floats with the latent load and the supply air).
    zone_relative_humidity_max : float or None
        Zone humidity control [-], 0.3 to ``zone_relative_humidity_limit``; None (the
        default) for none. In every operating hour where the zone would be more humid, the
        cooling coil is driven colder on its own process line (its ``bypass_factor``, a
        lower apparatus dew point) until the supply air holds the zone at this relative
        humidity, and terminal reheat on the heating plant (``humidity_control_reheat_kW``)
        lifts the air back to the temperature the zone needs. It is a control set point;
        ``zone_relative_humidity_limit`` stays the caution threshold, so the set point may
        not be above it. Only with ``coil_model="bypass_factor"`` (a leaving-dew-point coil
        already holds the humidity: lower its ``leaving_dew_point``; a fixed apparatus dew
        point cannot be driven colder).
    supply_drybulb : float
        Supply air dry-bulb set point [°C], 4 to ``zone_cooling_drybulb`` - 0.5.
    supply_reset_drybulb : float or None
        Supply set point at cold outdoor conditions (outdoor reset) [°C],
        ``supply_drybulb`` to ``zone_cooling_drybulb`` - 0.5; None for no reset.
    supply_reset_outdoor_low, supply_reset_outdoor_high : float
        Outdoor dry bulb [°C] at and below which ``supply_reset_drybulb`` applies, and at
        and above which ``supply_drybulb`` applies (linear between); low < high.
    heating_supply_drybulb_max : float
        Highest supply dry bulb when heating [°C], ``zone_heating_drybulb`` to 60.
    supply_fan_power : float
        Supply fan electric power at design airflow [kW], 0 to 2000.
    fan_position : str
        ``"draw_through"`` (fan after the coil) or ``"blow_through"`` (before the coil).
    fan_heat_fraction : float
        Share of the fan power that ends up in the air stream [-], 0 to 1
        (1 with the motor in the air stream).
    return_plenum_fraction : float
        Share of the zone internal sensible gain picked up by the return air (lights
        over a return plenum) [-], 0 to 1.
    economizer : str
        ``"none"``, ``"fixed_drybulb"``, ``"differential_drybulb"``, ``"fixed_enthalpy"``
        or ``"differential_enthalpy"`` (ASHRAE 90.1-2019 Table 6.5.1.1.3 types).
    economizer_integrated : bool
        Integrated (100 % outdoor air while the coil cools) or non-integrated.
    economizer_drybulb_limit : float
        Dry-bulb high limit [°C], -10 to 40.
    economizer_enthalpy_limit : float
        Enthalpy high limit [kJ/kg dry air], 10 to 120.
    recovery_sensible_effectiveness, recovery_latent_effectiveness : float
        Energy recovery effectiveness at balanced flow [-], 0 to 0.95 (0 = no recovery).
    preheat_drybulb : float or None
        Lowest mixed-air dry bulb held by the preheat coil [°C], -20 to 20 and below
        ``supply_drybulb``; None for no preheat coil.
    coil_model : str
        ``"bypass_factor"``, ``"apparatus_dew_point"`` or ``"leaving_dew_point"``.
    bypass_factor : float
        Cooling coil bypass factor [-], 0 to below 1 (``coil_model="bypass_factor"``).
    apparatus_dew_point : float or None
        Fixed apparatus dew point [°C], 0 to 25 and below ``supply_drybulb``
        (``coil_model="apparatus_dew_point"``).
    leaving_dew_point : float or None
        Leaving dew point held by the coil [°C], 0 to 25 and at most ``supply_drybulb``
        (``coil_model="leaving_dew_point"``). The coil leaves on its process line (with
        ``bypass_factor``), near saturation, and a reheat stage lifts the air to the
        supply set point; the coil dehumidifies whenever the entering dew point is above
        this, also when the entering air is cooler than the supply set point.
    reheat_source : str
        Where the reheat after a ``leaving_dew_point`` coil comes from: ``"hot_water"``
        (a hot-water coil on the heating plant) or ``"condenser_heat"`` (heat recovered
        from the chillers' condensers; not a load on the heating plant).
    coil_runaround_effectiveness : float
        Sensible effectiveness of a passive exchanger around the cooling coil (run-around
        coil loop or heat pipe) [-], 0 to 0.9 (0 = none). It pre-cools the air entering
        the coil by the heat it gives the air leaving it, modulated so the supply set
        point is not passed; the rest of the reheat comes from ``reheat_source``. Acts
        only when the coil leaves below the supply set point (``leaving_dew_point``).
    apparatus_dew_point_min : float
        Lowest apparatus dew point the coil and its cooling medium can produce [°C],
        -5 to 20. A design point needing a lower one is an error; hours of the year
        needing one are flagged.
    fan_schedule : str
        ``"always"`` or ``"occupied"`` (fan off in unoccupied hours).
    low_load_response : str
        When the zone needs less cooling than the supply set point gives at the
        lowest airflow: ``"raise_supply_temperature"`` (the coil leaves warmer air; in
        heating hours the unit's heating coil heats the supply air) or ``"reheat"`` (VAV
        terminal reheat: the unit's supply held at its set point in every hour, heating
        hours too, and the terminal reheats what the zone does not need, ``reheat_kW`` on
        the heating plant, at design and hour by hour).
    design_airflow : str
        Airflow of the cooling design points: ``"scheduled"`` (default; the unit's
        ``supply_airflow`` with the coil leaving at the supply set point, the coil
        schedule's selection point) or ``"load"`` (the airflow the design zone load
        asks for, variable volume only being lower). The other airflow is reported
        beside it (:class:`plantside.air_handler.design.DesignPoint`).
    unoccupied_heating : str
        Who serves the zone's heat in hours the fan is off (``fan_schedule="occupied"``):
        ``"terminal"`` (perimeter or terminal heating on the hot-water plant, the
        default) or ``"night_cycle"`` (the fan cycles on, outdoor damper closed, to hold
        ``night_setback_drybulb``; not for a 100 % outdoor-air unit).
    night_setback_drybulb : float or None
        Zone heating set point while unoccupied [°C], 5 to ``zone_heating_drybulb``;
        None for no set-back (the heating set point all day).
    """

    name: str = "AHU-1"
    supply_airflow: float = 5.0
    airflow_basis: str = "standard"
    fan_control: str = "variable_volume"
    minimum_airflow_fraction: float = 0.3
    minimum_outdoor_air_fraction: float = 0.2
    minimum_outdoor_airflow: float | None = None
    all_outdoor_air: bool = False
    ventilation_airflow_required: float | None = None
    zone_cooling_drybulb: float = 24.0
    zone_heating_drybulb: float = 21.0
    zone_relative_humidity_limit: float = 0.60
    zone_relative_humidity_max: float | None = None
    supply_drybulb: float = 13.0
    supply_reset_drybulb: float | None = None
    supply_reset_outdoor_low: float = 10.0
    supply_reset_outdoor_high: float = 21.0
    heating_supply_drybulb_max: float = 35.0
    supply_fan_power: float = 0.0
    fan_position: str = "draw_through"
    fan_heat_fraction: float = 1.0
    return_plenum_fraction: float = 0.0
    economizer: str = "fixed_drybulb"
    economizer_integrated: bool = True
    economizer_drybulb_limit: float = DEFAULT_DRYBULB_LIMIT
    economizer_enthalpy_limit: float = DEFAULT_ENTHALPY_LIMIT
    recovery_sensible_effectiveness: float = 0.0
    recovery_latent_effectiveness: float = 0.0
    preheat_drybulb: float | None = 5.0
    coil_model: str = "bypass_factor"
    bypass_factor: float = 0.1
    apparatus_dew_point: float | None = None
    leaving_dew_point: float | None = None
    apparatus_dew_point_min: float = 3.0
    fan_schedule: str = "always"
    low_load_response: str = "raise_supply_temperature"
    reheat_source: str = "hot_water"
    coil_runaround_effectiveness: float = 0.0
    design_airflow: str = "scheduled"
    unoccupied_heating: str = "terminal"
    night_setback_drybulb: float | None = None

    def __post_init__(self):
        _check_types(self)
        check_range("supply_airflow", self.supply_airflow, 0.0, 500.0, "m³/s", low_inclusive=False)
        _choice("airflow_basis", self.airflow_basis, AIRFLOW_BASES)
        _choice("fan_control", self.fan_control, FAN_CONTROLS)
        check_range(
            "minimum_airflow_fraction", self.minimum_airflow_fraction, 0.05, 1.0, "(fraction)"
        )
        check_range(
            "minimum_outdoor_air_fraction",
            self.minimum_outdoor_air_fraction,
            0.0,
            1.0,
            "(fraction)",
        )
        _optional(
            "minimum_outdoor_airflow",
            self.minimum_outdoor_airflow,
            0.0,
            self.supply_airflow,
            "m³/s",
        )
        check_range("zone_cooling_drybulb", self.zone_cooling_drybulb, 15.0, 32.0, "°C")
        check_range(
            "zone_heating_drybulb", self.zone_heating_drybulb, 5.0, self.zone_cooling_drybulb, "°C"
        )
        check_range(
            "zone_relative_humidity_limit",
            self.zone_relative_humidity_limit,
            0.3,
            1.0,
            "(fraction)",
        )
        supply_high = float(self.zone_cooling_drybulb) - 0.5
        check_range("supply_drybulb", self.supply_drybulb, 4.0, supply_high, "°C")
        _optional(
            "supply_reset_drybulb",
            self.supply_reset_drybulb,
            self.supply_drybulb,
            supply_high,
            "°C",
        )
        check_range("supply_reset_outdoor_low", self.supply_reset_outdoor_low, -40.0, 40.0, "°C")
        check_range(
            "supply_reset_outdoor_high",
            self.supply_reset_outdoor_high,
            self.supply_reset_outdoor_low,
            50.0,
            "°C",
            low_inclusive=False,
        )
        check_range(
            "heating_supply_drybulb_max",
            self.heating_supply_drybulb_max,
            self.zone_heating_drybulb,
            60.0,
            "°C",
            low_inclusive=False,
        )
        check_range("supply_fan_power", self.supply_fan_power, 0.0, 2000.0, "kW")
        _choice("fan_position", self.fan_position, FAN_POSITIONS)
        check_range("fan_heat_fraction", self.fan_heat_fraction, 0.0, 1.0, "(fraction)")
        check_range("return_plenum_fraction", self.return_plenum_fraction, 0.0, 1.0, "(fraction)")
        EconomizerControl.parse(self.economizer, "economizer")
        check_range("economizer_drybulb_limit", self.economizer_drybulb_limit, -10.0, 40.0, "°C")
        check_range(
            "economizer_enthalpy_limit", self.economizer_enthalpy_limit, 10.0, 120.0, "kJ/kg"
        )
        for name in ("recovery_sensible_effectiveness", "recovery_latent_effectiveness"):
            check_range(name, getattr(self, name), 0.0, 0.95, "(fraction)")
        _optional(
            "preheat_drybulb",
            self.preheat_drybulb,
            -20.0,
            min(20.0, float(self.supply_drybulb)),
            "°C",
        )
        _choice("coil_model", self.coil_model, COIL_MODELS)
        check_range(
            "bypass_factor", self.bypass_factor, 0.0, 1.0, "(fraction)", high_inclusive=False
        )
        check_range("apparatus_dew_point_min", self.apparatus_dew_point_min, -5.0, 20.0, "°C")
        if self.coil_model == "apparatus_dew_point":
            if self.apparatus_dew_point is None:
                raise InputRangeError(
                    "apparatus_dew_point",
                    "coil_model 'apparatus_dew_point' needs apparatus_dew_point [°C]; "
                    "allowed 0 to below supply_drybulb °C",
                    "0 to below supply_drybulb °C",
                )
            check_range(
                "apparatus_dew_point",
                self.apparatus_dew_point,
                max(0.0, float(self.apparatus_dew_point_min)),
                min(25.0, float(self.supply_drybulb)),
                "°C",
                high_inclusive=False,
            )
        if self.coil_model == "leaving_dew_point":
            if self.leaving_dew_point is None:
                raise InputRangeError(
                    "leaving_dew_point",
                    "coil_model 'leaving_dew_point' needs leaving_dew_point [°C]; "
                    "allowed 0 to supply_drybulb °C",
                    "0 to supply_drybulb °C",
                )
            check_range(
                "leaving_dew_point",
                self.leaving_dew_point,
                max(0.0, float(self.apparatus_dew_point_min)),
                min(25.0, float(self.supply_drybulb)),
                "°C",
            )
        _choice("fan_schedule", self.fan_schedule, FAN_SCHEDULES)
        _choice("low_load_response", self.low_load_response, LOW_LOAD_RESPONSES)
        _choice("reheat_source", self.reheat_source, REHEAT_SOURCES)
        check_range(
            "coil_runaround_effectiveness",
            self.coil_runaround_effectiveness,
            0.0,
            0.9,
            "(fraction)",
        )
        self._check_humidity_control()
        self._check_unoccupied_and_design_airflow()
        _optional(
            "ventilation_airflow_required",
            self.ventilation_airflow_required,
            0.0,
            self.supply_airflow,
            "m³/s",
        )
        self._check_ventilation_floor()

    def _check_humidity_control(self):
        if self.zone_relative_humidity_max is None:
            return
        check_range(
            "zone_relative_humidity_max",
            self.zone_relative_humidity_max,
            0.3,
            float(self.zone_relative_humidity_limit),
            "(fraction)",
        )
        if self.coil_model != "bypass_factor":
            raise InputRangeError(
                "zone_relative_humidity_max",
                f"zone_relative_humidity_max drives a bypass-factor coil colder; with "
                f"coil_model = {self.coil_model!r} it cannot (a leaving-dew-point coil holds "
                "the humidity: lower its leaving_dew_point; a fixed apparatus dew point cannot "
                "go colder); allowed: coil_model 'bypass_factor', or no "
                "zone_relative_humidity_max",
                "coil_model 'bypass_factor'",
            )

    def _check_unoccupied_and_design_airflow(self):
        _choice("design_airflow", self.design_airflow, DESIGN_AIRFLOWS)
        _choice("unoccupied_heating", self.unoccupied_heating, UNOCCUPIED_HEATING)
        _optional(
            "night_setback_drybulb",
            self.night_setback_drybulb,
            5.0,
            self.zone_heating_drybulb,
            "°C",
        )
        if self.unoccupied_heating == "night_cycle" and self.all_outdoor_air:
            raise InputRangeError(
                "unoccupied_heating",
                "unoccupied_heating = 'night_cycle' recirculates with the outdoor damper closed, "
                "which a 100 % outdoor-air unit (all_outdoor_air = true) cannot; allowed: "
                "'terminal' for this unit",
                "'terminal'",
            )

    def _check_ventilation_floor(self):
        """Refuse minimum outdoor air below the ventilation need at the lowest airflow."""
        need = self.ventilation_airflow_required
        if need is None:
            return
        lowest = self.supply_airflow * (
            self.minimum_airflow_fraction if self.fan_control == "variable_volume" else 1.0
        )
        if self.all_outdoor_air:
            field, given = "minimum_airflow_fraction", lowest
            allowed = f"at least {need / self.supply_airflow:.3g} (fraction)"
        elif self.minimum_outdoor_airflow is not None:
            field, given = "minimum_outdoor_airflow", min(self.minimum_outdoor_airflow, lowest)
            allowed = f"at least {need:.4g} m³/s"
        else:
            field, given = (
                "minimum_outdoor_air_fraction",
                self.minimum_outdoor_air_fraction * lowest,
            )
            allowed = f"at least {need / lowest:.3g} (fraction)"
        if given < need * (1.0 - 1e-9):
            raise InputRangeError(
                field,
                f"{field} gives {given:.4g} m³/s of outdoor air at the lowest supply airflow "
                f"({lowest:.4g} m³/s), below the ventilation need "
                f"(ventilation_airflow_required = {need:.4g} m³/s); allowed: {allowed}",
                allowed,
            )

    # ------------------------------------------------------------------ derived values
    @property
    def economizer_control(self) -> EconomizerControl:
        """The economizer control type as an enum."""
        return EconomizerControl.parse(self.economizer)

    @property
    def variable_volume(self) -> bool:
        """True for a variable-volume fan."""
        return self.fan_control == "variable_volume"

    def dry_air_density(self, pressure):
        """Dry-air mass per unit volume of the airflow basis [kg/m³] at a pressure [Pa].

        Standard basis: 1.2014 kg/m³ (0.075 lb/ft³, common practice). Actual basis:
        1/v of saturated air at ``supply_drybulb`` and ``pressure`` (ASHRAE Handbook
        Fundamentals 2017 Ch. 1, Eqs. 23 and 26).
        """
        p = np.asarray(pressure, dtype=float)
        if self.airflow_basis == "standard":
            return np.full(p.shape, STANDARD_AIR_DENSITY)[()]
        from plantside.air.moist_air import (
            saturation_humidity_ratio,
            specific_volume_from_humidity_ratio,
        )

        t = float(self.supply_drybulb)
        w = saturation_humidity_ratio(t, p, check=False)
        return 1.0 / specific_volume_from_humidity_ratio(t, w, p, check=False)
