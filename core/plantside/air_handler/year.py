"""What the coil sees: one air handler at design points and over an hourly year.

This module is the public face of the air-handler model. The physics lives in
:mod:`plantside.air.mixing`, :mod:`plantside.air.economizer`,
:mod:`plantside.air.energy_recovery`, :mod:`plantside.air.coils` and
:mod:`plantside.air_handler.zone_loads`; the vectorised hour model in
:mod:`plantside.air_handler.model`; the settings in
:mod:`plantside.air_handler.settings`; design points in
:mod:`plantside.air_handler.design`.

All results are SI (column names carry their unit: ``_C``, ``_kgkg``, ``_kJkg``,
``_Pa``, ``_m3s``, ``_kgs``, ``_kW``); convert at the edges with
:mod:`plantside.units`. Airflow columns say their basis: ``supply_airflow_m3s``
is on the settings' ``airflow_basis`` (also in ``DataFrame.attrs``),
``supply_airflow_standard_m3s`` at 1.2014 kg/m³ and ``supply_airflow_actual_m3s``
at the hour's supply state and site pressure.
"""

from __future__ import annotations

from dataclasses import replace
from typing import NamedTuple

import numpy as np
import pandas as pd

from plantside.air.economizer import (
    ECONOMIZER_MODES,
    MODE_FREE_COOLING,
    MODE_INTEGRATED,
)
from plantside.air_handler.design import (
    COOLING_DESIGN_KINDS,
    STATE_POINTS,
    CoolingDesignSummary,
    DesignPoint,
    cooling_design_points,
    design_point,
    heating_design_point,
)
from plantside.air_handler.model import HOURLY_COLUMNS, MINIMUM_IN_A_PASS, air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings, fan_power_fraction
from plantside.air_handler.unoccupied import UNOCCUPIED_COLUMNS, serve_unoccupied_heating
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel, zone_loads_for_weather
from plantside.errors import InputRangeError, check_range

__all__ = [
    "COOLING_DESIGN_KINDS",
    "ECONOMIZER_MODES",
    "HOURLY_COLUMNS",
    "STATE_POINTS",
    "SWEEP_COLUMNS",
    "AirHandlerSettings",
    "CoolingDesignSummary",
    "DesignPoint",
    "HumidityHours",
    "air_handler_hours",
    "cooling_design_points",
    "design_point",
    "fan_power_fraction",
    "heating_design_point",
    "hourly_cautions",
    "hourly_year",
    "humidity_hours_above_limit",
    "outdoor_air_sweep",
]

#: Columns of :func:`outdoor_air_sweep`.
SWEEP_COLUMNS = (
    "minimum_outdoor_air_fraction",
    "coil_total_kWh",
    "coil_sensible_kWh",
    "coil_latent_kWh",
    "coil_total_peak_kW",
    "heating_coil_kWh",
    "preheat_kWh",
    "reheat_kWh",
    "heating_peak_kW",
    "economizer_hours",
    "zone_humidity_above_limit_hours",
)


def _hourly_zone_loads(zone_loads, weather) -> HourlyZoneLoads:
    if isinstance(zone_loads, ZoneLoadModel):
        return zone_loads_for_weather(zone_loads, weather)
    if isinstance(zone_loads, HourlyZoneLoads):
        if zone_loads.hours != weather.hours:
            raise InputRangeError(
                "zone_loads",
                f"zone_loads has {zone_loads.hours} hours but the weather has {weather.hours}",
                f"{weather.hours} hours",
            )
        return zone_loads
    raise InputRangeError(
        "zone_loads",
        "zone_loads must be a ZoneLoadModel or HourlyZoneLoads",
        "ZoneLoadModel or HourlyZoneLoads",
    )


#: Relative humidity counted as at (not above) a limit [-]: a zone held at the humidity
#: set point sits on it to the last bit of rounding.
_RH_TOLERANCE = 1e-9


class HumidityHours(NamedTuple):
    """Conditioning hours above ``zone_relative_humidity_limit``, with and without control."""

    above_limit: int  #: hours above the limit as the unit runs [h]
    above_limit_without_control: int  #: the same hours without zone humidity control [h]


