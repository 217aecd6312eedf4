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
    "DewPointCoilProcess",
    "RunaroundExchange",
    "apparatus_dew_point_from_bypass_factor",
    "bypass_factor_from_apparatus_dew_point",
    "cooling_coil_leaving_humidity_ratio",
    "cooling_coil_load",
    "dew_point_coil_process",
    "heating_coil_load",
    "runaround_exchange",
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


class DewPointCoilProcess(NamedTuple):
    """A coil holding a leaving humidity ratio, on its own process line."""

    leaving_drybulb: np.ndarray  #: coil leaving dry bulb [°C]
    apparatus_dew_point: np.ndarray  #: apparatus dew point [°C]


def dew_point_coil_process(
    entering_drybulb, entering_humidity_ratio, leaving_humidity_ratio, bypass_factor, pressure
):
    r"""Leaving dry bulb of a coil that dries the air to a leaving humidity ratio.

    The coil leaves on the straight line from the entering state to the saturated
    state at its apparatus dew point, a fraction BF (the bypass factor) of the way back
    from the apparatus dew point. Holding the leaving humidity ratio fixes the apparatus
    dew point, and the line then fixes the leaving dry bulb:

    .. math::

        W_s(t_{adp}) = \frac{W_2 - BF\,W_1}{1 - BF}, \qquad
        t_2 = BF\,t_1 + (1 - BF)\,t_{adp}

    Parameters
    ----------
    entering_drybulb : array_like
        Entering dry bulb [°C].
    entering_humidity_ratio : array_like
        Entering humidity ratio [kg/kg dry air].
    leaving_humidity_ratio : array_like
        Leaving humidity ratio held by the coil [kg/kg dry air], below the entering one.
    bypass_factor : array_like
        Bypass factor [-], 0 <= BF < 1.
    pressure : array_like
        Pressure [Pa].

    Returns
    -------
    DewPointCoilProcess
        ``leaving_drybulb`` [°C] and ``apparatus_dew_point`` [°C]. Where the coil could not
        reach the leaving humidity ratio with this bypass factor (BF W1 >= W2) the
        apparatus dew point is that of 1e-6 kg/kg (about -60 °C at sea level), so the
        caller's apparatus-dew-point limit flags the hour.

    Notes
    -----
    The bypass-factor line is common practice (no single normative source). The
    apparatus dew point is the dew point of W_s(t_adp): ASHRAE Handbook Fundamentals
    2017 Ch. 1, Eq. 20 (vapour pressure from W) and Eqs. 37-38 (dew point).

    Examples
    --------
    >>> process = dew_point_coil_process(30.0, 0.015, 0.0076, 0.1, 101325.0)
    >>> round(float(process.leaving_drybulb), 1), round(float(process.apparatus_dew_point), 1)
    (10.4, 8.3)
    """
    from plantside.air.moist_air import dew_point_from_humidity_ratio

    bf = check_range("bypass_factor", bypass_factor, 0.0, 1.0, "(fraction)", high_inclusive=False)
    t1 = np.asarray(entering_drybulb, dtype=float)
    w1 = np.asarray(entering_humidity_ratio, dtype=float)
    w2 = np.asarray(leaving_humidity_ratio, dtype=float)
    w_adp = np.maximum((w2 - bf * w1) / (1.0 - bf), 1e-6)
    t_adp = dew_point_from_humidity_ratio(w_adp, pressure, check=False)
    return DewPointCoilProcess(bf * t1 + (1.0 - bf) * t_adp, t_adp)


class RunaroundExchange(NamedTuple):
    """Heat moved by a passive sensible exchanger around a cooling coil."""

    heat: np.ndarray  #: heat moved from the entering to the leaving air [kW]
    coil_entering_drybulb: np.ndarray  #: dry bulb entering the coil, pre-cooled [°C]
    coil_leaving_drybulb: np.ndarray  #: dry bulb leaving the coil [°C]
    reheated_drybulb: np.ndarray  #: dry bulb after the exchanger's reheat side [°C]


