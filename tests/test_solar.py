"""The sun's position and clear-sky irradiance (plantside.climate.solar).

References used below:
- NREL's Solar Position Algorithm (Reda and Andreas 2004, stated uncertainty +/-0.0003°),
  as pvlib implements it (``pvlib.solarposition.spa_python``): the reference position.
  ASHRAE's simple equations (declination by Cooper, equation of time by Spencer) are
  good to about 1° in altitude and azimuth, which is the tolerance used.
- pvlib's own implementations of Cooper's declination, Spencer's equation of time and
  Kasten and Young's air mass: the same published formulas, coded independently.
- The equation of time's yearly extremes, about -14.2 min near 11 February and +16.4 min
  near 3 November (the Astronomical Almanac's values as usually quoted; from memory).
- pvlib's Ineichen-Perez clear-sky model (Ineichen and Perez 2002), a different published
  clear-sky model, for the size of ASHRAE's tau-model irradiance.
"""

from __future__ import annotations

import doctest

import numpy as np
import pandas as pd
import pvlib
import pytest
from plantside.climate import solar
from plantside.errors import InputRangeError

# A mid-latitude site in the northern hemisphere, time zone UTC-5 (an invented place).
LATITUDE, LONGITUDE, TIME_ZONE = 33.6, -84.4, -5.0
HOURS = np.arange(8760)


def _spa(latitude=LATITUDE, longitude=LONGITUDE, time_zone=TIME_ZONE):
    """NREL SPA at the middle of every hour of a 365-day year, local standard time."""
    zone = f"Etc/GMT{-int(time_zone):+d}"
    times = pd.date_range("2023-01-01 00:30", periods=8760, freq="h", tz=zone)
    return pvlib.solarposition.spa_python(times, latitude, longitude)


def test_doctests_run():
    assert doctest.testmod(solar, raise_on_error=True).attempted >= 5


def test_declination_and_equation_of_time_as_pvlib_codes_them():
    days = np.arange(1, 366)
    # Cooper (1969) and Spencer (1971) as coded by pvlib: same formulas. pvlib's constant
    # term of Spencer's series is 0.0000075 rad where ASHRAE prints 0.0075 x 2.2918 min
    # (0.000075 rad, from memory): 0.015 min apart, so agreement to 0.03 min (2 s).
    np.testing.assert_allclose(
        solar.solar_declination(days),
        np.degrees(pvlib.solarposition.declination_cooper69(days)),
        atol=1e-9,
    )
    np.testing.assert_allclose(
        solar.equation_of_time(days),
        pvlib.solarposition.equation_of_time_spencer71(days),
        atol=0.03,
    )


def test_equation_of_time_extremes():
    # Astronomical Almanac, as usually quoted (from memory): about -14.2 min near
    # 11 February (day 42) and +16.4 min near 3 November (day 307); Spencer's series is
    # good to about 0.5 min (its stated accuracy is about 35 s).
    et = solar.equation_of_time(np.arange(1, 366))
    assert int(np.argmin(et)) + 1 in range(38, 47)
    assert int(np.argmax(et)) + 1 in range(302, 312)
    assert et.min() == pytest.approx(-14.2, abs=0.5)
    assert et.max() == pytest.approx(16.4, abs=0.5)


@pytest.mark.parametrize(
    ("latitude", "longitude", "time_zone"),
    [(LATITUDE, LONGITUDE, TIME_ZONE), (-33.9, 151.2, 10.0), (52.0, 4.0, 1.0)],
)
def test_position_against_the_solar_position_algorithm(latitude, longitude, time_zone):
    # NREL SPA (pvlib): ASHRAE's equations agree to about 1° with the sun above 5° (Cooper's
    # declination alone is off by up to about 1°; common practice for these equations).
    spa = _spa(latitude, longitude, time_zone)
    sun = solar.solar_position(
        HOURS % 24 + 0.5,
        solar.day_of_year_from_hour_of_year(HOURS),
        latitude,
        longitude,
        time_zone,
    )
    up = spa["elevation"].to_numpy() > 5.0
    altitude_error = np.abs(sun.altitude - spa["elevation"].to_numpy())[up]
    # azimuth is ill-conditioned with the sun near the zenith: compared below 75°
    mid = up & (spa["elevation"].to_numpy() < 75.0)
    difference = (sun.azimuth - spa["azimuth"].to_numpy() + 180.0) % 360.0 - 180.0
    azimuth_error = np.abs(difference)[mid]
    assert altitude_error.max() < 1.5
    assert azimuth_error.max() < 2.0  # the declination error shows more in azimuth
    assert altitude_error.mean() < 0.4
    # sunrise and sunset hours agree (the sun above the horizon in the same hours,
    # apart from hours within half a degree of it)
    clear = np.abs(spa["elevation"].to_numpy()) > 1.0
    assert np.array_equal((sun.altitude > 0)[clear], (spa["elevation"].to_numpy() > 0)[clear])


