"""Moist-air (psychrometric) properties, vectorised, in SI units.

Humidity ratio is the hub: each primary function implements one equation of
ASHRAE Handbook Fundamentals (2017), Chapter 1 [1]; compound functions only
combine primaries. Every function takes scalars or numpy arrays (broadcast
together) and returns numpy values of the broadcast shape. Iterative inverses
(dew point, wet bulb) are solved for whole arrays at once by safeguarded Newton
iterations, never by a per-element Python loop.

Units: dry bulb, dew point, wet bulb [°C]; humidity ratio [kg water/kg dry air];
pressure, vapour pressure [Pa]; relative humidity [0..1]; enthalpy [kJ/kg dry air];
specific volume [m³/kg dry air]; density [kg moist air/m³]; altitude [m].

Every function validates its inputs unless called with ``check=False`` (for
inner code that has validated already) and raises
:class:`plantside.errors.InputRangeError` naming the quantity and its range.

Why one module of about 1,500 lines: it is one topic, the moist-air state, and its
parts are not independent. The saturation pressure kernels (Eqs. 5 and 6, with their
slope), the per-element form coefficients and the range validators are private and
shared by every section; the two Newton solvers (dew point, wet bulb) reuse the
kernels' value-and-slope form and the saturation constants at 0 °C and the triple
point. Split by topic, each new module would import the others' private helpers,
which hides the hub rather than showing it. About half of the length is the
docstrings (equation, units, references and a worked example for every public
function). The sections, in order: saturation and pressure; the humidity-ratio hub;
dew point and wet bulb solvers; enthalpy, volume and density; the ``AirState``.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 1, Psychrometrics.
[2] Hyland, R.W. and A. Wexler, 1983. Formulations for the thermodynamic properties
    of the saturated phases of H2O from 173.15 K to 473.15 K. ASHRAE Transactions 89(2A).
"""

from __future__ import annotations

import threading
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.constants import (
    CLAUSIUS_CLAPEYRON_ICE_K,
    CLAUSIUS_CLAPEYRON_WATER_K,
    CP_DRY_AIR,
    CP_ICE,
    CP_LIQUID_WATER,
    CP_WATER_VAPOR,
    DEW_POINT_ICE_COEFFICIENTS,
    DEW_POINT_WATER_COEFFICIENTS,
    DEW_POINT_WATER_EXPONENT,
    DRYBULB_MAX_C,
    DRYBULB_MIN_C,
    LATENT_HEAT_0C,
    LATENT_HEAT_ICE_WET_BULB,
    MOLAR_MASS_RATIO,
    R_DRY_AIR,
    SATURATION_ICE_COEFFICIENTS,
    SATURATION_WATER_COEFFICIENTS,
    STANDARD_ATMOSPHERE_EXPONENT,
    STANDARD_ATMOSPHERE_LAPSE,
    STANDARD_PRESSURE,
    TRIPLE_POINT_C,
    VOLUME_WATER_FACTOR,
    ZERO_CELSIUS,
)
from plantside.errors import InputRangeError, check_range

__all__ = [
    "AirState",
    "altitude_from_pressure",
    "degree_of_saturation",
    "density_from_humidity_ratio",
    "dew_point_from_humidity_ratio",
    "dew_point_from_vapor_pressure",
    "drybulb_from_enthalpy",
    "enthalpy_from_humidity_ratio",
    "humidity_ratio_from_dew_point",
    "humidity_ratio_from_enthalpy",
    "humidity_ratio_from_relative_humidity",
    "humidity_ratio_from_vapor_pressure",
    "humidity_ratio_from_wet_bulb",
    "pressure_from_altitude",
    "relative_humidity_from_humidity_ratio",
    "saturation_humidity_ratio",
    "saturation_vapor_pressure",
    "saturation_vapor_pressure_over_ice",
    "saturation_vapor_pressure_over_water",
    "specific_volume_from_humidity_ratio",
    "vapor_pressure_from_humidity_ratio",
    "wet_bulb_from_humidity_ratio",
]

#: Allowed station pressure [Pa]: from about 9 km altitude to well above sea level.
PRESSURE_MIN_PA = 30_000.0
PRESSURE_MAX_PA = 120_000.0
#: Relative tolerance when testing a humidity ratio against saturation.
_SATURATION_SLACK = 1e-9
#: Largest humidity ratio accepted anywhere [kg/kg], and the vapour pressure that gives
#: it as a fraction of the total pressure (Eq. 20 of [1] with W = 1).
HUMIDITY_RATIO_MAX = 1.0
_PW_MAX_FRACTION = HUMIDITY_RATIO_MAX / (MOLAR_MASS_RATIO + HUMIDITY_RATIO_MAX)

# Coefficients of Eqs. 5 (over ice) and 6 (over water) of [1], from [2]
# (plantside.constants holds them with their units).
_C1, _C2, _C3, _C4, _C5, _C6, _C7 = SATURATION_ICE_COEFFICIENTS
_C8, _C9, _C10, _C11, _C12, _C13 = SATURATION_WATER_COEFFICIENTS
# Wet-bulb equation coefficients a, b, c of Eq. 33 (over water) and Eq. 35 (over ice):
# W = ((a - b t*) Ws* - 1.006 (t - t*)) / (a + 1.86 t - c t*), b = c - 1.86.
_WET_BULB_WATER = (LATENT_HEAT_0C, CP_LIQUID_WATER - CP_WATER_VAPOR, CP_LIQUID_WATER)
_WET_BULB_ICE = (LATENT_HEAT_ICE_WET_BULB, CP_ICE - CP_WATER_VAPOR, CP_ICE)


# ---------------------------------------------------------------------------------------
# validation helpers
# ---------------------------------------------------------------------------------------
def _as_float(value):
    return np.asarray(value, dtype=float)


def _check_drybulb(field, value):
    return check_range(field, value, DRYBULB_MIN_C, DRYBULB_MAX_C, "°C")


def _check_pressure(value):
    return check_range("pressure", value, PRESSURE_MIN_PA, PRESSURE_MAX_PA, "Pa")


def _check_not_above(field, value, limit, limit_text, unit):
    """Raise if any element of ``value`` exceeds the element-wise ``limit``."""
    value, limit = np.broadcast_arrays(_as_float(value), _as_float(limit))
    # The slack scales with |limit| so that a value equal to a negative limit (dew point
    # or wet bulb equal to a dry bulb below 0 °C) is accepted.
    bad = value > limit + np.abs(limit) * _SATURATION_SLACK + 1e-12
    if np.any(bad):
        if value.ndim == 0:
            message = (
                f"{field} = {float(value):.6g} {unit} is above {limit_text} "
                f"({float(limit):.6g} {unit}); allowed up to {limit_text}"
            )
            raise InputRangeError(field, message, f"up to {limit_text}")
        idx = np.flatnonzero(bad)
        shown = ", ".join(str(i) for i in idx[:5]) + (", ..." if idx.size > 5 else "")
        message = (
            f"{field} is above {limit_text} at {idx.size} of {value.size} elements "
            f"(indices {shown}); first: {value.flat[idx[0]]:.6g} {unit} against "
            f"{limit.flat[idx[0]]:.6g} {unit}; allowed up to {limit_text}"
        )
        raise InputRangeError(field, message, f"up to {limit_text}", idx)


# ---------------------------------------------------------------------------------------
# saturation and pressure
# ---------------------------------------------------------------------------------------
def _ln_pws_ice(kelvin):
    return _ln_pws_on_form(kelvin, _ICE_FORM)


def _ln_pws_water(kelvin):
    return _ln_pws_on_form(kelvin, _WATER_FORM)


def _piecewise(drybulb, ice_form, water_form):
    """Evaluate the ice form at or below the triple point and the water form above,
    each only on the elements that need it."""
    kelvin = drybulb + ZERO_CELSIUS
    on_ice = drybulb <= TRIPLE_POINT_C
    count = np.count_nonzero(on_ice)
    if count == 0:
        return water_form(kelvin)
    if count == on_ice.size:
        return ice_form(kelvin)
    flat, on_ice = kelvin.reshape(-1), on_ice.reshape(-1)
    out = np.empty(flat.shape)
    for form, index in ((ice_form, np.flatnonzero(on_ice)), (water_form, np.flatnonzero(~on_ice))):
        out[index] = form(flat[index])
    return out.reshape(kelvin.shape)


def _ln_pws(drybulb):
    return _piecewise(drybulb, _ln_pws_ice, _ln_pws_water)


