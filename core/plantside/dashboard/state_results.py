"""The dashboard's results: the recompute of what a change affects, and their assembly.

:class:`ClimatePart`, :class:`DesignPart`, :class:`UnitResult` and
:class:`DashboardResult` (one consistent set of results for one set of inputs), and
:class:`ResultAssembly`, the part of :class:`plantside.dashboard.state.DashboardState`
that computes them: the climate (weather placed at the site, design conditions; cached),
each air handler's zone loads (cached), design points, outdoor-air sweep and hourly year
(reused where the change left them alone), and the view's figures and loads by the study
layer's functions, as the command line computes them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from plantside.charts.study_frames import ChartView
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.design_conditions import design_conditions_from_weather
from plantside.climate.weather import Weather
from plantside.dashboard.state_inputs import DashboardInputs, UnitInputs
from plantside.errors import InputRangeError
from plantside.study.design_sweep import DESIGN_KINDS, design_outdoor_air_sweep
from plantside.study.figures import HeadlineFigures, ViewLoads, headline_figures, view_loads
from plantside.study.run import AirHandlerResult, StudyResult, assemble_plants, run_air_handler

__all__ = ["ClimatePart", "DashboardResult", "DesignPart", "ResultAssembly", "UnitResult"]


@dataclass(frozen=True, eq=False)
class ClimatePart:
    """Weather of the site and its annual design conditions."""

    weather: Weather
    conditions: object
    source: str


@dataclass(frozen=True, eq=False)
class DesignPart:
    """One air handler at the three cooling design conditions, and its sweep.

    ``sweep`` maps a condition label to the coil total load [kW] at each of
    :data:`SWEEP_FRACTIONS`.
    """

    summary: object
    governing: object
    conditions: tuple
    sweep: dict[str, np.ndarray]


@dataclass(frozen=True, eq=False)
class UnitResult:
    """One air handler's results: design part and hourly year.

    ``study`` is the study layer's result of this air handler
    (:func:`plantside.study.run.run_air_handler`), from which the headline figures
    are computed; ``hourly`` is its hourly year.
    """

    name: str
    inputs: UnitInputs
    design: DesignPart
    hourly: pd.DataFrame
    study: AirHandlerResult


@dataclass(frozen=True, eq=False)
class DashboardResult:
    """A consistent set of results for one set of inputs.

    Attributes
    ----------
    inputs : DashboardInputs
    climate : ClimatePart
    units : tuple of UnitResult
        One per air handler, in scenario order.
    view : str
        "air_handler" or "plant": what ``figures``, ``coil_load`` and
        ``zone_load`` describe.
    figures : plantside.study.figures.HeadlineFigures
    coil_load, zone_load : numpy.ndarray
        Hourly coil and zone load of the view [kW].
    design_loads : dict
        The design point's power terms of the view [kW] (``DesignPoint.loads``
        keys ending in ``_kW``; summed over air handlers for the plant, with
        ``distribution_gain_kW`` added and included in ``coil_total_kW``).
    machine_capacities : numpy.ndarray
        Capacities of the machines of the first cooling plant option [kW].
    minimum_turndown : float
        Their minimum turndown [-].
    cautions : tuple of str
    """

    inputs: DashboardInputs
    climate: ClimatePart
    units: tuple[UnitResult, ...]
    view: str
    figures: HeadlineFigures
    coil_load: np.ndarray
    zone_load: np.ndarray
    design_loads: dict
    machine_capacities: np.ndarray
    minimum_turndown: float
    cautions: tuple[str, ...] = field(default=())

    @property
    def unit(self) -> UnitResult:
        """The air handler the controls show."""
        return self.units[self.inputs.air_handler]

    @property
    def chart_view(self) -> ChartView:
        """What the charts (and their derivations) draw of this result: the study
        layer's figures and loads of the view, and the air handler shown."""
        shown = self.unit
        return ChartView(
            plant=self.view == "plant",
            figures=self.figures,
            loads=ViewLoads(self.coil_load, self.zone_load),
            unit=shown.study,
            sweep=shown.design.sweep,
            outdoor_air_fraction=shown.inputs.outdoor_air_fraction,
            weather=self.climate.weather,
            climate=self.climate.source,
        )


