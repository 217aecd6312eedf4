"""A chilled-water plant's year against the site's weather (arrays in, tables out).

Each hour, on whole arrays (weather as arrays; this layer knows nothing of climate files):

1. Coil part-load ratio :math:`x = Q_{coil} / Q_{design}`; coil ΔT from the part-load
   relation; chilled-water flow :math:`\\dot V = Q_{coil} / (\\rho c_p \\Delta T(x))`;
   return = supply + ΔT.
2. Chilled-water pump: design power from design flow and head, variable speed at part
   load (:mod:`plantside.plant.pumps`); its shaft power is heat added to the loop, so the
   chillers carry :math:`Q_{coil} + Q_{pump}` (this replaces the fixed distribution
   percentage when pumps are given).
3. Optional waterside economizer (water-cooled only) takes its share first
   (:func:`plantside.plant.heat_rejection.waterside_economizer`).
4. Entering condenser temperature from the weather
   (:func:`plantside.plant.chillers.condenser_entering_temperature`).
5. Staging (:func:`plantside.plant.efficient_staging.stage_on_efficiency`) on the load in
   rated terms (load / CAPFT), with the staging fraction, the power rule and the machines
   needed for the primary flow limit.
6. Chiller input (:func:`plantside.plant.chillers.chiller_hours`), condenser heat = load +
   input, condenser-water pumps (one per running chiller at its design flow, constant
   speed), tower fans (cube law on the share of design heat).

The condenser water of a chiller and its pump are sized at the chiller's rated condenser
heat, :math:`C (1 + 1/COP_{ref})`, over the tower range.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import partial

import numpy as np
import pandas as pd

from plantside.errors import InputRangeError, check_choice, check_range
from plantside.plant.chillers import (
    CONDENSER_TYPES,
    ChillerCurves,
    chiller_hours,
    condenser_entering_temperature,
)
from plantside.plant.efficient_staging import EfficientStaging, stage_on_efficiency
from plantside.plant.heat_rejection import (
    DEFAULT_TOWER_FAN_POWER_PER_HEAT,
    condenser_heat,
    tower_fan_power,
    waterside_economizer,
)
from plantside.plant.loads import hourly_loads
from plantside.plant.pumps import (
    PumpSettings,
    pump_power,
    pump_power_fraction_from_flow_fraction,
)
from plantside.plant.water import (
    coil_delta_t_from_part_load_ratio,
    machines_for_flow,
    water_flow_from_load,
)

__all__ = [
    "ChilledWaterSettings",
    "ChillerPlantYear",
    "CondenserSettings",
    "chiller_plant_year",
]


@dataclass(frozen=True)
class ChilledWaterSettings:
    """Chilled-water loop of a plant (SI).

    Attributes
    ----------
    supply_temperature : float
        Chilled-water supply [°C], 1 to 20 (6.7 °C = 44 °F).
    design_delta_t : float
        Design return - supply [K], 1 to 20 (5.6 K = 10 °F).
    load_ratio_points, delta_t_ratio_points : tuple of float
        Part-load ΔT relation (:func:`plantside.plant.water.coil_delta_t_from_part_load_ratio`);
        constant by default.
    flow_limit_fraction : float or None
        Primary flow limit of each chiller as a share of its own design flow [-], 1 to 2;
        None: no flow limit.
    coil_approach : float
        Apparatus dew point - entering water a coil reaches [K], 0 to 15 (3 K, common
        practice, no source).
    """

    supply_temperature: float = 6.7
    design_delta_t: float = 5.6
    load_ratio_points: tuple[float, ...] = (0.0, 1.0)
    delta_t_ratio_points: tuple[float, ...] = (1.0, 1.0)
    flow_limit_fraction: float | None = None
    coil_approach: float = 3.0

    def __post_init__(self):
        check_range("supply_temperature", self.supply_temperature, 1.0, 20.0, "°C")
        check_range("design_delta_t", self.design_delta_t, 1.0, 20.0, "K")
        check_range("coil_approach", self.coil_approach, 0.0, 15.0, "K")
        if self.flow_limit_fraction is not None:
            check_range("flow_limit_fraction", self.flow_limit_fraction, 1.0, 2.0, "")
        coil_delta_t_from_part_load_ratio(
            0.5, self.design_delta_t, self.load_ratio_points, self.delta_t_ratio_points
        )


@dataclass(frozen=True)
class CondenserSettings:
    """Condenser side of a chiller plant (SI).

    Attributes
    ----------
    condenser : {"water", "air"}
    tower_approach, tower_range : float
        Tower leaving water - wet bulb, and water range [K].
    condenser_water_floor : float
        Lowest condenser water [°C].
    fan_power_per_heat : float
        Tower fan power per heat rejected at design [kW/kW].
    fan_minimum_speed : float
        Lowest fan speed [-].
    pump : PumpSettings
        Condenser-water pump per chiller (constant speed; water-cooled only).
    waterside_economizer : bool
        Tower water through a heat exchanger ahead of the chillers (water-cooled only).
    exchanger_approach : float
        Heat exchanger approach [K].
    """

    condenser: str = "water"
    tower_approach: float = 4.0
    tower_range: float = 5.6
    condenser_water_floor: float = 18.0
    fan_power_per_heat: float = DEFAULT_TOWER_FAN_POWER_PER_HEAT
    fan_minimum_speed: float = 0.2
    pump: PumpSettings = field(default_factory=lambda: PumpSettings(head=20.0))
    waterside_economizer: bool = False
    exchanger_approach: float = 1.5

    def __post_init__(self):
        check_choice("condenser", self.condenser, CONDENSER_TYPES)
        check_range("tower_approach", self.tower_approach, 1.0, 15.0, "K")
        check_range("tower_range", self.tower_range, 1.0, 20.0, "K")
        check_range("condenser_water_floor", self.condenser_water_floor, 5.0, 30.0, "°C")
        check_range("fan_power_per_heat", self.fan_power_per_heat, 0.0, 0.1, "kW/kW")
        check_range("fan_minimum_speed", self.fan_minimum_speed, 0.0, 1.0, "")
        check_range("exchanger_approach", self.exchanger_approach, 0.5, 10.0, "K")
        if self.waterside_economizer and self.condenser != "water":
            raise InputRangeError(
                "waterside_economizer",
                "waterside_economizer needs a water-cooled condenser (cooling tower)",
                "condenser = water",
            )


@dataclass(frozen=True, eq=False)
class ChillerPlantYear:
    """Hourly water side of a chiller plant and its year's figures.

    Attributes
    ----------
    hourly : pandas.DataFrame
        One row per hour; columns named with their SI unit (see :func:`chiller_plant_year`).
    staging : EfficientStaging
        The staging, with hours per stage and starts.
    design : dict
        Design flows [m³/s], pump powers [kW], condenser heat [kW].
    chiller_energy_without_economizer : float
        Chiller input over the year without the waterside economizer [kWh] (equal to the
        chiller energy when there is none).
    """

    hourly: pd.DataFrame
    staging: EfficientStaging
    design: dict
    chiller_energy_without_economizer: float

    def summary(self) -> dict:
        """The year's energies [kWh], seasonal COPs [kW/kW] and hour counts."""
        h = self.hourly
        cooling = float(h["coil_load_kW"].sum())
        chiller = float(h["chiller_input_kW"].sum())
        pumps = float(h["chilled_water_pump_kW"].sum() + h["condenser_water_pump_kW"].sum())
        tower = float(h["tower_fan_kW"].sum())
        total = chiller + pumps + tower
        stage = self.staging.summary()
        return {
            "cooling_kWh": cooling,
            "chiller_kWh": chiller,
            "chilled_water_pump_kWh": float(h["chilled_water_pump_kW"].sum()),
            "condenser_water_pump_kWh": float(h["condenser_water_pump_kW"].sum()),
            "pump_kWh": pumps,
            "tower_fan_kWh": tower,
            "plant_kWh": total,
            "pump_heat_kWh": float(h["pump_heat_kW"].sum()),
            "free_cooling_kWh": float(h["free_cooling_kW"].sum()),
            "free_cooling_hours": int((h["free_cooling_kW"] > 0).sum()),
            "economizer_chiller_kWh_saved": self.chiller_energy_without_economizer - chiller,
            "condenser_heat_kWh": float(h["condenser_heat_kW"].sum()),
            "seasonal_chiller_cop": cooling / chiller if chiller > 0 else float("nan"),
            "seasonal_plant_cop": cooling / total if total > 0 else float("nan"),
            "machine_starts": stage["machine_starts"],
            "hours_extra_for_flow": stage["hours_extra_for_flow"],
            "hours_extra_for_efficiency": stage["hours_extra_for_efficiency"],
            "hours_extra_for_fraction": stage["hours_extra_for_fraction"],
            "unmet_hours": stage["unmet_hours"],
        }


