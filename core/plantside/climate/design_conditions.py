"""Annual design conditions from a year (or more) of hourly weather.

The conditions follow the definitions of the climatic design chapter of the
ASHRAE Handbook Fundamentals [1] (Chapter 14 in the 2017 and 2021 editions):

========================  ==========================  ===================================
condition                 design value                coincident values
========================  ==========================  ===================================
cooling dry bulb          dry bulb at 0.4 / 1 / 2 %   mean coincident wet bulb (MCWB)
dehumidification          dew point at 0.4 / 1 / 2 %  humidity ratio; mean coincident dry
                                                      bulb (MCDB)
enthalpy                  enthalpy at 0.4 / 1 / 2 %   mean coincident dry bulb (MCDB)
evaporation               wet bulb at 0.4 / 1 / 2 %   mean coincident dry bulb (MCDB)
heating dry bulb          dry bulb at 99.6 / 99 %     mean coincident humidity ratio
                                                      (a plantside addition, see below)
mean daily range          of the warmest month        --
========================  ==========================  ===================================

Percentile definition (exact rule used here)
--------------------------------------------
For a record of :math:`N` hours and an annual percentage :math:`p`, the design
value :math:`X_p` is **the highest hourly value that is exceeded (strictly) by
at least** :math:`pN/100` **hours**:

.. math:: X_p = \\max\\{x_i : \\#\\{j : x_j > x_i\\} \\ge pN/100\\}

Because a count of hours is a whole number, "at least 87.6 hours" means at
least 88 hours. So for :math:`N = 8760`:

- 1 % (87.6 h): a value with exactly 88 hours above it is the 1 % value; a
  value with only 87 hours above it is not (it is exceeded by less than 1 %).
- 0.4 % (35.04 h): at least 36 hours above. 2 % (175.2 h): at least 176 hours.
- 99.6 % (8724.96 h): at least 8725 hours above; with distinct values this is
  the 35th-lowest hour (34 hours below it). 99 % (8672.4 h): at least 8673
  hours above, the 88th-lowest hour.

No interpolation is made between hours: the result is always one of the
recorded hourly values. With distinct values :math:`X_p` is the
:math:`(\\lceil pN/100 \\rceil + 1)`-th highest hour. When several hours share a
value (data rounded to 0.1 K), the value is the highest *distinct* recorded
value that still has at least :math:`pN/100` hours above it. The handbook works
from a frequency distribution of the observations (from memory: in bins of
0.1 K with interpolation), so its figures and these can differ by about one
recording step; that is well inside the year-to-year variation of any site.
The same rule serves cooling (small :math:`p`) and heating (large :math:`p`).
:math:`N` is the number of hours in the record (8760, 8784, or a multi-year
record pooled as one distribution).

Coincident means (exact rule used here)
---------------------------------------
A coincident value is the mean of the hourly values of the *other* quantity
over the hours whose *design* quantity lies in a band around the design value:

- MCWB of a cooling dry bulb: mean of the hourly wet bulbs over the hours whose
  dry bulb is within ``drybulb_band`` (default ±0.5 K, so a 1 K band) of the
  design dry bulb.
- MCDB of a dehumidification dew point: mean hourly dry bulb over the hours whose
  dew point is within ``dew_point_band`` (default ±0.5 K) of the design dew point.
- MCDB of an enthalpy condition: mean hourly dry bulb over the hours whose
  enthalpy is within ``enthalpy_band`` (default ±1.0 kJ/kg) of the design enthalpy.
- MCDB of an evaporation wet bulb: mean hourly dry bulb over the hours whose wet
  bulb is within ``wet_bulb_band`` (default ±0.5 K) of the design wet bulb. These
  conditions size cooling towers and evaporative equipment; they are kept apart from
  the others (:attr:`DesignConditions.evaporation_conditions`) because the air-handler
  design points are not evaluated at them.
- Heating: mean hourly humidity ratio over the hours whose dry bulb is within
  ``drybulb_band`` of the heating design dry bulb (the handbook tabulates
  humidification dew points instead; plantside needs one full outdoor state for
  the air-handler model, hence this addition).

Bands are inclusive. If fewer than ``min_coincident_hours`` hours fall in the
band, the band is doubled (up to six times) until enough hours are found, and
a note records it. The wet bulb of each hour is the thermodynamic wet bulb at
that hour's station pressure; the mean is taken of the wet bulbs themselves
(not the wet bulb of a mean state).

The humidity ratio of a dehumidification condition is the saturation humidity
ratio at the design dew point and the condition's pressure. The pressure of
every condition is the mean station pressure of the record (the handbook uses
the standard pressure at the station elevation, which the bundled climates
match to within their synoptic variation).

Mean daily range of the warmest month
-------------------------------------
The warmest month is the calendar month with the highest mean dry bulb. Each
complete day (24 consecutive hours from midnight) gives a range, max - min of
its hourly dry bulbs; the mean daily range is the mean of these over the days
of the warmest month.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 14, Climatic
    Design Information: annual design conditions (cooling, dehumidification,
    enthalpy, heating) and the mean daily temperature range of the hottest month.
"""

