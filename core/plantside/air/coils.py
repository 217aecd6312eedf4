"""Cooling and heating coils on the air side, vectorised.

Cooling coil leaving humidity (three ways to state the coil):

- **bypass factor** BF (a coil property: rows, fin spacing, face velocity). The
  leaving state lies on the straight line from the entering state to the
  apparatus dew point (ADP) on the saturation curve, a fraction BF of the way
  back from the ADP: t2 = BF t1 + (1 - BF) t_adp, W2 = BF W1 + (1 - BF) W_adp.
  With the leaving dry bulb fixed by the supply set point, the ADP follows:
  t_adp = (t2 - BF t1) / (1 - BF).
- **apparatus dew point** fixed (coil surface held by the chilled water): the bypass
  factor of each hour follows, BF = (t2 - t_adp) / (t1 - t_adp).
- **leaving dew point limit**: the coil dries the air to a stated dew point,
  W2 = min(W1, Ws(t_dp)).

In all three the coil is *dry* when the entering humidity ratio is at or below the
humidity ratio of the ADP (or of the leaving dew point): then W2 = W1. The leaving
state is never supersaturated: W2 <= Ws(t2) (mist condenses on the coil).

The bypass-factor / ADP description is common practice in air-conditioning design
(no single normative source; see e.g. the "contact factor" in textbooks); the
energy and mass balances are those of ASHRAE Handbook Fundamentals [1].

Coil loads (kW, dry-air mass flow m in kg/s):

    total      = m [(h1 - h2) - (W1 - W2) h_w2]                     Ch. 1 of [1]
    sensible   = m (1.006 + 1.86 W2) (t1 - t2)
    latent     = total - sensible
               = m (W1 - W2) (2501 + 1.86 t1 - h_w2)
    condensate = m (W1 - W2)  [kg/s],  h_w2 = 4.186 t2 [kJ/kg] (liquid water at the
    leaving dry bulb, as in the handbook's cooling-and-dehumidifying example).

The sensible/latent split is exact (it sums to the total), from Eq. 30 of [1].

References
----------
[1] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 1, Psychrometrics:
    Eq. 30 (enthalpy), "Moist Air Sensible Heating or Cooling" and "Moist Air
    Cooling and Dehumidification" (q = m_da [(h1 - h2) - (W1 - W2) h_w2]).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from plantside.air.moist_air import saturation_humidity_ratio
from plantside.constants import CP_DRY_AIR, CP_LIQUID_WATER, CP_WATER_VAPOR, LATENT_HEAT_0C
from plantside.errors import InputRangeError, check_range

__all__ = [
    "CoilLeavingState",
    "CoilLoad",
    "apparatus_dew_point_from_bypass_factor",
    "bypass_factor_from_apparatus_dew_point",
    "cooling_coil_leaving_humidity_ratio",
    "cooling_coil_load",
    "heating_coil_load",
]


class CoilLoad(NamedTuple):
    """Cooling coil load components."""

    total: np.ndarray  #: total (refrigeration) load [kW]
    sensible: np.ndarray  #: sensible load [kW]
    latent: np.ndarray  #: latent load [kW]
    condensate: np.ndarray  #: condensate rate [kg/s]
    condensate_heat: np.ndarray  #: enthalpy leaving with the condensate [kW]


class CoilLeavingState(NamedTuple):
    """Leaving humidity of a cooling coil and the coil process that gives it."""

    humidity_ratio: np.ndarray  #: leaving humidity ratio [kg/kg dry air]
    apparatus_dew_point: np.ndarray  #: apparatus (or leaving) dew point [°C]; NaN when dry
    bypass_factor: np.ndarray  #: bypass factor [-]; NaN when dry or for a dew-point limit
    wet: np.ndarray  #: True where moisture condenses


def apparatus_dew_point_from_bypass_factor(entering_drybulb, leaving_drybulb, bypass_factor):
    r"""Apparatus dew point from the dry bulbs and the bypass factor.

    Parameters
    ----------
    entering_drybulb, leaving_drybulb : array_like
        Coil entering and leaving dry bulb [°C].
    bypass_factor : array_like
        Bypass factor [-], 0 <= BF < 1.

    Returns
    -------
    numpy.ndarray
        t_adp = (t2 - BF t1) / (1 - BF) [°C].

    Notes
    -----
    .. math::

        t_{adp} = \frac{t_2 - BF\, t_1}{1 - BF}

    Examples
    --------
    >>> round(float(apparatus_dew_point_from_bypass_factor(26.7, 13.0, 0.1)), 2)
    11.48
    """
    bf = check_range("bypass_factor", bypass_factor, 0.0, 1.0, "(fraction)", high_inclusive=False)
    t1 = np.asarray(entering_drybulb, dtype=float)
    t2 = np.asarray(leaving_drybulb, dtype=float)
    return (t2 - bf * t1) / (1.0 - bf)


def bypass_factor_from_apparatus_dew_point(entering_drybulb, leaving_drybulb, apparatus_dew_point):
    r"""Bypass factor from the dry bulbs and the apparatus dew point.

    Parameters
    ----------
    entering_drybulb, leaving_drybulb : array_like
        Coil entering and leaving dry bulb [°C].
    apparatus_dew_point : array_like
        Apparatus dew point [°C], below the leaving dry bulb.

    Returns
    -------
    numpy.ndarray
        BF = (t2 - t_adp) / (t1 - t_adp) [-] (NaN where t1 = t_adp).

    Notes
    -----
    .. math::

        BF = \frac{t_2 - t_{adp}}{t_1 - t_{adp}}

    Examples
    --------
    >>> round(float(bypass_factor_from_apparatus_dew_point(26.7, 13.0, 11.5)), 4)
    0.0987
    """
    t1 = np.asarray(entering_drybulb, dtype=float)
    t2 = np.asarray(leaving_drybulb, dtype=float)
    adp = np.asarray(apparatus_dew_point, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return (t2 - adp) / (t1 - adp)


def cooling_coil_leaving_humidity_ratio(
    entering_drybulb,
    entering_humidity_ratio,
    leaving_drybulb,
    pressure,
    *,
    bypass_factor=None,
    apparatus_dew_point=None,
    leaving_dew_point=None,
):
    r"""Leaving humidity ratio of a cooling coil (wet or dry).

    Give exactly one of ``bypass_factor``, ``apparatus_dew_point`` and
    ``leaving_dew_point``.

    Parameters
    ----------
    entering_drybulb : array_like
        Entering dry bulb [°C].
    entering_humidity_ratio : array_like
        Entering humidity ratio [kg/kg dry air].
    leaving_drybulb : array_like
        Leaving dry bulb [°C], at or below the entering dry bulb.
    pressure : array_like
        Pressure [Pa].
    bypass_factor : array_like, optional
        Bypass factor [-], 0 <= BF < 1.
    apparatus_dew_point : array_like, optional
        Apparatus dew point [°C], below the leaving dry bulb.
    leaving_dew_point : array_like, optional
        Leaving dew point limit [°C], at or below the leaving dry bulb.

    Returns
    -------
    CoilLeavingState
        Named tuple of ``humidity_ratio``, the leaving humidity ratio [kg/kg dry air];
        ``apparatus_dew_point`` [°C] (the leaving dew point for the dew-point model;
        NaN where the coil is dry); ``bypass_factor`` [-] (NaN for the dew-point model
        and where the coil is dry); ``wet`` (bool, True where moisture condenses).

    Notes
    -----
    .. math::

        W_2 = \min\left(BF\, W_1 + (1 - BF)\, W_s(t_{adp}),\ W_s(t_2)\right)
        \ \text{where } W_1 > W_s(t_{adp}), \text{ else } W_2 = W_1

    References
    ----------
    Bypass-factor line of condition: common practice. Saturation humidity ratio:
    ASHRAE Handbook Fundamentals 2017 Ch. 1, Eq. 20 at saturation.

    Examples
    --------
    >>> coil = cooling_coil_leaving_humidity_ratio(26.7, 0.0112, 13.0, 101325.0, bypass_factor=0.1)
    >>> round(float(coil.humidity_ratio), 5), round(float(coil.apparatus_dew_point), 2)
    (0.00871, 11.48)
    """
    given = [v is not None for v in (bypass_factor, apparatus_dew_point, leaving_dew_point)]
    if sum(given) != 1:
        raise InputRangeError(
            "coil_model",
            "give exactly one of bypass_factor, apparatus_dew_point, leaving_dew_point",
            "one of bypass_factor, apparatus_dew_point, leaving_dew_point",
        )
    t1 = check_range("entering_drybulb", entering_drybulb, -100.0, 200.0, "°C")
    w1 = check_range("entering_humidity_ratio", entering_humidity_ratio, 0.0, 1.0, "kg/kg")
    t2 = check_range("leaving_drybulb", leaving_drybulb, -100.0, 200.0, "°C")
    p = np.asarray(pressure, dtype=float)
    cooling = t1 > t2
    ws2 = saturation_humidity_ratio(t2, p)
    if leaving_dew_point is not None:
        tdp = check_range("leaving_dew_point", leaving_dew_point, -60.0, 60.0, "°C")
        if np.any(tdp > t2 + 1e-9):
            raise InputRangeError(
                "leaving_dew_point",
                "leaving_dew_point is above the leaving dry bulb; the coil cannot produce "
                "supersaturated air; allowed up to the leaving dry bulb",
                "up to the leaving dry bulb",
            )
        w_adp = saturation_humidity_ratio(tdp, p)
        wet = cooling & (w1 > w_adp)
        w2 = np.where(wet, np.minimum(w_adp, ws2), w1)
        adp = np.where(wet, tdp, np.nan)
        return CoilLeavingState(w2, adp, np.full(np.shape(w2), np.nan), wet)
    if bypass_factor is not None:
        bf = check_range(
            "bypass_factor", bypass_factor, 0.0, 1.0, "(fraction)", high_inclusive=False
        )
        adp = (t2 - bf * t1) / (1.0 - bf)
    else:
        adp = check_range("apparatus_dew_point", apparatus_dew_point, -60.0, 60.0, "°C")
        if np.any(cooling & (adp >= t2)):
            raise InputRangeError(
                "apparatus_dew_point",
                "apparatus_dew_point is at or above the leaving dry bulb; a coil cannot cool "
                "air below its apparatus dew point; allowed below the leaving dry bulb",
                "below the leaving dry bulb",
            )
        with np.errstate(divide="ignore", invalid="ignore"):
            bf = np.where(cooling, (t2 - adp) / (t1 - adp), np.nan)
    w_adp = saturation_humidity_ratio(np.clip(adp, -100.0, 200.0), p, check=False)
    wet = cooling & (w1 > w_adp)
    w_line = bf * w1 + (1.0 - bf) * w_adp
    w2 = np.where(wet, np.minimum(w_line, ws2), w1)
    return CoilLeavingState(
        w2,
        np.where(wet, adp, np.nan),
        np.where(wet, bf, np.nan),
        np.broadcast_to(wet, np.shape(w2)),
    )


def cooling_coil_load(
    mass_flow,
    entering_drybulb,
    entering_humidity_ratio,
    leaving_drybulb,
    leaving_humidity_ratio,
    condensate_temperature=None,
):
    r"""Total, sensible and latent load of a cooling coil and its condensate.

    Parameters
    ----------
    mass_flow : array_like
        Dry-air mass flow [kg/s], >= 0.
    entering_drybulb, leaving_drybulb : array_like
        Dry bulb [°C].
    entering_humidity_ratio, leaving_humidity_ratio : array_like
        Humidity ratio [kg/kg dry air]; leaving not above entering.
    condensate_temperature : array_like, optional
        Temperature of the condensate leaving the coil [°C]; defaults to the leaving
        dry bulb.

    Returns
    -------
    CoilLoad
        total, sensible, latent [kW], condensate [kg/s], condensate_heat [kW].

    Notes
    -----
    .. math::

        q_t = \dot m \left[(h_1 - h_2) - (W_1 - W_2)\, h_{w2}\right], \quad
        q_s = \dot m\, (1.006 + 1.86\, W_2)(t_1 - t_2), \quad q_L = q_t - q_s

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, "Moist Air Cooling and Dehumidification":
    q = m_da [(h1 - h2) - (W1 - W2) h_w2], with h from Eq. 30.

    Examples
    --------
    >>> load = cooling_coil_load(10.0, 26.7, 0.0112, 13.0, 0.0086)
    >>> round(float(load.total), 1), round(float(load.sensible), 1)  # kW
    (204.9, 140.0)
    """
    m = check_range("mass_flow", mass_flow, 0.0, None, "kg/s")
    t1, w1 = np.asarray(entering_drybulb, float), np.asarray(entering_humidity_ratio, float)
    t2, w2 = np.asarray(leaving_drybulb, float), np.asarray(leaving_humidity_ratio, float)
    tw = t2 if condensate_temperature is None else np.asarray(condensate_temperature, float)
    return _cooling_coil_load(m, t1, w1, t2, w2, tw)


def _cooling_coil_load(m, t1, w1, t2, w2, tw):
    dw = w1 - w2
    condensate = m * dw
    condensate_heat = condensate * CP_LIQUID_WATER * tw
    sensible = m * (CP_DRY_AIR + CP_WATER_VAPOR * w2) * (t1 - t2)
    latent = condensate * (LATENT_HEAT_0C + CP_WATER_VAPOR * t1) - condensate_heat
    return CoilLoad(sensible + latent, sensible, latent, condensate, condensate_heat)


def heating_coil_load(mass_flow, entering_drybulb, leaving_drybulb, humidity_ratio):
    r"""Load of a heating coil (sensible heating at constant humidity ratio).

    Parameters
    ----------
    mass_flow : array_like
        Dry-air mass flow [kg/s], >= 0.
    entering_drybulb, leaving_drybulb : array_like
        Dry bulb [°C].
    humidity_ratio : array_like
        Humidity ratio [kg/kg dry air].

    Returns
    -------
    numpy.ndarray
        q = m (1.006 + 1.86 W)(t2 - t1) = m (h2 - h1) [kW].

    Notes
    -----
    .. math::

        q = \dot m\, (1.006 + 1.86\, W)(t_2 - t_1)

    References
    ----------
    ASHRAE Handbook Fundamentals 2017, Ch. 1, "Moist Air Sensible Heating or Cooling"
    with Eq. 30.

    Examples
    --------
    >>> round(float(heating_coil_load(10.0, 5.0, 30.0, 0.004)), 2)  # kW
    253.36
    """
    m = check_range("mass_flow", mass_flow, 0.0, None, "kg/s")
    w = np.asarray(humidity_ratio, dtype=float)
    t1, t2 = np.asarray(entering_drybulb, float), np.asarray(leaving_drybulb, float)
    return m * (CP_DRY_AIR + CP_WATER_VAPOR * w) * (t2 - t1)
