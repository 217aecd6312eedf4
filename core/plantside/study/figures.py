"""The headline figures of a study, for the whole plant or for one air handler.

One calculation per fact: the command line's summary (:func:`plantside.study.run.
study_summary`) and the dashboard's figures both come from :func:`headline_figures`,
and the cooling plant's governing design condition from
:func:`coincident_cooling_design` (the largest coincident plant load governs), so the
two views can never disagree. Everything is SI (kW, kWh); nothing is displayed here.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, NamedTuple

import numpy as np
import pandas as pd

from plantside.air_handler.results import zone_load
from plantside.plant.loads import plant_load_from_coil_loads
from plantside.plant.sizing import design_capacity_from_design_load
from plantside.plant.staging import PlantOption
from plantside.study.scenario import PlantOptionSpec, Scenario

if TYPE_CHECKING:  # pragma: no cover - type hints only (run imports this module)
    from plantside.study.run import AirHandlerResult

__all__ = [
    "PART_LOAD_THRESHOLD",
    "CoincidentDesign",
    "HeadlineFigures",
    "ViewLoads",
    "climate_label",
    "coincident_cooling_design",
    "control_values",
    "design_load_breakdown",
    "first_recirculating_unit",
    "headline_figures",
    "load_energy",
    "load_peak",
    "outdoor_air_fraction_of",
    "plant_design_condition",
    "plant_option_specs",
    "view_loads",
]

#: Share of the recommended capacity behind the "hours above" headline figure [-]
#: (common practice (no source): hours near full load are those that test a plant).
PART_LOAD_THRESHOLD = 0.75


class CoincidentDesign(NamedTuple):
    """The cooling plant's coincident design table and the condition that governs it.

    ``table`` has one row per design-condition kind: ``condition`` (label), each air
    handler's ``<name>_coil_total_kW`` and ``<name>_zone_kW``, their sums
    ``coil_total_kW`` and ``zone_total_kW``, ``pickup_percent`` [%] and ``pickup_kW``
    (the morning pick-up allowance on the coil total with its distribution gain), and
    ``plant_kW`` (coil total plus the distribution gain plus the pick-up) [kW].
    ``governing`` is the kind of the largest ``plant_kW`` (the first in table order on a
    tie).
    """

    table: pd.DataFrame
    governing: str


class ViewLoads(NamedTuple):
    """Hourly loads of one view [kW]: ``coil`` (plant or coil load), ``zone`` (met)."""

    coil: np.ndarray
    zone: np.ndarray


@dataclass(frozen=True)
class HeadlineFigures:
    """The headline figures of the plant or of one air handler, in SI.

    Attributes
    ----------
    design_zone_load : float
        Zone sensible + latent load at the governing design condition [kW].
    design_coil_load : float
        Coil total load at the governing design condition [kW] (for the plant: the
        coincident sum over air handlers plus the distribution gain).
    coil_to_zone_ratio : float
        design_coil_load / design_zone_load [-] (NaN for no zone load).
    governing_condition : str
        Label of the governing design condition (the model's, in SI).
    peak_coil_load : float
        Highest hourly (coincident, for the plant) load of the year [kW].
    cooling_energy : float
        Cooling energy over the year [kWh] (hourly steps, loads below zero count 0).
    hours_above_threshold : int
        Hours with load above :data:`PART_LOAD_THRESHOLD` of the capacity [h].
    recommended_capacity : float
        Design coil load plus the scenario's cooling margin [kW].
    governing : DesignCondition
        The governing design condition itself (SI state).
    governing_kind : str
        Its kind (``"cooling"``, ``"dehumidification"`` or ``"enthalpy"``).
    design_loads : dict of str to float
        The power terms [kW] of the design point (``DesignPoint.loads`` keys ending
        in ``_kW``), summed over air handlers for the plant, where
        ``distribution_gain_kW`` is its own term and included in ``coil_total_kW``.
    option_name : str
        Name of the first cooling plant option.
    machine_capacities : tuple of float
        Capacities of its machines [kW].
    minimum_turndown : float
        Their minimum turndown [-].
    """

    design_zone_load: float
    design_coil_load: float
    coil_to_zone_ratio: float
    governing_condition: str
    peak_coil_load: float
    cooling_energy: float
    hours_above_threshold: int
    recommended_capacity: float
    governing: object
    governing_kind: str
    design_loads: dict
    option_name: str
    machine_capacities: tuple[float, ...]
    minimum_turndown: float


def load_energy(load) -> float:
    """Energy of an hourly load over the year [kWh]: the sum of its hours, negatives as 0."""
    return float(np.sum(np.maximum(np.asarray(load, dtype=float), 0.0)))


def load_peak(load) -> float:
    """Largest hourly load of the year [kW] (0 for no hours)."""
    values = np.asarray(load, dtype=float)
    return float(np.max(values)) if values.size else 0.0


def plant_option_specs(specs: tuple[PlantOptionSpec, ...], kind: str):
    """The scenario's plant options of ``kind``, or one 100 % machine when it gives none."""
    return specs or (PlantOptionSpec(f"1 x 100 % {kind}", (1.0,)),)


def coincident_cooling_design(
    units: Sequence[AirHandlerResult],
    distribution_gain_percent: float,
    pickup_percent: float = 0.0,
) -> CoincidentDesign:
    r"""Every air handler at the same design outdoor state; the largest sum governs.

    Parameters
    ----------
    units : sequence of AirHandlerResult
        The air handlers, each with its cooling design points.
    distribution_gain_percent : float
        Pump heat and pipe gains [%] added to the coincident coil load.
    pickup_percent : float, optional
        Morning pick-up allowance [%] on the coil load with its distribution gain
        (:attr:`Scenario.cooling_pickup_allowance_percent`), its own term.

    Returns
    -------
    CoincidentDesign

    Notes
    -----
    .. math::

        Q_{plant} = Q_{coil} (1 + g/100) + Q_{pickup},\quad
        Q_{pickup} = Q_{coil} (1 + g/100)\, p/100

    with the distribution gain :math:`g` and the pick-up allowance :math:`p` [%]
    (common practice, no source).
    """
    factor = 1.0 + distribution_gain_percent / 100.0
    rows = []
    for kind in units[0].cooling_design.points:
        row = {"kind": kind, "condition": units[0].cooling_design.points[kind].label}
        for unit in units:
            loads = unit.cooling_design.points[kind].loads
            row[f"{unit.name}_coil_total_kW"] = loads["coil_total_kW"]
            row[f"{unit.name}_zone_kW"] = zone_load(loads)
        row["coil_total_kW"] = sum(row[f"{u.name}_coil_total_kW"] for u in units)
        row["zone_total_kW"] = sum(row[f"{u.name}_zone_kW"] for u in units)
        row["pickup_percent"] = float(pickup_percent)
        row["pickup_kW"] = row["coil_total_kW"] * factor * pickup_percent / 100.0
        row["plant_kW"] = row["coil_total_kW"] * factor + row["pickup_kW"]
        rows.append(row)
    table = pd.DataFrame(rows).set_index("kind")
    return CoincidentDesign(table, str(table["plant_kW"].idxmax()))


def plant_design_condition(result, kind: str):
    """The design condition that governs a plant of a study: a condition object, not text.

    The cooling plant's is the one whose coincident plant load is largest (the row
    :func:`coincident_cooling_design` picked, kept in the plant's ``design_table``), at
    the scenario's cooling percentage; the heating plant's is the heating condition at
    the scenario's heating percentage. Shown through
    :func:`plantside.charts.labels.condition_text`, so its figures are rounded once,
    from SI, as the header's are.

    Parameters
    ----------
    result : StudyResult
    kind : {"cooling", "heating"}
    """
    scenario = result.scenario
    if kind == "cooling":
        row = str(result.cooling.design_table["plant_kW"].idxmax())
        return result.conditions.cooling(row, scenario.cooling_design_percent)
    if kind == "heating":
        return result.conditions.heating(scenario.heating_design_percent)
    raise ValueError(f"kind must be 'cooling' or 'heating', not {kind!r}")


def view_loads(
    units: Sequence[AirHandlerResult],
    distribution_gain_percent: float,
    air_handler: int | None = None,
) -> ViewLoads:
    """Hourly coil and zone load of one air handler, or of the plant (``air_handler=None``).

    The plant's load is the coincident coil load plus the distribution gain
    (:func:`plantside.plant.loads.plant_load_from_coil_loads`); its zone load is the
    sum of the air handlers' zone loads met.
    """
    if air_handler is not None:
        unit = units[air_handler]
        return ViewLoads(unit.hourly["coil_total_kW"].to_numpy(dtype=float), zone_load(unit.hourly))
    coil = plant_load_from_coil_loads(
        [u.hourly["coil_total_kW"].to_numpy(dtype=float) for u in units],
        distribution_gain_percent,
    )
    return ViewLoads(coil, np.sum([zone_load(u.hourly) for u in units], axis=0))


def _power_terms(loads: Mapping[str, float]) -> dict:
    return {key: float(value) for key, value in loads.items() if key.endswith("_kW")}


def design_load_breakdown(
    units: Sequence[AirHandlerResult],
    kind: str,
    distribution_gain_percent: float | None,
    pickup_percent: float = 0.0,
) -> dict:
    """The design point's power terms [kW] at condition ``kind``, summed over ``units``.

    The distribution gain is its own term (``distribution_gain_kW``) and so is the
    morning pick-up allowance (``pickup_kW``, ``pickup_percent`` [%] of the coil load
    with its distribution gain, as in :func:`coincident_cooling_design`); both are
    included in ``coil_total_kW``. For one air handler pass ``[unit]`` and ``None`` (no
    ``distribution_gain_kW`` or ``pickup_kW`` term then).
    """
    loads: dict[str, float] = {}
    for unit in units:
        for key, value in _power_terms(unit.cooling_design.points[kind].loads).items():
            loads[key] = loads.get(key, 0.0) + value
    if distribution_gain_percent is not None:
        factor = 1.0 + distribution_gain_percent / 100.0
        loads["distribution_gain_kW"] = (factor - 1.0) * loads["coil_total_kW"]
        loads["coil_total_kW"] *= factor
        loads["pickup_kW"] = loads["coil_total_kW"] * pickup_percent / 100.0
        loads["coil_total_kW"] += loads["pickup_kW"]
    return loads


def headline_figures(
    scenario: Scenario,
    units: Sequence[AirHandlerResult],
    conditions,
    cooling_percent: float | None = None,
    air_handler: int | None = None,
    loads: ViewLoads | None = None,
    cooling_option: int = 0,
) -> HeadlineFigures:
    """The headline figures of the plant (``air_handler=None``) or of one air handler.

    Parameters
    ----------
    scenario : Scenario
        Gives the distribution gain [%], the cooling margin [%] and the plant options.
    units : sequence of AirHandlerResult
        Every air handler of the plant, in scenario order.
    conditions : DesignConditions
        The site's design conditions.
    cooling_percent : float, optional
        Annual percentage of the cooling design conditions [%] (default: the
        scenario's).
    air_handler : int, optional
        Index of the air handler whose figures are wanted; None for the plant.
    loads : ViewLoads, optional
        :func:`view_loads` of the same view, when already computed.
    cooling_option : int, optional
        Index of the scenario's cooling plant option whose machines are given
        (``option_name``, ``machine_capacities``); default the first.

    Returns
    -------
    HeadlineFigures
    """
    percent = scenario.cooling_design_percent if cooling_percent is None else cooling_percent
    gain = float(scenario.distribution_gain_percent)
    if loads is None:
        loads = view_loads(units, gain, air_handler)
    if air_handler is None:
        pickup = scenario.cooling_pickup_allowance_percent
        design = coincident_cooling_design(units, gain, pickup)
        kind = design.governing
        design_coil = float(design.table.loc[kind, "plant_kW"])
        design_zone = float(design.table.loc[kind, "zone_total_kW"])
        design_loads = design_load_breakdown(units, kind, gain, pickup)
    else:
        unit = units[air_handler]
        kind = unit.cooling_design.governing
        point = unit.cooling_design.points[kind]
        design_coil = float(point.loads["coil_total_kW"])
        design_zone = float(zone_load(point.loads))
        design_loads = design_load_breakdown([unit], kind, None)
    capacity = float(design_capacity_from_design_load(design_coil, scenario.cooling_margin_percent))
    spec = plant_option_specs(scenario.cooling_options, "cooling")[cooling_option]
    option = PlantOption.from_fractions(
        spec.name, max(capacity, 1e-6), spec.capacity_fractions, spec.minimum_turndown
    )
    return HeadlineFigures(
        design_zone_load=design_zone,
        design_coil_load=design_coil,
        coil_to_zone_ratio=design_coil / design_zone if design_zone > 0 else float("nan"),
        governing_condition=str(units[0].cooling_design.points[kind].label),
        peak_coil_load=load_peak(loads.coil),
        cooling_energy=load_energy(loads.coil),
        hours_above_threshold=int(np.count_nonzero(loads.coil > PART_LOAD_THRESHOLD * capacity)),
        recommended_capacity=capacity,
        governing=conditions.cooling(kind, percent),
        governing_kind=kind,
        design_loads=design_loads,
        option_name=spec.name,
        machine_capacities=tuple(float(c) for c in option.capacities),
        minimum_turndown=float(spec.minimum_turndown),
    )


def outdoor_air_fraction_of(settings) -> float:
    """The minimum outdoor air of ``settings`` as a fraction of the supply air [-], 0..1.

    A fixed minimum outdoor airflow counts as its fraction of the design supply
    airflow; a 100 % outdoor-air unit is 1.
    """
    if settings.all_outdoor_air:
        fraction = 1.0
    elif settings.minimum_outdoor_airflow is not None:
        fraction = float(settings.minimum_outdoor_airflow) / float(settings.supply_airflow)
    else:
        fraction = float(settings.minimum_outdoor_air_fraction)
    return min(max(fraction, 0.0), 1.0)


def control_values(settings) -> dict:
    """The values the views show for an air handler's controls, from its settings (SI).

    ``outdoor_air_fraction`` [-] (:func:`outdoor_air_fraction_of`),
    ``supply_air_temperature`` [°C], ``economizer``, ``economizer_integrated``,
    ``fan_control`` and ``bypass_factor`` [-].
    """
    return {
        "outdoor_air_fraction": outdoor_air_fraction_of(settings),
        "supply_air_temperature": float(settings.supply_drybulb),
        "economizer": str(settings.economizer),
        "economizer_integrated": bool(settings.economizer_integrated),
        "fan_control": str(settings.fan_control),
        "bypass_factor": float(settings.bypass_factor),
    }


def climate_label(scenario: Scenario) -> str:
    """The scenario's climate as the views name it: a bundled site, or ``"file: <path>"``."""
    return scenario.climate if scenario.climate is not None else f"file: {scenario.weather_file}"


def first_recirculating_unit(scenario: Scenario) -> int:
    """Index of the first air handler with return air (the outdoor-air fraction matters there)."""
    for index, spec in enumerate(scenario.air_handlers):
        if not spec.settings.all_outdoor_air:
            return index
    return 0
