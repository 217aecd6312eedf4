"""The five study charts of one view (the plant or one air handler), from study results.

Shared by the dashboard and ``plantside charts``: a :class:`ChartView` (the study
figures and loads of a view, the air handler shown, its design sweep) goes in,
:func:`chart_frames` gives the tidy frames each builder takes and
:func:`study_chart` draws them with the view's titles. Nothing here computes
physics or holds state; :func:`study_chart_views` builds the views of a whole
study with the study layer's functions, for the command line.
"""

from __future__ import annotations

from collections.abc import MutableMapping
from dataclasses import dataclass

import numpy as np
import pandas as pd

from plantside.charts import frames as chart_frames_module
from plantside.charts.design_breakdown import design_breakdown_chart
from plantside.charts.labels import export_stamp, inputs_stamp
from plantside.charts.load_duration import load_distribution_chart
from plantside.charts.oa_sweep import oa_sweep_chart
from plantside.charts.psychrometric import psychrometric_chart
from plantside.charts.year_scatter import year_scatter_chart
from plantside.plant.part_load import no_load_threshold_from_loads
from plantside.plant.staging import stage_machines
from plantside.study.design_sweep import design_outdoor_air_sweep
from plantside.study.figures import (
    HeadlineFigures,
    ViewLoads,
    headline_figures,
    outdoor_air_fraction_of,
    view_loads,
)

__all__ = [
    "CHARTS",
    "ChartView",
    "chart_frames",
    "study_chart",
    "study_chart_views",
    "view_stamp",
    "year_table",
]

#: The five charts: key -> file-name stem of their exports.
CHARTS = {
    "design": "design-coil-load",
    "year": "year-coil-vs-zone",
    "distribution": "load-distribution",
    "psychrometric": "psychrometric-process",
    "sweep": "coil-load-vs-outdoor-air",
}

_f = chart_frames_module


@dataclass(frozen=True, eq=False)
class ChartView:
    """What the five charts of one view draw.

    Attributes
    ----------
    plant : bool
        True for the plant view (loads and figures of the whole plant).
    figures : HeadlineFigures
        :func:`plantside.study.figures.headline_figures` of the view.
    loads : ViewLoads
        Hourly coil and zone load of the view [kW].
    unit : AirHandlerResult
        The air handler shown (psychrometric process, outdoor-air sweep, the
        economizer modes of the plant's year chart).
    sweep : dict of str to numpy.ndarray
        Its design coil load [kW] against outdoor-air fraction
        (:func:`plantside.study.design_sweep.design_outdoor_air_sweep`).
    outdoor_air_fraction : float
        Its minimum outdoor-air fraction as set [-] (the sweep's marker).
    weather : Weather
        The site's year (psychrometric background).
    climate : str
        Name of the climate (key of the cached background).
    """

    plant: bool
    figures: HeadlineFigures
    loads: ViewLoads
    unit: object
    sweep: dict
    outdoor_air_fraction: float
    weather: object
    climate: str


#: Name of the plant's load (the air handlers' coil loads plus the distribution gain).
PLANT_LOAD = "Plant load"
#: The one "mode" of the plant's hours on the year chart (they have no one economizer mode).
PLANT_HOURS = "Hours with plant load"


def year_table(view: ChartView) -> pd.DataFrame:
    """The hourly table chart 2 bins: the air handler's year, or the plant's loads.

    The plant's hours are coloured as one (the economizer modes are those of each air
    handler, not of the plant), and the hours left out are those with no plant load, as
    the load-distribution chart counts them (:func:`no_load_threshold_from_loads`).
    """
    if not view.plant:
        return view.unit.hourly
    coil, zone = view.loads
    return pd.DataFrame(
        {
            "coil_total_kW": coil,
            "zone_sensible_kW": zone,
            "zone_latent_kW": np.zeros_like(zone),
            "economizer_mode": np.full(coil.shape, PLANT_HOURS),
            "operating": coil > no_load_threshold_from_loads(coil),
        }
    )