def humidity_hours_above_limit(settings: AirHandlerSettings, result) -> HumidityHours:
    """Hours the unit conditions the zone above its humidity limit, with and without control.

    Counted over the operating hours that are not night cycling (the unit's outdoor air
    conditions the zone), against ``zone_relative_humidity_limit``; a zone held exactly at
    the limit is not above it. Without ``zone_relative_humidity_max`` the two are equal.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    result : mapping or pandas.DataFrame
        Hourly results with ``operating``, ``zone_relative_humidity`` and (for the count
        without control) ``zone_relative_humidity_without_control``; ``night_cycle``
        optional.

    Returns
    -------
    HumidityHours
    """
    operating = np.asarray(result["operating"], dtype=bool)
    if "night_cycle" in result:
        operating = operating & ~np.asarray(result["night_cycle"], dtype=bool)
    limit = settings.zone_relative_humidity_limit + _RH_TOLERANCE

    def count(column):
        rh = np.asarray(result[column], dtype=float)
        return int((operating & (rh > limit)).sum())

    with_control = count("zone_relative_humidity")
    without = (
        count("zone_relative_humidity_without_control")
        if "zone_relative_humidity_without_control" in result
        else with_control
    )
    return HumidityHours(with_control, without)


def _hours(count, noun: str = "hour") -> str:
    """ "1 hour", "6 hours": a count of hours as a caution says it."""
    count = int(count)
    return f"{count} {noun}" if count == 1 else f"{count} {noun}s"


def hourly_cautions(settings: AirHandlerSettings, result) -> list[str]:
    """Plain-language cautions from the hourly results (dict or DataFrame).

    Flags humidity above the zone limit (mould and comfort), unmet sensible or latent
    load (an undersized unit), and cooling hours needing an apparatus dew point below
    what the coil can produce. The engineer of record decides; local codes govern.

    Night-cycle hours (``night_cycle``, :mod:`plantside.air_handler.unoccupied`) are
    not hours of failed dehumidification: the unit recirculates with its outdoor damper
    closed and heats, so the zone's unoccupied latent gain is left to the air the
    building exchanges with outdoors (the zone humidity is taken as the outdoor
    humidity). They get their own caution only where the outdoor air is itself above
    the humidity limit at the set-back dry bulb; in dry winter air, none.
    """
    operating = np.asarray(result["operating"], dtype=bool)
    night = (
        np.asarray(result["night_cycle"], dtype=bool)
        if "night_cycle" in result
        else np.zeros_like(operating)
    )
    # hours the unit conditions the zone with its outdoor air (night cycling excluded)
    conditioning = operating & ~night
    limit = settings.zone_relative_humidity_limit
    cautions = []
    rh = np.asarray(result["zone_relative_humidity"], dtype=float)
    high = conditioning & (rh > limit + _RH_TOLERANCE)
    if np.any(high):
        cautions.append(
            f"Zone relative humidity is above {100 * limit:.0f} % "
            f"in {_hours(high.sum(), 'operating hour')} "
            f"(highest {100 * np.max(rh[high]):.1f} %): risk of discomfort and mould. Check the "
            "coil leaving dew point, latent loads and outdoor air."
        )
    if settings.zone_relative_humidity_max is not None:
        hours = humidity_hours_above_limit(settings, result)
        reheat = np.asarray(result["humidity_control_reheat_kW"], dtype=float)
        cautions.append(
            f"Zone humidity control at {100 * settings.zone_relative_humidity_max:.0f} % "
            f"relative humidity: {hours.above_limit_without_control} operating hours above "
            f"{100 * limit:.0f} % without it, {hours.above_limit} with it; the coil runs "
            f"colder and terminal reheat holds the zone dry bulb ("
            f"{np.sum(reheat) / 1000.0:.1f} MWh over the record, peak {np.max(reheat):.1f} kW, "
            "on the heating plant)."
        )
    unmet = np.asarray(result["zone_sensible_unmet_kW"], dtype=float)
    # shortfalls under 0.05 kW (a fraction of a percent of any zone load) are not flagged
    warm = operating & (unmet > 0.05)
    if np.any(warm):
        cautions.append(
            f"In {_hours(warm.sum())} the zone cooling load exceeds what the design airflow at "
            f"the supply set point removes (up to {np.max(unmet[warm]):.1f} kW unmet)."
        )
    cold = operating & (unmet < -0.05)
    if np.any(cold):
        cautions.append(
            f"In {_hours(cold.sum())} the zone heat loss exceeds what the unit delivers at its "
            f"highest heating supply temperature (up to {-np.min(unmet[cold]):.1f} kW unmet)."
        )
    latent_unmet = np.asarray(result["zone_latent_unmet_kW"], dtype=float)
    moist = conditioning & (np.abs(latent_unmet) > 1e-6)
    if np.any(moist):
        cautions.append(
            f"In {_hours(moist.sum(), 'operating hour')} part of the zone latent load cannot be "
            "removed (dry coil and no outdoor air, or a negative latent load)."
        )
    humid_night = night & (rh > limit + _RH_TOLERANCE)
    if np.any(humid_night):
        setback = settings.night_setback_drybulb
        setback = settings.zone_heating_drybulb if setback is None else setback
        gain = np.max(latent_unmet[humid_night], initial=0.0)
        cautions.append(
            f"In {_hours(humid_night.sum(), 'night-cycle hour')} the outdoor air is above "
            f"{100 * limit:.0f} % relative humidity at the {setback:g} °C set-back (highest "
            f"{100 * np.max(rh[humid_night]):.0f} %). The unit recirculates with its outdoor "
            "damper closed and heats: it removes none of the zone's unoccupied latent gain "
            f"(up to {gain:.1f} kW), and the zone is at least as humid as the outdoor air. "
            "Check cold surfaces for condensation where it matters."
        )
    if "apparatus_dew_point_required_C" in result:
        adp = np.asarray(result["apparatus_dew_point_required_C"], dtype=float)
        low = operating & (adp < settings.apparatus_dew_point_min - 1e-9)
        if np.any(low):
            cautions.append(
                f"{_hours(low.sum(), 'cooling hour')} "
                f"{'needs' if low.sum() == 1 else 'need'} an apparatus dew point below "
                f"{settings.apparatus_dew_point_min:g} °C (lowest {np.nanmin(adp[low]):.1f} °C): "
                "the coil cannot reach the supply set point in those hours."
            )
    return cautions


