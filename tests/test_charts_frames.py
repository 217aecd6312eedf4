"""Chart frames: model results -> small tidy frames in display units.

The frames are checked against the air-handler model they summarise (a real
year of ``plantside.air_handler.year`` on a synthetic weather year of a fictional
site), against the unit definitions (AHRI 550/590 ton, NIST SP 811 factors) and
against psychrolib for the psychrometric chart's curves.
"""

from __future__ import annotations

from dataclasses import replace
from functools import cache

import numpy as np
import pandas as pd
import psychrolib
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp
from plantside.air_handler.year import (
    AirHandlerSettings,
    design_point,
    hourly_year,
    outdoor_air_sweep,
)
from plantside.air_handler.zone_loads import ZoneLoadModel
from plantside.charts import frames
from plantside.charts.compare import combine_scenarios
from plantside.climate.fictional_sites import generate_year, site_parameters
from plantside.errors import InputRangeError
from plantside.plant.staging import stage_machines

#: kW per ton of refrigeration: 12,000 Btu/h (AHRI Standard 550/590) x 1055.05585 J/Btu
#: (NIST SP 811, International Table Btu) / 3600 s/h.
KW_PER_TON = 12000 * 1055.05585262 / 3600 / 1000
#: Grains per pound (exact, NIST SP 811).
GRAINS_PER_LB = 7000.0

DESIGN_OUTDOOR = (34.0, 0.0150)  # °C, kg/kg: a hot, humid design hour of the fictional site


@cache
def study(outdoor_air_fraction: float = 0.25, site: str = "Salvia Flats"):
    """One air handler on a fictional site: weather, settings, zone model, year, design point.

    The weather year is the seeded generator's (fictional site); the settings and
    zone loads are a small office-like unit of our own.
    """
    weather = generate_year(site_parameters(site), seed=7)
    settings = AirHandlerSettings(
        supply_airflow=6.0,
        minimum_outdoor_air_fraction=outdoor_air_fraction,
        supply_fan_power=8.0,
    )
    zone = ZoneLoadModel(
        cooling_design_sensible=70.0,
        cooling_design_latent=10.0,
        cooling_design_drybulb=34.0,
        heating_design_load=40.0,
    )
    pressure = float(np.mean(weather.pressure))
    year = hourly_year(settings, weather, zone)
    design = design_point(settings, zone, (*DESIGN_OUTDOOR, pressure))
    return weather, settings, zone, year, design


def _zone_total(year: pd.DataFrame) -> np.ndarray:
    return (year["zone_sensible_kW"] + year["zone_latent_kW"]).to_numpy()


# ---------------------------------------------------------------------------------------
# chart 1: design breakdown
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("system", ["SI", "IP"])
def test_design_breakdown_ends_on_the_models_coil_load(system):
    *_, design = study()
    frame = frames.design_breakdown_frame(design.loads, system)
    factor = 1.0 if system == "SI" else 1.0 / KW_PER_TON
    steps = frame[frame["kind"] == "part"]
    # the steps join up: each starts where the one before ended
    assert np.allclose(steps["start"].to_numpy()[1:], steps["end"].to_numpy()[:-1])
    coil = frame.set_index("component").loc["Coil load", "load"]
    # the last step ends on the model's coil load (the waterfall closes the model's energy
    # balance, plantside air-handler contract)
    assert steps["end"].iloc[-1] == pytest.approx(coil, rel=1e-9)
    assert coil == pytest.approx(design.loads["coil_total_kW"] * factor, rel=1e-9)
    zone = frame.set_index("component").loc["Zone load", "load"]
    expected_zone = design.loads["zone_sensible_kW"] + design.loads["zone_latent_kW"]
    assert zone == pytest.approx(expected_zone * factor, rel=1e-9)
    sensible = frame.set_index("component").loc["Zone sensible", "load"]
    assert sensible == pytest.approx(design.loads["zone_sensible_kW"] * factor, rel=1e-9)
    assert frame.attrs["system"] == system


