"""Heat rejection: condenser heat, tower sizing, fans, waterside economizer."""

import numpy as np
import pytest
from plantside.plant.heat_rejection import (
    DEFAULT_TOWER_FAN_POWER_PER_HEAT,
    KW_PER_TOWER_TON,
    condenser_heat,
    dry_cooler_design,
    tower_design,
    tower_fan_power,
    waterside_economizer,
)
from plantside.units import btuh_from_kw, delta_celsius_from_fahrenheit, gpm_from_m3s

HP_KW = 0.745699872  # kW per horsepower, NIST SP 811 Appendix B


def test_condenser_heat_is_load_plus_input():
    # First law on the chiller (ASHRAE Handbook Fundamentals 2017 Ch. 2).
    assert condenser_heat([1000.0, 0.0], [150.0, 0.0]) == pytest.approx([1150.0, 0.0])


def test_tower_ton_and_three_gpm_per_ton():
    # Common practice (no source): a tower ton is 15,000 Btu/h, about 3 gpm at a 10 °F range.
    assert btuh_from_kw(KW_PER_TOWER_TON) == pytest.approx(15000.0)
    design = tower_design(
        2000.0, 24.0, approach=3.9, water_range=delta_celsius_from_fahrenheit(10.0)
    )
    assert gpm_from_m3s(design.flow) / design.nominal_tons == pytest.approx(3.0, rel=0.01)
    assert design.leaving_water == pytest.approx(27.9)
    assert design.entering_water == pytest.approx(27.9 + 50.0 / 9.0)


def test_default_fan_power_is_the_90_1_minimum():
    # ASHRAE 90.1-2019 Table 6.8.1-7 (from memory): 40.2 gpm/hp at 95 -> 85 °F, 75 °F WB.
    design = tower_design(3000.0, 23.9, 3.9, delta_celsius_from_fahrenheit(10.0))
    gpm_per_hp = gpm_from_m3s(design.flow) / (design.fan_power / HP_KW)
    assert gpm_per_hp == pytest.approx(40.2, rel=0.01)
    assert DEFAULT_TOWER_FAN_POWER_PER_HEAT == pytest.approx(0.0127, rel=0.01)


def test_dry_cooler_leaving_fluid_and_fans():
    design = dry_cooler_design(500.0, 35.0, approach=8.0)
    assert design.leaving_water == 43.0
    assert design.fan_power == pytest.approx(10.0)


def test_fan_cube_law_with_minimum_speed():
    # Fan affinity law (power ~ speed³; ASHRAE Handbook HVAC Systems and Equipment, fans;
    # from memory), speed ~ share of design heat (common practice).
    p = tower_fan_power(np.array([0.0, 50.0, 500.0, 1000.0, 1200.0]), 1000.0, 10.0, 0.2)
    assert p == pytest.approx([0.0, 10.0 * 0.2**3, 1.25, 10.0, 10.0])


def test_waterside_economizer_full_partial_none():
    # The condition: wet bulb + tower approach + exchanger approach <= supply covers
    # the load fully; between supply and return the share (t_r - t_pre)/(t_r - t_s).
    load = np.array([100.0, 100.0, 100.0, 0.0])
    wb = np.array([1.0, 5.0, 10.0, 1.0])
    result = waterside_economizer(load, wb, 7.0, 13.0, tower_approach=4.0, exchanger_approach=2.0)
    assert result.fraction == pytest.approx([1.0, 2.0 / 6.0, 0.0, 0.0])
    assert result.free_load + result.remaining_load == pytest.approx(load)
    summary = result.summary()
    assert summary["hours_full_free_cooling"] == 1
    assert summary["hours_partial_free_cooling"] == 1
    alone = waterside_economizer(load, wb, 7.0, 13.0, 4.0, 2.0, integrated=False)
    assert alone.fraction == pytest.approx([1.0, 0.0, 0.0, 0.0])