def _ln_pws_with_slope(drybulb):
    """ln pws [ln Pa] and d(ln pws)/dt [1/K] (for Newton iterations).

    Same Eqs. 5 and 6 of [1] as :func:`_ln_pws` with their derivative: ice at or below
    the triple point, water above.
    """
    return _ln_pws_with_slope_on_form(drybulb, _form_coefficients(drybulb <= TRIPLE_POINT_C))


# Eqs. 5 and 6 in one layout, ln pws = k0/T + k1 + k2 T + k3 T^2 + k4 T^3 + k5 T^4 + k6 ln T,
# followed by 2 k3, 3 k4 and 4 k5 for the slope.
_ICE_FORM = (_C1, _C2, _C3, _C4, _C5, _C6, _C7, 2 * _C4, 3 * _C5, 4 * _C6)
_WATER_FORM = (_C8, _C9, _C10, _C11, _C12, 0.0, _C13, 2 * _C11, 3 * _C12, 0.0)


def _form_coefficients(on_ice):
    """Per-element coefficients of Eq. 5 (where ``on_ice``) or Eq. 6: scalars when every
    element is on the same form. Chosen once, they let a Newton iteration evaluate a
    single form per element instead of both forms and a selection."""
    if not np.any(on_ice):
        return _WATER_FORM
    if np.all(on_ice):
        return _ICE_FORM
    k = [np.where(on_ice, i, w) for i, w in zip(_ICE_FORM[:7], _WATER_FORM[:7], strict=True)]
    return (*k, 2 * k[3], 3 * k[4], 4 * k[5])


def _ln_pws_with_slope_on_form(drybulb, k):
    """ln pws [ln Pa] and its slope [1/K] on the forms ``k`` of :func:`_form_coefficients`
    (each form extrapolated past the triple point where an iterate strays there)."""
    kelvin = drybulb + ZERO_CELSIUS
    inverse = 1.0 / kelvin
    k0_over_t = k[0] * inverse
    ln_pws = _ln_pws_polynomial(kelvin, k)
    ln_pws += k0_over_t
    # slope: k2 + T (2 k3 + T (3 k4 + T 4 k5)) + (k6 - k0/T) / T
    slope = _horner(kelvin, (k[2], k[7], k[8], k[9]))
    k0_over_t -= k[6]
    k0_over_t *= inverse
    slope -= k0_over_t
    return ln_pws, slope


def _ln_pws_on_form(kelvin, k):
    """ln(pws / Pa) of Eq. 5 (ice) or 6 (water) of [1], written once for both: ``k`` is
    :data:`_ICE_FORM`, :data:`_WATER_FORM`, or per element from :func:`_form_coefficients`."""
    ln_pws = _ln_pws_polynomial(kelvin, k)
    ln_pws += k[0] / kelvin
    return ln_pws


def _ln_pws_polynomial(kelvin, k):
    """k1 + k2 T + k3 T^2 + k4 T^3 + k5 T^4 + k6 ln T of Eq. 5 or 6 (all but k0/T)."""
    ln_pws = _horner(kelvin, k[1:6])
    ln_pws += k[6] * np.log(kelvin)
    return ln_pws


def _horner(x, coefficients):
    """c0 + x (c1 + x (c2 + ...)) for ``coefficients`` (c0, c1, ...), in place on one new
    array; a scalar zero as the highest coefficient (Eq. 6 has no T^4 term) is skipped."""
    *lower, top = coefficients
    if np.ndim(top) == 0 and top == 0.0:
        *lower, top = lower
    value = x * top
    for c in reversed(lower[1:]):
        value += c
        value *= x
    value += lower[0]
    return value


#: Saturation pressure at 0 °C [Pa] as :func:`saturation_vapor_pressure` gives it (ice form).
_PWS_0C = float(np.exp(_ln_pws_ice(ZERO_CELSIUS)))
#: Saturation pressure at the triple point [Pa] (ice form, equal to the water form to 6e-9).
_PWS_TRIPLE = float(np.exp(_ln_pws_ice(ZERO_CELSIUS + TRIPLE_POINT_C)))
#: Saturation pressures at the ends of the formulation's range [Pa], widened by 1e-9 so
#: that a vapour pressure computed from a humidity ratio at exactly -100 or 200 °C
#: survives its rounding.
_PWS_LOWEST = float(np.exp(_ln_pws_ice(ZERO_CELSIUS + DRYBULB_MIN_C))) * (1 - 1e-9)
_PWS_HIGHEST = float(np.exp(_ln_pws_water(ZERO_CELSIUS + DRYBULB_MAX_C))) * (1 + 1e-9)


def saturation_vapor_pressure_over_ice(drybulb, *, check=True):
    r"""Saturation vapour pressure over ice.

    Parameters
    ----------
    drybulb : array_like
        Temperature [°C], -100 to 0.01 °C.

    Returns
    -------
    numpy.ndarray
        Saturation vapour pressure [Pa].

    Notes
    -----
    .. math::

        \ln p_{ws} = \frac{C_1}{T} + C_2 + C_3 T + C_4 T^2 + C_5 T^3 + C_6 T^4 + C_7 \ln T

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 5 (Hyland and Wexler 1983).

    Examples
    --------
    >>> round(float(saturation_vapor_pressure_over_ice(-10.0)), 2)
    259.9
    """
    t = _as_float(drybulb)
    if check:
        check_range("drybulb", t, DRYBULB_MIN_C, TRIPLE_POINT_C, "°C")
    return _out(np.exp(_ln_pws_ice(t + ZERO_CELSIUS)))


def saturation_vapor_pressure_over_water(drybulb, *, check=True):
    r"""Saturation vapour pressure over liquid water.

    Parameters
    ----------
    drybulb : array_like
        Temperature [°C], 0 to 200 °C.

    Returns
    -------
    numpy.ndarray
        Saturation vapour pressure [Pa].

    Notes
    -----
    .. math::

        \ln p_{ws} = \frac{C_8}{T} + C_9 + C_{10} T + C_{11} T^2 + C_{12} T^3 + C_{13} \ln T

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 6 (Hyland and Wexler 1983).

    Examples
    --------
    >>> round(float(saturation_vapor_pressure_over_water(20.0)), 1)
    2338.8
    """
    t = _as_float(drybulb)
    if check:
        check_range("drybulb", t, 0.0, DRYBULB_MAX_C, "°C")
    return _out(np.exp(_ln_pws_water(t + ZERO_CELSIUS)))


def saturation_vapor_pressure(drybulb, *, check=True):
    r"""Saturation vapour pressure: over ice at or below 0.01 °C, over water above.

    Parameters
    ----------
    drybulb : array_like
        Temperature [°C], -100 to 200 °C.

    Returns
    -------
    numpy.ndarray
        Saturation vapour pressure [Pa].

    Notes
    -----
    .. math::

        \ln p_{ws} = \begin{cases}
          C_1/T + C_2 + C_3 T + C_4 T^2 + C_5 T^3 + C_6 T^4 + C_7 \ln T & t \le 0.01\ \mathrm{°C} \\
          C_8/T + C_9 + C_{10} T + C_{11} T^2 + C_{12} T^3 + C_{13} \ln T & t > 0.01\ \mathrm{°C}
        \end{cases}

    with T = t + 273.15 [K] and the coefficients of
    :data:`plantside.constants.SATURATION_ICE_COEFFICIENTS` and
    :data:`plantside.constants.SATURATION_WATER_COEFFICIENTS`.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eqs. 5 and 6; the switch at the triple
    point follows the handbook's Table 3 (ice below 0.01 °C).

    Examples
    --------
    >>> round(float(saturation_vapor_pressure(20.0)), 1)  # psychrolib: 2338.8 Pa
    2338.8
    """
    t = _as_float(drybulb)
    if check:
        _check_drybulb("drybulb", t)
    return _out(np.exp(_ln_pws(t)))


def pressure_from_altitude(altitude, *, check=True):
    r"""Standard atmospheric pressure at an altitude.

    Parameters
    ----------
    altitude : array_like
        Altitude above sea level [m], -500 to 9,000 m.

    Returns
    -------
    numpy.ndarray
        Pressure [Pa].

    Notes
    -----
    .. math::

        p = 101\,325 \, (1 - 2.25577 \times 10^{-5} Z)^{5.2559}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 3:
    p = 101.325 (1 - 2.25577e-5 Z)^5.2559 kPa.

    Examples
    --------
    >>> round(float(pressure_from_altitude(1500.0)))  # psychrolib: 84556 Pa
    84556
    """
    z = _as_float(altitude)
    if check:
        check_range("altitude", z, -500.0, 9000.0, "m")
    return _out(
        STANDARD_PRESSURE * (1.0 - STANDARD_ATMOSPHERE_LAPSE * z) ** STANDARD_ATMOSPHERE_EXPONENT
    )


