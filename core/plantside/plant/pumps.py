"""Pumps: power from flow, head and efficiency; variable speed at part load; heat to the water.

Design power
    :math:`P = \\rho g \\dot V H / (\\eta_p \\eta_m)`, the hydraulic power over the pump
    (hydraulic) and motor-and-drive efficiencies (ASHRAE Handbook HVAC Systems and
    Equipment 2020 Ch. 44, pump power; from memory). The trade's form
    :math:`bhp = gpm \\cdot ft / (3960\\,\\eta_p)` is the same at 62.3 lb/ft³ (common
    practice).
Variable speed at part load (the form used here)
    The affinity laws on a system curve with a share :math:`s` of the design head held
    constant by the differential-pressure control (the "control head share"):
    :math:`H/H_d = s + (1 - s) q^2` at flow fraction :math:`q`. At constant pump, motor and
    drive efficiency the power fraction is

    .. math:: p(q) = q \\left[s + (1 - s) q^2\\right]

    (:math:`s = 0` is the cube law). Below the minimum speed :math:`n_{min}` the pump turns
    at minimum speed and the extra flow is bypassed, so :math:`p = p(n_{min})`, taking the
    flow fraction at minimum speed as :math:`n_{min}` (the affinity law
    :math:`q \\propto n` on a pure friction system; with a control head it is a little
    less, so this is slightly generous to the pump). The form and the defaults (a share
    of 0.25, a minimum speed of 0.3) are common practice, no source.
Heat added to the water
    All shaft power ends as heat in the water (first law; the motor and drive losses
    go to the room): :math:`\\dot Q_w = \\rho g \\dot V H / \\eta_p`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.constants import STANDARD_GRAVITY
from plantside.errors import check_range
from plantside.plant.water import water_density

__all__ = [
    "DEFAULT_CONTROL_HEAD_SHARE",
    "DEFAULT_MINIMUM_SPEED",
    "PumpSettings",
    "pump_heat_to_water",
    "pump_power",
    "pump_power_fraction_from_flow_fraction",
]

#: Share of the design head held constant at part load [-] (common practice, no source).
DEFAULT_CONTROL_HEAD_SHARE = 0.25
#: Lowest pump speed over design speed [-] (common practice, no source).
DEFAULT_MINIMUM_SPEED = 0.3


def pump_power(flow, head, pump_efficiency, motor_efficiency=1.0, temperature=10.0):
    """Electrical input power of a pump [kW].

    Parameters
    ----------
    flow : float or array_like
        Volume flow [m³/s], >= 0.
    head : float or array_like
        Pump head [m of water], >= 0.
    pump_efficiency : float
        Pump (hydraulic) efficiency [-], above 0 to 1.
    motor_efficiency : float
        Motor and drive efficiency [-], above 0 to 1 (1: ``pump_efficiency`` is already
        the wire-to-water efficiency).
    temperature : float
        Water temperature [°C] for the density, 0 to 150.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Input power [kW].

    Notes
    -----
    .. math:: P = \\frac{\\rho\\, g\\, \\dot V\\, H}{\\eta_p\\, \\eta_m}

    Examples
    --------
    >>> round(float(pump_power(0.063, 30.48, 0.75)), 1)  # 1000 gpm, 100 ft
    25.1
    """
    v = check_range("flow", flow, 0.0, None, "m³/s")
    h = check_range("head", head, 0.0, 500.0, "m")
    eta_p = check_range("pump_efficiency", pump_efficiency, 0.0, 1.0, "", low_inclusive=False)
    eta_m = check_range("motor_efficiency", motor_efficiency, 0.0, 1.0, "", low_inclusive=False)
    rho = water_density(temperature)
    return _out(rho * STANDARD_GRAVITY * v * h / (eta_p * eta_m) / 1000.0)


def pump_heat_to_water(flow, head, pump_efficiency, temperature=10.0):
    """Heat a pump adds to the water it moves [kW] (its shaft power).

    Parameters
    ----------
    flow, head, pump_efficiency, temperature
        As for :func:`pump_power`.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Heat [kW]: :math:`\\rho g \\dot V H / \\eta_p`.

    Examples
    --------
    >>> round(float(pump_heat_to_water(0.063, 30.48, 0.75)), 1)
    25.1
    """
    return pump_power(flow, head, pump_efficiency, 1.0, temperature)


def pump_power_fraction_from_flow_fraction(
    flow_fraction,
    control_head_share=DEFAULT_CONTROL_HEAD_SHARE,
    minimum_speed=DEFAULT_MINIMUM_SPEED,
):
    """Part-load power of a variable-speed pump over its design power [-].

    Parameters
    ----------
    flow_fraction : float or array_like
        Flow over design flow [-], 0 to 1.5.
    control_head_share : float
        Share of the design head held constant [-], 0 to 1 (0: cube law).
    minimum_speed : float
        Lowest speed over design speed [-], 0 to 1.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Power fraction [-], 0 where the flow is 0 (pump off).

    Notes
    -----
    Affinity laws with a control-head share (see module notes):

    .. math:: p(q) = q' \\left[s + (1 - s) q'^2\\right], \\quad q' = \\max(q, n_{min})

    Examples
    --------
    >>> round(float(pump_power_fraction_from_flow_fraction(0.5, 0.25, 0.3)), 4)
    0.2188
    """
    q = check_range("flow_fraction", flow_fraction, 0.0, 1.5, "")
    s = float(check_range("control_head_share", control_head_share, 0.0, 1.0, ""))
    n_min = float(check_range("minimum_speed", minimum_speed, 0.0, 1.0, ""))
    q_run = np.maximum(q, n_min)
    return _out(np.where(q > 0, q_run * (s + (1.0 - s) * q_run**2), 0.0))


@dataclass(frozen=True)
class PumpSettings:
    """A variable- or constant-speed pump set (SI).

    Attributes
    ----------
    head : float
        Design head [m of water], 0 to 200.
    pump_efficiency, motor_efficiency : float
        Hydraulic and motor-and-drive efficiencies [-], above 0 to 1.
    control_head_share, minimum_speed : float
        Part-load form (:func:`plantside.plant.pumps.pump_power_fraction_from_flow_fraction`).
    """

    head: float = 30.0
    pump_efficiency: float = 0.75
    motor_efficiency: float = 0.9
    control_head_share: float = DEFAULT_CONTROL_HEAD_SHARE
    minimum_speed: float = DEFAULT_MINIMUM_SPEED

    def __post_init__(self):
        check_range("head", self.head, 0.0, 200.0, "m")
        check_range("pump_efficiency", self.pump_efficiency, 0.0, 1.0, "", low_inclusive=False)
        check_range("motor_efficiency", self.motor_efficiency, 0.0, 1.0, "", low_inclusive=False)
        check_range("control_head_share", self.control_head_share, 0.0, 1.0, "")
        check_range("minimum_speed", self.minimum_speed, 0.0, 1.0, "")
