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

Limits: solar gain is folded into the envelope line at the cooling design
point, so it follows outdoor temperature rather than the sun's position; no
thermal storage in the structure (loads appear in the hour they occur); no
night setback or morning pull-down.

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

from dataclasses import dataclass

import numpy as np

from plantside.errors import InputRangeError, check_range

__all__ = [
    "LOAD_LIMIT_KW",
    "HourlyZoneLoads",
    "ZoneLoadModel",
    "design_zone_loads",
    "occupied_from_hour_of_year",
    "zone_loads_for_weather",
    "zone_loads_from_model",
]

#: Largest zone load accepted for one air handler [kW] (a sanity bound, not physics).
LOAD_LIMIT_KW = 100_000.0


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

    def __post_init__(self):
        for name, value in vars(self).items():
            if name == "occupied_days":
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
    hour_of_year, start_hour=7, end_hour=18, days="weekdays", first_weekday=0
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

    Returns
    -------
    numpy.ndarray of bool
    """
    hours = np.asarray(hour_of_year, dtype=np.int64)
    hour_of_day = hours % 24
    occupied = (hour_of_day >= start_hour) & (hour_of_day < end_hour)
    if days == "weekdays":
        weekday = (hours // 24 + first_weekday) % 7
        occupied &= weekday < 5
    return occupied


def zone_loads_from_model(model: ZoneLoadModel, drybulb, hour_of_year=None, occupied=None):
    """Hourly zone loads by the modified bin method.

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

    References
    ----------
    Knebel (1983), Simplified Energy Analysis Using the Modified Bin Method, ASHRAE:
    loads linear in outdoor temperature, occupied and unoccupied lines.
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
        )
    occupied = np.broadcast_to(np.asarray(occupied, dtype=bool), t.shape)
    q_c = float(model.cooling_design_sensible)
    q_internal = model.internal_fraction * q_c
    envelope = (1.0 - model.internal_fraction) * q_c + model.envelope_slope * (
        t - model.cooling_design_drybulb
    )
    internal = np.where(occupied, q_internal, model.unoccupied_internal_fraction * q_internal)
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


def zone_loads_for_weather(model: ZoneLoadModel, weather) -> HourlyZoneLoads:
    """Hourly zone loads for every hour of a :class:`plantside.climate.weather.Weather` record."""
    return zone_loads_from_model(model, weather.drybulb, weather.hour_of_year)


def design_zone_loads(model: ZoneLoadModel, outdoor_drybulb, occupied=True) -> HourlyZoneLoads:
    """Zone loads of one design hour at an outdoor dry bulb [°C] (occupied by default)."""
    return zone_loads_from_model(model, np.atleast_1d(outdoor_drybulb), occupied=occupied)
