"""The water side of a study: scenario tables, and each option's year against the weather.

Scenario tables (all optional; a file without them keeps today's fixed distribution
percentage and rating-weighted efficiency)::

    [plant.chilled_water]         # temperatures °F (IP) or °C (SI); ΔT °F or K; head ft or m
    supply_temperature = 44
    design_delta_t = 10
    delta_t_ratio_points = [0.7, 1.0]   # ΔT / design ΔT at load_ratio_points (low ΔT)
    flow_limit_fraction = 1.1     # primary flow limit of each chiller / its design flow
    pump_head = 80
    staging_fraction = 0.9        # the next chiller starts above 90 % of running capacity
    [plant.condenser]
    condenser = "water"           # or "air"
    tower_approach = 7
    waterside_economizer = true
    [plant.hot_water]
    design_supply_temperature = 160
    boiler_type = "condensing"

When any table is given, pumps replace the distribution percentage for the water-side
figures: the plant's hourly load is the sum of the coil loads plus the pump heat.
The chillers' curves come from each cooling option's four rated efficiencies
(:func:`plantside.plant.chillers.fit_chiller_curves`), or the default set when it gives
none. The tower is sized at the evaporation design wet bulb of the chosen percentage.
This module reads and writes the tables; :mod:`plantside.study.water_side_run` runs them.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields, replace

import numpy as np

from plantside.errors import InputRangeError, ScenarioError
from plantside.plant.chiller_plant import ChilledWaterSettings, CondenserSettings
from plantside.plant.hot_water_plant import HotWaterSettings
from plantside.plant.pumps import PumpSettings
from plantside.units import UnitSystem, from_display, to_display, unit_label

__all__ = [
    "WATER_SIDE_FIELDS",
    "WaterSideSpec",
    "water_side_from_plant_table",
    "water_side_to_tables",
]

#: Pump fields of a table: file key -> (quantity, SI low, SI high).
_PUMP_FIELDS = {
    "pump_head": ("length", 0.0, 200.0),
    "pump_efficiency": ("", 0.05, 1.0),
    "motor_efficiency": ("", 0.05, 1.0),
    "control_head_share": ("", 0.0, 1.0),
    "minimum_speed": ("", 0.0, 1.0),
}
#: The condenser-water pumps run at constant speed: no part-load fields.
_CONSTANT_SPEED_PUMP_KEYS = ("pump_head", "pump_efficiency", "motor_efficiency")

#: Each table's fields: file key -> (quantity or "" or kind, SI low, SI high).
#: Quantities convert through :mod:`plantside.units`; "bool", "list", "text" are not numbers.
WATER_SIDE_FIELDS = {
    "chilled_water": {
        "supply_temperature": ("temperature", 1.0, 20.0),
        "design_delta_t": ("temperature_difference", 1.0, 20.0),
        "load_ratio_points": ("list", 0.0, 1.0),
        "delta_t_ratio_points": ("list", 0.05, 2.0),
        "flow_limit_fraction": ("", 1.0, 2.0),
        "coil_approach": ("temperature_difference", 0.0, 15.0),
        **_PUMP_FIELDS,
        "staging_fraction": ("", 0.3, 1.0),
        "power_rule": ("bool", 0, 1),
        "heat_recovery_capacity": ("heating_power", 0.0, 1e6),
        "heat_recovery_cop": ("", 1.5, 10.0),
    },
    "condenser": {
        "condenser": ("text", 0, 0),
        "tower_approach": ("temperature_difference", 1.0, 15.0),
        "tower_range": ("temperature_difference", 1.0, 20.0),
        "condenser_water_floor": ("temperature", 5.0, 30.0),
        "fan_power_per_heat": ("", 0.0, 0.1),
        "fan_minimum_speed": ("", 0.0, 1.0),
        **{k: v for k, v in _PUMP_FIELDS.items() if k in _CONSTANT_SPEED_PUMP_KEYS},
        "waterside_economizer": ("bool", 0, 1),
        "exchanger_approach": ("temperature_difference", 0.5, 10.0),
        "evaporation_design_percent": ("", 0.4, 2.0),
    },
    "hot_water": {
        "design_supply_temperature": ("temperature", 30.0, 120.0),
        "design_delta_t": ("temperature_difference", 2.0, 40.0),
        "design_outdoor": ("temperature", -60.0, 40.0),
        "mild_outdoor": ("temperature", -60.0, 40.0),
        "mild_supply_temperature": ("temperature", 20.0, 120.0),
        "variable_flow": ("bool", 0, 1),
        "load_ratio_points": ("list", 0.0, 1.0),
        "delta_t_ratio_points": ("list", 0.05, 2.0),
        "boiler_type": ("text", 0, 0),
        "rated_efficiency": ("", 0.5, 0.99),
        "rated_return_temperature": ("temperature", 0.0, 100.0),
        "jacket_loss": ("", 0.0, 0.05),
        **_PUMP_FIELDS,
        "staging_fraction": ("", 0.3, 1.0),
    },
}
_PUMP_KEYS = {
    "pump_head": "head",
    "pump_efficiency": "pump_efficiency",
    "motor_efficiency": "motor_efficiency",
    "control_head_share": "control_head_share",
    "minimum_speed": "minimum_speed",
}


@dataclass(frozen=True)
class WaterSideSpec:
    """The water-side settings of a scenario (SI)."""

    chilled_water: ChilledWaterSettings = field(default_factory=ChilledWaterSettings)
    chilled_water_pump: PumpSettings = field(default_factory=PumpSettings)
    condenser: CondenserSettings = field(default_factory=CondenserSettings)
    hot_water: HotWaterSettings = field(default_factory=HotWaterSettings)
    hot_water_pump: PumpSettings = field(default_factory=lambda: PumpSettings(head=20.0))
    chiller_staging_fraction: float = 1.0
    power_rule: bool = True
    boiler_staging_fraction: float = 1.0
    evaporation_design_percent: float = 0.4
    heat_recovery_capacity: float | None = None
    heat_recovery_cop: float = 3.5
    tables: tuple[str, ...] = ()


def _range_text(quantity, low, high, system) -> tuple[float, float, str]:
    if quantity in ("", "list"):
        return low, high, ""
    lo = float(to_display(quantity, low, system)[0])
    hi = float(to_display(quantity, high, system)[0])
    return lo, hi, unit_label(quantity, system)


def _value(source, where, key, raw, spec, system):
    quantity, low, high = spec
    if quantity == "bool":
        if not isinstance(raw, bool):
            raise ScenarioError(source, where, f"expected true or false, got {raw!r}")
        return raw
    if quantity == "text":
        if not isinstance(raw, str):
            raise ScenarioError(source, where, f"expected text, got {raw!r}")
        return raw
    values = raw if quantity == "list" else [raw]
    if quantity == "list" and (not isinstance(raw, list) or not raw):
        raise ScenarioError(source, where, f"expected a list of numbers, got {raw!r}")
    checked = []
    for value in values:
        if isinstance(value, bool) or not isinstance(value, int | float) or not np.isfinite(value):
            raise ScenarioError(source, where, f"expected a number, got {value!r}")
        si = float(from_display(quantity, value, system)) if quantity not in ("", "list") else value
        if not low - 1e-9 <= si <= high + 1e-9:
            lo, hi, unit = _range_text(quantity, low, high, system)
            raise ScenarioError(
                source,
                where,
                f"{value:g} {unit} is outside the allowed range {lo:g} to {hi:g} {unit}".replace(
                    "  ", " "
                ),
            )
        checked.append(float(si))
    return tuple(checked) if quantity == "list" else checked[0]


def _table(source, name, table, system) -> dict:
    where = f"plant.{name}"
    if not isinstance(table, dict):
        raise ScenarioError(source, where, f"expected a [{where}] table")
    allowed = WATER_SIDE_FIELDS[name]
    for key in table:
        if key not in allowed:
            raise ScenarioError(
                source, f"{where}.{key}", f"unknown field; allowed: {', '.join(allowed)}"
            )
    return {
        key: _value(source, f"{where}.{key}", key, raw, allowed[key], system)
        for key, raw in table.items()
    }


def _split(values: dict, cls, renames=None) -> dict:
    names = {f.name for f in fields(cls)}
    renames = renames or {}
    return {renames.get(k, k): v for k, v in values.items() if renames.get(k, k) in names}


def water_side_from_plant_table(plant: dict, source: str, system) -> WaterSideSpec | None:
    """The water-side spec from a scenario's ``[plant]`` table (None if it has none).

    Raises
    ------
    ScenarioError
        Naming the dotted field, the value and the allowed range in the file's units.
    """
    system = UnitSystem.parse(system)
    present = tuple(name for name in WATER_SIDE_FIELDS if name in plant)
    if not present:
        return None
    values = {name: _table(source, name, plant.get(name, {}), system) for name in WATER_SIDE_FIELDS}
    chw, cond, hw = values["chilled_water"], values["condenser"], values["hot_water"]
    where = "plant.chilled_water"
    try:
        chilled_water = ChilledWaterSettings(**_split(chw, ChilledWaterSettings))
        chw_pump = PumpSettings(**_split(chw, PumpSettings, _PUMP_KEYS))
        where = "plant.condenser"
        cw_pump = replace(
            PumpSettings(head=20.0, control_head_share=1.0, minimum_speed=1.0),
            **_split(cond, PumpSettings, _PUMP_KEYS),
        )
        condenser = CondenserSettings(**_split(cond, CondenserSettings), pump=cw_pump)
        where = "plant.hot_water"
        hot_water = HotWaterSettings(**_split(hw, HotWaterSettings))
        hw_pump = replace(PumpSettings(head=20.0), **_split(hw, PumpSettings, _PUMP_KEYS))
    except InputRangeError as error:
        raise ScenarioError(source, f"{where}.{error.field}", str(error)) from error
    percent = cond.get("evaporation_design_percent", 0.4)
    if not any(np.isclose(percent, p) for p in (0.4, 1.0, 2.0)):
        raise ScenarioError(
            source, "plant.condenser.evaporation_design_percent", f"{percent:g}; allowed 0.4, 1, 2"
        )
    return WaterSideSpec(
        chilled_water=chilled_water,
        chilled_water_pump=chw_pump,
        condenser=condenser,
        hot_water=hot_water,
        hot_water_pump=hw_pump,
        chiller_staging_fraction=chw.get("staging_fraction", 1.0),
        power_rule=chw.get("power_rule", True),
        boiler_staging_fraction=hw.get("staging_fraction", 1.0),
        evaporation_design_percent=percent,
        heat_recovery_capacity=chw.get("heat_recovery_capacity"),
        heat_recovery_cop=chw.get("heat_recovery_cop", 3.5),
        tables=present,
    )


def water_side_to_tables(spec: WaterSideSpec | None, system) -> dict:
    """The spec as ``[plant.*]`` tables in ``system`` units (every field written)."""
    if spec is None:
        return {}
    system = UnitSystem.parse(system)
    sources = {
        "chilled_water": (
            spec.chilled_water,
            spec.chilled_water_pump,
            {
                "staging_fraction": spec.chiller_staging_fraction,
                "power_rule": spec.power_rule,
                "heat_recovery_capacity": spec.heat_recovery_capacity,
                "heat_recovery_cop": spec.heat_recovery_cop,
            },
        ),
        "condenser": (
            spec.condenser,
            spec.condenser.pump,
            {"evaporation_design_percent": spec.evaporation_design_percent},
        ),
        "hot_water": (
            spec.hot_water,
            spec.hot_water_pump,
            {"staging_fraction": spec.boiler_staging_fraction},
        ),
    }
    tables = {}
    for name in spec.tables:
        settings, pump, extra = sources[name]
        table = {}
        for key, (quantity, _, _) in WATER_SIDE_FIELDS[name].items():
            if key in _PUMP_KEYS:
                value = getattr(pump, _PUMP_KEYS[key])
            elif key in extra:
                value = extra[key]
            else:
                value = getattr(settings, key, None)
            if value is None:
                continue
            if quantity == "list":
                value = [float(f"{v:.12g}") for v in value]
            elif quantity not in ("bool", "text"):
                if quantity:
                    value = float(to_display(quantity, value, system)[0])
                value = float(f"{value:.12g}")
            table[key] = value
        tables[name] = table
    return tables
