"""Unit conversions at the edges, against exact definitions.

Sources:
- NIST Special Publication 811 (2008), Appendix B, conversion factors (printed to
  7 significant figures; exact where marked). Printed factors below are from memory;
  each is cross-checked in the test against the exact definition it rounds.
- AHRI Standard 550/590 (I-P): 1 ton of refrigeration = 12,000 Btu/h.
- Exact definitions: 1 ft = 0.3048 m, 1 lb = 0.45359237 kg, 1 lb = 7000 grains,
  1 Btu_IT/(lb °F) = 4.1868 kJ/(kg K) (so 1 Btu_IT = 1055.05585262 J),
  1 lbf = 0.45359237 kg x 9.80665 m/s², 1 inHg (conventional) = 13595.1 kg/m³ x g x 1 in.
"""

from __future__ import annotations

import numpy as np
import psychrolib
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from plantside import units as u
from plantside.air.moist_air import enthalpy_from_humidity_ratio
from plantside.errors import InputRangeError
from plantside.units import UnitSystem

# Exact definitions (NIST SP 811 Appendix B).
FT = 0.3048  # m
LB = 0.45359237  # kg
BTU = 4.1868 * LB * 1000.0 / 1.8  # J: 1 Btu_IT/(lb °F) = 4.1868 kJ/(kg K)
LBF = LB * 9.80665  # N
INCH = 0.0254  # m
INHG = 13595.1 * 9.80665 * INCH  # Pa, conventional inch of mercury


def _nist(printed, exact, significant=7):
    """Check a NIST SP 811 printed factor (from memory) against the exact definition:
    they agree to half a unit in the last printed significant figure."""
    assert exact == pytest.approx(printed, rel=0.5 * 10.0 ** (1 - significant))
    return exact


def test_exact_definitions_reproduce_nist_factors():
    # NIST SP 811 Appendix B (from memory), checked against the exact definitions.
    _nist(1.055056e3, BTU)  # Btu_IT -> J
    _nist(2.930711e-1, BTU / 3600.0)  # Btu_IT/h -> W
    _nist(3.516853e3, 12000.0 * BTU / 3600.0)  # ton of refrigeration -> W
    _nist(4.719474e-4, FT**3 / 60.0)  # ft³/min -> m³/s
    _nist(6.894757e3, LBF / INCH**2)  # psi -> Pa
    _nist(3.386389e3, INHG)  # inHg, conventional -> Pa
    _nist(1.259979e-4, LB / 3600.0)  # lb/h -> kg/s
    _nist(6.479891e-5, LB / 7000.0)  # grain -> kg (exact)
    assert BTU / LB == pytest.approx(2326.0, rel=1e-12)  # Btu_IT/lb -> J/kg, exact


# ---------------------------------------------------------------------------------------
# each conversion against the definition
# ---------------------------------------------------------------------------------------
def test_temperature():
    # t/°F = 1.8 t/°C + 32, exact (NIST SP 811 B.9).
    celsius = np.array([-40.0, 0.0, 20.0, 100.0])
    np.testing.assert_allclose(u.fahrenheit_from_celsius(celsius), [-40.0, 32.0, 68.0, 212.0])
    np.testing.assert_allclose(u.celsius_from_fahrenheit([-40.0, 32.0, 68.0, 212.0]), celsius)
    # a difference of 1 K is 1.8 °F, without the offset
    assert u.delta_fahrenheit_from_celsius(10.0) == pytest.approx(18.0)
    assert u.delta_celsius_from_fahrenheit(18.0) == pytest.approx(10.0)


def test_power():
    # 1 Btu_IT/h = BTU/3600 W; MBH = 1000 Btu/h; ton = 12,000 Btu/h (AHRI 550/590).
    assert u.kw_from_btuh(1.0) == pytest.approx(BTU / 3600.0 / 1000.0, rel=1e-12)
    assert u.btuh_from_kw(1.0) == pytest.approx(3600.0 * 1000.0 / BTU, rel=1e-12)
    assert u.kw_from_mbh(1.0) == pytest.approx(BTU / 3600.0, rel=1e-12)
    assert u.mbh_from_kw(BTU / 3600.0) == pytest.approx(1.0, rel=1e-12)
    assert u.kw_from_tons(1.0) == pytest.approx(12000.0 * BTU / 3600.0 / 1000.0, rel=1e-12)
    assert u.kw_from_tons(1.0) == pytest.approx(3.516853, rel=1.5e-7)  # NIST, printed
    assert u.tons_from_kw(u.kw_from_btuh(12000.0)) == pytest.approx(1.0, rel=1e-12)
    assert u.kw_from_mbh(12.0) == pytest.approx(u.kw_from_tons(1.0), rel=1e-12)