def altitude_from_pressure(pressure, *, check=True):
    r"""Altitude of the standard atmosphere at a pressure (inverse of Eq. 3 of [1]).

    Parameters
    ----------
    pressure : array_like
        Pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Altitude [m].

    Notes
    -----
    .. math::

        Z = \frac{1 - (p / 101\,325)^{1/5.2559}}{2.25577 \times 10^{-5}}

    Examples
    --------
    >>> round(float(altitude_from_pressure(84556.0)))
    1500
    """
    p = _as_float(pressure)
    if check:
        _check_pressure(p)
    return _out(
        (1.0 - (p / STANDARD_PRESSURE) ** (1.0 / STANDARD_ATMOSPHERE_EXPONENT))
        / STANDARD_ATMOSPHERE_LAPSE
    )


# ---------------------------------------------------------------------------------------
# humidity ratio hub
# ---------------------------------------------------------------------------------------
def humidity_ratio_from_vapor_pressure(vapor_pressure, pressure, *, check=True):
    r"""Humidity ratio from the partial pressure of water vapour.

    Parameters
    ----------
    vapor_pressure : array_like
        Partial pressure of water vapour [Pa], 0 up to 0.617 ``pressure`` (W = 1 kg/kg).
    pressure : array_like
        Total (station) pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Humidity ratio [kg/kg dry air].

    Notes
    -----
    .. math::

        W = 0.621945 \, \frac{p_w}{p - p_w}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 20: W = 0.621945 pw / (p - pw).

    Examples
    --------
    >>> round(float(humidity_ratio_from_vapor_pressure(1500.0, 101325.0)), 6)
    0.009346
    """
    pw, p = _as_float(vapor_pressure), _as_float(pressure)
    if check:
        _check_pressure(p)
        check_range("vapor_pressure", pw, 0.0, None, "Pa")
        _check_not_above(
            "vapor_pressure", pw, _PW_MAX_FRACTION * p, "the vapour pressure of 1 kg/kg", "Pa"
        )
    return _out(MOLAR_MASS_RATIO * pw / (p - pw))


def vapor_pressure_from_humidity_ratio(humidity_ratio, pressure, *, check=True):
    r"""Partial pressure of water vapour from humidity ratio.

    Parameters
    ----------
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air], >= 0.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Vapour pressure [Pa].

    Notes
    -----
    .. math::

        p_w = \frac{p \, W}{0.621945 + W}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 20 solved for pw:
    pw = p W / (0.621945 + W).

    Examples
    --------
    >>> round(float(vapor_pressure_from_humidity_ratio(0.01, 101325.0)), 1)
    1603.4
    """
    w, p = _as_float(humidity_ratio), _as_float(pressure)
    if check:
        _check_pressure(p)
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg")
    return _out(p * w / (MOLAR_MASS_RATIO + w))


def saturation_humidity_ratio(drybulb, pressure, *, check=True):
    r"""Humidity ratio of saturated air.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Saturation humidity ratio Ws [kg/kg dry air].

    Notes
    -----
    .. math::

        W_s = 0.621945 \, \frac{p_{ws}(t)}{p - p_{ws}(t)}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 20 at saturation (pw = pws):
    Ws = 0.621945 pws / (p - pws).

    Examples
    --------
    >>> round(float(saturation_humidity_ratio(20.0, 101325.0)), 6)  # psychrolib: 0.014695
    0.014695
    """
    t, p = _as_float(drybulb), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        _check_pressure(p)
    pws = np.exp(_ln_pws(t))
    # Above the boiling point at this pressure there is no saturation state.
    pws = np.minimum(pws, 0.999 * p)
    return _out(MOLAR_MASS_RATIO * pws / (p - pws))


def _check_humidity_ratio(drybulb, humidity_ratio, pressure):
    check_range("humidity_ratio", humidity_ratio, 0.0, 1.0, "kg/kg")
    ws = saturation_humidity_ratio(drybulb, pressure, check=False)
    _check_not_above("humidity_ratio", humidity_ratio, ws, "saturation at the dry bulb", "kg/kg")


def _state_inputs(drybulb, humidity_ratio, pressure, check=True):
    """Dry bulb, humidity ratio and pressure of a moist-air state as float arrays; with
    ``check``, each in range and the humidity ratio at most saturation at the dry bulb."""
    t, w, p = _as_float(drybulb), _as_float(humidity_ratio), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        _check_pressure(p)
        _check_humidity_ratio(t, w, p)
    return t, w, p


def humidity_ratio_from_relative_humidity(drybulb, relative_humidity, pressure, *, check=True):
    r"""Humidity ratio from dry bulb and relative humidity.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    relative_humidity : array_like
        Relative humidity [0..1].
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Humidity ratio [kg/kg dry air].

    Notes
    -----
    .. math::

        p_w = \phi \, p_{ws}(t), \qquad W = 0.621945 \, \frac{p_w}{p - p_w}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 22 (phi = pw/pws) and Eq. 20.

    Examples
    --------
    >>> round(float(humidity_ratio_from_relative_humidity(24.0, 0.5, 101325.0)), 6)
    0.009299
    """
    t, rh, p = _as_float(drybulb), _as_float(relative_humidity), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        check_range("relative_humidity", rh, 0.0, 1.0, "(fraction)")
        _check_pressure(p)
    pws = np.exp(_ln_pws(t))
    if check:
        # Near or above the boiling point at p, a high relative humidity asks for more
        # vapour than the air can be said to carry: cap it where W reaches 1 kg/kg.
        _check_not_above(
            "relative_humidity",
            rh,
            _PW_MAX_FRACTION * p / pws,
            "the value that gives 1 kg/kg at this dry bulb and pressure (near boiling)",
            "(fraction)",
        )
    pw = rh * pws
    return _out(MOLAR_MASS_RATIO * pw / (p - pw))


def relative_humidity_from_humidity_ratio(drybulb, humidity_ratio, pressure, *, check=True):
    r"""Relative humidity from dry bulb and humidity ratio.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air], 0 to saturation.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Relative humidity [0..1].

    Notes
    -----
    .. math::

        \phi = \frac{p_w}{p_{ws}(t)}, \qquad p_w = \frac{p \, W}{0.621945 + W}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eqs. 20 and 22: phi = pw / pws.

    Examples
    --------
    >>> round(float(relative_humidity_from_humidity_ratio(24.0, 0.0093, 101325.0)), 3)
    0.5
    """
    t, w, p = _state_inputs(drybulb, humidity_ratio, pressure, check)
    pw = p * w / (MOLAR_MASS_RATIO + w)
    return _out(np.minimum(pw / np.exp(_ln_pws(t)), 1.0))


def humidity_ratio_from_dew_point(dew_point, pressure, *, check=True):
    r"""Humidity ratio from dew point: the saturation humidity ratio at the dew point.

    Parameters
    ----------
    dew_point : array_like
        Dew-point temperature [°C], up to the dew point of 1 kg/kg at ``pressure``.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Humidity ratio [kg/kg dry air].

    Notes
    -----
    .. math::

        W = 0.621945 \, \frac{p_{ws}(t_d)}{p - p_{ws}(t_d)}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eqs. 5/6 at the dew point and Eq. 20
    (pw = pws(td), the definition of dew point, Eq. 36).

    Examples
    --------
    >>> round(float(humidity_ratio_from_dew_point(12.0, 101325.0)), 6)  # psychrolib: 0.008730
    0.00873
    """
    td, p = _as_float(dew_point), _as_float(pressure)
    if check:
        _check_drybulb("dew_point", td)
        _check_pressure(p)
    pw = np.exp(_ln_pws(td))
    if check and np.any(pw > _PW_MAX_FRACTION * p):
        highest = dew_point_from_vapor_pressure(_PW_MAX_FRACTION * p, check=False)
        _check_not_above("dew_point", td, highest, "the dew point of 1 kg/kg", "°C")
    return _out(MOLAR_MASS_RATIO * pw / (p - pw))


def _ln_kpa(vapor_pressure):
    """ln of the vapour pressure in kPa (floored at 1e-9 kPa, far below -100 °C)."""
    return np.log(np.maximum(vapor_pressure, 1e-6) * 1e-3)


def _store_step(x, active, x_new, moving):
    """Write a Newton step into ``x`` and return the elements still to iterate.

    ``active`` is None while every element is iterated (``x_new`` holds them all), else
    the flat indices iterated (``x_new`` holds those). Returns None (all) while more
    than a quarter are ``moving``, else the indices of those still moving (empty when
    done): once most elements are done, the rest are iterated alone (an active set;
    gathering a third or more of the rows costs about what it saves).
    """
    if active is None:
        x[:] = x_new
        left = np.flatnonzero(moving)
        return None if left.size > x.size // 4 else left
    x[active] = x_new
    return active[moving]