def test_design_breakdown_shows_every_term_of_the_balance():
    loads = {
        "zone_sensible_kW": 50.0,
        "zone_latent_kW": 8.0,
        "ventilation_sensible_kW": 12.0,
        "ventilation_latent_kW": 20.0,
        "fan_heat_kW": 5.0,
        "economizer_effect_kW": 3.0,  # + reduces the coil load (contract)
        "recovery_effect_kW": 4.0,
        "reheat_kW": 6.0,
        "condensate_heat_kW": 0.5,
        "coil_total_kW": 50 + 8 + 12 + 20 + 5 - 3 - 4 + 6 - 0.5 + 1.25,  # 1.25 kW unexplained
    }
    frame = frames.design_breakdown_frame(loads, "SI").set_index("component")
    # 50 kW = 14.217 tons of refrigeration (AHRI 550/590 ton of 12,000 Btu/h)
    ip = frames.design_breakdown_frame(loads, "IP").set_index("component")
    assert ip.loc["Zone sensible", "load"] == pytest.approx(14.217, abs=5e-4)
    assert frame.loc["Economizer / recovery", "load"] == pytest.approx(-7.0)
    assert frame.loc["Terminal reheat", "load"] == pytest.approx(6.0)
    assert frame.loc["Condensate heat", "load"] == pytest.approx(-0.5)
    # what the listed terms do not explain is shown, never hidden
    assert frame.loc["Other", "load"] == pytest.approx(1.25)
    assert "Preheat and heating coil" not in frame.index  # zero terms are left out


def test_design_breakdown_names_the_plant_distribution_gain():
    # plant coil load = (1 + g) x the sum of the coil loads, g the pump and pipe gain
    # (common practice (no source): a few per cent of the coil loads)
    loads = {"zone_sensible_kW": 80.0, "zone_latent_kW": 10.0, "ventilation_sensible_kW": 10.0}
    loads["distribution_gain_kW"] = 0.05 * 100.0
    loads["coil_total_kW"] = 105.0
    frame = frames.design_breakdown_frame(loads, "SI").set_index("component")
    assert frame.loc["Distribution gain", "load"] == pytest.approx(5.0)
    assert "Other" not in frame.index
    assert frame.loc["Distribution gain", "end"] == pytest.approx(105.0)


@pytest.mark.parametrize(
    ("changes", "term", "step"),
    [
        # the coil holds a leaving dew point; its air is reheated in the unit (hot water)
        (
            {"coil_model": "leaving_dew_point", "leaving_dew_point": 10.0},
            "dehumidification_reheat_kW",
            "Dehumidification reheat",
        ),
        # the same reheat from the refrigeration condenser
        (
            {
                "coil_model": "leaving_dew_point",
                "leaving_dew_point": 10.0,
                "reheat_source": "condenser_heat",
            },
            "condenser_heat_recovered_kW",
            "Dehumidification reheat",
        ),
        # with a run-around exchanger (here it covers the whole reheat): heat moved around
        # the coil is on neither side of the balance, no step of its own
        (
            {
                "coil_model": "leaving_dew_point",
                "leaving_dew_point": 10.0,
                "coil_runaround_effectiveness": 0.5,
            },
            "coil_runaround_heat_kW",
            None,
        ),
        # the scheduled airflow's surplus over the zone load, reheated at the terminals
        ({"design_airflow": "scheduled"}, "reheat_kW", "Terminal reheat"),
        # a coil driven colder to hold the zone humidity, then terminal reheat
        (
            {"zone_relative_humidity_max": 0.45, "zone_relative_humidity_limit": 0.6},
            "humidity_control_reheat_kW",
            "Terminal reheat",
        ),
    ],
)
def test_design_breakdown_of_the_model_leaves_nothing_unexplained(changes, term, step):
    # the model's own design point: the named steps add up to its coil load (the energy
    # balance of the air handler, ASHRAE Handbook Fundamentals 2017 Ch. 1 mixing, heating
    # and cooling-and-dehumidifying balances), so no "Other" step is drawn
    _, base, zone, _, _ = study()
    settings = replace(base, **changes)
    airflow = "scheduled" if changes.get("design_airflow") == "scheduled" else "load"
    point = design_point(settings, zone, (*DESIGN_OUTDOOR, 101325.0), airflow=airflow)
    loads = {key: float(value) for key, value in point.loads.items() if key.endswith("_kW")}
    assert loads[term] > 0.1  # the case exercises its term
    frame = frames.design_breakdown_frame(loads, "SI").set_index("component")
    assert "Other" not in frame.index
    if step is None:
        return
    assert frame.loc[step, "load"] == pytest.approx(
        sum(
            loads.get(key, 0.0)
            for label, keys, _ in frames.BREAKDOWN_OPTIONAL
            if label == step
            for key in keys
        ),
        rel=1e-12,
    )
    assert frame.loc["Coil load", "load"] == pytest.approx(loads["coil_total_kW"], rel=1e-12)


