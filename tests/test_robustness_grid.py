"""No NaN or infinity for any combination of the dashboard's controls, in every climate.

A grid over the controls the dashboard offers, each combination a full 8,760-hour year of
a bundled (fictional) climate:

=========================  ==========================================================
factor                     values
=========================  ==========================================================
climate                    every entry of ``BUNDLED_CLIMATES``
economizer                 none, and each of the four high-limit types, integrated or
                           not (9 arrangements)
fan control                constant volume, variable volume
supply air temperature     4 °C, 12 °C, 23.5 °C: both ends of the dashboard's range
                           (4 °C to zone - 0.5 K) and a usual value
bypass factor              0, 0.2, 0.5: both ends of the dashboard's range and a usual
                           value
outdoor-air fraction       0, 0.2, 0.5, 0.8, 1: vectorised (one call of the hour model
                           evaluates all five fractions over the year)
=========================  ==========================================================

For every combination:

- every load, energy, flow and state column of every operating hour is finite
  (``apparatus_dew_point_C`` and ``bypass_factor`` are NaN by contract when the coil is
  dry or off: they must be finite where the coil is wet); off hours carry zero loads;
- the energy balance of the air-handler contract holds in every operating hour to 0.1 %
  of the gross flows (DEVELOPERS.md, "The air-handler contract": an identity of the
  reported numbers, to the humidity iteration's tolerance);
- the dashboard's headline figures are finite: design zone load, design coil load, their
  ratio, annual peak coil load, cooling energy, hours above 75 % of the recommended
  capacity (the definitions of ``plantside.dashboard.state.DashboardState._assemble``,
  evaluated for all five fractions at once at the three cooling design conditions; a
  second test drives the dashboard's own state object to every control's ends);
  where the design coil would need an apparatus dew point below what it can produce the
  design point must be refused (``InputRangeError`` naming ``apparatus_dew_point``),
  which the dashboard shows as a message.

Half the climates run a second arrangement (fan off when unoccupied, energy recovery,
blow-through fan, return plenum, terminal reheat) so off hours and the recovery and
plenum terms are exercised too. The count of year-combinations is printed.
"""

from __future__ import annotations

import itertools
from collections import Counter
from dataclasses import replace
from functools import lru_cache
from pathlib import Path

import numpy as np
import pytest
from air_handler_cases import balance_residual
from plantside.air_handler.year import (
    HOURLY_COLUMNS,
    AirHandlerSettings,
    air_handler_hours,
    cooling_design_points,
    design_point,
    outdoor_air_sweep,
)
from plantside.air_handler.zone_loads import (
    HourlyZoneLoads,
    ZoneLoadModel,
    design_zone_loads,
    zone_loads_for_weather,
)
from plantside.climate.bundled import BUNDLED_CLIMATES, load_bundled_climate
from plantside.climate.design_conditions import design_conditions_from_weather
from plantside.errors import InputRangeError

OUTDOOR_AIR_FRACTIONS = np.array([0.0, 0.2, 0.5, 0.8, 1.0])
SUPPLY_DRYBULBS = (4.0, 12.0, 23.5)  # °C; zone cooling set point 24 °C
BYPASS_FACTORS = (0.0, 0.2, 0.5)
FAN_CONTROLS = ("constant_volume", "variable_volume")
ECONOMIZERS = [("none", True)] + [
    (kind, integrated)
    for kind in ("fixed_drybulb", "differential_drybulb", "fixed_enthalpy", "differential_enthalpy")
    for integrated in (True, False)
]
DESIGN_PERCENT = 0.4
#: Sizing margin of the dashboard's default scenario [%] and the "hours above" share.
MARGIN_PERCENT = 10.0
PART_LOAD_THRESHOLD = 0.75

#: An office-like zone: 60 kW sensible and 10 kW latent at 35 °C outdoor (fictional demo).
ZONE = ZoneLoadModel(
    cooling_design_sensible=60.0,
    cooling_design_latent=10.0,
    cooling_design_drybulb=35.0,
    heating_design_load=45.0,
    heating_design_drybulb=-10.0,
    internal_fraction=0.5,
)
BASE = AirHandlerSettings(
    name="grid",
    supply_airflow=6.0,
    supply_fan_power=6.0,
    preheat_drybulb=4.0,  # at most the lowest supply set point of the grid
)
#: The second arrangement, used in every other climate.
SECOND = replace(
    BASE,
    fan_schedule="occupied",
    recovery_sensible_effectiveness=0.6,
    recovery_latent_effectiveness=0.5,
    fan_position="blow_through",
    return_plenum_fraction=0.3,
    low_load_response="reheat",
)

