"""Run a whole study: every air handler of a scenario, and the plants they load.

This is the orchestration layer above the physics: it reads the weather and the
design conditions once, runs each air handler's design points and hourly year,
sums the coil loads coincidentally into the cooling and heating plant loads, and
sizes, bins and stages each plant option. Nothing here computes physics itself.

The plant's design load is coincident too: every air handler is evaluated at the
same design outdoor state (dry-bulb, dew-point and enthalpy conditions at the
scenario's annual percentage), the coil loads are summed per condition, and the
largest sum governs. Heating is sized at the 99.6 or 99 % heating dry bulb.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date

import numpy as np
import pandas as pd

from plantside import __version__
from plantside.air_handler.coil_schedule import coil_schedule
from plantside.air_handler.results import zone_load
from plantside.air_handler.year import (
    AirHandlerSettings,
    CoolingDesignSummary,
    DesignPoint,
    cooling_design_points,
    heating_design_point,
    hourly_year,
    humidity_hours_above_limit,
)
from plantside.air_handler.zone_loads import HourlyZoneLoads
from plantside.climate.design_conditions import DesignConditions, design_conditions_from_weather
from plantside.climate.weather import Weather
from plantside.plant.efficiency import project_weighted_efficiency
from plantside.plant.loads import diversity_table, plant_load_from_coil_loads
from plantside.plant.part_load import load_duration_curve, part_load_bins
from plantside.plant.sizing import (
    SIZING_DISCLAIMER,
    design_capacity_from_design_load,
    sizing_cautions,
    sizing_summary,
)
from plantside.plant.staging import (
    PlantOption,
    compare_plant_options,
    compare_stage_hours,
    stage_machines,
)
from plantside.study.figures import (
    coincident_cooling_design,
    headline_figures,
    load_energy,
    load_peak,
    plant_option_specs,
)
from plantside.study.high_limit_cautions import economizer_limit_cautions
from plantside.study.scenario import PlantOptionSpec, Scenario
from plantside.study.water_side_run import run_water_side, water_side_summary
from plantside.units import UnitText, display_text

__all__ = [
    "AirHandlerResult",
    "PlantResult",
    "StudyResult",
    "assemble_plants",
    "design_zone",
    "heating_load_columns",
    "run_air_handler",
    "run_study",
    "study_summary",
]

#: Hourly columns whose sum is an air handler's heating coil load [kW] (reheat after a
#: dew-point coil counts only when its source is hot water; recovered condenser heat is
#: ``condenser_heat_recovered_kW``, not a heating-plant load; the terminal reheat of zone
#: humidity control is hot water).
heating_load_columns = (
    "preheat_kW",
    "heating_coil_kW",
    "reheat_kW",
    "dehumidification_reheat_kW",
    "humidity_control_reheat_kW",
)

#: The cautions every study carries, whatever its numbers.
GENERAL_CAUTIONS = (
    "Preliminary design aid: final equipment selection and sizing belong to a licensed "
    "engineer working under the local codes and standards.",
    "Undersizing risks spaces that run warm and humid (comfort complaints, mould); "
    "oversizing risks short cycling, wear and poor dehumidification at part load.",
)


@dataclass(frozen=True)
class AirHandlerResult:
    """One air handler's results: its hourly year and its design points."""

    name: str
    settings: AirHandlerSettings
    hourly: pd.DataFrame
    cooling_design: CoolingDesignSummary
    heating_design: DesignPoint

    @property
    def heating_hourly(self) -> np.ndarray:
        """Hourly heating coil load (preheat + heating + reheat + dehumidification reheat) [kW]."""
        return sum(self.hourly[c].to_numpy() for c in heating_load_columns) + self.terminal_hourly

    @property
    def terminal_hourly(self) -> np.ndarray:
        """Hourly heat delivered outside the air handler while its fan is off [kW]
        (perimeter or terminal heating on the hot-water plant; 0 without)."""
        if "terminal_heating_kW" not in self.hourly.columns:
            return np.zeros(len(self.hourly))
        return self.hourly["terminal_heating_kW"].to_numpy(dtype=float)

    @property
    def zone_hourly(self) -> np.ndarray:
        """Hourly zone cooling load met (sensible + latent, >= 0) [kW]."""
        return np.maximum(zone_load(self.hourly), 0.0)


