"""Zones that follow the sun give the plant real diversity; the site's climate zone sets
the economizer high limit.

Sources: sun geometry (an east facade is sunlit before solar noon, a west facade after
it; ASHRAE Handbook Fundamentals 2017 Ch. 14, the incidence-angle equation for a
vertical surface); ASHRAE 90.1-2019 Table 6.5.1.1.3 (fixed dry-bulb high limit 65 °F in
climate zone 2A, from memory, held in plantside.air.economizer).
"""

from __future__ import annotations

import numpy as np
import pytest
from plantside.air.economizer import DRYBULB_LIMIT_BY_CLIMATE_ZONE
from plantside.errors import ScenarioError
from plantside.study.run import run_study
from plantside.study.scenario import dumps_scenario, loads_scenario, scenario_from_dict


def _unit(name, zone, **settings):
    return {
        "name": name,
        "supply_airflow": 4000.0,
        "minimum_outdoor_air_fraction": 0.2,
        **settings,
        "zone": {
            "cooling_design_sensible": 20.0,
            "cooling_design_latent": 3.0,
            "heating_design_load": 15.0,
            "internal_fraction": 0.5,
            "occupied_days": "all",
            **zone,
        },
    }


def _scenario(east, west, site=None, **settings):
    return scenario_from_dict(
        {
            "unit_system": "SI",
            "site": {"climate": "Salvia Flats", **(site or {})},
            "air_handler": [_unit("east", east, **settings), _unit("west", west, **settings)],
        }
    )


GLAZED = {"solar_heat_gain_coefficient": 0.4}


def test_east_and_west_units_give_diversity_below_one():
    result = run_study(
        _scenario({"glazing_area_east": 150.0, **GLAZED}, {"glazing_area_west": 150.0, **GLAZED})
    )
    zones = {u.name: u.hourly["zone_sensible_kW"].to_numpy() for u in result.air_handlers}
    # sun geometry: the east zone's load peaks before noon, the west zone's after it
    assert int(np.argmax(zones["east"])) % 24 < 12
    assert int(np.argmax(zones["west"])) % 24 > 13
    table = result.cooling.diversity.set_index("level")
    # the zones no longer peak in the same hour: coincidence factor below 1
    assert table.loc["zones", "coincidence_factor"] < 0.97
    assert table.loc["zones", "diversity_factor"] > 1.03
    assert table.loc["coils", "coincidence_factor"] < 1.0


def test_without_glazing_identical_units_peak_together():
    # the straight lines of the modified bin method: same zone, same hour, factor 1
    result = run_study(_scenario({}, {}))
    table = result.cooling.diversity.set_index("level")
    assert table.loc["zones", "coincidence_factor"] == pytest.approx(1.0)


def test_climate_zone_sets_the_default_limit_and_cautions_above_it():
    table_2a = DRYBULB_LIMIT_BY_CLIMATE_ZONE["2A"]  # 65 °F (90.1-2019 Table 6.5.1.1.3)
    scenario = _scenario({}, {}, site={"climate_zone": "2a"})
    assert scenario.climate_zone == "2A"
    assert all(s.settings.economizer_drybulb_limit == table_2a for s in scenario.air_handlers)
    assert not [c for c in run_study(scenario).cautions if "economizer_drybulb_limit" in c]
    above = _scenario({}, {}, site={"climate_zone": "2A"}, economizer_drybulb_limit=21.1)
    cautions = [c for c in run_study(above).cautions if "economizer_drybulb_limit" in c]
    assert len(cautions) == 2
    assert cautions[0].startswith("east:")
    assert "21 °C" in cautions[0]
    assert "18 °C" in cautions[0]
    assert "2A" in cautions[0]


def test_bad_climate_zone_names_the_field():
    with pytest.raises(ScenarioError) as info:
        _scenario({}, {}, site={"climate_zone": "9Z"})
    assert "site.climate_zone" in str(info.value)


def test_new_fields_round_trip_in_ip():
    text = """
unit_system = "IP"
[site]
climate = "Linden Vale"
climate_zone = "4A"
latitude = 41.0
longitude = -80.0
time_zone = -5
[[air_handler]]
name = "AHU-1"
supply_airflow = 8000.0
[air_handler.zone]
cooling_design_sensible = 20.0
glazing_area_south = 500.0
internal_gain_profile = [0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.5, 0.8, 1, 1, 1, 1,
                         1, 1, 1, 1, 1, 0.8, 0.5, 0.2, 0.2, 0.2, 0.2, 0.2]
weekend_occupied_start_hour = 9
weekend_occupied_end_hour = 13
"""
    scenario = loads_scenario(text)
    zone = scenario.air_handlers[0].zone
    # 500 ft² x 0.09290304 m²/ft² (NIST SP 811, exact)
    assert zone.glazing_area_south == pytest.approx(500.0 * 0.09290304)
    assert zone.internal_gain_profile[7] == 0.8
    assert scenario.latitude == 41.0
    assert scenario.load_weather().latitude == 41.0
    # saved and loaded back: the same text when saved again (floats through IP to 1e-12)
    again = loads_scenario(dumps_scenario(scenario))
    assert dumps_scenario(again) == dumps_scenario(scenario)
    assert again.climate_zone == "4A"
    assert again.air_handlers[0].zone.internal_gain_profile == zone.internal_gain_profile
    assert again.air_handlers[0].zone.glazing_area_south == pytest.approx(zone.glazing_area_south)


def test_weather_file_without_location_names_the_missing_field(tmp_path):
    hours = np.arange(8760)
    rows = "\n".join(f"{h},{20 + 5 * np.sin(h / 24 * 6.283):.2f},8.0,101325" for h in hours)
    (tmp_path / "year.csv").write_text(
        "hour,drybulb_C,humidity_ratio_g_per_kg,pressure_Pa\n" + rows + "\n", encoding="utf-8"
    )
    scenario = scenario_from_dict(
        {
            "unit_system": "SI",
            "site": {"weather_file": "year.csv", "weather_units": "SI"},
            "air_handler": [_unit("east", {"glazing_area_east": 50.0})],
        },
        base_dir=tmp_path,
    )
    with pytest.raises(ScenarioError) as info:
        scenario.zone_loads(0)
    assert "site.latitude" in str(info.value)
    located = scenario_from_dict(
        {
            "unit_system": "SI",
            "site": {
                "weather_file": "year.csv",
                "weather_units": "SI",
                "latitude": 35.0,
                "longitude": -100.0,
                "time_zone": -6,
            },
            "air_handler": [_unit("east", {"glazing_area_east": 50.0})],
        },
        base_dir=tmp_path,
    )
    assert located.zone_loads(0).solar_gain.hourly.size == 8760