from __future__ import annotations

import hashlib
import math
import threading
from collections import OrderedDict
from dataclasses import dataclass, field, replace
from typing import NamedTuple

import numpy as np
import pandas as pd

from plantside.air import moist_air
from plantside.arrays import scalar_or_array
from plantside.climate.weather import Weather
from plantside.errors import InputRangeError, check_range
from plantside.units import to_display

__all__ = [
    "COOLING_PERCENTS",
    "HEATING_PERCENTS",
    "CoincidentMean",
    "DailyRange",
    "DesignCondition",
    "DesignConditions",
    "clear_design_conditions_cache",
    "coincident_mean",
    "design_condition_text",
    "design_conditions_from_weather",
    "mean_daily_range",
    "value_exceeded_by_percent",
]

#: Annual percentages of the cooling, dehumidification and enthalpy conditions [%] [1].
COOLING_PERCENTS = (0.4, 1.0, 2.0)
#: Annual percentages of the heating conditions [%] [1].
HEATING_PERCENTS = (99.6, 99.0)
#: Fewest hours in a record for annual percentiles to mean anything [h] (project rule:
#: 30 days; 0.4 % of 720 h is under 3 h).
MIN_RECORD_HOURS = 720

_KINDS = {
    "drybulb": "cooling",
    "cooling": "cooling",
    "dehumidification": "dehumidification",
    "dew_point": "dehumidification",
    "enthalpy": "enthalpy",
}


@dataclass(frozen=True)
class DesignCondition:
    """One annual design condition: a full outdoor air state with its label.

    Parameters
    ----------
    kind : str
        ``"cooling"`` (dry bulb with MCWB), ``"dehumidification"`` (dew point with
        MCDB), ``"enthalpy"`` (enthalpy with MCDB), ``"evaporation"`` (wet bulb with
        MCDB) or ``"heating"`` (dry bulb).
    percent : float
        Annual percentage [%]: 0.4, 1 or 2 for cooling kinds, 99.6 or 99 for heating.
    drybulb : float
        Dry bulb [°C]: the design value (cooling, heating) or the MCDB.
    humidity_ratio : float
        Humidity ratio [kg/kg dry air] of the state.
    pressure : float
        Station pressure [Pa] (mean of the record).
    dew_point : float
        Dew point [°C] of the state (the design value for dehumidification).
    wet_bulb : float
        Thermodynamic wet bulb [°C] of the state (the MCWB for cooling).
    enthalpy : float
        Enthalpy [kJ/kg dry air] of the state (the design value for enthalpy).
    label : str
        Short display label, e.g. ``"cooling 0.4 %: 35.1 °C DB / 25.9 °C MCWB"``.
    coincident_hours : int
        Number of hours the coincident mean was taken over.
    coincident_band : float
        Half-width of the band actually used [K, or kJ/kg for enthalpy].
    """

    kind: str
    percent: float
    drybulb: float
    humidity_ratio: float
    pressure: float
    dew_point: float
    wet_bulb: float
    enthalpy: float
    label: str
    coincident_hours: int = 0
    coincident_band: float = 0.0

    @property
    def design_value(self) -> float:
        """The design quantity itself [°C or kJ/kg]: DB, DP or enthalpy by kind."""
        if self.kind == "dehumidification":
            return self.dew_point
        if self.kind == "enthalpy":
            return self.enthalpy
        if self.kind == "evaporation":
            return self.wet_bulb
        return self.drybulb