def _dew_point_first_guess(alpha):
    """Closed-form dew point [°C] from alpha = ln pw, pw in kPa, within 0.1 K of the exact
    dew point from -20 to 90 °C (0.6 K at -40 °C, 3 K at -60 °C; psychrolib, see
    tests/test_constants.py); a first guess for Newton iterations.

    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 37 (dew point 0 to 93 °C) and Eq. 38
    (below 0 °C).
    """
    c14, c15, c16, c17, c18 = DEW_POINT_WATER_COEFFICIENTS
    above_freezing = c14 + alpha * (c15 + alpha * (c16 + alpha * c17))
    above_freezing = above_freezing + c18 * np.exp(DEW_POINT_WATER_EXPONENT * alpha)  # pw^0.1984
    c0, c1, c2 = DEW_POINT_ICE_COEFFICIENTS
    below_freezing = c0 + alpha * (c1 + alpha * c2)
    guess = np.where(above_freezing >= 0.0, above_freezing, below_freezing)
    return np.minimum(np.maximum(guess, DRYBULB_MIN_C), DRYBULB_MAX_C)


def _by_form(on_ice, solve, *arrays):
    """``solve(form, *arrays)`` on flat arrays, with the scalar coefficients of Eq. 5
    (:data:`_ICE_FORM`) where ``on_ice`` and of Eq. 6 (:data:`_WATER_FORM`) elsewhere:
    one call when every element is on one form, else one call per form on its elements
    (scalar coefficients cost less than per-element ones gathered in every iteration)."""
    count = int(np.count_nonzero(on_ice))
    if count == 0:
        return solve(_WATER_FORM, *arrays)
    if count == on_ice.size:
        return solve(_ICE_FORM, *arrays)
    out = np.empty_like(arrays[0])
    for form, index in (
        (_ICE_FORM, np.flatnonzero(on_ice)),
        (_WATER_FORM, np.flatnonzero(~on_ice)),
    ):
        out[index] = solve(form, *(a[index] for a in arrays))
    return out


def _dew_point_newton(form, td, target):
    """Newton iterations on ln pws(td) = ``target`` (ln Pa) on one form of Eq. 5/6 of [1]
    from the first guess ``td`` [°C] (overwritten), to the last bit. ln pws is increasing
    and concave, so every step after the first lands at or above the root and descends
    onto it; twelve steps are many more than the closed forms' 10 K at worst need."""
    for _ in range(12):
        ln_pws, slope = _ln_pws_with_slope_on_form(td, form)
        ln_pws -= target
        ln_pws /= slope
        td -= ln_pws
    return td


def _dew_point_table(step):
    """The inverse of the saturation pressure as a table of cubic pieces, one per interval
    of ``step`` in ln pw [ln Pa] from below the lowest to above the highest saturation
    pressure of the formulation (-100 to 200 °C), one node exactly at the triple point.

    Returns the first node, the number of intervals and, per interval (one row each),
    the Hermite coefficients (t0, m0, c2, c3) of t = t0 + u (m0 + u (c2 + u c3)), 0 <= u <= 1: the
    exact dew points (Eq. 36 on Eq. 5 or 6, by Newton from the closed forms of Eqs. 37
    and 38) and their slopes dt/d(ln pw) at both ends, each interval on one form.
    """
    below = int(np.ceil((_LN_PWS_TRIPLE - np.log(_PWS_LOWEST)) / step)) + 1
    above = int(np.ceil((np.log(_PWS_HIGHEST) - _LN_PWS_TRIPLE) / step)) + 1
    nodes = _LN_PWS_TRIPLE + step * np.arange(-below, above + 1)
    on_ice = np.arange(nodes.size - 1) < below  # the interval's upper node <= triple point
    ends = []
    for ln_pw in (nodes[:-1], nodes[1:]):
        guess = _dew_point_first_guess(ln_pw - np.log(1000.0))
        td = _by_form(on_ice, _dew_point_newton, guess, ln_pw)
        slope = _by_form(on_ice, lambda form, x: _ln_pws_with_slope_on_form(x, form)[1], td)
        ends.append((td, step / slope))  # dt/du at the node, u = (ln pw - node) / step
    (t0, m0), (t1, m1) = ends
    c2 = 3.0 * (t1 - t0) - 2.0 * m0 - m1
    c3 = 2.0 * (t0 - t1) + m0 + m1
    return float(nodes[0]), nodes.size - 1, np.stack((t0, m0, c2, c3), axis=1)


_LN_PWS_TRIPLE = float(np.log(_PWS_TRIPLE))
# Nodes 1/128 apart in ln pw are 0.08 to 0.22 K apart in t; a cubic with the exact values
# and slopes at both ends is within h^4/384 max|d4t/du4| of the exact inverse, below 1e-11 K
# (tests/test_moist_air.py compares it with Newton iterations to 1e-9 K).
_DEW_TABLE_STEP = 1.0 / 128.0
_DEW_TABLE_FIRST, _DEW_TABLE_INTERVALS, _DEW_TABLE = _dew_point_table(_DEW_TABLE_STEP)


def _dew_point_from_table(ln_pw):
    """Dew point [°C] of flat ``ln_pw`` (ln Pa) from the cubic pieces of
    :data:`_DEW_TABLE`, held at -100 and 200 °C outside the formulation's range."""
    u = ln_pw - _DEW_TABLE_FIRST
    u *= 1.0 / _DEW_TABLE_STEP
    # fmax/fmin pass over NaN (piece 0), so NaN stays only in u and in the result
    piece = np.fmin(np.fmax(u, 0.0), _DEW_TABLE_INTERVALS - 1.0).astype(np.intp)
    np.clip(u, 0.0, _DEW_TABLE_INTERVALS, out=u)
    u -= piece
    c = np.take(_DEW_TABLE, piece, axis=0)  # one row of the piece's four coefficients
    t = c[:, 3] * u
    t += c[:, 2]
    t *= u
    t += c[:, 1]
    t *= u
    t += c[:, 0]
    return np.clip(t, DRYBULB_MIN_C, DRYBULB_MAX_C, out=t)


def dew_point_from_vapor_pressure(vapor_pressure, *, check=True):
    """Dew point: the temperature at which the saturation pressure equals ``vapor_pressure``.

    The inverse of Eqs. 5 and 6 of [1] as a table of cubic pieces in ln pw, 1/128 apart,
    with the exact dew point and its slope at both ends of each piece (solved once, on
    import, by Newton iterations from the handbook's closed forms, Eqs. 37 and 38): within
    1e-9 K of the root of Eq. 36 for the whole array at once, with no iteration per call.

    Parameters
    ----------
    vapor_pressure : array_like
        Partial pressure of water vapour [Pa], > 0.

    Returns
    -------
    numpy.ndarray
        Dew-point temperature [°C], -100 to 200 °C.

    Notes
    -----
    .. math::

        p_{ws}(t_d) = p_w

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 36 (pws(td) = pw) with Eqs. 5 and 6;
    the table's first guesses from Eqs. 37 and 38.

    Examples
    --------
    >>> round(float(dew_point_from_vapor_pressure(1500.0)), 2)  # psychrolib: 13.02 °C
    13.02
    """
    pw = _as_float(vapor_pressure)
    if check:
        check_range("vapor_pressure", pw, _PWS_LOWEST, _PWS_HIGHEST, "Pa")
    # ln pw [ln Pa] (floored at 1e-3 Pa, below -100 °C)
    ln_pw = np.log(np.maximum(pw, 1e-3)).reshape(-1)
    return _out(_dew_point_from_table(ln_pw).reshape(pw.shape))


def dew_point_from_humidity_ratio(humidity_ratio, pressure, *, check=True):
    r"""Dew point from humidity ratio.

    Parameters
    ----------
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air], > 0.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Dew-point temperature [°C].

    Notes
    -----
    .. math::

        p_{ws}(t_d) = \frac{p \, W}{0.621945 + W}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 20 (pw from W) and Eq. 36.

    Examples
    --------
    >>> round(float(dew_point_from_humidity_ratio(0.0093, 101325.0)), 2)  # psychrolib: 12.95 °C
    12.95
    """
    w, p = _as_float(humidity_ratio), _as_float(pressure)
    if check:
        _check_pressure(p)
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg", low_inclusive=False)
    pw = p * w / (MOLAR_MASS_RATIO + w)
    return dew_point_from_vapor_pressure(pw, check=check)