def _hours(name, values, size):
    arr = np.asarray(values, dtype=float)
    arr = np.broadcast_to(arr, (size,)) if arr.ndim == 0 else arr
    if arr.shape != (size,):
        raise InputRangeError(name, f"{name} has {arr.size} hours; the loads have {size}", "")
    return arr


def _stage_and_run(
    load, t_chw, t_cond, capacities, turndown, curves, fraction, for_flow, power_rule
):
    capft = np.maximum(np.asarray(curves.capacity_ratio(t_chw, t_cond), float), 1e-6)
    rated_load = load / capft

    def input_power(q, c):
        plr = np.minimum(q / c, 1.0)
        return (
            c
            / curves.reference_cop
            * curves.input_power_ratio(plr, t_chw, np.asarray(t_cond)[:, None])
        )

    staging = stage_on_efficiency(
        rated_load,
        capacities,
        turndown,
        staging_fraction=fraction,
        input_power=input_power if power_rule else None,
        minimum_machines=for_flow,
        no_load_threshold=0.0,
    )
    n = staging.staging.machines_running
    running_capacity = np.where(n > 0, np.cumsum(capacities)[np.maximum(n - 1, 0)], 0.0)
    served_load = np.where(n > 0, load, 0.0)
    return staging, chiller_hours(served_load, running_capacity, t_chw, t_cond, curves)


