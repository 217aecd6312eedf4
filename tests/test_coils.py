"""Cooling and heating coils against the outside world.

Sources:
- ASHRAE Handbook Fundamentals 2017 (SI), Ch. 1, worked examples (from memory; each
  recomputed here with psychrolib before use):
  * heating: saturated air at 2 °C, 10 m³/s, heated to 40 °C; answer about 491 kW.
  * cooling and dehumidifying: 30 °C / 50 % RH at 5 m³/s leaving saturated at 10 °C;
    q = m_da [(h1 - h2) - (W1 - W2) h_w2], answer about 198 kW (m_da = 5.70 kg/s).
- Bypass factor / apparatus dew point: common practice (no single source); worked
  example constructed at the AHRI 340/360 standard rating entering state, 80 °F DB /
  67 °F WB (26.7 °C / 19.4 °C; from memory), checked with psychrolib.
- psychrolib 2.5 for every state (independent scalar implementation of Ch. 1).
"""

from __future__ import annotations

import numpy as np
import psychrolib
import pytest
from hypothesis import given
from hypothesis import strategies as st
from plantside.air import moist_air as ma
from plantside.air.coils import (
    apparatus_dew_point_from_bypass_factor,
    bypass_factor_from_apparatus_dew_point,
    cooling_coil_leaving_humidity_ratio,
    cooling_coil_load,
    heating_coil_load,
)
from plantside.errors import InputRangeError

P = 101325.0  # Pa, ASHRAE 2017 Ch. 1 Table 1


def _h(t, w):
    return psychrolib.GetMoistAirEnthalpy(t, w) / 1000.0  # kJ/kg, psychrolib


def test_handbook_heating_example():
    # ASHRAE Fundamentals 2017 Ch. 1 heating example (from memory): about 491 kW.
    w = float(ma.saturation_humidity_ratio(2.0, P))
    m = 10.0 / float(ma.specific_volume_from_humidity_ratio(2.0, w, P))
    q = float(heating_coil_load(m, 2.0, 40.0, w))
    assert q == pytest.approx(491.0, abs=2.0)
    # psychrolib: m (h2 - h1)
    m_ref = 10.0 / psychrolib.GetMoistAirVolume(2.0, psychrolib.GetSatHumRatio(2.0, P), P)
    w_ref = psychrolib.GetSatHumRatio(2.0, P)
    assert q == pytest.approx(m_ref * (_h(40.0, w_ref) - _h(2.0, w_ref)), rel=1e-4)


def test_handbook_cooling_and_dehumidifying_example():
    # ASHRAE Fundamentals 2017 Ch. 1 cooling and dehumidification example (from memory):
    # 5 m³/s at 30 °C / 50 % RH leaving saturated at 10 °C: m_da = 5.70 kg/s, q ~ 198 kW.
    w1 = float(ma.humidity_ratio_from_relative_humidity(30.0, 0.5, P))
    m = 5.0 / float(ma.specific_volume_from_humidity_ratio(30.0, w1, P))
    assert m == pytest.approx(5.70, abs=0.01)
    w2, adp, bf, wet = cooling_coil_leaving_humidity_ratio(
        30.0, w1, 10.0, P, leaving_dew_point=10.0
    )
    assert bool(wet) and float(adp) == 10.0 and np.isnan(bf)  # dew-point model: no BF
    assert float(w2) == pytest.approx(psychrolib.GetSatHumRatio(10.0, P), rel=1e-4)
    load = cooling_coil_load(m, 30.0, w1, 10.0, w2)
    assert float(load.total) == pytest.approx(198.0, abs=1.0)
    # psychrolib evaluation of the handbook's equation, h_w2 = 4.186 x 10 kJ/kg
    reference = m * ((_h(30.0, w1) - _h(10.0, float(w2))) - (w1 - float(w2)) * 4.186 * 10.0)
    assert float(load.total) == pytest.approx(reference, rel=1e-5)
    assert float(load.sensible + load.latent) == pytest.approx(float(load.total), rel=1e-12)
    assert float(load.condensate) == pytest.approx(m * (w1 - float(w2)), rel=1e-12)