@dataclass(frozen=True)
class DesignConditions:
    """All annual design conditions of one site.

    Parameters
    ----------
    site : str
        Site name.
    hours : int
        Number of hours in the record [h].
    conditions : tuple of DesignCondition
        Cooling, dehumidification and enthalpy conditions at 0.4/1/2 % and heating
        conditions at 99.6/99 %.
    warmest_month : int
        Calendar month (1-12) with the highest mean dry bulb.
    mean_daily_range : float
        Mean daily dry-bulb range of the warmest month [K].
    pressure : float
        Mean station pressure of the record [Pa].
    notes : tuple of str
        Notes (short record, widened coincident bands, ...).
    evaporation_conditions : tuple of DesignCondition
        Evaporation conditions (wet bulb with MCDB) at 0.4/1/2 %, for cooling towers.
    """

    site: str
    hours: int
    conditions: tuple[DesignCondition, ...]
    warmest_month: int
    mean_daily_range: float
    pressure: float
    notes: tuple[str, ...] = field(default=())
    evaporation_conditions: tuple[DesignCondition, ...] = field(default=())

    def cooling(self, kind: str = "cooling", percent: float = 0.4) -> DesignCondition:
        """The cooling-side condition of a kind at an annual percentage.

        Parameters
        ----------
        kind : str
            ``"cooling"`` (alias ``"drybulb"``), ``"dehumidification"`` (alias
            ``"dew_point"``) or ``"enthalpy"``.
        percent : float
            0.4, 1 or 2 [%].
        """
        if kind not in _KINDS:
            raise InputRangeError(
                "kind", f"kind = {kind!r} is not one of {sorted(_KINDS)}", str(sorted(_KINDS))
            )
        return self._find(_KINDS[kind], percent, COOLING_PERCENTS)

    def evaporation(self, percent: float = 0.4) -> DesignCondition:
        """The evaporation condition (wet bulb with MCDB) at 0.4, 1 or 2 [%]."""
        for condition in self.evaporation_conditions:
            if math.isclose(condition.percent, percent):
                return condition
        raise InputRangeError(
            "percent",
            f"percent = {percent!r} is not available for evaporation; allowed {COOLING_PERCENTS} %",
            str(COOLING_PERCENTS),
        )

    def heating(self, percent: float = 99.6) -> DesignCondition:
        """The heating condition at an annual percentage (99.6 or 99 [%])."""
        return self._find("heating", percent, HEATING_PERCENTS)

    def _find(self, kind, percent, allowed):
        for condition in self.conditions:
            if condition.kind == kind and math.isclose(condition.percent, percent):
                return condition
        raise InputRangeError(
            "percent",
            f"percent = {percent!r} is not available for {kind}; allowed {allowed} %",
            str(allowed),
        )

    def to_frame(self) -> pd.DataFrame:
        """One row per condition (tidy): kind, percent, label and the air state in SI.

        Columns: ``kind, percent, design_value, drybulb, wet_bulb, dew_point,
        humidity_ratio, enthalpy, pressure, coincident_hours, label``.
        """
        rows = [
            {
                "kind": c.kind,
                "percent": c.percent,
                "design_value": c.design_value,
                "drybulb": c.drybulb,
                "wet_bulb": c.wet_bulb,
                "dew_point": c.dew_point,
                "humidity_ratio": c.humidity_ratio,
                "enthalpy": c.enthalpy,
                "pressure": c.pressure,
                "coincident_hours": c.coincident_hours,
                "label": c.label,
            }
            for c in self.conditions
        ]
        return pd.DataFrame(rows)