def test_design_breakdown_needs_the_coil_load():
    with pytest.raises(InputRangeError, match="coil_total_kW"):
        frames.design_breakdown_frame({"zone_sensible_kW": 1.0}, "SI")


# ---------------------------------------------------------------------------------------
# chart 2: binned year
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("system", ["SI", "IP"])
def test_year_scatter_counts_every_operating_hour_once(system):
    *_, year, _ = study()
    frame = frames.year_scatter_frame(year, system)
    assert len(frame) <= 600 < len(year)
    operating = year["operating"].to_numpy()
    assert frame["hours"].sum() == operating.sum()
    assert frame.attrs["hours_off"] == (~operating).sum()
    # hours per economizer mode agree with the model's own count
    counts = year.loc[operating, "economizer_mode"].astype(str).value_counts()
    by_mode = frame.groupby("mode")["hours"].sum()
    for mode, hours in counts.items():
        assert by_mode.get(mode, 0) == hours
    # every hour lies in its cell: the hour-weighted mean coil load is within half a cell
    factor = 1.0 if system == "SI" else 1.0 / KW_PER_TON
    coil = year.loc[operating, "coil_total_kW"].to_numpy() * factor
    half_cell = float((frame["coil_high"] - frame["coil_low"]).iloc[0]) / 2
    mean = np.average(frame["coil_load"], weights=frame["hours"])
    assert abs(mean - coil.mean()) <= half_cell
    assert (frame["coil_low"] <= coil.max()).all()
    assert frame["coil_high"].max() >= coil.max() >= frame["coil_low"].max()
    # both axes share one cell width, so the coil = zone diagonal stays a diagonal
    zone_width = (frame["zone_high"] - frame["zone_low"]).to_numpy()
    coil_width = (frame["coil_high"] - frame["coil_low"]).to_numpy()
    assert np.allclose(zone_width, coil_width)


def test_year_scatter_coarsens_to_the_row_limit():
    *_, year, _ = study()
    frame = frames.year_scatter_frame(year, "SI", bins=150, max_rows=100)
    assert len(frame) <= 100
    assert frame["hours"].sum() == year["operating"].sum()


# ---------------------------------------------------------------------------------------
# chart 3: load duration, part-load bins, IPLV weights
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("system", ["SI", "IP"])
def test_load_duration_curves_keep_the_peak_and_stay_small(system):
    *_, year, _ = study()
    series = frames.year_load_series(year)
    frame = frames.load_duration_frame(series, system)
    factor = 1.0 if system == "SI" else 1.0 / KW_PER_TON
    for label, values in series.items():
        curve = frame[frame["series"] == label]
        assert len(curve) <= 200
        # first point: the year's peak at 1 hour; last: the lowest cooling load at N hours
        assert curve["hours_at_or_above"].iloc[0] == 1
        assert curve["load"].iloc[0] == pytest.approx(values.max() * factor, rel=1e-12)
        assert curve["hours_at_or_above"].iloc[-1] == len(year)
        assert np.all(np.diff(curve["load"].to_numpy()) <= 0)
    assert np.array_equal(series["Coil load"], year["coil_total_kW"].to_numpy())
    assert np.allclose(series["Zone load"], _zone_total(year))


def test_capacity_lines_are_cumulative_stages():
    frame = frames.capacity_lines_frame([400.0, 600.0], "IP")
    assert list(frame["line"]) == ["1 machine", "Plant capacity"]
    assert frame["load"].to_numpy() == pytest.approx(np.array([400.0, 1000.0]) / KW_PER_TON)
    with pytest.raises(InputRangeError, match="capacities"):
        frames.capacity_lines_frame([400.0, -1.0], "SI")


