"""What a sweep's workers run: one batch of cases, one study each, one row per case.

:func:`run_batch` runs each case with :func:`plantside.study.run.run_study` and keeps
its headline results (:func:`case_headlines`); a case the model refuses is a row with
status ``failed`` and the error's field and message. Weather CSVs are read once per
process (:func:`_weather`). The local pool preloads this module in its forkserver
(:mod:`plantside.study.sweep_local`), so a worker starts with it imported.
"""

from __future__ import annotations

from collections.abc import Sequence
from functools import lru_cache
from pathlib import Path

import numpy as np
import pandas as pd

from plantside.climate.weather import Weather
from plantside.errors import NAME_EXCERPT_CHARS, PlantsideError, excerpt
from plantside.study.figures import plant_option_specs
from plantside.study.run import GENERAL_CAUTIONS, StudyResult, heating_load_columns, run_study
from plantside.study.scenario import Scenario
from plantside.study.sweep_cases import Sweep, SweepCase
from plantside.study.water_side_run import run_water_side

__all__ = [
    "CASE_FAILED",
    "CASE_OK",
    "STATUS_COLUMNS",
    "WORKER_DIED",
    "case_headlines",
    "case_row",
    "failed_rows",
    "headline_columns",
    "run_batch",
    "typed_table",
    "water_side_columns",
    "water_side_headlines",
]

#: Share of the design capacity above which hours are counted (a plant running near
#: full load; common practice for a "hours near capacity" figure, no source).
NEAR_CAPACITY_FRACTION = 0.75
#: Columns after the results: ``status`` (``ok`` or ``failed``), the failed case's
#: ``error_field`` and ``error_message`` (empty for a case that ran).
STATUS_COLUMNS = ("status", "error_field", "error_message")
CASE_OK = "ok"
CASE_FAILED = "failed"
#: Longest error message kept in the table [characters].
MAX_ERROR_CHARS = 200
#: ``error_field`` and ``error_message`` of the cases of a batch whose worker died twice.
WORKER_DIED = (
    "worker",
    "worker died: the process running this case's batch was killed twice (out of memory, "
    "or stopped from outside); rerun with retry of failed cases to try again",
)


# ---------------------------------------------------------------------------------------
# one case, one batch (what the workers run)
# ---------------------------------------------------------------------------------------
#: A sweep's water-side columns per cooling option (``[sweep] water_side = true``), each
#: followed by ``[option name]``, and the water side's option column each one takes
#: (:func:`plantside.study.water_side_run.run_water_side`): the electricity of the
#: chillers, chilled-water and condenser pumps and tower fans [kWh], the seasonal plant
#: COP (cooling delivered / that electricity) and the chiller starts in the year.
WATER_SIDE_COOLING_COLUMNS = {
    "chilled_water_plant_electricity_kWh": "plant_kWh",
    "chilled_water_plant_seasonal_cop": "seasonal_plant_cop",
    "chiller_starts": "machine_starts",
}
#: The same per heating option: boiler fuel [kWh], hot-water pump electricity [kWh],
#: seasonal boiler efficiency (heat delivered / fuel) and boiler starts in the year.
WATER_SIDE_HEATING_COLUMNS = {
    "heating_fuel_kWh": "fuel_kWh",
    "hot_water_pump_electricity_kWh": "pump_kWh",
    "boiler_seasonal_efficiency": "seasonal_efficiency",
    "boiler_starts": "machine_starts",
}


def water_side_columns(scenario: Scenario) -> list[str]:
    """The water-side columns of a sweep table, for the plant options of ``scenario``."""
    columns = []
    for kind, per_option in (
        ("cooling", WATER_SIDE_COOLING_COLUMNS),
        ("heating", WATER_SIDE_HEATING_COLUMNS),
    ):
        specs = scenario.cooling_options if kind == "cooling" else scenario.heating_options
        for spec in plant_option_specs(specs, kind):
            columns += [f"{name}[{spec.name}]" for name in per_option]
    return columns


def water_side_headlines(result: StudyResult) -> dict:
    """Each plant option's water-side year of one study, keyed as
    :func:`water_side_columns` (NaN where an option has no year: heating options when
    no hour needs heat)."""
    water = run_water_side(result)
    row = dict.fromkeys(water_side_columns(result.scenario), np.nan)
    options = water.options if water is not None else pd.DataFrame()
    for record in options.to_dict(orient="records"):
        per_option = (
            WATER_SIDE_COOLING_COLUMNS
            if record["plant"] == "cooling"
            else WATER_SIDE_HEATING_COLUMNS
        )
        for name, source in per_option.items():
            value = record.get(source)
            row[f"{name}[{record['option']}]"] = np.nan if value is None else float(value)
    return row