def hourly_year(settings: AirHandlerSettings, weather, zone_loads) -> pd.DataFrame:
    """Every state and load of an air handler for each hour of a weather record.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    weather : plantside.climate.weather.Weather
        Hourly outdoor conditions (SI).
    zone_loads : ZoneLoadModel or HourlyZoneLoads
        Zone loads: a model expanded by the modified bin method, or imported hours.

    Returns
    -------
    pandas.DataFrame
        Index ``hour`` (hour of year); columns ``month``, :data:`HOURLY_COLUMNS`
        (``economizer_mode`` categorical with :data:`ECONOMIZER_MODES`) and the heat of
        the hours the fan is off, :data:`plantside.air_handler.unoccupied.
        UNOCCUPIED_COLUMNS` (terminal heating or night cycling), and
        ``zone_relative_humidity_without_control`` [-] (the same year without
        ``zone_relative_humidity_max``; equal to ``zone_relative_humidity`` for a unit
        without it). ``attrs``:
        ``air_handler``, ``site``, ``airflow_basis``, ``cautions`` (list of str),
        ``humidity_iteration_change`` [kg/kg].
    """
    loads = _hourly_zone_loads(zone_loads, weather)
    result = air_handler_hours(
        settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads
    )
    result = serve_unoccupied_heating(
        settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads, result
    )
    result["zone_relative_humidity_without_control"] = _humidity_without_control(
        settings, weather, loads, result
    )
    return _frame(settings, weather, result)


def _humidity_without_control(settings, weather, loads, result):
    """The zone relative humidity of the same year without zone humidity control [-].

    The unit run again with ``zone_relative_humidity_max`` None (only for a unit that
    has it); hours the first run replaced (night cycling, which has no humidity control)
    keep their value.
    """
    rh = np.asarray(result["zone_relative_humidity"], dtype=float)
    if settings.zone_relative_humidity_max is None:
        return rh
    free = air_handler_hours(
        replace(settings, zone_relative_humidity_max=None),
        weather.drybulb,
        weather.humidity_ratio,
        weather.pressure,
        loads,
        check=False,
    )["zone_relative_humidity"]
    night = np.asarray(result.get("night_cycle", np.zeros(rh.shape, bool)), dtype=bool)
    return np.where(night, rh, free)