def test_airflow():
    # 1 cfm = 0.3048³/60 m³/s exactly; 1 m³/s = 1000 L/s.
    assert u.m3s_from_cfm(1.0) == pytest.approx(FT**3 / 60.0, rel=1e-12)
    assert u.m3s_from_cfm(1.0) == pytest.approx(4.719474e-4, rel=1.1e-7)  # NIST, printed
    assert u.cfm_from_m3s(1.0) == pytest.approx(60.0 / FT**3, rel=1e-12)
    assert u.lps_from_m3s(1.0) == 1000.0
    assert u.m3s_from_lps(472.0) == pytest.approx(0.472)
    # the trade's 1 cfm = 0.472 L/s (common practice, 3 s.f.)
    assert u.lps_from_m3s(u.m3s_from_cfm(1.0)) == pytest.approx(0.472, abs=0.0005)


def test_enthalpy_differences_and_humidity():
    # 1 Btu_IT/lb = 2.326 kJ/kg exactly; 1 lb = 7000 gr, so 1 g/kg = 7 gr/lb exactly.
    assert u.delta_kjkg_from_btulb(1.0) == pytest.approx(2.326, rel=1e-15)
    assert u.delta_btulb_from_kjkg(2.326) == pytest.approx(1.0, rel=1e-15)
    # an enthalpy difference does not depend on the scales' zeros
    assert u.btulb_from_kjkg(60.0) - u.btulb_from_kjkg(50.0) == pytest.approx(10.0 / 2.326)
    assert u.grains_per_lb_from_g_per_kg(10.0) == pytest.approx(70.0, rel=1e-15)
    assert u.g_per_kg_from_grains_per_lb(70.0) == pytest.approx(10.0, rel=1e-15)


@pytest.mark.parametrize(("t_f", "w"), [(0.0, 0.0), (32.0, 0.0), (55.0, 0.0092), (75.0, 0.0188),
                                       (95.0, 0.0143), (-10.0, 0.0004)])  # fmt: skip
def test_enthalpy_on_the_ip_reference(t_f, w):
    # ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 30 in the I-P edition (psychrolib 2.5's
    # I-P GetMoistAirEnthalpy, checked below):
    # h = 0.240 t + W (1061 + 0.444 t), Btu/lb, t in °F (zero: dry air at 0 °F, liquid
    # water at 32 °F). The SI Eq. 30 converted with the unit's offset must give the same
    # number; the I-P coefficients are rounded (0.240 for 1.006/4.1868 = 0.24028;
    # 1061 for 2501/2.326 - 0.444 x 32 = 1061.03), worth up to 0.03 Btu/lb here.
    h_si = enthalpy_from_humidity_ratio(u.celsius_from_fahrenheit(t_f), w)
    h_ip = 0.240 * t_f + w * (1061.0 + 0.444 * t_f)
    assert u.btulb_from_kjkg(h_si) == pytest.approx(h_ip, abs=0.03)
    assert u.kjkg_from_btulb(h_ip) == pytest.approx(h_si, abs=0.03 * 2.326)
    psychrolib.SetUnitSystem(psychrolib.IP)  # the conftest fixture resets it to SI
    # psychrolib floors W at 1e-7 lb/lb: 1.1e-4 Btu/lb at W = 0.
    assert psychrolib.GetMoistAirEnthalpy(t_f, w) == pytest.approx(h_ip, abs=2e-4)


def test_length_and_pressure():
    assert u.meters_from_feet(1000.0) == pytest.approx(304.8, rel=1e-15)
    assert u.feet_from_meters(0.3048) == pytest.approx(1.0, rel=1e-15)
    assert u.pa_from_psia(1.0) == pytest.approx(LBF / INCH**2, rel=1e-12)
    assert u.pa_from_inhg(1.0) == pytest.approx(INHG, rel=2e-7)  # NIST 3.386389E+03
    # Standard atmosphere, 101.325 kPa = 14.696 psia = 29.921 inHg (ASHRAE 2017
    # Fundamentals Ch. 1 Table 1, I-P edition; from memory, consistent with the above).
    assert u.psia_from_pa(101325.0) == pytest.approx(14.696, abs=0.0005)
    assert u.inhg_from_pa(101325.0) == pytest.approx(29.921, abs=0.0005)