def headline_columns(scenario: Scenario, water_side: bool = False) -> list[str]:
    """Result columns of the sweep table for air handlers named as in ``scenario``
    (and its plant options' water-side columns with ``water_side``)."""
    per_unit = (
        "design_coil_total_kW",
        "design_coil_sensible_kW",
        "design_coil_latent_kW",
        "governing_condition",
        "annual_peak_coil_total_kW",
        "annual_coil_total_kWh",
        "heating_design_kW",
    )
    names = [f"{c}[{spec.settings.name}]" for spec in scenario.air_handlers for c in per_unit]
    return [
        *names,
        "cooling_governing_condition",
        "cooling_design_load_kW",
        "cooling_design_capacity_kW",
        "cooling_annual_peak_kW",
        "cooling_sum_of_coil_peaks_kW",
        "cooling_energy_kWh",
        "cooling_hours_with_load",
        "cooling_hours_above_75_percent_capacity",
        "cooling_hours_above_capacity",
        "heating_design_load_kW",
        "heating_design_capacity_kW",
        "heating_annual_peak_kW",
        "heating_energy_kWh",
        "caution_count",
        *(water_side_columns(scenario) if water_side else []),
    ]


def case_headlines(result: StudyResult, water_side: bool = False) -> dict:
    """The headline results of one study, SI, keyed as :func:`headline_columns`.

    Parameters
    ----------
    result : StudyResult
        A finished :func:`plantside.study.run.run_study`.
    water_side : bool
        Also each plant option's water-side year (:func:`water_side_headlines`).

    Returns
    -------
    dict
        Per air handler (``name`` in brackets): design coil total, sensible and latent
        load [kW] at its governing condition, the governing condition's kind, the
        year's peak coil load [kW] and coil energy [kWh], the heating design load
        [kW]. For the plants: governing condition, design load and design capacity
        (with margin) [kW], the year's peak [kW] and energy [kWh], the sum of the
        coil peaks [kW], hours with load, hours above 75 % of the design capacity and
        above it [h]; the number of cautions beyond the general ones.
    """
    row = {}
    for unit in result.air_handlers:
        design = unit.cooling_design
        governing = design.points[design.governing]
        tag = f"[{unit.name}]"
        row[f"design_coil_total_kW{tag}"] = float(governing.loads["coil_total_kW"])
        row[f"design_coil_sensible_kW{tag}"] = float(governing.loads["coil_sensible_kW"])
        row[f"design_coil_latent_kW{tag}"] = float(governing.loads["coil_latent_kW"])
        row[f"governing_condition{tag}"] = str(design.governing)
        row[f"annual_peak_coil_total_kW{tag}"] = float(unit.hourly["coil_total_kW"].max())
        row[f"annual_coil_total_kWh{tag}"] = float(unit.hourly["coil_total_kW"].sum())
        row[f"heating_design_kW{tag}"] = float(
            sum(unit.heating_design.loads[c] for c in heating_load_columns)
        )
    cooling, heating = result.cooling, result.heating
    load = cooling.hourly_load
    capacity = cooling.design_capacity
    row["cooling_governing_condition"] = str(cooling.governing)
    row["cooling_design_load_kW"] = float(cooling.design_load)
    row["cooling_design_capacity_kW"] = float(capacity)
    row["cooling_annual_peak_kW"] = cooling.annual_peak
    row["cooling_sum_of_coil_peaks_kW"] = float(
        sum(u.hourly["coil_total_kW"].max() for u in result.air_handlers)
    )
    row["cooling_energy_kWh"] = cooling.annual_energy
    row["cooling_hours_with_load"] = int(np.count_nonzero(load > 0.0))
    row["cooling_hours_above_75_percent_capacity"] = int(
        np.count_nonzero(load > NEAR_CAPACITY_FRACTION * capacity)
    )
    row["cooling_hours_above_capacity"] = int(np.count_nonzero(load > capacity))
    row["heating_design_load_kW"] = float(heating.design_load)
    row["heating_design_capacity_kW"] = float(heating.design_capacity)
    row["heating_annual_peak_kW"] = heating.annual_peak
    row["heating_energy_kWh"] = heating.annual_energy
    row["caution_count"] = len(result.cautions) - len(GENERAL_CAUTIONS)
    if water_side:
        row |= water_side_headlines(result)
    return row


@lru_cache(maxsize=8)
def _weather(weather_file: str, digest: str, units, altitude, fill_gaps) -> Weather:
    """A weather CSV read once per process (``digest`` keys an edited file afresh)."""
    from plantside.climate.weather_csv import read_weather_csv

    return read_weather_csv(weather_file, units=units, altitude=altitude, fill_gaps=fill_gaps)


def _weather_for(scenario: Scenario, digest: str) -> Weather:
    if scenario.climate is not None:
        return scenario.load_weather()  # bundled: cached per process in plantside.climate.bundled
    path = Path(scenario.weather_file)
    if not path.is_absolute():
        path = Path(scenario.base_dir) / path
    altitude = scenario.altitude
    if altitude is not None and str(scenario.unit_system) == "IP":
        from plantside.units import to_display

        altitude = float(to_display("length", altitude, "IP")[0])
    return _weather(str(path), digest, scenario.weather_units, altitude, scenario.fill_gaps)