def chiller_plant_year(
    coil_loads,
    wet_bulb,
    drybulb,
    capacities,
    curves: ChillerCurves,
    minimum_turndown=0.15,
    chilled_water: ChilledWaterSettings | None = None,
    pumps: PumpSettings | None = None,
    condenser: CondenserSettings | None = None,
    staging_fraction: float = 1.0,
    power_rule: bool = True,
    design_load: float | None = None,
) -> ChillerPlantYear:
    """Run a chiller plant over the year's hours (module notes).

    Parameters
    ----------
    coil_loads : array_like
        Hourly sum of the cooling coil loads [kW], >= 0 (no distribution percentage).
    wet_bulb, drybulb : array_like
        Outdoor wet bulb and dry bulb each hour [°C].
    capacities : sequence of float
        Rated chiller capacities [kW], start order.
    curves : ChillerCurves
        The option's curves (same for each machine).
    minimum_turndown : float or sequence of float
        As for staging.
    chilled_water, pumps, condenser : settings, optional
        Defaults of each dataclass when omitted.
    staging_fraction : float
        Share of running capacity at which the next machine starts [-].
    power_rule : bool
        Start another machine when n + 1 use less compressor power than n.
    design_load : float, optional
        Design coil load [kW] for the design flow; default the year's peak coil load.

    Returns
    -------
    ChillerPlantYear
        ``hourly`` columns: ``coil_load_kW``, ``chilled_water_flow_m3s``,
        ``chilled_water_return_C``, ``pump_heat_kW``, ``free_cooling_kW``,
        ``chiller_load_kW``, ``condenser_entering_C``, ``machines_running``,
        ``part_load_ratio``, ``chiller_input_kW``, ``condenser_heat_kW``,
        ``chilled_water_pump_kW``, ``condenser_water_pump_kW``, ``tower_fan_kW``,
        ``unmet_kW``.
    """
    q_coil = hourly_loads(coil_loads)
    size = q_coil.size
    wb = _hours("wet_bulb", wet_bulb, size)
    db = _hours("drybulb", drybulb, size)
    chw = chilled_water or ChilledWaterSettings()
    pump = pumps or PumpSettings()
    cond = condenser or CondenserSettings(condenser=curves.condenser)
    if cond.condenser != curves.condenser:
        raise InputRangeError(
            "condenser",
            f"condenser = {cond.condenser!r} but the curves are for {curves.condenser!r}",
            curves.condenser,
        )
    caps = np.atleast_1d(np.asarray(capacities, dtype=float))
    peak = float(q_coil.max()) if design_load is None else float(design_load)
    check_range("design_load", peak, 0.0, None, "kW", low_inclusive=False)
    t_s = chw.supply_temperature
    mean_t = t_s + chw.design_delta_t / 2

    # 1-2. flow, return, chilled-water pump and its heat
    x = q_coil / peak
    delta_t = coil_delta_t_from_part_load_ratio(
        x, chw.design_delta_t, chw.load_ratio_points, chw.delta_t_ratio_points
    )
    flow = water_flow_from_load(q_coil, delta_t, mean_t)
    design_flow = float(water_flow_from_load(peak, chw.design_delta_t, mean_t))
    design_pump = float(
        pump_power(design_flow, pump.head, pump.pump_efficiency, pump.motor_efficiency, mean_t)
    )
    fraction = pump_power_fraction_from_flow_fraction(
        np.minimum(flow / design_flow, 1.5), pump.control_head_share, pump.minimum_speed
    )
    chw_pump = design_pump * fraction
    pump_heat = chw_pump * pump.motor_efficiency
    load = q_coil + pump_heat
    t_return = t_s + delta_t

    # 3. waterside economizer, 4. condenser
    if cond.waterside_economizer:
        economizer = waterside_economizer(
            load, wb, t_s, t_return, cond.tower_approach, cond.exchanger_approach
        )
        free, chiller_load = economizer.free_load, economizer.remaining_load
    else:
        free, chiller_load = np.zeros(size), load
    t_cond = np.asarray(
        condenser_entering_temperature(
            cond.condenser, wb, db, cond.tower_approach, cond.condenser_water_floor
        ),
        dtype=float,
    )
    t_cond = np.broadcast_to(t_cond, (size,))

    # 5. staging with the flow limit, 6. chillers
    for_flow = None
    if chw.flow_limit_fraction is not None:
        limits = water_flow_from_load(caps, chw.design_delta_t, mean_t) * chw.flow_limit_fraction
        for_flow = machines_for_flow(load, flow, caps, limits).for_flow
    run = partial(
        _stage_and_run,
        t_chw=t_s,
        t_cond=t_cond,
        capacities=caps,
        turndown=minimum_turndown,
        curves=curves,
        fraction=staging_fraction,
        for_flow=for_flow,
        power_rule=power_rule,
    )
    staging, hours = run(chiller_load)
    without = run(load)[1] if cond.waterside_economizer else hours
    q_cond = condenser_heat(hours.served_load, hours.input_power)
    n = staging.staging.machines_running

    # condenser water pumps and tower fans
    rated_heat = caps * (1.0 + 1.0 / curves.reference_cop)
    design_heat = float(rated_heat.sum())
    cw_pumps = np.zeros(size)
    fans = np.zeros(size)
    cw_design_pump = np.zeros(caps.size)
    if cond.condenser == "water":
        cw_flow = water_flow_from_load(rated_heat, cond.tower_range, 30.0)
        cw_design_pump = np.atleast_1d(
            pump_power(
                cw_flow, cond.pump.head, cond.pump.pump_efficiency, cond.pump.motor_efficiency, 30.0
            )
        )
        per_stage = np.concatenate([[0.0], np.cumsum(cw_design_pump)])
        cw_pumps = per_stage[n]
        tower_heat = q_cond + free
        fans = tower_fan_power(
            tower_heat, design_heat, design_heat * cond.fan_power_per_heat, cond.fan_minimum_speed
        )
    hourly = pd.DataFrame(
        {
            "coil_load_kW": q_coil,
            "chilled_water_flow_m3s": flow,
            "chilled_water_return_C": t_return,
            "pump_heat_kW": pump_heat,
            "free_cooling_kW": free,
            "chiller_load_kW": chiller_load,
            "condenser_entering_C": t_cond,
            "machines_running": n,
            "part_load_ratio": hours.part_load_ratio,
            "chiller_input_kW": hours.input_power,
            "condenser_heat_kW": q_cond,
            "chilled_water_pump_kW": chw_pump,
            "condenser_water_pump_kW": cw_pumps,
            "tower_fan_kW": fans,
            "unmet_kW": np.maximum(chiller_load - hours.served_load, 0.0),
        }
    )
    design = {
        "design_load_kW": peak,
        "chilled_water_flow_m3s": design_flow,
        "chilled_water_pump_kW": design_pump,
        "condenser_heat_kW": design_heat,
        "condenser_water_flow_m3s": float(water_flow_from_load(design_heat, cond.tower_range, 30.0))
        if cond.condenser == "water"
        else 0.0,
        "condenser_water_pump_kW": float(cw_design_pump.sum()),
        "tower_fan_kW": design_heat * cond.fan_power_per_heat if cond.condenser == "water" else 0.0,
    }
    return ChillerPlantYear(hourly, staging, design, float(np.sum(without.input_power)))
