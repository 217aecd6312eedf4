"""The trade's standard-air factors, rebuilt from the exact moist-air functions.

Plant and air-side engineers size with rounded factors: q = 1.08 cfm dT (sensible),
q = 0.68 cfm dW[gr/lb] or 4840 cfm dW[lb/lb] (latent), q = 4.5 cfm dh (total), all in
Btu/h; in SI about 1.2 kW per m³/s per K, 3.0 kW per m³/s per g/kg and 1.2 kW per m³/s
per kJ/kg. They are common practice (no source): 0.075 lb/ft³ x 60 min/h x a specific
heat or a latent heat, each rounded to two or three figures. Here each is rebuilt from
the ASHRAE Handbook Fundamentals 2017 Ch. 1 functions (Eq. 26 for the density, Eq. 30
for the enthalpy) and the unit conversions, at standard air: dry air at 20 °C (68 °F)
and 101.325 kPa, about 1.204 kg/m³ = 0.075 lb/ft³. The tolerance of each check is the
rounding the factor carries plus, where stated, what the factor leaves out.
"""

from __future__ import annotations

import pytest
from plantside import units as u
from plantside.air import moist_air as ma
from plantside.constants import KG_PER_LB, M_PER_FT

P_STD = 101325.0  # Pa
T_STANDARD = 20.0  # °C, standard air (68 °F)
T_ROOM = u.celsius_from_fahrenheit(75.0)  # °C, the room state the latent factor assumes
T_CONDENSATE = u.celsius_from_fahrenheit(50.0)  # °C, condensate leaving a cooling coil


def _dry_air_density():
    """Mass of dry air per m³ of standard air [kg/m³] (Eq. 26: 1/v at W = 0)."""
    return 1.0 / ma.specific_volume_from_humidity_ratio(T_STANDARD, 0.0, P_STD)


def _sensible_heat_per_kelvin(w):
    """d h / d t at constant W [kJ/(kg K)], from Eq. 30 by a finite difference."""
    return ma.enthalpy_from_humidity_ratio(T_STANDARD + 1.0, w) - ma.enthalpy_from_humidity_ratio(
        T_STANDARD, w
    )


def _latent_heat():
    """Heat removed per kg of water condensed [kJ/kg]: vapour enthalpy at a 75 °F room
    (d h / d W of Eq. 30) less the liquid condensate's enthalpy at 50 °F (4.186 t, the
    liquid-water enthalpy of Ch. 1 used in Eq. 33)."""
    w = 0.0093
    vapour = (
        ma.enthalpy_from_humidity_ratio(T_ROOM, w + 1e-3)
        - ma.enthalpy_from_humidity_ratio(T_ROOM, w)
    ) / 1e-3
    return vapour - 4.186 * T_CONDENSATE


def _ip_factor(kw_per_m3s):
    """Convert a factor in kW per (m³/s) to Btu/h per cfm."""
    return u.btuh_from_kw(kw_per_m3s * u.m3s_from_cfm(1.0))


def test_standard_air_density():
    # "Standard air weighs 0.075 lb/ft³": common practice (no source), 2 significant
    # figures, so +-0.67 %. Eq. 26 at 20 °C, dry, 101.325 kPa gives 1.2041 kg/m³.
    rho = _dry_air_density()
    assert rho == pytest.approx(1.204, abs=0.0005)
    assert rho * M_PER_FT**3 / KG_PER_LB == pytest.approx(0.075, rel=0.0067)


def test_sensible_factor_1_08():
    # 1.08 = 60 x 0.075 x 0.24 Btu/h per cfm per °F: common practice (no source). It uses
    # the specific heat of dry air; rounded to 3 figures (+-0.5 %).
    rho = _dry_air_density()
    per_kelvin = rho * _sensible_heat_per_kelvin(0.0)  # kW per m³/s per K
    dry = _ip_factor(per_kelvin) / u.delta_fahrenheit_from_celsius(1.0)
    assert dry == pytest.approx(1.08, rel=0.005)
    # With room moisture (W = 0.010) the moist-air specific heat 1.006 + 1.86 W raises the
    # exact factor by 1.8 %: that is the error the rounded 1.08 carries in use.
    moist = _ip_factor(rho * _sensible_heat_per_kelvin(0.010)) / u.delta_fahrenheit_from_celsius(
        1.0
    )
    assert moist == pytest.approx(1.08, rel=0.025)
    assert moist / dry == pytest.approx(1.0 + 1.86 * 0.010 / 1.006, rel=1e-9)


def test_latent_factor_4840():
    # 4840 = 60 x 0.075 x 1076 Btu/h per cfm per lb/lb: common practice (no source);
    # 1076 Btu/lb is the vapour's enthalpy at a 75 °F room less the condensate's at
    # 50 °F. Rounded to 3 figures (0.1 %) with 0.075 for 0.0752 lb/ft³ (0.23 %): 0.4 %.
    latent = _latent_heat()
    assert u.delta_btulb_from_kjkg(latent) == pytest.approx(1076.0, abs=0.5)
    factor = _ip_factor(_dry_air_density() * latent)
    assert factor == pytest.approx(4840.0, rel=0.004)


def test_latent_factor_0_68():
    # 0.68 Btu/h per cfm per grain/lb: common practice (no source). It is 4840/7000 =
    # 0.691 rounded down (0.69 is also printed); the exact value sits 2 % above 0.68, so
    # the factor carries a 2.5 % tolerance.
    factor = _ip_factor(_dry_air_density() * _latent_heat()) / 7000.0
    assert factor == pytest.approx(0.68, rel=0.025)
    assert factor == pytest.approx(4840.0 / 7000.0, rel=0.004)


def test_total_factor_4_5():
    # 4.5 = 60 x 0.075 Btu/h per cfm per Btu/lb: common practice (no source), 2 figures
    # (+-1.1 %). A dh of 1 Btu/lb across the mass of dry air in one cfm.
    factor = _ip_factor(_dry_air_density() * u.delta_kjkg_from_btulb(1.0))
    assert factor == pytest.approx(4.5, rel=0.011)


def test_si_counterparts():
    # About 1.2 kW per m³/s per K sensible, 3.0 kW per m³/s per g/kg latent, 1.2 kW per
    # m³/s per kJ/kg total: common practice (no source), 2 figures (+-4.2 % and +-1.7 %).
    rho = _dry_air_density()
    assert rho * _sensible_heat_per_kelvin(0.0) == pytest.approx(1.2, rel=0.042)
    assert rho * _sensible_heat_per_kelvin(0.010) == pytest.approx(1.2, rel=0.042)
    assert rho * _latent_heat() / 1000.0 == pytest.approx(3.0, rel=0.017)
    assert rho * 1.0 == pytest.approx(1.2, rel=0.042)


def test_ip_and_si_factors_are_the_same_physics():
    # 1.08 Btu/h per cfm per °F, converted with the unit functions, is 1.21 kW per m³/s
    # per K; 4.5 Btu/h per cfm per Btu/lb is 1.21 kW per m³/s per kJ/kg.
    sensible_si = u.kw_from_btuh(1.08) / u.m3s_from_cfm(1.0) * u.delta_fahrenheit_from_celsius(1.0)
    assert sensible_si == pytest.approx(1.2, rel=0.042)
    total_si = u.kw_from_btuh(4.5) / u.m3s_from_cfm(1.0) / u.delta_kjkg_from_btulb(1.0)
    assert total_si == pytest.approx(_dry_air_density(), rel=0.01)
