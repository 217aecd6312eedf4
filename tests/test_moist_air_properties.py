"""Property tests (hypothesis) for the moist-air core over its valid range.

The equations are those of ASHRAE Handbook Fundamentals 2017, Ch. 1 (Eqs. 5, 6, 20,
23, 24, 32, 33, 35, 37). Each property is something the handbook's definitions imply:
an inverse undoes its forward equation, the dew point and wet bulb bracket each other,
saturation rises with temperature. Tolerances are the solvers' stated convergence
(about 1e-7 K, see the docstrings) with margin, or float rounding for closed forms.
"""

from __future__ import annotations

import numpy as np
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from plantside.air import moist_air as ma

EXAMPLES = settings(max_examples=150)

pressures = st.floats(ma.PRESSURE_MIN_PA, ma.PRESSURE_MAX_PA)
temperatures = st.floats(-100.0, 200.0)
room_range = st.floats(-60.0, 90.0)
fractions = st.floats(0.0, 1.0)


def _below_one_kg_per_kg(vapor_pressure, pressure):
    # Eq. 20 with W = 1 kg/kg, the largest humidity ratio the core accepts.
    return vapor_pressure <= pressure / (1.0 + 0.621945)


def _dew_point_in_range(w, pressure):
    # Eq. 20 solved for pw: the dew point exists in the formulation (>= -100 °C).
    return pressure * w / (0.621945 + w) >= ma.saturation_vapor_pressure(-100.0)


def _wet_bulb_in_range(drybulb, w, pressure):
    # Eq. 33/35 at t* = -100 °C gives no more than W: the wet bulb is >= -100 °C.
    return (
        ma._humidity_ratio_from_wet_bulb(
            np.asarray(drybulb), np.asarray(-100.0), np.asarray(pressure)
        )
        <= w
    )


@EXAMPLES
@given(dew_point=temperatures, pressure=pressures)
def test_dew_point_humidity_ratio_dew_point(dew_point, pressure):
    # Eq. 36 forward (W from td), then the Newton inverse: back to the same dew point.
    assume(_below_one_kg_per_kg(ma.saturation_vapor_pressure(dew_point), pressure))
    w = ma.humidity_ratio_from_dew_point(dew_point, pressure)
    assert abs(ma.dew_point_from_humidity_ratio(w, pressure) - dew_point) < 1e-6


@EXAMPLES
@given(drybulb=room_range, relative_humidity=st.floats(0.01, 1.0), pressure=pressures)
def test_wet_bulb_relative_humidity_round_trip(drybulb, relative_humidity, pressure):
    # RH -> W (Eq. 22) -> wet bulb (Eq. 33/35 solved) -> W (Eq. 33/35) -> RH.
    pws = ma.saturation_vapor_pressure(drybulb)
    assume(pws < pressure)
    assume(_below_one_kg_per_kg(relative_humidity * pws, pressure))
    w = ma.humidity_ratio_from_relative_humidity(drybulb, relative_humidity, pressure)
    wet_bulb = ma.wet_bulb_from_humidity_ratio(drybulb, w, pressure)
    w_back = ma.humidity_ratio_from_wet_bulb(drybulb, wet_bulb, pressure)
    rh_back = ma.relative_humidity_from_humidity_ratio(drybulb, w_back, pressure)
    assert abs(rh_back - relative_humidity) < 1e-6
    # The wet bulb lies between the dew point and the dry bulb (ASHRAE 2017 Ch. 1).
    dew_point = ma.dew_point_from_humidity_ratio(w, pressure)
    assert dew_point - 1e-6 <= wet_bulb <= drybulb + 1e-9


