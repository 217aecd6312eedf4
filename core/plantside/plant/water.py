"""Chilled and hot water: flow from load and ΔT, part-load ΔT, reset, flow-limited machines.

Everything works on whole arrays of hours; temperatures [°C], temperature
differences [K], loads [kW], volume flows [m³/s].

Water properties
    Density from Kell's equation for air-free water at 101.325 kPa [1] (0-150 °C),
    taken at the mean of supply and return temperature. Specific heat held at
    4.186 kJ/(kg K) (:data:`plantside.constants.CP_LIQUID_WATER`, ASHRAE Handbook
    Fundamentals 2017 Ch. 1 Eq. 33 [2]); between 3 and 95 °C the true value lies within
    0.6 % of it (CoolProp, checked in ``tests/test_water.py``).
The trade's quick forms
    :math:`gpm = 24\\,tons/\\Delta T_{°F}` and :math:`Q_{Btu/h} = 500\\,gpm\\,\\Delta T_{°F}`
    assume 8.33 lb/gal and 1 Btu/(lb °F) (common practice, no source); the functions
    here agree with them within about 0.5 % for chilled and hot water.
Part-load ΔT
    A coil's ΔT as a piecewise-linear function of its part-load ratio given by the
    user (a table of points), constant (the design ΔT) by default. A falling ΔT is the
    "low ΔT syndrome": the plant then carries more flow per kW than it was designed for.
Flow-limited machines
    Each machine passes at most its primary flow limit [m³/s]. The number of machines
    needed for flow is the smallest n whose combined limits reach the hour's flow; hours
    where it exceeds the number needed for load are the hours the plant runs another
    machine for flow, not for load.

References
----------
[1] Kell, G. S., 1975. J. Chem. Eng. Data 20(1), 97-105, Eq. 16.
[2] ASHRAE, 2017. ASHRAE Handbook - Fundamentals (SI), Chapter 1, Eq. 33.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.constants import (
    CP_LIQUID_WATER,
    KELL_DENSITY_DENOMINATOR,
    KELL_DENSITY_NUMERATOR,
)
from plantside.errors import InputRangeError, check_range

__all__ = [
    "AdpCheck",
    "FlowLimitedMachines",
    "apparatus_dew_point_check",
    "coil_delta_t_from_part_load_ratio",
    "hot_water_supply_temperature_from_outdoor",
    "load_from_water_flow",
    "machines_for_flow",
    "return_temperature_from_load",
    "water_density",
    "water_flow_from_load",
]


def water_density(temperature):
    """Density of liquid water at 101.325 kPa [kg/m³].

    Parameters
    ----------
    temperature : float or array_like
        Water temperature [°C], 0 to 150.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Density [kg/m³].

    Notes
    -----
    Kell (1975), Eq. 16 [1]:

    .. math::
        \\rho = \\frac{a_0 + a_1 t + a_2 t^2 + a_3 t^3 + a_4 t^4 + a_5 t^5}{1 + b t}

    Examples
    --------
    >>> round(float(water_density(10.0)), 2)
    999.7
    """
    t = check_range("temperature", temperature, 0.0, 150.0, "°C")
    a = KELL_DENSITY_NUMERATOR
    numerator = a[0] + t * (a[1] + t * (a[2] + t * (a[3] + t * (a[4] + t * a[5]))))
    return _out(numerator / (1.0 + KELL_DENSITY_DENOMINATOR * t))


def water_flow_from_load(load, delta_t, temperature=10.0):
    """Water volume flow that carries a load at a temperature difference [m³/s].

    Parameters
    ----------
    load : float or array_like
        Heat carried [kW], >= 0 (cooling or heating magnitude).
    delta_t : float or array_like
        Supply-return temperature difference [K], > 0.
    temperature : float or array_like
        Mean water temperature [°C] for the density, 0 to 150 (default 10 °C,
        chilled water).

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Volume flow [m³/s], broadcast shape of the inputs.

    Notes
    -----
    .. math:: \\dot V = \\frac{Q}{\\rho\\, c_p\\, \\Delta T}

    with :math:`c_p` = 4.186 kJ/(kg K) (Fundamentals 2017 Ch. 1 Eq. 33) and
    :math:`\\rho` from :func:`water_density`.

    Examples
    --------
    >>> round(float(water_flow_from_load(351.7, 5.556)) * 1000, 2)  # 100 tons at 10 °F
    15.13
    """
    q = check_range("load", load, 0.0, None, "kW")
    dt = check_range("delta_t", delta_t, 0.0, None, "K", low_inclusive=False)
    rho = water_density(temperature)
    return _out(q / (rho * CP_LIQUID_WATER * dt))


def load_from_water_flow(flow, delta_t, temperature=10.0):
    """Heat carried by a water flow at a temperature difference [kW].

    Parameters
    ----------
    flow : float or array_like
        Volume flow [m³/s], >= 0.
    delta_t : float or array_like
        Temperature difference [K], >= 0.
    temperature : float or array_like
        Mean water temperature [°C], 0 to 150.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Heat [kW]: :math:`Q = \\rho\\, c_p\\, \\dot V\\, \\Delta T`.

    Examples
    --------
    >>> round(float(load_from_water_flow(0.01512, 5.556)), 1)  # 100 tons
    351.5
    """
    v = check_range("flow", flow, 0.0, None, "m³/s")
    dt = check_range("delta_t", delta_t, 0.0, None, "K")
    return _out(water_density(temperature) * CP_LIQUID_WATER * v * dt)


def return_temperature_from_load(supply_temperature, load, flow, heating: bool = True):
    """Return water temperature from the supply temperature, load and flow [°C].

    Parameters
    ----------
    supply_temperature : float or array_like
        Supply water temperature [°C], 0 to 150.
    load : float or array_like
        Heat delivered to the coils (heating) or taken from them (cooling) [kW], >= 0.
    flow : float or array_like
        Volume flow [m³/s], > 0 where the load is above 0.
    heating : bool
        True: the water returns cooler (hot water). False: warmer (chilled water).

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Return temperature [°C]; the supply temperature where the load is 0.

    Notes
    -----
    .. math:: t_r = t_s \\mp \\frac{Q}{\\rho(t_s)\\, c_p\\, \\dot V}

    (density at the supply temperature; the error against the mean temperature is
    below 0.2 % for a 20 K hot-water ΔT).

    Examples
    --------
    >>> round(float(return_temperature_from_load(70.0, 100.0, 0.0012)), 1)
    49.6
    """
    ts = check_range("supply_temperature", supply_temperature, 0.0, 150.0, "°C")
    q = check_range("load", load, 0.0, None, "kW")
    v = check_range("flow", flow, 0.0, None, "m³/s")
    if np.any((np.broadcast_to(v, np.broadcast_shapes(v.shape, q.shape)) == 0) & (q > 0)):
        raise InputRangeError("flow", "flow is 0 m³/s in an hour with load", "> 0 m³/s")
    with np.errstate(divide="ignore", invalid="ignore"):
        dt = np.where(q > 0, q / (water_density(ts) * CP_LIQUID_WATER * np.maximum(v, 1e-300)), 0.0)
    return _out(ts - dt if heating else ts + dt)


def coil_delta_t_from_part_load_ratio(
    part_load_ratio, design_delta_t, load_ratio_points=(0.0, 1.0), delta_t_ratio_points=(1.0, 1.0)
):
    """Coil water ΔT at part load from a user relation (constant by default) [K].

    Parameters
    ----------
    part_load_ratio : float or array_like
        Load over design load [-], >= 0 (clipped to the table's ends).
    design_delta_t : float
        Design supply-return ΔT [K], > 0.
    load_ratio_points : sequence of float
        Part-load ratios [-] of the relation's points, increasing, 0 to 1.
    delta_t_ratio_points : sequence of float
        ΔT over design ΔT [-] at those points, > 0 (e.g. ``(0.6, 1.0)`` at
        ``(0.0, 1.0)``: ΔT falls to 60 % of design towards no load).

    Returns
    -------
    numpy.float64 or numpy.ndarray
        ΔT [K]; piecewise linear between the points (a user relation, no source).

    Notes
    -----
    .. math:: \\Delta T(x) = \\Delta T_d \\, r(x), \\quad r \\text{ linear between points}

    Examples
    --------
    >>> round(float(coil_delta_t_from_part_load_ratio(0.5, 6.0, (0.0, 1.0), (0.6, 1.0))), 3)
    4.8
    """
    x = check_range("part_load_ratio", part_load_ratio, 0.0, None, "")
    dt = float(check_range("design_delta_t", design_delta_t, 0.0, 60.0, "K", low_inclusive=False))
    xs = check_range("load_ratio_points", np.atleast_1d(load_ratio_points), 0.0, 1.0, "")
    rs = check_range(
        "delta_t_ratio_points",
        np.atleast_1d(delta_t_ratio_points),
        0.0,
        2.0,
        "",
        low_inclusive=False,
    )
    if xs.shape != rs.shape or xs.size < 1 or np.any(np.diff(xs) <= 0):
        raise InputRangeError(
            "load_ratio_points",
            f"load_ratio_points must increase and match delta_t_ratio_points "
            f"({xs.size} and {rs.size} values)",
            "increasing part-load ratios 0-1, one ΔT ratio each",
        )
    return _out(dt * np.interp(x, xs, rs))


def hot_water_supply_temperature_from_outdoor(
    outdoor_drybulb, design_outdoor, design_supply, mild_outdoor, mild_supply
):
    """Hot-water supply temperature on an outdoor reset schedule [°C].

    Parameters
    ----------
    outdoor_drybulb : float or array_like
        Outdoor dry bulb [°C].
    design_outdoor, design_supply : float
        Outdoor dry bulb [°C] at which the supply is at its design value [°C].
    mild_outdoor, mild_supply : float
        Outdoor dry bulb [°C], above ``design_outdoor``, at and above which the supply
        is held at its lowest value [°C], <= ``design_supply``.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Supply temperature [°C]: linear between the two points, held beyond them
        (a straight-line reset, common practice, no source).

    Notes
    -----
    .. math::
        t_s = t_{s,d} - (t_{s,d} - t_{s,m})
              \\,\\mathrm{clip}\\!\\left(\\frac{t_o - t_{o,d}}{t_{o,m} - t_{o,d}}, 0, 1\\right)

    Examples
    --------
    >>> float(hot_water_supply_temperature_from_outdoor(5.0, -10.0, 70.0, 20.0, 40.0))
    55.0
    """
    to = check_range("outdoor_drybulb", outdoor_drybulb, -90.0, 70.0, "°C")
    d_out = float(check_range("design_outdoor", design_outdoor, -90.0, 40.0, "°C"))
    d_sup = float(check_range("design_supply", design_supply, 20.0, 150.0, "°C"))
    m_out = float(check_range("mild_outdoor", mild_outdoor, d_out, 40.0, "°C", low_inclusive=False))
    m_sup = float(check_range("mild_supply", mild_supply, 20.0, d_sup, "°C"))
    fraction = np.clip((to - d_out) / (m_out - d_out), 0.0, 1.0)
    return _out(d_sup - (d_sup - m_sup) * fraction)


@dataclass(frozen=True)
class FlowLimitedMachines:
    """Machines needed each hour for load and for flow.

    Attributes
    ----------
    for_load : numpy.ndarray of int
        Smallest number of machines (start order) whose capacities reach the load.
    for_flow : numpy.ndarray of int
        Smallest number whose primary flow limits reach the flow.
    running : numpy.ndarray of int
        The larger of the two (capped at the number of machines).
    extra_for_flow : numpy.ndarray of bool
        Hours with more machines needed for flow than for load (low ΔT).
    """

    for_load: np.ndarray
    for_flow: np.ndarray
    running: np.ndarray
    extra_for_flow: np.ndarray

    @property
    def hours_extra_for_flow(self) -> int:
        """Hours in which another machine runs for flow, not for load [h]."""
        return int(self.extra_for_flow.sum())


def _count_to_reach(cumulative, values):
    n = np.searchsorted(cumulative, values, side="left") + 1
    return np.where(values > 0, np.minimum(n, cumulative.size), 0)


def machines_for_flow(loads, flows, capacities, flow_limits) -> FlowLimitedMachines:
    """Machines needed for the load and for the flow in each hour.

    Parameters
    ----------
    loads : array_like
        Hourly plant load [kW], >= 0.
    flows : array_like
        Hourly plant water flow [m³/s], >= 0.
    capacities : sequence of float
        Machine capacities [kW], > 0, in start order.
    flow_limits : float or sequence of float
        Largest flow through each machine's evaporator (primary flow limit) [m³/s], > 0.

    Returns
    -------
    FlowLimitedMachines

    Notes
    -----
    :math:`n_Q = \\min\\{n : \\sum_{j \\le n} c_j \\ge Q\\}`,
    :math:`n_V = \\min\\{n : \\sum_{j \\le n} \\dot V_{max,j} \\ge \\dot V\\}`.

    Examples
    --------
    >>> machines_for_flow([300.0], [0.03], [500.0, 500.0], 0.02).hours_extra_for_flow
    1
    """
    q = check_range("loads", np.atleast_1d(loads), 0.0, None, "kW")
    v = check_range("flows", np.atleast_1d(flows), 0.0, None, "m³/s")
    caps = check_range(
        "capacities", np.atleast_1d(capacities), 0.0, None, "kW", low_inclusive=False
    )
    limits = np.atleast_1d(
        check_range("flow_limits", flow_limits, 0.0, None, "m³/s", low_inclusive=False)
    )
    limits = np.broadcast_to(limits, caps.shape) if limits.size == 1 else limits
    if limits.shape != caps.shape:
        raise InputRangeError(
            "flow_limits",
            f"flow_limits has {limits.size} values but there are {caps.size} machines",
            f"one value, or {caps.size} values",
        )
    for_load = _count_to_reach(np.cumsum(caps), q)
    for_flow = _count_to_reach(np.cumsum(limits), v)
    running = np.maximum(for_load, for_flow)
    return FlowLimitedMachines(for_load, for_flow, running, for_flow > for_load)


@dataclass(frozen=True)
class AdpCheck:
    """Each cooling coil's apparatus dew point against the chilled water it gets.

    Attributes
    ----------
    coldest_water_needed : numpy.ndarray
        Apparatus dew point - coil approach [°C]: the warmest supply that serves the coil.
    shortfall : numpy.ndarray
        How much colder the water would have to be [K], 0 if the plant's water serves.
    """

    units: tuple[str, ...]
    coldest_water_needed: np.ndarray
    shortfall: np.ndarray

    def cautions(self) -> list[str]:
        """One caution per coil that needs colder water than the plant makes (°C, K)."""
        return [
            f"{unit}: its apparatus dew point needs chilled water at "
            f"{needed:.1f} °C or colder, {short:.1f} K below the plant's supply temperature."
            for unit, needed, short in zip(
                self.units, self.coldest_water_needed, self.shortfall, strict=True
            )
            if short > 0
        ]


def apparatus_dew_point_check(units, apparatus_dew_points, supply_temperature, coil_approach):
    """Check each coil's apparatus dew point against the chilled-water supply.

    Parameters
    ----------
    units : sequence of str
        Air-handler names.
    apparatus_dew_points : array_like
        Required apparatus dew point of each cooling coil [°C].
    supply_temperature : float
        Chilled-water supply temperature [°C], 0 to 20.
    coil_approach : float
        Apparatus dew point minus entering water temperature a coil can reach [K],
        0 to 15 (about 2-4 K, common practice, no source).

    Returns
    -------
    AdpCheck

    Notes
    -----
    .. math:: \\text{shortfall} = \\max(t_{chw,s} + \\Delta t_{approach} - t_{adp}, 0)

    Examples
    --------
    >>> float(apparatus_dew_point_check(["AHU-1"], [8.0], 6.7, 3.0).shortfall[0])
    1.7
    """
    adp = np.atleast_1d(
        check_range("apparatus_dew_points", apparatus_dew_points, -20.0, 40.0, "°C")
    )
    ts = float(check_range("supply_temperature", supply_temperature, 0.0, 20.0, "°C"))
    approach = float(check_range("coil_approach", coil_approach, 0.0, 15.0, "K"))
    names = tuple(str(u) for u in units)
    if len(names) != adp.size:
        raise InputRangeError(
            "units", f"{len(names)} unit names for {adp.size} apparatus dew points", "one each"
        )
    needed = adp - approach
    return AdpCheck(names, needed, np.round(np.maximum(ts - needed, 0.0), 9))