@dataclass(frozen=True)
class PlantResult:
    """A cooling or heating plant: loads, sizing, part-load hours and options compared.

    All loads in kW, energies in kWh (SI); convert only for display.
    """

    kind: str
    hourly_load: np.ndarray
    design_load: float
    governing: str
    design_table: pd.DataFrame
    margin_percent: float
    design_capacity: float
    sizing: pd.DataFrame
    bins: pd.DataFrame
    duration: pd.DataFrame
    diversity: pd.DataFrame
    options: pd.DataFrame
    stage_hours: pd.DataFrame
    efficiency: pd.DataFrame
    cautions: tuple[str, ...] = field(default=())

    @property
    def annual_energy(self) -> float:
        """Year's load energy [kWh] (hourly steps)."""
        return load_energy(self.hourly_load)

    @property
    def annual_peak(self) -> float:
        """Year's peak hourly load [kW]."""
        return load_peak(self.hourly_load)


@dataclass(frozen=True)
class StudyResult:
    """Everything a study produced."""

    scenario: Scenario
    weather: Weather
    conditions: DesignConditions
    air_handlers: tuple[AirHandlerResult, ...]
    cooling: PlantResult
    heating: PlantResult
    cautions: tuple[str, ...]


def _options(specs: tuple[PlantOptionSpec, ...], capacity: float, kind: str):
    specs = plant_option_specs(specs, kind)
    options = [
        PlantOption.from_fractions(
            s.name, max(capacity, 1e-6), s.capacity_fractions, s.minimum_turndown
        )
        for s in specs
    ]
    return specs, options


def _efficiency_table(loads, specs, options) -> pd.DataFrame:
    rows = []
    for spec, option in zip(specs, options, strict=True):
        if spec.efficiency is None:
            continue
        staged = stage_machines(loads, option.capacities, option.minimum_turndown)
        result = project_weighted_efficiency(
            staged.machine_load, option.capacities, spec.efficiency, spec.efficiency_metric
        )
        rows.append(
            {
                "option": spec.name,
                "metric": spec.efficiency_metric,
                "rated_iplv": result.rated_iplv,
                "project_iplv": result.project_iplv,
                "average_efficiency": result.average_efficiency,
                "average_cop": result.average_cop,
                "cooling_energy_kWh": result.cooling_energy,
                "input_energy_kWh": result.input_energy,
            }
        )
    return pd.DataFrame(rows)


#: Units of a heating plant's caution figures (kW of heat reads MBH in I-P, not tons).
_HEATING_MESSAGE_QUANTITIES = {
    "°C": "temperature",
    "kWh": "heating_energy",
    "kW": "heating_power",
}


def _plant_cautions(kind, hourly, capacity, design_load) -> list[str]:
    """The plant's sizing cautions, without the disclaimer the study carries once.

    A heating plant's cautions carry their I-P text (:class:`plantside.units.UnitText`):
    their kW are heat, shown in MBH, not in tons.
    """
    if capacity <= 0:
        return []
    plant = f"{kind.capitalize()} plant: "  # two plants' cautions read alike: say whose
    notes = [
        plant + note
        for note in sizing_cautions(hourly, capacity, design_load)
        if note != SIZING_DISCLAIMER  # GENERAL_CAUTIONS opens every study with it
    ]
    if kind == "heating":
        notes = [
            UnitText(
                display_text(note, "SI"), display_text(note, "IP", _HEATING_MESSAGE_QUANTITIES)
            )
            for note in notes
        ]
    return notes