def case_row(sweep: Sweep, case: SweepCase) -> dict:
    row = {"case_index": case.index, "case_id": case.case_id, "climate": case.climate.label}
    for axis, value in zip(sweep.axes, case.values, strict=True):
        row[axis.column] = np.nan if value is None else value
    return row


def _failure(error: BaseException) -> dict:
    """``status``, ``error_field``, ``error_message`` of a case the model refused."""
    field = getattr(error, "field", None)
    if field is None:  # a file that cannot be used: the file is the field
        field = getattr(error, "source", None) or getattr(error, "filename", None) or ""
    return {
        "status": CASE_FAILED,
        "error_field": excerpt(field, NAME_EXCERPT_CHARS),
        "error_message": excerpt(error, MAX_ERROR_CHARS),
    }


def run_batch(sweep: Sweep, cases: Sequence[SweepCase]) -> pd.DataFrame:
    """Run a batch of cases one study each; one row per case (what a worker does).

    A case the model refuses (any :class:`plantside.errors.PlantsideError`, or a file
    it cannot read) is a row with status ``failed``, the error's field and message
    (at most ``MAX_ERROR_CHARS``) and no results; the batch goes on. Errors cross
    process and cluster boundaries as these plain values (our exception types take
    several constructor arguments and do not unpickle).
    """
    rows = []
    ran = {"status": CASE_OK, "error_field": "", "error_message": ""}
    for case in cases:
        try:
            scenario = sweep.scenario_for(case)
            weather = _weather_for(scenario, case.climate.digest)
            result = run_study(scenario, weather)
        except (PlantsideError, OSError) as error:  # a bad file, a refused value
            rows.append(case_row(sweep, case) | _failure(error))
            continue
        try:
            headlines = case_headlines(result, sweep.water_side)
        except (PlantsideError, OSError) as error:  # refused on the water side
            rows.append(case_row(sweep, case) | _failure(error))
            continue
        rows.append(case_row(sweep, case) | headlines | ran)
    return typed_table(pd.DataFrame(rows), sweep)


def failed_rows(sweep: Sweep, cases: Sequence[SweepCase], field: str, message: str):
    """Rows of ``cases`` recorded failed with one ``field`` and ``message`` (no results)."""
    failure = {"status": CASE_FAILED, "error_field": field, "error_message": message}
    return typed_table(pd.DataFrame([case_row(sweep, case) | failure for case in cases]), sweep)


def typed_table(frame: pd.DataFrame, sweep: Sweep) -> pd.DataFrame:
    """Fixed column order and dtypes, so parts from any worker concatenate cleanly."""
    columns = ["case_index", "case_id", "climate", *[a.column for a in sweep.axes]]
    results = headline_columns(sweep.base, sweep.water_side)
    frame = frame.reindex(columns=[*columns, *results, *STATUS_COLUMNS])
    for axis in sweep.axes:
        frame[axis.column] = frame[axis.column].astype(float)
    for column in results:  # a part of failed cases only has no value to type them by
        text = column.startswith(("governing_condition", "cooling_governing_condition"))
        if text:
            frame[column] = frame[column].astype("str")  # missing stays missing
        elif frame[column].isna().any():
            frame[column] = frame[column].astype(float)
    for column in STATUS_COLUMNS:
        frame[column] = frame[column].fillna("").astype("str")
    return frame


#: A Dask worker's periodic callbacks a sweep does without: the statistical profiler
#: samples the running task's stack every 10 ms (``distributed.worker.profile``), which
#: takes the interpreter from the batch each time.
QUIET_CALLBACKS = ("profile", "profile-cycle")
#: Whether :func:`dask_setup` applied plantside's allocator settings in this worker.
ALLOCATOR_KEPT = False


def dask_setup(worker) -> None:
    """Dask's preload hook (``dask worker ... --preload plantside.study.sweep_worker``).

    Stops the worker's statistical profiler (:data:`QUIET_CALLBACKS`): a batch is numpy
    work that holds the interpreter, and the profiler's samples slowed it. Measured on a
    2-core machine, 200 cases on a 2-worker LocalCluster against one process: 1.59-1.62x
    with the profiler, 1.66-1.72x without (the process pool: 1.82-1.87x). The worker's
    memory monitor and heartbeats stay as Dask sets them. Any worker may still profile
    when started without this preload.

    Also keeps freed array memory for reuse (:mod:`plantside.air.heap`) over the
    allocator setting Dask's configuration gives its workers (a sweep case 12 % slower
    with it); a setting from the worker's own environment is kept. Whether it was
    applied is left in :data:`ALLOCATOR_KEPT`.
    """
    global ALLOCATOR_KEPT
    for name in QUIET_CALLBACKS:
        callback = worker.periodic_callbacks.pop(name, None)
        if callback is not None:
            callback.stop()
    import os

    import dask

    from plantside.air.heap import keep_freed_memory, without_settings_of

    dask_settings = dask.config.get("distributed.nanny.pre-spawn-environ", default={}) or {}
    ALLOCATOR_KEPT = keep_freed_memory(without_settings_of(os.environ, dask_settings))