def value_exceeded_by_percent(values, percent) -> np.ndarray:
    r"""Highest recorded value exceeded (strictly) by at least ``percent`` % of the hours.

    Parameters
    ----------
    values : array_like
        Hourly values (any quantity), 1-D, finite.
    percent : float or array_like
        Annual percentage(s) [%], 0 < percent < 100.

    Returns
    -------
    numpy.ndarray
        The design value(s), same shape as ``percent``; each is one of ``values``.

    Notes
    -----
    .. math::

        v_p = \max \{\, v_{(k)} : \#\{h : v_h > v_{(k)}\} \ge \lceil p N / 100 \rceil \,\}

    :math:`X_p = \\max\\{x_i : \\#\\{j : x_j > x_i\\} \\ge pN/100\\}`, see the module
    notes. With ``N = 8760`` and ``percent = 1`` at least 88 hours lie above the result.

    Examples
    --------
    >>> float(value_exceeded_by_percent(np.arange(1.0, 101.0), 2.0))  # 99 and 100 lie above
    98.0
    """
    x = np.sort(np.asarray(values, dtype=float).ravel())
    p = check_range("percent", percent, 0.0, 100.0, "%", low_inclusive=False, high_inclusive=False)
    n = x.size
    if n == 0:
        raise InputRangeError("values", "values is empty: no hours to take a percentile of")
    # Hours required above the value: ceil(pN/100), rounded first so that 1 % of
    # 10,000 h is 100 h and not 101 h after a floating-point residue.
    required = np.ceil(np.round(p * n / 100.0, 9)).astype(int)
    candidate_index = np.clip(n - required - 1, 0, n - 1)
    candidate = x[candidate_index]
    above = n - np.searchsorted(x, candidate, side="right")
    # Ties reaching above the candidate: step down to the next lower distinct value.
    lower_index = np.searchsorted(x, candidate, side="left") - 1
    result = np.where(above >= required, candidate, x[np.maximum(lower_index, 0)])
    return scalar_or_array(result)


class CoincidentMean(NamedTuple):
    """Mean of a coincident quantity near a design value (:func:`coincident_mean`)."""

    mean: float  #: mean of the coincident quantity (its own unit)
    hours: int  #: hours averaged over
    band: float  #: half-width of the band used (unit of the design quantity)


class DailyRange(NamedTuple):
    """Warmest month of a record and its mean daily dry-bulb range."""

    month: int  #: warmest month, 1-12
    mean_daily_range: float  #: mean daily dry-bulb range of that month [K]


def coincident_mean(
    design_quantity, design_value, coincident_quantity, band, min_hours=5, max_doublings=6
):
    """Mean of a coincident quantity over the hours near a design value.

    Parameters
    ----------
    design_quantity : numpy.ndarray
        Hourly values of the design quantity (e.g. dry bulb [°C]).
    design_value : float
        The design value, same unit.
    coincident_quantity : numpy.ndarray
        Hourly values to average (e.g. wet bulb [°C]).
    band : float
        Half-width of the inclusive band around the design value, same unit as it.
    min_hours : int
        Fewest hours to average over; the band doubles until reached.
    max_doublings : int
        Most doublings of the band.

    Returns
    -------
    CoincidentMean
        Named tuple of ``mean`` (unit of the coincident quantity), ``hours`` averaged
        over and ``band`` (the half-width used, unit of the design quantity).
    """
    distance = np.abs(np.asarray(design_quantity, float) - design_value)
    coincident = np.asarray(coincident_quantity, float)
    width = float(band)
    for _ in range(max_doublings + 1):
        inside = distance <= width * (1 + 1e-12)
        count = int(np.count_nonzero(inside))
        if count >= min_hours:
            break
        width *= 2.0
    if count == 0:
        # Cannot happen for a design value taken from the same record; kept as a guard.
        nearest = np.argmin(distance)
        return CoincidentMean(float(coincident[nearest]), 1, float(distance[nearest]))
    return CoincidentMean(float(coincident[inside].mean()), count, width)


