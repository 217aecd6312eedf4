"""Chiller curves: the curve form, defaults, fits reproducing the rated full load and IPLV."""

import numpy as np
import pytest
from plantside.constants import KW_PER_TON
from plantside.errors import InputRangeError
from plantside.plant.chillers import (
    IPLV_TOLERANCE,
    RATING_CHILLED_WATER_C,
    RATING_CONDENSER_C,
    carnot_eir,
    chiller_hours,
    condenser_entering_temperature,
    default_chiller_curves,
    fit_chiller_curves,
    rating_point_cops,
)
from plantside.plant.efficiency import cop_from_efficiency, integrated_part_load_value

# The clinic example's options (core/plantside/data/example_scenario.toml), kW/ton at
# 100/75/50/25 %: the option's own rating, the thing the curves must reproduce.
CLINIC_OPTIONS = (
    (0.62, 0.55, 0.50, 0.58),
    (0.64, 0.57, 0.52, 0.60),
    (0.63, 0.56, 0.51, 0.59),
)
# ASHRAE 90.1-2019 Table 6.8.1-3 minimum chiller efficiencies (from memory):
# water-cooled centrifugal 300-600 tons Path A 0.560 / IPLV 0.520 kW/ton, Path B 0.585 / 0.380;
# air-cooled >= 150 tons Path A EER 10.1 / IPLV 13.7.
STANDARD_MINIMA = (
    ("water", "kw_per_ton", 0.560, 0.520),
    ("water", "kw_per_ton", 0.585, 0.380),
    ("air", "eer", 10.1, 13.7),
)


def test_rating_conditions_in_celsius():
    # AHRI 550/590 (I-P)-2020 (from memory): 44 °F leaving chilled water; 85/75/65/65 °F
    # entering condenser water; 95/80/65/55 °F entering air. °C = (°F - 32) / 1.8.
    assert RATING_CHILLED_WATER_C == pytest.approx(6.6667, abs=1e-4)
    assert RATING_CONDENSER_C["water"] == pytest.approx(
        (29.4444, 23.8889, 18.3333, 18.3333), abs=1e-4
    )
    assert RATING_CONDENSER_C["air"] == pytest.approx((35.0, 26.6667, 18.3333, 12.7778), abs=1e-4)


@pytest.mark.parametrize("condenser", ["water", "air"])
def test_default_eirft_follows_the_carnot_cycle(condenser):
    # Reversed Carnot cycle, COP = T_L / (T_H - T_L) (any thermodynamics text; ASHRAE
    # Handbook Fundamentals 2017 Ch. 2). The biquadratic is a fit to it, so within 2 %
    # over the fitted range, normalised at the rating condition.
    curves = default_chiller_curves(condenser)
    chw = np.linspace(5.0, 12.0, 8)[:, None]
    cond = np.linspace(*{"water": (15.0, 32.0), "air": (5.0, 40.0)}[condenser], 9)[None, :]
    t_c0 = RATING_CONDENSER_C[condenser][0]
    offset = {"water": 7.0, "air": 14.0}[condenser]
    t_low = chw - 2.0 + 273.15
    t_high = cond + offset + 273.15
    carnot_cop = t_low / (t_high - t_low)
    rating_cop = (RATING_CHILLED_WATER_C - 2.0 + 273.15) / (
        t_c0 + offset - RATING_CHILLED_WATER_C + 2.0
    )
    assert curves.eir_ratio(chw, cond) == pytest.approx(rating_cop / carnot_cop, rel=0.02)
    assert carnot_eir(chw, cond, condenser) == pytest.approx(1.0 / carnot_cop, rel=1e-12)


@pytest.mark.parametrize("condenser", ["water", "air"])
def test_default_curves_run_the_right_way(condenser):
    # Physics (any refrigeration text): a lower lift takes less input per output; colder
    # condenser and warmer chilled water give more capacity.
    curves = default_chiller_curves(condenser)
    cond = np.linspace(15.0, 35.0, 21)
    assert np.all(np.diff(curves.eir_ratio(6.67, cond)) > 0)
    assert np.all(np.diff(curves.capacity_ratio(6.67, cond)) < 0)
    assert np.all(np.diff(curves.capacity_ratio(np.linspace(4, 12, 9), 29.4)) > 0)