def _humidity_ratio_from_wet_bulb(t, twb, p, *, with_slope=False):
    """Eqs. 33 (water, twb >= 0 °C) and 35 (ice) of [1], no checks.

    With ``with_slope`` also return dW/dtwb [kg/kg/K] for Newton iterations.
    """
    if with_slope:
        ln_pws, dln_pws = _ln_pws_with_slope(twb)
    else:
        ln_pws = _ln_pws(twb)
    # The cap only binds above the boiling point at ``p``; the wet-bulb solver keeps its
    # bracket below the temperature where pws = 0.9 p, so the slope below stays exact.
    pws = np.minimum(np.exp(ln_pws), 0.999 * p)
    ws_star = MOLAR_MASS_RATIO * pws / (p - pws)
    # The water form holds at and above 0 °C (Eq. 33), the ice form below (Eq. 35).
    water = twb >= 0.0
    if np.all(water):
        a, b, c = _WET_BULB_WATER
    elif not np.any(water):
        a, b, c = _WET_BULB_ICE
    else:
        a, b, c = (
            np.where(water, x, y) for x, y in zip(_WET_BULB_WATER, _WET_BULB_ICE, strict=True)
        )
    numerator = (a - b * twb) * ws_star - CP_DRY_AIR * (t - twb)
    denominator = a + CP_WATER_VAPOR * t - c * twb
    w = numerator / denominator
    if not with_slope:
        return w
    dws = MOLAR_MASS_RATIO * p * pws * dln_pws / (p - pws) ** 2
    dnum = -b * ws_star + (a - b * twb) * dws + CP_DRY_AIR
    slope = (dnum * denominator + numerator * c) / denominator**2
    return w, slope


def humidity_ratio_from_wet_bulb(drybulb, wet_bulb, pressure, *, check=True):
    r"""Humidity ratio from dry bulb and thermodynamic wet bulb.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    wet_bulb : array_like
        Thermodynamic wet-bulb temperature [°C], not above the dry bulb.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Humidity ratio [kg/kg dry air].

    Notes
    -----
    .. math::

        W = \frac{(2501 - 2.326\, t^*) W_s^* - 1.006 (t - t^*)}{2501 + 1.86\, t - 4.186\, t^*}
        \quad (t^* \ge 0\ \mathrm{°C}),

        W = \frac{(2830 - 0.24\, t^*) W_s^* - 1.006 (t - t^*)}{2830 + 1.86\, t - 2.1\, t^*}
        \quad (t^* < 0\ \mathrm{°C}),

    with :math:`W_s^*` the saturation humidity ratio at the wet bulb :math:`t^*`.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 33 (wet bulb above freezing) and
    Eq. 35 (below freezing).

    Examples
    --------
    >>> round(float(humidity_ratio_from_wet_bulb(30.0, 20.0, 101325.0)), 6)  # psychrolib
    0.010517
    """
    t, twb, p = _as_float(drybulb), _as_float(wet_bulb), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        _check_drybulb("wet_bulb", twb)
        _check_pressure(p)
        _check_not_above("wet_bulb", twb, t, "the dry bulb", "°C")
    w = _humidity_ratio_from_wet_bulb(t, twb, p)
    if check and np.any(w < 0):
        bad = np.broadcast_to(w < 0, np.shape(w))
        idx = np.flatnonzero(bad)
        raise InputRangeError(
            "wet_bulb",
            "wet_bulb is too far below the dry bulb: the air would hold negative moisture"
            + ("" if np.ndim(w) == 0 else f" at {idx.size} elements (indices {idx[:5].tolist()})")
            + "; allowed from the dry air wet bulb up to the dry bulb",
            "dry-air wet bulb to dry bulb",
            idx,
        )
    return _out(w)


def _wet_bulb_first_guess(t, w, p, pw, td):
    """Approximate wet bulb [°C]: Eq. 33 of [1] with Ws* linearised about the dew point
    ``td`` [°C] (of the vapour pressure ``pw`` [Pa]).

    The slope of ln pws comes from Clausius-Clapeyron (L/(Rv T^2), L over ice below
    0 °C). Ws* is convex, so the tangent under-estimates it and the guess mostly lies at
    or above the root, where Newton descends monotonically; the guess only saves
    iterations, never the answer.
    """
    kelvin = td + ZERO_CELSIUS
    dln_pws = np.where(td < 0.0, CLAUSIUS_CLAPEYRON_ICE_K, CLAUSIUS_CLAPEYRON_WATER_K)
    dln_pws /= kelvin * kelvin
    slope = w * p / (p - pw) * dln_pws  # dWs/dt at the dew point [1/K]
    b = CP_LIQUID_WATER - CP_WATER_VAPOR
    a_slope = (LATENT_HEAT_0C - b * td) * slope
    numerator = w * b * td + CP_WATER_VAPOR * w * t + CP_DRY_AIR * t + a_slope * td
    return numerator / (a_slope + CP_DRY_AIR + CP_LIQUID_WATER * w)


def _wet_bulb_newton(x, t, w, p, hi, coefficients, skip=None):
    """Newton iterations on Eq. 33 or 35 of [1], ``x`` the first guess [°C] (overwritten)
    and ``hi`` [°C] the upper end of the bracket of the root.

    ``coefficients`` is (lo, a, b, c, k0 ... k9): the lower end of the bracket [°C], the
    psychrometer equation's a, b, c (:data:`_WET_BULB_WATER` or :data:`_WET_BULB_ICE`)
    and the saturation form at the root (:data:`_WATER_FORM` or :data:`_ICE_FORM`), each
    a scalar or one value per element (see :data:`_WET_BULB_GROUPS`). Elements at the
    flat indices ``skip`` (solved elsewhere) are stepped but never iterated for.
    """
    lo, a, b, c, *form = coefficients
    # Multiplied through by its (positive) denominator, W(t*) = W reads
    #   F(t*) = (a - b t*) Ws*(t*) + (1.006 + c W) t* - 1.006 t - W (a + 1.86 t) = 0.
    linear = CP_DRY_AIR + c * w
    constant = -CP_DRY_AIR * t - w * (a + CP_WATER_VAPOR * t)
    np.minimum(np.maximum(x, lo, out=x), hi, out=x)
    # On one form F is smooth, increasing and convex in t* (Ws* is convex; a - b t* > 0),
    # so Newton from above the root descends monotonically onto it, and a step from
    # below lands above it: clipped to the bracket [lo, hi], which holds the root, the
    # plain Newton iteration converges without a bisection safeguard. (A root below
    # -100 °C, very cold and dry air, converges onto lo = -100 °C.) Once most elements
    # are done, the rest are iterated alone (an active set).
    rows = (hi, p, linear, constant, lo, a, b, *form)
    active = None
    for _ in range(100):
        if active is None:
            xa, (hi_a, pa, linear_a, constant_a, lo_a, a_a, b_a, *form_a) = x, rows
        else:
            xa = x[active]
            hi_a, pa, linear_a, constant_a, lo_a, a_a, b_a, *form_a = (
                row[active] if np.ndim(row) else row for row in rows
            )
        pws, dln_pws = _ln_pws_with_slope_on_form(xa, form_a)
        np.exp(pws, out=pws)
        dry = pa - pws  # above 0.1 p inside the bracket
        ws_star = pws
        ws_star *= MOLAR_MASS_RATIO
        ws_star /= dry
        lever_ws = b_a * xa
        np.subtract(a_a, lever_ws, out=lever_ws)
        lever_ws *= ws_star
        f = linear_a * xa
        f += constant_a
        f += lever_ws
        # F' = (a - b t*) Ws* d(ln pws)/dt p/(p - pws) - b Ws* + 1.006 + c W  (> 1)
        lever_ws *= dln_pws
        lever_ws *= pa
        lever_ws /= dry
        lever_ws += linear_a
        ws_star *= b_a
        lever_ws -= ws_star
        f /= lever_ws
        x_new = xa - f
        np.minimum(np.maximum(x_new, lo_a, out=x_new), hi_a, out=x_new)
        # Newton converges quadratically: |F''/(2 F')| stays below 0.11 /K from -100 to
        # 200 °C and 30 to 120 kPa (about 0.03 /K at room conditions), so after a
        # Newton step under 9e-3 K the error left is below 0.11 * (9e-3)^2 = 8.9e-6 K,
        # within WET_BULB_TOLERANCE_K: the element is done.
        f = np.abs(np.subtract(x_new, xa, out=f), out=f)
        moving = f >= _WET_BULB_DONE_STEP
        if active is None and skip is not None:
            moving[skip] = False
        active = _store_step(x, active, x_new, moving)
        if active is not None and active.size == 0:
            break
    return x