def mean_daily_range(weather: Weather) -> DailyRange:
    """Warmest month and the mean daily dry-bulb range over its days.

    Parameters
    ----------
    weather : Weather
        Hourly record starting at local midnight (whole days).

    Returns
    -------
    DailyRange
        Named tuple of ``month`` (the warmest, 1-12) and ``mean_daily_range`` [K].
    """
    days = weather.hours // 24
    if days == 0:
        raise InputRangeError("weather", "mean daily range needs at least one whole day")
    drybulb = weather.drybulb[: days * 24].reshape(days, 24)
    day_month = weather.month[: days * 24].reshape(days, 24)[:, 12]
    months = np.arange(1, 13)
    counts = np.bincount(weather.month, minlength=13)[1:]
    sums = np.bincount(weather.month, weights=weather.drybulb, minlength=13)[1:]
    with np.errstate(invalid="ignore", divide="ignore"):
        monthly_mean = np.where(counts > 0, sums / np.maximum(counts, 1), -np.inf)
    warmest = int(months[np.argmax(monthly_mean)])
    ranges = drybulb.max(axis=1) - drybulb.min(axis=1)
    in_month = day_month == warmest
    if not np.any(in_month):
        raise InputRangeError("weather", f"no whole day in the warmest month {warmest}")
    return DailyRange(warmest, float(ranges[in_month].mean()))


def design_condition_text(condition, system="SI") -> str:
    """A design condition in words and the units on show, its figures rounded once from SI.

    ``"cooling 0.4 %: 95.1 °F DB / 77.0 °F MCWB"`` (IP) or ``"... 35.1 °C DB ..."``
    (SI): the design value first, then its mean coincident companion, as the ASHRAE
    Handbook Fundamentals climatic design tables (Ch. 14) list them. Enthalpy in IP is
    on the I-P scale (dry air at 0 °F), via :func:`plantside.units.to_display`. The
    condition's own ``label`` is this text in SI; the command line, the dashboard, the
    derivations and the report word a condition with it.

    Parameters
    ----------
    condition : DesignCondition
    system : {"SI", "IP"}
    """

    def shown(quantity, value):
        number, unit = to_display(quantity, value, system)
        return f"{float(number):.1f} {unit}"

    pct = f"{condition.percent:g} %"
    drybulb = shown("temperature", condition.drybulb)
    if condition.kind == "cooling":
        return f"cooling {pct}: {drybulb} DB / {shown('temperature', condition.wet_bulb)} MCWB"
    if condition.kind == "dehumidification":
        return (
            f"dehumidification {pct}: {shown('temperature', condition.dew_point)} DP / "
            f"{shown('humidity_ratio', condition.humidity_ratio)} / {drybulb} MCDB"
        )
    if condition.kind == "enthalpy":
        return f"enthalpy {pct}: {shown('enthalpy', condition.enthalpy)} / {drybulb} MCDB"
    if condition.kind == "evaporation":
        return f"evaporation {pct}: {shown('temperature', condition.wet_bulb)} WB / {drybulb} MCDB"
    return f"{condition.kind} {pct}: {drybulb} DB"


def _state(kind, percent, drybulb, humidity_ratio, pressure, hours, band):
    humidity_ratio = float(
        min(humidity_ratio, moist_air.saturation_humidity_ratio(drybulb, pressure))
    )
    dew_point = float(moist_air.dew_point_from_humidity_ratio(max(humidity_ratio, 1e-7), pressure))
    wet_bulb = float(moist_air.wet_bulb_from_humidity_ratio(drybulb, humidity_ratio, pressure))
    enthalpy = float(moist_air.enthalpy_from_humidity_ratio(drybulb, humidity_ratio))
    condition = DesignCondition(
        kind=kind,
        percent=float(percent),
        drybulb=float(drybulb),
        humidity_ratio=humidity_ratio,
        pressure=float(pressure),
        dew_point=dew_point,
        wet_bulb=wet_bulb,
        enthalpy=enthalpy,
        label="",
        coincident_hours=int(hours),
        coincident_band=float(band),
    )
    return replace(condition, label=design_condition_text(condition, "SI"))


