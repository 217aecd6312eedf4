"""Adiabatic mixing on a mass basis against the outside world.

Sources:
- ASHRAE Handbook Fundamentals 2017 (SI), Ch. 1, the worked example of adiabatic
  mixing of two moist airstreams (outdoor 2 m³/s at 4 °C DB / 2 °C WB with recirculated
  6.25 m³/s at 25 °C / 50 % RH; answers m_da1 = 2.535 kg/s, m_da2 = 7.284 kg/s,
  t3 = 19.5 °C, t*3 = 14.6 °C read from the chart). Recalled from memory; the exact
  solution below was checked with psychrolib (19.63 °C, 14.56 °C), so the handbook's
  chart-read answers are compared at chart precision (0.2 K).
- psychrolib 2.5 (independent scalar implementation of the Ch. 1 equations).
"""

from __future__ import annotations

import numpy as np
import psychrolib
import pytest
from hypothesis import given
from hypothesis import strategies as st
from plantside.air import moist_air as ma
from plantside.air.mixing import (
    mixed_state,
    mixed_state_from_flows,
    outdoor_fraction_for_mixed_drybulb,
)
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1, sea level


def _psychrolib_mix(m1, t1, w1, m2, t2, w2):
    """Mass and energy balances evaluated with psychrolib (independent reference)."""
    h1 = psychrolib.GetMoistAirEnthalpy(t1, w1)
    h2 = psychrolib.GetMoistAirEnthalpy(t2, w2)
    h3 = (m1 * h1 + m2 * h2) / (m1 + m2)
    w3 = (m1 * w1 + m2 * w2) / (m1 + m2)
    return psychrolib.GetTDryBulbFromEnthalpyAndHumRatio(h3, w3), w3, h3 / 1000.0


def test_handbook_mixing_example():
    # ASHRAE Handbook Fundamentals 2017 Ch. 1, adiabatic mixing example (from memory).
    w1 = ma.humidity_ratio_from_wet_bulb(4.0, 2.0, P)
    w2 = ma.humidity_ratio_from_relative_humidity(25.0, 0.50, P)
    m1 = 2.0 / ma.specific_volume_from_humidity_ratio(4.0, w1, P)
    m2 = 6.25 / ma.specific_volume_from_humidity_ratio(25.0, w2, P)
    # Handbook: m_da1 = 2.535 kg/s, m_da2 = 7.284 kg/s (printed to 4 figures).
    assert m1 == pytest.approx(2.535, abs=0.005)
    assert m2 == pytest.approx(7.284, abs=0.005)
    t3, w3, h3 = mixed_state_from_flows(m1, 4.0, w1, m2, 25.0, w2)
    # Handbook chart reading: t3 = 19.5 °C, t*3 = 14.6 °C (chart precision ~0.2 K).
    assert t3 == pytest.approx(19.5, abs=0.2)
    assert ma.wet_bulb_from_humidity_ratio(t3, w3, P) == pytest.approx(14.6, abs=0.2)
    # psychrolib, same balances: exact agreement.
    t_ref, w_ref, h_ref = _psychrolib_mix(m1, 4.0, w1, m2, 25.0, w2)
    assert t3 == pytest.approx(t_ref, abs=1e-6)
    assert w3 == pytest.approx(w_ref, rel=1e-12)
    assert h3 == pytest.approx(h_ref, rel=1e-9)


def test_mass_basis_differs_from_volume_weighted_temperature():
    # Common practice (no source): mixing by volume-weighted temperature ignores that
    # cold outdoor air is denser. Mass basis (ASHRAE Ch. 1) gives a colder mix here.
    w_o = ma.humidity_ratio_from_relative_humidity(-20.0, 0.7, P)
    w_r = ma.humidity_ratio_from_relative_humidity(22.0, 0.4, P)
    v_o = ma.specific_volume_from_humidity_ratio(-20.0, w_o, P)
    v_r = ma.specific_volume_from_humidity_ratio(22.0, w_r, P)
    volume_share = 0.5
    mass_share = (volume_share / v_o) / (volume_share / v_o + (1 - volume_share) / v_r)
    t_mass, _, _ = mixed_state(mass_share, -20.0, w_o, 22.0, w_r)
    t_volume = volume_share * -20.0 + (1 - volume_share) * 22.0
    assert t_mass < t_volume - 1.0
    t_ref, _, _ = _psychrolib_mix(mass_share, -20.0, w_o, 1 - mass_share, 22.0, w_r)
    assert t_mass == pytest.approx(t_ref, abs=1e-6)


@given(
    x=st.floats(0.0, 1.0),
    t_o=st.floats(-30.0, 45.0),
    rh_o=st.floats(0.05, 1.0),
    t_r=st.floats(15.0, 30.0),
    rh_r=st.floats(0.2, 0.7),
)
def test_mixing_matches_psychrolib_and_stays_between_streams(x, t_o, rh_o, t_r, rh_r):
    # psychrolib 2.5 evaluation of the same Ch. 1 mass and energy balances.
    w_o = ma.humidity_ratio_from_relative_humidity(t_o, rh_o, P)
    w_r = ma.humidity_ratio_from_relative_humidity(t_r, rh_r, P)
    t, w, h = mixed_state(x, t_o, w_o, t_r, w_r)
    t_ref, w_ref, h_ref = _psychrolib_mix(x, t_o, w_o, 1 - x, t_r, w_r)
    assert t == pytest.approx(t_ref, abs=1e-6)
    assert w == pytest.approx(w_ref, abs=1e-12)
    assert h == pytest.approx(h_ref, abs=1e-6)
    assert min(t_o, t_r) - 1e-9 <= t <= max(t_o, t_r) + 1e-9


@given(
    t_o=st.floats(-30.0, 12.0),
    rh_o=st.floats(0.05, 1.0),
    target=st.floats(12.5, 18.0),
)
def test_fraction_for_mixed_drybulb_round_trip(t_o, rh_o, target):
    # Exactness of the closed form: mixing at the returned fraction gives the target.
    w_o = ma.humidity_ratio_from_relative_humidity(t_o, rh_o, P)
    w_r = 0.009
    x = outdoor_fraction_for_mixed_drybulb(target, t_o, w_o, 24.0, w_r)
    assert 0.0 <= x <= 1.0
    t, _, _ = mixed_state(x, t_o, w_o, 24.0, w_r)
    assert t == pytest.approx(target, abs=1e-9)


def test_fraction_vectorised_and_bad_inputs():
    x = outdoor_fraction_for_mixed_drybulb(13.0, np.array([-10.0, 0.0, 10.0]), 0.002, 24.0, 0.009)
    assert x.shape == (3,)
    assert np.all(np.diff(x) > 0)  # warmer outdoor air: more of it for the same mix
    with pytest.raises(InputRangeError, match="outdoor_fraction") as info:
        mixed_state(1.2, 10.0, 0.005, 24.0, 0.009)
    assert "0 to 1" in str(info.value)
    with pytest.raises(InputRangeError, match="mass_flow_1"):
        mixed_state_from_flows(-1.0, 10.0, 0.005, 2.0, 24.0, 0.009)