_NAN_BY_CONTRACT = ("apparatus_dew_point_C", "bypass_factor")
_NOT_NUMBERS = ("occupied", "operating", "economizer_mode", "coil_wet")
NUMERIC_COLUMNS = tuple(
    c for c in HOURLY_COLUMNS if c not in _NAN_BY_CONTRACT and c not in _NOT_NUMBERS
)
LOAD_COLUMNS = tuple(c for c in HOURLY_COLUMNS if c.endswith(("_kW", "_kgs", "_m3s")))

COUNTS: Counter = Counter()


@pytest.fixture(scope="module", autouse=True)
def _print_counts(request):
    COUNTS.clear()
    yield
    line = (
        f"robustness grid: {COUNTS['year combinations']} year-combinations "
        f"({COUNTS['settings']} settings x {OUTDOOR_AIR_FRACTIONS.size} outdoor-air fractions, "
        f"{COUNTS['hours']:,} air-handler hours); design points refused for an apparatus dew "
        f"point below the coil's limit: {COUNTS['design refused (ADP)']}; cross-checked "
        f"against cooling_design_points: {COUNTS['cross-checked']}; dashboard state changes: "
        f"{COUNTS['dashboard changes']} ({COUNTS['dashboard changes refused with a message']} "
        f"refused with a message)"
    )
    print(line)
    capture = request.config.pluginmanager.getplugin("capturemanager")
    if capture is not None:
        with capture.global_and_fixture_disabled():
            print("\n" + line)


@lru_cache(maxsize=8)
def _climate(name):
    weather = load_bundled_climate(name)
    conditions = design_conditions_from_weather(weather)
    design = [conditions.cooling(kind, DESIGN_PERCENT) for kind in ("cooling", "dehumidification",
                                                                   "enthalpy")]  # fmt: skip
    return weather, zone_loads_for_weather(ZONE, weather), conditions, design


def _design_inputs(design, k):
    """Outdoor states and zone loads of the 3 design conditions x k fractions (flat)."""
    t = np.repeat([c.drybulb for c in design], k)
    w = np.repeat([c.humidity_ratio for c in design], k)
    p = np.repeat([c.pressure for c in design], k)
    zones = [design_zone_loads(ZONE, c.drybulb, occupied=True) for c in design]
    loads = HourlyZoneLoads(
        sensible=np.repeat([z.sensible[0] for z in zones], k),
        latent=np.repeat([z.latent[0] for z in zones], k),
        internal_sensible=np.repeat([z.internal_sensible[0] for z in zones], k),
        occupied=np.ones(3 * k, dtype=bool),
    )
    return t, w, p, loads


