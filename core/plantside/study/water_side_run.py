"""Run the water side of a finished study: each option's year against the weather.

Takes a :class:`plantside.study.run.StudyResult` whose scenario has water-side tables
(:mod:`plantside.study.water_side`) and returns each cooling option's chilled-water year
(chillers, pumps, tower), each heating option's hot-water year (boilers, pumps), the
tower or dry cooler at its design condition, the coils' apparatus dew point against the
chilled water, and what a heat-recovery chiller would supply. One calculation serves the
command line and the dashboard.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from plantside.air import moist_air
from plantside.plant.chiller_plant import ChillerPlantYear, chiller_plant_year
from plantside.plant.chillers import default_chiller_curves, fit_chiller_curves, rating_point_cops
from plantside.plant.efficiency import cop_from_efficiency, integrated_part_load_value
from plantside.plant.heat_recovery import heat_recovery_chiller
from plantside.plant.heat_rejection import HeatRejectionDesign, dry_cooler_design, tower_design
from plantside.plant.hot_water_plant import HotWaterPlantYear, hot_water_plant_year
from plantside.plant.staging import PlantOption
from plantside.plant.water import apparatus_dew_point_check
from plantside.study.figures import plant_option_specs

__all__ = ["WaterSideResult", "run_water_side", "water_side_summary"]


@dataclass(frozen=True, eq=False)
class WaterSideResult:
    """The water side of a study: each option's year, the tower, the coil check, recovery."""

    chiller_options: tuple[tuple[str, ChillerPlantYear], ...]
    boiler_options: tuple[tuple[str, HotWaterPlantYear], ...]
    heat_rejection: tuple[tuple[str, HeatRejectionDesign], ...]
    options: pd.DataFrame
    cautions: tuple[str, ...]
    heat_recovery: dict
    condenser: str = "water"


def _curves(spec, condenser):
    if spec.capacity_curve is not None:
        # the option's own curves, as given; its rated full-load efficiency (if any) sets
        # the rated COP, and its rated part-load values are only compared (options table)
        curves = default_chiller_curves(condenser)
        if spec.efficiency is not None:
            cop = float(cop_from_efficiency(spec.efficiency[0], spec.efficiency_metric))
            curves = replace(
                curves, reference_cop=cop, minimum_part_load_ratio=spec.minimum_turndown
            )
        return replace(
            curves,
            capft=spec.capacity_curve,
            eirft=spec.efficiency_curve,
            eirfplr=spec.part_load_curve,
        )
    if spec.efficiency is None:
        return default_chiller_curves(condenser)
    return fit_chiller_curves(
        spec.efficiency[0],
        condenser,
        spec.efficiency_metric,
        part_load_efficiencies=spec.efficiency,
        minimum_part_load_ratio=spec.minimum_turndown,
    )


def _option_capacities(specs, capacity, kind):
    # same option arithmetic as the study's staging tables (PlantOption.from_fractions)
    specs = plant_option_specs(specs, kind)
    return [
        (s, PlantOption.from_fractions(s.name, max(capacity, 1e-6), s.capacity_fractions, 0.0))
        for s in specs
    ]


