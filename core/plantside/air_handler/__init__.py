"""One air handler: its zone loads, settings, hourly year and design points.

Builds on :mod:`plantside.air` (mixing, economizer, recovery, coils). Takes the
weather as arrays; never imports :mod:`plantside.climate` or the plant.

Modules
-------
zone_loads      zone loads by the modified bin method, and hourly zone loads
settings        ``AirHandlerSettings``: one unit's validated settings (SI)
model           the vectorised hour-by-hour air-handler model
results         the named hourly results and their energy balance
design          the unit at the design conditions (coil load at each condition)
year            a unit's hourly year as a table, its cautions, the outdoor-air sweep

At the edge (input/output):

zone_load_csv   the hourly zone-load CSV reader (built on :mod:`plantside.hourly_csv`)
"""

from plantside.air_handler.design import (
    CoolingDesignSummary,
    DesignPoint,
    cooling_design_points,
    heating_design_point,
)
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.year import hourly_year, outdoor_air_sweep

__all__ = [
    "AirHandlerSettings",
    "CoolingDesignSummary",
    "DesignPoint",
    "cooling_design_points",
    "heating_design_point",
    "hourly_year",
    "outdoor_air_sweep",
]