def _plant(
    kind, coil_loads, zone_loads, design_table, governing, design_load, margin, gain, specs
) -> PlantResult:
    hourly = plant_load_from_coil_loads(coil_loads, gain)
    capacity = design_capacity_from_design_load(design_load, margin)
    specs, options = _options(specs, capacity, kind)
    cautions = tuple(_plant_cautions(kind, hourly, capacity, design_load))
    return PlantResult(
        kind=kind,
        hourly_load=hourly,
        design_load=float(design_load),
        governing=governing,
        design_table=design_table,
        margin_percent=float(margin),
        design_capacity=float(capacity),
        sizing=sizing_summary(hourly, design_load, margin),
        bins=part_load_bins(hourly, max(capacity, 1e-6)),
        duration=load_duration_curve(hourly),
        diversity=diversity_table(coil_loads, zone_loads, gain),
        options=compare_plant_options(hourly, options),
        stage_hours=compare_stage_hours(hourly, options),
        efficiency=_efficiency_table(hourly, specs, options)
        if kind == "cooling"
        else pd.DataFrame(),
        cautions=cautions,
    )


def design_zone(zone, kind: str):
    """Zone loads for a design point.

    A load model is evaluated by the air-handler model at the design dry bulb. Hourly
    loads from a file carry no outdoor state, so the design hour is taken from the file
    itself: the hour of largest sensible cooling load for cooling (its latent load
    coincident), the hour of largest heating load for heating. This is the file's own
    peak, not a load at the site's design condition; say so where it is shown.
    """
    if not isinstance(zone, HourlyZoneLoads) or zone.hours == 1:
        return zone
    index = int(np.argmax(zone.sensible) if kind == "cooling" else np.argmin(zone.sensible))
    return HourlyZoneLoads(
        sensible=zone.sensible[index : index + 1],
        latent=zone.latent[index : index + 1],
        internal_sensible=zone.internal_sensible[index : index + 1],
        occupied=zone.occupied[index : index + 1],
        source=f"{zone.source} (peak {kind} hour {index + 1})",
    )


def run_air_handler(
    settings: AirHandlerSettings,
    zone,
    weather: Weather,
    conditions: DesignConditions,
    cooling_percent: float,
    heating_percent: float,
    hourly: pd.DataFrame | None = None,
) -> AirHandlerResult:
    """One air handler's result: its hourly year, cooling design points and heating point.

    Parameters
    ----------
    settings : AirHandlerSettings
        The air handler.
    zone : ZoneLoadModel or HourlyZoneLoads
        Its zone loads (:meth:`Scenario.zone_loads`).
    weather : Weather
        The year of weather.
    conditions : DesignConditions
        The site's design conditions (from ``weather``).
    cooling_percent, heating_percent : float
        Annual percentages of the cooling and heating design conditions [%].
    hourly : pandas.DataFrame, optional
        This air handler's hourly year with these settings, when already computed
        (the dashboard reuses it when only the design percentage moved).

    Returns
    -------
    AirHandlerResult
    """
    return AirHandlerResult(
        name=settings.name,
        settings=settings,
        hourly=hourly_year(settings, weather, zone) if hourly is None else hourly,
        cooling_design=cooling_design_points(
            settings, design_zone(zone, "cooling"), conditions.conditions, cooling_percent
        ),
        heating_design=heating_design_point(
            settings, design_zone(zone, "heating"), conditions.heating(heating_percent)
        ),
    )