@pytest.mark.parametrize(("system", "energy_factor"), [("SI", 1e-3), ("IP", 1 / KW_PER_TON)])
def test_part_load_bins_add_up_to_the_year(system, energy_factor):
    *_, year, _ = study()
    coil = year["coil_total_kW"].to_numpy()
    capacity = 1.1 * coil.max()
    frame = frames.part_load_frame(coil, capacity, system)
    assert frame["hours"].sum() == len(year)
    # kWh -> MWh (SI) or ton-hours (IP: kWh / 3.517 kW per ton, AHRI 550/590)
    assert frame["energy"].sum() == pytest.approx(coil.sum() * energy_factor, rel=1e-9)
    assert list(frame["band"][:2]) == ["no load", "0-10 %"]
    assert len(frame) == 12


def test_iplv_weights_beside_the_standard():
    *_, year, _ = study()
    coil = year["coil_total_kW"].to_numpy()
    capacities = [0.4 * coil.max(), 0.7 * coil.max()]
    staged = stage_machines(coil, capacities, 0.15)
    frame = frames.iplv_weights_frame(staged.machine_load, capacities, "SI")
    standard = frame[frame["source"] == "AHRI 550/590"].set_index("rating_point")
    # AHRI Standard 550/590 (I-P)-2020 section 5.4: 1 %, 42 %, 45 %, 12 % at 100/75/50/25 %
    assert standard.loc[["100 %", "75 %", "50 %", "25 %"], "weight_percent"].tolist() == (
        pytest.approx([1.0, 42.0, 45.0, 12.0])
    )
    building = frame[frame["source"] == "This building"]
    assert building["weight_percent"].sum() == pytest.approx(100.0)


# ---------------------------------------------------------------------------------------
# chart 4: psychrometric chart
# ---------------------------------------------------------------------------------------
def _line(frame, family, label=None):
    part = frame[frame["family"] == family]
    if label is not None:
        part = part[part["line"] == label]
    return part.sort_values("order")


def test_psychrometric_curves_against_psychrolib_si():
    # 56 points over -10..45 °C put a point on every whole degree
    grid = frames.psychrometric_grid_frame(101325.0, "SI", (-10.0, 45.0, 0.030), points=56)
    saturation = _line(grid, "saturation").set_index("drybulb")
    # saturation humidity ratio at 20 °C, 101.325 kPa: psychrolib GetSatHumRatio
    # (ASHRAE Handbook Fundamentals 2017 Ch. 1 Table 2 prints 14.758 g/kg)
    expected = psychrolib.GetSatHumRatio(20.0, 101325.0) * 1000
    assert saturation.loc[20.0, "humidity_ratio"] == pytest.approx(expected, rel=1e-3)
    half = _line(grid, "relative humidity", "50 %").set_index("drybulb")
    expected = psychrolib.GetHumRatioFromRelHum(30.0, 0.5, 101325.0) * 1000
    assert half.loc[30.0, "humidity_ratio"] == pytest.approx(expected, rel=1e-3)
    # the 50 kJ/kg line ends on saturation where psychrolib's saturated enthalpy is 50 kJ/kg
    line = _line(grid, "enthalpy", "50 kJ/kg")
    end = line.iloc[-1]
    saturated = psychrolib.GetSatAirEnthalpy(float(end["drybulb"]), 101325.0) / 1000
    assert saturated == pytest.approx(50.0, abs=0.05)
    # it would meet dry air at 50 / 1.006 = 49.7 °C, beyond the 45 °C edge, so it starts on
    # the edge; the 40 kJ/kg line starts on the dry-air axis at 40 / 1.006 °C (cp of dry
    # air, ASHRAE Handbook Fundamentals 2017 Ch. 1 Eq. 32)
    assert line.iloc[0]["drybulb"] == pytest.approx(45.0)
    start = _line(grid, "enthalpy", "40 kJ/kg").iloc[0]
    assert start["humidity_ratio"] == 0.0
    assert start["drybulb"] == pytest.approx(40.0 / 1.006, rel=1e-9)
    assert set(_line(grid, "relative humidity")["value"]) == set(range(10, 100, 10))
    assert len(grid) <= 1000