@EXAMPLES
@given(drybulb=temperatures, fraction=fractions, pressure=pressures)
def test_wet_bulb_solves_its_equation_everywhere(drybulb, fraction, pressure):
    # Over the formulation's whole range, including dry air and above the boiling point
    # at the station pressure: the returned wet bulb reproduces W through Eq. 33/35.
    ws = min(float(ma.saturation_humidity_ratio(drybulb, pressure)), 1.0)
    w = fraction * ws
    wet_bulb = ma.wet_bulb_from_humidity_ratio(drybulb, w, pressure)
    assert -100.0 <= wet_bulb <= drybulb + 1e-9
    if not _wet_bulb_in_range(drybulb, w, pressure):
        # Very cold, very dry air: documented to return the end of the range.
        assert wet_bulb == -100.0
        return
    residual, slope = ma._humidity_ratio_from_wet_bulb(
        np.asarray(drybulb), np.asarray(wet_bulb), np.asarray(pressure), with_slope=True
    )
    # within the solver's stated accuracy (1e-5 K, a hundredth of psychrolib's 0.001 K)
    assert abs(residual - w) / slope < ma.WET_BULB_TOLERANCE_K


@EXAMPLES
@given(drybulb=room_range, fraction=fractions, pressure=pressures)
def test_enthalpy_drybulb_round_trip(drybulb, fraction, pressure):
    # Eq. 30 and its two closed-form inverses.
    ws = min(float(ma.saturation_humidity_ratio(drybulb, pressure)), 1.0)
    w = fraction * ws
    h = ma.enthalpy_from_humidity_ratio(drybulb, w)
    assert abs(ma.drybulb_from_enthalpy(h, w) - drybulb) < 1e-9
    assert abs(ma.humidity_ratio_from_enthalpy(drybulb, h) - w) < 1e-12 + 1e-9 * w


@EXAMPLES
@given(t1=temperatures, t2=temperatures, pressure=pressures)
def test_saturation_rises_with_temperature(t1, t2, pressure):
    # Eqs. 5/6 and 23: pws and Ws increase with temperature, across the ice/water switch.
    assume(abs(t1 - t2) > 1e-6)
    low, high = sorted((t1, t2))
    assert ma.saturation_vapor_pressure(low) < ma.saturation_vapor_pressure(high)
    assume(ma.saturation_vapor_pressure(high) < 0.999 * pressure)  # below boiling
    assert ma.saturation_humidity_ratio(low, pressure) < ma.saturation_humidity_ratio(
        high, pressure
    )


@EXAMPLES
@given(drybulb=room_range, fraction=st.floats(0.001, 1.0), pressure=pressures)
def test_wet_bulb_and_dew_point_rise_with_moisture(drybulb, fraction, pressure):
    # At a fixed dry bulb, more moisture means a higher wet bulb and dew point.
    ws = min(float(ma.saturation_humidity_ratio(drybulb, pressure)), 1.0)
    w = np.array([0.5, 1.0]) * fraction * ws
    assume(_dew_point_in_range(w[0], pressure) and _wet_bulb_in_range(drybulb, w[0], pressure))
    wet_bulb = ma.wet_bulb_from_humidity_ratio(drybulb, w, pressure)
    dew_point = ma.dew_point_from_humidity_ratio(w, pressure)
    assert wet_bulb[0] <= wet_bulb[1] + 1e-7
    assert dew_point[0] < dew_point[1]


@settings(max_examples=60)
@given(
    drybulb=st.lists(room_range, min_size=1, max_size=12),
    fraction=fractions,
    pressure=pressures,
)
def test_vectorised_equals_elementwise(drybulb, fraction, pressure):
    # Whole-array solving (active sets, shared brackets) gives each element what it
    # gets alone.
    t = np.array(drybulb)
    ws = np.minimum(ma.saturation_humidity_ratio(t, pressure), 1.0)
    w = fraction * ws
    together = ma.wet_bulb_from_humidity_ratio(t, w, pressure)
    alone = [ma.wet_bulb_from_humidity_ratio(ti, wi, pressure) for ti, wi in zip(t, w, strict=True)]
    np.testing.assert_allclose(together, alone, atol=1e-6)
    w = w[_dew_point_in_range(w, pressure)]
    dew_together = ma.dew_point_from_humidity_ratio(w, pressure)
    dew_alone = [ma.dew_point_from_humidity_ratio(wi, pressure) for wi in w]
    np.testing.assert_allclose(dew_together, np.reshape(dew_alone, -1), atol=1e-6)
