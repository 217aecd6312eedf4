"""Test weather and loads for the air-handler tests, built from arrays.

The climate is fictional: a smooth annual and daily cycle with seeded noise, at a
chosen mean, swing, dew-point depression and pressure. It stands in for a bundled
climate so the air-handler tests do not depend on the climate modules.
"""

from __future__ import annotations

import numpy as np
from plantside.air.moist_air import humidity_ratio_from_dew_point, pressure_from_altitude
from plantside.climate.weather import Weather


def synthetic_weather(
    mean=15.0,
    swing=12.0,
    daily=5.0,
    dew_depression=6.0,
    altitude=0.0,
    hours=8760,
    seed=1,
    site="Fictional Testville",
):
    """A seeded synthetic hourly record [°C, kg/kg, Pa] of ``hours`` hours."""
    h = np.arange(hours)
    rng = np.random.default_rng(seed)
    t = (
        mean
        - swing * np.cos(2 * np.pi * (h / 8760.0 - 0.05))
        - daily * np.cos(2 * np.pi * (h % 24 - 3) / 24)
        + rng.normal(0.0, 1.5, h.size)
    )
    td = t - dew_depression - 2.0 * np.abs(rng.normal(0.0, 1.5, h.size))
    p = float(pressure_from_altitude(altitude))
    w = humidity_ratio_from_dew_point(td, p)
    return Weather(site, t, w, p, altitude=altitude)
