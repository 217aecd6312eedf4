"""Speed of the air-handler year, measured against baselines in the same run.

Printed, never asserted (the tests assert only that the fast and slow paths agree):

- one 8,760-hour year of one air handler, for the heavy unit below and for the default
  settings, against a straightforward per-hour Python loop over the same model (scalar
  calls of the same public function), as a ratio measured in the same run. The year is
  timed in a fresh interpreter (as the command line and sweep workers run it) and in
  this process, whose other allocations can hide the cost of returning freed memory
  (plantside.air.heap). Target, on the fresh-process ratio: at least twice the ratio of
  the code before the speed work (issue 15), measured with this file on the same 2-core
  machine: heavy 698x (700x), so >= 1,400x; default settings 737x, so >= 1,470x. (In
  this process the code before measured 1,375x and 2,107x: the heap state, not the code.)
- a sweep of the minimum outdoor-air fraction 0-100 % in 101 steps over a year
  (``outdoor_air_sweep``: a few fractions per call as one flat array of (fraction, hour)
  pairs, only the columns it sums, hours reused below their economizer position)
  against 101 separate years. Target: at most 40 % of the separate years' time
  (ratio >= 2.5x; 1.7-1.9x before). Both sides print their time and the load average;
  the separate years also their median of three runs (the first run grows the process
  by about 320 MB for the 101 tables it keeps, the later ones reuse that memory).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
from air_handler_cases import synthetic_weather
from plantside.air_handler.year import (
    AirHandlerSettings,
    air_handler_hours,
    hourly_year,
    outdoor_air_sweep,
)
from plantside.air_handler.zone_loads import HourlyZoneLoads, zone_loads_for_weather

pytestmark = pytest.mark.benchmark

# A heavy case: differential enthalpy control and energy recovery need a third pass of
# the humidity solution more often than the defaults.
SETTINGS = AirHandlerSettings(
    name="AHU-bench",
    supply_airflow=5.0,
    supply_fan_power=5.0,
    economizer="differential_enthalpy",
    recovery_sensible_effectiveness=0.7,
)


def _median_seconds(function, repeats):
    """Median wall time and median CPU time of the calling process [s].

    The CPU time is printed too because the CI machines are shared: other jobs inflate
    the wall time of a memory-bound loop more than its CPU time.
    """
    wall, cpu = [], []
    for _ in range(repeats):
        start, start_cpu = time.perf_counter(), time.process_time()
        function()
        wall.append(time.perf_counter() - start)
        cpu.append(time.process_time() - start_cpu)
    return float(np.median(wall)), float(np.median(cpu))


@pytest.fixture(scope="module")
def case(office_zone):
    weather = synthetic_weather()
    return weather, zone_loads_for_weather(office_zone, weather)


#: Ratios of the per-hour loop's time to the vectorised year's (in a fresh process) before
#: the speed work (issue 15), on the same 2-core machine; the targets are twice these.
RATIO_BEFORE = {"heavy": 698.0, "default": 737.0}
#: 101 separate years / the 2-D sweep before the speed work; the target is 2.5x.
SWEEP_RATIO_TARGET = 2.5


def _year(weather, loads, check=True):
    return air_handler_hours(
        SETTINGS, weather.drybulb, weather.humidity_ratio, weather.pressure, loads, check=check
    )


def _per_hour_loop(settings, weather, loads, sample):
    """One call of the same public function per hour of ``sample``: rows and seconds."""
    start = time.perf_counter()
    rows = []
    for i in sample:
        one = HourlyZoneLoads(
            sensible=loads.sensible[i : i + 1],
            latent=loads.latent[i : i + 1],
            internal_sensible=loads.internal_sensible[i : i + 1],
            occupied=loads.occupied[i : i + 1],
        )
        rows.append(
            air_handler_hours(
                settings,
                weather.drybulb[i : i + 1],
                weather.humidity_ratio[i : i + 1],
                weather.pressure[i : i + 1],
                one,
            )
        )
    return rows, time.perf_counter() - start


def _assert_loop_agrees(rows, vector, sample):
    # Agreement to the model's solution tolerance (humidity ~5e-7 kg/kg, dry bulbs ~1e-3 K,
    # so loads ~0.01 kW): one hour alone may stop after a different number of passes.
    tolerances = {
        "coil_total_kW": 0.01,
        "coil_latent_kW": 0.01,
        "heating_coil_kW": 0.01,
        "zone_humidity_ratio_kgkg": 2e-6,
    }
    for key, atol in tolerances.items():
        looped = np.array([r[key][0] for r in rows])
        np.testing.assert_allclose(looped, vector[key][sample], rtol=1e-3, atol=atol)
    modes = np.array([r["economizer_mode"][0] for r in rows])
    assert np.mean(modes == vector["economizer_mode"][sample]) > 0.999


_FRESH_PROCESS = """
import json, sys, time
import numpy as np
sys.path.insert(0, sys.argv[1])
from air_handler_cases import synthetic_weather
from plantside.air_handler.model import air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.zone_loads import ZoneLoadModel, zone_loads_for_weather
weather = synthetic_weather()
zone = ZoneLoadModel(  # the office_zone fixture of tests/conftest.py
    cooling_design_sensible=60.0, cooling_design_latent=10.0, cooling_design_drybulb=33.0,
    heating_design_load=40.0, heating_design_drybulb=-8.0, internal_fraction=0.5)
