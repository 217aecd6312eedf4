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


#: Heat the unit adds to the air on top of the cooling coil's: the heating coil's, the
#: preheat's and every reheat's (DEVELOPERS.md, "The air-handler contract").
ADDED_HEAT_COLUMNS = (
    "heating_coil_kW",
    "preheat_kW",
    "dehumidification_reheat_kW",
    "condenser_heat_recovered_kW",
    "humidity_control_reheat_kW",
)

#: The terms the net coil load is made of, with their signs (the same contract).
COIL_LOAD_TERMS = {
    "zone_sensible_kW": 1,
    "zone_latent_kW": 1,
    "reheat_kW": 1,
    "ventilation_sensible_kW": 1,
    "ventilation_latent_kW": 1,
    "fan_heat_kW": 1,
    "economizer_effect_kW": -1,
    "recovery_effect_kW": -1,
    "condensate_heat_kW": -1,
}


def balance_residual(r):
    """The contract's hourly energy balance: (coil − added heat) − terms, and its scale [kW].

    ``r`` is an hourly frame or the dict of arrays ``air_handler_hours`` returns (any
    shape). Returns ``(residual, gross)``: the signed residual of every hour, and the sum
    of the magnitudes of every flow in the balance, which a test compares it with (the
    contract asks 0.1 % of it). The passive exchanger around the coil takes and gives the
    same heat, so it is not a term here (checked apart).
    """
    added = sum(r[key] for key in ADDED_HEAT_COLUMNS)
    right = sum(sign * r[key] for key, sign in COIL_LOAD_TERMS.items())
    residual = r["coil_total_kW"] - added - right
    gross = np.abs(r["coil_total_kW"]) + sum(
        np.abs(r[key]) for key in (*ADDED_HEAT_COLUMNS, *COIL_LOAD_TERMS)
    )
    return residual, gross
