"""24-hour design-day profiles from a design condition and a daily range.

The dry bulb of hour :math:`h` follows the fraction-of-daily-range profile of
the ASHRAE Handbook Fundamentals climatic design chapter [1]:

.. math:: t_{db}(h) = t_{db,design} - f(h)\\,\\Delta t_{db}

where :math:`f(h)` is the tabulated fraction (0 at the afternoon peak, 1 at
the early-morning low) and :math:`\\Delta t_{db}` the daily range (for cooling,
usually the mean daily range of the warmest month).

Clock convention: the returned record has 24 hours, index ``i = 0..23``; index
``i`` is the value at clock time ``i:00`` local standard time, so the table's
hour 24 (midnight) is index 0 and the table's hour ``i`` is index ``i`` for
``i = 1..23``.

Humidity, two rules (choose with ``humidity=``):

``"constant_humidity_ratio"`` (default)
    The humidity ratio stays at the design condition's value all day, capped at
    saturation at each hour's dry bulb: :math:`W(h) = \\min(W_{design},
    W_s(t_{db}(h), p))`. A note counts the capped hours. This is the simple
    rule of keeping the coincident moisture content constant through the day
    (common practice (no source) for a first pass); it keeps the dew point
    constant, so the wet bulb falls with the dry bulb.
``"wet_bulb_range"``
    The wet bulb follows the same fraction profile with its own daily range,
    :math:`t_{wb}(h) = t_{wb,design} - f(h)\\,\\Delta t_{wb}`, as the handbook
    describes for its mean coincident wet-bulb daily range [1]; each hour's
    wet bulb is capped at its dry bulb and the humidity ratio follows from the
    pair. ``wet_bulb_range`` [K] must then be given.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 14, Climatic
    Design Information, Table 6 "Fraction of Daily Temperature Range" and the
    accompanying text on generating design-day profiles (t = t_design - f Δt for
    the dry bulb and, with the wet-bulb range, for the wet bulb; cited from
    memory, equation numbers not confirmed).
"""

from __future__ import annotations

import numpy as np

from plantside.air import moist_air
from plantside.climate.design_conditions import DesignCondition, DesignConditions
from plantside.climate.weather import Weather
from plantside.errors import InputRangeError, check_range

__all__ = [
    "DAILY_RANGE_FRACTION",
    "cooling_design_day",
    "design_day_from_condition",
    "heating_design_day",
]

#: Fraction of the daily dry-bulb range below the daily maximum, by clock hour.
#: Index i is clock time i:00 (index 0 = midnight = the table's hour 24).
#: Values: ASHRAE Handbook Fundamentals 2017 (SI), Ch. 14, Table 6, "Fraction of
#: Daily Temperature Range" (hours 1..24: 0.88 0.92 0.95 0.98 1.00 0.98 0.91 0.74
#: 0.55 0.38 0.23 0.13 0.05 0.00 0.00 0.06 0.14 0.24 0.39 0.50 0.59 0.68 0.75 0.82).
#: Written FROM MEMORY: the handbook was not at hand to confirm them; the shape
#: (minimum 1.00 at 05:00, maximum 0.00 at 14:00-15:00) is the published one.
DAILY_RANGE_FRACTION = np.array(
    [
        0.82,  # 00:00 (table hour 24)
        0.88,  # 01:00
        0.92,
        0.95,
        0.98,
        1.00,  # 05:00, daily minimum
        0.98,
        0.91,
        0.74,
        0.55,
        0.38,  # 10:00
        0.23,
        0.13,
        0.05,
        0.00,  # 14:00, daily maximum
        0.00,  # 15:00, daily maximum
        0.06,
        0.14,
        0.24,
        0.39,
        0.50,  # 20:00
        0.59,
        0.68,
        0.75,  # 23:00
    ]
)
DAILY_RANGE_FRACTION.setflags(write=False)

_HUMIDITY_RULES = ("constant_humidity_ratio", "wet_bulb_range")


