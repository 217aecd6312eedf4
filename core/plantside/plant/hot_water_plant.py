"""A hot-water plant's year: outdoor reset, return temperature, pumps, boilers' fuel.

Each hour, on whole arrays:

1. Supply temperature on the outdoor reset
   (:func:`plantside.plant.water.hot_water_supply_temperature_from_outdoor`).
2. Flow: variable (coil ΔT from the part-load relation, flow = load / (ρ c_p ΔT)) or
   constant at the design flow; return temperature from the load and the flow
   (:func:`plantside.plant.water.return_temperature_from_load`).
3. Hot-water pump (:mod:`plantside.plant.pumps`); its shaft power is heat added to the
   loop, so the boilers carry the coil load less the pump heat (never below 0).
4. Boilers staged by :func:`plantside.plant.efficient_staging.stage_on_efficiency`
   (staging fraction), fuel from :func:`plantside.plant.boilers.boiler_hours` at the
   hour's return temperature.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from plantside.errors import check_range
from plantside.plant.boilers import (
    RATED_RETURN_C,
    boiler_cautions,
    boiler_efficiency,
    boiler_hours,
)
from plantside.plant.efficient_staging import EfficientStaging, stage_on_efficiency
from plantside.plant.loads import hourly_loads
from plantside.plant.pumps import PumpSettings, pump_power, pump_power_fraction_from_flow_fraction
from plantside.plant.water import (
    coil_delta_t_from_part_load_ratio,
    hot_water_supply_temperature_from_outdoor,
    return_temperature_from_load,
    water_flow_from_load,
)

__all__ = ["HotWaterPlantYear", "HotWaterSettings", "hot_water_plant_year"]


@dataclass(frozen=True)
class HotWaterSettings:
    """Hot-water loop and boilers (SI).

    Attributes
    ----------
    design_supply_temperature : float
        Supply at the design outdoor temperature [°C], 30 to 120.
    design_delta_t : float
        Design supply - return [K], 2 to 40.
    design_outdoor, mild_outdoor, mild_supply_temperature : float
        Reset schedule: outdoor dry bulb at design [°C], outdoor dry bulb at and above
        which the supply is held at ``mild_supply_temperature`` [°C].
    variable_flow : bool
        Variable-speed pumping (ΔT from the part-load relation) or constant flow.
    load_ratio_points, delta_t_ratio_points : tuple of float
        Part-load ΔT relation (variable flow).
    boiler_type : {"condensing", "non_condensing"}
    rated_efficiency, rated_return_temperature, jacket_loss : float
        As for :func:`plantside.plant.boilers.boiler_efficiency`.
    """

    design_supply_temperature: float = 70.0
    design_delta_t: float = 20.0
    design_outdoor: float = -10.0
    mild_outdoor: float = 15.0
    mild_supply_temperature: float = 45.0
    variable_flow: bool = True
    load_ratio_points: tuple[float, ...] = (0.0, 1.0)
    delta_t_ratio_points: tuple[float, ...] = (1.0, 1.0)
    boiler_type: str = "condensing"
    rated_efficiency: float = 0.95
    rated_return_temperature: float = RATED_RETURN_C
    jacket_loss: float = 0.01

    def __post_init__(self):
        check_range("design_supply_temperature", self.design_supply_temperature, 30.0, 120.0, "°C")
        check_range("design_delta_t", self.design_delta_t, 2.0, 40.0, "K")
        check_range(
            "mild_supply_temperature",
            self.mild_supply_temperature,
            20.0,
            self.design_supply_temperature,
            "°C",
        )
        hot_water_supply_temperature_from_outdoor(
            0.0,
            self.design_outdoor,
            self.design_supply_temperature,
            self.mild_outdoor,
            self.mild_supply_temperature,
        )
        coil_delta_t_from_part_load_ratio(
            0.5, self.design_delta_t, self.load_ratio_points, self.delta_t_ratio_points
        )
        boiler_efficiency(
            50.0,
            1.0,
            self.boiler_type,
            self.rated_efficiency,
            self.rated_return_temperature,
            self.jacket_loss,
        )


@dataclass(frozen=True, eq=False)
class HotWaterPlantYear:
    """Hourly hot-water side and the year's figures.

    ``hourly`` columns: ``heating_load_kW``, ``hot_water_supply_C``, ``hot_water_return_C``,
    ``hot_water_flow_m3s``, ``pump_heat_kW``, ``boiler_load_kW``, ``boilers_running``,
    ``firing_rate``, ``boiler_efficiency``, ``fuel_input_kW``, ``hot_water_pump_kW``,
    ``unmet_kW``.
    """

    hourly: pd.DataFrame
    staging: EfficientStaging
    design: dict
    cautions: tuple[str, ...]

    def summary(self) -> dict:
        """The year's heat, fuel and pump energy [kWh] and seasonal efficiency [-]."""
        h = self.hourly
        heat = float(h["boiler_load_kW"].sum())
        fuel = float(h["fuel_input_kW"].sum())
        return {
            "heating_kWh": float(h["heating_load_kW"].sum()),
            "boiler_output_kWh": heat,
            "fuel_kWh": fuel,
            "hot_water_pump_kWh": float(h["hot_water_pump_kW"].sum()),
            "seasonal_boiler_efficiency": heat / fuel if fuel > 0 else float("nan"),
            "machine_starts": self.staging.summary()["machine_starts"],
            "unmet_hours": self.staging.summary()["unmet_hours"],
        }