def test_psychrometric_curves_against_psychrolib_ip():
    psychrolib.SetUnitSystem(psychrolib.IP)
    extent = frames.psychrometric_extent([-5.0, 40.0], [0.001, 0.02], "IP")
    grid = frames.psychrometric_grid_frame(101325.0, "IP", extent)
    # the 40 Btu/lb line (I-P scale, 0 °F dry air) meets saturation where psychrolib's I-P
    # saturated enthalpy is 40 Btu/lb, at 14.696 psia
    end = _line(grid, "enthalpy", "40 Btu/lb").iloc[-1]
    saturated = psychrolib.GetSatAirEnthalpy(float(end["drybulb"]), 14.6959)
    assert saturated == pytest.approx(40.0, abs=0.05)
    # humidity in grains per pound: W [lb/lb] x 7000 (NIST SP 811)
    saturation = _line(grid, "saturation")
    t = float(saturation["drybulb"].iloc[5])
    expected = psychrolib.GetSatHumRatio(t, 14.6959) * GRAINS_PER_LB
    assert float(saturation["humidity_ratio"].iloc[5]) == pytest.approx(expected, rel=1e-3)
    # the extent holds at least -10..45 °C (14..113 °F), rounded out to 10 °F steps
    assert grid["drybulb"].min() == pytest.approx(10.0)
    assert grid["drybulb"].max() == pytest.approx(120.0)


def test_process_frame_from_the_design_point():
    *_, design = study()
    frame = frames.process_frame(design.states, "IP", 101325.0).set_index("state")
    # no energy recovery and no preheat at design: those states coincide and are not named
    assert list(frame["point"]) == ["Outdoor", "Return", "Mixed", "Coil leaving", "Supply"]
    # 34 °C = 93.2 °F; 0.015 kg/kg = 105 gr/lb (x 7000, NIST SP 811)
    assert frame.loc["outdoor", "drybulb"] == pytest.approx(93.2)
    assert frame.loc["outdoor", "humidity_ratio"] == pytest.approx(105.0)
    # the air path: outdoor and return to mixed, mixed through the coil to supply, room last
    mixed = frame.loc["mixed"]
    assert frame.loc["outdoor", "to_drybulb"] == pytest.approx(mixed["drybulb"])
    assert frame.loc["return", "to_drybulb"] == pytest.approx(mixed["drybulb"])
    assert mixed["to_drybulb"] == pytest.approx(frame.loc["coil_leaving", "drybulb"])
    assert frame.loc["supply", "segment"] == "room"
    assert frame.loc["supply", "to_drybulb"] == pytest.approx(frame.loc["return", "drybulb"])


def test_process_frame_names_coinciding_points_together():
    states = {
        "outdoor": (30.0, 0.012),
        "return": (24.0, 0.009),
        "mixed": (30.0, 0.012),  # 100 % outdoor air
        "coil_leaving": (12.0, 0.008),
        "supply": (13.0, 0.008),
        "zone": (np.nan, np.nan),
    }
    frame = frames.process_frame(states, "SI")
    assert frame["point"].iloc[0] == "Outdoor = Mixed"
    assert len(frame) == 4


def test_outdoor_density_counts_every_hour_in_its_cell():
    weather, *_ = study()
    frame = frames.outdoor_density_frame(weather.drybulb, weather.humidity_ratio, "SI")
    assert frame["hours"].sum() == weather.hours
    assert len(frame) <= 500
    # recount with numpy: cells of 2 K x 1 g/kg
    t = weather.drybulb
    w = weather.humidity_ratio * 1000
    cell = frame.iloc[int(np.argmax(frame["hours"]))]
    inside = (
        (t >= cell["drybulb_low"])
        & (t < cell["drybulb_high"])
        & (w >= cell["humidity_low"])
        & (w < cell["humidity_high"])
    )
    assert inside.sum() == cell["hours"]


# ---------------------------------------------------------------------------------------
# chart 5: outdoor-air sweep
# ---------------------------------------------------------------------------------------
def test_oa_sweep_from_the_models_sweep_and_marker():
    weather, settings, zone, *_ = study()
    sweep = outdoor_air_sweep(settings, weather, zone, fractions=np.linspace(0, 1, 11))
    frame = frames.oa_sweep_frame_from_sweep(sweep, "IP")
    assert frame["outdoor_air_percent"].tolist() == pytest.approx(list(range(0, 101, 10)))
    peaks = sweep["coil_total_peak_kW"].to_numpy() / KW_PER_TON
    assert frame["load"].to_numpy() == pytest.approx(peaks)
    marker = frames.oa_marker_frame(frame, 0.25)
    # linear interpolation halfway between the 20 % and 30 % points
    assert marker["load"].iloc[0] == pytest.approx(0.5 * (peaks[2] + peaks[3]))
    with pytest.raises(InputRangeError, match="current_fraction"):
        frames.oa_marker_frame(frame, 1.5)


