"""Chilled and hot water: properties, flow, quick forms, ΔT, reset, machines for flow."""

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from hypothesis import given
from hypothesis import strategies as st
from plantside.constants import CP_LIQUID_WATER
from plantside.errors import InputRangeError
from plantside.plant.water import (
    apparatus_dew_point_check,
    coil_delta_t_from_part_load_ratio,
    hot_water_supply_temperature_from_outdoor,
    load_from_water_flow,
    machines_for_flow,
    return_temperature_from_load,
    water_density,
    water_flow_from_load,
)
from plantside.units import (
    btuh_from_kw,
    delta_celsius_from_fahrenheit,
    gpm_from_m3s,
    kw_from_tons,
    lps_from_m3s,
    m3s_from_gpm,
)


@pytest.mark.parametrize("temperature", [1.0, 4.0, 10.0, 20.0, 40.0, 60.0, 80.0, 95.0])
def test_density_matches_coolprop(temperature):
    # CoolProp (IAPWS-95) at 101.325 kPa; Kell's equation is stated to a few ppm, 0.01 % here.
    reference = PropsSI("D", "T", temperature + 273.15, "P", 101325.0, "Water")
    assert water_density(temperature) == pytest.approx(reference, rel=1e-4)


@pytest.mark.parametrize("temperature", [3.0, 10.0, 35.0, 60.0, 95.0])
def test_constant_specific_heat_within_stated_band(temperature):
    # CoolProp (IAPWS-95): the module states the fixed 4.186 kJ/(kg K) is within 0.6 %, 3-95 °C.
    reference = PropsSI("C", "T", temperature + 273.15, "P", 101325.0, "Water") / 1000.0
    assert CP_LIQUID_WATER == pytest.approx(reference, rel=6e-3)


def test_gallon_and_litre_conversions():
    # NIST SP 811 Appendix B: 1 gal (US)/min = 6.309020e-5 m³/s.
    assert gpm_from_m3s(6.309020e-5) == pytest.approx(1.0, rel=1e-6)
    assert lps_from_m3s(m3s_from_gpm(1.0)) == pytest.approx(0.06309020, rel=1e-6)
    assert m3s_from_gpm(gpm_from_m3s(0.123)) == pytest.approx(0.123, rel=1e-12)


@pytest.mark.parametrize(("tons", "delta_f"), [(100.0, 10.0), (500.0, 12.0), (1200.0, 16.0)])
def test_chilled_water_flow_matches_24_tons_over_delta_t(tons, delta_f):
    # Common practice (no source): gpm = 24 x tons / ΔT [°F] (8.33 lb/gal, 1 Btu/(lb °F));
    # it rounds the water's properties, so 0.5 % is its own precision.
    flow = water_flow_from_load(kw_from_tons(tons), delta_celsius_from_fahrenheit(delta_f), 10.0)
    assert gpm_from_m3s(flow) == pytest.approx(24.0 * tons / delta_f, rel=5e-3)


@pytest.mark.parametrize(
    ("gpm", "delta_f", "temperature"), [(240.0, 10.0, 10.0), (50.0, 20.0, 70.0)]
)
def test_load_matches_500_gpm_delta_t(gpm, delta_f, temperature):
    # Common practice (no source): Q [Btu/h] = 500 x gpm x ΔT [°F]; hot water is ~2.5 % lighter
    # at 70 °C, so the rule holds there within 3 %.
    load = load_from_water_flow(
        m3s_from_gpm(gpm), delta_celsius_from_fahrenheit(delta_f), temperature
    )
    tolerance = 5e-3 if temperature < 30 else 3e-2
    assert btuh_from_kw(load) == pytest.approx(500.0 * gpm * delta_f, rel=tolerance)


@given(st.floats(0.0, 5000.0), st.floats(0.5, 30.0), st.floats(1.0, 95.0))
def test_flow_and_load_round_trip(load, delta_t, temperature):
    # Round trip of Q = rho cp V dT (the definition of the flow).
    flow = water_flow_from_load(load, delta_t, temperature)
    assert load_from_water_flow(flow, delta_t, temperature) == pytest.approx(load, abs=1e-9)