#: The wet-bulb solver's accuracy [K]: every returned wet bulb lies within this of the
#: root of Eq. 33/35 of [1]. A hundredth of the tolerance psychrolib bisects its wet bulb
#: to (PSYCHROLIB_TOLERANCE = 0.001 K in SI, psychrolib 2.5 GetTWetBulbFromHumRatio),
#: the reference implementation of the same equations (its answer lies within 5e-4 K
#: of the root); far inside the 0.1 K within which CoolProp's HAPropsSI (a real-gas
#: model) agrees at room conditions (tests/test_moist_air.py). A tighter figure would
#: cost Newton steps and buy nothing any source states.
WET_BULB_TOLERANCE_K = 1e-5
#: A Newton step below this [K] leaves an error under 0.11 /K * step^2 < 8.9e-6 K.
_WET_BULB_DONE_STEP = 9e-3
#: Grid of the wet-bulb first-guess tables [°C]: dry bulb from -40 to 60 °C and dew-point
#: depression (dry bulb minus dew point) from 0 to 40 K, both 0.5 K apart.
_WB_TABLE_T0, _WB_TABLE_STEP, _WB_TABLE_NT, _WB_TABLE_ND = -40.0, 0.5, 201, 81
_WB_TABLE_SIZE = _WB_TABLE_NT * _WB_TABLE_ND
#: Wet-bulb tables by station pressure [Pa] (a site's year has one), 8 at most; built
#: under a lock (sweep workers run threads).
_WB_TABLES: dict[float, np.ndarray] = {}
_WB_TABLES_MAX = 8
_WB_TABLES_LOCK = threading.Lock()
#: A new pressure's table (about 2 ms to build) is built only for arrays this long or
#: longer (about what three Newton steps on them cost); shorter arrays use a kept table
#: or the closed-form guess.
_WB_TABLE_MIN_SIZE = 2000


def _wet_bulb_tables(p):
    """Roots [°C] of Eq. 33 with Eq. 6 (water) and of Eq. 35 with Eq. 5 (ice) of [1] at
    the pressure ``p`` [Pa] on the grid of :data:`_WB_TABLE_T0` ..., as one row of four
    bilinear coefficients per cell: the water table, then the ice table, each row-major
    in (dry bulb, depression). Each form is solved on the whole grid (past 0 °C too), so
    both are smooth and bilinear interpolation in either stays within a few 1e-4 K (5e-3
    K where the dew point crosses the triple point). Solved once per pressure by
    :func:`_wet_bulb_newton` to its full accuracy (about 2 ms), then kept."""
    tables = _WB_TABLES.get(p)
    if tables is not None:
        return tables
    with _WB_TABLES_LOCK:
        tables = _WB_TABLES.get(p)
        if tables is None:
            tables = _wet_bulb_tables_solved(p)
            if len(_WB_TABLES) >= _WB_TABLES_MAX:
                del _WB_TABLES[next(iter(_WB_TABLES))]
            _WB_TABLES[p] = tables
    return tables


def _wet_bulb_tables_solved(p):
    """The tables of :func:`_wet_bulb_tables` at ``p`` [Pa], solved."""
    t = _WB_TABLE_T0 + _WB_TABLE_STEP * np.arange(_WB_TABLE_NT)
    depression = _WB_TABLE_STEP * np.arange(_WB_TABLE_ND)
    t, td = np.meshgrid(t, depression, indexing="ij")
    t = t.ravel()
    td = t - td.ravel()
    w = humidity_ratio_from_dew_point(td, p, check=False)
    pw = p * w / (MOLAR_MASS_RATIO + w)
    tables = np.zeros((2, _WB_TABLE_NT, _WB_TABLE_ND, 4))
    for k, group in enumerate((2, 0)):
        _, *rest = _WET_BULB_GROUPS[group]
        x = _wet_bulb_first_guess(t, w, p, pw, td)
        x = _wet_bulb_newton(x, t, w, p, t, (DRYBULB_MIN_C, *rest))
        x = x.reshape(_WB_TABLE_NT, _WB_TABLE_ND)
        # per cell, f = c0 + c1 v + u (c2 + c3 v) with u, v from 0 to 1 across it
        c = tables[k, :-1, :-1]
        c[..., 0] = x[:-1, :-1]
        c[..., 1] = x[:-1, 1:] - x[:-1, :-1]
        c[..., 2] = x[1:, :-1] - x[:-1, :-1]
        c[..., 3] = x[1:, 1:] - x[1:, :-1] - c[..., 1]
    return tables.reshape(-1, 4)


def _wet_bulb_table_guess(t, td, p, on_ice):
    """First guess of the wet bulb [°C] from the dry bulb ``t`` and dew point ``td``
    [°C] (flat arrays), bilinear in the tables of :func:`_wet_bulb_tables` at the
    scalar pressure ``p`` [Pa], the ice table where ``on_ice`` (a bool array, or a bool
    for all). Within a few 1e-4 K of the root on the grid (-40 to 60 °C, up to 40 K of
    dew-point depression), so that one Newton step reaches WET_BULB_TOLERANCE_K. None
    when the pressure varies or an element lies off the grid (the closed form of
    :func:`_wet_bulb_first_guess` serves then)."""
    if np.ndim(p) or (t.size < _WB_TABLE_MIN_SIZE and float(p) not in _WB_TABLES):
        return None
    u = t - _WB_TABLE_T0
    u *= 1.0 / _WB_TABLE_STEP
    v = t - td
    v *= 1.0 / _WB_TABLE_STEP
    if not (
        u.min() >= 0.0
        and u.max() < _WB_TABLE_NT - 1
        and v.min() >= 0.0
        and v.max() < _WB_TABLE_ND - 1
    ):
        return None
    table = _wet_bulb_tables(float(p))
    i = u.astype(np.intp)
    j = v.astype(np.intp)
    u -= i
    v -= j
    i *= _WB_TABLE_ND
    i += j
    if np.ndim(on_ice):
        i += on_ice * _WB_TABLE_SIZE
    elif on_ice:
        i += _WB_TABLE_SIZE
    c = np.take(table, i, axis=0)  # one row of the cell's four coefficients
    x = c[:, 3] * v
    x += c[:, 2]
    x *= u
    v *= c[:, 1]
    x += v
    x += c[:, 0]
    return x


#: Per group of elements of the wet-bulb solver, the lower end of the bracket of the
#: root [°C], the psychrometer equation's a, b, c and the saturation form at the root:
#: 0 ice (Eq. 35 with Eq. 5, root below 0 °C), 1 water with its root in the narrow band
#: from 0 to 0.01 °C (Eq. 33 with Eq. 5), 2 water (Eq. 33 with Eq. 6).
_WET_BULB_GROUPS = np.array(
    [
        (DRYBULB_MIN_C, *_WET_BULB_ICE, *_ICE_FORM),
        (0.0, *_WET_BULB_WATER, *_ICE_FORM),
        (0.0, *_WET_BULB_WATER, *_WATER_FORM),
    ]
)
_WET_BULB_COLUMNS = np.ascontiguousarray(_WET_BULB_GROUPS.T)


