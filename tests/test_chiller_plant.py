"""A plant's year on the water side: energy balance every hour, flows, pumps, economizer."""

import numpy as np
import pytest
from plantside.errors import InputRangeError
from plantside.plant.boilers import boiler_efficiency
from plantside.plant.chiller_plant import (
    ChilledWaterSettings,
    CondenserSettings,
    chiller_plant_year,
)
from plantside.plant.chillers import fit_chiller_curves
from plantside.plant.hot_water_plant import HotWaterSettings, hot_water_plant_year
from plantside.plant.pumps import PumpSettings
from plantside.plant.water import water_flow_from_load


@pytest.fixture(scope="module")
def year():
    """A synthetic year (fictional): loads and weather on a daily and seasonal cycle."""
    hours = np.arange(8760)
    season = -np.cos(2 * np.pi * hours / 8760)
    day = -np.cos(2 * np.pi * (hours % 24) / 24)
    drybulb = 12 + 12 * season + 5 * day
    wet_bulb = drybulb - 3 - 2 * (day + 1)
    cooling = np.clip((drybulb - 10.0) * 45.0, 0.0, None)
    heating = np.clip((14.0 - drybulb) * 30.0, 0.0, None) + 20.0
    return drybulb, wet_bulb, cooling, heating


def _plant(year, **kwargs):
    drybulb, wet_bulb, cooling, _ = year
    curves = fit_chiller_curves(
        0.6, "water", "kw_per_ton", part_load_efficiencies=(0.6, 0.54, 0.5, 0.58)
    )
    return chiller_plant_year(cooling, wet_bulb, drybulb, [700.0, 700.0], curves, **kwargs)


def test_energy_balance_every_hour(year):
    # First law, every hour: condenser heat = cooling served + compressor input; the loop
    # load (coils + pump heat) = free cooling + chiller load, served or unmet.
    plant = _plant(year, condenser=CondenserSettings(waterside_economizer=True))
    h = plant.hourly
    served = h["chiller_load_kW"] - h["unmet_kW"]
    assert h["condenser_heat_kW"].to_numpy() == pytest.approx(
        (served + h["chiller_input_kW"]).to_numpy()
    )
    assert (h["coil_load_kW"] + h["pump_heat_kW"]).to_numpy() == pytest.approx(
        (h["free_cooling_kW"] + h["chiller_load_kW"]).to_numpy()
    )
    assert h["unmet_kW"].sum() == 0.0


def test_flow_follows_load_over_delta_t(year):
    # flow = load / (rho cp dT) each hour (definition; the quick forms are in test_water).
    plant = _plant(year)
    h = plant.hourly
    expected = water_flow_from_load(h["coil_load_kW"].to_numpy(), 5.6, 6.7 + 2.8)
    assert h["chilled_water_flow_m3s"].to_numpy() == pytest.approx(expected)
    assert plant.design["chilled_water_flow_m3s"] == pytest.approx(expected.max())


def test_pump_heat_replaces_the_percentage(year):
    # Pump shaft power goes to the water (first law): pump heat = input x motor efficiency.
    plant = _plant(year, pumps=PumpSettings(head=30.0, pump_efficiency=0.7, motor_efficiency=0.9))
    h = plant.hourly
    assert h["pump_heat_kW"].to_numpy() == pytest.approx(
        0.9 * h["chilled_water_pump_kW"].to_numpy()
    )
    summary = plant.summary()
    assert 0.0 < summary["pump_heat_kWh"] < 0.05 * summary["cooling_kWh"]


def test_economizer_saves_chiller_energy(year):
    # Free cooling never costs chiller energy; the synthetic year has cold wet bulbs.
    plant = _plant(year, condenser=CondenserSettings(waterside_economizer=True))
    summary = plant.summary()
    assert summary["free_cooling_kWh"] > 0
    assert summary["economizer_chiller_kWh_saved"] > 0
    without = _plant(year).summary()
    assert without["chiller_kWh"] - summary["chiller_kWh"] == pytest.approx(
        summary["economizer_chiller_kWh_saved"], rel=1e-9
    )


def test_low_delta_t_adds_machines_for_flow(year):
    # A chiller at a cold condenser carries more than its rated load (CAPFT > 1) but its
    # evaporator still passes only its flow limit; a falling ΔT adds many more such hours.
    def extra(limit, delta_t_ratio_at_no_load):
        settings = ChilledWaterSettings(
            flow_limit_fraction=limit, delta_t_ratio_points=(delta_t_ratio_at_no_load, 1.0)
        )
        return _plant(year, chilled_water=settings).summary()["hours_extra_for_flow"]

    assert extra(1.5, 1.0) == 0
    constant, low = extra(1.0, 1.0), extra(1.0, 0.5)
    assert low > constant + 500


def test_staging_fraction_changes_stages_not_the_load(year):
    today = _plant(year, staging_fraction=1.0, power_rule=False)
    early = _plant(year, staging_fraction=0.6, power_rule=False)
    assert early.summary()["hours_extra_for_fraction"] > 0
    assert early.summary()["cooling_kWh"] == today.summary()["cooling_kWh"]


def test_air_cooled_plant_has_no_tower(year):
    drybulb, wet_bulb, cooling, _ = year
    curves = fit_chiller_curves(10.0, "air", "eer", iplv=13.0)
    plant = chiller_plant_year(cooling, wet_bulb, drybulb, [1400.0], curves)
    assert plant.hourly["condenser_entering_C"].to_numpy() == pytest.approx(drybulb)
    assert plant.summary()["tower_fan_kWh"] == 0.0
    with pytest.raises(InputRangeError, match="waterside_economizer"):
        CondenserSettings(condenser="air", waterside_economizer=True)


def test_hot_water_year(year):
    drybulb, _, _, heating = year
    settings = HotWaterSettings(boiler_type="condensing", rated_efficiency=0.95)
    plant = hot_water_plant_year(heating, drybulb, [400.0, 400.0], settings)
    h = plant.hourly
    # energy balance of the boilers every hour: fuel = output / efficiency
    firing = h["boiler_load_kW"] > 0
    expected = h["boiler_load_kW"][firing] / boiler_efficiency(
        h["hot_water_return_C"][firing], h["firing_rate"][firing], "condensing", 0.95
    )
    assert h["fuel_input_kW"][firing].to_numpy() == pytest.approx(expected.to_numpy())
    # reset: supply at design in the cold, at the mild value in warm hours
    assert h["hot_water_supply_C"].max() <= 70.0 and h["hot_water_supply_C"].min() >= 45.0
    assert (h["hot_water_return_C"] <= h["hot_water_supply_C"]).all()
    assert 0.85 < plant.summary()["seasonal_boiler_efficiency"] < 0.98


def test_free_cooling_hours_only_where_the_tower_water_is_cold_enough(year):
    # Waterside economizer (ASHRAE Handbook HVAC Systems and Equipment 2020, Ch. 40): the
    # exchanger pre-cools only when tower water (wet bulb + tower approach) plus the
    # exchanger approach is below the chilled-water return; return = supply + design ΔT
    # here (constant ΔT by default), 6.7 + 5.6 = 12.3 °C, approaches 4 K and 1.5 K.
    _, wet_bulb, cooling, _ = year
    summary = _plant(year, condenser=CondenserSettings(waterside_economizer=True)).summary()
    possible = int(np.sum((wet_bulb + 4.0 + 1.5 < 6.7 + 5.6 + 1e-9) & (cooling > 0)))
    assert 0 < summary["free_cooling_hours"] <= possible
    assert _plant(year).summary()["free_cooling_hours"] == 0
