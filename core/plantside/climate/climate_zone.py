"""ASHRAE climate zones: degree days of a weather year and the zone they suggest.

ASHRAE Standard 169 [1] (which ASHRAE 90.1 [2] Normative Appendix B follows) puts a site
in a *thermal* zone by its heating degree days base 18 °C (HDD18) and cooling degree days
base 10 °C (CDD10), and in a *moisture* regime: A moist, B dry, C marine. Thresholds
(SI, from memory of [1] Table A-3 / [2] Table B-4; check the edition your code adopts):

=====  ==========================================
zone   definition [K·day]
=====  ==========================================
0      6000 < CDD10
1      5000 < CDD10 <= 6000
2      3500 < CDD10 <= 5000
3      CDD10 <= 3500 and HDD18 <= 2000
4      CDD10 <= 3500 and 2000 < HDD18 <= 3000
5      3000 < HDD18 <= 4000
6      4000 < HDD18 <= 5000
7      5000 < HDD18 <= 7000
8      7000 < HDD18
=====  ==========================================

Moisture regime. Marine (C, zones 3 to 5 only): the coldest month's mean between -3 and
18 °C, the warmest month's mean below 22 °C and at least four months' means above
10 °C ([1], from memory); the standard also asks for a dry summer, which needs the
precipitation a weather year here does not carry, so that part is not checked. Dry (B)
against moist (A) is decided by precipitation in [1]; without it plantside *estimates*
the regime from humidity: B when the warmest month's mean dew point is below 10 °C
(plantside's own threshold, no standard). Zones 7 and 8 have no moisture letter.

So the zone is a **suggestion**: the user confirms it (``climate_zone`` in a scenario's
``[site]``) or overrides it with the zone the code official's map gives.

Degree days are summed over days from each day's mean of the hourly dry bulbs.

References
----------
[1] ANSI/ASHRAE Standard 169-2013, Climatic Data for Building Design Standards,
    Annex A "Climate zone definitions".
[2] ANSI/ASHRAE/IES Standard 90.1-2019, Normative Appendix B, and Table 6.5.1.1.3
    (economizer high-limit shutoff by climate zone).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.air.economizer import DRYBULB_LIMIT_BY_CLIMATE_ZONE
from plantside.air.moist_air import dew_point_from_humidity_ratio
from plantside.errors import InputRangeError

__all__ = [
    "CLIMATE_ZONES",
    "ClimateZoneSuggestion",
    "cooling_degree_days",
    "economizer_drybulb_limit",
    "heating_degree_days",
    "parse_climate_zone",
    "suggest_climate_zone",
    "thermal_zone_from_degree_days",
]

#: Every climate zone name ASHRAE 169 / 90.1 use.
CLIMATE_ZONES = tuple("0A 0B 1A 1B 2A 2B 3A 3B 3C 4A 4B 4C 5A 5B 5C 6A 6B 7 8".split())
#: Upper CDD10 bounds of zones 0-2 and upper HDD18 bounds of zones 3-7 [K·day] ([1], from
#: memory).
_CDD10_ZONE_0, _CDD10_ZONE_1, _CDD10_ZONE_2 = 6000.0, 5000.0, 3500.0
_HDD18_UPPER = (2000.0, 3000.0, 4000.0, 5000.0, 7000.0)  # zones 3, 4, 5, 6, 7
#: Warmest month's mean dew point below which plantside estimates a dry (B) regime [°C]
#: (plantside's own threshold; the standard uses precipitation).
DRY_DEW_POINT = 10.0


def parse_climate_zone(value, field: str = "climate_zone") -> str:
    """A climate zone name in its standard spelling (``"2a"`` -> ``"2A"``).

    Raises
    ------
    InputRangeError
        Naming ``field`` and the allowed names.
    """
    text = str(value).strip().upper()
    if text not in CLIMATE_ZONES:
        raise InputRangeError(
            field,
            f"{field} = {value!r} is not an ASHRAE climate zone; allowed: "
            + ", ".join(CLIMATE_ZONES),
            ", ".join(CLIMATE_ZONES),
        )
    return text


def economizer_drybulb_limit(climate_zone: str) -> float:
    """Fixed dry-bulb economizer high limit of ASHRAE 90.1 for a climate zone [°C].

    From :data:`plantside.air.economizer.DRYBULB_LIMIT_BY_CLIMATE_ZONE` (90.1-2019
    Table 6.5.1.1.3); zone 0 is listed there with zone 1 of the same moisture regime
    (0A with the 65 °F zones, 0B with the 75 °F zones; from memory).
    """
    zone = parse_climate_zone(climate_zone)
    zone = {"0A": "1A", "0B": "1B"}.get(zone, zone)
    return DRYBULB_LIMIT_BY_CLIMATE_ZONE[zone]


def _daily_mean(weather, values) -> np.ndarray:
    day = np.asarray(weather.hour_of_year, dtype=np.int64) // 24
    day = day - day.min()
    sums = np.bincount(day, weights=np.asarray(values, dtype=float))
    counts = np.bincount(day)
    return sums[counts > 0] / counts[counts > 0]


def heating_degree_days(weather, base: float = 18.0) -> float:
    """Heating degree days of a weather record [K·day]: sum of max(base - daily mean, 0).

    Parameters
    ----------
    weather : Weather
        Hourly record (``drybulb`` [°C], ``hour_of_year``).
    base : float
        Base temperature [°C].
    """
    return float(np.maximum(base - _daily_mean(weather, weather.drybulb), 0.0).sum())


def cooling_degree_days(weather, base: float = 10.0) -> float:
    """Cooling degree days of a weather record [K·day]: sum of max(daily mean - base, 0)."""
    return float(np.maximum(_daily_mean(weather, weather.drybulb) - base, 0.0).sum())


def thermal_zone_from_degree_days(hdd18, cdd10):
    """ASHRAE thermal climate zone number (0-8) from degree days.

    Parameters
    ----------
    hdd18 : array_like
        Heating degree days, base 18 °C [K·day].
    cdd10 : array_like
        Cooling degree days, base 10 °C [K·day].

    Returns
    -------
    numpy.ndarray of int
        The zone number (the table in the module notes).

    References
    ----------
    ASHRAE Standard 169-2013, Annex A, Table A-3 (SI thresholds from memory).
    """
    hdd = np.asarray(hdd18, dtype=float)
    cdd = np.asarray(cdd10, dtype=float)
    by_heating = 3 + np.searchsorted(np.array(_HDD18_UPPER), hdd, side="left")
    return np.select(
        [cdd > _CDD10_ZONE_0, cdd > _CDD10_ZONE_1, cdd > _CDD10_ZONE_2],
        [0, 1, 2],
        default=by_heating,
    ).astype(int)


@dataclass(frozen=True)
class ClimateZoneSuggestion:
    """A climate zone suggested from a weather year, with the figures behind it.

    Attributes
    ----------
    zone : str
        Suggested zone, e.g. ``"2A"``.
    heating_degree_days : float
        HDD18 [K·day].
    cooling_degree_days : float
        CDD10 [K·day].
    moisture_basis : str
        How the moisture letter was found (marine criteria, humidity estimate, none).
    """

    zone: str
    heating_degree_days: float
    cooling_degree_days: float
    moisture_basis: str

    @property
    def economizer_drybulb_limit(self) -> float:
        """The 90.1 fixed dry-bulb high limit of the suggested zone [°C]."""
        return economizer_drybulb_limit(self.zone)

    def describe(self) -> str:
        """One line for people: zone, degree days and how the letter was found."""
        return (
            f"suggested ASHRAE climate zone {self.zone} (HDD18 {self.heating_degree_days:.0f}, "
            f"CDD10 {self.cooling_degree_days:.0f} K·day; {self.moisture_basis}); "
            "confirm it with site.climate_zone"
        )


def suggest_climate_zone(weather) -> ClimateZoneSuggestion:
    """Suggest the ASHRAE climate zone of a weather year (see the module notes).

    Parameters
    ----------
    weather : Weather
        A year of hours (dry bulb [°C], humidity ratio [kg/kg], pressure [Pa], month).

    Returns
    -------
    ClimateZoneSuggestion
    """
    hdd = heating_degree_days(weather)
    cdd = cooling_degree_days(weather)
    number = int(thermal_zone_from_degree_days(hdd, cdd))
    if number >= 7:
        return ClimateZoneSuggestion(str(number), hdd, cdd, "no moisture regime in zones 7 and 8")
    month = np.asarray(weather.month, dtype=int)
    counts = np.bincount(month, minlength=13)[1:]
    present = counts > 0
    monthly_drybulb = np.bincount(month, weights=weather.drybulb, minlength=13)[1:][present]
    monthly_drybulb = monthly_drybulb / counts[present]
    dew_point = dew_point_from_humidity_ratio(weather.humidity_ratio, weather.pressure)
    monthly_dew_point = np.bincount(month, weights=dew_point, minlength=13)[1:][present]
    monthly_dew_point = monthly_dew_point / counts[present]
    marine = (
        -3.0 <= monthly_drybulb.min() <= 18.0
        and monthly_drybulb.max() < 22.0
        and int(np.count_nonzero(monthly_drybulb > 10.0)) >= 4
    )
    if marine and 3 <= number <= 5:
        letter = "C"
        basis = "marine by the standard's temperature criteria (dry summer not checked)"
    else:
        warmest_dew_point = float(monthly_dew_point[np.argmax(monthly_drybulb)])
        letter = "B" if warmest_dew_point < DRY_DEW_POINT else "A"
        basis = (
            f"{'dry' if letter == 'B' else 'moist'} estimated from the warmest month's mean "
            f"dew point {warmest_dew_point:.1f} °C (no precipitation in the record)"
        )
    return ClimateZoneSuggestion(f"{number}{letter}", hdd, cdd, basis)