def design_day_from_condition(
    condition: DesignCondition,
    daily_range: float,
    *,
    month: int = 7,
    site: str = "design day",
    humidity: str = "constant_humidity_ratio",
    wet_bulb_range: float | None = None,
    altitude: float | None = None,
) -> Weather:
    r"""A 24-hour weather record for one design day.

    Parameters
    ----------
    condition : DesignCondition
        The design condition; its dry bulb is the daily maximum (the profile's 0.00
        hours), its humidity ratio and pressure the outdoor moisture and pressure.
    daily_range : float
        Daily dry-bulb range [K], 0 to 30 (0 gives a constant day, e.g. for heating).
    month : int
        Calendar month the day belongs to, 1-12 (stored in the record).
    site : str
        Site name stored in the record.
    humidity : str
        ``"constant_humidity_ratio"`` or ``"wet_bulb_range"`` (see module notes).
    wet_bulb_range : float, optional
        Daily wet-bulb range [K], 0 to 15; required by ``"wet_bulb_range"``.
    altitude : float, optional
        Site altitude [m]; default from the condition's pressure (standard atmosphere).

    Returns
    -------
    Weather
        24 hours: dry bulb [°C], humidity ratio [kg/kg], pressure [Pa].

    Notes
    -----
    .. math::

        t_{db}(h) = t_{db,design} - f(h)\, \Delta t_{db}, \qquad
        W(h) = \min\left(W_{design},\ W_s(t_{db}(h), p)\right)

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 14, Table 6 (from memory, see
    :data:`DAILY_RANGE_FRACTION`).

    Examples
    --------
    >>> c = DesignCondition("cooling", 0.4, 32.0, 0.012, 101325.0, 16.8, 21.7, 62.9, "example")
    >>> day = design_day_from_condition(c, 10.0)
    >>> round(float(day.drybulb[5]), 1), round(float(day.drybulb[15]), 1)  # 05:00 low, 15:00 high
    (22.0, 32.0)
    """
    daily_range = float(check_range("daily_range", daily_range, 0.0, 30.0, "K"))
    month = int(check_range("month", month, 1, 12, ""))
    if humidity not in _HUMIDITY_RULES:
        raise InputRangeError(
            "humidity", f"humidity = {humidity!r} is not one of {_HUMIDITY_RULES}"
        )
    pressure = float(condition.pressure)
    drybulb = condition.drybulb - DAILY_RANGE_FRACTION * daily_range
    notes = [
        f"design day from {condition.label}; daily range {daily_range:.1f} K, "
        f"ASHRAE Fundamentals 2017 Ch. 14 Table 6 profile (values from memory)"
    ]
    saturation = moist_air.saturation_humidity_ratio(drybulb, pressure)
    if humidity == "wet_bulb_range":
        if wet_bulb_range is None:
            raise InputRangeError(
                "wet_bulb_range", "wet_bulb_range [K] is required with humidity='wet_bulb_range'"
            )
        wb_range = float(check_range("wet_bulb_range", wet_bulb_range, 0.0, 15.0, "K"))
        wet_bulb = np.minimum(condition.wet_bulb - DAILY_RANGE_FRACTION * wb_range, drybulb)
        humidity_ratio = moist_air.humidity_ratio_from_wet_bulb(drybulb, wet_bulb, pressure)
        humidity_ratio = np.clip(humidity_ratio, 0.0, saturation)
        notes.append(f"wet bulb follows the same profile with a {wb_range:.1f} K range")
    else:
        humidity_ratio = np.minimum(condition.humidity_ratio, saturation)
        capped = int(np.count_nonzero(condition.humidity_ratio > saturation))
        if capped:
            notes.append(
                f"humidity ratio capped at saturation in {capped} of 24 hours "
                f"(dry bulb fell to the dew point)"
            )
    if altitude is None:
        altitude = float(moist_air.altitude_from_pressure(pressure))
    return Weather(
        site=site,
        drybulb=drybulb,
        humidity_ratio=humidity_ratio,
        pressure=np.full(24, pressure),
        altitude=float(altitude),
        hour_of_year=np.arange(24),
        month=np.full(24, month),
        notes=tuple(notes),
    )


def cooling_design_day(
    conditions: DesignConditions,
    kind: str = "cooling",
    percent: float = 0.4,
    *,
    humidity: str = "constant_humidity_ratio",
    wet_bulb_range: float | None = None,
) -> Weather:
    """Cooling design day of a site: its design condition, warmest month and daily range.

    Parameters
    ----------
    conditions : DesignConditions
        The site's design conditions.
    kind : str
        ``"cooling"``, ``"dehumidification"`` or ``"enthalpy"``.
    percent : float
        0.4, 1 or 2 [%].
    humidity, wet_bulb_range
        As in :func:`design_day_from_condition`.

    Returns
    -------
    Weather
        24 hours peaking at the design dry bulb (the MCDB for dehumidification and
        enthalpy) with the mean daily range of the warmest month.
    """
    condition = conditions.cooling(kind, percent)
    return design_day_from_condition(
        condition,
        conditions.mean_daily_range,
        month=conditions.warmest_month,
        site=conditions.site,
        humidity=humidity,
        wet_bulb_range=wet_bulb_range,
    )


def heating_design_day(conditions: DesignConditions, percent: float = 99.6, month: int = 1):
    """Heating design day: the heating design dry bulb held for 24 hours.

    Heating design is a steady-state check at the design dry bulb (no solar or
    internal gains), so the day has no daily range (common practice (no source)).

    Parameters
    ----------
    conditions : DesignConditions
        The site's design conditions.
    percent : float
        99.6 or 99 [%].
    month : int
        Calendar month stored in the record, 1-12.

    Returns
    -------
    Weather
        24 constant hours.
    """
    condition = conditions.heating(percent)
    return design_day_from_condition(condition, 0.0, month=month, site=conditions.site)
