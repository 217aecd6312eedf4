"""Hourly zone loads from a few design numbers: the modified bin method, vectorised.

In the modified bin method [1], [2] the zone loads are straight lines in the
outdoor dry bulb, with separate lines for the occupied and the unoccupied
periods. plantside builds those lines from numbers a designer has at hand:

- the design sensible and latent zone loads at the cooling design outdoor dry bulb
  (occupied), and the share of the sensible load that is internal gains
  (people, lights, equipment);
- the heating design load (envelope heat loss, no internal gains, no sun) at the
  heating design outdoor dry bulb;
- the occupied schedule and the share of internal gains and latent load that
  remains when unoccupied.

The envelope line passes through the two design points; internal gains add on
top, fully when occupied and reduced when unoccupied::

    Q_env(t_o)  = (1 - f_int) Q_c + k (t_o - t_c),   k = ((1 - f_int) Q_c + Q_h) / (t_c - t_h)
    Q_sens(t_o) = Q_env(t_o) + f_int Q_c      (occupied)
                = Q_env(t_o) + f_u f_int Q_c  (unoccupied)
    Q_lat       = Q_L (occupied),  f_uL Q_L (unoccupied)

A positive sensible load needs cooling, a negative one heating. Latent load is
taken as scheduled, not temperature dependent (people and processes; latent load
of infiltration is not separated).

Shape in time (all optional, so a zone stated by the design numbers alone keeps the
straight lines above):

- occupancy: weekday hours, and weekend hours when ``occupied_days = "weekdays"``;
- internal gains: a 24-value profile of the share of the internal gains present in each
  occupied hour (lights and equipment that ramp with the day), instead of 1;
- solar gain through glazing: areas facing north, east, south and west, a solar heat
  gain coefficient and an interior attenuation coefficient. Then the solar gain
  follows the sun (an east zone peaks in the morning, a west zone in the afternoon)
  and is *added* to the lines, so ``cooling_design_sensible`` is the zone's load at the
  cooling design dry bulb *without* the solar gain through that glazing::

      Q_solar(h) = SHGC x IAC x sum_i A_i E_i(h) / 1000

  with E_i the irradiance incident on the glazing facing i [W/m²]. This layer does not
  place the sun: the caller attaches the hourly gains of the site
  (:meth:`ZoneLoadModel.with_solar_gain`; :mod:`plantside.study.solar_gains` builds them
  from the clear-sky model of :mod:`plantside.climate.solar`).

Limits: without glazing, solar gain is folded into the envelope line at the cooling
design point, so it follows outdoor temperature rather than the sun's position; with
glazing, every day is clear (the gains are clear-sky gains: an upper bound on cloudy
days) and the SHGC does not fall at steep angles of incidence; no thermal storage in
the structure (loads appear in the hour they occur); no night setback or morning
pull-down.

Units: loads [kW], temperatures [°C], fractions [-].

References
----------
[1] Knebel, D.E., 1983. Simplified Energy Analysis Using the Modified Bin Method.
    ASHRAE, Atlanta.
[2] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 19, Energy
    Estimating and Modeling Methods, "Data-driven/simplified methods: bin method"
    (chapter section from memory).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from plantside.errors import InputRangeError, check_range

__all__ = [
    "GLAZING_AZIMUTHS",
    "LOAD_LIMIT_KW",
    "HourlyZoneLoads",
    "ZoneLoadModel",
    "ZoneSolarGain",
    "design_zone_loads",
    "occupied_from_hour_of_year",
    "solar_gain_from_irradiance",
    "zone_loads_for_weather",
    "zone_loads_from_model",
]

#: Largest zone load accepted for one air handler [kW] (a sanity bound, not physics).
LOAD_LIMIT_KW = 100_000.0
#: Largest glazing area of one orientation [m²] (a sanity bound).
GLAZING_AREA_LIMIT = 1_000_000.0
#: The glazing fields and the compass bearing each faces, clockwise from north [°].
GLAZING_AZIMUTHS = {
    "glazing_area_north": 0.0,
    "glazing_area_east": 90.0,
    "glazing_area_south": 180.0,
    "glazing_area_west": 270.0,
}


@dataclass(frozen=True, eq=False)
class ZoneSolarGain:
    """Solar heat gain through a zone's glazing at a site.

    Parameters
    ----------
    hourly : numpy.ndarray
        Gain of each hour of the weather year [kW], >= 0.
    design : float
        Gain added at the cooling design point [kW], >= 0.
    """

    hourly: np.ndarray
    design: float

    def __post_init__(self):
        hourly = check_range(
            "solar_gain", np.atleast_1d(self.hourly), 0.0, LOAD_LIMIT_KW, "kW"
        ).astype(float)
        hourly.setflags(write=False)
        object.__setattr__(self, "hourly", hourly)
        design = float(check_range("design solar_gain", self.design, 0.0, LOAD_LIMIT_KW, "kW"))
        object.__setattr__(self, "design", design)


def _check_int(field, value, low, high):
    if isinstance(value, bool) or not float(value).is_integer():
        raise InputRangeError(
            field,
            f"{field} = {value!r} must be a whole number from {low} to {high}",
            f"{low}..{high}",
        )
    check_range(field, float(value), low, high, "")
    return int(value)


@dataclass(frozen=True)
class ZoneLoadModel:
    """Zone loads stated by design numbers, expanded to hours by the modified bin method.

    Parameters
    ----------
    cooling_design_sensible : float
        Zone sensible cooling load at the cooling design dry bulb, occupied [kW], > 0.
    cooling_design_latent : float
        Zone latent load when occupied [kW], >= 0.
    cooling_design_drybulb : float
        Outdoor dry bulb of the cooling design loads [°C], -10 to 60.
    heating_design_load : float
        Zone heat loss at the heating design dry bulb (envelope, no internal gains) [kW], >= 0.
    heating_design_drybulb : float
        Outdoor dry bulb of the heating design load [°C], -60 to 20, at least 5 K below
        ``cooling_design_drybulb``.
    internal_fraction : float
        Share of ``cooling_design_sensible`` from internal gains [-], 0 to 1.
    unoccupied_internal_fraction : float
        Share of the internal gains still present when unoccupied [-], 0 to 1.
    unoccupied_latent_fraction : float
        Share of the latent load present when unoccupied [-], 0 to 1.
    occupied_start_hour, occupied_end_hour : int
        Occupied period [h]: from start (0-23) up to but not including end (1-24).
    occupied_days : str
        ``"weekdays"`` (Monday to Friday) or ``"all"``.
    first_weekday : int
        Weekday of the first day of the record (0 = Monday ... 6 = Sunday).
    weekend_occupied_start_hour, weekend_occupied_end_hour : int
        Occupied period on Saturdays and Sundays when ``occupied_days = "weekdays"`` [h];
        equal values (the default, 0 and 0) leave the weekend unoccupied.
    internal_gain_profile : tuple of float, optional
        24 shares [-], 0 to 1, of the internal gains present in each occupied hour
        (index 0 is 0:00-1:00); ``None`` means 1 in every occupied hour. Unoccupied hours
        keep ``unoccupied_internal_fraction``.
    glazing_area_north, glazing_area_east, glazing_area_south, glazing_area_west : float
        Glazing area facing each way [m²], >= 0; all 0 (the default) folds the solar
        gain into ``cooling_design_sensible`` as before.
    solar_heat_gain_coefficient : float
        Solar heat gain coefficient (SHGC) of the glazing [-], 0 to 1, at normal incidence.
    interior_attenuation_coefficient : float
        Interior attenuation coefficient (IAC) of blinds or shades [-], 0 to 1; 1 = none.
    """

    cooling_design_sensible: float
    cooling_design_latent: float = 0.0
    cooling_design_drybulb: float = 35.0
    heating_design_load: float = 0.0
    heating_design_drybulb: float = -10.0
    internal_fraction: float = 0.5
    unoccupied_internal_fraction: float = 0.1
    unoccupied_latent_fraction: float = 0.1
    occupied_start_hour: int = 7
    occupied_end_hour: int = 18
    occupied_days: str = "weekdays"
    first_weekday: int = 0
    weekend_occupied_start_hour: int = 0
    weekend_occupied_end_hour: int = 0
    internal_gain_profile: tuple[float, ...] | None = None
    glazing_area_north: float = 0.0
    glazing_area_east: float = 0.0
    glazing_area_south: float = 0.0
    glazing_area_west: float = 0.0
    solar_heat_gain_coefficient: float = 0.4
    interior_attenuation_coefficient: float = 1.0
    #: The site's solar gain, attached by :meth:`with_solar_gain` (not an input field).
    solar_gain: ZoneSolarGain | None = field(default=None, init=False, compare=False, repr=False)

    def __post_init__(self):
        for name, value in vars(self).items():
            if name in ("occupied_days", "internal_gain_profile", "solar_gain"):
                continue
            if isinstance(value, bool | np.bool_) or not isinstance(value, int | float | np.number):
                raise InputRangeError(
                    name, f"{name} = {value!r} must be a number, not text or true/false", "a number"
                )
        check_range(
            "cooling_design_sensible",
            self.cooling_design_sensible,
            0.0,
            LOAD_LIMIT_KW,
            "kW",
            low_inclusive=False,
        )
        check_range("cooling_design_latent", self.cooling_design_latent, 0.0, LOAD_LIMIT_KW, "kW")
        check_range("cooling_design_drybulb", self.cooling_design_drybulb, -10.0, 60.0, "°C")
        check_range("heating_design_load", self.heating_design_load, 0.0, LOAD_LIMIT_KW, "kW")
        check_range(
            "heating_design_drybulb",
            self.heating_design_drybulb,
            -60.0,
            min(20.0, float(self.cooling_design_drybulb) - 5.0),
            "°C",
        )
        for name in ("internal_fraction", "unoccupied_internal_fraction"):
            check_range(name, getattr(self, name), 0.0, 1.0, "(fraction)")
        check_range(
            "unoccupied_latent_fraction", self.unoccupied_latent_fraction, 0.0, 1.0, "(fraction)"
        )
        start = _check_int("occupied_start_hour", self.occupied_start_hour, 0, 23)
        _check_int("occupied_end_hour", self.occupied_end_hour, start + 1, 24)
        if self.occupied_days not in ("weekdays", "all"):
            raise InputRangeError(
                "occupied_days",
                f"occupied_days = {self.occupied_days!r}; allowed 'weekdays' or 'all'",
                "'weekdays' or 'all'",
            )
        _check_int("first_weekday", self.first_weekday, 0, 6)
        weekend = _check_int("weekend_occupied_start_hour", self.weekend_occupied_start_hour, 0, 23)
        _check_int("weekend_occupied_end_hour", self.weekend_occupied_end_hour, weekend, 24)
        if self.internal_gain_profile is not None:
            profile = self.internal_gain_profile
            if isinstance(profile, str | bytes) or np.ndim(profile) != 1 or len(profile) != 24:
                raise InputRangeError(
                    "internal_gain_profile",
                    f"internal_gain_profile = {profile!r} must be 24 numbers, one per hour",
                    "24 numbers from 0 to 1",
                )
            if any(isinstance(v, bool) or not isinstance(v, int | float) for v in profile):
                raise InputRangeError(
                    "internal_gain_profile",
                    f"internal_gain_profile = {profile!r} must hold numbers only",
                    "24 numbers from 0 to 1",
                )
            check_range("internal_gain_profile", profile, 0.0, 1.0, "(fraction)")
            object.__setattr__(self, "internal_gain_profile", tuple(float(v) for v in profile))
        for name in GLAZING_AZIMUTHS:
            check_range(name, getattr(self, name), 0.0, GLAZING_AREA_LIMIT, "m²")
        check_range("solar_heat_gain_coefficient", self.solar_heat_gain_coefficient, 0.0, 1.0, "")
        check_range(
            "interior_attenuation_coefficient", self.interior_attenuation_coefficient, 0.0, 1.0, ""
        )

    @property
    def has_glazing(self) -> bool:
        """Whether any glazing area is given (then the solar gain is computed by hour)."""
        return any(getattr(self, name) > 0.0 for name in GLAZING_AZIMUTHS)

    def with_solar_gain(self, solar_gain: ZoneSolarGain) -> ZoneLoadModel:
        """A copy carrying the site's solar gain through this zone's glazing."""
        if not isinstance(solar_gain, ZoneSolarGain):
            raise InputRangeError(
                "solar_gain", "solar_gain must be a ZoneSolarGain", "ZoneSolarGain"
            )
        copy = replace(self)
        object.__setattr__(copy, "solar_gain", solar_gain)
        return copy

    @property
    def envelope_slope(self) -> float:
        """Slope of the envelope load line [kW/K]."""
        q_env_cooling = (1.0 - self.internal_fraction) * self.cooling_design_sensible
        return (q_env_cooling + self.heating_design_load) / (
            self.cooling_design_drybulb - self.heating_design_drybulb
        )

    @property
    def balance_drybulb(self) -> float:
        """Outdoor dry bulb where the occupied sensible load is zero [°C]."""
        return self.cooling_design_drybulb - self.cooling_design_sensible / self.envelope_slope


@dataclass(frozen=True, eq=False)
class HourlyZoneLoads:
    """Zone loads of each hour, as the air handler consumes them.

    Parameters
    ----------
    sensible : numpy.ndarray
        Zone sensible load [kW]; positive needs cooling, negative heating.
    latent : numpy.ndarray
        Zone latent load [kW] (moisture gain, as vapour at zone temperature).
    internal_sensible : numpy.ndarray, optional
        Internal sensible gains included in ``sensible`` [kW], >= 0 (the return-plenum
        share is taken from these). Defaults to max(sensible, 0).
    occupied : numpy.ndarray of bool, optional
        Occupied hours. Defaults to all True.
    source : str
        Where the loads came from ("model" or a file name).
    notes : tuple of str
        Notes made while the loads were built (e.g. columns ignored on import).
    """

    sensible: np.ndarray
    latent: np.ndarray
    internal_sensible: np.ndarray | None = None
    occupied: np.ndarray | None = None
    source: str = ""
    notes: tuple = ()

    def __post_init__(self):
        sensible = check_range(
            "zone sensible load", np.atleast_1d(self.sensible), -LOAD_LIMIT_KW, LOAD_LIMIT_KW, "kW"
        ).astype(float)
        n = sensible.size
        latent = np.atleast_1d(np.asarray(self.latent, dtype=float))
        if latent.shape != sensible.shape:
            latent = np.broadcast_to(latent, sensible.shape).copy()
        check_range("zone latent load", latent, -LOAD_LIMIT_KW, LOAD_LIMIT_KW, "kW")
        if self.internal_sensible is None:
            internal = np.maximum(sensible, 0.0)
        else:
            internal = np.broadcast_to(np.asarray(self.internal_sensible, float), (n,)).copy()
            check_range("zone internal sensible gain", internal, 0.0, LOAD_LIMIT_KW, "kW")
        if self.occupied is None:
            occupied = np.ones(n, dtype=bool)
        else:
            occupied = np.broadcast_to(np.asarray(self.occupied, dtype=bool), (n,)).copy()
        for name, value in (
            ("sensible", sensible),
            ("latent", latent),
            ("internal_sensible", internal),
            ("occupied", occupied),
        ):
            value = value.reshape(-1)
            value.setflags(write=False)
            object.__setattr__(self, name, value)

    @property
    def hours(self) -> int:
        """Number of hours."""
        return int(self.sensible.size)


def occupied_from_hour_of_year(
    hour_of_year,
    start_hour=7,
    end_hour=18,
    days="weekdays",
    first_weekday=0,
    weekend_start_hour=0,
    weekend_end_hour=0,
):
    """Occupied flag of each hour.

    Parameters
    ----------
    hour_of_year : array_like of int
        Hour index from local midnight of the first day [h].
    start_hour, end_hour : int
        Occupied from ``start_hour`` up to (not including) ``end_hour`` [h of day].
    days : str
        ``"weekdays"`` (Monday to Friday) or ``"all"``.
    first_weekday : int
        Weekday of the first day (0 = Monday).
    weekend_start_hour, weekend_end_hour : int
        Occupied period on Saturdays and Sundays with ``days="weekdays"`` [h of day];
        equal values: unoccupied.

    Returns
    -------
    numpy.ndarray of bool
    """
    hours = np.asarray(hour_of_year, dtype=np.int64)
    hour_of_day = hours % 24
    occupied = (hour_of_day >= start_hour) & (hour_of_day < end_hour)
    if days == "weekdays":
        weekday = (hours // 24 + first_weekday) % 7
        weekend = (hour_of_day >= weekend_start_hour) & (hour_of_day < weekend_end_hour)
        occupied = np.where(weekday < 5, occupied, weekend)
    return occupied


def solar_gain_from_irradiance(model: ZoneLoadModel, irradiance):
    """Solar heat gain through a zone's glazing [kW].

    .. math:: Q_{solar} = SHGC \\cdot IAC \\sum_i A_i E_i / 1000

    Parameters
    ----------
    model : ZoneLoadModel
        The zone (glazing areas [m²], SHGC and IAC [-]).
    irradiance : array_like
        Shape (4, hours): irradiance incident on glazing facing north, east, south and
        west, in the order of :data:`GLAZING_AZIMUTHS` [W/m²].

    Returns
    -------
    numpy.ndarray
        Solar heat gain of each hour [kW].

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 (SI), Ch. 15 "Fenestration": solar heat gain as
    SHGC times incident irradiance, reduced by the interior attenuation coefficient
    (simplified here: one SHGC for beam and diffuse, no angle dependence).
    """
    e = np.asarray(irradiance, dtype=float)
    if e.ndim != 2 or e.shape[0] != len(GLAZING_AZIMUTHS):
        raise InputRangeError(
            "irradiance",
            f"irradiance must have shape (4, hours), got {e.shape}",
            "(4, hours) for north, east, south, west",
        )
    areas = np.array([getattr(model, name) for name in GLAZING_AZIMUTHS])
    factor = model.solar_heat_gain_coefficient * model.interior_attenuation_coefficient
    return factor * (areas @ e) / 1000.0


def _solar_gain(model: ZoneLoadModel, hours: int, design: bool):
    """The attached solar gain of ``hours`` hours (or its design value), 0 without glazing."""
    if not model.has_glazing:
        return 0.0
    if model.solar_gain is None:
        raise InputRangeError(
            "solar_gain",
            "the zone has glazing but no solar gain attached; build its hourly loads with "
            "the site (plantside.study.solar_gains.zone_with_solar_gain)",
            "a ZoneSolarGain for the weather year",
        )
    if design:
        return model.solar_gain.design
    if model.solar_gain.hourly.size != hours:
        raise InputRangeError(
            "solar_gain",
            f"the zone's solar gain has {model.solar_gain.hourly.size} hours but the outdoor "
            f"record has {hours}",
            f"{hours} hours",
        )
    return model.solar_gain.hourly


def zone_loads_from_model(model: ZoneLoadModel, drybulb, hour_of_year=None, occupied=None):
    r"""Hourly zone loads by the modified bin method.

    Parameters
    ----------
    model : ZoneLoadModel
        The design numbers.
    drybulb : array_like
        Outdoor dry bulb of each hour [°C].
    hour_of_year : array_like of int, optional
        Hour index of each value (for the schedule); defaults to 0..N-1.
    occupied : array_like of bool, optional
        Occupied flags, overriding the model's schedule.

    Returns
    -------
    HourlyZoneLoads
        With glazing, the sensible load includes the attached hourly solar gain
        (:meth:`ZoneLoadModel.with_solar_gain`).

    Notes
    -----
    .. math::

        Q_{env}(t_o) = (1 - f_{int}) Q_c + k (t_o - t_c), \quad
        k = \frac{(1 - f_{int}) Q_c + Q_h}{t_c - t_h},

        Q_{sens} = Q_{env} + f_{int} Q_c \ \text{(occupied)}, \quad
        Q_{env} + f_u f_{int} Q_c \ \text{(unoccupied)}

    References
    ----------
    Knebel (1983), Simplified Energy Analysis Using the Modified Bin Method, ASHRAE:
    loads linear in outdoor temperature, occupied and unoccupied lines.

    Examples
    --------
    >>> model = ZoneLoadModel(cooling_design_sensible=50.0, heating_design_load=40.0)
    >>> zone_loads_from_model(model, [35.0, 20.0, -10.0], occupied=[True, True, False]).sensible
    array([ 50.        ,  28.33333333, -37.5       ])
    """
    t = np.atleast_1d(np.asarray(drybulb, dtype=float))
    check_range("outdoor drybulb", t, -100.0, 70.0, "°C")
    if occupied is None:
        hours = np.arange(t.size) if hour_of_year is None else np.asarray(hour_of_year)
        occupied = occupied_from_hour_of_year(
            hours,
            model.occupied_start_hour,
            model.occupied_end_hour,
            model.occupied_days,
            model.first_weekday,
            model.weekend_occupied_start_hour,
            model.weekend_occupied_end_hour,
        )
    occupied = np.broadcast_to(np.asarray(occupied, dtype=bool), t.shape)
    internal, envelope = _internal_and_envelope(model, t, occupied, hour_of_year)
    envelope = envelope + _solar_gain(model, t.size, design=False)
    latent = np.where(
        occupied,
        model.cooling_design_latent,
        model.unoccupied_latent_fraction * model.cooling_design_latent,
    )
    return HourlyZoneLoads(
        sensible=envelope + internal,
        latent=latent,
        internal_sensible=internal,
        occupied=occupied,
        source="model",
    )


def _internal_and_envelope(model, t, occupied, hour_of_year, design=False):
    """Internal gains [kW] and envelope line [kW] of each hour (no solar gain)."""
    q_c = float(model.cooling_design_sensible)
    q_internal = model.internal_fraction * q_c
    envelope = (1.0 - model.internal_fraction) * q_c + model.envelope_slope * (
        t - model.cooling_design_drybulb
    )
    share = 1.0
    if model.internal_gain_profile is not None:
        profile = np.asarray(model.internal_gain_profile)
        if design:
            share = float(profile.max())
        else:
            hours = np.arange(t.size) if hour_of_year is None else np.asarray(hour_of_year)
            share = profile[np.asarray(hours, dtype=np.int64) % 24]
    internal = np.where(
        occupied, share * q_internal, model.unoccupied_internal_fraction * q_internal
    )
    return internal, envelope


def zone_loads_for_weather(model: ZoneLoadModel, weather) -> HourlyZoneLoads:
    """Hourly zone loads for every hour of a :class:`plantside.climate.weather.Weather` record."""
    return zone_loads_from_model(model, weather.drybulb, weather.hour_of_year)


def design_zone_loads(model: ZoneLoadModel, outdoor_drybulb, occupied=True) -> HourlyZoneLoads:
    """Zone loads of one design hour at an outdoor dry bulb [°C] (occupied by default).

    The internal gains are the largest share of ``internal_gain_profile`` (1 without
    one); with glazing the attached design solar gain is added when occupied.
    """
    t = np.atleast_1d(np.asarray(outdoor_drybulb, dtype=float))
    check_range("outdoor drybulb", t, -100.0, 70.0, "°C")
    occupied = np.broadcast_to(np.asarray(occupied, dtype=bool), t.shape)
    internal, envelope = _internal_and_envelope(model, t, occupied, None, design=True)
    solar = np.where(occupied, _solar_gain(model, t.size, design=True), 0.0)
    latent = np.where(
        occupied,
        model.cooling_design_latent,
        model.unoccupied_latent_fraction * model.cooling_design_latent,
    )
    return HourlyZoneLoads(
        sensible=envelope + solar + internal,
        latent=latent,
        internal_sensible=internal,
        occupied=occupied,
        source="model",
    )