@pytest.mark.parametrize("efficiencies", CLINIC_OPTIONS)
@pytest.mark.parametrize("condenser", ["water", "air"])
def test_four_point_fit_reproduces_full_load_and_iplv(efficiencies, condenser):
    # AHRI 550/590 (I-P)-2020 section 5.4: IPLV = 1/(0.01/A + 0.42/B + 0.45/C + 0.12/D)
    # for kW/ton. Full load exactly; IPLV within the stated tolerance (3 %).
    curves = fit_chiller_curves(
        efficiencies[0], condenser, "kw_per_ton", part_load_efficiencies=efficiencies
    )
    cops = rating_point_cops(curves)
    assert KW_PER_TON / cops[0] == pytest.approx(efficiencies[0], rel=1e-9)
    rated = integrated_part_load_value(efficiencies, "kw_per_ton")
    from_curves = KW_PER_TON / integrated_part_load_value(cops, "cop")
    assert from_curves == pytest.approx(rated, rel=IPLV_TOLERANCE)
    # and each rating point within 10 % (a three-coefficient curve through four points)
    assert KW_PER_TON / cops == pytest.approx(efficiencies, rel=0.10)


@pytest.mark.parametrize(("condenser", "metric", "full_load", "iplv"), STANDARD_MINIMA)
def test_iplv_only_fit_reproduces_both_ratings(condenser, metric, full_load, iplv):
    # The 90.1 minima (from memory) as an option's rating: both reproduced within 0.1 %.
    curves = fit_chiller_curves(full_load, condenser, metric, iplv=iplv)
    cops = rating_point_cops(curves)
    assert cops[0] == pytest.approx(cop_from_efficiency(full_load, metric), rel=1e-9)
    assert integrated_part_load_value(cops, "cop") == pytest.approx(
        cop_from_efficiency(iplv, metric), rel=1e-3
    )


def test_unreachable_iplv_names_the_range():
    with pytest.raises(InputRangeError, match=r"iplv = 0\.05"):
        fit_chiller_curves(0.6, "water", "kw_per_ton", iplv=0.05)


def test_chiller_hours_at_rating_and_part_load():
    # At the rating condition and full load, input = capacity / COP (definition of COP_ref).
    curves = fit_chiller_curves(0.6, "water", "kw_per_ton", iplv=0.5)
    full = chiller_hours(
        1000.0, 1000.0, RATING_CHILLED_WATER_C, RATING_CONDENSER_C["water"][0], curves
    )
    assert full.input_power == pytest.approx(1000.0 * 0.6 / KW_PER_TON, rel=1e-9)
    assert full.part_load_ratio == pytest.approx(1.0)
    # a load beyond the available capacity is only partly served
    over = chiller_hours(
        1200.0, 1000.0, RATING_CHILLED_WATER_C, RATING_CONDENSER_C["water"][0], curves
    )
    assert over.served_load == pytest.approx(1000.0)
    # no machine running: no power
    none = chiller_hours(np.array([0.0, 10.0]), np.array([0.0, 0.0]), 6.7, 25.0, curves)
    assert none.input_power.tolist() == [0.0, 0.0]


def test_cycling_below_minimum_part_load_ratio():
    # Project rule (no source): power proportional to load below the minimum PLR.
    curves = default_chiller_curves("water")
    p = curves.input_power_ratio(np.array([0.05, 0.1, 0.15]), 6.67, 29.44)
    assert p[0] / p[2] == pytest.approx(0.05 / 0.15)
    assert p[1] / p[2] == pytest.approx(0.10 / 0.15)


def test_condenser_temperature_from_weather():
    # Tower: wet bulb + approach, never below the floor; air-cooled: the dry bulb.
    wb = np.array([5.0, 15.0, 24.0])
    assert condenser_entering_temperature("water", wet_bulb=wb, tower_approach=4.0, floor=18.0) == (
        pytest.approx([18.0, 19.0, 28.0])
    )
    db = np.array([-5.0, 35.0])
    assert condenser_entering_temperature("air", drybulb=db) == pytest.approx(db)
    with pytest.raises(InputRangeError, match="wet_bulb"):
        condenser_entering_temperature("water", drybulb=db)
    with pytest.raises(InputRangeError, match="condenser"):
        condenser_entering_temperature("evaporative", wet_bulb=wb)