def test_display_of_mass_flow_and_energy():
    # lb/h: 1 lb/h = LB/3600 kg/s; ton·h = 12,000 Btu; MMBtu = 1e6 Btu.
    value, unit = u.to_display("mass_flow", LB / 3600.0, "IP")
    assert unit == "lb/h" and value == pytest.approx(1.0, rel=1e-12)
    value, unit = u.to_display("energy", 12000.0 * BTU / 3.6e6, "IP")  # kWh in the core
    assert unit == "ton·h" and value == pytest.approx(1.0, rel=1e-12)
    value, unit = u.to_display("heating_energy", 1e6 * BTU / 3.6e6, "IP")
    assert unit == "MMBtu" and value == pytest.approx(1.0, rel=1e-12)
    value, unit = u.to_display("energy", 2500.0, "SI")
    assert unit == "MWh" and value == pytest.approx(2.5)


# ---------------------------------------------------------------------------------------
# display round trips, labels, and parsing of the unit system
# ---------------------------------------------------------------------------------------
# A representative SI core value for each quantity (kW, kWh, m³/s, kJ/kg, kg/kg, m, Pa,
# kg/s, °C, K).
CORE_VALUES = {
    "temperature": np.array([-20.0, 0.0, 23.5, 35.0]),
    "temperature_difference": np.array([0.5, 5.5, 11.0]),
    "power": np.array([0.0, 350.0, 3516.85]),
    "heating_power": np.array([12.0, 880.0]),
    "energy": np.array([0.0, 1.2e6]),
    "heating_energy": np.array([3.0e5]),
    "airflow": np.array([0.1, 12.5]),
    "water_flow": np.array([0.0, 0.0631, 0.25]),
    "enthalpy": np.array([-10.0, 0.0, 55.2]),
    "enthalpy_difference": np.array([-3.0, 0.0, 25.0]),
    "humidity_ratio": np.array([0.0, 0.0093, 0.02]),
    "length": np.array([0.0, 1609.0]),
    "pressure": np.array([84000.0, 101325.0]),
    "mass_flow": np.array([0.5, 40.0]),
    "area": np.array([0.0, 2.5, 120.0]),
}


def test_area_factor():
    # 1 ft = 0.3048 m exactly (NIST SP 811, Appendix B.9), so 1 ft² = 0.09290304 m².
    shown, unit = u.to_display("area", np.array([0.09290304, 10.0]), "IP")
    assert unit == "ft²"
    np.testing.assert_allclose(shown, [1.0, 107.6391041671], rtol=1e-12)


def test_every_quantity_has_a_core_value_here():
    assert set(CORE_VALUES) == set(u.QUANTITIES)


@pytest.mark.parametrize("system", ["SI", "IP", UnitSystem.SI, UnitSystem.IP])
@pytest.mark.parametrize("quantity", sorted(CORE_VALUES))
def test_display_round_trip(quantity, system):
    core = CORE_VALUES[quantity]
    shown, unit = u.to_display(quantity, core, system)
    assert unit == u.unit_label(quantity, system)
    np.testing.assert_allclose(
        u.from_display(quantity, shown, system), core, rtol=1e-12, atol=1e-12
    )


@pytest.mark.parametrize(
    ("quantity", "si", "ip"),
    [
        ("temperature", "°C", "°F"),
        ("power", "kW", "tons"),
        ("heating_power", "kW", "MBH"),
        ("airflow", "L/s", "cfm"),
        ("enthalpy", "kJ/kg", "Btu/lb"),
        ("humidity_ratio", "g/kg", "gr/lb"),
        ("pressure", "kPa", "inHg"),
        ("length", "m", "ft"),
        ("water_flow", "L/s", "gpm"),
    ],
)
def test_display_units_are_the_trades(quantity, si, ip):
    assert u.unit_label(quantity, "SI") == si
    assert u.unit_label(quantity, "IP") == ip


def test_display_values_in_the_trades_units():
    # 10 g/kg shows as 10 g/kg and 70 gr/lb; 1 m³/s as 1000 L/s and 2118.88 cfm.
    assert u.to_display("humidity_ratio", 0.010, "SI")[0] == pytest.approx(10.0)
    assert u.to_display("humidity_ratio", 0.010, "IP")[0] == pytest.approx(70.0)
    assert u.to_display("airflow", 1.0, "SI")[0] == pytest.approx(1000.0)
    assert u.to_display("airflow", 1.0, "IP")[0] == pytest.approx(60.0 / FT**3)
    assert u.to_display("pressure", 101325.0, "SI")[0] == pytest.approx(101.325)
    assert u.to_display("temperature", 20.0, "IP")[0] == pytest.approx(68.0)


@pytest.mark.parametrize("text", ["SI", "si", " Si ", "IP", "ip", "I-P", "us"])
def test_unit_system_parse_accepts(text):
    expected = UnitSystem.SI if "s" in text.lower() and "u" not in text.lower() else UnitSystem.IP
    assert UnitSystem.parse(text) is expected