def test_return_temperature_conserves_energy():
    # First law: the heat the water gave up equals the load (same density at the supply).
    supply, load, flow = 70.0, np.array([0.0, 50.0, 300.0]), 0.004
    t_return = return_temperature_from_load(supply, load, flow)
    assert t_return[0] == supply
    back = load_from_water_flow(flow, supply - t_return, supply)
    assert back == pytest.approx(load, rel=1e-12, abs=1e-12)
    assert return_temperature_from_load(6.7, 100.0, 0.004, heating=False) > 6.7
    with pytest.raises(InputRangeError, match="flow"):
        return_temperature_from_load(70.0, 10.0, 0.0)


def test_part_load_delta_t_relation():
    # The user's relation, piecewise linear (no source); the default is constant.
    x = np.array([0.0, 0.25, 0.5, 1.0, 1.3])
    assert coil_delta_t_from_part_load_ratio(x, 5.6) == pytest.approx(np.full(5, 5.6))
    falling = coil_delta_t_from_part_load_ratio(x, 5.0, (0.0, 1.0), (0.5, 1.0))
    assert falling == pytest.approx([2.5, 3.125, 3.75, 5.0, 5.0])
    with pytest.raises(InputRangeError, match="load_ratio_points"):
        coil_delta_t_from_part_load_ratio(0.5, 5.0, (1.0, 0.0), (1.0, 0.5))


def test_outdoor_reset_schedule():
    # Straight-line reset between its two points, held beyond (common practice, no source).
    outdoor = np.array([-20.0, -10.0, 2.5, 15.0, 25.0])
    supply = hot_water_supply_temperature_from_outdoor(outdoor, -10.0, 80.0, 15.0, 50.0)
    assert supply == pytest.approx([80.0, 80.0, 65.0, 50.0, 50.0])
    with pytest.raises(InputRangeError, match="mild_outdoor"):
        hot_water_supply_temperature_from_outdoor(0.0, -10.0, 80.0, -12.0, 50.0)


def test_low_delta_t_needs_a_machine_for_flow():
    # Two chillers of 550 kW for a 1000 kW design, each passing its share of the design flow.
    # Constant ΔT: flow follows load, so no extra machine. ΔT falling to 60 % at no load:
    # at 500 kW (50 %) ΔT = 80 % of design, flow = 62.5 % of design > one machine's 55 %.
    design, dt = 1000.0, 5.6
    loads = np.array([200.0, 500.0, 540.0, 900.0])
    design_flow = water_flow_from_load(design, dt)
    limits = np.array([0.55, 0.55]) * design_flow
    constant = water_flow_from_load(loads, dt)
    assert machines_for_flow(loads, constant, [550.0, 550.0], limits).hours_extra_for_flow == 0
    low_dt = coil_delta_t_from_part_load_ratio(loads / design, dt, (0.0, 1.0), (0.6, 1.0))
    result = machines_for_flow(loads, water_flow_from_load(loads, low_dt), [550.0, 550.0], limits)
    assert result.for_load.tolist() == [1, 1, 1, 2]
    assert result.for_flow.tolist() == [1, 2, 2, 2]
    assert result.extra_for_flow.tolist() == [False, True, True, False]


def test_apparatus_dew_point_caution_names_the_unit_and_shortfall():
    # shortfall = supply + approach - ADP (the check of the issue); 6.7 + 3 - 8.0 = 1.7 K.
    check = apparatus_dew_point_check(["AHU-1", "AHU-2"], [8.0, 11.0], 6.7, 3.0)
    assert check.shortfall == pytest.approx([1.7, 0.0])
    (caution,) = check.cautions()
    assert "AHU-1" in caution and "1.7 K" in caution and "5.0 °C" in caution
