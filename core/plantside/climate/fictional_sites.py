"""Seeded synthetic weather years for fictional demo sites.

plantside ships five invented sites so that the tool works without any weather
file. Their hourly years come from this generator; anyone can regenerate the
bundled files exactly with::

    python -m plantside.climate.generate --out DIR

The sites are fictional. Their parameters were chosen so that each year's
design conditions fall in ranges a practitioner would believe for a climate of
that *kind*; they imitate no particular place.

Model (per site, one 365-day year, 8760 hours)
----------------------------------------------
Daily values (365 of them), with :math:`s(d) = -\\cos(2\\pi(d - d_{cold})/365)`
the seasonal shape (-1 on the coldest day of the normal year, +1 half a year
later) and :math:`u(d) = (1 - s)/2` the "winterness" (1 in deep winter, 0 in
high summer):

1. Daily mean dry bulb :math:`\\bar t(d) = \\bar t_{year} + A\\,s(d) +
   \\sigma_t(d)\\,g(z_t(d))`. :math:`z_t` is an AR(1) series of unit variance
   with lag-one correlation :math:`\\phi_t` (weather persists for a few days):
   :math:`z_d = \\phi z_{d-1} + \\sqrt{1-\\phi^2}\\,\\varepsilon_d`,
   :math:`\\varepsilon_d \\sim N(0,1)`. :math:`\\sigma_t` blends from the summer
   to the winter standard deviation with :math:`u`. :math:`g(z) = z + (k_w(1-u)
   - k_c u)(z^2 - 1)` gives winter anomalies a cold tail (cold outbreaks,
   ``cold_skew`` :math:`k_c`) and summer anomalies a warm tail (heat spells,
   ``warm_skew`` :math:`k_w`).
2. Daily range :math:`\\Delta t(d)`: the seasonal mean range blended with
   :math:`u`, times a log-normal factor (coefficient of variation about
   ``daily_range_variability``) negatively correlated with the humidity anomaly
   (humid, cloudy days have smaller ranges).
3. Daily dew point: seasonal normal :math:`\\bar t_{d,year} + A_d\\,s(d)`,
   plus ``dew_point_coupling`` times the temperature anomaly, plus its own AR(1)
   anomaly; then limited to ``dew_point_ceiling`` and to
   ``min_dew_point_depression`` below the day's minimum dry bulb.
4. Daily station pressure: standard pressure at the altitude (ASHRAE
   Fundamentals 2017 Ch. 1 Eq. 3) plus an AR(1) synoptic anomaly.

Hours: the daily mean, range, humidity ratio and pressure are placed at noon of
each day and interpolated linearly to every hour (periodically across the new
year). The dry bulb of hour :math:`h` is

.. math:: t(h) = \\bar t(h) + \\Delta t(h)\\,(\\bar f - f(h_{day}))

with :math:`f` the fraction-of-daily-range profile of ASHRAE Fundamentals 2017
Ch. 14 Table 6 (:data:`plantside.climate.design_day.DAILY_RANGE_FRACTION`) and
:math:`\\bar f` its mean, so the day has the wanted mean and range and peaks at
14-15 h. The humidity ratio is then capped at saturation at each hour's dry
bulb and pressure, so humidity never exceeds saturation (capped hours are fog
or dew). Finally the values are quantised to the precision written in the CSV
(0.01 K, 0.0001 g/kg rounded *down*, 1 Pa) so a year read back from its file
equals the generated one.

The only Python loop is the AR(1) recursion over 365 days.

Fictional sites and the ranges their design conditions fall into
----------------------------------------------------------------
(Design conditions computed by :mod:`plantside.climate.design_conditions`; ranges are
checked by ``tests/test_weather_generator.py``. Ranges set as plausible for a
climate of each kind, from memory of published climatic design tables.)

==================  ========  ============  ===========  ===========  ============  ==========
site                altitude  cooling 0.4%  MCWB 0.4%    dew pt 1%    heating 99.6  daily rng
                    [m]       DB [°C]       [°C]         [°C]         DB [°C]       [K]
==================  ========  ============  ===========  ===========  ============  ==========
Port Calder        20        25 to 30      17 to 21     14 to 18     -5 to 1       5 to 9
Salvia Flats       12        33 to 36      25 to 28     25 to 27     -2 to 6       7 to 11
Mesa Ardiente      1600      38 to 42      15 to 20     9 to 15      -14 to -6     14 to 18
Korva Plains       240       30 to 34      20 to 24     18 to 22     -31 to -24    10 to 14
Linden Vale        310       30 to 34      20 to 23     17 to 21     -15 to -7     9 to 13
==================  ========  ============  ===========  ===========  ============  ==========

The machine-readable form is :attr:`SiteParameters.design_ranges`. Every site
also has a heating season and hours of free-cooling weather (below 13 °C).

Single synthetic years vary like real ones: over seeds 1000-1199 each design
value spreads by a few kelvin (the 99.6 % heating dry bulb of the cold site by
about ±4 K). The bundled seed of each site is the seed among 1000-1199 whose five
design values above lie closest to their medians over those 200 seeds (distance
scaled by the interquartile range): a typical year, not an extreme one.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType

import numpy as np
import pandas as pd

from plantside.air import moist_air
from plantside.climate.design_day import DAILY_RANGE_FRACTION
from plantside.climate.weather import Weather
from plantside.errors import InputRangeError, check_range

__all__ = [
    "CSV_HEADER",
    "SITES",
    "SiteParameters",
    "climate_csv_text",
    "generate_year",
    "site_parameters",
    "write_bundled_climates",
]

#: Days and hours of a generated year (a 365-day calendar).
DAYS = 365
HOURS = DAYS * 24
#: Column header of the bundled CSV files (read by :mod:`plantside.climate.weather_csv`).
CSV_HEADER = "hour,drybulb_C,humidity_ratio_g_per_kg,pressure_Pa"


@dataclass(frozen=True)
class SiteParameters:
    """Parameters of one fictional site for :func:`generate_year`.

    Parameters
    ----------
    name : str
        Display name (fictional).
    slug : str
        File-name form of the name (lower case, underscores).
    character : str
        One-line description of the climate.
    altitude : float
        Altitude above sea level [m].
    seed : int
        Seed of the bundled year.
    mean_drybulb : float
        Annual mean of the daily mean dry bulb [°C].
    seasonal_amplitude : float
        Half the difference between the warmest and coldest normal daily means [K].
    coldest_day : int
        Day of year (0 = 1 January) of the coldest normal day.
    anomaly_std_winter, anomaly_std_summer : float
        Standard deviation of the daily-mean anomaly in deep winter / high summer [K].
    anomaly_persistence : float
        Lag-one correlation of the daily anomalies [-], 0 to 0.95.
    cold_skew : float
        Cold-tail skew of winter anomalies [-], 0 to 0.4.
    warm_skew : float
        Warm-tail skew of summer anomalies (heat spells) [-], 0 to 0.4.
    daily_range_winter, daily_range_summer : float
        Mean daily dry-bulb range in winter / summer [K].
    daily_range_variability : float
        Log-normal spread of the daily range [-], 0 to 0.6.
    dew_point_mean : float
        Annual mean of the daily dew point normal [°C].
    dew_point_amplitude : float
        Seasonal half-range of the dew point normal [K].
    dew_point_anomaly_std : float
        Standard deviation of the dew point's own anomaly [K].
    dew_point_coupling : float
        Dew point anomaly per kelvin of temperature anomaly [K/K].
    dew_point_persistence : float
        Lag-one correlation of the dew-point anomaly [-].
    dew_point_ceiling : float
        Highest daily dew point [°C].
    min_dew_point_depression : float
        Least depression of the daily dew point below the day's minimum dry bulb [K].
    pressure_std : float
        Standard deviation of the daily synoptic pressure anomaly [Pa].
    design_ranges : Mapping
        Stated range ``(low, high)`` of design values, keys ``cooling_drybulb_0.4``
        [°C], ``cooling_mcwb_0.4`` [°C], ``dew_point_1`` [°C], ``heating_drybulb_99.6``
        [°C] and ``mean_daily_range`` [K].
    latitude, longitude : float
        Invented location [°] (north and east positive), for the sun's position only;
        the generated year does not depend on it.
    time_zone : float
        Time zone [h from UTC] of the year's hours (standard time).
    beam_optical_depth, diffuse_optical_depth : float
        Invented clear-sky pseudo-optical depths tau_b, tau_d [-] for the whole year
        (ASHRAE Fundamentals 2017 Ch. 14 model; plausible for the climate's kind: a hazy
        humid sky has a larger tau_b, a clear high desert a smaller one).
    """

    name: str
    slug: str
    character: str
    altitude: float
    seed: int
    mean_drybulb: float
    seasonal_amplitude: float
    coldest_day: int
    anomaly_std_winter: float
    anomaly_std_summer: float
    anomaly_persistence: float
    cold_skew: float
    warm_skew: float
    daily_range_winter: float
    daily_range_summer: float
    daily_range_variability: float
    dew_point_mean: float
    dew_point_amplitude: float
    dew_point_anomaly_std: float
    dew_point_coupling: float
    dew_point_persistence: float
    dew_point_ceiling: float
    min_dew_point_depression: float
    pressure_std: float
    design_ranges: Mapping[str, tuple[float, float]] = field(default_factory=dict)
    latitude: float = 40.0
    longitude: float = -90.0
    time_zone: float = -6.0
    beam_optical_depth: float = 0.45
    diffuse_optical_depth: float = 2.2

    def __post_init__(self):
        object.__setattr__(self, "design_ranges", MappingProxyType(dict(self.design_ranges)))
        check_range("altitude", self.altitude, -400.0, 5000.0, "m")
        check_range("seasonal_amplitude", self.seasonal_amplitude, 0.0, 30.0, "K")
        check_range("coldest_day", self.coldest_day, 0, 364, "")
        check_range("anomaly_std_winter", self.anomaly_std_winter, 0.0, 15.0, "K")
        check_range("anomaly_std_summer", self.anomaly_std_summer, 0.0, 15.0, "K")
        check_range("anomaly_persistence", self.anomaly_persistence, 0.0, 0.95, "")
        check_range("cold_skew", self.cold_skew, 0.0, 0.4, "")
        check_range("warm_skew", self.warm_skew, 0.0, 0.4, "")
        check_range("daily_range_winter", self.daily_range_winter, 0.0, 30.0, "K")
        check_range("daily_range_summer", self.daily_range_summer, 0.0, 30.0, "K")
        check_range("daily_range_variability", self.daily_range_variability, 0.0, 0.6, "")
        check_range("dew_point_anomaly_std", self.dew_point_anomaly_std, 0.0, 15.0, "K")
        check_range("dew_point_persistence", self.dew_point_persistence, 0.0, 0.95, "")
        check_range("min_dew_point_depression", self.min_dew_point_depression, 0.0, 10.0, "K")
        check_range("pressure_std", self.pressure_std, 0.0, 3000.0, "Pa")
        check_range("latitude", self.latitude, -90.0, 90.0, "°")
        check_range("longitude", self.longitude, -180.0, 180.0, "°")
        check_range("time_zone", self.time_zone, -12.0, 14.0, "h from UTC")


def _ranges(cooling, mcwb, dew_point, heating, daily_range):
    return {
        "cooling_drybulb_0.4": cooling,
        "cooling_mcwb_0.4": mcwb,
        "dew_point_1": dew_point,
        "heating_drybulb_99.6": heating,
        "mean_daily_range": daily_range,
    }


_SITE_LIST = (
    SiteParameters(
        name="Port Calder",
        slug="port_calder",
        character="mild marine coast: cool summers, wet mild winters, small daily range",
        altitude=20.0,
        seed=1031,
        mean_drybulb=11.5,
        seasonal_amplitude=5.5,
        coldest_day=25,
        anomaly_std_winter=3.0,
        anomaly_std_summer=3.4,
        anomaly_persistence=0.75,
        cold_skew=0.15,
        warm_skew=0.2,
        daily_range_winter=5.5,
        daily_range_summer=8.0,
        daily_range_variability=0.35,
        dew_point_mean=8.5,
        dew_point_amplitude=4.5,
        dew_point_anomaly_std=1.6,
        dew_point_coupling=0.45,
        dew_point_persistence=0.6,
        dew_point_ceiling=18.5,
        min_dew_point_depression=0.3,
        pressure_std=900.0,
        design_ranges=_ranges((25, 30), (17, 21), (14, 18), (-5, 1), (5, 9)),
        latitude=47.4,
        longitude=-124.1,
        time_zone=-8.0,
        beam_optical_depth=0.38,
        diffuse_optical_depth=2.35,
    ),
    SiteParameters(
        name="Salvia Flats",
        slug="salvia_flats",
        character="hot-humid lowland: long muggy summers, short mild winters with cold fronts",
        altitude=12.0,
        seed=1103,
        mean_drybulb=21.0,
        seasonal_amplitude=8.0,
        coldest_day=18,
        anomaly_std_winter=4.2,
        anomaly_std_summer=0.9,
        anomaly_persistence=0.7,
        cold_skew=0.2,
        warm_skew=0.0,
        daily_range_winter=9.0,
        daily_range_summer=8.5,
        daily_range_variability=0.25,
        dew_point_mean=16.0,
        dew_point_amplitude=8.5,
        dew_point_anomaly_std=1.4,
        dew_point_coupling=0.85,
        dew_point_persistence=0.6,
        dew_point_ceiling=26.6,
        min_dew_point_depression=0.4,
        pressure_std=600.0,
        design_ranges=_ranges((33, 36), (25, 28), (25, 27), (-2, 6), (7, 11)),
        latitude=29.1,
        longitude=-94.7,
        time_zone=-6.0,
        beam_optical_depth=0.5,
        diffuse_optical_depth=2.05,
    ),
    SiteParameters(
        name="Mesa Ardiente",
        slug="mesa_ardiente",
        character="hot-dry high desert at 1600 m: hot days, cool nights, low dew points",
        altitude=1600.0,
        seed=1103,
        mean_drybulb=16.5,
        seasonal_amplitude=13.0,
        coldest_day=15,
        anomaly_std_winter=4.0,
        anomaly_std_summer=1.6,
        anomaly_persistence=0.7,
        cold_skew=0.15,
        warm_skew=0.0,
        daily_range_winter=14.5,
        daily_range_summer=16.5,
        daily_range_variability=0.15,
        dew_point_mean=0.0,
        dew_point_amplitude=6.0,
        dew_point_anomaly_std=4.0,
        dew_point_coupling=0.2,
        dew_point_persistence=0.7,
        dew_point_ceiling=15.5,
        min_dew_point_depression=2.0,
        pressure_std=500.0,
        design_ranges=_ranges((38, 42), (15, 20), (9, 15), (-14, -6), (14, 18)),
        latitude=34.2,
        longitude=-107.9,
        time_zone=-7.0,
        beam_optical_depth=0.3,
        diffuse_optical_depth=2.6,
    ),
    SiteParameters(
        name="Korva Plains",
        slug="korva_plains",
        character="cold continental plain: severe winters, warm humid summers",
        altitude=240.0,
        seed=1137,
        mean_drybulb=4.0,
        seasonal_amplitude=18.3,
        coldest_day=20,
        anomaly_std_winter=5.8,
        anomaly_std_summer=3.2,
        anomaly_persistence=0.75,
        cold_skew=0.18,
        warm_skew=0.08,
        daily_range_winter=8.5,
        daily_range_summer=11.5,
        daily_range_variability=0.3,
        dew_point_mean=0.5,
        dew_point_amplitude=16.0,
        dew_point_anomaly_std=2.0,
        dew_point_coupling=1.0,
        dew_point_persistence=0.6,
        dew_point_ceiling=22.5,
        min_dew_point_depression=0.0,
        pressure_std=1000.0,
        design_ranges=_ranges((30, 34), (20, 24), (18, 22), (-31, -24), (10, 14)),
        latitude=50.3,
        longitude=-98.2,
        time_zone=-6.0,
        beam_optical_depth=0.36,
        diffuse_optical_depth=2.4,
    ),
    SiteParameters(
        name="Linden Vale",
        slug="linden_vale",
        character="temperate inland valley: warm summers, cool winters, four seasons",
        altitude=310.0,
        seed=1076,
        mean_drybulb=11.0,
        seasonal_amplitude=11.5,
        coldest_day=22,
        anomaly_std_winter=4.3,
        anomaly_std_summer=2.6,
        anomaly_persistence=0.72,
        cold_skew=0.15,
        warm_skew=0.05,
        daily_range_winter=7.0,
        daily_range_summer=11.0,
        daily_range_variability=0.3,
        dew_point_mean=7.2,
        dew_point_amplitude=8.0,
        dew_point_anomaly_std=2.0,
        dew_point_coupling=0.7,
        dew_point_persistence=0.6,
        dew_point_ceiling=21.5,
        min_dew_point_depression=0.5,
        pressure_std=900.0,
        design_ranges=_ranges((30, 34), (20, 23), (17, 21), (-15, -7), (9, 13)),
        latitude=41.2,
        longitude=-80.6,
        time_zone=-5.0,
        beam_optical_depth=0.42,
        diffuse_optical_depth=2.25,
    ),
)

#: The bundled fictional sites, by slug.
SITES: Mapping[str, SiteParameters] = MappingProxyType({s.slug: s for s in _SITE_LIST})


def site_parameters(name: str) -> SiteParameters:
    """Parameters of a bundled site by display name or slug (case-insensitive)."""
    key = str(name).strip().lower().replace(" ", "_").replace("-", "_")
    if key not in SITES:
        names = ", ".join(s.name for s in SITES.values())
        raise InputRangeError("site", f"site {name!r} is not a bundled site; choose one of {names}")
    return SITES[key]


def _ar1(innovations: np.ndarray, persistence: float) -> np.ndarray:
    """Unit-variance AR(1) series from standard-normal innovations (365-step loop)."""
    out = np.empty_like(innovations)
    scale = math.sqrt(1.0 - persistence**2)
    out[0] = innovations[0]
    for i in range(1, innovations.size):
        out[i] = persistence * out[i - 1] + scale * innovations[i]
    return out


def _to_hours(daily: np.ndarray) -> np.ndarray:
    """Interpolate daily values placed at noon to every hour, periodic over the year."""
    hours = np.arange(HOURS, dtype=float)
    return np.interp(hours, np.arange(DAYS) * 24.0 + 12.0, daily, period=float(HOURS))


def generate_year(site_parameters: SiteParameters, seed: int | None = None) -> Weather:
    """Generate one synthetic 8760-hour year for a site.

    Parameters
    ----------
    site_parameters : SiteParameters
        The site (see :data:`SITES`).
    seed : int, optional
        Seed of the random generator (``numpy.random.default_rng``), >= 0; default the
        site's own seed (the bundled year).

    Returns
    -------
    Weather
        8760 hours from 1 January 00:00 of a 365-day year: dry bulb [°C], humidity
        ratio [kg/kg], station pressure [Pa]; never above saturation.

    Notes
    -----
    The model is described in the module notes. The same parameters and seed give
    the same year, bit for bit, on the same numpy version.
    """
    site = site_parameters
    seed = site.seed if seed is None else int(check_range("seed", seed, 0, 2**63 - 1, ""))
    rng = np.random.default_rng(seed)
    # Draw every random number up front, in a fixed order, so that the stream is stable.
    eps_temperature, eps_dew_point, eps_range, eps_pressure = rng.standard_normal((4, DAYS))

    day = np.arange(DAYS)
    season = -np.cos(2.0 * np.pi * (day - site.coldest_day) / DAYS)
    winterness = 0.5 * (1.0 - season)

    # 1. daily mean dry bulb
    z_t = _ar1(eps_temperature, site.anomaly_persistence)
    skew = site.warm_skew * (1.0 - winterness) - site.cold_skew * winterness
    z_t = z_t + skew * (z_t**2 - 1.0)
    sigma_t = site.anomaly_std_summer + (site.anomaly_std_winter - site.anomaly_std_summer) * (
        winterness
    )
    temperature_anomaly = sigma_t * z_t
    daily_mean = site.mean_drybulb + site.seasonal_amplitude * season + temperature_anomaly

    # 3a. dew-point anomaly (needed by the daily range)
    z_d = _ar1(eps_dew_point, site.dew_point_persistence)

    # 2. daily range: log-normal, smaller on humid days
    normal_range = (
        site.daily_range_summer + (site.daily_range_winter - site.daily_range_summer) * winterness
    )
    sigma_r = site.daily_range_variability
    eta = -0.5 * z_d + math.sqrt(0.75) * eps_range
    daily_range = normal_range * np.exp(sigma_r * eta - 0.5 * sigma_r**2)
    daily_range = np.clip(daily_range, 0.3 * normal_range, 1.8 * normal_range)

    # 3b. daily dew point, below the day's minimum dry bulb
    f_mean = float(DAILY_RANGE_FRACTION.mean())
    daily_min = daily_mean - daily_range * (1.0 - f_mean)
    dew_point = (
        site.dew_point_mean
        + site.dew_point_amplitude * season
        + site.dew_point_coupling * temperature_anomaly
        + site.dew_point_anomaly_std * z_d
    )
    dew_point = np.minimum(dew_point, site.dew_point_ceiling)
    dew_point = np.minimum(dew_point, daily_min - site.min_dew_point_depression)

    # 4. station pressure
    standard = float(moist_air.pressure_from_altitude(site.altitude))
    daily_pressure = standard + site.pressure_std * _ar1(eps_pressure, 0.6)
    daily_w = moist_air.humidity_ratio_from_dew_point(dew_point, daily_pressure)

    # hours
    hour_of_day = np.arange(HOURS) % 24
    drybulb = _to_hours(daily_mean) + _to_hours(daily_range) * (
        f_mean - DAILY_RANGE_FRACTION[hour_of_day]
    )
    pressure = np.round(_to_hours(daily_pressure))
    drybulb = np.round(drybulb, 2)
    saturation = moist_air.saturation_humidity_ratio(drybulb, pressure)
    humidity_ratio = np.minimum(_to_hours(daily_w), saturation)
    # Quantise to 0.0001 g/kg, rounding down so that the stored value stays at or below
    # saturation.
    humidity_ratio = np.floor(humidity_ratio * 1e7) / 1e7
    capped = int(np.count_nonzero(_to_hours(daily_w) > saturation))
    notes = (
        f"synthetic year of the fictional site {site.name} ({site.character}); "
        f"plantside.climate.fictional_sites, seed {seed}",
        f"humidity ratio capped at saturation in {capped} hours",
    )
    return Weather(
        site=site.name,
        drybulb=drybulb,
        humidity_ratio=humidity_ratio,
        pressure=pressure,
        altitude=site.altitude,
        notes=notes,
    )


def climate_csv_text(weather: Weather, *, seed: int | None = None) -> str:
    """The CSV text of a weather year in the bundled format.

    Leading ``#`` lines carry the site, its altitude and how to regenerate the file;
    then the header :data:`CSV_HEADER` and one row per hour (dry bulb to 0.01 K,
    humidity ratio in g/kg to 0.0001, pressure to 1 Pa; trailing zeros dropped). Line
    ends are ``\\n``.
    """
    lines = [
        f"# plantside synthetic weather year: {weather.site} (fictional site)",
        f"# altitude_m: {weather.altitude:g}",
        "# regenerate: python -m plantside.climate.generate --out DIR"
        + (f" (seed {seed})" if seed is not None else ""),
        CSV_HEADER,
    ]
    hour, drybulb, humidity_ratio, pressure = CSV_HEADER.split(",")
    table = pd.DataFrame(
        {
            hour: np.asarray(weather.hour_of_year, dtype=np.int64),
            drybulb: np.round(weather.drybulb, 2),
            humidity_ratio: np.round(weather.humidity_ratio * 1000.0, 4),
            pressure: np.round(weather.pressure).astype(np.int64),
        }
    )
    # Shortest round-trip text of each rounded value (e.g. 12.3 for 12.30).
    body = table.to_csv(index=False, header=False, lineterminator="\n")
    return "\n".join(lines) + "\n" + body


def write_bundled_climates(directory) -> list[Path]:
    """Generate every bundled site with its own seed and write ``<slug>.csv`` files.

    Parameters
    ----------
    directory : str or os.PathLike
        Output directory (created if missing).

    Returns
    -------
    list of pathlib.Path
        The files written.
    """
    out = Path(directory)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    for site in SITES.values():
        path = out / f"{site.slug}.csv"
        text = climate_csv_text(generate_year(site), seed=site.seed)
        path.write_bytes(text.encode("utf-8"))
        written.append(path)
    return written
