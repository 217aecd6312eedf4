"""Pumps: the power equation, the trade's horsepower form, variable speed at part load."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from plantside.errors import InputRangeError
from plantside.plant.pumps import (
    PumpSettings,
    pump_heat_to_water,
    pump_power,
    pump_power_fraction_from_flow_fraction,
)
from plantside.units import m3s_from_gpm, meters_from_feet

HP_KW = 0.745699872  # kW per mechanical horsepower (550 ft lbf/s), NIST SP 811 Appendix B


def test_worked_example_1000_gpm_100_ft():
    # Common practice (no source): bhp = gpm x ft / (3960 x eta), 3960 = 33,000 ft lbf/min
    # over 8.33 lb/gal (water near 60 °F). 1000 gpm, 100 ft, 75 %: 33.67 bhp = 25.11 kW.
    flow, head = m3s_from_gpm(1000.0), meters_from_feet(100.0)
    expected_kw = 1000.0 * 100.0 / (3960.0 * 0.75) * HP_KW
    assert pump_power(flow, head, 0.75, temperature=15.6) == pytest.approx(expected_kw, rel=3e-3)
    # with a 90 % motor the input rises by 1/0.9; the water still gets the shaft power
    assert pump_power(flow, head, 0.75, 0.9, 15.6) == pytest.approx(expected_kw / 0.9, rel=3e-3)
    assert pump_heat_to_water(flow, head, 0.75, 15.6) == pytest.approx(expected_kw, rel=3e-3)


def test_si_hydraulic_power():
    # P = rho g Q H: 1 m³/s of water (1000 kg/m³ near 4 °C) lifted 1 m is 9.807 kW
    # (standard gravity 9.80665 m/s², NIST SP 811).
    assert pump_power(1.0, 1.0, 1.0, temperature=4.0) == pytest.approx(9.80665, rel=1e-4)


def test_part_load_form():
    # Affinity laws (ASHRAE Handbook HVAC Systems and Equipment, pumps; from memory):
    # with no control head and no minimum speed, power follows the cube of flow.
    q = np.array([0.25, 0.5, 0.75, 1.0])
    assert pump_power_fraction_from_flow_fraction(q, 0.0, 0.0) == pytest.approx(q**3)
    # with all head held constant, power is proportional to flow
    assert pump_power_fraction_from_flow_fraction(q, 1.0, 0.0) == pytest.approx(q)
    # below the minimum speed the power stays at the minimum speed's
    low = pump_power_fraction_from_flow_fraction(np.array([0.05, 0.2, 0.3]), 0.25, 0.3)
    assert low[0] == low[1] == low[2]
    assert pump_power_fraction_from_flow_fraction(0.0) == 0.0


@given(st.floats(0.0, 1.0), st.floats(0.0, 1.0), st.floats(0.0, 1.0), st.floats(0.0, 1.0))
def test_part_load_power_rises_with_flow_and_is_one_at_design(q1, q2, share, minimum):
    # Property: more flow never takes less power; design flow takes design power.
    low, high = sorted((q1, q2))
    p_low = pump_power_fraction_from_flow_fraction(low, share, minimum)
    p_high = pump_power_fraction_from_flow_fraction(high, share, minimum)
    assert p_low <= p_high + 1e-12
    assert pump_power_fraction_from_flow_fraction(1.0, share, minimum) == pytest.approx(1.0)


def test_settings_validate():
    with pytest.raises(InputRangeError, match="pump_efficiency"):
        PumpSettings(pump_efficiency=1.2)
    with pytest.raises(InputRangeError, match="head"):
        pump_power(0.01, -1.0, 0.7)