class ResultAssembly:
    """The recompute and the assembly of results.

    Part of :class:`plantside.dashboard.state.DashboardState` (it reads the state's
    ``scenario``, ``view``, ``uploaded`` and its caches ``_climates`` and
    ``_zone_loads``).
    """

    # ---------------------------------------------------------------- climates
    def _climate_part(
        self, climate: str, weather: Weather | None = None, cache: bool = True
    ) -> ClimatePart:
        """Weather and design conditions of ``climate``, placed as the command line does.

        The scenario's own climate and an uploaded year take the scenario's site
        latitude, longitude and time zone where given
        (:meth:`plantside.study.scenario.Scenario.located_weather`, as
        :meth:`~plantside.study.scenario.Scenario.load_weather`); another bundled
        site is where that site is.
        """
        cached = self._climates.get(climate) if cache else None
        if cached is not None:
            return cached
        if weather is None:
            weather = self.uploaded.get(climate) or load_bundled_climate(climate)
        if climate == self.scenario.climate or climate not in BUNDLED_CLIMATES:
            weather = self.scenario.located_weather(weather)
        part = ClimatePart(weather, design_conditions_from_weather(weather), climate)
        if cache:
            self._climates[climate] = part
        return part

    def _unit_zone_loads(self, index: int, climate: ClimatePart):
        key = (climate.source, index)
        if key not in self._zone_loads:
            self._zone_loads[key] = self.scenario.zone_loads(index, climate.weather)
        return self._zone_loads[key]

    # ----------------------------------------------------------------- compute
    def _compute(self, inputs: DashboardInputs, previous: DashboardResult | None, scope: str):
        """Results for ``inputs``, reusing parts of ``previous`` the change left alone.

        ``scope``: "all"/"climate" (everything), "design" (design parts of every
        air handler), "unit" (design part and year of the air handler shown).
        """
        if (
            previous is None
            or scope in ("all", "climate")
            or previous.climate.source != inputs.climate
        ):
            climate = self._climate_part(inputs.climate)
            previous = None
        else:
            climate = previous.climate
        units = []
        for index, spec in enumerate(self.scenario.air_handlers):
            unit_inputs = inputs.units[index]
            old = previous.units[index] if previous is not None else None
            reuse_year = old is not None and old.inputs == unit_inputs
            reuse_design = reuse_year and scope != "design"
            if reuse_design:
                units.append(old)
                continue
            settings = unit_inputs.apply(spec.settings)
            zone_loads = self._unit_zone_loads(index, climate)
            study = run_air_handler(
                settings,
                zone_loads,
                climate.weather,
                climate.conditions,
                inputs.design_percent,
                self.scenario.heating_design_percent,
                hourly=old.hourly if reuse_year else None,
            )
            summary = study.cooling_design
            design = DesignPart(
                summary,
                summary.points[summary.governing],
                tuple(
                    climate.conditions.cooling(kind, inputs.design_percent) for kind in DESIGN_KINDS
                ),
                design_outdoor_air_sweep(
                    settings, zone_loads, climate.conditions, inputs.design_percent
                ),
            )
            units.append(UnitResult(spec.settings.name, unit_inputs, design, study.hourly, study))
        return self._assemble(inputs, climate, tuple(units))

    def plants(self, result: DashboardResult | None = None) -> StudyResult:
        """The cooling and heating plants of ``result`` (default: the one on show).

        The study's own :func:`plantside.study.run.assemble_plants` of the air handlers'
        years, with the design condition and margins set on the page (as
        ``plantside design`` of the saved scenario gives them). Computed when first
        asked for (the plant's part of the page), once per result.
        """
        result = self.result if result is None else result
        cache = self.__dict__.setdefault("_plants", {})
        key = id(result)
        if key not in cache or cache[key][0] is not result:
            if len(cache) > 4:
                cache.clear()
            cache[key] = (
                result,
                assemble_plants(
                    result.inputs.plant_scenario(self.scenario),
                    result.climate.weather,
                    result.climate.conditions,
                    tuple(unit.study for unit in result.units),
                ),
            )
        return cache[key][1]

    def _assemble(self, inputs, climate, units) -> DashboardResult:
        """The view's figures and loads, by the study layer's functions (as the CLI's)."""
        scenario = inputs.plant_scenario(self.scenario)  # with the margins set on the page
        studies = [unit.study for unit in units]
        index = inputs.air_handler if self.view == "air_handler" else None
        loads = view_loads(studies, scenario.distribution_gain_percent, index)
        figures = headline_figures(
            scenario,
            studies,
            climate.conditions,
            inputs.design_percent,
            index,
            loads,
            cooling_option=inputs.cooling_option,
        )
        numbers = (
            figures.design_zone_load,
            figures.design_coil_load,
            figures.peak_coil_load,
            figures.cooling_energy,
            figures.recommended_capacity,
        )
        if not (np.all(np.isfinite(loads.coil)) and np.all(np.isfinite(loads.zone))) or not all(
            math.isfinite(x) for x in (*numbers, *figures.design_loads.values())
        ):
            # never draw or show a NaN: refuse the result, keep the last valid one
            raise InputRangeError(
                "results",
                "the model gave a non-finite load for these inputs; the last valid result "
                "is kept (please report the inputs)",
                "finite loads",
            )
        cautions = []
        for unit in units:
            for text in (*unit.design.governing.cautions, *unit.hourly.attrs.get("cautions", ())):
                named = f"{unit.name}: {text}"  # which air handler, as the command line says
                if named not in cautions:
                    cautions.append(named)
        return DashboardResult(
            inputs=inputs,
            climate=climate,
            units=units,
            view=self.view,
            figures=figures,
            coil_load=loads.coil,
            zone_load=loads.zone,
            design_loads=figures.design_loads,
            machine_capacities=np.asarray(figures.machine_capacities, dtype=float),
            minimum_turndown=figures.minimum_turndown,
            cautions=tuple(cautions),
        )
