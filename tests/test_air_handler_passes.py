"""Each hour's passes stop on their own (issue 15: re-solve only the hours that have not
converged).

The model passes over the hours until each hour's zone humidity has settled (module
notes of :mod:`plantside.air_handler.model`); an hour that has settled stops and the
later passes model only the hours still going. So an hour's solution cannot depend on
which other hours share the call: a year's hour, the same hour alone, and the same hour
as a pair of an outdoor-air sweep are the same to the bit. The physics of each pass are
checked elsewhere (ASHRAE Handbook Fundamentals 2017 Ch. 1, tests/test_air_handler.py);
these tests check the bookkeeping of the passes.
"""

from __future__ import annotations

import numpy as np
import pytest
from plantside.air_handler import model
from plantside.air_handler.model import HOURLY_COLUMNS, air_handler_hours
from plantside.air_handler.settings import AirHandlerSettings
from plantside.air_handler.zone_loads import HourlyZoneLoads, ZoneLoadModel, zone_loads_for_weather
from plantside.climate.bundled import load_bundled_climate

ZONE = ZoneLoadModel(  # fictional zone
    cooling_design_sensible=60.0,
    cooling_design_latent=10.0,
    cooling_design_drybulb=33.0,
    heating_design_load=40.0,
    heating_design_drybulb=-8.0,
    internal_fraction=0.5,
)


def _case(settings, climate):
    weather = load_bundled_climate(climate)  # fictional bundled climates
    return settings, weather, zone_loads_for_weather(ZONE, weather)


#: Units and climates whose humidity needs a third pass in some hours.
CASES = {
    "enthalpy + recovery, Salvia Flats": _case(
        AirHandlerSettings(
            name="AHU-R",
            supply_airflow=5.0,
            supply_fan_power=5.0,
            economizer="differential_enthalpy",
            recovery_sensible_effectiveness=0.7,
        ),
        "Salvia Flats",
    ),
    "dry bulb, Korva Plains": _case(
        AirHandlerSettings(name="AHU-D", supply_airflow=5.0, supply_fan_power=5.0),
        "Korva Plains",
    ),
}


def _hours(case, hours, fraction=0.3):
    settings, weather, loads = case
    part = HourlyZoneLoads(
        sensible=loads.sensible[hours],
        latent=loads.latent[hours],
        internal_sensible=loads.internal_sensible[hours],
        occupied=loads.occupied[hours],
    )
    return air_handler_hours(
        settings,
        weather.drybulb[hours],
        weather.humidity_ratio[hours],
        weather.pressure[hours],
        part,
        minimum_outdoor_air_fraction=fraction,
    )


def _passes_of(case, hours, monkeypatch):
    """(pass number, hours modelled) of each pass of one call."""
    seen = []
    one_pass = model._one_pass

    def counting(pass_number, **values):
        out = one_pass(pass_number, **values)
        seen.append((pass_number, np.size(out["step"])))
        return out

    monkeypatch.setattr(model, "_one_pass", counting)
    _hours(case, hours)
    monkeypatch.undo()
    return seen


@pytest.mark.parametrize("name", list(CASES))
def test_later_passes_model_only_the_hours_still_going(name, monkeypatch):
    every = np.arange(8760)
    seen = _passes_of(CASES[name], every, monkeypatch)
    assert seen[:2] == [(0, every.size), (1, every.size)]
    # the case needs a third pass, and only in a few of its hours
    assert len(seen) >= 3
    assert all(0 < size < every.size / 2 for _, size in seen[2:])


@pytest.mark.parametrize("name", list(CASES))
def test_an_hour_is_the_same_alone_as_in_the_year(name):
    case = CASES[name]
    every = np.arange(8760)
    year = _hours(case, every)
    # a week of the hours, every third hour, and one hour alone
    for hours in (every[:168], every[::3], every[1000:1001]):
        part = _hours(case, hours)
        for key in HOURLY_COLUMNS:
            np.testing.assert_array_equal(part[key], year[key][hours], err_msg=key)


def test_pairs_of_several_fractions_are_each_fractions_year():
    # what an outdoor-air sweep hands the model: the (fraction, hour) pairs of a few
    # fractions as one array of hours
    case = CASES["enthalpy + recovery, Salvia Flats"]
    every = np.arange(8760)
    fractions = np.array([0.1, 0.25, 0.6])
    row, hour = np.divmod(np.arange(fractions.size * every.size), every.size)
    pairs = _hours(case, hour, fraction=fractions[row])
    for k, x in enumerate(fractions):
        year = _hours(case, every, fraction=x)
        for key in ("coil_total_kW", "zone_humidity_ratio_kgkg", "economizer_mode"):
            np.testing.assert_array_equal(pairs[key][row == k], year[key], err_msg=key)
