"""ASHRAE climate zones from degree days (plantside.climate.climate_zone).

Sources: the climate zones of real cities as ASHRAE 90.1 Normative Appendix B and the
IECC county map list them (well known: Miami 1A, Houston 2A, Phoenix 2B, Atlanta 3A,
New York 4A, Chicago 5A, Denver 5B, Minneapolis 6A, Duluth 7, Fairbanks 8), with
their long-term degree days rounded from NOAA climate normals (from memory; converted
from °F·day: K·day = °F·day / 1.8). A city's figures sit well inside its zone, so a
recollection a few per cent off still tests the thresholds.
"""

from __future__ import annotations

import numpy as np
import pytest
from plantside.air.economizer import DRYBULB_LIMIT_BY_CLIMATE_ZONE
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.climate_zone import (
    cooling_degree_days,
    economizer_drybulb_limit,
    heating_degree_days,
    parse_climate_zone,
    suggest_climate_zone,
    thermal_zone_from_degree_days,
)
from plantside.climate.weather import Weather
from plantside.errors import InputRangeError

# city: (HDD65 [°F·day], CDD50 [°F·day], zone number) - degree days from memory of NOAA
# normals; zones from ASHRAE 90.1 Appendix B / the IECC map.
CITIES = {
    "Miami": (150, 9500, 1),
    "Houston": (1400, 7000, 2),
    "Phoenix": (900, 8400, 2),
    "Atlanta": (2700, 5000, 3),
    "New York": (4700, 3900, 4),
    "Chicago": (6300, 3000, 5),
    "Denver": (6000, 2700, 5),
    "Minneapolis": (7600, 2700, 6),
    "Duluth": (9500, 1500, 7),
    "Fairbanks": (13500, 1000, 8),
}


@pytest.mark.parametrize("city", list(CITIES))
def test_thermal_zone_of_known_cities(city):
    hdd65, cdd50, zone = CITIES[city]
    assert int(thermal_zone_from_degree_days(hdd65 / 1.8, cdd50 / 1.8)) == zone


def test_thermal_zone_is_vectorised():
    hdd = np.array([v[0] for v in CITIES.values()]) / 1.8
    cdd = np.array([v[1] for v in CITIES.values()]) / 1.8
    assert thermal_zone_from_degree_days(hdd, cdd).tolist() == [v[2] for v in CITIES.values()]


def test_degree_days_from_daily_means():
    # Definition (ASHRAE Fundamentals 2017 Ch. 14, degree days from daily means): a year of
    # 20 °C days has CDD10 = 10 K x 365 days and no HDD18; a day's hours average first
    # (a daily swing of +/-5 K around 20 °C changes nothing).
    hours = np.arange(8760)
    drybulb = 20.0 + 5.0 * np.sin(2.0 * np.pi * hours / 24.0)
    weather = Weather("flat", drybulb, 0.008, 101325.0)
    assert cooling_degree_days(weather) == pytest.approx(3650.0)
    assert heating_degree_days(weather) == pytest.approx(0.0, abs=1e-9)
    cold = Weather("cold", np.full(8760, 5.0), 0.003, 101325.0)
    assert heating_degree_days(cold) == pytest.approx(13.0 * 365)


def test_bundled_sites_suggest_zones_of_their_kind():
    # Each fictional site's climate kind (fictional_sites): hot-humid lowland -> a moist
    # hot zone; high desert -> dry; marine coast -> marine; cold plain -> 6 or colder.
    expected = {
        "Salvia Flats": ("1A", "2A"),
        "Mesa Ardiente": ("2B", "3B", "4B"),
        "Port Calder": ("3C", "4C", "5C"),
        "Korva Plains": ("6A", "6B", "7"),
        "Linden Vale": ("4A", "5A"),
    }
    for name in BUNDLED_CLIMATES:
        suggestion = suggest_climate_zone(load_bundled_climate(name))
        assert suggestion.zone in expected[name], (name, suggestion)
        assert "confirm" in suggestion.describe()


def test_economizer_limit_comes_from_the_90_1_table():
    # ASHRAE 90.1-2019 Table 6.5.1.1.3 (from memory): 65 °F in 1A-4A, 70 °F in 5A/6A,
    # 75 °F elsewhere; the table itself lives in plantside.air.economizer.
    assert economizer_drybulb_limit("2A") == DRYBULB_LIMIT_BY_CLIMATE_ZONE["2A"]
    assert economizer_drybulb_limit("2a") == pytest.approx((65.0 - 32.0) / 1.8, abs=0.05)
    assert economizer_drybulb_limit("5A") == pytest.approx((70.0 - 32.0) / 1.8, abs=0.05)
    assert economizer_drybulb_limit("3B") == pytest.approx((75.0 - 32.0) / 1.8, abs=0.05)
    assert economizer_drybulb_limit("0A") == economizer_drybulb_limit("1A")


def test_bad_zone_names_the_field():
    with pytest.raises(InputRangeError) as info:
        parse_climate_zone("9Z", "site.climate_zone")
    assert info.value.field == "site.climate_zone"
    assert "4C" in info.value.allowed