def _check_year(r, where):
    operating = np.broadcast_to(r["operating"], r["coil_total_kW"].shape)
    problems = []
    for column in NUMERIC_COLUMNS:
        values = np.asarray(r[column], dtype=float)
        bad = operating & ~np.isfinite(values)
        if bad.any():
            fraction_index, hour = (int(i[0]) for i in np.nonzero(bad))
            problems.append(
                f"{column}: {int(bad.sum())} non-finite operating hours (first: outdoor-air "
                f"fraction {OUTDOOR_AIR_FRACTIONS[fraction_index]:g}, hour {hour})"
            )
    # Physical bounds of the states (ASHRAE Handbook Fundamentals 2017 Ch. 1: humidity
    # ratio >= 0, relative humidity 0..1).
    for column in (c for c in NUMERIC_COLUMNS if c.endswith("_kgkg")):
        bad = operating & (np.asarray(r[column], dtype=float) < 0.0)
        if bad.any():
            problems.append(f"{column}: negative in {int(bad.sum())} operating hours")
    rh = np.asarray(r["zone_relative_humidity"], dtype=float)
    bad = operating & ((rh < 0.0) | (rh > 1.0))
    if bad.any():
        problems.append(f"zone_relative_humidity outside 0..1 in {int(bad.sum())} hours")
    wet = np.asarray(r["coil_wet"], dtype=bool) & operating
    for column in _NAN_BY_CONTRACT:
        bad = wet & ~np.isfinite(np.asarray(r[column], dtype=float))
        if bad.any():
            problems.append(f"{column}: non-finite in {int(bad.sum())} wet-coil hours")
    off = ~operating
    if off.any():
        for column in LOAD_COLUMNS:
            if column.startswith("zone_") and column.endswith("unmet_kW"):
                continue  # off hours: the zone load is unmet by definition
            values = np.asarray(r[column], dtype=float)[off]
            if not np.all(values == 0.0):
                problems.append(f"{column}: non-zero in off hours")
    residual, gross = balance_residual(r)
    # 0.1 % of the gross flows of the hour (contract: exact to the humidity iteration).
    bad = operating & ~(np.abs(residual) <= 1e-3 * gross + 1e-9)
    if bad.any():
        index = np.unravel_index(np.argmax(np.where(bad, np.abs(residual), 0.0)), bad.shape)
        problems.append(
            f"energy balance off in {int(bad.sum())} hours; worst {residual[index]:.4g} kW of "
            f"{gross[index]:.4g} kW gross (outdoor-air fraction "
            f"{OUTDOOR_AIR_FRACTIONS[index[0]]:g}, hour {index[1]})"
        )
    return [f"{where}: {p}" for p in problems]


def _headline(settings, r_year, design, where):
    """The dashboard's headline figures for each outdoor-air fraction; problems found."""
    k = OUTDOOR_AIR_FRACTIONS.size
    t, w, p, loads = _design_inputs(design, k)
    fractions = np.tile(OUTDOOR_AIR_FRACTIONS, 3)
    d = air_handler_hours(
        settings, t, w, p, loads, minimum_outdoor_air_fraction=fractions, force_operating=True
    )
    coil = d["coil_total_kW"].reshape(3, k)
    zone = (d["zone_sensible_kW"] + d["zone_latent_kW"]).reshape(3, k)
    adp_needed = d["apparatus_dew_point_required_C"].reshape(3, k)
    refused = np.any(adp_needed < settings.apparatus_dew_point_min - 1e-9, axis=0)
    governing = np.argmax(coil, axis=0)
    columns = np.arange(k)
    design_coil = coil[governing, columns]
    design_zone = zone[governing, columns]
    capacity = design_coil * (1.0 + MARGIN_PERCENT / 100.0)
    hourly = r_year["coil_total_kW"]
    figures = {
        "design zone load": design_zone,
        "design coil load": design_coil,
        "coil to zone ratio": np.divide(
            design_coil, design_zone, out=np.full(k, np.nan), where=design_zone > 0
        ),
        "annual peak coil load": hourly.max(axis=1),
        "cooling energy": np.maximum(hourly, 0.0).sum(axis=1),
        "hours above 75 %": np.count_nonzero(
            hourly > PART_LOAD_THRESHOLD * capacity[:, None], axis=1
        ).astype(float),
        "recommended capacity": capacity,
    }
    problems = []
    for name, values in figures.items():
        bad = ~np.isfinite(values) & ~refused
        if bad.any():
            problems.append(
                f"{where}: headline {name} not finite at outdoor-air fraction(s) "
                f"{OUTDOOR_AIR_FRACTIONS[bad].tolist()}: {values[bad].tolist()}"
            )
    if refused.any():
        # The design point of a refused fraction must be refused, with a clear message.
        COUNTS["design refused (ADP)"] += int(refused.sum())
        fraction = float(OUTDOOR_AIR_FRACTIONS[np.flatnonzero(refused)[0]])
        kind = int(np.argmax(np.any(adp_needed < settings.apparatus_dew_point_min - 1e-9, 1)))
        refused_settings = replace(settings, minimum_outdoor_air_fraction=fraction)
        with pytest.raises(InputRangeError) as caught:
            design_point(refused_settings, ZONE, design[kind])
        assert caught.value.field == "apparatus_dew_point", caught.value
        assert "apparatus_dew_point_min" in str(caught.value)
    return figures, refused, problems