def runaround_exchange(
    mass_flow,
    entering_drybulb,
    entering_humidity_ratio,
    entering_dew_point,
    leaving_humidity_ratio,
    leaving_dew_point,
    apparatus_dew_point,
    bypass_factor,
    reheat_limit_drybulb,
    effectiveness,
):
    r"""A passive sensible exchanger (run-around loop or heat pipe) around a cooling coil.

    The exchanger pre-cools the air entering the coil and gives the same heat to the
    air leaving it. With capacity rates C_1 = m c_p(W_1) (entering) and
    C_2 = m c_p(W_2) (leaving, the smaller), effectiveness eps on C_2, and the coil on
    its process line t_2 = BF t_1' + (1 - BF) t_adp (t_adp fixed by the leaving
    humidity, so pre-cooling moves only the dry bulbs), the heat is the smallest of

    .. math::

        Q_\epsilon = \frac{\epsilon C_2 (t_1 - t_{2,0})}{1 - \epsilon BF C_2 / C_1},\quad
        Q_{lim} = \frac{t_{lim} - t_{2,0}}{1/C_2 - BF/C_1},\quad
        Q_{dp} = C_1 (t_1 - t_{dp,1})

    (full effectiveness; modulated so the reheated air does not pass ``t_lim``, the
    supply set point; pre-cooling stopped at the entering dew point, the exchanger being
    sensible only), and not below 0. t_{2,0} = BF t_1 + (1 - BF) t_adp is the coil
    leaving dry bulb without the exchanger. Where the line would leave the air
    supersaturated (t_2 below the leaving dew point t_{dp,2}), the leaving state is
    capped at saturation, t_2 = t_{dp,2}, and the first two limits become
    eps C_2 (t_1 - t_{dp,2}) and C_2 (t_lim - t_{dp,2}) (the smaller of each pair
    holds). Then t_1' = t_1 - Q/C_1, t_2 = max(BF t_1' + (1 - BF) t_adp, t_{dp,2}) and
    the reheated dry bulb t_2 + Q/C_2. With eps = 0 this is the coil alone.

    Parameters
    ----------
    mass_flow : array_like
        Dry-air mass flow [kg/s].
    entering_drybulb, entering_humidity_ratio, entering_dew_point : array_like
        State entering the exchanger's pre-cool side [°C, kg/kg dry air, °C].
    leaving_humidity_ratio : array_like
        Coil leaving humidity ratio [kg/kg dry air].
    leaving_dew_point : array_like
        Dew point of the coil leaving air [°C] (the lowest leaving dry bulb).
    apparatus_dew_point : array_like
        The coil's apparatus dew point [°C].
    bypass_factor : array_like
        The coil's bypass factor [-].
    reheat_limit_drybulb : array_like
        Highest dry bulb of the reheated air (the supply set point) [°C].
    effectiveness : float
        Sensible effectiveness on the smaller capacity rate [-], 0 to 1.

    Returns
    -------
    RunaroundExchange
        ``heat`` [kW] and the three dry bulbs [°C].

    Notes
    -----
    Effectiveness of a sensible exchanger, Q = eps C_min (t_hot,in - t_cold,in):
    ASHRAE Handbook HVAC Systems and Equipment 2020, Ch. 26 (air-to-air energy
    recovery; run-around coil loops and heat pipes). Enthalpy: ASHRAE Handbook
    Fundamentals 2017 Ch. 1, Eq. 30.

    Examples
    --------
    >>> x = runaround_exchange(1.0, 30.0, 0.015, 20.3, 0.0076, 10.0, 8.3, 0.1, 13.0, 0.5)
    >>> round(float(x.heat), 2), round(float(x.reheated_drybulb), 1)
    (2.86, 13.0)
    """
    m = np.asarray(mass_flow, dtype=float)
    t1 = np.asarray(entering_drybulb, dtype=float)
    bf = np.asarray(bypass_factor, dtype=float)
    c1 = CP_DRY_AIR + CP_WATER_VAPOR * np.asarray(entering_humidity_ratio, dtype=float)
    c2 = CP_DRY_AIR + CP_WATER_VAPOR * np.asarray(leaving_humidity_ratio, dtype=float)
    t_adp = np.asarray(apparatus_dew_point, dtype=float)
    t_lim = np.asarray(reheat_limit_drybulb, dtype=float)
    t2_min = np.asarray(leaving_dew_point, dtype=float)
    t20 = bf * t1 + (1.0 - bf) * t_adp
    # heat per kg of dry air [kJ/kg]
    q_eps = effectiveness * c2 * (t1 - t20) / (1.0 - effectiveness * bf * c2 / c1)
    q_eps = np.minimum(q_eps, effectiveness * c2 * (t1 - t2_min))
    q_lim = np.minimum((t_lim - t20) / (1.0 / c2 - bf / c1), c2 * (t_lim - t2_min))
    q_dp = c1 * (t1 - np.asarray(entering_dew_point, dtype=float))
    q = np.maximum(np.minimum(np.minimum(q_eps, q_lim), q_dp), 0.0)
    t1_cooled = t1 - q / c1
    t2 = np.maximum(bf * t1_cooled + (1.0 - bf) * t_adp, t2_min)
    return RunaroundExchange(m * q, t1_cooled, t2, t2 + q / c2)
