"""A zone's solar gain at a site: where the climate layer meets the zone-load model.

The zone-load model (:mod:`plantside.air_handler.zone_loads`) may not import the
climate layer (a sibling of its own layer), so the study layer places the sun: the
clear-sky irradiance on the zone's glazing for every hour of the weather year
(:func:`plantside.climate.solar.clear_sky_vertical_irradiance`), turned into a gain by
:func:`plantside.air_handler.zone_loads.solar_gain_from_irradiance` and attached to the
model (:meth:`ZoneLoadModel.with_solar_gain`). Everything downstream (the hourly year,
the design points, the plant's diversity) then sees loads that follow the sun.

Design solar gain: the cooling design point adds the zone's largest hourly solar gain of
the warmest month of the weather year (the month of highest mean dry bulb): the sun of
the season the cooling design dry bulb belongs to (plantside's choice, a simplification of
a design-day calculation; a south zone's larger autumn gain is not the design value).
"""

from __future__ import annotations

import numpy as np

from plantside.air_handler.zone_loads import (
    GLAZING_AZIMUTHS,
    ZoneLoadModel,
    ZoneSolarGain,
    solar_gain_from_irradiance,
)
from plantside.climate import solar
from plantside.errors import InputRangeError

__all__ = ["zone_solar_gain", "zone_with_solar_gain"]


def zone_solar_gain(model: ZoneLoadModel, weather) -> ZoneSolarGain:
    """The solar gain through a zone's glazing for every hour of a weather year.

    Parameters
    ----------
    model : ZoneLoadModel
        The zone (glazing areas [m²], SHGC, IAC).
    weather : Weather
        The year, with ``latitude``, ``longitude`` and ``time_zone`` (and optionally the
        clear-sky optical depths).

    Returns
    -------
    ZoneSolarGain
        Hourly gain [kW] and the design gain [kW] (see the module notes).

    Raises
    ------
    InputRangeError
        Naming ``latitude`` when the weather does not say where the site is.
    """
    if not weather.located:
        raise InputRangeError(
            "latitude",
            "the zone has glazing, so the sun's position is needed, but the weather has no "
            "latitude, longitude and time zone; give site.latitude, site.longitude and "
            "site.time_zone",
            "latitude -90 to 90 °, longitude -180 to 180 °, time zone -12 to 14 h",
        )
    depths = {
        "beam_optical_depth": weather.beam_optical_depth,
        "diffuse_optical_depth": weather.diffuse_optical_depth,
    }
    irradiance = solar.clear_sky_vertical_irradiance(
        weather.hour_of_year,
        weather.latitude,
        weather.longitude,
        weather.time_zone,
        list(GLAZING_AZIMUTHS.values()),
        **{k: v for k, v in depths.items() if v is not None},
    )
    hourly = solar_gain_from_irradiance(model, irradiance)
    month = np.asarray(weather.month, dtype=int)
    counts = np.bincount(month, minlength=13)
    means = np.bincount(month, weights=weather.drybulb, minlength=13) / np.maximum(counts, 1)
    means[counts == 0] = -np.inf
    warmest = int(np.argmax(means))
    return ZoneSolarGain(hourly=hourly, design=float(hourly[month == warmest].max()))


def zone_with_solar_gain(model: ZoneLoadModel, weather) -> ZoneLoadModel:
    """The model with the site's solar gain attached (unchanged without glazing)."""
    if not model.has_glazing:
        return model
    return model.with_solar_gain(zone_solar_gain(model, weather))
