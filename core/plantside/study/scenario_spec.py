"""What a scenario holds, in SI: :class:`Scenario` and its parts.

:class:`Scenario`, :class:`AirHandlerSpec` and :class:`PlantOptionSpec`: the study as
objects (site and climate, air handlers with their zone loads, plant options to
compare) and what they compute from themselves: the site's weather, each air handler's
zone loads, the morning pick-up allowance. Reading a file into them is
:mod:`plantside.study.scenario_read`; writing one back is
:mod:`plantside.study.scenario_write`.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path

from plantside.air_handler.year import AirHandlerSettings
from plantside.air_handler.zone_load_csv import read_zone_loads_csv
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel
from plantside.climate.bundled import load_bundled_climate
from plantside.climate.weather import Weather
from plantside.climate.weather_csv import read_weather_csv
from plantside.errors import InputFileError, InputRangeError, ScenarioError
from plantside.plant.staging import DEFAULT_MINIMUM_TURNDOWN
from plantside.study.scenario_fields import _resolve
from plantside.study.solar_gains import zone_with_solar_gain
from plantside.study.water_side import WaterSideSpec
from plantside.units import UnitSystem, to_display

__all__ = [
    "CURVE_FIELDS",
    "DEFAULT_PICKUP_PERCENT",
    "AirHandlerSpec",
    "PlantOptionSpec",
    "Scenario",
]

#: A cooling option's chiller curves and their number of coefficients (all or none).
CURVE_FIELDS = {"capacity_curve": 6, "efficiency_curve": 6, "part_load_curve": 3}


#: Morning pick-up allowance on the plant's design load [%]: on the heating plant where an
#: air handler sets its zone back at night, on the cooling plant where an air handler's fan
#: is off when unoccupied (the zone floats up overnight and is pulled down in the morning)
#: (common practice, no source: recovering the set-back in about an hour or two; a
#: licensed engineer sets it from the building's mass and the pick-up period).
DEFAULT_PICKUP_PERCENT = 10.0


@dataclass(frozen=True)
class PlantOptionSpec:
    """One plant arrangement to compare: machine sizes as fractions of design capacity.

    Parameters
    ----------
    name : str
        Label shown in tables and charts.
    capacity_fractions : tuple of float
        Each machine's capacity as a fraction of the plant design capacity, in start order.
    minimum_turndown : float
        Lowest stable part-load ratio of each machine [0..1].
    efficiency_metric : str
        ``"cop"``, ``"eer"`` or ``"kw_per_ton"`` for ``efficiency``.
    efficiency : tuple of float or None
        Machine efficiency at 100/75/50/25 % load (the AHRI 550/590 rating points).
    capacity_curve, efficiency_curve : tuple of 6 float or None
        A chiller's CAPFT and EIRFT biquadratic coefficients in leaving chilled water and
        entering condenser temperature [°C] (all three curves or none; cooling only).
    part_load_curve : tuple of 3 float or None
        Its EIRFPLR quadratic coefficients in part-load ratio [-].
    """

    name: str
    capacity_fractions: tuple[float, ...]
    minimum_turndown: float = DEFAULT_MINIMUM_TURNDOWN
    efficiency_metric: str = "cop"
    efficiency: tuple[float, ...] | None = None
    capacity_curve: tuple[float, ...] | None = None
    efficiency_curve: tuple[float, ...] | None = None
    part_load_curve: tuple[float, ...] | None = None


@dataclass(frozen=True)
class AirHandlerSpec:
    """An air handler of the study with its zone loads (a model or an hourly file)."""

    settings: AirHandlerSettings
    zone: ZoneLoadModel | None = None
    zone_load_file: str | None = None


@dataclass(frozen=True)
class Scenario:
    """A whole study, in SI, as read from (or written to) a scenario file.

    ``source`` and ``base_dir`` are where it came from: messages name ``source`` and
    relative file paths resolve against ``base_dir``.
    """

    title: str
    unit_system: UnitSystem
    air_handlers: tuple[AirHandlerSpec, ...]
    climate: str | None = None
    weather_file: str | None = None
    weather_units: str | None = None
    altitude: float | None = None
    fill_gaps: bool = False
    cooling_design_percent: float = 0.4
    heating_design_percent: float = 99.6
    distribution_gain_percent: float = 0.0
    cooling_margin_percent: float = 10.0
    heating_margin_percent: float = 10.0
    cooling_options: tuple[PlantOptionSpec, ...] = ()
    heating_options: tuple[PlantOptionSpec, ...] = ()
    heating_pickup_percent: float | None = None
    cooling_pickup_percent: float | None = None
    climate_zone: str | None = None
    latitude: float | None = None
    longitude: float | None = None
    time_zone: float | None = None
    water_side: WaterSideSpec | None = None
    source: str = field(default="<scenario>", compare=False)
    files: str = field(default="any", compare=False)
    base_dir: Path = field(default_factory=Path.cwd, compare=False)

    @property
    def pickup_allowance_percent(self) -> float:
        """Morning pick-up allowance on the heating plant's design load [%].

        ``heating_pickup_percent`` when given; otherwise
        :data:`DEFAULT_PICKUP_PERCENT` when an air handler sets its zone back at
        night (``night_setback_drybulb`` below ``zone_heating_drybulb`` with the fan off
        when unoccupied), else 0.
        """
        if self.heating_pickup_percent is not None:
            return float(self.heating_pickup_percent)
        sets_back = any(
            s.fan_schedule == "occupied"
            and s.night_setback_drybulb is not None
            and s.night_setback_drybulb < s.zone_heating_drybulb
            for s in (spec.settings for spec in self.air_handlers)
        )
        return DEFAULT_PICKUP_PERCENT if sets_back else 0.0

    @property
    def cooling_pickup_allowance_percent(self) -> float:
        """Morning pick-up allowance on the cooling plant's design load [%].

        ``cooling_pickup_percent`` when given; otherwise :data:`DEFAULT_PICKUP_PERCENT`
        when an air handler's fan is off when unoccupied (``fan_schedule =
        "occupied"``: the zone floats up overnight and is pulled down in the morning),
        else 0.
        """
        if self.cooling_pickup_percent is not None:
            return float(self.cooling_pickup_percent)
        floats_up = any(spec.settings.fan_schedule == "occupied" for spec in self.air_handlers)
        return DEFAULT_PICKUP_PERCENT if floats_up else 0.0

    def load_weather(self) -> Weather:
        """The hourly weather of the site (bundled climate or CSV)."""
        if self.climate is not None:
            return self.located_weather(load_bundled_climate(self.climate))
        path = _resolve(
            self.base_dir, self.weather_file, self.source, "site.weather_file", self.files
        )
        altitude = self.altitude
        if altitude is not None and self.unit_system is UnitSystem.IP:
            altitude = float(to_display("length", altitude, "IP")[0])
        try:
            weather = read_weather_csv(
                path, units=self.weather_units, altitude=altitude, fill_gaps=self.fill_gaps
            )
        except (InputFileError, InputRangeError) as error:
            raise ScenarioError(self.source, "site.weather_file", str(error)) from error
        return self.located_weather(weather)

    def located_weather(self, weather: Weather) -> Weather:
        """The weather with the site's latitude, longitude and time zone, where given.

        A weather CSV does not say where it was recorded; the scenario's site does
        (the sun on glazed zones needs it). The dashboard places an uploaded year
        with it too, so both give the same figures.
        """
        place = {
            name: getattr(self, name)
            for name in ("latitude", "longitude", "time_zone")
            if getattr(self, name) is not None
        }
        return replace(weather, **place) if place else weather

    def zone_loads(self, index: int, weather: Weather | None = None):
        """Zone loads of air handler ``index``: the model, or the hourly file read."""
        spec = self.air_handlers[index]
        if spec.zone is not None:
            if not spec.zone.has_glazing:
                return spec.zone
            weather = self.load_weather() if weather is None else weather
            try:
                return zone_with_solar_gain(spec.zone, weather)
            except InputRangeError as error:
                raise ScenarioError(self.source, f"site.{error.field}", str(error)) from error
        where = f"air_handler[{index + 1}].zone_load_file"
        path = _resolve(self.base_dir, spec.zone_load_file, self.source, where, self.files)
        hours = None if weather is None else weather.hours
        try:
            loads: HourlyZoneLoads = read_zone_loads_csv(path, expected_hours=hours)
        except (InputFileError, InputRangeError) as error:
            raise ScenarioError(self.source, where, str(error)) from error
        return loads

    def with_air_handler(self, index: int, **changes) -> Scenario:
        """A copy with some settings of air handler ``index`` changed (SI values)."""
        specs = list(self.air_handlers)
        specs[index] = replace(specs[index], settings=replace(specs[index].settings, **changes))
        return replace(self, air_handlers=tuple(specs))