def _psychrometric(view: ChartView, system: str, cache: MutableMapping | None) -> dict:
    weather = view.weather
    states = view.unit.cooling_design.points[view.unit.cooling_design.governing].states
    extent = _f.psychrometric_extent(
        np.concatenate([weather.drybulb, states["drybulb_C"].to_numpy()]),
        np.concatenate([weather.humidity_ratio, states["humidity_ratio_kgkg"].to_numpy()]),
        system,
    )
    pressure = float(np.mean(weather.pressure))
    key = (view.climate, system, extent)
    cache = {} if cache is None else cache
    if key not in cache:  # the site's lines and hours: reused while the site stays
        cache.clear()
        cache[key] = (
            _f.psychrometric_grid_frame(pressure, system, extent),
            _f.outdoor_density_frame(weather.drybulb, weather.humidity_ratio, system, extent),
        )
    grid, density = cache[key]
    return {
        "grid": grid,
        "process": _f.process_frame(states, system, pressure),
        "density": density,
    }


def chart_frames(
    name: str, view: ChartView, system: str, cache: MutableMapping | None = None
) -> dict:
    """The frames chart ``name`` (a key of :data:`CHARTS`) draws for ``view``.

    Parameters
    ----------
    name : str
        ``"design"``, ``"year"``, ``"distribution"``, ``"psychrometric"`` or ``"sweep"``.
    view : ChartView
    system : {"SI", "IP"}
        Display units of the frames.
    cache : dict, optional
        Holds the psychrometric background of the last site and unit system, so it is
        framed once (the caller owns it; without one it is framed every time).

    Returns
    -------
    dict of str to pandas.DataFrame
        The builder's arguments by name.
    """
    figures = view.figures
    if name == "design":
        frame = _f.design_breakdown_frame(figures.design_loads, system)
        if view.plant:  # the air handlers' coils plus the distribution gain: the plant's load
            frame["component"] = frame["component"].replace({"Coil load": PLANT_LOAD})
        return {"frame": frame}
    if name == "year":
        frame = _f.year_scatter_frame(year_table(view), system)
        if view.plant:
            frame.attrs["off_label"] = "hours with no plant load"
            frame.attrs["colour_label"] = "Plant"
            frame.attrs["load_label"] = PLANT_LOAD
        return {"frame": frame}
    if name == "distribution":
        coil, zone = view.loads
        capacities = np.asarray(figures.machine_capacities, dtype=float)
        staged = stage_machines(np.maximum(coil, 0.0), capacities, figures.minimum_turndown)
        lines = _f.capacity_lines_frame(capacities, system)
        if not view.plant:  # one air handler's coil, not a plant
            lines["line"] = lines["line"].replace({"Plant capacity": "Recommended coil capacity"})
        else:  # the stage lines are the machines of one plant option: name it
            stages = lines["kind"] == "stage"
            lines.loc[stages, "line"] = [
                f"{line} ({figures.option_name})" for line in lines.loc[stages, "line"]
            ]
        weights = _f.iplv_weights_frame(staged.machine_load, capacities, system)
        weights.attrs["option"] = figures.option_name
        return {
            "curves": _f.load_duration_frame(
                {("Plant load" if view.plant else "Coil load"): coil, "Zone load": zone}, system
            ),
            "lines": lines,
            "bins": _f.part_load_frame(coil, figures.recommended_capacity, system),
            "weights": weights,
        }
    if name == "psychrometric":
        return _psychrometric(view, system, cache)
    if name == "sweep":
        points = next(iter(view.sweep.values())).size
        # one point: an air handler without return air, swept at its own (100 %) fraction
        fractions = (
            np.linspace(0.0, 1.0, points) if points > 1 else np.full(1, view.outdoor_air_fraction)
        )
        sweep = _f.oa_sweep_frame(fractions, view.sweep, system)
        return {"sweep": sweep, "marker": _f.oa_marker_frame(sweep, view.outdoor_air_fraction)}
    raise KeyError(f"unknown chart {name!r}; one of {', '.join(CHARTS)}")