def _frame(settings, weather, result) -> pd.DataFrame:
    data = {"month": np.asarray(weather.month)}
    for key in (*HOURLY_COLUMNS, *UNOCCUPIED_COLUMNS, "zone_relative_humidity_without_control"):
        if key in result:
            data[key] = result[key]
    data["economizer_mode"] = pd.Categorical.from_codes(
        np.asarray(result["economizer_mode"], dtype=np.int8), categories=list(ECONOMIZER_MODES)
    )
    frame = pd.DataFrame(data, index=pd.Index(np.asarray(weather.hour_of_year), name="hour"))
    frame.attrs.update(
        air_handler=settings.name,
        site=getattr(weather, "site", ""),
        airflow_basis=settings.airflow_basis,
        cautions=hourly_cautions(settings, result),
        humidity_iteration_change=float(result["humidity_iteration_change"]),
    )
    return frame


#: The hourly columns an outdoor-air sweep sums (the model computes only these).
_SWEEP_HOURLY_COLUMNS = (
    "operating",
    "economizer_mode",
    "outdoor_air_fraction",
    "coil_total_kW",
    "coil_sensible_kW",
    "coil_latent_kW",
    "heating_coil_kW",
    "preheat_kW",
    "reheat_kW",
    "dehumidification_reheat_kW",
    "humidity_control_reheat_kW",
    "zone_relative_humidity",
    MINIMUM_IN_A_PASS,
)
#: Per hour, what a sweep row sums, takes the peak of or counts.
_SWEEP_PER_HOUR = (
    "coil_total_kW",
    "coil_sensible_kW",
    "coil_latent_kW",
    "heating_coil_kW",
    "preheat_kW",
    "reheat_kW",
    "heating_kW",
    "economizer",
    "humidity_above_limit",
)


def _sweep_per_hour(r, settings):
    """The per-hour values of :data:`_SWEEP_PER_HOUR` from the model's columns ``r``,
    one row each (written into one array, without temporaries)."""
    names = _SWEEP_PER_HOUR
    out = np.empty((len(names), np.size(r["coil_total_kW"])))
    for i, key in enumerate(names[:6]):
        out[i] = r[key]
    heating = out[names.index("heating_kW")]
    np.add(r["heating_coil_kW"], r["preheat_kW"], out=heating)
    for key in ("reheat_kW", "dehumidification_reheat_kW", "humidity_control_reheat_kW"):
        heating += r[key]
    mode = r["economizer_mode"]
    economizer = (mode == MODE_FREE_COOLING) | (mode == MODE_INTEGRATED)
    out[names.index("economizer")] = economizer
    above = r["zone_relative_humidity"] > settings.zone_relative_humidity_limit + _RH_TOLERANCE
    above &= r["operating"]
    out[names.index("humidity_above_limit")] = above
    return out


#: A stored hour serves a lower fraction only if its damper stood above it by this [-].
_REUSE_MARGIN = 1e-9


#: Rows of :data:`_SWEEP_PER_HOUR` whose peak a sweep row reports (the others are summed).
_SWEEP_PEAKS = (0, 6)


def _block_rows(block, keep, stored, computed, ends):
    """Rows of :data:`SWEEP_COLUMNS` for the fractions ``block`` of one model call.

    Row k sums (and takes the peaks of) the stored values of the hours it reuses,
    ``keep[k]``, and the values ``computed[:, ends[k]:ends[k + 1]]`` of the hours it
    modelled; every hour is in exactly one of the two.
    """
    k = block.size
    # reused hours: a product with the 0/1 mask sums each column over them
    sums = keep.astype(float) @ stored.T  # (k, quantities)
    peaks = np.full((k, len(_SWEEP_PEAKS)), -np.inf)
    if keep.any():
        for i, j in enumerate(_SWEEP_PEAKS):
            peaks[:, i] = np.where(keep, stored[j], -np.inf).max(axis=1)
    # modelled hours: the pairs of each fraction are one contiguous run
    filled = np.flatnonzero(ends[1:] > ends[:-1])
    if filled.size:
        starts = ends[filled]
        sums[filled] += np.add.reduceat(computed, starts, axis=1).T
        peaks[filled] = np.fmax(
            peaks[filled], np.maximum.reduceat(computed[list(_SWEEP_PEAKS)], starts, axis=1).T
        )
    coil_total, sensible, latent, heating_coil, preheat, reheat, _, economizer, above = sums.T
    return np.column_stack(
        [
            block,
            coil_total,
            sensible,
            latent,
            peaks[:, 0],
            heating_coil,
            preheat,
            reheat,
            peaks[:, 1],
            economizer,
            above,
        ]
    )


