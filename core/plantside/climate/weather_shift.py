"""A weather year shifted warmer and more humid, for the climate stress test.

The shift is the "shift" operation of the morphing method of Belcher, Hacker and Powell
(2005): every hour's value is moved by the same amount, so the year keeps its weather
sequence, daily swings and spells while its level moves. The dry bulb is shifted
directly; the humidity is shifted as the dew point (then the humidity ratio follows from
the shifted dew point at the hour's pressure, ASHRAE Handbook Fundamentals 2017 Ch. 1
Eqs. 5/6 and 20), so a humid climate grows more humid by the same dew-point step as a dry
one. A shifted dew point above the hour's shifted dry bulb would be supersaturated air,
which no weather station reports: it is held at the dry bulb (saturated), and the hours
so held are counted.

References
----------
Belcher, S. E., Hacker, J. N. and Powell, D. S. (2005). Constructing design weather data
for future climates. Building Services Engineering Research and Technology 26(1),
49-61, Eq. 1 (shift: x = x0 + dx).
"""

from __future__ import annotations

from dataclasses import replace
from typing import NamedTuple

import numpy as np

from plantside.air.moist_air import (
    dew_point_from_humidity_ratio,
    humidity_ratio_from_dew_point,
)
from plantside.climate.weather import Weather
from plantside.errors import check_range

__all__ = [
    "DEW_POINT_SHIFT_RANGE",
    "DRYBULB_SHIFT_RANGE",
    "ShiftedWeather",
    "shifted_weather",
]

#: Dry-bulb shift the stress test accepts [K]: a warmer year, never a cooler one.
DRYBULB_SHIFT_RANGE = (0.0, 4.0)
#: Dew-point shift the stress test accepts [K].
DEW_POINT_SHIFT_RANGE = (0.0, 3.0)


class ShiftedWeather(NamedTuple):
    """A shifted year and what the shift had to hold back."""

    weather: Weather
    #: Dry-bulb shift applied [K].
    drybulb_shift: float
    #: Dew-point shift asked for [K].
    dew_point_shift: float
    #: Hours whose shifted dew point was held at the shifted dry bulb (saturated).
    saturated_hours: int


def shifted_weather(weather: Weather, drybulb_shift: float, dew_point_shift: float):
    """``weather`` with every hour's dry bulb and dew point raised by the given steps.

    Parameters
    ----------
    weather : Weather
        The year as recorded (SI).
    drybulb_shift : float
        Added to every hour's dry bulb [K], within :data:`DRYBULB_SHIFT_RANGE`.
    dew_point_shift : float
        Added to every hour's dew point [K], within :data:`DEW_POINT_SHIFT_RANGE`.

    Returns
    -------
    ShiftedWeather
        The shifted year (same site, pressures and calendar; a note says what was
        shifted) and the number of hours held at saturation.

    Notes
    -----
    Shift of the morphing method, Belcher, Hacker and Powell (2005) Eq. 1:

    .. math::

        t' = t + \\Delta t, \\qquad
        t_d' = \\min(t_d + \\Delta t_d,\\; t'), \\qquad
        W' = W_s(t_d', p)

    with :math:`t_d` the hour's dew point from its humidity ratio and pressure and
    :math:`W_s` the saturation humidity ratio (ASHRAE Handbook Fundamentals 2017
    Ch. 1 Eq. 20 with Eqs. 5/6).

    Examples
    --------
    >>> from plantside.climate.weather import Weather
    >>> year = Weather("Test", [30.0, 20.0], [0.015, 0.010], 101325.0)
    >>> shifted = shifted_weather(year, 2.0, 1.0)
    >>> [round(float(t), 1) for t in shifted.weather.drybulb]
    [32.0, 22.0]
    """
    drybulb_shift = float(check_range("drybulb_shift", drybulb_shift, *DRYBULB_SHIFT_RANGE, "K"))
    dew_point_shift = float(
        check_range("dew_point_shift", dew_point_shift, *DEW_POINT_SHIFT_RANGE, "K")
    )
    if drybulb_shift == 0.0 and dew_point_shift == 0.0:
        return ShiftedWeather(weather, 0.0, 0.0, 0)
    drybulb = weather.drybulb + drybulb_shift
    dew_point = dew_point_from_humidity_ratio(weather.humidity_ratio, weather.pressure)
    wanted = dew_point + dew_point_shift
    held = wanted > drybulb
    humidity_ratio = humidity_ratio_from_dew_point(np.minimum(wanted, drybulb), weather.pressure)
    note = (
        f"Shifted for the climate stress test: dry bulb +{drybulb_shift:g} K, dew point "
        f"+{dew_point_shift:g} K (Belcher, Hacker and Powell 2005, shift)"
    )
    if held.any():
        note += f"; {int(held.sum())} hours held at saturation"
    shifted = replace(
        weather,
        drybulb=drybulb,
        humidity_ratio=humidity_ratio,
        notes=(*weather.notes, note),
    )
    return ShiftedWeather(shifted, drybulb_shift, dew_point_shift, int(held.sum()))