def test_air_mass_kasten_young():
    # Kasten and Young (1989) as pvlib codes it; 1 at the zenith, about 38 at the horizon.
    altitude = np.array([90.0, 60.0, 30.0, 10.0, 2.0, 0.5])
    expected = pvlib.atmosphere.get_relative_airmass(90.0 - altitude, model="kastenyoung1989")
    np.testing.assert_allclose(solar.air_mass(altitude), expected, rtol=1e-9)
    assert np.isnan(solar.air_mass(-1.0))


def test_clear_sky_size_against_another_published_model():
    # Ineichen-Perez (pvlib) with a Linke turbidity of 3 (a clear mid-latitude sky) against
    # the tau model with the default depths: two different published clear-sky models
    # agree on global horizontal irradiance within about 15 % with the sun above 20°
    # (common practice for the spread between clear-sky models).
    spa = _spa()
    day = solar.day_of_year_from_hour_of_year(HOURS)
    altitude = spa["apparent_elevation"].to_numpy()
    sky = solar.clear_sky_irradiance(day, altitude)
    ghi = sky.beam_normal * np.sin(np.radians(np.maximum(altitude, 0))) + sky.diffuse_horizontal
    reference = pvlib.clearsky.ineichen(
        spa["apparent_zenith"],
        pvlib.atmosphere.get_relative_airmass(spa["apparent_zenith"]).fillna(40.0),
        linke_turbidity=3.0,
        altitude=0.0,
    )["ghi"].to_numpy()
    high = altitude > 20.0
    ratio = ghi[high] / reference[high]
    assert 0.85 < ratio.mean() < 1.15
    assert np.all((ratio > 0.75) & (ratio < 1.25))
    # no sun, no irradiance
    assert np.all(sky.beam_normal[altitude <= 0] == 0.0)
    assert np.all(sky.diffuse_horizontal[altitude <= 0] == 0.0)


def test_beam_on_vertical_surfaces_matches_pvlib_geometry():
    # pvlib.irradiance.beam_component: DNI x max(cos(angle of incidence), 0), tilt 90°.
    spa = _spa()
    for azimuth in (0.0, 90.0, 180.0, 270.0, 135.0):
        ours = solar.vertical_surface_irradiance(
            800.0, 100.0, spa["elevation"], spa["azimuth"], azimuth, 0.0
        ).beam
        reference = pvlib.irradiance.beam_component(
            90.0, azimuth, spa["zenith"], spa["azimuth"], 800.0
        )
        up = spa["elevation"].to_numpy() > 0
        np.testing.assert_allclose(np.asarray(ours)[up], reference.to_numpy()[up], atol=1e-6)


def test_vertical_sky_diffuse_ratio_limits():
    # ASHRAE Fundamentals 2017 Ch. 14 Eq. 26: Y = 0.55 + 0.437 + 0.313 = 1.3 at normal
    # incidence, and 0.45 for a surface facing away from the sun.
    facing = solar.vertical_surface_irradiance(0.0, 100.0, 0.0, 90.0, 90.0, 0.0)
    away = solar.vertical_surface_irradiance(0.0, 100.0, 0.0, 270.0, 90.0, 0.0)
    assert float(facing.diffuse) == pytest.approx(130.0)
    assert float(away.diffuse) == pytest.approx(45.0)
    # ground-reflected: (E_b sin(beta) + E_d) rho / 2 (Eq. 29 for a vertical surface)
    reflected = solar.vertical_surface_irradiance(1000.0, 100.0, 30.0, 180.0, 0.0, 0.2).reflected
    assert float(reflected) == pytest.approx((500.0 + 100.0) * 0.1)


def test_east_peaks_in_the_morning_west_in_the_afternoon():
    # Geometry: an east wall sees the sun before solar noon, a west wall after it.
    irradiance = solar.clear_sky_vertical_irradiance(
        HOURS, LATITUDE, LONGITUDE, TIME_ZONE, [90.0, 270.0]
    )
    by_hour = irradiance.reshape(2, 365, 24).mean(axis=1)
    # solar noon here is about 12:40 local standard time (longitude 84.4° W, zone -5)
    assert int(np.argmax(by_hour[0])) < 12
    assert int(np.argmax(by_hour[1])) > 13
    assert irradiance.shape == (2, 8760)
    assert np.all(irradiance >= 0.0)


def test_bad_site_names_the_field():
    with pytest.raises(InputRangeError) as info:
        solar.solar_position(12.0, 1, 95.0, 0.0, 0.0)
    assert info.value.field == "latitude"
    with pytest.raises(InputRangeError) as info:
        solar.clear_sky_irradiance(1, 30.0, beam_optical_depth=3.0)
    assert info.value.field == "beam_optical_depth"