def design_conditions_from_weather(
    weather: Weather,
    *,
    drybulb_band: float = 0.5,
    dew_point_band: float = 0.5,
    enthalpy_band: float = 1.0,
    min_coincident_hours: int = 5,
    wet_bulb_band: float = 0.5,
) -> DesignConditions:
    """Annual design conditions of an hourly weather record.

    Parameters
    ----------
    weather : Weather
        Hourly record, at least 720 hours (8760 or 8784 for annual values).
    drybulb_band : float
        Half-width of the dry-bulb band for coincident means [K], 0.05 to 5.
    dew_point_band : float
        Half-width of the dew-point band for the MCDB [K], 0.05 to 5.
    enthalpy_band : float
        Half-width of the enthalpy band for the MCDB [kJ/kg], 0.05 to 10.
    min_coincident_hours : int
        Fewest hours behind a coincident mean, 1 to 100; bands widen until reached.
    wet_bulb_band : float
        Half-width of the wet-bulb band for the evaporation MCDB [K], 0.05 to 5.

    Returns
    -------
    DesignConditions
        All conditions; see the module notes for the exact definitions.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 14, annual design conditions.

    Notes
    -----
    The result is kept for the process (the last :data:`CACHE_SIZE` records, keyed on
    the site name, a hash of the record's content and the settings), so the cases of a
    sweep that share a climate compute it once per worker; the result is immutable.
    """
    check_range("drybulb_band", drybulb_band, 0.05, 5.0, "K")
    check_range("dew_point_band", dew_point_band, 0.05, 5.0, "K")
    check_range("enthalpy_band", enthalpy_band, 0.05, 10.0, "kJ/kg")
    check_range("wet_bulb_band", wet_bulb_band, 0.05, 5.0, "K")
    check_range("min_coincident_hours", min_coincident_hours, 1, 100, "h")
    settings = (drybulb_band, dew_point_band, enthalpy_band, min_coincident_hours, wet_bulb_band)
    key = (*_weather_identity(weather), *(float(x) for x in settings))
    with _CACHE_LOCK:
        if key in _CACHE:
            _CACHE.move_to_end(key)
            return _CACHE[key]
    conditions = _design_conditions(weather, *settings)
    with _CACHE_LOCK:
        _CACHE[key] = conditions
        while len(_CACHE) > CACHE_SIZE:
            _CACHE.popitem(last=False)
    return conditions


#: Design conditions kept per process (one per climate and settings) [-].
CACHE_SIZE = 16
_CACHE: OrderedDict = OrderedDict()
_CACHE_LOCK = threading.Lock()


def clear_design_conditions_cache() -> None:
    """Forget the design conditions kept by :func:`design_conditions_from_weather`."""
    with _CACHE_LOCK:
        _CACHE.clear()


def _weather_identity(weather: Weather) -> tuple[str, int, str]:
    """Site name, hours and a hash of everything the design conditions read."""
    digest = hashlib.blake2b(digest_size=16)
    for values in (weather.drybulb, weather.humidity_ratio, weather.pressure, weather.month):
        array = np.ascontiguousarray(values)
        digest.update(str((array.dtype.str, array.shape)).encode())
        digest.update(array.tobytes())
    return str(weather.site), int(weather.hours), digest.hexdigest()


