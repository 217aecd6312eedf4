"""The constants table against references outside the project.

Sources:
- CoolProp 6 (IAPWS-95 water, Lemmon et al. 2000 dry air): the property values the
  ASHRAE Handbook Fundamentals 2017 Ch. 1 constants round (specific heats, latent heat
  at 0 °C, molar-mass ratio, gas constant). Tolerance: the handbook's printed figures.
- psychrolib 2.5: the same Hyland-Wexler coefficients (Ch. 1 Eqs. 5 and 6), the same
  wet-bulb equations (Eqs. 33 and 35) and the standard atmosphere (Eq. 3); agreement to
  floating-point precision.
- The register of unsourced values (DEVELOPERS.md): the values marked "from memory" or
  "common practice" in plantside.constants, each checked here where a reference exists.
"""

import numpy as np
import psychrolib
import pytest
from CoolProp.CoolProp import PropsSI
from plantside import constants as c
from plantside.air import moist_air as ma

P = 101325.0


def test_specific_heats_and_latent_heat_round_coolprop():
    # CoolProp: dry air c_p at 25 °C, 101.325 kPa = 1.0063 kJ/(kg K) -> 1.006 (Eq. 30).
    assert PropsSI("C", "T", 298.15, "P", P, "Air") / 1000 == pytest.approx(c.CP_DRY_AIR, abs=5e-4)
    # CoolProp: ideal-gas c_p of water vapour at 25 °C = 1.864 kJ/(kg K) -> 1.86 (Eq. 30).
    cp0 = PropsSI("CP0MASS", "T", 298.15, "P", 1000.0, "Water") / 1000
    assert cp0 == pytest.approx(c.CP_WATER_VAPOR, abs=5e-3)
    # CoolProp: liquid water c_p, 4.18 to 4.22 kJ/(kg K) from 0 to 40 °C; Eq. 33 uses 4.186.
    cp_liquid = [PropsSI("C", "T", 273.16 + t, "P", P, "Water") / 1000 for t in (0, 20, 40)]
    assert min(cp_liquid) < c.CP_LIQUID_WATER < max(cp_liquid)
    # CoolProp: h_g - h_f at the triple point = 2500.9 kJ/kg -> 2501 (Eq. 30).
    hfg = PropsSI("H", "T", 273.16, "Q", 1, "Water") - PropsSI("H", "T", 273.16, "Q", 0, "Water")
    assert hfg / 1000 == pytest.approx(c.LATENT_HEAT_0C, abs=0.5)


def test_ice_form_of_the_wet_bulb_equation():
    # Eq. 35's 2830 kJ/kg is the enthalpy of sublimation at 0 °C (vaporisation 2501 plus
    # fusion 333.4 kJ/kg, from memory; CoolProp has no ice phase), rounded to 3 figures; its
    # 2.1 kJ/(kg K) is the specific heat of ice near 0 °C (2.09 to 2.11, IAPWS 2006 ice
    # Ih, from memory) and its 0.24 = 2.1 - 1.86, as 2.326 = 4.186 - 1.86 in Eq. 33.
    assert c.LATENT_HEAT_0C + 333.4 == pytest.approx(c.LATENT_HEAT_ICE_WET_BULB, abs=5.0)
    assert c.CP_ICE - c.CP_WATER_VAPOR == pytest.approx(0.24, abs=1e-12)
    assert c.CP_LIQUID_WATER - c.CP_WATER_VAPOR == pytest.approx(2.326, abs=1e-12)
    # psychrolib 2.5 writes Eq. 35 with these numbers: same W at a frosty wet bulb.
    expected = psychrolib.GetHumRatioFromTWetBulb(-2.0, -5.0, P)
    assert float(ma.humidity_ratio_from_wet_bulb(-2.0, -5.0, P)) == pytest.approx(
        expected, rel=1e-12
    )