def test_bypass_factor_worked_example():
    # Constructed example: entering at the AHRI 340/360 rating state 26.7 °C DB / 19.4 °C WB,
    # bypass factor 0.10, apparatus dew point 10.0 °C -> leaving 0.1 x 26.7 + 0.9 x 10.0.
    t1, twb, bf, adp = 26.7, 19.4, 0.10, 10.0
    w1 = psychrolib.GetHumRatioFromTWetBulb(t1, twb, P)
    t2 = bf * t1 + (1 - bf) * adp  # 11.67 °C, the bypass-factor line (common practice)
    assert float(apparatus_dew_point_from_bypass_factor(t1, t2, bf)) == pytest.approx(adp)
    assert float(bypass_factor_from_apparatus_dew_point(t1, t2, adp)) == pytest.approx(bf)
    w2, adp_out, bf_out, wet = cooling_coil_leaving_humidity_ratio(t1, w1, t2, P, bypass_factor=bf)
    w2_ref = bf * w1 + (1 - bf) * psychrolib.GetSatHumRatio(adp, P)
    assert float(w2) == pytest.approx(w2_ref, rel=1e-4)
    assert float(adp_out) == pytest.approx(adp) and float(bf_out) == pytest.approx(bf)
    assert bool(wet)
    # Same coil stated by its apparatus dew point gives the same leaving state.
    w2_adp, _, bf_adp, _ = cooling_coil_leaving_humidity_ratio(
        t1, w1, t2, P, apparatus_dew_point=adp
    )
    assert float(w2_adp) == pytest.approx(float(w2), rel=1e-12)
    assert float(bf_adp) == pytest.approx(bf)
    m = 2.0
    load = cooling_coil_load(m, t1, w1, t2, w2)
    ref = m * ((_h(t1, w1) - _h(t2, float(w2))) - (w1 - float(w2)) * 4.186 * t2)
    assert float(load.total) == pytest.approx(ref, rel=1e-5)
    # leaving relative humidity of such a coil is high but not saturated (about 90-95 %)
    rh = psychrolib.GetRelHumFromHumRatio(t2, float(w2), P)
    assert 0.85 < rh < 1.0


def test_dry_coil_when_entering_dew_point_below_apparatus_dew_point():
    # 30 °C at 20 % RH has a dew point near 4.6 °C; cooling to 13 °C with BF 0.1 needs an
    # ADP of 11.1 °C, above the dew point: sensible cooling only (ASHRAE Ch. 1, sensible
    # cooling process).
    w1 = float(ma.humidity_ratio_from_relative_humidity(30.0, 0.2, P))
    w2, adp, bf, wet = cooling_coil_leaving_humidity_ratio(30.0, w1, 13.0, P, bypass_factor=0.1)
    assert not bool(wet) and np.isnan(adp) and np.isnan(bf)
    assert float(w2) == w1
    load = cooling_coil_load(3.0, 30.0, w1, 13.0, w2)
    assert float(load.latent) == 0.0 and float(load.condensate) == 0.0
    assert float(load.total) == pytest.approx(3.0 * (_h(30.0, w1) - _h(13.0, w1)), rel=1e-5)


def test_leaving_state_never_supersaturated():
    # Saturated 20 °C air cooled to 11 °C with BF 0.1: the straight line to the ADP lies
    # above the saturation curve near the ADP; the leaving air is capped at saturation.
    w1 = float(ma.saturation_humidity_ratio(20.0, P))
    w2, *_ = cooling_coil_leaving_humidity_ratio(20.0, w1, 11.0, P, bypass_factor=0.1)
    assert float(w2) == pytest.approx(psychrolib.GetSatHumRatio(11.0, P), rel=1e-4)