def study_chart(name: str, frames: dict, system: str, view: ChartView, width: int | None = None):
    """Chart ``name`` drawn from ``frames`` (:func:`chart_frames`, maybe A/B combined),
    ``width`` [px] its plot width (default: the builders' own, the width of the exports)."""
    unit = view.unit.name
    who = "the plant" if view.plant else unit
    if name == "design":
        return design_breakdown_chart(
            frames["frame"],
            system,
            title=(
                "Design plant load, from the zone loads to the plant"
                if view.plant
                else f"Design coil load of {who}, from zone to coil"
            ),
            width=width,
        )
    if name == "year":
        return year_scatter_chart(
            frames["frame"],
            system,
            title=(
                "The year hour by hour: plant load against zone load"
                if view.plant
                else f"The year hour by hour: coil load against zone load, {who}"
            ),
            width=width,
        )
    if name == "distribution":
        return load_distribution_chart(
            frames["curves"],
            frames["lines"],
            frames["bins"],
            frames["weights"],
            system=system,
            title=(
                f"How the year's load spreads over the capacity, {who} "
                f"(plant option {view.figures.option_name})"
                if view.plant
                else f"How the year's load spreads over the capacity, {who}"
            ),
            width=width,
        )
    if name == "psychrometric":
        return psychrometric_chart(
            frames["grid"],
            frames["process"],
            frames["density"],
            system=system,
            title=f"Design process of {unit} on the psychrometric chart",
            width=width,
        )
    return oa_sweep_chart(
        frames["sweep"],
        frames["marker"],
        system=system,
        title=f"Design coil load of {unit} against outdoor-air fraction",
        width=width,
    )


def study_chart_views(result, climate: str, shown: int = 0) -> list[tuple[str | None, ChartView]]:
    """The plant view, then every air handler's view, of a study as the scenario sets it.

    Parameters
    ----------
    result : StudyResult
        :func:`plantside.study.run.run_study` of the scenario.
    climate : str
        Name of its climate (:func:`plantside.study.figures.climate_label`).
    shown : int
        Air handler the plant view shows with it (psychrometric and sweep charts).

    Returns
    -------
    list of (int or None, ChartView)
        ``(None, plant view)`` first, then ``(index, view)`` per air handler.
    """
    scenario = result.scenario
    units = result.air_handlers
    gain = float(scenario.distribution_gain_percent)
    percent = scenario.cooling_design_percent
    sweeps = {}

    def view(index: int | None) -> ChartView:
        unit_index = shown if index is None else index
        if unit_index not in sweeps:
            sweeps[unit_index] = design_outdoor_air_sweep(
                units[unit_index].settings,
                scenario.zone_loads(unit_index, result.weather),
                result.conditions,
                percent,
            )
        loads = view_loads(units, gain, index)
        return ChartView(
            plant=index is None,
            figures=headline_figures(scenario, units, result.conditions, percent, index, loads),
            loads=loads,
            unit=units[unit_index],
            sweep=sweeps[unit_index],
            outdoor_air_fraction=outdoor_air_fraction_of(units[unit_index].settings),
            weather=result.weather,
            climate=climate,
        )

    return [(None, view(None))] + [(index, view(index)) for index in range(len(units))]


def view_stamp(scenario, view: ChartView, when: str) -> str:
    """The export stamp of ``view`` with the scenario's own inputs (the dashboard's stamp
    before any control is moved), ``when`` the time as text."""
    system = scenario.unit_system.value
    units = [(spec.settings, spec.settings) for spec in scenario.air_handlers]
    shown = next(
        (i for i, spec in enumerate(scenario.air_handlers) if spec.settings == view.unit.settings),
        0,
    )
    inputs = inputs_stamp(
        view.climate,
        scenario.cooling_design_percent,
        units,
        shown=shown,
        plant_view=view.plant,
        system=system,
    )
    return export_stamp(scenario.title, view.plant, inputs, view.figures.governing, system, when)
