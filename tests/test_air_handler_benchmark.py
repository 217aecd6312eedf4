"""Speed of the air-handler year, measured against baselines in the same run.

Targets (printed, never asserted): one 8,760-hour year of one air handler at most 5 ms
(median); a sweep of the minimum outdoor-air fraction 0-100 % in 101 steps over a year at
most 0.5 s; the vectorised year at least 100x faster than a straightforward per-hour
Python loop over the same model (scalar calls of the same function). The tests assert
only that the fast and slow paths agree.
"""

from __future__ import annotations

import time

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


def _year(weather, loads, check=True):
    return air_handler_hours(
        SETTINGS, weather.drybulb, weather.humidity_ratio, weather.pressure, loads, check=check
    )


def test_one_year_against_a_per_hour_loop(case):
    weather, loads = case
    _year(weather, loads)  # warm-up
    core, core_cpu = _median_seconds(lambda: _year(weather, loads), 40)
    frame, _ = _median_seconds(lambda: hourly_year(SETTINGS, weather, loads), 15)
    # the same year with the default settings (fixed dry-bulb economizer, no recovery)
    plain = AirHandlerSettings(supply_airflow=5.0, supply_fan_power=5.0)
    default, default_cpu = _median_seconds(
        lambda: air_handler_hours(
            plain, weather.drybulb, weather.humidity_ratio, weather.pressure, loads
        ),
        40,
    )
    # The straightforward loop: one call of the same public function per hour. It runs
    # over every 8th hour and is scaled to the year (the per-call cost does not depend on
    # the hour); the ratio is printed against the full vectorised year.
    sample = np.arange(0, weather.hours, 8)
    vector = _year(weather, loads)
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
                SETTINGS,
                weather.drybulb[i : i + 1],
                weather.humidity_ratio[i : i + 1],
                weather.pressure[i : i + 1],
                one,
            )
        )
    loop = (time.perf_counter() - start) * weather.hours / sample.size
    print(
        f"\n[benchmark] air-handler year, 8760 h: core median {1e3 * core:.2f} ms "
        f"(CPU {1e3 * core_cpu:.2f} ms; target <= 5 ms); with DataFrame {1e3 * frame:.2f} ms; "
        f"per-hour loop {loop:.2f} s (scaled from {sample.size} hours); "
        f"ratio {loop / core:.0f}x (target >= 100x); default settings: core median "
        f"{1e3 * default:.2f} ms (CPU {1e3 * default_cpu:.2f} ms)",
        flush=True,
    )
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


def test_outdoor_air_sweep_against_separate_years(case):
    weather, loads = case
    fractions = np.linspace(0.0, 1.0, 101)
    outdoor_air_sweep(SETTINGS, weather, loads, fractions[:3])  # warm-up
    sweep_time, sweep_cpu = _median_seconds(
        lambda: outdoor_air_sweep(SETTINGS, weather, loads, fractions), 3
    )
    sweep = outdoor_air_sweep(SETTINGS, weather, loads, fractions)
    start = time.perf_counter()
    separate = [
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
    separate_time = time.perf_counter() - start
    print(
        f"\n[benchmark] outdoor-air sweep 101 x 8760: 2-D broadcast median {sweep_time:.3f} s "
        f"(CPU {sweep_cpu:.3f} s; target <= 0.5 s); 101 separate years {separate_time:.3f} s; "
        f"ratio {separate_time / sweep_time:.1f}x",
        flush=True,
    )
    for column, key in (
        ("coil_total_kWh", "coil_total_kW"),
        ("heating_coil_kWh", "heating_coil_kW"),
    ):
        expected = np.array([r[key].sum() for r in separate])
        np.testing.assert_allclose(sweep[column], expected, rtol=1e-5, atol=1e-3)