@given(
    t1=st.floats(18.0, 40.0),
    rh1=st.floats(0.1, 0.95),
    t2=st.floats(8.0, 16.0),
    bf=st.floats(0.0, 0.4),
)
def test_coil_properties(t1, rh1, t2, bf):
    # Any leaving state: no warmer, no wetter than entering, not above saturation; the
    # load split sums to the total and matches psychrolib's enthalpies.
    w1 = float(ma.humidity_ratio_from_relative_humidity(t1, rh1, P))
    if t2 >= t1:
        return
    w2, *_ = cooling_coil_leaving_humidity_ratio(t1, w1, t2, P, bypass_factor=bf)
    w2 = float(w2)
    assert w2 <= w1 + 1e-15
    assert w2 <= psychrolib.GetSatHumRatio(t2, P) * (1 + 1e-6)
    load = cooling_coil_load(1.5, t1, w1, t2, w2)
    assert float(load.sensible + load.latent) == pytest.approx(float(load.total), rel=1e-12)
    ref = 1.5 * ((_h(t1, w1) - _h(t2, w2)) - (w1 - w2) * 4.186 * t2)
    assert float(load.total) == pytest.approx(ref, rel=1e-6, abs=1e-9)


@pytest.mark.parametrize("bad", [-0.1, 1.0, 1.5])
def test_bypass_factor_out_of_range(bad):
    with pytest.raises(InputRangeError) as info:
        cooling_coil_leaving_humidity_ratio(27.0, 0.011, 12.0, P, bypass_factor=bad)
    assert info.value.field == "bypass_factor"
    assert "0 to below 1" in str(info.value)


def test_impossible_apparatus_dew_point_and_leaving_dew_point():
    # A coil cannot cool air below its apparatus dew point, nor leave it supersaturated.
    with pytest.raises(InputRangeError) as info:
        cooling_coil_leaving_humidity_ratio(27.0, 0.011, 12.0, P, apparatus_dew_point=14.0)
    assert info.value.field == "apparatus_dew_point"
    assert "below the leaving dry bulb" in str(info.value)
    with pytest.raises(InputRangeError) as info:
        cooling_coil_leaving_humidity_ratio(27.0, 0.011, 12.0, P, leaving_dew_point=13.0)
    assert info.value.field == "leaving_dew_point"
    with pytest.raises(InputRangeError, match="exactly one"):
        cooling_coil_leaving_humidity_ratio(27.0, 0.011, 12.0, P)


# --- a coil holding a leaving dew point, and the passive exchanger around it ------------
def test_dew_point_coil_leaves_on_its_process_line():
    # Worked example (constructed; bypass-factor line: common practice): entering at the
    # AHRI 340/360 rating state 26.7 °C DB / 19.4 °C WB (from memory), held to a 10 °C
    # leaving dew point with BF = 0.1. By hand with psychrolib: W2 = W(t_dp = 10 °C),
    # Ws(t_adp) = (W2 - 0.1 W1)/0.9, t_adp its dew point, t2 = 0.1 t1 + 0.9 t_adp.
    from plantside.air.coils import dew_point_coil_process

    t1 = 26.7
    w1 = psychrolib.GetHumRatioFromTWetBulb(t1, 19.4, P)
    w2 = psychrolib.GetHumRatioFromTDewPoint(10.0, P)
    w_adp = (w2 - 0.1 * w1) / 0.9
    t_adp = psychrolib.GetTDewPointFromHumRatio(t1, w_adp, P)
    t2 = 0.1 * t1 + 0.9 * t_adp
    process = dew_point_coil_process(t1, w1, w2, 0.1, P)
    # psychrolib's dew-point iteration converges to about 1e-3 K
    assert float(process.apparatus_dew_point) == pytest.approx(t_adp, abs=0.005)
    assert float(process.leaving_drybulb) == pytest.approx(t2, abs=0.005)
    # near saturation, not at the 71 % RH of a leaving dry bulb taken from the set point
    assert psychrolib.GetRelHumFromHumRatio(t2, w2, P) > 0.9
    # with no bypass the coil leaves saturated at the target dew point
    exact = dew_point_coil_process(t1, w1, w2, 0.0, P)
    assert float(exact.leaving_drybulb) == pytest.approx(10.0, abs=0.005)


