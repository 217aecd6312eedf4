"""Simultaneous heating and cooling; a heat-recovery chiller's heat and hours."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from plantside.plant.heat_recovery import (
    heat_recovery_chiller,
    simultaneous_heating,
    simultaneous_heating_duration,
)


def test_simultaneous_heating_only_while_cooling_runs():
    heating = np.array([80.0, 40.0, 10.0, 0.0])
    cooling = np.array([0.0, 200.0, 300.0, 400.0])
    assert simultaneous_heating(heating, cooling).tolist() == [0.0, 40.0, 10.0, 0.0]
    curve = simultaneous_heating_duration(heating, cooling)
    assert curve["load_kW"].iloc[0] == 40.0  # the peak at 1 h (load-duration definition)


def test_heat_recovery_limits():
    # Heat is capped by the simultaneous heating, the machine's size and, by the first law,
    # by cooling x COP/(COP - 1): 70 kW of cooling at COP 3.5 gives at most 98 kW of heat.
    heating = np.array([100.0, 300.0, 100.0, 50.0])
    cooling = np.array([70.0, 500.0, 500.0, 0.0])
    result = heat_recovery_chiller(heating, cooling, 200.0, 3.5)
    assert result.heat == pytest.approx([98.0, 200.0, 100.0, 0.0])
    summary = result.summary()
    assert summary["heat_recovery_hours"] == 3
    assert summary["heat_recovered_kWh"] == pytest.approx(398.0)


@given(
    arrays(float, 24, elements=st.floats(0.0, 500.0)),
    arrays(float, 24, elements=st.floats(0.0, 500.0)),
    st.floats(10.0, 400.0),
    st.floats(1.5, 6.0),
)
def test_heat_recovery_energy_balance_every_hour(heating, cooling, capacity, cop):
    # First law on the machine, every hour: heat delivered = cooling taken + input;
    # never more cooling than the chilled water offers, never more heat than needed.
    result = heat_recovery_chiller(heating, cooling, capacity, cop, no_load_threshold=0.0)
    assert result.heat == pytest.approx(result.cooling + result.input_power, abs=1e-9)
    assert np.all(result.cooling <= cooling + 1e-9)
    assert np.all(result.heat <= np.minimum(heating, capacity) + 1e-9)
