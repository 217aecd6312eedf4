"""Adiabatic mixing of two moist-air streams on a mass (dry-air) basis.

Mixing conserves dry air, water and energy, so the mixed humidity ratio and
enthalpy are the dry-air-mass-weighted means of the two streams [1]. The mixed
dry bulb follows from the mixed enthalpy and humidity ratio (Eq. 30 of [1]); it
is close to, but not exactly, the mass-weighted mean of the dry bulbs, and never
the volume-weighted mean (the trade's quick method, off by the density ratio of
the streams).

Units: dry bulb [°C], humidity ratio [kg/kg dry air], enthalpy [kJ/kg dry air],
mass flow [kg dry air/s], outdoor-air fraction [-] on a dry-air mass basis.

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 1, Psychrometrics,
    section "Adiabatic Mixing of Two Moist Airstreams" (its balances, cited by section;
    the equation numbers are not confirmed): m1 h1 + m2 h2 = m3 h3,
    m1 W1 + m2 W2 = m3 W3, m1 + m2 = m3.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from plantside.constants import CP_DRY_AIR, CP_WATER_VAPOR, LATENT_HEAT_0C
from plantside.errors import check_range

__all__ = [
    "MixedState",
    "mixed_state",
    "mixed_state_from_flows",
    "outdoor_fraction_for_mixed_drybulb",
]


class MixedState(NamedTuple):
    """State of a mixture of two moist-air streams."""

    drybulb: np.ndarray  #: mixed dry bulb [°C]
    humidity_ratio: np.ndarray  #: mixed humidity ratio [kg/kg dry air]
    enthalpy: np.ndarray  #: mixed enthalpy [kJ/kg dry air]


def _enthalpy(t, w):
    # Eq. 30 of ASHRAE Handbook Fundamentals 2017 Ch. 1 (kept inline for speed).
    return CP_DRY_AIR * t + w * (LATENT_HEAT_0C + CP_WATER_VAPOR * t)


def _mix(x, t_o, w_o, t_r, w_r):
    h_o = _enthalpy(t_o, w_o)
    h_r = _enthalpy(t_r, w_r)
    w = w_r + x * (w_o - w_r)
    h = h_r + x * (h_o - h_r)
    t = (h - LATENT_HEAT_0C * w) / (CP_DRY_AIR + CP_WATER_VAPOR * w)
    return MixedState(t, w, h)


def mixed_state(
    outdoor_fraction,
    outdoor_drybulb,
    outdoor_humidity_ratio,
    return_drybulb,
    return_humidity_ratio,
    *,
    check=True,
):
    r"""State of a mixture of outdoor and return air.

    Parameters
    ----------
    outdoor_fraction : array_like
        Outdoor air share of the mixed dry-air mass flow [-], 0 to 1.
    outdoor_drybulb, return_drybulb : array_like
        Dry bulb of the two streams [°C].
    outdoor_humidity_ratio, return_humidity_ratio : array_like
        Humidity ratio of the two streams [kg/kg dry air].
    check : bool
        Validate the inputs (default True).

    Returns
    -------
    MixedState
        ``drybulb`` [°C], ``humidity_ratio`` [kg/kg dry air], ``enthalpy`` [kJ/kg dry air]
        of the mixture (a named tuple: unpacks as before).

    Notes
    -----
    .. math::

        W_3 = W_2 + x (W_1 - W_2), \qquad h_3 = h_2 + x (h_1 - h_2),

        t_3 = \frac{h_3 - 2501\, W_3}{1.006 + 1.86\, W_3}

    with x the outdoor-air fraction, 1 the outdoor and 2 the return stream.

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, adiabatic mixing (mass and energy
    balances) and Eq. 30 for the dry bulb.

    Examples
    --------
    >>> mix = mixed_state(0.3, 32.0, 0.018, 24.0, 0.0093)
    >>> round(float(mix.drybulb), 2), round(float(mix.humidity_ratio), 5)
    (26.43, 0.01191)
    """
    x = np.asarray(outdoor_fraction, dtype=float)
    arrays = [np.asarray(v, dtype=float) for v in (outdoor_drybulb, outdoor_humidity_ratio)]
    arrays += [np.asarray(v, dtype=float) for v in (return_drybulb, return_humidity_ratio)]
    if check:
        check_range("outdoor_fraction", x, 0.0, 1.0, "(fraction)")
        check_range("outdoor_drybulb", arrays[0], -100.0, 200.0, "°C")
        check_range("outdoor_humidity_ratio", arrays[1], 0.0, 1.0, "kg/kg")
        check_range("return_drybulb", arrays[2], -100.0, 200.0, "°C")
        check_range("return_humidity_ratio", arrays[3], 0.0, 1.0, "kg/kg")
    return _mix(x, *arrays)


def mixed_state_from_flows(
    mass_flow_1, drybulb_1, humidity_ratio_1, mass_flow_2, drybulb_2, humidity_ratio_2
):
    r"""State of the mixture of two streams given their dry-air mass flows.

    Parameters
    ----------
    mass_flow_1, mass_flow_2 : array_like
        Dry-air mass flow of each stream [kg/s], >= 0, not both zero.
    drybulb_1, drybulb_2 : array_like
        Dry bulb [°C].
    humidity_ratio_1, humidity_ratio_2 : array_like
        Humidity ratio [kg/kg dry air].

    Returns
    -------
    MixedState
        ``drybulb`` [°C], ``humidity_ratio`` [kg/kg dry air], ``enthalpy`` [kJ/kg dry air]
        of the mixture (a named tuple: unpacks as before).

    Notes
    -----
    .. math::

        x = \frac{\dot m_1}{\dot m_1 + \dot m_2}, \quad W_3 = W_2 + x (W_1 - W_2),
        \quad h_3 = h_2 + x (h_1 - h_2)

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, adiabatic mixing of two moist airstreams.

    Examples
    --------
    >>> mix = mixed_state_from_flows(2.0, 32.0, 0.018, 6.0, 24.0, 0.0093)
    >>> round(float(mix.enthalpy), 2)  # kJ/kg: (2 x 78.27 + 6 x 47.82) / 8
    55.43
    """
    m1 = check_range("mass_flow_1", mass_flow_1, 0.0, None, "kg/s")
    m2 = check_range("mass_flow_2", mass_flow_2, 0.0, None, "kg/s")
    total = m1 + m2
    check_range("mass_flow_1 + mass_flow_2", total, 0.0, None, "kg/s", low_inclusive=False)
    return mixed_state(m1 / total, drybulb_1, humidity_ratio_1, drybulb_2, humidity_ratio_2)


def outdoor_fraction_for_mixed_drybulb(
    target_drybulb, outdoor_drybulb, outdoor_humidity_ratio, return_drybulb, return_humidity_ratio
):
    r"""Outdoor-air mass fraction that gives a mixed dry bulb exactly equal to a target.

    Humidity ratio and enthalpy of the mixture are linear in the fraction x, so the
    condition t3 (1.006 + 1.86 W3) = h3 - 2501 W3 is linear in x and solved in closed form.

    Parameters
    ----------
    target_drybulb : array_like
        Wanted mixed dry bulb [°C].
    outdoor_drybulb, return_drybulb : array_like
        Dry bulb of the outdoor and return streams [°C].
    outdoor_humidity_ratio, return_humidity_ratio : array_like
        Humidity ratio of the two streams [kg/kg dry air].

    Returns
    -------
    numpy.ndarray
        Fraction x [-], unclipped (outside 0..1 when the target is outside the two
        dry bulbs; NaN when the two streams have the same dry bulb and the target differs).

    Notes
    -----
    .. math::

        x = \frac{h_2 - 2501\, W_2 - t^* (1.006 + 1.86\, W_2)}
                 {(2501 + 1.86\, t^*)(W_1 - W_2) - (h_1 - h_2)}

    From the mixing balances and Eq. 30 of ASHRAE Handbook Fundamentals 2017 Ch. 1.

    Examples
    --------
    >>> round(float(outdoor_fraction_for_mixed_drybulb(13.0, 5.0, 0.004, 24.0, 0.0093)), 4)
    0.5813
    """
    ts = np.asarray(target_drybulb, dtype=float)
    t_o, w_o = np.asarray(outdoor_drybulb, float), np.asarray(outdoor_humidity_ratio, float)
    t_r, w_r = np.asarray(return_drybulb, float), np.asarray(return_humidity_ratio, float)
    h_o, h_r = _enthalpy(t_o, w_o), _enthalpy(t_r, w_r)
    numerator = h_r - LATENT_HEAT_0C * w_r - ts * (CP_DRY_AIR + CP_WATER_VAPOR * w_r)
    denominator = (LATENT_HEAT_0C + CP_WATER_VAPOR * ts) * (w_o - w_r) - (h_o - h_r)
    with np.errstate(divide="ignore", invalid="ignore"):
        return numerator / denominator
