"""Heat rejection: condenser heat, tower and dry-cooler sizing, tower fans, waterside economizer.

Condenser heat
    First law on the chiller: :math:`Q_{cond} = Q_{evap} + P` (compressor input; the
    motor of a hermetic machine is cooled by the refrigerant, common practice).
Tower sizing
    At the evaporation design wet bulb (:mod:`plantside.climate.design_conditions`,
    wet bulb at 0.4/1/2 %): leaving water = wet bulb + approach, entering = leaving +
    range, flow from the design condenser heat and the range
    (:func:`plantside.plant.water.water_flow_from_load`). The nominal "tower ton" is
    15,000 Btu/h of heat rejected (about 3 gpm at a 10 °F range; common practice, no
    source). Dry coolers: leaving fluid = design dry bulb + approach.
Tower fans
    Design fan power = design heat x ``fan_power_per_heat`` [kW/kW]; default 0.0127 kW/kW,
    which is 40.2 gpm/hp at 95 to 85 °F water and 75 °F wet bulb (ASHRAE 90.1-2019 Table
    6.8.1-7 minimum for axial-fan open towers; from memory). At part load the fan
    speed follows the share of design heat rejected (at a held approach the airflow scales
    roughly with the heat, common practice), power by the cube law, never below the
    minimum speed: :math:`p = \\max(q, n_{min})^3`.
Waterside economizer
    Tower water through a plate heat exchanger cools the chilled-water return to
    :math:`t_{pre} = t_{wb} + \\Delta t_{tower} + \\Delta t_{hx}`. It covers the whole load
    when :math:`t_{pre} \\le t_{chw,s}`; integrated with the chiller it covers the share
    :math:`(t_{chw,r} - t_{pre}) / (t_{chw,r} - t_{chw,s})` when
    :math:`t_{pre} < t_{chw,r}` (a held tower approach in free cooling, common practice).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.constants import W_PER_BTUH
from plantside.errors import check_range
from plantside.plant.water import water_flow_from_load

__all__ = [
    "DEFAULT_TOWER_FAN_POWER_PER_HEAT",
    "KW_PER_TOWER_TON",
    "HeatRejectionDesign",
    "WatersideEconomizer",
    "condenser_heat",
    "dry_cooler_design",
    "tower_design",
    "tower_fan_power",
    "waterside_economizer",
]

#: Heat of one nominal cooling-tower ton [kW]: 15,000 Btu/h (common practice, no source).
KW_PER_TOWER_TON = 15000.0 * W_PER_BTUH / 1000.0
#: Tower fan power per heat rejected at design [kW/kW]: 40.2 gpm/hp at a 10 °F range
#: (ASHRAE 90.1-2019 Table 6.8.1-7, axial-fan open towers; from memory).
DEFAULT_TOWER_FAN_POWER_PER_HEAT = 0.7457 / (40.2 * 500.0 * 10.0 * W_PER_BTUH / 1000.0)


def condenser_heat(cooling_load, input_power):
    """Heat the condenser rejects [kW].

    Parameters
    ----------
    cooling_load : float or array_like
        Evaporator load [kW], >= 0.
    input_power : float or array_like
        Compressor input [kW], >= 0.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`Q_{cond} = Q_{evap} + P` [kW].

    Examples
    --------
    >>> float(condenser_heat(1000.0, 170.0))
    1170.0
    """
    q = check_range("cooling_load", cooling_load, 0.0, None, "kW")
    p = check_range("input_power", input_power, 0.0, None, "kW")
    return _out(q + p)


@dataclass(frozen=True)
class HeatRejectionDesign:
    """A tower's or dry cooler's design point.

    Attributes
    ----------
    heat : float
        Design heat rejected [kW].
    entering_air : float
        Design wet bulb (tower) or dry bulb (dry cooler) [°C].
    leaving_water, entering_water : float
        Condenser water to and from the condenser [°C].
    flow : float
        Condenser water flow [m³/s].
    nominal_tons : float
        Heat in nominal tower tons (15,000 Btu/h each) [-].
    fan_power : float
        Design fan power [kW].
    """

    heat: float
    entering_air: float
    leaving_water: float
    entering_water: float
    flow: float
    nominal_tons: float
    fan_power: float


def tower_design(
    design_heat,
    design_wet_bulb,
    approach: float = 4.0,
    water_range: float = 5.6,
    fan_power_per_heat: float = DEFAULT_TOWER_FAN_POWER_PER_HEAT,
) -> HeatRejectionDesign:
    """Cooling tower design point at the evaporation design wet bulb.

    Parameters
    ----------
    design_heat : float
        Design condenser heat [kW], > 0.
    design_wet_bulb : float
        Evaporation design wet bulb [°C].
    approach : float
        Leaving water - wet bulb [K], 1 to 15.
    water_range : float
        Entering - leaving water [K], 1 to 20 (5.6 K = 10 °F).
    fan_power_per_heat : float
        Fan power per heat rejected [kW/kW], 0 to 0.1.

    Returns
    -------
    HeatRejectionDesign

    Notes
    -----
    :math:`t_{lw} = t_{wb} + a`, :math:`t_{ew} = t_{lw} + R`,
    :math:`\\dot V = Q / (\\rho c_p R)`.

    Examples
    --------
    >>> round(tower_design(1000.0, 24.0).nominal_tons, 1)
    227.5
    """
    heat = float(check_range("design_heat", design_heat, 0.0, None, "kW", low_inclusive=False))
    wb = float(check_range("design_wet_bulb", design_wet_bulb, -20.0, 40.0, "°C"))
    a = float(check_range("approach", approach, 1.0, 15.0, "K"))
    r = float(check_range("water_range", water_range, 1.0, 20.0, "K"))
    fan = float(check_range("fan_power_per_heat", fan_power_per_heat, 0.0, 0.1, "kW/kW"))
    leaving = wb + a
    flow = float(water_flow_from_load(heat, r, leaving + r / 2))
    return HeatRejectionDesign(
        heat, wb, leaving, leaving + r, flow, heat / KW_PER_TOWER_TON, heat * fan
    )


def dry_cooler_design(
    design_heat,
    design_drybulb,
    approach: float = 8.0,
    water_range: float = 5.6,
    fan_power_per_heat: float = 0.02,
) -> HeatRejectionDesign:
    """Dry cooler design point at the cooling design dry bulb.

    Parameters
    ----------
    design_heat : float
        Design heat [kW], > 0.
    design_drybulb : float
        Cooling design dry bulb [°C].
    approach : float
        Leaving fluid - entering air [K], 2 to 25.
    water_range : float
        Fluid range [K], 1 to 20.
    fan_power_per_heat : float
        Fan power per heat rejected [kW/kW], 0 to 0.1 (0.02, common practice, no source).

    Returns
    -------
    HeatRejectionDesign
        ``nominal_tons`` in tower tons for comparison.

    Examples
    --------
    >>> dry_cooler_design(1000.0, 35.0).leaving_water
    43.0
    """
    heat = float(check_range("design_heat", design_heat, 0.0, None, "kW", low_inclusive=False))
    db = float(check_range("design_drybulb", design_drybulb, -40.0, 60.0, "°C"))
    a = float(check_range("approach", approach, 2.0, 25.0, "K"))
    r = float(check_range("water_range", water_range, 1.0, 20.0, "K"))
    fan = float(check_range("fan_power_per_heat", fan_power_per_heat, 0.0, 0.1, "kW/kW"))
    leaving = db + a
    flow = float(water_flow_from_load(heat, r, min(leaving + r / 2, 150.0)))
    return HeatRejectionDesign(
        heat, db, leaving, leaving + r, flow, heat / KW_PER_TOWER_TON, heat * fan
    )


def tower_fan_power(heat, design_heat, design_fan_power, minimum_speed: float = 0.2):
    """Hourly tower fan power [kW].

    Parameters
    ----------
    heat : array_like
        Heat rejected each hour [kW], >= 0.
    design_heat : float
        Design heat [kW], > 0.
    design_fan_power : float
        Fan power at design [kW], >= 0.
    minimum_speed : float
        Lowest fan speed over design [-], 0 to 1 (0.2, common practice, no source).

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`P = P_d \\max(\\min(Q/Q_d, 1), n_{min})^3`, 0 with no heat.

    Examples
    --------
    >>> float(tower_fan_power(500.0, 1000.0, 12.0))
    1.5
    """
    q = check_range("heat", heat, 0.0, None, "kW")
    qd = float(check_range("design_heat", design_heat, 0.0, None, "kW", low_inclusive=False))
    pd_ = float(check_range("design_fan_power", design_fan_power, 0.0, None, "kW"))
    n_min = float(check_range("minimum_speed", minimum_speed, 0.0, 1.0, ""))
    speed = np.maximum(np.minimum(q / qd, 1.0), n_min)
    return _out(np.where(q > 0, pd_ * speed**3, 0.0))


@dataclass(frozen=True)
class WatersideEconomizer:
    """Hours of free cooling from tower water through a heat exchanger.

    Attributes
    ----------
    precooled_temperature : numpy.ndarray
        Chilled water leaving the exchanger's tower side would give [°C].
    fraction : numpy.ndarray
        Share of the load the economizer covers [-], 0 to 1.
    free_load : numpy.ndarray
        Load covered [kW].
    remaining_load : numpy.ndarray
        Load left to the chillers [kW].
    """

    precooled_temperature: np.ndarray
    fraction: np.ndarray
    free_load: np.ndarray
    remaining_load: np.ndarray

    def summary(self) -> dict:
        """Hours of full and partial free cooling, and the load covered [kWh]."""
        has_load = (self.free_load + self.remaining_load) > 0
        full = has_load & (self.fraction >= 1.0)
        partial = has_load & (self.fraction > 0) & (self.fraction < 1.0)
        return {
            "hours_full_free_cooling": int(full.sum()),
            "hours_partial_free_cooling": int(partial.sum()),
            "free_cooling_kWh": float(self.free_load.sum()),
            "remaining_load_kWh": float(self.remaining_load.sum()),
        }


def waterside_economizer(
    load,
    wet_bulb,
    supply_temperature,
    return_temperature,
    tower_approach: float = 4.0,
    exchanger_approach: float = 1.5,
    integrated: bool = True,
) -> WatersideEconomizer:
    """Free cooling from tower water through a heat exchanger, each hour.

    Parameters
    ----------
    load : array_like
        Chilled-water load [kW], >= 0.
    wet_bulb : array_like
        Outdoor wet bulb [°C].
    supply_temperature : float or array_like
        Chilled-water supply [°C].
    return_temperature : float or array_like
        Chilled-water return [°C], above the supply.
    tower_approach : float
        Tower leaving water - wet bulb in free cooling [K], 1 to 15.
    exchanger_approach : float
        Leaving chilled water - entering tower water at the exchanger [K], 0.5 to 10.
    integrated : bool
        True: the exchanger precools the return ahead of the chillers (partial hours
        count); False: only hours covered fully.

    Returns
    -------
    WatersideEconomizer

    Notes
    -----
    :math:`t_{pre} = t_{wb} + \\Delta t_t + \\Delta t_{hx}`;
    :math:`f = \\mathrm{clip}((t_r - t_{pre}) / (t_r - t_s), 0, 1)` (module notes).

    Examples
    --------
    >>> round(float(waterside_economizer(100.0, 4.0, 7.0, 13.0).fraction), 3)  # partly
    0.583
    """
    q = check_range("load", load, 0.0, None, "kW")
    wb = check_range("wet_bulb", wet_bulb, -60.0, 40.0, "°C")
    ts = check_range("supply_temperature", supply_temperature, 0.0, 25.0, "°C")
    tr = check_range("return_temperature", return_temperature, 0.0, 35.0, "°C")
    a_t = float(check_range("tower_approach", tower_approach, 1.0, 15.0, "K"))
    a_x = float(check_range("exchanger_approach", exchanger_approach, 0.5, 10.0, "K"))
    spread = np.maximum(tr - ts, 1e-9)
    precooled = wb + a_t + a_x
    fraction = np.clip((tr - precooled) / spread, 0.0, 1.0)
    if not integrated:
        fraction = np.where(fraction >= 1.0, 1.0, 0.0)
    fraction = np.where(q > 0, fraction, 0.0)
    free = q * fraction
    return WatersideEconomizer(_out(precooled), _out(fraction), _out(free), _out(q - free))
