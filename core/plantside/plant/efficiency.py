"""Chiller part-load efficiency: the AHRI IPLV and a project-weighted efficiency.

IPLV (integrated part-load value)
---------------------------------
AHRI Standard 550/590 (I-P)-2020, and its SI twin AHRI Standard 551/591 (SI)-2020,
section 5.4 ("Part-load values", the IPLV.IP / IPLV.SI equations), weight a
chiller's efficiency at 100, 75, 50 and 25 % load with 1, 42, 45 and 12 %:

- for an efficiency where higher is better (COP [kW/kW] or EER [Btu/(W·h)]),
  :math:`IPLV = 0.01 A + 0.42 B + 0.45 C + 0.12 D`;
- for kW/ton (input per output, lower is better),
  :math:`IPLV = 1 / (0.01/A + 0.42/B + 0.45/C + 0.12/D)`,

where A, B, C, D are the efficiencies at 100, 75, 50 and 25 % load. The
two forms agree: the kW/ton IPLV equals 3.517 divided by the COP IPLV of the
same machine (follows from kW/ton = 3.517 / COP). The section number is from
memory of the 2020 edition; equation numbers differ between editions, so none
is quoted. The standard rates the
part-load points at reduced condenser temperatures (e.g. 85/75/65/65 °F
entering condenser water for water-cooled machines, from memory), so the four
efficiencies already include condenser relief at part load.

Project-weighted efficiency
---------------------------
Given a machine's efficiency at the same four points and its hourly loads (for
instance from :mod:`plantside.plant.staging`), :func:`project_weighted_efficiency`
computes the year's input energy and average efficiency for *this* building's
load distribution, and the building's own weights in the four IPLV bands, set
beside the standard's so the engineer sees how far the building is from the
rating's assumption.

Interpolation
    Input power per unit of rated capacity, :math:`P(x) = x / COP(x)` at part
    load ratio x, is interpolated *linearly in x* between the rated points
    (piecewise linear power curve through 25, 50, 75 and 100 %). Interpolating
    power rather than efficiency makes the year's energy the same whether the
    efficiencies are entered as COP, EER or kW/ton (a linear interpolation of
    COP and one of kW/ton would disagree).
Below 25 % load (``below_lowest``)
    ``"cycling"`` (default): the machine runs at its lowest rated point and
    cycles; its power is raised by the AHRI degradation coefficient
    :math:`C_D = 1.13 - 0.13\\,LF` with load factor :math:`LF = x / 0.25`
    (AHRI 550/590 section 5.4, applied there to a unit that cannot unload to a
    rating point; from memory), so
    :math:`P(x) = x \\, C_D / COP_{25}`, continuous at 25 % and 0 at no load.
    ``"constant"``: the efficiency stays at its 25 % value,
    :math:`P(x) = x / COP_{25}`.
Above 100 % load
    The full-load efficiency is held (the staging rule never loads a machine
    past 100 %).
Bands
    Each hour of each machine is assigned to the nearest rating point by its
    part-load ratio, with the band's upper edge included: 25 % point for
    0 < x <= 37.5 %, 50 % for 37.5 < x <= 62.5 %, 75 % for 62.5 < x <= 87.5 %,
    100 % for x > 87.5 %. The building's weights are the shares of the year's
    cooling energy (kWh, default) or of the machine running hours in each band.
    This mapping is a project convention (no source); the standard derived its
    weights from weather bins and typical buildings (AHRI 550/590 Appendix D,
    from memory), not from a load ratio, so the comparison is indicative.
Project IPLV
    The IPLV formula with the building's weights in place of 1/42/45/12 %. It
    shows the effect of the weights alone; the year's average efficiency
    (cooling energy / input energy from the hourly power curve) is the figure
    to use for energy.

References
----------
[1] AHRI Standard 550/590 (I-P)-2020, Performance Rating of Water-Chilling and
    Heat Pump Water-Heating Packages Using the Vapor Compression Cycle,
    section 5.4 (IPLV.IP).
[2] AHRI Standard 551/591 (SI)-2020, same title, section 5.4 (IPLV.SI).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from plantside.arrays import scalar_or_array
from plantside.constants import KW_PER_TON, W_PER_BTUH
from plantside.errors import InputRangeError, check_choice, check_range

__all__ = [
    "BELOW_LOWEST_RULES",
    "EFFICIENCY_METRICS",
    "IPLV_BAND_EDGES",
    "IPLV_LOAD_POINTS",
    "IPLV_WEIGHTS",
    "ProjectEfficiency",
    "cop_from_efficiency",
    "efficiency_from_cop",
    "input_power_ratio_from_part_load_ratio",
    "integrated_part_load_value",
    "iplv_band_weights",
    "project_weighted_efficiency",
]

#: Rating points of the IPLV [fraction of full load], in the standard's order A, B, C, D [1].
IPLV_LOAD_POINTS = (1.00, 0.75, 0.50, 0.25)
#: IPLV weights of the points A, B, C, D [-], AHRI 550/590 section 5.4 [1], [2].
IPLV_WEIGHTS = (0.01, 0.42, 0.45, 0.12)
#: Upper edges [-] of the bands of the 25, 50 and 75 % points (nearest point; project convention).
IPLV_BAND_EDGES = (0.375, 0.625, 0.875)
#: Accepted efficiency metrics: COP [kW/kW], EER [Btu/(W·h)], kW/ton [kW input per ton].
EFFICIENCY_METRICS = ("cop", "eer", "kw_per_ton")
#: Accepted treatments of part-load ratios below the lowest rated point.
BELOW_LOWEST_RULES = ("cycling", "constant")
#: AHRI degradation coefficient C_D = CD_INTERCEPT - CD_SLOPE * LF (AHRI 550/590 5.4, from memory).
CD_INTERCEPT = 1.13
CD_SLOPE = 0.13


def _check_metric(metric: str) -> str:
    return check_choice("metric", metric, EFFICIENCY_METRICS)


def _efficiency_unit(metric: str) -> str:
    return {"cop": "kW/kW", "eer": "Btu/(W·h)", "kw_per_ton": "kW/ton"}[metric]


def _four_efficiencies(efficiencies, metric: str, field: str = "efficiencies") -> np.ndarray:
    arr = np.asarray(efficiencies, dtype=float)
    if arr.ndim == 0 or arr.shape[-1] != 4:
        raise InputRangeError(
            field,
            f"{field} must hold 4 values (at 100, 75, 50 and 25 % load); got shape {arr.shape}",
            "4 values > 0, at 100/75/50/25 % load",
        )
    check_range(field, arr, 0.0, None, _efficiency_unit(metric), low_inclusive=False)
    return arr


def cop_from_efficiency(value, metric: str):
    """Coefficient of performance [kW/kW] from an efficiency in ``metric``.

    Parameters
    ----------
    value : float or array_like
        Efficiency, > 0: COP [kW/kW], EER [Btu/(W·h)] or kW/ton [kW input per
        ton of refrigeration].
    metric : {"cop", "eer", "kw_per_ton"}

    Returns
    -------
    numpy.float64 or numpy.ndarray
        COP [-]. EER x (1 W per 3.412 Btu/h); 3.517 / (kW/ton), with 1 ton =
        12,000 Btu/h (AHRI 550/590 [1]; :mod:`plantside.constants`).
    """
    _check_metric(metric)
    arr = check_range("value", value, 0.0, None, _efficiency_unit(metric), low_inclusive=False)
    if metric == "eer":
        arr = arr * W_PER_BTUH
    elif metric == "kw_per_ton":
        arr = KW_PER_TON / arr
    return scalar_or_array(arr)


def efficiency_from_cop(cop, metric: str):
    """Efficiency in ``metric`` from a COP [kW/kW] (inverse of :func:`cop_from_efficiency`)."""
    _check_metric(metric)
    arr = check_range("cop", cop, 0.0, None, "kW/kW", low_inclusive=False)
    if metric == "eer":
        arr = arr / W_PER_BTUH
    elif metric == "kw_per_ton":
        arr = KW_PER_TON / arr
    return scalar_or_array(arr)


def integrated_part_load_value(efficiencies, metric: str = "cop", weights=IPLV_WEIGHTS):
    r"""IPLV of a machine from its efficiencies at 100, 75, 50 and 25 % load.

    Parameters
    ----------
    efficiencies : array_like, shape (..., 4)
        Efficiencies A, B, C, D at 100, 75, 50 and 25 % load, > 0, in ``metric``.
    metric : {"cop", "eer", "kw_per_ton"}
        COP [kW/kW] and EER [Btu/(W·h)] are weighted directly; kW/ton is
        combined as the reciprocal of the weighted reciprocals.
    weights : sequence of 4 float
        Weights of A, B, C, D [-], each 0-1, summing to 1. Default the AHRI
        weights 0.01, 0.42, 0.45, 0.12 [1]; pass a building's own weights for
        a "project IPLV".

    Returns
    -------
    numpy.float64 or numpy.ndarray
        IPLV in the same metric, shape ``efficiencies.shape[:-1]``.

    Notes
    -----
    .. math::

        IPLV = 0.01 A + 0.42 B + 0.45 C + 0.12 D \quad \text{(COP, EER)},

        IPLV = \frac{1}{0.01/A + 0.42/B + 0.45/C + 0.12/D} \quad \text{(kW/ton)}

    AHRI 550/590 (I-P)-2020 section 5.4 [1] (and 551/591 (SI) [2]):
    :math:`IPLV = 0.01A + 0.42B + 0.45C + 0.12D` (COP, EER);
    :math:`IPLV = 1/(0.01/A + 0.42/B + 0.45/C + 0.12/D)` (kW/ton).

    Examples
    --------
    >>> round(float(integrated_part_load_value([5.5, 6.5, 7.2, 6.0])), 3)  # COP
    6.745
    """
    _check_metric(metric)
    values = _four_efficiencies(efficiencies, metric)
    w = _check_weights(weights)
    if metric == "kw_per_ton":
        result = 1.0 / np.sum(w / values, axis=-1)
    else:
        result = np.sum(w * values, axis=-1)
    return scalar_or_array(result)


def _check_weights(weights) -> np.ndarray:
    w = np.asarray(weights, dtype=float)
    if w.shape != (4,):
        raise InputRangeError(
            "weights", f"weights must hold 4 values; got shape {w.shape}", "4 values 0-1, sum 1"
        )
    check_range("weights", w, 0.0, 1.0, "")
    if abs(w.sum() - 1.0) > 1e-6:
        raise InputRangeError(
            "weights", f"weights sum to {w.sum():g}, not 1", "4 values 0-1, sum 1"
        )
    return w


def input_power_ratio_from_part_load_ratio(
    part_load_ratio, efficiencies, metric: str = "cop", below_lowest: str = "cycling"
):
    """Input power over rated capacity at each part-load ratio (see module notes).

    Parameters
    ----------
    part_load_ratio : float or array_like
        Load over rated capacity [-], >= 0.
    efficiencies : array_like, shape (..., 4)
        Efficiencies at 100, 75, 50 and 25 % load, in ``metric``; leading
        dimensions broadcast against ``part_load_ratio`` (e.g. one row per
        machine against an hours x machines array).
    metric : {"cop", "eer", "kw_per_ton"}
    below_lowest : {"cycling", "constant"}
        Treatment below the 25 % point.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Input power / rated capacity [kW/kW]: multiply by capacity [kW] to
        get input power [kW].
    """
    _check_metric(metric)
    check_choice("below_lowest", below_lowest, BELOW_LOWEST_RULES)
    cop = np.asarray(cop_from_efficiency(_four_efficiencies(efficiencies, metric), metric))
    x = check_range("part_load_ratio", part_load_ratio, 0.0, None, "")
    points = np.asarray(IPLV_LOAD_POINTS)[::-1]  # ascending 0.25 .. 1.0
    power_at_points = points / cop[..., ::-1]  # P = x / COP at each rated point
    shape = np.broadcast_shapes(x.shape, power_at_points.shape[:-1])
    x = np.broadcast_to(x, shape)
    table = np.broadcast_to(power_at_points, (*shape, 4))
    clipped = np.clip(x, points[0], points[-1])
    segment = np.clip(np.searchsorted(points, clipped, side="right") - 1, 0, 2)
    x0, x1 = points[segment], points[segment + 1]
    y0 = np.take_along_axis(table, segment[..., None], axis=-1)[..., 0]
    y1 = np.take_along_axis(table, segment[..., None] + 1, axis=-1)[..., 0]
    power = y0 + (y1 - y0) * (clipped - x0) / (x1 - x0)
    cop_lowest = np.broadcast_to(cop[..., 3], shape)
    cop_full = np.broadcast_to(cop[..., 0], shape)
    if below_lowest == "cycling":
        load_factor = x / points[0]
        low = x * (CD_INTERCEPT - CD_SLOPE * load_factor) / cop_lowest
    else:
        low = x / cop_lowest
    power = np.where(x < points[0], low, power)
    power = np.where(x > points[-1], x / cop_full, power)
    return scalar_or_array(power)


def _machine_load_matrix(machine_loads, capacities) -> tuple[np.ndarray, np.ndarray]:
    loads = np.asarray(machine_loads, dtype=float)
    if loads.ndim == 1:
        loads = loads[:, None]
    if loads.ndim != 2 or loads.shape[0] == 0:
        raise InputRangeError(
            "machine_loads",
            f"machine_loads must be hours or hours x machines; got shape {loads.shape}",
            "1-D or 2-D array of loads >= 0 kW",
        )
    check_range("machine_loads", loads, 0.0, None, "kW")
    caps = np.atleast_1d(np.asarray(capacities, dtype=float))
    if caps.ndim != 1 or caps.size != loads.shape[1]:
        raise InputRangeError(
            "capacities",
            f"capacities has {caps.size} values but machine_loads has {loads.shape[1]} machine(s)",
            f"{loads.shape[1]} capacities > 0 kW",
        )
    check_range("capacities", caps, 0.0, None, "kW", low_inclusive=False)
    return loads, caps


def iplv_band_weights(machine_loads, capacities) -> pd.DataFrame:
    """The building's share of hours and energy near each IPLV rating point.

    Parameters
    ----------
    machine_loads : array_like
        Hourly load of each machine [kW], shape (hours,) for one machine or
        (hours, machines), e.g. :attr:`plantside.plant.staging.StagingResult.machine_load`.
    capacities : float or sequence of float
        Rated capacity of each machine [kW], > 0.

    Returns
    -------
    pandas.DataFrame
        One row per rating point (100, 75, 50, 25 %, the standard's order):
        ``rating_point_percent``, ``lower_percent``, ``upper_percent`` (band
        of part-load ratio, upper edge included; see module notes),
        ``standard_weight`` (AHRI 550/590 [1]), ``hours`` (machine running
        hours), ``energy_kWh``, ``building_hours_weight`` and
        ``building_energy_weight`` (shares, NaN when nothing runs).
    """
    loads, caps = _machine_load_matrix(machine_loads, capacities)
    ratio = loads / caps[None, :]
    running = loads > 0
    # band 0 = 25 % point ... band 3 = 100 % point (ascending), upper edge included
    band = np.searchsorted(np.asarray(IPLV_BAND_EDGES), ratio, side="left")
    hours = np.bincount(band[running], minlength=4)[::-1]
    energy = np.bincount(band[running], weights=loads[running], minlength=4)[::-1]
    with np.errstate(invalid="ignore", divide="ignore"):
        hours_weight = hours / hours.sum() if hours.sum() > 0 else np.full(4, np.nan)
        energy_weight = energy / energy.sum() if energy.sum() > 0 else np.full(4, np.nan)
    edges = np.array([0.0, *IPLV_BAND_EDGES, np.inf]) * 100.0
    return pd.DataFrame(
        {
            "rating_point_percent": np.asarray(IPLV_LOAD_POINTS) * 100.0,
            "lower_percent": edges[:-1][::-1],
            "upper_percent": edges[1:][::-1],
            "standard_weight": np.asarray(IPLV_WEIGHTS),
            "hours": hours.astype(int),
            "energy_kWh": energy,
            "building_hours_weight": hours_weight,
            "building_energy_weight": energy_weight,
        }
    )


@dataclass(frozen=True, eq=False)
class ProjectEfficiency:
    """Result of :func:`project_weighted_efficiency`.

    Attributes
    ----------
    metric : str
        Metric of the efficiencies below ("cop", "eer", "kw_per_ton").
    cooling_energy : float
        Year's cooling delivered by the machines [kWh].
    input_energy : float
        Year's input energy [kWh] from the interpolated power curve.
    average_cop : float
        cooling / input energy [kW/kW] (NaN without load).
    average_efficiency : float
        ``average_cop`` expressed in ``metric``.
    rated_iplv : float
        IPLV with the AHRI weights, in ``metric``.
    project_iplv : float
        IPLV formula with the building's weights (NaN without load), in ``metric``.
    weights : pandas.DataFrame
        :func:`iplv_band_weights` plus ``efficiency`` at each rating point.
    input_power : numpy.ndarray
        Hourly input power of each machine [kW], shape (hours, machines).
    """

    metric: str
    cooling_energy: float
    input_energy: float
    average_cop: float
    average_efficiency: float
    rated_iplv: float
    project_iplv: float
    weights: pd.DataFrame
    input_power: np.ndarray

    def to_dict(self) -> dict:
        """Scalar results with SI, unit-suffixed keys (efficiencies in ``metric``)."""
        return {
            "metric": self.metric,
            "cooling_energy_kWh": self.cooling_energy,
            "input_energy_kWh": self.input_energy,
            "average_cop": self.average_cop,
            "average_efficiency": self.average_efficiency,
            "rated_iplv": self.rated_iplv,
            "project_iplv": self.project_iplv,
        }


def project_weighted_efficiency(
    machine_loads,
    capacities,
    efficiencies,
    metric: str = "cop",
    below_lowest: str = "cycling",
    weights_basis: str = "energy",
) -> ProjectEfficiency:
    r"""Year's energy and average efficiency for this building, beside the IPLV weighting.

    Parameters
    ----------
    machine_loads : array_like
        Hourly load of each machine [kW], shape (hours,) or (hours, machines).
    capacities : float or sequence of float
        Rated capacity of each machine [kW], > 0.
    efficiencies : sequence of 4 float
        Efficiency of the machine model at 100, 75, 50 and 25 % load, in
        ``metric`` (every machine the same model; for a mix, call once per
        machine and add the energies).
    metric : {"cop", "eer", "kw_per_ton"}
    below_lowest : {"cycling", "constant"}
        Treatment below 25 % load (module notes).
    weights_basis : {"energy", "hours"}
        Building weights from cooling energy (default) or running hours.

    Returns
    -------
    ProjectEfficiency

    Notes
    -----
    .. math::

        P_j(x) = x / COP(x) \ \text{(linear in } x \text{ between the rated points)},
        \qquad \overline{COP} = \frac{\sum_h \sum_j Q_{hj}}{\sum_h \sum_j P_j(x_{hj})\, C_j}

    Examples
    --------
    >>> result = project_weighted_efficiency([300.0, 150.0, 75.0], 400.0, [5.5, 6.5, 7.2, 6.0])
    >>> round(result.average_cop, 2), round(result.rated_iplv, 3)
    (6.46, 6.745)
    """
    _check_metric(metric)
    check_choice("weights_basis", weights_basis, ("energy", "hours"))
    loads, caps = _machine_load_matrix(machine_loads, capacities)
    values = _four_efficiencies(efficiencies, metric)
    if values.shape != (4,):
        raise InputRangeError(
            "efficiencies",
            f"efficiencies must be 4 values for one machine model; got shape {values.shape}",
            "4 values > 0",
        )
    ratio = loads / caps[None, :]
    power = input_power_ratio_from_part_load_ratio(ratio, values, metric, below_lowest)
    input_power = power * caps[None, :]
    cooling = float(loads.sum())
    used = float(input_power.sum())
    average_cop = cooling / used if used > 0 else float("nan")
    average = float(efficiency_from_cop(average_cop, metric)) if used > 0 else float("nan")
    table = iplv_band_weights(loads, caps)
    table["efficiency"] = values
    building = table[f"building_{weights_basis}_weight"].to_numpy()
    if np.all(np.isfinite(building)):
        project = float(integrated_part_load_value(values, metric, building / building.sum()))
    else:
        project = float("nan")
    return ProjectEfficiency(
        metric=metric,
        cooling_energy=cooling,
        input_energy=used,
        average_cop=average_cop,
        average_efficiency=average,
        rated_iplv=float(integrated_part_load_value(values, metric)),
        project_iplv=project,
        weights=table,
        input_power=input_power,
    )
