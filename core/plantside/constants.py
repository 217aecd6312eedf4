"""Physical constants and conversion factors, each with its unit and source.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals, Chapter 1, Psychrometrics.
[2] NIST Special Publication 811 (2008), Guide for the Use of the SI, Appendix B.
[3] AHRI Standard 550/590 (I-P), 2020: 1 ton of refrigeration = 12,000 Btu/h.
[4] Kell, G. S., 1975. Density, thermal expansivity, and compressibility of liquid water
    from 0 to 150 °C. J. Chem. Eng. Data 20(1), 97-105, Eq. 16 (coefficients from memory,
    checked against CoolProp in tests/test_water.py).
[5] Hyland, R.W. and A. Wexler, 1983. Formulations for the thermodynamic properties of
    the saturated phases of H2O from 173.15 K to 473.15 K. ASHRAE Transactions 89(2A).
"""

# --- moist air, ASHRAE Handbook Fundamentals 2017 Ch. 1 [1] ---------------------------
# Equation numbers are those of the 2017 SI chapter as psychrolib 2.5 cites them (its
# docstrings name the 2017 equation of each function); see the register of unsourced
# values in DEVELOPERS.md.
#: Specific heat of dry air [kJ/(kg K)], Eq. 30 of [1] (h = 1.006 t + W (2501 + 1.86 t)).
CP_DRY_AIR = 1.006
#: Specific heat of water vapour [kJ/(kg K)], Eq. 30 of [1].
CP_WATER_VAPOR = 1.86
#: Specific heat of liquid water [kJ/(kg K)], Eq. 33 of [1] (wet bulb over water,
#: h_w = 4.186 t*).
CP_LIQUID_WATER = 4.186
#: Specific heat of ice [kJ/(kg K)], Eq. 35 of [1] (wet bulb over ice, the 2.1 t* term).
CP_ICE = 2.1
#: Enthalpy of vaporisation of water at 0 °C [kJ/kg], Eq. 30 of [1].
LATENT_HEAT_0C = 2501.0
#: Latent term of the wet-bulb equation over ice [kJ/kg], Eq. 35 of [1] (enthalpy of
#: sublimation at 0 °C as the equation rounds it; the ice form of the 2501 of Eq. 33).
LATENT_HEAT_ICE_WET_BULB = 2830.0
#: Ratio of the molar masses of water vapour and dry air [-], Eq. 20 of [1].
MOLAR_MASS_RATIO = 0.621945
#: Gas constant of dry air [J/(kg K)], Eq. 26 of [1] (0.287042 kJ/(kg K)).
R_DRY_AIR = 287.042
#: Ratio used in the specific volume equation (1/0.621945) [-], Eq. 26 of [1].
VOLUME_WATER_FACTOR = 1.607858
#: Standard atmospheric pressure at sea level [Pa], Table 1 of [1].
STANDARD_PRESSURE = 101325.0
#: Standard atmosphere, Eq. 3 of [1]: p = 101.325 (1 - 2.25577e-5 Z)^5.2559 kPa, Z in m.
#: Lapse coefficient [1/m] and exponent [-].
STANDARD_ATMOSPHERE_LAPSE = 2.25577e-5
STANDARD_ATMOSPHERE_EXPONENT = 5.2559
#: Triple point of water [°C], Ch. 1 of [1].
TRIPLE_POINT_C = 0.01
#: Celsius to kelvin offset [K].
ZERO_CELSIUS = 273.15
#: Lowest and highest dry bulb of the Hyland-Wexler saturation formulation [°C], Eqs. 5-6 of [1].
DRYBULB_MIN_C = -100.0
DRYBULB_MAX_C = 200.0

# --- saturation pressure, Eqs. 5 and 6 of [1] (Hyland and Wexler 1983 [5]) ---------------
#: Eq. 5, over ice (-100 to 0.01 °C): ln pws = C1/T + C2 + C3 T + C4 T² + C5 T³ + C6 T⁴
#: + C7 ln T, pws [Pa], T [K]. Coefficients C1..C7 [K, -, 1/K, 1/K², 1/K³, 1/K⁴, -];
#: identical to psychrolib 2.5's GetSatVapPres.
SATURATION_ICE_COEFFICIENTS = (
    -5.6745359e03,
    6.3925247e00,
    -9.6778430e-03,
    6.2215701e-07,
    2.0747825e-09,
    -9.4840240e-13,
    4.1635019e00,
)
#: Eq. 6, over liquid water (0 to 200 °C): ln pws = C8/T + C9 + C10 T + C11 T² + C12 T³
#: + C13 ln T, pws [Pa], T [K]. Coefficients C8..C13 [K, -, 1/K, 1/K², 1/K³, -];
#: identical to psychrolib 2.5's GetSatVapPres.
SATURATION_WATER_COEFFICIENTS = (
    -5.8002206e03,
    1.3914993e00,
    -4.8640239e-02,
    4.1764768e-05,
    -1.4452093e-08,
    6.5459673e00,
)

