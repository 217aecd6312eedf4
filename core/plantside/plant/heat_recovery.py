"""Simultaneous heating and cooling, and what a heat-recovery chiller would supply.

Simultaneous heating
    The heating load (reheat, outdoor-air unit reheat, perimeter heating, preheat) in
    the hours the cooling plant runs (cooling load above the no-load threshold of
    :func:`plantside.plant.part_load.no_load_threshold_from_loads`).
Heat-recovery chiller
    A machine of heating capacity :math:`C_h` and heating COP :math:`COP_h` takes heat
    from the chilled water and delivers it with its input to the hot water. By the first
    law its heat is its cooling plus its input, so it can deliver at most
    :math:`Q_c \\, COP_h / (COP_h - 1)` from a cooling load :math:`Q_c`:

    .. math::
        Q_h = \\min\\left(H_{sim},\\; C_h,\\; Q_c \\frac{COP_h}{COP_h - 1}\\right), \\quad
        P = Q_h / COP_h, \\quad Q_{c,hr} = Q_h - P

    It runs in the hours with :math:`Q_h > 0`, at any fraction of its capacity (no
    minimum turndown; a planning simplification).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.errors import InputRangeError, check_range
from plantside.plant.part_load import load_duration_curve, no_load_threshold_from_loads

__all__ = [
    "HeatRecovery",
    "heat_recovery_chiller",
    "simultaneous_heating",
    "simultaneous_heating_duration",
]


def _pair(heating_load, cooling_load):
    h = check_range("heating_load", np.atleast_1d(heating_load), 0.0, None, "kW")
    c = check_range("cooling_load", np.atleast_1d(cooling_load), 0.0, None, "kW")
    if h.shape != c.shape:
        raise InputRangeError(
            "heating_load",
            f"heating_load has {h.size} hours but cooling_load has {c.size}",
            "the same hours",
        )
    return h, c


def simultaneous_heating(heating_load, cooling_load, no_load_threshold=None) -> np.ndarray:
    """Heating load in the hours the cooling plant runs [kW].

    Parameters
    ----------
    heating_load : array_like
        Hourly heating load [kW], >= 0.
    cooling_load : array_like
        Hourly cooling plant load [kW], >= 0, same hours.
    no_load_threshold : float, optional
        Cooling load [kW] at or below which the cooling plant is off (default 0.1 % of its
        peak, as staging uses).

    Returns
    -------
    numpy.ndarray
        :math:`H_{sim} = H \\cdot [Q_c > Q_{threshold}]` [kW].

    Examples
    --------
    >>> simultaneous_heating([50.0, 20.0], [0.0, 300.0]).tolist()
    [0.0, 20.0]
    """
    h, c = _pair(heating_load, cooling_load)
    threshold = no_load_threshold_from_loads(c, no_load_threshold)
    return np.where(c > threshold, h, 0.0)


def simultaneous_heating_duration(heating_load, cooling_load, no_load_threshold=None):
    """Load-duration curve of the simultaneous heating (hours at or above, load [kW]).

    Returns
    -------
    pandas.DataFrame
        As :func:`plantside.plant.part_load.load_duration_curve`.
    """
    return load_duration_curve(simultaneous_heating(heating_load, cooling_load, no_load_threshold))


@dataclass(frozen=True)
class HeatRecovery:
    """Hourly outcome of a heat-recovery chiller.

    Attributes
    ----------
    heat : numpy.ndarray
        Heat delivered to the hot water [kW].
    input_power : numpy.ndarray
        Compressor input [kW].
    cooling : numpy.ndarray
        Cooling it takes off the chilled water [kW].
    simultaneous_heating : numpy.ndarray
        The simultaneous heating it could serve [kW].
    """

    heat: np.ndarray
    input_power: np.ndarray
    cooling: np.ndarray
    simultaneous_heating: np.ndarray

    def summary(self) -> dict:
        """Hours run, heat supplied and its share, input and cooling energy (kWh)."""
        total = float(self.simultaneous_heating.sum())
        heat = float(self.heat.sum())
        return {
            "hours_with_simultaneous_heating": int((self.simultaneous_heating > 0).sum()),
            "simultaneous_heating_kWh": total,
            "heat_recovery_hours": int((self.heat > 0).sum()),
            "heat_recovered_kWh": heat,
            "share_of_simultaneous_heating": heat / total if total > 0 else 0.0,
            "heat_recovery_input_kWh": float(self.input_power.sum()),
            "heat_recovery_cooling_kWh": float(self.cooling.sum()),
        }


def heat_recovery_chiller(
    heating_load, cooling_load, heating_capacity, heating_cop=3.5, no_load_threshold=None
) -> HeatRecovery:
    """Heat a heat-recovery chiller of a given size would supply, hour by hour.

    Parameters
    ----------
    heating_load : array_like
        Hourly heating load [kW], >= 0.
    cooling_load : array_like
        Hourly cooling plant load [kW], >= 0.
    heating_capacity : float
        Heating capacity of the machine [kW], > 0.
    heating_cop : float
        Heating COP [kW/kW], above 1 to 10 (3.5 for hot water near 50-60 °C from chilled
        water; common practice, no source).
    no_load_threshold : float, optional
        As for :func:`simultaneous_heating`.

    Returns
    -------
    HeatRecovery

    Notes
    -----
    :math:`Q_h = \\min(H_{sim}, C_h, Q_c\\,COP_h/(COP_h - 1))` (module notes).

    Examples
    --------
    >>> hr = heat_recovery_chiller([100.0], [70.0], 200.0, 3.5)
    >>> round(float(hr.heat[0]), 1)
    98.0
    """
    sim = simultaneous_heating(heating_load, cooling_load, no_load_threshold)
    _, c = _pair(heating_load, cooling_load)
    cap = float(
        check_range("heating_capacity", heating_capacity, 0.0, None, "kW", low_inclusive=False)
    )
    cop = float(check_range("heating_cop", heating_cop, 1.0, 10.0, "kW/kW", low_inclusive=False))
    heat = np.minimum(np.minimum(sim, cap), c * cop / (cop - 1.0))
    power = heat / cop
    return HeatRecovery(heat, power, heat - power, sim)