@pytest.mark.parametrize("text", ["metric", "", "S I", None, 3])
def test_unit_system_parse_rejects(text):
    with pytest.raises(InputRangeError) as info:
        UnitSystem.parse(text)
    assert info.value.field == "unit_system"
    assert "'SI' or 'IP'" in str(info.value)
    assert repr(text) in str(info.value)


def test_unknown_quantity_names_the_allowed_ones():
    with pytest.raises(InputRangeError) as info:
        u.to_display("speed", 1.0, "SI")
    assert info.value.field == "quantity"
    assert "airflow" in str(info.value) and "temperature" in str(info.value)
    with pytest.raises(InputRangeError):
        u.from_display("speed", 1.0, "IP")
    with pytest.raises(InputRangeError) as info:
        u.to_display("power", 1.0, "imperial")
    assert info.value.field == "unit_system"


# ---------------------------------------------------------------------------------------
# property: every pair of conversion functions is a round trip
# ---------------------------------------------------------------------------------------
PAIRS = [
    (u.fahrenheit_from_celsius, u.celsius_from_fahrenheit),
    (u.delta_fahrenheit_from_celsius, u.delta_celsius_from_fahrenheit),
    (u.btuh_from_kw, u.kw_from_btuh),
    (u.mbh_from_kw, u.kw_from_mbh),
    (u.tons_from_kw, u.kw_from_tons),
    (u.cfm_from_m3s, u.m3s_from_cfm),
    (u.lps_from_m3s, u.m3s_from_lps),
    (u.btulb_from_kjkg, u.kjkg_from_btulb),
    (u.grains_per_lb_from_g_per_kg, u.g_per_kg_from_grains_per_lb),
    (u.feet_from_meters, u.meters_from_feet),
    (u.psia_from_pa, u.pa_from_psia),
    (u.inhg_from_pa, u.pa_from_inhg),
]


@settings(max_examples=100)
@given(
    pair=st.sampled_from(PAIRS),
    values=st.lists(st.floats(-1e7, 1e7), min_size=1, max_size=8),
)
def test_conversion_pairs_round_trip(pair, values):
    forward, backward = pair
    x = np.array(values)
    np.testing.assert_allclose(backward(forward(x)), x, rtol=1e-12, atol=1e-9)
    np.testing.assert_allclose(forward(backward(x)), x, rtol=1e-12, atol=1e-9)


@settings(max_examples=100)
@given(
    quantity=st.sampled_from(sorted(CORE_VALUES)),
    system=st.sampled_from(["SI", "IP"]),
    value=st.floats(-1e6, 1e6),
)
def test_display_round_trip_property(quantity, system, value):
    shown, _ = u.to_display(quantity, value, system)
    assert u.from_display(quantity, shown, system) == pytest.approx(value, rel=1e-12, abs=1e-9)


# ---------------------------------------------------------------------------------------
# messages in the units on show
# ---------------------------------------------------------------------------------------
def test_display_text_converts_every_core_unit_of_a_message():
    text = "supply 12.8 °C; allowed 4 to 23.5 °C; 352 kW short, 3,517 kWh; 0.5 m³/s; 10 m²"
    shown = u.display_text(text, "IP")
    # °F = 1.8 °C + 32 (exact); 1 ton = 12,000 Btu/h (AHRI 550/590); cfm and ft² from the
    # exact foot (NIST SP 811): 0.5 m³/s = 1,059.4 cfm, 10 m² = 107.6 ft²
    assert "supply 55.0 °F" in shown and "allowed 39.2 to 74.3 °F" in shown
    assert f"{352 / (12000 * BTU / 3600 / 1000):,.1f} tons" in shown
    assert f"{3517 / (12000 * BTU / 3600 / 1000):,.1f} ton·h" in shown
    assert f"{0.5 / FT**3 * 60:,.1f} cfm" in shown and f"{10 / FT**2:,.1f} ft²" in shown
    # SI keeps the model's units except the airflow, which SI files and pages give in L/s
    si = u.display_text(text, "SI")
    assert si == text.replace("0.5 m³/s", "500.0 L/s")


def test_display_text_reads_a_heating_figure_as_heat():
    # kW of heat reads MBH (1 MBH = 1,000 Btu/h), not tons, when the caller says so; a
    # UnitText carries its own I-P text
    heat = u.display_text("capacity 100 kW", "IP", {"kW": "heating_power"})
    assert heat == f"capacity {100 / (1000 * BTU / 3600 / 1000):,.1f} MBH"
    both = u.UnitText("capacity 100 kW", heat)
    assert u.display_text(both, "IP") == heat and u.display_text(both, "SI") == "capacity 100 kW"