def _settings_grid(climate_index, economizer, integrated):
    base = SECOND if climate_index % 2 else BASE
    for fan, supply, bypass in itertools.product(FAN_CONTROLS, SUPPLY_DRYBULBS, BYPASS_FACTORS):
        yield replace(
            base,
            economizer=economizer,
            economizer_integrated=integrated,
            fan_control=fan,
            supply_drybulb=supply,
            bypass_factor=bypass,
        )


@pytest.mark.parametrize(("economizer", "integrated"), ECONOMIZERS)
@pytest.mark.parametrize("climate", BUNDLED_CLIMATES)
def test_every_combination_is_finite_and_balanced(climate, economizer, integrated):
    climate_index = BUNDLED_CLIMATES.index(climate)
    weather, loads, _, design = _climate(climate)
    problems = []
    for number, settings in enumerate(_settings_grid(climate_index, economizer, integrated)):
        arrangement = "integrated" if integrated else "non-integrated"
        where = (
            f"{climate}, economizer {economizer}"
            f"{'' if economizer == 'none' else ' ' + arrangement}, "
            f"{settings.fan_control}, supply {settings.supply_drybulb:g} °C, "
            f"bypass factor {settings.bypass_factor:g}"
        )
        r = air_handler_hours(
            settings,
            weather.drybulb,
            weather.humidity_ratio,
            weather.pressure,
            loads,
            minimum_outdoor_air_fraction=OUTDOOR_AIR_FRACTIONS[:, None],
        )
        assert r["coil_total_kW"].shape == (OUTDOOR_AIR_FRACTIONS.size, 8760)
        COUNTS["settings"] += 1
        COUNTS["year combinations"] += OUTDOOR_AIR_FRACTIONS.size
        COUNTS["hours"] += r["coil_total_kW"].size
        problems += _check_year(r, where)
        figures, refused, found = _headline(settings, r, design, where)
        problems += found
        if number % 6 == 0 and not refused[1]:
            # Cross-check the vectorised design figures against the public design path
            # (the one the dashboard calls) at outdoor-air fraction 0.2.
            summary = cooling_design_points(
                # at the load-derived airflow, as the vectorised figures are
                replace(settings, minimum_outdoor_air_fraction=0.2, design_airflow="load"),
                ZONE,
                design,
                DESIGN_PERCENT,
            )
            governing = summary.points[summary.governing].loads
            # Same model, but the humidity passes stop on the largest change over all the
            # points evaluated together (_PASS_TOLERANCE 1e-7 kg/kg, about m x 1e-7 x 2500
            # kJ/kg ~ 0.002 kW here): equal to 1e-4 relative, not to rounding.
            assert governing["coil_total_kW"] == pytest.approx(
                figures["design coil load"][1], rel=1e-4
            ), where
            zone = governing["zone_sensible_kW"] + governing["zone_latent_kW"]
            assert zone == pytest.approx(figures["design zone load"][1], rel=1e-4), where
            COUNTS["cross-checked"] += 1
    assert not problems, "\n".join(problems[:30])


@pytest.mark.parametrize("climate", BUNDLED_CLIMATES)
def test_outdoor_air_sweep_totals_are_finite(climate):
    # The annual totals over outdoor-air fraction (the sweep the study and charts use), at
    # the grid's corners of supply temperature and bypass factor.
    weather, loads, _, _ = _climate(climate)
    for supply, bypass in ((4.0, 0.5), (23.5, 0.0)):
        settings = replace(BASE, supply_drybulb=supply, bypass_factor=bypass)
        table = outdoor_air_sweep(settings, weather, loads, np.linspace(0.0, 1.0, 11))
        assert len(table) == 11
        values = table.to_numpy(dtype=float)
        assert np.isfinite(values).all(), table[~np.isfinite(values).all(axis=1)]
        COUNTS["year combinations"] += 11