def run_water_side(result) -> WaterSideResult | None:
    """Each cooling and heating option's water-side year of a finished study.

    Parameters
    ----------
    result : plantside.study.run.StudyResult

    Returns
    -------
    WaterSideResult or None
        None when the scenario has no water-side tables.
    """
    scenario = result.scenario
    spec = scenario.water_side
    if spec is None:
        return None
    weather = result.weather
    wet_bulb = moist_air.wet_bulb_from_humidity_ratio(
        weather.drybulb, weather.humidity_ratio, weather.pressure, check=False
    )
    coil = np.sum([u.hourly["coil_total_kW"].to_numpy() for u in result.air_handlers], axis=0)
    heating = np.sum([u.heating_hourly for u in result.air_handlers], axis=0)
    factor = 1.0 + scenario.distribution_gain_percent / 100.0
    design_coil = result.cooling.design_load / factor
    condenser = spec.condenser.condenser
    rows, chillers, rejection = [], [], []
    for option_spec, option in _option_capacities(
        scenario.cooling_options, result.cooling.design_capacity, "cooling"
    ):
        curves = _curves(option_spec, condenser)
        year = chiller_plant_year(
            coil,
            wet_bulb,
            weather.drybulb,
            option.capacities,
            curves,
            option_spec.minimum_turndown,
            spec.chilled_water,
            spec.chilled_water_pump,
            spec.condenser,
            spec.chiller_staging_fraction,
            spec.power_rule,
            design_load=max(design_coil, float(coil.max()), 1e-6),
        )
        chillers.append((option_spec.name, year))
        heat = year.design["condenser_heat_kW"]
        if condenser == "water":
            wb = result.conditions.evaporation(spec.evaporation_design_percent).wet_bulb
            design = tower_design(
                heat,
                wb,
                spec.condenser.tower_approach,
                spec.condenser.tower_range,
                spec.condenser.fan_power_per_heat,
            )
        else:
            db = result.conditions.cooling("cooling", scenario.cooling_design_percent).drybulb
            design = dry_cooler_design(heat, db)
        rejection.append((option_spec.name, design))
        summary = year.summary()
        rated_iplv = curves_iplv = float("nan")
        if option_spec.efficiency is not None:
            metric = option_spec.efficiency_metric
            rated = integrated_part_load_value(option_spec.efficiency, metric)
            rated_iplv = float(cop_from_efficiency(rated, metric))
            curves_iplv = float(integrated_part_load_value(rating_point_cops(curves), "cop"))
        weighted = result.cooling.efficiency
        row = weighted[weighted["option"] == option_spec.name] if len(weighted) else weighted
        rows.append(
            {
                "option": option_spec.name,
                "plant": "cooling",
                "chiller_kWh": summary["chiller_kWh"],
                "pump_kWh": summary["pump_kWh"],
                "tower_fan_kWh": summary["tower_fan_kWh"],
                "plant_kWh": summary["plant_kWh"],
                "fuel_kWh": 0.0,
                "seasonal_cop": summary["seasonal_chiller_cop"],
                "seasonal_plant_cop": summary["seasonal_plant_cop"],
                "rated_iplv_cop": rated_iplv,
                "curves_iplv_cop": curves_iplv,
                "rating_weighted_cop": float(row["average_cop"].iloc[0]) if len(row) else np.nan,
                "free_cooling_kWh": summary["free_cooling_kWh"],
                "free_cooling_hours": summary["free_cooling_hours"],
                "economizer_kWh_saved": summary["economizer_chiller_kWh_saved"],
                "machine_starts": summary["machine_starts"],
                "hours_extra_for_flow": summary["hours_extra_for_flow"],
                "design_flow_m3s": year.design["chilled_water_flow_m3s"],
                "design_pump_kW": year.design["chilled_water_pump_kW"],
                "condenser_heat_kW": heat,
                "tower_tons": design.nominal_tons if condenser == "water" else 0.0,
            }
        )
    boilers = []
    heating_design = result.heating.design_load / factor
    for option_spec, option in _option_capacities(
        scenario.heating_options, result.heating.design_capacity, "heating"
    ):
        if not heating.max() > 0:
            break
        year = hot_water_plant_year(
            heating,
            weather.drybulb,
            option.capacities,
            spec.hot_water,
            spec.hot_water_pump,
            option_spec.minimum_turndown,
            spec.boiler_staging_fraction,
            design_load=max(heating_design, float(heating.max())),
        )
        boilers.append((option_spec.name, year))
        summary = year.summary()
        rows.append(
            {
                "option": option_spec.name,
                "plant": "heating",
                "pump_kWh": summary["hot_water_pump_kWh"],
                "fuel_kWh": summary["fuel_kWh"],
                "seasonal_efficiency": summary["seasonal_boiler_efficiency"],
                "machine_starts": summary["machine_starts"],
                "design_flow_m3s": year.design["hot_water_flow_m3s"],
                "design_pump_kW": year.design["hot_water_pump_kW"],
            }
        )
    cautions = []
    adp = []
    for unit in result.air_handlers:
        point = unit.cooling_design.points[unit.cooling_design.governing]
        value = float(point.row.get("apparatus_dew_point_required_C", np.nan))
        if np.isfinite(value) and point.loads.get("coil_total_kW", 0.0) > 0:
            adp.append((unit.name, value))
    if adp:
        check = apparatus_dew_point_check(
            [n for n, _ in adp],
            [v for _, v in adp],
            spec.chilled_water.supply_temperature,
            spec.chilled_water.coil_approach,
        )
        cautions += check.cautions()
    for _, year in boilers[:1]:
        cautions += list(year.cautions)
    recovery = {}
    if spec.heat_recovery_capacity:
        recovery = heat_recovery_chiller(
            heating, coil, spec.heat_recovery_capacity, spec.heat_recovery_cop
        ).summary()
    return WaterSideResult(
        tuple(chillers),
        tuple(boilers),
        tuple(rejection),
        pd.DataFrame(rows),
        tuple(dict.fromkeys(cautions)),
        recovery,
        condenser,
    )


def water_side_summary(water: WaterSideResult | None) -> dict | None:
    """JSON-ready SI figures of the water side (the command line's ``--json``)."""
    if water is None:
        return None
    options = [
        {k: (None if isinstance(v, float) and not np.isfinite(v) else v) for k, v in row.items()}
        for row in water.options.to_dict(orient="records")
    ]
    return {
        "options": [
            {k: (v.item() if hasattr(v, "item") else v) for k, v in row.items()} for row in options
        ],
        "heat_rejection": [
            {
                "option": name,
                "condenser": water.condenser,
                "heat_kW": d.heat,
                "entering_air_C": d.entering_air,
                "leaving_water_C": d.leaving_water,
                "entering_water_C": d.entering_water,
                "flow_m3s": d.flow,
                "nominal_tower_tons": d.nominal_tons,
                "fan_kW": d.fan_power,
            }
            for name, d in water.heat_rejection
        ],
        "heat_recovery": water.heat_recovery,
        "cautions": list(water.cautions),
    }