def wet_bulb_from_humidity_ratio(drybulb, humidity_ratio, pressure, *, check=True):
    r"""Thermodynamic wet bulb from dry bulb and humidity ratio.

    Solves Eq. 33/35 of [1] for the wet bulb by Newton iteration on whole arrays,
    clipped to a bracket between -100 °C and the dry bulb (and below the temperature at
    which the saturation pressure reaches 0.9 of the total pressure, where W would
    exceed 1 kg/kg). In the narrow band (about 0.3 K) just above 0 °C where both the
    water form (Eq. 33) and the ice form (Eq. 35) have a root, the root over water is
    returned. Air so cold and dry that its wet bulb would lie below -100 °C, the end of
    the formulation's range, gets -100 °C.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air], 0 to saturation.
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Thermodynamic wet-bulb temperature [°C], within :data:`WET_BULB_TOLERANCE_K`
        (1e-5 K) of the root: a hundredth of psychrolib's convergence tolerance
        (PSYCHROLIB_TOLERANCE, 0.001 K), the reference implementation of these equations.

    Notes
    -----
    .. math::

        W = \frac{(a - b\, t^*) W_s^*(t^*) - 1.006 (t - t^*)}{a + 1.86\, t - c\, t^*}
        \ \text{solved for } t^*,

    with (a, b, c) = (2501, 2.326, 4.186) over water and (2830, 0.24, 2.1) over ice.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eqs. 33 and 35; first guess bilinear in a
    table of this solver's own roots over (dry bulb, dew-point depression) kept per
    station pressure (:func:`_wet_bulb_tables`), or Eq. 33 linearised about the dew
    point (Eqs. 37 and 38) off the table's grid or where the pressure varies.

    Examples
    --------
    >>> round(float(wet_bulb_from_humidity_ratio(30.0, 0.0106, 101325.0)), 2)  # psychrolib: 20.06
    20.06
    """
    t, w, p = _as_float(drybulb), _as_float(humidity_ratio), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        _check_pressure(p)
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg")
    shape = np.broadcast_shapes(t.shape, w.shape, p.shape)
    t, w = (np.array(np.broadcast_to(a, shape), dtype=float).ravel() for a in (t, w))
    if p.size and p.min() == p.max():  # one pressure (a site's year): a scalar
        p = p.reshape(-1)[0]
    else:
        p = np.array(np.broadcast_to(p, shape), dtype=float).ravel()
    pw = p * w / (MOLAR_MASS_RATIO + w)
    td = _dew_point_from_table(np.log(np.maximum(pw, 1e-3)))
    if check:
        # at most saturated: the dew point not above the dry bulb (pws increases with t);
        # the hours within 1e-4 K of it are checked against Ws(t) itself
        near = np.flatnonzero(td > t - 1e-4)
        if near.size:
            p_near = p[near] if np.ndim(p) else p
            ws = saturation_humidity_ratio(t[near], p_near, check=False)
            if np.any(w[near] > ws + np.abs(ws) * _SATURATION_SLACK + 1e-12):
                _check_humidity_ratio(
                    t.reshape(shape), w.reshape(shape), np.reshape(p, shape) if np.ndim(p) else p
                )
    hi = t.copy()
    hot = t > 60.0
    if hot.any():
        # Above the boiling point at p, Ws* has no meaning; at pws = 0.9 p, Ws* = 5.6
        # and Eq. 33 gives W > 1 kg/kg for any dry bulb up to 200 °C, so the root lies
        # below that temperature.
        p_hot = p[hot] if np.ndim(p) else np.full(np.count_nonzero(hot), p)
        boiling = dew_point_from_vapor_pressure(0.9 * p_hot, check=False)
        hi[hot] = np.minimum(hi[hot], boiling)
    # Near 0 °C Eqs. 33 and 35 can both have a root (they differ at the switch). Take
    # the wet bulb over water (Eq. 33) whenever it exists, the ice form otherwise.
    # Eq. 33 at twb = 0: W = (2501 Ws*(0) - 1.006 t) / (2501 + 1.86 t).
    ws_0c = MOLAR_MASS_RATIO * _PWS_0C / (p - _PWS_0C)
    water = (LATENT_HEAT_0C * ws_0c - CP_DRY_AIR * t) / (LATENT_HEAT_0C + CP_WATER_VAPOR * t) <= w
    water &= t >= 0.0
    # Each element stays on one form of the psychrometer equation: Eq. 33 (water,
    # a = 2501, b = 2.326, c = 4.186) or Eq. 35 (ice, a = 2830, b = 0.24, c = 2.1). The
    # saturation form (Eq. 5 or 6) at the root is known too: ice if the root is at or
    # below the triple point, that is if F(0.01 °C) >= 0 (pws there is _PWS_TRIPLE).
    a, b, c = _WET_BULB_WATER
    ws_triple = MOLAR_MASS_RATIO * _PWS_TRIPLE / (p - _PWS_TRIPLE)
    f_triple = (a - b * TRIPLE_POINT_C) * ws_triple + (CP_DRY_AIR + c * w) * TRIPLE_POINT_C
    f_triple -= CP_DRY_AIR * t + w * (a + CP_WATER_VAPOR * t)
    water_root_on_ice = water & (f_triple >= 0.0)
    # Three groups (_WET_BULB_GROUPS): ice (Eq. 35 with Eq. 5, the root between -100 °C
    # and the dry bulb, below 0 °C), water with its root in the narrow band from 0 to
    # 0.01 °C (Eq. 33 with Eq. 5), water (Eq. 33 with Eq. 6).
    ice = ~water
    hi[ice & (t >= 0.0)] = -1e-9
    hi[water_root_on_ice] = np.minimum(hi[water_root_on_ice], TRIPLE_POINT_C)
    # The groups of _WET_BULB_GROUPS: scalar coefficients when every element is in one
    # group, else one value per element (one whole-array solve instead of one per group).
    group = water.astype(np.intp)
    group *= 2
    group -= water_root_on_ice
    counts = np.bincount(group, minlength=3)
    x = _wet_bulb_table_guess(t, td, p, ice if 0 < counts[0] < group.size else counts[0] > 0)
    if x is None:
        x = _wet_bulb_first_guess(t, w, p, pw, td)
    major = int(np.argmax(counts))
    coefficients = tuple(_WET_BULB_GROUPS[major])
    if counts[major] == group.size:
        x = _wet_bulb_newton(x, t, w, p, hi, coefficients)
        return _out(x.reshape(shape))
    # The largest group on the whole array with scalar coefficients, the others after
    # it, alone, with one coefficient per element (in place on x; the others' guesses
    # are taken first, as the first solve leaves their elements unconverged).
    minor = np.flatnonzero(group != major)
    x_minor = x[minor]
    x = _wet_bulb_newton(x, t, w, p, hi, coefficients, skip=minor)
    present = [g for g in range(3) if counts[g] and g != major]
    if len(present) == 1:
        coefficients = tuple(_WET_BULB_GROUPS[present[0]])
    else:  # per element only where the two groups differ
        group_minor = group[minor]
        first, second = present
        coefficients = tuple(
            np.take(column, group_minor) if column[first] != column[second] else column[first]
            for column in _WET_BULB_COLUMNS
        )
    p_minor = p[minor] if np.ndim(p) else p
    x[minor] = _wet_bulb_newton(x_minor, t[minor], w[minor], p_minor, hi[minor], coefficients)
    return _out(x.reshape(shape))


# ---------------------------------------------------------------------------------------
# enthalpy, volume, density
# ---------------------------------------------------------------------------------------
def enthalpy_from_humidity_ratio(drybulb, humidity_ratio, *, check=True):
    r"""Specific enthalpy of moist air.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].

    Returns
    -------
    numpy.ndarray
        Enthalpy [kJ/kg dry air], referenced to dry air and liquid water at 0 °C.

    Notes
    -----
    .. math::

        h = 1.006\, t + W (2501 + 1.86\, t)

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 30: h = 1.006 t + W (2501 + 1.86 t).

    Examples
    --------
    >>> round(float(enthalpy_from_humidity_ratio(24.0, 0.0093)), 2)  # psychrolib: 47.82 kJ/kg
    47.82
    """
    t, w = _as_float(drybulb), _as_float(humidity_ratio)
    if check:
        _check_drybulb("drybulb", t)
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg")
    return _out(CP_DRY_AIR * t + w * (LATENT_HEAT_0C + CP_WATER_VAPOR * t))


def drybulb_from_enthalpy(enthalpy, humidity_ratio, *, check=True):
    r"""Dry bulb from enthalpy and humidity ratio (Eq. 30 of [1] solved for t).

    Parameters
    ----------
    enthalpy : array_like
        Enthalpy [kJ/kg dry air].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].

    Returns
    -------
    numpy.ndarray
        Dry-bulb temperature [°C].

    Notes
    -----
    .. math::

        t = \frac{h - 2501\, W}{1.006 + 1.86\, W}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 30: t = (h - 2501 W)/(1.006 + 1.86 W).

    Examples
    --------
    >>> round(float(drybulb_from_enthalpy(47.8, 0.0093)), 2)
    23.98
    """
    h, w = _as_float(enthalpy), _as_float(humidity_ratio)
    if check:
        check_range("enthalpy", h, -150.0, 3000.0, "kJ/kg")
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg")
    t = (h - LATENT_HEAT_0C * w) / (CP_DRY_AIR + CP_WATER_VAPOR * w)
    if check:
        _check_drybulb("drybulb (from enthalpy)", t)
    return _out(t)