def test_the_grid_checks_can_fail():
    # The checks above are not vacuous: a NaN in one operating hour, a 1 % error in the
    # coil load and a non-zero load in an off hour are each reported.
    weather, loads, _, design = _climate(BUNDLED_CLIMATES[1])
    settings = replace(SECOND, supply_drybulb=12.0)
    r = air_handler_hours(
        settings,
        weather.drybulb,
        weather.humidity_ratio,
        weather.pressure,
        loads,
        minimum_outdoor_air_fraction=OUTDOOR_AIR_FRACTIONS[:, None],
    )
    assert _check_year(r, "clean") == []
    operating = np.broadcast_to(r["operating"], r["coil_total_kW"].shape)
    first_on = np.argwhere(operating)[0]
    first_off = np.argwhere(~operating)[0]

    broken = {k: np.array(v, copy=True) if isinstance(v, np.ndarray) else v for k, v in r.items()}
    broken["mixed_drybulb_C"][tuple(first_on)] = np.nan
    assert any("mixed_drybulb_C" in p for p in _check_year(broken, "nan"))

    broken = {k: np.array(v, copy=True) if isinstance(v, np.ndarray) else v for k, v in r.items()}
    hot = np.argwhere(operating & (r["coil_total_kW"] > 10.0))[0]
    broken["coil_total_kW"][tuple(hot)] *= 1.01
    assert any("energy balance" in p for p in _check_year(broken, "balance"))

    broken = {k: np.array(v, copy=True) if isinstance(v, np.ndarray) else v for k, v in r.items()}
    broken["preheat_kW"][tuple(first_off)] = 1.0
    assert any("off hours" in p for p in _check_year(broken, "off"))

    _, _, found = _headline(settings, {"coil_total_kW": np.full((5, 8760), np.inf)}, design, "x")
    assert any("annual peak" in p for p in found)


@pytest.mark.parametrize("climate", BUNDLED_CLIMATES)
def test_dashboard_headline_figures_stay_finite_at_every_control_end(climate):
    # The dashboard's own state object (no browser): each control set to each end of its
    # range in turn, one after the other (so the ends combine). Every accepted change
    # shows finite headline figures; a refused one keeps the last valid (finite) figures
    # and puts a message beside a control.
    from plantside.dashboard.state import DashboardState
    from plantside.study.scenario import loads_scenario

    # The SI example without its supply reset (16 °C) and with preheat at 4 °C, so that the
    # dashboard's whole supply range is open to the model (the example as it is: defect D1,
    # test_impossible_requests.py::test_defect_d1_dashboard_supply_range_is_what_the_model_accepts).
    path = Path(__file__).parents[1] / "example_data" / "scenarios" / "linden_office_si.toml"
    text = path.read_text(encoding="utf-8")
    text = "\n".join(line for line in text.splitlines() if "supply_reset" not in line)
    text = text.replace("bypass_factor = 0.12", "bypass_factor = 0.12\npreheat_drybulb = 4.0")
    assert "preheat_drybulb = 4.0" in text
    state = DashboardState(loads_scenario(text, "grid.toml", path.parent))
    assert state.set("climate", climate), state.messages
    low, high = state.supply_temperature_range()
    bypass_low, bypass_high = state.bypass_factor_range()
    changes = [
        ("outdoor_air_fraction", 0.0),
        ("outdoor_air_fraction", 1.0),
        ("supply_air_temperature", high),
        ("bypass_factor", bypass_high),
        ("fan_control", "constant_volume"),
        ("economizer", "differential_enthalpy"),
        ("economizer_integrated", False),
        ("outdoor_air_fraction", 0.0),
        ("supply_air_temperature", low),
        ("bypass_factor", bypass_low),
        ("economizer", "fixed_enthalpy"),
        ("fan_control", "variable_volume"),
        ("economizer", "none"),
        ("design_percent", 2.0),
        ("supply_air_temperature", low),
        ("bypass_factor", bypass_high),
    ]
    for control, value in changes:
        ok = state.set(control, value)
        figures = state.result.figures
        numbers = {
            "design zone load": figures.design_zone_load,
            "design coil load": figures.design_coil_load,
            "ratio": figures.coil_to_zone_ratio,
            "annual peak": figures.peak_coil_load,
            "cooling energy": figures.cooling_energy,
            "hours above 75 %": figures.hours_above_threshold,
            "recommended capacity": figures.recommended_capacity,
        }
        bad = {k: v for k, v in numbers.items() if not np.isfinite(v)}
        assert not bad, f"{climate}: {control} = {value!r} shows {bad}"
        if not ok:
            assert any(state.messages.values()), f"{climate}: {control} refused silently"
            COUNTS["dashboard changes refused with a message"] += 1
        COUNTS["dashboard changes"] += 1