loads = zone_loads_for_weather(zone, weather)
units = {
    "heavy": AirHandlerSettings(name="AHU-bench", supply_airflow=5.0, supply_fan_power=5.0,
        economizer="differential_enthalpy", recovery_sensible_effectiveness=0.7),
    "default": AirHandlerSettings(supply_airflow=5.0, supply_fan_power=5.0),
}
medians = {}
for name, settings in units.items():
    args = (settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads)
    air_handler_hours(*args)
    times = []
    for _ in range(40):
        start = time.perf_counter()
        air_handler_hours(*args)
        times.append(time.perf_counter() - start)
    medians[name] = float(np.median(times))
print(json.dumps(medians))
"""


def _fresh_process_medians():
    """Median seconds of each unit's year in a new interpreter that does nothing else (as
    the command line or a sweep worker runs it). In a long-lived process the figure
    depends on what else is allocated: with glibc's default settings the freed memory
    of each year is returned and faulted in again unless something holds the top of
    the heap (plantside.air.heap)."""
    done = subprocess.run(
        [sys.executable, "-c", _FRESH_PROCESS, str(Path(__file__).parent)],
        capture_output=True,
        text=True,
        check=True,
    )
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_one_year_against_a_per_hour_loop(case):
    weather, loads = case
    plain = AirHandlerSettings(supply_airflow=5.0, supply_fan_power=5.0)
    units = {"heavy": SETTINGS, "default": plain}  # default: fixed dry bulb, no recovery
    frame, _ = _median_seconds(lambda: hourly_year(SETTINGS, weather, loads), 15)
    # The straightforward loop runs over every 8th hour and is scaled to the year (the
    # per-call cost does not depend on the hour); the ratio is printed against the full
    # vectorised year.
    sample = np.arange(0, weather.hours, 8)
    fresh = _fresh_process_medians()
    lines = []
    for name, settings in units.items():

        def year(settings=settings):
            return air_handler_hours(
                settings, weather.drybulb, weather.humidity_ratio, weather.pressure, loads
            )

        vector = year()  # warm-up
        core, core_cpu = _median_seconds(year, 40)
        rows, seconds = _per_hour_loop(settings, weather, loads, sample)
        loop = seconds * weather.hours / sample.size
        target = 2.0 * RATIO_BEFORE[name]
        lines.append(
            f"{name}: core median {1e3 * fresh[name]:.2f} ms in a fresh process "
            f"({1e3 * core:.2f} ms, CPU {1e3 * core_cpu:.2f} ms, in this one), per-hour loop "
            f"{loop:.2f} s, ratio {loop / fresh[name]:.0f}x ({loop / core:.0f}x in this "
            f"process; target >= {target:.0f}x, twice the {RATIO_BEFORE[name]:.0f}x before)"
        )
        _assert_loop_agrees(rows, vector, sample)
    print(
        f"\n[benchmark] air-handler year, 8760 h, against a per-hour loop of the same function "
        f"(scaled from {sample.size} hours): " + "; ".join(lines) + f"; heavy unit with "
        f"DataFrame {1e3 * frame:.2f} ms; load average {os.getloadavg()[0]:.1f}",
        flush=True,
    )


def test_outdoor_air_sweep_against_separate_years(case):
    weather, loads = case
    fractions = np.linspace(0.0, 1.0, 101)
    outdoor_air_sweep(SETTINGS, weather, loads, fractions[:3])  # warm-up
    sweep_time, sweep_cpu = _median_seconds(
        lambda: outdoor_air_sweep(SETTINGS, weather, loads, fractions), 3
    )
    sweep = outdoor_air_sweep(SETTINGS, weather, loads, fractions)

    def separate_years():
        return [
            air_handler_hours(
                SETTINGS,
                weather.drybulb,
                weather.humidity_ratio,
                weather.pressure,
                loads,
                minimum_outdoor_air_fraction=x,
            )
            for x in fractions
        ]

    # The first run of the separate years also pays for growing the process to hold 101
    # whole tables: about 320 MB of new pages (82,000 minor page faults, 0.50 s against
    # 0.33 s for the next runs, which reuse the memory; measured on the 2-core machine at
    # load 0.7). Both are printed: the first run is the ratio of record (as measured
    # before), the median of the three the steady state.
    start = time.perf_counter()
    separate = separate_years()
    separate_time = time.perf_counter() - start
    del separate
    later = []
    for _ in range(2):
        start = time.perf_counter()
        separate = separate_years()
        later.append(time.perf_counter() - start)
        if len(later) < 2:
            del separate
    steady_time = float(np.median([separate_time, *later]))
    print(
        f"\n[benchmark] outdoor-air sweep 101 x 8760: sweep median {sweep_time:.3f} s "
        f"(CPU {sweep_cpu:.3f} s); 101 separate years {separate_time:.3f} s; "
        f"ratio {separate_time / sweep_time:.1f}x (target >= {SWEEP_RATIO_TARGET:.1f}x: "
        f"the sweep in at most {100 / SWEEP_RATIO_TARGET:.0f} % of the separate years' time); "
        f"separate years median of 3 runs {steady_time:.3f} s, ratio "
        f"{steady_time / sweep_time:.1f}x; load average {os.getloadavg()[0]:.1f}",
        flush=True,
    )
    for column, key in (
        ("coil_total_kWh", "coil_total_kW"),
        ("heating_coil_kWh", "heating_coil_kW"),
    ):
        expected = np.array([r[key].sum() for r in separate])
        np.testing.assert_allclose(sweep[column], expected, rtol=1e-5, atol=1e-3)
