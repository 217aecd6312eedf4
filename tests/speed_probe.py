"""Times the core in a fresh process, for :mod:`test_speed_against_before`.

Run as a script with a ``plantside`` on the path (the working tree's, or an earlier
commit's), so the same lines time either version on the same inputs; it uses only what
both versions have: a bundled climate, an air handler's settings, ``air_handler_hours``
and ``outdoor_air_sweep``. Prints one JSON object of median seconds.
"""

from __future__ import annotations

import json
import statistics
import sys
import time

import numpy as np
from plantside.air_handler.year import AirHandlerSettings, air_handler_hours, outdoor_air_sweep
from plantside.air_handler.zone_loads import ZoneLoadModel, zone_loads_for_weather
from plantside.climate.bundled import load_bundled_climate

#: The default unit and the heavy one of tests/test_air_handler_benchmark.py.
DEFAULT = AirHandlerSettings(name="AHU-default", supply_airflow=5.0, supply_fan_power=5.0)
HEAVY = AirHandlerSettings(
    name="AHU-heavy",
    supply_airflow=5.0,
    supply_fan_power=5.0,
    economizer="differential_enthalpy",
    recovery_sensible_effectiveness=0.7,
)


def _median(function, repeats: int) -> float:
    function()  # warm-up: imports, tables, allocator
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    weather = load_bundled_climate("Salvia Flats")
    zone = ZoneLoadModel(  # the air-handler tests' zone (tests/conftest.py office_zone)
        cooling_design_sensible=60.0,
        cooling_design_latent=10.0,
        cooling_design_drybulb=33.0,
        heating_design_load=40.0,
        heating_design_drybulb=-8.0,
        internal_fraction=0.5,
    )
    loads = zone_loads_for_weather(zone, weather)

    def year(settings):
        return lambda: air_handler_hours(
            settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads
        )

    fractions = np.linspace(0.0, 1.0, 101)
    times = {
        "year_default": _median(year(DEFAULT), repeats * 4),
        "year_heavy": _median(year(HEAVY), repeats * 4),
        "sweep": _median(lambda: outdoor_air_sweep(DEFAULT, weather, zone, fractions), repeats),
    }
    sweep = outdoor_air_sweep(DEFAULT, weather, zone, fractions)
    totals = {
        column: sweep[column].astype(float).tolist()
        for column in sweep.columns
        if sweep[column].dtype.kind == "f"
    }
    print(json.dumps({"seconds": times, "sweep": totals}))


if __name__ == "__main__":
    main()
