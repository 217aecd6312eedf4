"""Boilers: efficiency against return water and firing rate, hourly fuel."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from plantside.errors import InputRangeError
from plantside.plant.boilers import boiler_cautions, boiler_efficiency, boiler_hours


@pytest.mark.parametrize(("kind", "rated"), [("condensing", 0.95), ("non_condensing", 0.82)])
def test_rated_point_is_reproduced(kind, rated):
    # Definition of the rating: full fire at the rated return temperature.
    assert boiler_efficiency(26.7, 1.0, kind, rated, 26.7) == pytest.approx(rated, rel=1e-12)


def test_condensing_efficiency_falls_with_return_temperature():
    # Physics (from memory of manufacturers' curves): condensing gains vanish as the return
    # water passes the flue-gas dew point (about 55 °C), so efficiency falls with return.
    t = np.linspace(20.0, 80.0, 61)
    eta = boiler_efficiency(t, 1.0, "condensing", 0.95)
    assert np.all(np.diff(eta) <= 1e-12)
    assert eta[0] - eta[-1] > 0.08
    flat = boiler_efficiency(t, 1.0, "non_condensing", 0.82)
    assert np.ptp(flat) == pytest.approx(0.0, abs=1e-12)


def test_jacket_loss_lowers_non_condensing_efficiency_at_low_fire():
    # A constant casing loss (common practice, no source) weighs more at low fire.
    x = np.array([0.2, 0.5, 1.0])
    eta = boiler_efficiency(60.0, x, "non_condensing", 0.82, jacket_loss=0.01)
    assert np.all(np.diff(eta) > 0)
    no_loss = boiler_efficiency(60.0, x, "non_condensing", 0.82, jacket_loss=0.0)
    assert no_loss == pytest.approx(np.full(3, 0.82))


@given(
    st.floats(1.0, 1000.0), st.floats(20.0, 90.0), st.sampled_from(["condensing", "non_condensing"])
)
def test_fuel_is_heat_over_efficiency(load, t_return, kind):
    # Energy balance of the boiler: fuel = heat / overall efficiency, hour by hour.
    result = boiler_hours(load, 1000.0, t_return, kind, 0.9)
    eta = boiler_efficiency(t_return, load / 1000.0, kind, 0.9)
    assert result.fuel_input == pytest.approx(load / eta, rel=1e-9)
    assert result.fuel_input > load


def test_no_fuel_without_load_and_cautions():
    result = boiler_hours(np.array([0.0, 100.0]), np.array([0.0, 500.0]), 40.0)
    assert result.fuel_input[0] == 0.0 and np.isnan(result.efficiency[0])
    assert boiler_cautions([45.0, 70.0], [10.0, 10.0], "non_condensing")
    assert not boiler_cautions([45.0], [10.0], "condensing")
    with pytest.raises(InputRangeError, match="boiler_type"):
        boiler_efficiency(50.0, 1.0, "steam")