def assemble_plants(
    scenario: Scenario,
    weather: Weather,
    conditions: DesignConditions,
    units: tuple[AirHandlerResult, ...],
) -> StudyResult:
    """The cooling and heating plants of ``units`` and the study's cautions.

    The cooling design load is coincident (:func:`plantside.study.figures.
    coincident_cooling_design`: every unit at the same design outdoor state, the
    largest sum governs); heating is sized at the heating design condition.
    """
    units = tuple(units)
    gain = scenario.distribution_gain_percent
    factor = 1.0 + gain / 100.0
    cooling_table, governing_kind = coincident_cooling_design(
        units, gain, scenario.cooling_pickup_allowance_percent
    )
    cooling = _plant(
        "cooling",
        {u.name: u.hourly["coil_total_kW"].to_numpy() for u in units},
        {u.name: u.zone_hourly for u in units},
        cooling_table,
        str(cooling_table.loc[governing_kind, "condition"]),
        float(cooling_table.loc[governing_kind, "plant_kW"]),
        scenario.cooling_margin_percent,
        gain,
        scenario.cooling_options,
    )

    heating_row = {"kind": "heating", "condition": units[0].heating_design.label}
    for unit in units:
        heating_row[f"{unit.name}_heating_kW"] = sum(
            unit.heating_design.loads[c] for c in heating_load_columns
        )
    heating_row["coil_total_kW"] = sum(heating_row[f"{u.name}_heating_kW"] for u in units)
    # morning pick-up after night set-back: an allowance on the design load, its own term
    pickup = scenario.pickup_allowance_percent
    heating_row["pickup_percent"] = pickup
    heating_row["pickup_kW"] = heating_row["coil_total_kW"] * factor * pickup / 100.0
    heating_row["plant_kW"] = heating_row["coil_total_kW"] * factor + heating_row["pickup_kW"]
    heating_table = pd.DataFrame([heating_row]).set_index("kind")
    heating = _plant(
        "heating",
        {u.name: u.heating_hourly for u in units},
        None,
        heating_table,
        heating_row["condition"],
        heating_row["plant_kW"],
        scenario.heating_margin_percent,
        gain,
        scenario.heating_options,
    )
    unit_cautions = tuple(
        f"{u.name}: {c}"
        for u in units
        for c in (
            *u.hourly.attrs.get("cautions", ()),
            *u.cooling_design.points[u.cooling_design.governing].cautions,
        )
    )
    return StudyResult(
        scenario=scenario,
        weather=weather,
        conditions=conditions,
        air_handlers=units,
        cooling=cooling,
        heating=heating,
        cautions=GENERAL_CAUTIONS
        + cooling.cautions
        + heating.cautions
        + tuple(dict.fromkeys(unit_cautions))
        + economizer_limit_cautions(scenario, weather),
    )


def run_study(scenario: Scenario, weather: Weather | None = None) -> StudyResult:
    """Run every air handler of ``scenario`` and size its cooling and heating plants.

    Parameters
    ----------
    scenario : Scenario
        The validated study.
    weather : Weather, optional
        Use this weather instead of the scenario's (e.g. an uploaded year).

    Returns
    -------
    StudyResult
    """
    weather = scenario.load_weather() if weather is None else weather
    conditions = design_conditions_from_weather(weather)
    units = tuple(
        run_air_handler(
            spec.settings,
            scenario.zone_loads(index, weather),
            weather,
            conditions,
            scenario.cooling_design_percent,
            scenario.heating_design_percent,
        )
        for index, spec in enumerate(scenario.air_handlers)
    )
    return assemble_plants(scenario, weather, conditions, units)


#: SI unit suffixes for the columns of the design-condition tables in the JSON summary.
_SUFFIXES = {
    "drybulb": "drybulb_C",
    "wet_bulb": "wet_bulb_C",
    "dew_point": "dew_point_C",
    "humidity_ratio": "humidity_ratio_kgkg",
    "enthalpy": "enthalpy_kJkg",
    "pressure": "pressure_Pa",
    "percent": "percent_of_hours",
}


def _records(frame: pd.DataFrame) -> list[dict]:
    frame = frame.reset_index() if frame.index.name else frame
    frame = frame.drop(columns=["design_value"], errors="ignore").rename(columns=_SUFFIXES)
    return [
        {
            k: (
                None
                if isinstance(v, float) and not np.isfinite(v)
                else (v.item() if hasattr(v, "item") else v)
            )
            for k, v in row.items()
        }
        for row in frame.to_dict(orient="records")
    ]


