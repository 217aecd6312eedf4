"""Physical constants and conversion factors, each with its unit and source.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals, Chapter 1, Psychrometrics.
[2] NIST Special Publication 811 (2008), Guide for the Use of the SI, Appendix B.
[3] AHRI Standard 550/590 (I-P), 2020: 1 ton of refrigeration = 12,000 Btu/h.
"""

# --- moist air, ASHRAE Handbook Fundamentals 2017 Ch. 1 [1] ---------------------------
#: Specific heat of dry air [kJ/(kg K)], Eq. 32 of [1].
CP_DRY_AIR = 1.006
#: Specific heat of water vapour [kJ/(kg K)], Eq. 32 of [1].
CP_WATER_VAPOR = 1.86
#: Specific heat of liquid water [kJ/(kg K)], Eq. 35 of [1].
CP_LIQUID_WATER = 4.186
#: Enthalpy of vaporisation of water at 0 °C [kJ/kg], Eq. 32 of [1].
LATENT_HEAT_0C = 2501.0
#: Ratio of the molar masses of water vapour and dry air [-], Eq. 22 of [1].
MOLAR_MASS_RATIO = 0.621945
#: Gas constant of dry air [J/(kg K)], Eq. 26 of [1] (0.287042 kJ/(kg K)).
R_DRY_AIR = 287.042
#: Ratio used in the specific volume equation (1/0.621945) [-], Eq. 26 of [1].
VOLUME_WATER_FACTOR = 1.607858
#: Standard atmospheric pressure at sea level [Pa], Table 1 of [1].
STANDARD_PRESSURE = 101325.0
#: Triple point of water [°C], Ch. 1 of [1].
TRIPLE_POINT_C = 0.01
#: Celsius to kelvin offset [K].
ZERO_CELSIUS = 273.15
#: Lowest and highest dry bulb of the Hyland-Wexler saturation formulation [°C], Eqs. 5-6 of [1].
DRYBULB_MIN_C = -100.0
DRYBULB_MAX_C = 200.0

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