def test_runaround_exchanger_meets_its_effectiveness_and_limits():
    # Effectiveness of a sensible exchanger, Q = eps C_min (t_hot,in - t_cold,in)
    # (ASHRAE HVAC Systems and Equipment 2020 Ch. 26, from memory); here the hot inlet is
    # the air entering the pre-cool side and the cold inlet the air leaving the coil.
    from plantside.air.coils import dew_point_coil_process, runaround_exchange

    m, t1, w1, w2, bf, eps = 2.0, 30.0, 0.011, 0.0076, 0.1, 0.5
    t_dp1 = psychrolib.GetTDewPointFromHumRatio(t1, w1, P)
    t_dp2 = psychrolib.GetTDewPointFromHumRatio(t1, w2, P)
    t_adp = float(dew_point_coil_process(t1, w1, w2, bf, P).apparatus_dew_point)
    free = runaround_exchange(m, t1, w1, t_dp1, w2, t_dp2, t_adp, bf, 40.0, eps)
    c1, c2 = 1.006 + 1.86 * w1, 1.006 + 1.86 * w2  # Eq. 30 of ASHRAE 2017 Ch. 1
    q = float(free.heat)
    assert q == pytest.approx(eps * m * c2 * (t1 - float(free.coil_leaving_drybulb)), rel=1e-9)
    # the same heat leaves the entering air and reaches the leaving air
    assert q == pytest.approx(m * c1 * (t1 - float(free.coil_entering_drybulb)), rel=1e-9)
    assert q == pytest.approx(
        m * c2 * float(free.reheated_drybulb - free.coil_leaving_drybulb), rel=1e-9
    )
    # the coil still leaves on its line from the pre-cooled state (common practice)
    assert float(free.coil_leaving_drybulb) == pytest.approx(
        bf * float(free.coil_entering_drybulb) + (1 - bf) * t_adp
    )
    # modulated: the reheated air stops at the limit (the supply set point)
    limited = runaround_exchange(m, t1, w1, t_dp1, w2, t_dp2, t_adp, bf, 13.0, eps)
    assert float(limited.reheated_drybulb) == pytest.approx(13.0)
    assert 0.0 < float(limited.heat) < q
    # sensible only: pre-cooling stops at the entering dew point
    humid = psychrolib.GetHumRatioFromTDewPoint(25.0, P)
    capped = runaround_exchange(m, 27.0, humid, 25.0, w2, t_dp2, t_adp, bf, 40.0, 0.9)
    assert float(capped.coil_entering_drybulb) == pytest.approx(25.0)
    # no exchanger: no heat, the coil alone
    none = runaround_exchange(m, t1, w1, t_dp1, w2, t_dp2, t_adp, bf, 40.0, 0.0)
    assert float(none.heat) == 0.0
    assert float(none.coil_leaving_drybulb) == pytest.approx(bf * t1 + (1 - bf) * t_adp)


@given(
    t1=st.floats(12.0, 40.0),
    dew_margin=st.floats(0.5, 15.0),
    bf=st.floats(0.0, 0.4),
    eps=st.floats(0.0, 0.9),
    limit=st.floats(10.0, 25.0),
)
def test_runaround_exchanger_properties(t1, dew_margin, bf, eps, limit):
    # Whatever the state: heat >= 0, never more than eps C_min (t1 - t2), the reheated air
    # never above the limit unless the coil alone leaves warmer, the coil leaving state at
    # or below saturation (t2 >= its dew point), the pre-cooled air not below its dew point.
    from plantside.air.coils import dew_point_coil_process, runaround_exchange

    t_dp1 = t1 - dew_margin
    w1 = psychrolib.GetHumRatioFromTDewPoint(t_dp1, P)
    t_dp2 = min(t_dp1 - 0.5, 10.0)
    w2 = psychrolib.GetHumRatioFromTDewPoint(t_dp2, P)
    process = dew_point_coil_process(t1, w1, w2, bf, P)
    x = runaround_exchange(1.5, t1, w1, t_dp1, w2, t_dp2, process.apparatus_dew_point, bf,
                           limit, eps)  # fmt: skip
    q, t2 = float(x.heat), float(x.coil_leaving_drybulb)
    assert q >= 0.0
    assert q <= eps * 1.5 * (1.006 + 1.86 * w2) * (t1 - t2) * (1 + 1e-9) + 1e-9
    assert t2 >= t_dp2 - 1e-9
    assert float(x.coil_entering_drybulb) >= t_dp1 - 1e-9
    assert float(x.reheated_drybulb) <= max(limit, t2) + 1e-9