def test_gas_constant_and_molar_mass_ratio_round_coolprop():
    # CoolProp molar masses: M_w / M_da = 0.621957; Eq. 20 prints 0.621945 (older M_da).
    ratio = PropsSI("M", "Water") / PropsSI("M", "Air")
    assert ratio == pytest.approx(c.MOLAR_MASS_RATIO, rel=5e-5)
    # R / M_da = 287.047 J/(kg K); Eq. 26 prints 287.042.
    assert 8.314462618 / PropsSI("M", "Air") == pytest.approx(c.R_DRY_AIR, rel=5e-5)
    assert 1.0 / c.MOLAR_MASS_RATIO == pytest.approx(c.VOLUME_WATER_FACTOR, rel=1e-6)


@pytest.mark.parametrize("drybulb", [-80.0, -20.0, 0.0, 0.01, 0.02, 25.0, 150.0])
def test_saturation_coefficients_are_psychrolibs(drybulb):
    # psychrolib 2.5 GetSatVapPres carries Eqs. 5 and 6 with the same coefficients.
    expected = psychrolib.GetSatVapPres(drybulb)
    assert float(ma.saturation_vapor_pressure(drybulb)) == pytest.approx(expected, rel=1e-13)


def test_standard_atmosphere_is_psychrolibs():
    # psychrolib 2.5 GetStandardAtmPressure: Eq. 3 with 2.25577e-5 /m and 5.2559.
    for altitude in (-400.0, 0.0, 1500.0, 4000.0):
        expected = psychrolib.GetStandardAtmPressure(altitude)
        assert float(ma.pressure_from_altitude(altitude)) == pytest.approx(expected, rel=1e-13)


def test_standard_air_density_is_dry_air_near_20_c():
    # Common practice: "standard air" 0.075 lb/ft³. psychrolib dry-air density at 20 °C,
    # 101.325 kPa is 1.2042 kg/m³; 0.075 lb/ft³ = 1.2014 kg/m³, 0.2 % lower (the trade's
    # figure is rounded to 2 significant figures, +-0.7 %).
    assert c.STANDARD_AIR_DENSITY == pytest.approx(1.2014, abs=5e-5)
    assert c.STANDARD_AIR_DENSITY == pytest.approx(psychrolib.GetDryAirDensity(20.0, P), rel=7e-3)


def test_dew_point_closed_forms_are_close_to_the_exact_dew_point():
    # Eqs. 37 and 38 (coefficients from memory) against psychrolib's dew point (Newton on
    # Eqs. 5 and 6): within 0.1 K from -20 to 90 °C, within 1 K down to -40 °C. Only a
    # first guess: a wrong coefficient would still converge, so check it directly.
    dew_points = np.linspace(-40.0, 90.0, 131)
    vapor_pressure = np.array([psychrolib.GetSatVapPres(t) for t in dew_points])
    exact = np.array([psychrolib.GetTDewPointFromVapPres(95.0, p) for p in vapor_pressure])
    guess = ma._dew_point_first_guess(ma._ln_kpa(vapor_pressure))
    warm = dew_points >= -20.0
    assert np.max(np.abs(guess - exact)[warm]) < 0.1
    assert np.max(np.abs(guess - exact)) < 1.0


def test_clausius_clapeyron_first_guess_slopes():
    # Common practice: d ln pws / dT = L / (R_v T²), L/R_v = 2500/0.46152 = 5417 K over
    # water and 2830/0.46152 = 6132 K over ice (R_v = 8.314462618 / 18.015268 g/mol).
    r_v = 8.314462618 / 18.015268
    assert 2500.0 / r_v == pytest.approx(c.CLAUSIUS_CLAPEYRON_WATER_K, abs=1.0)
    assert 2830.0 / r_v == pytest.approx(c.CLAUSIUS_CLAPEYRON_ICE_K, abs=1.0)
    # psychrolib 2.5 dLnPws_ (derivative of Eqs. 5 and 6): within 2 % at 20 °C, 0.5 % at
    # -20 °C; enough for a first guess.
    assert c.CLAUSIUS_CLAPEYRON_WATER_K / 293.15**2 == pytest.approx(
        psychrolib.dLnPws_(20.0), rel=0.02
    )
    assert c.CLAUSIUS_CLAPEYRON_ICE_K / 253.15**2 == pytest.approx(
        psychrolib.dLnPws_(-20.0), rel=0.005
    )
