"""Recovery modulation without latent recovery: the short form against the general one.

:func:`plantside.air.energy_recovery.recovery_fraction_for_mixed_drybulb` solves the
quadratic of its docstring; with a scalar latent effectiveness of 0 (a sensible-only
wheel or plate, the air handler's default) A = 0 and it returns -C/B from a shorter
computation (issue 15: the outdoor-air sweep). The general form stays checked against
psychrolib's mixing balances in tests/test_energy_recovery.py; here the short form must
give the same numbers, to the bit, and close the same psychrolib round trip.
"""

from __future__ import annotations

import numpy as np
import psychrolib
import pytest
from plantside.air.energy_recovery import (
    recovery_fraction_for_mixed_drybulb,
    recovery_leaving_state,
)

psychrolib.SetUnitSystem(psychrolib.SI)


def _cases(n=5000, seed=3):
    rng = np.random.default_rng(seed)
    target = rng.uniform(5.0, 20.0, n)
    x = rng.uniform(0.0, 1.0, n)
    t_o, w_o = rng.uniform(-30.0, 15.0, n), rng.uniform(0.0005, 0.01, n)
    t_r, w_r = rng.uniform(18.0, 26.0, n), rng.uniform(0.004, 0.012, n)
    x[:20] = 0.0  # no outdoor air: no modulation reaches the target (+-inf or NaN)
    t_r[20:30] = t_o[20:30]  # nothing to recover (B = 0)
    return target, x, t_o, w_o, t_r, w_r


@pytest.mark.parametrize("sensible", [0.3, 0.7, 1.0])
def test_sensible_only_is_the_general_form_to_the_bit(sensible):
    target, x, t_o, w_o, t_r, w_r = _cases()
    args = (target, x, t_o, w_o, t_r, w_r, t_r, w_r, sensible)
    short = recovery_fraction_for_mixed_drybulb(*args, 0.0)
    # a latent effectiveness given per element takes the general form
    general = recovery_fraction_for_mixed_drybulb(*args, np.zeros(target.size))
    np.testing.assert_array_equal(short, general)  # NaN where both are NaN
    assert short.shape == general.shape


def test_sensible_only_scalars_and_broadcasting():
    one = recovery_fraction_for_mixed_drybulb(15.0, 0.3, -5.0, 0.002, 22.0, 0.008, 22.0, 0.008, 0.7)
    assert np.ndim(one) == 0
    column = recovery_fraction_for_mixed_drybulb(
        15.0, np.array([[0.2], [0.3]]), np.array([-5.0, 0.0]), 0.002, 22.0, 0.008, 22.0, 0.008, 0.7
    )
    assert column.shape == (2, 2)
    assert column[1, 0] == one


def test_sensible_only_round_trip_with_psychrolib():
    # Recover at f, mix with return air by psychrolib's enthalpy balance; the short form
    # must find f again from the mixed dry bulb (as the general form does).
    t_r, w_r, es, p = 24.0, 0.008, 0.7, 101325.0
    for f_true, x, t_o, rh in (
        (0.25, 0.3, -10.0, 0.6),
        (0.8, 0.5, 2.0, 0.9),
        (1.0, 0.2, -25.0, 0.4),
    ):
        w_o = psychrolib.GetHumRatioFromRelHum(t_o, rh, p)
        t2, w2 = recovery_leaving_state(t_o, w_o, t_r, w_r, es, 0.0, fraction=f_true)
        h = x * psychrolib.GetMoistAirEnthalpy(float(t2), float(w2)) + (
            1 - x
        ) * psychrolib.GetMoistAirEnthalpy(t_r, w_r)
        w = x * float(w2) + (1 - x) * w_r
        target = psychrolib.GetTDryBulbFromEnthalpyAndHumRatio(h, w)
        f = recovery_fraction_for_mixed_drybulb(target, x, t_o, w_o, t_r, w_r, t_r, w_r, es, 0.0)
        assert float(f) == pytest.approx(f_true, abs=1e-7)