def hot_water_plant_year(
    heating_loads,
    drybulb,
    capacities,
    settings: HotWaterSettings | None = None,
    pumps: PumpSettings | None = None,
    minimum_turndown=0.15,
    staging_fraction: float = 1.0,
    design_load: float | None = None,
) -> HotWaterPlantYear:
    """Run a hot-water plant over the year's hours (module notes).

    Parameters
    ----------
    heating_loads : array_like
        Hourly sum of heating coil loads [kW], >= 0.
    drybulb : array_like
        Outdoor dry bulb [°C] each hour.
    capacities : sequence of float
        Boiler rated outputs [kW], start order.
    settings : HotWaterSettings, optional
    pumps : PumpSettings, optional
    minimum_turndown, staging_fraction
        As for :func:`plantside.plant.efficient_staging.stage_on_efficiency`.
    design_load : float, optional
        Design heating load [kW] for the design flow; default the year's peak.

    Returns
    -------
    HotWaterPlantYear
    """
    q = hourly_loads(heating_loads)
    s = settings or HotWaterSettings()
    pump = pumps or PumpSettings(head=20.0)
    db = np.broadcast_to(np.asarray(drybulb, dtype=float), q.shape)
    peak = float(q.max()) if design_load is None else float(design_load)
    peak = float(check_range("design_load", peak, 0.0, None, "kW", low_inclusive=False))
    t_s = hot_water_supply_temperature_from_outdoor(
        db, s.design_outdoor, s.design_supply_temperature, s.mild_outdoor, s.mild_supply_temperature
    )
    mean_t = s.design_supply_temperature - s.design_delta_t / 2
    design_flow = float(water_flow_from_load(peak, s.design_delta_t, mean_t))
    if s.variable_flow:
        delta_t = coil_delta_t_from_part_load_ratio(
            q / peak, s.design_delta_t, s.load_ratio_points, s.delta_t_ratio_points
        )
        flow = water_flow_from_load(q, delta_t, mean_t)
    else:
        flow = np.where(q > 0, design_flow, 0.0)
    t_r = np.maximum(return_temperature_from_load(t_s, q, np.where(q > 0, flow, 1.0)), 1.0)
    design_pump = float(
        pump_power(design_flow, pump.head, pump.pump_efficiency, pump.motor_efficiency, mean_t)
    )
    if s.variable_flow:
        fraction = pump_power_fraction_from_flow_fraction(
            np.minimum(flow / design_flow, 1.5), pump.control_head_share, pump.minimum_speed
        )
    else:
        fraction = np.where(q > 0, 1.0, 0.0)
    hw_pump = design_pump * fraction
    pump_heat = hw_pump * pump.motor_efficiency
    boiler_load = np.maximum(q - pump_heat, 0.0)
    caps = np.atleast_1d(np.asarray(capacities, dtype=float))
    staging = stage_on_efficiency(
        boiler_load, caps, minimum_turndown, staging_fraction, no_load_threshold=0.0
    )
    n = staging.staging.machines_running
    running = np.where(n > 0, np.cumsum(caps)[np.maximum(n - 1, 0)], 0.0)
    served = np.minimum(boiler_load, running)
    boilers = boiler_hours(
        served,
        running,
        np.clip(t_r, 0.0, 100.0),
        s.boiler_type,
        s.rated_efficiency,
        s.rated_return_temperature,
        s.jacket_loss,
    )
    hourly = pd.DataFrame(
        {
            "heating_load_kW": q,
            "hot_water_supply_C": t_s,
            "hot_water_return_C": t_r,
            "hot_water_flow_m3s": flow,
            "pump_heat_kW": pump_heat,
            "boiler_load_kW": served,
            "boilers_running": n,
            "firing_rate": boilers.firing_rate,
            "boiler_efficiency": boilers.efficiency,
            "fuel_input_kW": boilers.fuel_input,
            "hot_water_pump_kW": hw_pump,
            "unmet_kW": boiler_load - served,
        }
    )
    design = {
        "design_load_kW": peak,
        "hot_water_flow_m3s": design_flow,
        "hot_water_pump_kW": design_pump,
    }
    cautions = tuple(boiler_cautions(t_r, q, s.boiler_type))
    return HotWaterPlantYear(hourly, staging, design, cautions)