def outdoor_air_sweep(
    settings: AirHandlerSettings, weather, zone_loads, fractions=None, *, chunk=4
) -> pd.DataFrame:
    """Annual totals for a range of minimum outdoor-air fractions.

    The fractions are taken from the highest down, a few per model call, each call on
    the (fraction, hour) pairs it needs as one flat array (the hour model is the same
    for every hour, so the pairs of several fractions are one array of hours). An hour
    whose economizer holds the damper above the minimum (free cooling, or integrated at
    100 %) at one fraction has the same solution at every lower fraction below that
    damper position (the minimum does not bind; recovery runs at the minimum only), so
    the lower fractions reuse it instead of modelling it again.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler (its own minimum outdoor air setting is replaced by each fraction,
        as a fraction of each hour's supply airflow).
    weather : plantside.climate.weather.Weather
        Hourly outdoor conditions.
    zone_loads : ZoneLoadModel or HourlyZoneLoads
        Zone loads.
    fractions : array_like, optional
        Minimum outdoor-air fractions [-], 0 to 1; default 0, 0.01, ..., 1 (101 steps).
    chunk : int
        Fractions per model call.

    Returns
    -------
    pandas.DataFrame
        One row per fraction (in the order given), columns :data:`SWEEP_COLUMNS`
        (energies in kWh over the record, peaks in kW, counts in hours).
    """
    fractions = np.linspace(0.0, 1.0, 101) if fractions is None else np.asarray(fractions, float)
    fractions = fractions.reshape(-1)
    check_range("fractions", fractions, 0.0, 1.0, "(fraction)")
    loads = _hourly_zone_loads(zone_loads, weather)
    n = loads.hours
    t_o, w_o, p = (
        np.broadcast_to(np.asarray(a, dtype=float), (n,))
        for a in (weather.drybulb, weather.humidity_ratio, weather.pressure)
    )
    # per hour, the damper position of a stored economizer hour (-1: none) and its values
    stored_x = np.full(n, -1.0)
    stored = np.zeros((len(_SWEEP_PER_HOUR), n))
    rows = np.empty((fractions.size, len(SWEEP_COLUMNS)))
    order = np.argsort(-fractions, kind="stable")
    checked = False
    for start in range(0, order.size, chunk):
        batch = order[start : start + chunk]
        block = fractions[batch]
        # the (fraction, hour) pairs to model: all but the stored hours above the fraction
        keep = stored_x[None, :] > block[:, None] + _REUSE_MARGIN
        row, hour = np.nonzero(~keep)
        computed = np.empty((len(_SWEEP_PER_HOUR), 0))
        if hour.size:
            pair_loads = HourlyZoneLoads(
                sensible=loads.sensible[hour],
                latent=loads.latent[hour],
                internal_sensible=loads.internal_sensible[hour],
                occupied=loads.occupied[hour],
            )
            r = air_handler_hours(
                settings,
                t_o[hour],
                w_o[hour],
                p[hour],
                pair_loads,
                minimum_outdoor_air_fraction=block[row],
                check=not checked,
                columns=_SWEEP_HOURLY_COLUMNS,
            )
            checked = True
            computed = _sweep_per_hour(r, settings)
            free = ~r[MINIMUM_IN_A_PASS]
            x = r["outdoor_air_fraction"]
        ends = np.searchsorted(row, np.arange(block.size + 1))
        rows[batch] = _block_rows(block, keep, stored, computed, ends)
        # keep, for the lower fractions, the hours whose damper stood above the minimum in
        # every pass (the lowest fraction of the block last, so that its hours are kept)
        for k in range(block.size):
            if ends[k + 1] == ends[k]:
                continue
            pairs = slice(ends[k], ends[k + 1])
            above = free[pairs]
            kept = hour[pairs][above]
            stored_x[kept] = x[pairs][above]
            stored[:, kept] = computed[:, pairs][:, above]
    table = pd.DataFrame(rows, columns=list(SWEEP_COLUMNS))
    for column in ("economizer_hours", "zone_humidity_above_limit_hours"):
        table[column] = table[column].astype(int)
    table.attrs.update(air_handler=settings.name, site=getattr(weather, "site", ""))
    return table