def _design_conditions(
    weather, drybulb_band, dew_point_band, enthalpy_band, min_coincident_hours, wet_bulb_band
):
    n = weather.hours
    if n < MIN_RECORD_HOURS:
        raise InputRangeError(
            "weather",
            f"weather has {n} hours; annual design conditions need at least "
            f"{MIN_RECORD_HOURS} hours (a full year of 8760 h is expected)",
            f">= {MIN_RECORD_HOURS} h",
        )
    notes = []
    if n not in (8760, 8784):
        notes.append(
            f"the record has {n} hours, not one year: the percentages are of the "
            f"hours in the record"
        )
    drybulb, w, p = weather.drybulb, weather.humidity_ratio, weather.pressure
    pressure = float(p.mean())
    wet_bulb = moist_air.wet_bulb_from_humidity_ratio(drybulb, w, p, check=False)
    dew_point = moist_air.dew_point_from_humidity_ratio(np.maximum(w, 1e-7), p, check=False)
    enthalpy = moist_air.enthalpy_from_humidity_ratio(drybulb, w, check=False)

    cooling_db = value_exceeded_by_percent(drybulb, COOLING_PERCENTS)
    design_dp = value_exceeded_by_percent(dew_point, COOLING_PERCENTS)
    design_h = value_exceeded_by_percent(enthalpy, COOLING_PERCENTS)
    heating_db = value_exceeded_by_percent(drybulb, HEATING_PERCENTS)
    design_wb = value_exceeded_by_percent(wet_bulb, COOLING_PERCENTS)

    conditions = []

    def coincident(kind, percent, quantity, value, other, band):
        mean, hours, used = coincident_mean(quantity, value, other, band, min_coincident_hours)
        if used > band * (1 + 1e-12):
            notes.append(
                f"{kind} {percent:g} %: coincident band widened from ±{band:g} to "
                f"±{used:g} to reach {min_coincident_hours} hours"
            )
        return mean, hours, used

    for percent, value in zip(COOLING_PERCENTS, cooling_db, strict=True):
        mcwb, hours, band = coincident("cooling", percent, drybulb, value, wet_bulb, drybulb_band)
        mcwb = min(mcwb, value)
        w_state = float(moist_air.humidity_ratio_from_wet_bulb(value, mcwb, pressure))
        conditions.append(_state("cooling", percent, value, w_state, pressure, hours, band))
    for percent, value in zip(COOLING_PERCENTS, design_dp, strict=True):
        mcdb, hours, band = coincident(
            "dehumidification", percent, dew_point, value, drybulb, dew_point_band
        )
        w_state = float(moist_air.humidity_ratio_from_dew_point(value, pressure))
        mcdb = max(mcdb, value)
        conditions.append(_state("dehumidification", percent, mcdb, w_state, pressure, hours, band))
    for percent, value in zip(COOLING_PERCENTS, design_h, strict=True):
        mcdb, hours, band = coincident("enthalpy", percent, enthalpy, value, drybulb, enthalpy_band)
        w_state = float(moist_air.humidity_ratio_from_enthalpy(mcdb, value, check=False))
        w_state = max(w_state, 0.0)
        conditions.append(_state("enthalpy", percent, mcdb, w_state, pressure, hours, band))
    for percent, value in zip(HEATING_PERCENTS, heating_db, strict=True):
        w_mean, hours, band = coincident("heating", percent, drybulb, value, w, drybulb_band)
        conditions.append(_state("heating", percent, value, w_mean, pressure, hours, band))

    evaporation = []
    for percent, value in zip(COOLING_PERCENTS, design_wb, strict=True):
        mcdb, hours, band = coincident(
            "evaporation", percent, wet_bulb, value, drybulb, wet_bulb_band
        )
        mcdb = max(mcdb, value)
        w_state = float(moist_air.humidity_ratio_from_wet_bulb(mcdb, value, pressure))
        evaporation.append(_state("evaporation", percent, mcdb, w_state, pressure, hours, band))

    warmest, daily_range = mean_daily_range(weather)
    return DesignConditions(
        site=weather.site,
        hours=n,
        conditions=tuple(conditions),
        warmest_month=warmest,
        mean_daily_range=daily_range,
        pressure=pressure,
        notes=tuple(notes),
        evaporation_conditions=tuple(evaporation),
    )