def test_oa_sweep_frame_checks_lengths():
    with pytest.raises(InputRangeError, match="Coil total"):
        frames.oa_sweep_frame([0.0, 0.5, 1.0], {"Coil total": [1.0, 2.0]}, "SI")


# ---------------------------------------------------------------------------------------
# scenarios, records, limits
# ---------------------------------------------------------------------------------------
def test_combine_scenarios_keeps_each_scenarios_attrs():
    *_, year_a, _ = study(0.25)
    *_, year_b, _ = study(0.6)
    a = frames.year_scatter_frame(year_a, "SI")
    b = frames.year_scatter_frame(year_b, "SI")
    both = combine_scenarios({"A": a, "B": b})
    assert set(both["scenario"]) == {"A", "B"}
    assert both.attrs["scenarios"]["B"]["hours_off"] == b.attrs["hours_off"]
    with pytest.raises(InputRangeError, match="unit systems"):
        combine_scenarios({"A": a, "B": frames.year_scatter_frame(year_b, "IP")})
    with pytest.raises(InputRangeError, match="scenario"):
        combine_scenarios({"C": a})


def test_records_are_json_ready():
    frame = pd.DataFrame({"x": [1.5, np.nan, np.inf], "label": ["a", "b", "c"], "n": [1, 2, 3]})
    rows = frames.records(frame)
    assert rows[0] == {"x": 1.5, "label": "a", "n": 1}
    assert rows[1]["x"] is None and rows[2]["x"] is None


def test_frames_name_their_unit_system():
    with pytest.raises(InputRangeError, match="unit_system"):
        frames.capacity_lines_frame([100.0], "metric")
    frame = pd.DataFrame({"load": [1.0]})
    with pytest.raises(InputRangeError, match="unit system"):
        frames.frame_system(frame)
    assert frames.axis_title("Coil total load", "power", "IP") == "Coil total load [tons]"


# ---------------------------------------------------------------------------------------
# properties: binning never loses or invents an hour, whatever the loads
# ---------------------------------------------------------------------------------------
_loads = hnp.arrays(
    np.float64,
    st.integers(1, 400),
    elements=st.floats(-500.0, 5000.0, allow_nan=False, allow_infinity=False),
)


@settings(max_examples=60, deadline=None)
@given(zone=_loads, seed=st.integers(0, 2**16), system=st.sampled_from(["SI", "IP"]))
def test_binned_year_keeps_every_hour(zone, seed, system):
    rng = np.random.default_rng(seed)
    coil = np.abs(zone * rng.uniform(0.5, 2.0, zone.size))
    modes = rng.choice(["minimum_outdoor_air", "integrated", "locked_out"], zone.size)
    year = pd.DataFrame(
        {
            "coil_total_kW": coil,
            "zone_sensible_kW": zone,
            "zone_latent_kW": 0.0,
            "economizer_mode": modes,
        }
    )
    frame = frames.year_scatter_frame(year, system, max_rows=200)
    assert frame["hours"].sum() == zone.size
    assert len(frame) <= 200
    factor = 1.0 if system == "SI" else 1.0 / KW_PER_TON
    assert frame["coil_low"].min() <= coil.min() * factor + 1e-9
    assert frame["coil_high"].max() >= coil.max() * factor - 1e-9


@settings(max_examples=60, deadline=None)
@given(
    drybulb=hnp.arrays(np.float64, st.integers(1, 300), elements=st.floats(-40.0, 50.0)),
    system=st.sampled_from(["SI", "IP"]),
)
def test_outdoor_density_keeps_every_hour(drybulb, system):
    humidity = np.clip(0.0002 * (drybulb + 45.0), 0.0, 0.03)
    frame = frames.outdoor_density_frame(drybulb, humidity, system, max_rows=50)
    assert frame["hours"].sum() == drybulb.size
    assert len(frame) <= 50