def humidity_ratio_from_enthalpy(drybulb, enthalpy, *, check=True):
    r"""Humidity ratio from dry bulb and enthalpy (Eq. 30 of [1] solved for W).

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    enthalpy : array_like
        Enthalpy [kJ/kg dry air].

    Returns
    -------
    numpy.ndarray
        Humidity ratio [kg/kg dry air].

    Notes
    -----
    .. math::

        W = \frac{h - 1.006\, t}{2501 + 1.86\, t}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 30: W = (h - 1.006 t)/(2501 + 1.86 t).

    Examples
    --------
    >>> round(float(humidity_ratio_from_enthalpy(24.0, 47.8)), 6)
    0.009293
    """
    t, h = _as_float(drybulb), _as_float(enthalpy)
    if check:
        _check_drybulb("drybulb", t)
    w = (h - CP_DRY_AIR * t) / (LATENT_HEAT_0C + CP_WATER_VAPOR * t)
    if check:
        check_range("humidity_ratio (from enthalpy)", w, 0.0, 1.0, "kg/kg")
    return _out(w)


def specific_volume_from_humidity_ratio(drybulb, humidity_ratio, pressure, *, check=True):
    r"""Specific volume of moist air per unit mass of dry air.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Specific volume [m³/kg dry air].

    Notes
    -----
    .. math::

        v = \frac{R_{da} (t + 273.15)(1 + 1.607858\, W)}{p},
        \qquad R_{da} = 287.042\ \mathrm{J/(kg\,K)}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 26:
    v = 0.287042 (t + 273.15)(1 + 1.607858 W)/p, p in kPa.

    Examples
    --------
    >>> round(float(specific_volume_from_humidity_ratio(24.0, 0.0093, 101325.0)), 4)
    0.8544
    """
    t, w, p = _as_float(drybulb), _as_float(humidity_ratio), _as_float(pressure)
    if check:
        _check_drybulb("drybulb", t)
        _check_pressure(p)
        check_range("humidity_ratio", w, 0.0, 1.0, "kg/kg")
    return _out(R_DRY_AIR * (t + ZERO_CELSIUS) * (1.0 + VOLUME_WATER_FACTOR * w) / p)


def density_from_humidity_ratio(drybulb, humidity_ratio, pressure, *, check=True):
    r"""Density of moist air (mass of dry air plus vapour per unit volume).

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Density [kg moist air/m³].

    Notes
    -----
    .. math::

        \rho = \frac{1 + W}{v}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 11: rho = (1 + W)/v.

    Examples
    --------
    >>> round(float(density_from_humidity_ratio(24.0, 0.0093, 101325.0)), 4)  # psychrolib
    1.1813
    """
    v = specific_volume_from_humidity_ratio(drybulb, humidity_ratio, pressure, check=check)
    return _out((1.0 + _as_float(humidity_ratio)) / v)


def degree_of_saturation(drybulb, humidity_ratio, pressure, *, check=True):
    r"""Degree of saturation mu = W / Ws.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    pressure : array_like
        Total pressure [Pa].

    Returns
    -------
    numpy.ndarray
        Degree of saturation [-].

    Notes
    -----
    .. math::

        \mu = \frac{W}{W_s(t, p)}

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, Eq. 12.

    Examples
    --------
    >>> round(float(degree_of_saturation(24.0, 0.0093, 101325.0)), 4)  # psychrolib: 0.4926
    0.4926
    """
    t, w, p = _state_inputs(drybulb, humidity_ratio, pressure, check)
    return _out(w / saturation_humidity_ratio(t, p, check=False))


# ---------------------------------------------------------------------------------------
# air state
# ---------------------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class AirState:
    """An immutable moist-air state (scalar or array of states).

    The state is fixed by dry bulb, humidity ratio and pressure; every other
    property is derived on first use and cached.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air], 0 to saturation.
    pressure : array_like
        Total pressure [Pa]; defaults to standard sea-level pressure.
    """

    drybulb: np.ndarray
    humidity_ratio: np.ndarray
    pressure: np.ndarray = STANDARD_PRESSURE

    def __post_init__(self):
        t, w, p = _state_inputs(self.drybulb, self.humidity_ratio, self.pressure)
        object.__setattr__(self, "drybulb", _out(t))
        object.__setattr__(self, "humidity_ratio", _out(w))
        object.__setattr__(self, "pressure", _out(p))

    @classmethod
    def from_relative_humidity(cls, drybulb, relative_humidity, pressure=STANDARD_PRESSURE):
        """State from dry bulb [°C], relative humidity [0..1] and pressure [Pa]."""
        return cls(
            drybulb,
            humidity_ratio_from_relative_humidity(drybulb, relative_humidity, pressure),
            pressure,
        )

    @classmethod
    def from_wet_bulb(cls, drybulb, wet_bulb, pressure=STANDARD_PRESSURE):
        """State from dry bulb [°C], wet bulb [°C] and pressure [Pa]."""
        return cls(drybulb, humidity_ratio_from_wet_bulb(drybulb, wet_bulb, pressure), pressure)

    @classmethod
    def from_dew_point(cls, drybulb, dew_point, pressure=STANDARD_PRESSURE):
        """State from dry bulb [°C], dew point [°C] and pressure [Pa]."""
        _check_not_above("dew_point", dew_point, drybulb, "the dry bulb", "°C")
        return cls(drybulb, humidity_ratio_from_dew_point(dew_point, pressure), pressure)

    @classmethod
    def from_enthalpy(cls, enthalpy, humidity_ratio, pressure=STANDARD_PRESSURE):
        """State from enthalpy [kJ/kg dry air], humidity ratio [kg/kg] and pressure [Pa]."""
        return cls(drybulb_from_enthalpy(enthalpy, humidity_ratio), humidity_ratio, pressure)

    @cached_property
    def enthalpy(self):
        """Enthalpy [kJ/kg dry air]."""
        return enthalpy_from_humidity_ratio(self.drybulb, self.humidity_ratio, check=False)

    @cached_property
    def vapor_pressure(self):
        """Partial pressure of water vapour [Pa]."""
        return vapor_pressure_from_humidity_ratio(self.humidity_ratio, self.pressure, check=False)

    @cached_property
    def dew_point(self):
        """Dew-point temperature [°C] (-100 °C for perfectly dry air)."""
        w = np.maximum(_as_float(self.humidity_ratio), 1e-12)
        return dew_point_from_humidity_ratio(w, self.pressure, check=False)

    @cached_property
    def wet_bulb(self):
        """Thermodynamic wet-bulb temperature [°C]."""
        return wet_bulb_from_humidity_ratio(
            self.drybulb, self.humidity_ratio, self.pressure, check=False
        )

    @cached_property
    def relative_humidity(self):
        """Relative humidity [0..1]."""
        return relative_humidity_from_humidity_ratio(
            self.drybulb, self.humidity_ratio, self.pressure, check=False
        )

    @cached_property
    def specific_volume(self):
        """Specific volume [m³/kg dry air]."""
        return specific_volume_from_humidity_ratio(
            self.drybulb, self.humidity_ratio, self.pressure, check=False
        )

    @cached_property
    def density(self):
        """Moist-air density [kg/m³]."""
        return density_from_humidity_ratio(
            self.drybulb, self.humidity_ratio, self.pressure, check=False
        )


def air_state(
    *,
    drybulb,
    humidity_ratio=None,
    wet_bulb=None,
    dew_point=None,
    relative_humidity=None,
    pressure=STANDARD_PRESSURE,
) -> AirState:
    """A moist-air state from its dry bulb and exactly one humidity property.

    Parameters
    ----------
    drybulb : array_like
        Dry-bulb temperature [°C].
    humidity_ratio, wet_bulb, dew_point, relative_humidity : array_like, optional
        Exactly one of: humidity ratio [kg/kg dry air], thermodynamic wet bulb [°C],
        dew point [°C] or relative humidity [0..1].
    pressure : array_like
        Total pressure [Pa]; standard sea-level pressure by default.

    Returns
    -------
    AirState

    Examples
    --------
    >>> state = air_state(drybulb=24.0, relative_humidity=0.5)
    >>> round(float(state.dew_point), 2)  # psychrolib: 12.95 °C
    12.95
    """
    given = {
        "humidity_ratio": humidity_ratio,
        "wet_bulb": wet_bulb,
        "dew_point": dew_point,
        "relative_humidity": relative_humidity,
    }
    named = [name for name, value in given.items() if value is not None]
    if len(named) != 1:
        allowed = "exactly one of humidity_ratio, wet_bulb, dew_point, relative_humidity"
        raise InputRangeError(
            "air_state",
            f"air_state: given {', '.join(named) if named else 'no humidity property'}; "
            f"allowed: {allowed}",
            allowed,
        )
    if humidity_ratio is not None:
        return AirState(drybulb, humidity_ratio, pressure)
    if wet_bulb is not None:
        return AirState.from_wet_bulb(drybulb, wet_bulb, pressure)
    if dew_point is not None:
        return AirState.from_dew_point(drybulb, dew_point, pressure)
    return AirState.from_relative_humidity(drybulb, relative_humidity, pressure)
