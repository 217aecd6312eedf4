"""Boilers: efficiency against return water temperature and firing rate; hourly fuel input.

The model (plantside's own; shapes marked)
------------------------------------------
Fuel input of a firing boiler = heat output over the combustion efficiency plus a
constant jacket (casing) loss, a share :math:`L` of the rated input (common practice,
no source; about 1 %):

.. math::
    F = \\frac{Q}{\\eta_c(t_r, x)} + L\\,F_r, \\qquad
    F_r = \\frac{Q_r}{\\eta_r}, \\qquad \\eta = Q / F

so the overall efficiency falls at low fire. The combustion efficiency is the rated one
(with the jacket loss taken out, :math:`\\eta_{c,r} = \\eta_r / (1 - L)`) times a shape:

- **condensing**: a return-water curve (:data:`CONDENSING_RETURN_CURVE`: high below the
  flue-gas dew point near 55 °C, levelling off above it; from memory of the shape of
  manufacturers' published curves, higher-heating-value basis, not a source) and a
  low-fire gain of 2 % of the efficiency at no load, linear in firing rate (cooler flue
  gas at low fire; common practice, no source);
- **non-condensing**: flat in return temperature and firing rate (its return water must
  stay above about 55-60 °C to keep the flue gas dry, common practice, no source;
  :func:`boiler_cautions` reports hours below it).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from plantside.arrays import scalar_or_array as _out
from plantside.errors import check_choice, check_range

__all__ = [
    "BOILER_TYPES",
    "CONDENSING_RETURN_CURVE",
    "RATED_RETURN_C",
    "BoilerHours",
    "boiler_cautions",
    "boiler_efficiency",
    "boiler_hours",
]

#: Boiler types.
BOILER_TYPES = ("condensing", "non_condensing")
#: Condensing boiler combustion efficiency against return water temperature: points
#: (°C, efficiency [-], higher heating value) interpolated linearly, held beyond the ends.
#: From memory of the shape of manufacturers' published curves; not a source.
CONDENSING_RETURN_CURVE = (
    (20.0, 30.0, 40.0, 50.0, 55.0, 60.0, 70.0, 80.0),
    (0.970, 0.955, 0.935, 0.905, 0.885, 0.870, 0.865, 0.860),
)
#: Default return water of the efficiency rating [°C]: 80 °F (common practice, no source).
RATED_RETURN_C = (80.0 - 32.0) / 1.8
#: Low-fire gain of a condensing boiler at zero firing rate [-] (common practice, no source).
CONDENSING_LOW_FIRE_GAIN = 0.02
#: Lowest return water of a non-condensing boiler without flue-gas condensation [°C]
#: (common practice, no source).
NON_CONDENSING_MINIMUM_RETURN_C = 55.0


def _check_kind(kind: str) -> str:
    return check_choice("boiler_type", kind, BOILER_TYPES)


def _shape(kind, return_temperature, firing_rate):
    if kind == "non_condensing":
        return np.ones(np.broadcast_shapes(np.shape(return_temperature), np.shape(firing_rate)))
    temps, values = CONDENSING_RETURN_CURVE
    curve = np.interp(return_temperature, temps, values)
    return curve * (1.0 + CONDENSING_LOW_FIRE_GAIN * (1.0 - np.asarray(firing_rate)))


def _combustion_efficiency(
    kind, return_temperature, firing_rate, rated_efficiency, rated_return, jacket_loss
):
    rated_combustion = rated_efficiency / (1.0 - jacket_loss)
    scale = _shape(kind, rated_return, 1.0)
    return rated_combustion * _shape(kind, return_temperature, firing_rate) / scale


def boiler_efficiency(
    return_temperature,
    firing_rate,
    boiler_type: str = "condensing",
    rated_efficiency: float = 0.95,
    rated_return_temperature: float = RATED_RETURN_C,
    jacket_loss: float = 0.01,
):
    """Overall boiler efficiency (heat out over fuel in, higher heating value) [-].

    Parameters
    ----------
    return_temperature : float or array_like
        Return (entering) water temperature [°C], 0 to 100.
    firing_rate : float or array_like
        Heat output over rated output [-], above 0 to 1.
    boiler_type : {"condensing", "non_condensing"}
    rated_efficiency : float
        Efficiency at full fire and the rated return temperature [-], 0.5 to 0.99.
    rated_return_temperature : float
        Return temperature of the rating [°C] (default 80 °F, 26.7 °C).
    jacket_loss : float
        Casing loss as a share of rated input [-], 0 to 0.05.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Efficiency [-].

    Notes
    -----
    .. math:: \\eta = \\frac{x}{x / \\eta_c(t_r, x) + L / \\eta_r}

    Examples
    --------
    >>> round(float(boiler_efficiency(26.7, 1.0, "condensing", 0.95)), 4)
    0.95
    """
    _check_kind(boiler_type)
    t = check_range("return_temperature", return_temperature, 0.0, 100.0, "°C")
    x = check_range("firing_rate", firing_rate, 0.0, 1.0, "", low_inclusive=False)
    eta_r = float(check_range("rated_efficiency", rated_efficiency, 0.5, 0.99, ""))
    t_r = float(check_range("rated_return_temperature", rated_return_temperature, 0.0, 100.0, "°C"))
    loss = float(check_range("jacket_loss", jacket_loss, 0.0, 0.05, ""))
    eta_c = _combustion_efficiency(boiler_type, t, x, eta_r, t_r, loss)
    return _out(x / (x / eta_c + loss / eta_r))


@dataclass(frozen=True)
class BoilerHours:
    """Hourly outcome of a group of firing boilers.

    Attributes
    ----------
    firing_rate : numpy.ndarray
        Output over rated output of the firing boilers [-].
    efficiency : numpy.ndarray
        Overall efficiency [-] (NaN where nothing fires).
    fuel_input : numpy.ndarray
        Fuel input [kW] (higher heating value).
    """

    firing_rate: np.ndarray
    efficiency: np.ndarray
    fuel_input: np.ndarray


def boiler_hours(
    load,
    running_capacity,
    return_temperature,
    boiler_type: str = "condensing",
    rated_efficiency: float = 0.95,
    rated_return_temperature: float = RATED_RETURN_C,
    jacket_loss: float = 0.01,
) -> BoilerHours:
    """Hourly fuel input of firing boilers sharing a load.

    Parameters
    ----------
    load : array_like
        Heating load on the boilers [kW], >= 0, at most ``running_capacity``.
    running_capacity : array_like
        Combined rated output of the firing boilers [kW], >= 0.
    return_temperature : float or array_like
        Return water temperature [°C].
    boiler_type, rated_efficiency, rated_return_temperature, jacket_loss
        As for :func:`boiler_efficiency`.

    Returns
    -------
    BoilerHours

    Notes
    -----
    :math:`F = Q / \\eta_c(t_r, x) + L\\,C / \\eta_r` while firing (module notes).

    Examples
    --------
    >>> round(float(boiler_hours(500.0, 1000.0, 40.0).fuel_input), 1)
    540.2
    """
    q = check_range("load", load, 0.0, None, "kW")
    cap = check_range("running_capacity", running_capacity, 0.0, None, "kW")
    t = check_range("return_temperature", return_temperature, 0.0, 100.0, "°C")
    _check_kind(boiler_type)
    eta_r = float(check_range("rated_efficiency", rated_efficiency, 0.5, 0.99, ""))
    loss = float(check_range("jacket_loss", jacket_loss, 0.0, 0.05, ""))
    firing = (q > 0) & (cap > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = np.where(firing, np.minimum(q / np.where(cap > 0, cap, 1.0), 1.0), 0.0)
    eta_c = _combustion_efficiency(
        boiler_type, t, np.maximum(x, 1e-9), eta_r, rated_return_temperature, loss
    )
    fuel = np.where(firing, q / eta_c + loss * cap / eta_r, 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        efficiency = np.where(firing, q / np.where(firing, fuel, 1.0), np.nan)
    return BoilerHours(_out(x), _out(efficiency), _out(fuel))


def boiler_cautions(return_temperature, load, boiler_type: str) -> list[str]:
    """Cautions on the return water: a non-condensing boiler below its safe return.

    Parameters
    ----------
    return_temperature : array_like
        Hourly return water [°C].
    load : array_like
        Hourly heating load [kW].
    boiler_type : {"condensing", "non_condensing"}

    Returns
    -------
    list of str
    """
    _check_kind(boiler_type)
    if boiler_type == "condensing":
        return []
    cold = (np.asarray(load) > 0) & (
        np.asarray(return_temperature) < NON_CONDENSING_MINIMUM_RETURN_C
    )
    hours = int(cold.sum())
    if not hours:
        return []
    return [
        f"In {hours} hour(s) the return water is below {NON_CONDENSING_MINIMUM_RETURN_C:.0f} °C: "
        "a non-condensing boiler would condense flue gas; raise the reset schedule or "
        "protect the boiler's return."
    ]
