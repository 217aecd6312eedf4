"""Air-to-air energy recovery between exhaust and outdoor air, vectorised.

A recovery device (plate, wheel, run-around loop) is described by its sensible
and latent effectiveness at balanced flow (outdoor air flow equal to exhaust flow)
[1]. The outdoor air leaving the device is

    t2 = t1 - f eps_s (t1 - t3),    W2 = W1 - f eps_L (W1 - W3)

where 1 is the outdoor air entering, 3 the exhaust air entering and f in [0, 1]
the modulation (wheel speed or bypass damper) the control applies. The total
(enthalpy) effectiveness follows from the two states.

The air handler bypasses the device when it would add load (for instance during
economizer operation, or when outdoor air is between the exhaust and the
mixed-air set point) and modulates it so the mixed air does not overshoot the
mixed-air set point in cold weather.

Units: dry bulb [°C], humidity ratio [kg/kg dry air], enthalpy [kJ/kg dry air],
effectiveness and fraction [-].

Limits: no frost or condensation inside the device is modelled; the recovered
outdoor air humidity is not limited at saturation.

References
----------
[1] ASHRAE, 2020. ASHRAE Handbook - HVAC Systems and Equipment (SI), Chapter 26,
    Air-to-Air Energy Recovery Equipment, Eq. 1 (effectiveness
    eps = m_s (x1 - x2) / (m_min (x1 - x3)), equation number from memory), and
    AHRI Standard 1060 rating of effectiveness at balanced flow.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from plantside.air.mixing import _enthalpy
from plantside.constants import CP_DRY_AIR, CP_WATER_VAPOR
from plantside.errors import check_range

__all__ = [
    "RecoveredAir",
    "recovery_fraction_for_mixed_drybulb",
    "recovery_leaving_state",
    "total_effectiveness",
]


class RecoveredAir(NamedTuple):
    """Outdoor air leaving an energy recovery device."""

    drybulb: np.ndarray  #: leaving dry bulb [°C]
    humidity_ratio: np.ndarray  #: leaving humidity ratio [kg/kg dry air]


def recovery_leaving_state(
    outdoor_drybulb,
    outdoor_humidity_ratio,
    exhaust_drybulb,
    exhaust_humidity_ratio,
    sensible_effectiveness,
    latent_effectiveness=0.0,
    fraction=1.0,
    *,
    check=True,
):
    r"""Outdoor air state leaving the recovery device (balanced flows).

    Parameters
    ----------
    outdoor_drybulb, exhaust_drybulb : array_like
        Dry bulb of outdoor and exhaust air entering the device [°C].
    outdoor_humidity_ratio, exhaust_humidity_ratio : array_like
        Humidity ratio of outdoor and exhaust air [kg/kg dry air].
    sensible_effectiveness : array_like
        Sensible effectiveness at balanced flow [-], 0 to 1.
    latent_effectiveness : array_like
        Latent (moisture) effectiveness at balanced flow [-], 0 to 1 (0 for a device
        that transfers no moisture).
    fraction : array_like
        Modulation [-], 0 (bypassed) to 1 (full).
    check : bool
        Validate inputs.

    Returns
    -------
    RecoveredAir
        ``drybulb`` [°C] and ``humidity_ratio`` [kg/kg dry air] of the outdoor air
        leaving the device (a named tuple).

    Notes
    -----
    .. math::

        t_2 = t_1 - f\, \varepsilon_s (t_1 - t_3), \qquad W_2 = W_1 - f\, \varepsilon_L (W_1 - W_3)

    References
    ----------
    ASHRAE Handbook HVAC Systems and Equipment 2020, Ch. 26, Eq. 1 (effectiveness
    definition) at balanced flow.

    Examples
    --------
    >>> air = recovery_leaving_state(-5.0, 0.002, 22.0, 0.007, 0.7, 0.6)
    >>> round(float(air.drybulb), 2), round(float(air.humidity_ratio), 4)
    (13.9, 0.005)
    """
    if check:
        check_range("sensible_effectiveness", sensible_effectiveness, 0.0, 1.0, "(fraction)")
        check_range("latent_effectiveness", latent_effectiveness, 0.0, 1.0, "(fraction)")
        check_range("fraction", fraction, 0.0, 1.0, "(fraction)")
    t1 = np.asarray(outdoor_drybulb, dtype=float)
    w1 = np.asarray(outdoor_humidity_ratio, dtype=float)
    t3 = np.asarray(exhaust_drybulb, dtype=float)
    w3 = np.asarray(exhaust_humidity_ratio, dtype=float)
    f = np.asarray(fraction, dtype=float)
    t2 = t1 - f * np.asarray(sensible_effectiveness, float) * (t1 - t3)
    w2 = w1 - f * np.asarray(latent_effectiveness, float) * (w1 - w3)
    return RecoveredAir(t2, w2)


def total_effectiveness(
    outdoor_drybulb,
    outdoor_humidity_ratio,
    exhaust_drybulb,
    exhaust_humidity_ratio,
    sensible_effectiveness,
    latent_effectiveness=0.0,
):
    r"""Total (enthalpy) effectiveness implied by sensible and latent effectiveness.

    Parameters
    ----------
    outdoor_drybulb, exhaust_drybulb : array_like
        Dry bulb [°C].
    outdoor_humidity_ratio, exhaust_humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    sensible_effectiveness, latent_effectiveness : array_like
        Effectiveness at balanced flow [-].

    Returns
    -------
    numpy.ndarray
        eps_t = (h1 - h2) / (h1 - h3) [-] (NaN where h1 = h3).

    Notes
    -----
    .. math::

        \varepsilon_t = \frac{h_1 - h_2}{h_1 - h_3}

    References
    ----------
    ASHRAE Handbook HVAC Systems and Equipment 2020, Ch. 26, Eq. 1 with x = enthalpy.

    Examples
    --------
    >>> round(float(total_effectiveness(-5.0, 0.002, 22.0, 0.007, 0.7, 0.6)), 3)
    0.667
    """
    t2, w2 = recovery_leaving_state(
        outdoor_drybulb,
        outdoor_humidity_ratio,
        exhaust_drybulb,
        exhaust_humidity_ratio,
        sensible_effectiveness,
        latent_effectiveness,
    )
    h1 = _enthalpy(np.asarray(outdoor_drybulb, float), np.asarray(outdoor_humidity_ratio, float))
    h3 = _enthalpy(np.asarray(exhaust_drybulb, float), np.asarray(exhaust_humidity_ratio, float))
    with np.errstate(divide="ignore", invalid="ignore"):
        return (h1 - _enthalpy(t2, w2)) / (h1 - h3)


def recovery_fraction_for_mixed_drybulb(
    target_drybulb,
    outdoor_fraction,
    outdoor_drybulb,
    outdoor_humidity_ratio,
    exhaust_drybulb,
    exhaust_humidity_ratio,
    return_drybulb,
    return_humidity_ratio,
    sensible_effectiveness,
    latent_effectiveness=0.0,
):
    """Recovery modulation that makes the mixed air reach a target dry bulb exactly.

    The outdoor air is recovered with modulation f, then mixed (mass basis, outdoor
    fraction x) with return air. With a = eps_s (t3 - t1), b = eps_L (W3 - W1) and
    c = 1.006 + 1.86 W, the condition t_mix = T is the quadratic A f² + B f + C = 0 with

        A = 1.86 x a b
        B = x [a c1 + 1.86 b (t1 - T)]
        C = x c1 t1 + (1 - x) c_r t_r - T (x c1 + (1 - x) c_r)

    (mass and energy balances of adiabatic mixing and Eq. 30 of ASHRAE Handbook
    Fundamentals 2017 Ch. 1; the 2501 W terms cancel). The root nearest the linear
    estimate -C/B is returned, unclipped.

    Parameters
    ----------
    target_drybulb : array_like
        Wanted mixed dry bulb [°C].
    outdoor_fraction : array_like
        Outdoor-air mass fraction of the mixture [-].
    outdoor_drybulb, exhaust_drybulb, return_drybulb : array_like
        Dry bulb [°C].
    outdoor_humidity_ratio, exhaust_humidity_ratio, return_humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].
    sensible_effectiveness, latent_effectiveness : array_like
        Effectiveness at balanced flow [-].

    Returns
    -------
    numpy.ndarray
        Modulation f [-] (NaN where the target cannot be reached by any f).
    """
    T = np.asarray(target_drybulb, dtype=float)
    x = np.asarray(outdoor_fraction, dtype=float)
    t1, w1 = np.asarray(outdoor_drybulb, float), np.asarray(outdoor_humidity_ratio, float)
    t3, w3 = np.asarray(exhaust_drybulb, float), np.asarray(exhaust_humidity_ratio, float)
    tr, wr = np.asarray(return_drybulb, float), np.asarray(return_humidity_ratio, float)
    if (
        np.ndim(latent_effectiveness) == 0
        and latent_effectiveness == 0.0
        and np.ndim(sensible_effectiveness) == 0
        and sensible_effectiveness > 0.0
    ):
        return _sensible_only_fraction(T, x, t1, w1, t3, tr, wr, float(sensible_effectiveness))
    a = np.asarray(sensible_effectiveness, float) * (t3 - t1)
    b = np.asarray(latent_effectiveness, float) * (w3 - w1)
    c1 = CP_DRY_AIR + CP_WATER_VAPOR * w1
    cr = CP_DRY_AIR + CP_WATER_VAPOR * wr
    A = CP_WATER_VAPOR * x * a * b
    B = x * (a * c1 + CP_WATER_VAPOR * b * (t1 - T))
    C = x * c1 * t1 + (1.0 - x) * cr * tr - T * (x * c1 + (1.0 - x) * cr)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        root = np.sqrt(B * B - 4.0 * A * C)
        # Stable form of the root that tends to -C/B as A -> 0.
        return -2.0 * C / (B + np.copysign(root, B))


def _sensible_only_fraction(T, x, t1, w1, t3, tr, wr, eps_s):
    """:func:`recovery_fraction_for_mixed_drybulb` without latent recovery (b = 0).

    Then A = 0 and the root is -C/B: the same numbers as the general form (whose
    denominator B + |B| sign(B) is 2B exactly, sqrt(B²) being |B| for finite inputs
    with |B| above 1e-154), in half the array operations.
    """
    c1 = CP_DRY_AIR + CP_WATER_VAPOR * w1
    B = x * ((eps_s * (t3 - t1)) * c1)
    x_c1 = x * c1
    y_cr = (1.0 - x) * (CP_DRY_AIR + CP_WATER_VAPOR * wr)
    C = x_c1 * t1 + y_cr * tr - T * (x_c1 + y_cr)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return -(C / B)
