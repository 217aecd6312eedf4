"""Speed of the clinic's study and of its plant's water-side year, measured in the same run.

Target (printed, never asserted): the water side (every cooling and heating option's
hourly year: flows, pumps, staging on efficiency, chiller curves, tower, boilers) adds at
most as much time again as today's study, so the whole stays within 2x. The test asserts
only that repeated runs agree.
"""

from __future__ import annotations

import os
import time
from pathlib import Path

import numpy as np
import pytest
from plantside.study.run import run_study
from plantside.study.scenario import load_scenario
from plantside.study.water_side_run import run_water_side

pytestmark = pytest.mark.benchmark

CLINIC = Path(__file__).parents[1] / "example_data" / "scenarios" / "quillon_clinic.toml"


def _median(function, repeats):
    times, value = [], None
    for _ in range(repeats):
        start = time.perf_counter()
        value = function()
        times.append(time.perf_counter() - start)
    return float(np.median(times)), value


def test_water_side_within_twice_the_study_time():
    scenario = load_scenario(CLINIC)
    run_study(scenario)  # warm caches (weather, imports)
    study_s, result = _median(lambda: run_study(scenario), 5)
    water_s, water = _median(lambda: run_water_side(result), 5)
    again = run_water_side(result)
    assert again.options.equals(water.options)
    ratio = (study_s + water_s) / study_s
    print(
        f"\nclinic study {study_s * 1000:.0f} ms, water side {water_s * 1000:.0f} ms "
        f"({len(water.chiller_options)} cooling + {len(water.boiler_options)} heating options); "
        f"study with the plant's year = {ratio:.2f} x today's study (target <= 2); "
        f"load average {os.getloadavg()[0]:.1f}"
    )