def study_summary(result: StudyResult) -> dict:
    """A JSON-ready summary in SI with unit-suffixed keys (the command line's ``--json``)."""
    scenario = result.scenario
    units = []
    for index, unit in enumerate(result.air_handlers):
        design = unit.cooling_design
        governing = design.points[design.governing]
        hourly = unit.hourly
        figures = headline_figures(
            scenario, result.air_handlers, result.conditions, air_handler=index
        )
        humidity = humidity_hours_above_limit(unit.settings, hourly)
        units.append(
            {
                "name": unit.name,
                "governing_condition": figures.governing_condition,
                "design_coil_total_kW": figures.design_coil_load,
                "design_coil_sensible_kW": governing.loads["coil_sensible_kW"],
                "design_coil_latent_kW": governing.loads["coil_latent_kW"],
                "design_zone_sensible_kW": governing.loads["zone_sensible_kW"],
                "design_zone_latent_kW": governing.loads["zone_latent_kW"],
                "design_zone_kW": figures.design_zone_load,
                "design_capacity_kW": figures.recommended_capacity,
                "hours_above_75_percent_of_capacity": figures.hours_above_threshold,
                "design_conditions": _records(design.table),
                "heating_design_kW": sum(
                    unit.heating_design.loads[c] for c in heating_load_columns
                ),
                "annual_peak_coil_total_kW": figures.peak_coil_load,
                "annual_coil_total_kWh": figures.cooling_energy,
                "annual_heating_kWh": load_energy(unit.heating_hourly),
                "unoccupied_heating": unit.settings.unoccupied_heating,
                "night_setback_drybulb_C": unit.settings.night_setback_drybulb,
                "annual_terminal_heating_kWh": load_energy(unit.terminal_hourly),
                "night_cycle_hours": int(hourly["night_cycle"].sum())
                if "night_cycle" in hourly.columns
                else 0,
                "design_airflow": unit.settings.design_airflow,
                "low_load_response": unit.settings.low_load_response,
                "annual_terminal_reheat_kWh": load_energy(hourly["reheat_kW"].to_numpy()),
                "zone_relative_humidity_max": unit.settings.zone_relative_humidity_max,
                "zone_relative_humidity_limit": unit.settings.zone_relative_humidity_limit,
                "hours_above_humidity_limit": humidity.above_limit,
                "hours_above_humidity_limit_without_control": (
                    humidity.above_limit_without_control
                ),
                "annual_humidity_control_reheat_kWh": load_energy(
                    hourly["humidity_control_reheat_kW"].to_numpy()
                ),
                "economizer_hours": {
                    str(k): int(v) for k, v in hourly["economizer_mode"].value_counts().items()
                },
                "supply_drybulb_C": unit.settings.supply_drybulb,
                "minimum_outdoor_air_fraction": unit.settings.minimum_outdoor_air_fraction,
                "airflow_basis": unit.settings.airflow_basis,
            }
        )
    plant_figures = headline_figures(scenario, result.air_handlers, result.conditions)

    def plant(p: PlantResult) -> dict:
        return {
            "governing_condition": p.governing,
            "design_load_kW": p.design_load,
            "margin_percent": p.margin_percent,
            "design_capacity_kW": p.design_capacity,
            "annual_peak_kW": p.annual_peak,
            "annual_energy_kWh": p.annual_energy,
            "design_conditions": _records(p.design_table),
            "sizing": _records(p.sizing),
            "part_load_bins": _records(p.bins),
            "diversity": _records(p.diversity),
            "options": _records(p.options),
            "stage_hours": _records(p.stage_hours),
            "efficiency": _records(p.efficiency),
        }

    return {
        "plantside_version": __version__,
        "date": date.today().isoformat(),
        "title": scenario.title,
        "site": result.weather.site,
        "hours": result.weather.hours,
        "design_conditions": _records(result.conditions.to_frame()),
        "air_handlers": units,
        "cooling_plant": {
            **plant(result.cooling),
            "design_zone_kW": plant_figures.design_zone_load,
            "hours_above_75_percent_of_capacity": plant_figures.hours_above_threshold,
            "design_loads_kW": plant_figures.design_loads,
            "pickup_allowance_percent": scenario.cooling_pickup_allowance_percent,
            "first_option": plant_figures.option_name,
            "first_option_machines_kW": list(plant_figures.machine_capacities),
        },
        "heating_plant": {
            **plant(result.heating),
            "pickup_allowance_percent": scenario.pickup_allowance_percent,
        },
        "coil_schedule": _records(coil_schedule(result.air_handlers)),
        "water_side": water_side_summary(run_water_side(result)),
        "cautions": list(result.cautions),
    }