# --- dew point closed forms, Eqs. 37 and 38 of [1] (first guesses of the solver) ---------
#: Eq. 37 (dew point 0 to 93 °C): td = C14 + C15 a + C16 a² + C17 a³ + C18 pw^0.1984,
#: a = ln pw, pw [kPa], td [°C]. Coefficients C14..C18 [°C], then the exponent 0.1984 [-].
#: From memory; checked: within 0.1 K of psychrolib's dew point from 0 to 90 °C
#: (tests/test_constants.py). Only a first guess: the answer is the Newton root of Eq. 36.
DEW_POINT_WATER_COEFFICIENTS = (6.54, 14.526, 0.7389, 0.09486, 0.4569)
DEW_POINT_WATER_EXPONENT = 0.1984
#: Eq. 38 (dew point below 0 °C): td = 6.09 + 12.608 a + 0.4959 a² [°C]. From memory;
#: checked against psychrolib like Eq. 37: within 0.1 K from -20 to 0 °C, 0.6 K at
#: -40 °C, 3 K at -60 °C.
DEW_POINT_ICE_COEFFICIENTS = (6.09, 12.608, 0.4959)
#: Clausius-Clapeyron slope of ln pws, L/(R_v T²) with L/R_v [K] = 2500/0.46152 over water
#: and 2830/0.46152 over ice (R_v = 0.46152 kJ/(kg K)); common practice (no source), used
#: only for the wet-bulb solver's first guess.
CLAUSIUS_CLAPEYRON_WATER_K = 5417.0
CLAUSIUS_CLAPEYRON_ICE_K = 6132.0

# --- standard air (trade convention) ---------------------------------------------------
#: Density of standard air [kg/m³]: 0.075 lb/ft³, the basis of "standard cfm" and of the
#: 1.08 / 0.68 / 4.5 factors. Common practice (dry air near 20 °C (68 °F), 101.325 kPa).
STANDARD_AIR_DENSITY = 0.075 * 0.45359237 / 0.3048**3

# --- conversion factors, NIST SP 811 [2] and AHRI 550/590 [3] ----------------------------
#: Metres per foot (exact) [2].
M_PER_FT = 0.3048
#: Kilograms per pound (exact) [2].
KG_PER_LB = 0.45359237
#: Joules per British thermal unit (International Table) [2].
J_PER_BTU = 1055.05585262
#: Watts per Btu/h [2].
W_PER_BTUH = J_PER_BTU / 3600.0
#: Kilowatts per ton of refrigeration (12,000 Btu/h) [3].
KW_PER_TON = 12000.0 * W_PER_BTUH / 1000.0
#: kJ/kg per Btu/lb [2] (exactly 2.326).
KJKG_PER_BTULB = 2.326
#: Grains per pound (exact) [2].
GRAINS_PER_LB = 7000.0
#: Pascals per psi [2].
PA_PER_PSI = 6894.757293168
#: Pascals per conventional inch of mercury (NIST SP 811 lists 3386.389 Pa; at 32 °F it is
#: 3386.38 Pa) [2].
PA_PER_INHG = 3386.389
#: m³/s per cfm [2].
M3S_PER_CFM = M_PER_FT**3 / 60.0

# --- liquid water and gravity (water side of the plant) ---------------------------------
#: Standard acceleration of gravity [m/s²] (exact, by definition) [2].
STANDARD_GRAVITY = 9.80665
#: Cubic metres per US gallon (231 in³, exact) [2].
M3_PER_US_GALLON = 3.785411784e-3
#: Coefficients of Kell's density of air-free liquid water at 101.325 kPa [4]:
#: rho = (a0 + a1 t + a2 t² + a3 t³ + a4 t⁴ + a5 t⁵) / (1 + b t) [kg/m³], t in °C, 0-150 °C.
KELL_DENSITY_NUMERATOR = (
    999.83952,
    16.945176,
    -7.9870401e-3,
    -46.170461e-6,
    105.56302e-9,
    -280.54253e-12,
)
KELL_DENSITY_DENOMINATOR = 16.879850e-3
