"""The sun's position and clear-sky irradiance on vertical surfaces, vectorised.

Everything follows ASHRAE Handbook Fundamentals 2017 (SI), Chapter 14 "Climatic Design
Information", section "Clear-Sky Solar Radiation" [1] (equation numbers below are
from memory of that chapter; the equations themselves are checked against a
reference library in ``tests/test_solar.py``):

- equation of time (Eq. 5, Spencer's series [2]) and apparent solar time (Eq. 7);
- declination (Eq. 8, Cooper's formula [3]);
- solar altitude and azimuth from the hour angle (Eqs. 11-15);
- relative air mass (Eq. 16, Kasten and Young [4]);
- clear-sky beam normal and diffuse horizontal irradiance from the site's
  pseudo-optical depths tau_b and tau_d (Eqs. 17-20; the "ASHRAE clear-sky model");
- irradiance on a tilted (here vertical) surface: beam, sky diffuse with the
  vertical-surface ratio Y (Eq. 26-27) and ground-reflected (Eq. 29).

Conventions: times are local *standard* time (no daylight saving) [h]; the time zone
is the offset from UTC [h] (east positive, e.g. -5); longitudes are east positive [°];
azimuths are compass bearings, clockwise from north [°] (east 90, south 180, west 270),
for the sun and for surfaces alike. Irradiance is in W/m².

An hour index ``h`` of a weather year is the hour from ``h`` to ``h + 1`` local standard
time; :func:`clear_sky_vertical_irradiance` evaluates the sun at its middle.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 14, Climatic Design
    Information, "Calculation of Clear-Sky Solar Irradiance".
[2] Spencer, J.W., 1971. Fourier series representation of the position of the sun.
    Search 2(5), 172.
[3] Cooper, P.I., 1969. The absorption of radiation in solar stills. Solar Energy
    12(3), 333-346.
[4] Kasten, F. and Young, A.T., 1989. Revised optical air mass tables and
    approximation formula. Applied Optics 28(22), 4735-4738.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from plantside.errors import check_range

__all__ = [
    "DEFAULT_BEAM_OPTICAL_DEPTH",
    "DEFAULT_DIFFUSE_OPTICAL_DEPTH",
    "DEFAULT_GROUND_REFLECTANCE",
    "SOLAR_CONSTANT",
    "ClearSkyIrradiance",
    "SolarPosition",
    "SurfaceIrradiance",
    "air_mass",
    "apparent_solar_time",
    "clear_sky_irradiance",
    "clear_sky_vertical_irradiance",
    "day_of_year_from_hour_of_year",
    "equation_of_time",
    "extraterrestrial_normal_irradiance",
    "solar_declination",
    "solar_position",
    "vertical_surface_irradiance",
]

#: Solar constant [W/m²] (ASHRAE Handbook Fundamentals 2017 Ch. 14, from memory).
SOLAR_CONSTANT = 1367.0
#: Pseudo-optical depths used when a site states none [-]: mid-range values of the
#: climatic design tables' summer months (from memory; a site's own values are better).
DEFAULT_BEAM_OPTICAL_DEPTH = 0.45
DEFAULT_DIFFUSE_OPTICAL_DEPTH = 2.2
#: Ground reflectance (albedo) [-]: 0.2 is the value commonly taken for mixed ground
#: (common practice).
DEFAULT_GROUND_REFLECTANCE = 0.2


class SolarPosition(NamedTuple):
    """Where the sun is.

    Attributes
    ----------
    altitude : numpy.ndarray
        Solar altitude above the horizon [°] (negative below it).
    azimuth : numpy.ndarray
        Solar azimuth, clockwise from north [°], 0 to 360.
    hour_angle : numpy.ndarray
        Hour angle [°], negative before solar noon.
    declination : numpy.ndarray
        Solar declination [°].
    """

    altitude: np.ndarray
    azimuth: np.ndarray
    hour_angle: np.ndarray
    declination: np.ndarray


class ClearSkyIrradiance(NamedTuple):
    """Clear-sky irradiance [W/m²]: beam normal and diffuse horizontal (0 at night)."""

    beam_normal: np.ndarray
    diffuse_horizontal: np.ndarray


class SurfaceIrradiance(NamedTuple):
    """Irradiance incident on a surface [W/m²], by component, and their total."""

    beam: np.ndarray
    diffuse: np.ndarray
    reflected: np.ndarray
    total: np.ndarray


def _day_angle(day_of_year):
    """Gamma = 360 (n - 1) / 365 [rad] (Eq. 6 of [1])."""
    return 2.0 * np.pi * (np.asarray(day_of_year, dtype=float) - 1.0) / 365.0


def day_of_year_from_hour_of_year(hour_of_year):
    """Day of year n (1 = 1 January) of an hour index from local midnight, 1 January.

    A record longer than 365 days wraps to 1 again (a 365-day calendar, as the bundled
    years use).

    Examples
    --------
    >>> day_of_year_from_hour_of_year([0, 23, 24, 8759]).tolist()
    [1, 1, 2, 365]
    """
    hours = np.asarray(hour_of_year, dtype=np.int64)
    return (hours // 24) % 365 + 1


def equation_of_time(day_of_year):
    """Equation of time [min]: apparent minus mean solar time.

    .. math::

        ET = 2.2918\\,(0.0075 + 0.1868 \\cos\\Gamma - 3.2077 \\sin\\Gamma
             - 1.4615 \\cos 2\\Gamma - 4.089 \\sin 2\\Gamma),
        \\quad \\Gamma = 360° (n - 1) / 365

    Parameters
    ----------
    day_of_year : array_like
        Day of year n [-], 1 to 366.

    Returns
    -------
    numpy.ndarray
        Equation of time [min].

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eqs. 5-6 [1]; Spencer (1971) [2].

    Examples
    --------
    >>> round(float(equation_of_time(307)), 1)  # 3 November, near its yearly maximum
    16.4
    """
    gamma = _day_angle(day_of_year)
    return 2.2918 * (
        0.0075
        + 0.1868 * np.cos(gamma)
        - 3.2077 * np.sin(gamma)
        - 1.4615 * np.cos(2.0 * gamma)
        - 4.089 * np.sin(2.0 * gamma)
    )


def solar_declination(day_of_year):
    """Solar declination [°].

    .. math:: \\delta = 23.45 \\sin\\left(360° \\frac{n + 284}{365}\\right)

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eq. 8 [1]; Cooper (1969) [3].

    Examples
    --------
    >>> round(float(solar_declination(172)), 2)  # 21 June
    23.45
    """
    n = np.asarray(day_of_year, dtype=float)
    return 23.45 * np.sin(2.0 * np.pi * (n + 284.0) / 365.0)


def apparent_solar_time(local_standard_time, day_of_year, longitude, time_zone):
    """Apparent solar time [h] from local standard time.

    .. math:: AST = LST + ET/60 + (LON - LSM)/15, \\quad LSM = 15\\,TZ

    Parameters
    ----------
    local_standard_time : array_like
        Local standard time [h], 0 to 24 (no daylight saving).
    day_of_year : array_like
        Day of year n [-].
    longitude : float
        Site longitude [°], east positive, -180 to 180.
    time_zone : float
        Time zone [h from UTC], east positive, -12 to 14.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eq. 7 [1].
    """
    lst = np.asarray(local_standard_time, dtype=float)
    return lst + equation_of_time(day_of_year) / 60.0 + (longitude - 15.0 * time_zone) / 15.0


def solar_position(local_standard_time, day_of_year, latitude, longitude, time_zone):
    """Solar altitude and azimuth at a site.

    .. math::

        H = 15 (AST - 12), \\quad
        \\sin\\beta = \\cos L \\cos\\delta \\cos H + \\sin L \\sin\\delta, \\\\
        \\phi_S = \\operatorname{atan2}(\\sin H \\cos\\delta,\\;
                  \\cos H \\cos\\delta \\sin L - \\sin\\delta \\cos L)

    with :math:`\\phi_S` measured from south, positive west (ASHRAE's convention),
    returned here as a compass bearing :math:`180° + \\phi_S`.

    Parameters
    ----------
    local_standard_time : array_like
        Local standard time [h].
    day_of_year : array_like
        Day of year n [-].
    latitude : float
        Site latitude [°], north positive, -90 to 90.
    longitude : float
        Site longitude [°], east positive.
    time_zone : float
        Time zone [h from UTC], east positive.

    Returns
    -------
    SolarPosition

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eqs. 11-15 [1].

    Examples
    --------
    >>> sun = solar_position(12.0, 172, 23.45, 0.0, 0.0)  # 21 June on the tropic
    >>> round(float(sun.altitude))
    90
    """
    check_range("latitude", latitude, -90.0, 90.0, "°")
    check_range("longitude", longitude, -180.0, 180.0, "°")
    check_range("time_zone", time_zone, -12.0, 14.0, "h from UTC")
    lat = np.radians(latitude)
    declination = solar_declination(day_of_year)
    d = np.radians(declination)
    hour_angle = 15.0 * (
        apparent_solar_time(local_standard_time, day_of_year, longitude, time_zone) - 12.0
    )
    h = np.radians(hour_angle)
    sin_altitude = np.cos(lat) * np.cos(d) * np.cos(h) + np.sin(lat) * np.sin(d)
    altitude = np.degrees(np.arcsin(np.clip(sin_altitude, -1.0, 1.0)))
    from_south = np.degrees(
        np.arctan2(
            np.sin(h) * np.cos(d), np.cos(h) * np.cos(d) * np.sin(lat) - np.sin(d) * np.cos(lat)
        )
    )
    azimuth = np.mod(180.0 + from_south, 360.0)
    return SolarPosition(altitude, azimuth, hour_angle, np.broadcast_to(declination, h.shape))


def air_mass(solar_altitude):
    """Relative air mass [-] (NaN for the sun below the horizon).

    .. math:: m = 1 / [\\sin\\beta + 0.50572\\,(6.07995 + \\beta)^{-1.6364}],
              \\quad \\beta \\text{ in degrees}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eq. 16 [1]; Kasten and Young (1989) [4].

    Examples
    --------
    >>> round(float(air_mass(90.0)), 3)
    1.0
    """
    beta = np.asarray(solar_altitude, dtype=float)
    up = beta > 0.0
    b = np.where(up, beta, 1.0)
    m = 1.0 / (np.sin(np.radians(b)) + 0.50572 * (6.07995 + b) ** -1.6364)
    return np.where(up, m, np.nan)


def extraterrestrial_normal_irradiance(day_of_year):
    """Extraterrestrial normal irradiance [W/m²].

    .. math:: E_0 = E_{sc}\\,\\{1 + 0.033 \\cos[360° (n - 3)/365]\\}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eq. 4 [1].
    """
    n = np.asarray(day_of_year, dtype=float)
    return SOLAR_CONSTANT * (1.0 + 0.033 * np.cos(2.0 * np.pi * (n - 3.0) / 365.0))


def clear_sky_irradiance(
    day_of_year,
    solar_altitude,
    beam_optical_depth=DEFAULT_BEAM_OPTICAL_DEPTH,
    diffuse_optical_depth=DEFAULT_DIFFUSE_OPTICAL_DEPTH,
):
    """Clear-sky beam normal and diffuse horizontal irradiance (ASHRAE's tau model).

    .. math::

        E_b = E_0 \\exp(-\\tau_b m^{ab}), \\quad E_d = E_0 \\exp(-\\tau_d m^{ad}), \\\\
        ab = 1.454 - 0.406 \\tau_b - 0.268 \\tau_d + 0.021 \\tau_b \\tau_d, \\\\
        ad = 0.507 + 0.205 \\tau_b - 0.080 \\tau_d - 0.190 \\tau_b \\tau_d

    Parameters
    ----------
    day_of_year : array_like
        Day of year n [-].
    solar_altitude : array_like
        Solar altitude [°]; irradiance is 0 with the sun at or below the horizon.
    beam_optical_depth, diffuse_optical_depth : float or array_like
        The site's clear-sky pseudo-optical depths tau_b (0.1 to 1.5) and tau_d (1 to 4)
        [-], as the climatic design tables give them for each month.

    Returns
    -------
    ClearSkyIrradiance
        Beam normal and diffuse horizontal irradiance [W/m²].

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eqs. 17-20 [1].
    """
    taub = check_range("beam_optical_depth", beam_optical_depth, 0.1, 1.5, "")
    taud = check_range("diffuse_optical_depth", diffuse_optical_depth, 1.0, 4.0, "")
    beta = np.asarray(solar_altitude, dtype=float)
    e0 = extraterrestrial_normal_irradiance(day_of_year)
    ab = 1.454 - 0.406 * taub - 0.268 * taud + 0.021 * taub * taud
    ad = 0.507 + 0.205 * taub - 0.080 * taud - 0.190 * taub * taud
    m = np.nan_to_num(air_mass(beta), nan=1.0)
    up = beta > 0.0
    beam = np.where(up, e0 * np.exp(-taub * m**ab), 0.0)
    diffuse = np.where(up, e0 * np.exp(-taud * m**ad), 0.0)
    return ClearSkyIrradiance(beam, diffuse)


def vertical_surface_irradiance(
    beam_normal,
    diffuse_horizontal,
    solar_altitude,
    solar_azimuth,
    surface_azimuth,
    ground_reflectance=DEFAULT_GROUND_REFLECTANCE,
):
    """Irradiance incident on a vertical surface facing ``surface_azimuth``.

    .. math::

        \\cos\\theta = \\cos\\beta \\cos\\gamma, \\quad \\gamma = \\phi - \\psi, \\\\
        E_{t,b} = E_b \\max(\\cos\\theta, 0), \\quad
        E_{t,d} = E_d \\max(0.45,\\; 0.55 + 0.437 \\cos\\theta + 0.313 \\cos^2\\theta), \\\\
        E_{t,r} = (E_b \\sin\\beta + E_d)\\,\\rho_g / 2

    Parameters
    ----------
    beam_normal, diffuse_horizontal : array_like
        Beam normal and diffuse horizontal irradiance [W/m²].
    solar_altitude, solar_azimuth : array_like
        Sun position [°] (azimuth clockwise from north).
    surface_azimuth : float or array_like
        Direction the surface faces, clockwise from north [°] (east 90, west 270).
    ground_reflectance : float
        Ground reflectance [-], 0 to 1.

    Returns
    -------
    SurfaceIrradiance
        Beam, sky diffuse, ground-reflected and total irradiance [W/m²].

    References
    ----------
    ASHRAE Handbook Fundamentals 2017 Ch. 14, Eqs. 22-29 for a tilt of 90° [1].
    """
    rho = check_range("ground_reflectance", ground_reflectance, 0.0, 1.0, "")
    e_b = np.asarray(beam_normal, dtype=float)
    e_d = np.asarray(diffuse_horizontal, dtype=float)
    beta = np.radians(np.asarray(solar_altitude, dtype=float))
    gamma = np.radians(np.asarray(solar_azimuth, dtype=float) - np.asarray(surface_azimuth))
    cos_theta = np.cos(beta) * np.cos(gamma)
    beam = e_b * np.maximum(cos_theta, 0.0)
    ratio = np.maximum(0.45, 0.55 + 0.437 * cos_theta + 0.313 * cos_theta**2)
    diffuse = e_d * ratio
    reflected = (e_b * np.maximum(np.sin(beta), 0.0) + e_d) * rho / 2.0
    return SurfaceIrradiance(beam, diffuse, reflected, beam + diffuse + reflected)


def clear_sky_vertical_irradiance(
    hour_of_year,
    latitude,
    longitude,
    time_zone,
    surface_azimuths,
    beam_optical_depth=DEFAULT_BEAM_OPTICAL_DEPTH,
    diffuse_optical_depth=DEFAULT_DIFFUSE_OPTICAL_DEPTH,
    ground_reflectance=DEFAULT_GROUND_REFLECTANCE,
):
    """Total clear-sky irradiance on vertical surfaces for every hour of a record.

    Parameters
    ----------
    hour_of_year : array_like of int
        Hour index from local standard midnight, 1 January [h]; the sun is taken at
        the middle of each hour (``h + 0.5``).
    latitude, longitude : float
        Site latitude (north positive) and longitude (east positive) [°].
    time_zone : float
        Time zone [h from UTC], east positive.
    surface_azimuths : array_like
        Directions the surfaces face, clockwise from north [°] (one row per surface).
    beam_optical_depth, diffuse_optical_depth : float or array_like
        Clear-sky pseudo-optical depths [-] (one value, or one per hour).
    ground_reflectance : float
        Ground reflectance [-].

    Returns
    -------
    numpy.ndarray
        Shape (surfaces, hours): total incident irradiance [W/m²], 0 at night.
    """
    hours = np.asarray(hour_of_year, dtype=np.int64)
    day = day_of_year_from_hour_of_year(hours)
    sun = solar_position((hours % 24) + 0.5, day, latitude, longitude, time_zone)
    sky = clear_sky_irradiance(day, sun.altitude, beam_optical_depth, diffuse_optical_depth)
    azimuths = np.atleast_1d(np.asarray(surface_azimuths, dtype=float))[:, None]
    return vertical_surface_irradiance(
        sky.beam_normal,
        sky.diffuse_horizontal,
        sun.altitude,
        sun.azimuth,
        azimuths,
        ground_reflectance,
    ).total
