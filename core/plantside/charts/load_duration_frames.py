"""Frames of the load-duration chart: curves, capacity lines, part-load bins, IPLV weights.

:func:`load_duration_frame` (hours at or above each load, from
:func:`year_load_series` for one air handler), :func:`capacity_lines_frame` (the
machines' capacities), :func:`part_load_frame` (hours and energy in part-load bins) and
:func:`iplv_weights_frame` (the weights at the 100/75/50/25 % rating points).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from plantside.charts.frame_common import _column, _display, _finish, _hourly_zone_load, _system
from plantside.errors import InputRangeError, check_range
from plantside.plant.efficiency import iplv_band_weights
from plantside.plant.part_load import load_duration_curve, part_load_bins

__all__ = [
    "capacity_lines_frame",
    "iplv_weights_frame",
    "load_duration_frame",
    "part_load_frame",
    "year_load_series",
]


def load_duration_frame(series: Mapping[str, object], system="SI", points: int = 200):
    """Load-duration curves of one or more hourly load series.

    Parameters
    ----------
    series : mapping of str to array_like
        Legend label -> hourly load [kW], e.g. ``{"Coil load": coil, "Zone
        load": zone}``. Negative hours (heating) are counted as no cooling
        load (0 kW): the curve is the cooling duty.
    system : {"SI", "IP"}
    points : int
        Points kept per curve (see :func:`plantside.plant.part_load.load_duration_curve`).

    Returns
    -------
    pandas.DataFrame
        ``series`` (str), ``hours_at_or_above`` (int), ``percent_of_hours``,
        ``load`` [display power]. Each curve starts at its peak at 1 hour.
    """
    system = _system(system)
    if not series:
        raise InputRangeError("series", "no load series given", "one or more hourly series")
    parts = []
    for label, values in series.items():
        arr = check_range(str(label), values, None, None, "kW")
        curve = load_duration_curve(np.maximum(arr, 0.0), points=points)
        parts.append(
            pd.DataFrame(
                {
                    "series": str(label),
                    "hours_at_or_above": curve["hours_at_or_above"].to_numpy(),
                    "percent_of_hours": curve["percent_of_hours"].to_numpy(),
                    "load": _display("power", curve["load_kW"].to_numpy(), system),
                }
            )
        )
    return _finish(pd.concat(parts, ignore_index=True), system, "load_duration")


def capacity_lines_frame(capacities: Sequence[float], system="SI") -> pd.DataFrame:
    """Horizontal lines for the plant capacity and for each stage of machines.

    Parameters
    ----------
    capacities : sequence of float
        Capacity of each machine [kW], > 0, in start order (lead first). One
        value is a single-machine plant.
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``line`` (label, e.g. "1 machine", "2 machines", "Plant capacity"),
        ``kind`` ("stage" or "capacity"), ``machines`` (int) and ``load``
        [display power]: the combined capacity of the first n machines. The
        last row is the whole plant.
    """
    system = _system(system)
    caps = np.atleast_1d(
        check_range("capacities", capacities, 0.0, None, "kW", low_inclusive=False)
    )
    if caps.ndim != 1 or caps.size == 0:
        raise InputRangeError("capacities", "no machine capacities given", "one or more > 0 kW")
    cumulative = np.cumsum(caps)
    n = np.arange(1, caps.size + 1)
    labels = [f"{k} machine" if k == 1 else f"{k} machines" for k in n]
    kinds = ["stage"] * caps.size
    labels[-1] = "Plant capacity"
    kinds[-1] = "capacity"
    frame = pd.DataFrame(
        {
            "line": labels,
            "kind": kinds,
            "machines": n,
            "load": _display("power", cumulative, system),
        }
    )
    return _finish(frame, system, "capacity_lines")


def part_load_frame(
    loads, design_capacity: float, system="SI", band_width_percent: float = 10.0
) -> pd.DataFrame:
    """Hours and cooling energy in each band of the design capacity.

    Parameters
    ----------
    loads : array_like
        Hourly plant (or coil) load [kW], >= 0 (negative hours count as 0).
    design_capacity : float
        Capacity the bands are a percentage of [kW], > 0.
    system : {"SI", "IP"}
    band_width_percent : float
        Band width [%], a divisor of 100. Default 10.

    Returns
    -------
    pandas.DataFrame
        Rows "no load", "0-10 %", ..., "90-100 %", "above 100 %" (from
        :func:`plantside.plant.part_load.part_load_bins`): ``band``, ``order``,
        ``lower_percent``, ``upper_percent``, ``hours``, ``percent_of_hours``,
        ``energy`` [display energy: MWh or ton·h], ``percent_of_energy``.
    """
    system = _system(system)
    arr = np.maximum(check_range("loads", loads, None, None, "kW"), 0.0)
    bins = part_load_bins(arr, design_capacity, band_width_percent=band_width_percent)
    frame = pd.DataFrame(
        {
            "band": bins["band"].to_numpy(),
            "order": np.arange(len(bins)),
            "lower_percent": bins["lower_percent"].to_numpy(),
            "upper_percent": bins["upper_percent"].to_numpy(),
            "hours": bins["hours"].to_numpy(),
            "percent_of_hours": bins["percent_of_hours"].to_numpy(),
            "energy": _display("energy", bins["energy_kWh"].to_numpy(), system),
            "percent_of_energy": bins["percent_of_energy"].to_numpy(),
        }
    )
    frame.loc[~np.isfinite(frame["upper_percent"]), "upper_percent"] = np.nan
    return _finish(frame, system, "part_load")


def iplv_weights_frame(machine_loads, capacities, system="SI", basis: str = "energy"):
    """The building's weights at the four IPLV rating points beside AHRI 550/590's.

    Parameters
    ----------
    machine_loads : array_like
        Hourly load of each machine [kW], shape (hours,) or (hours,
        machines), e.g. ``StagingResult.machine_load``.
    capacities : float or sequence of float
        Rated capacity of each machine [kW].
    system : {"SI", "IP"}
        Kept for a uniform signature (weights have no unit).
    basis : {"energy", "hours"}
        The building's weights as shares of cooling energy or of running hours.

    Returns
    -------
    pandas.DataFrame
        8 rows: ``rating_point`` ("100 %", "75 %", "50 %", "25 %"),
        ``rating_point_percent``, ``source`` ("AHRI 550/590" or "This
        building"), ``weight_percent``. Weights from
        :func:`plantside.plant.efficiency.iplv_band_weights` (AHRI Standard
        550/590: 1, 42, 45, 12 %).
    """
    system = _system(system)
    if basis not in ("energy", "hours"):
        raise InputRangeError("basis", f"basis = {basis!r}", "'energy' or 'hours'")
    weights = iplv_band_weights(machine_loads, capacities)
    points = weights["rating_point_percent"].to_numpy()
    labels = [f"{p:g} %" for p in points]
    building = weights[f"building_{basis}_weight"].to_numpy()
    frame = pd.DataFrame(
        {
            "rating_point": labels * 2,
            "rating_point_percent": np.concatenate([points, points]),
            "source": ["AHRI 550/590"] * 4 + ["This building"] * 4,
            "weight_percent": 100.0
            * np.concatenate([weights["standard_weight"].to_numpy(), np.nan_to_num(building)]),
        }
    )
    frame.attrs["basis"] = basis
    return _finish(frame, system, "iplv_weights")


def year_load_series(hourly: pd.DataFrame) -> dict[str, np.ndarray]:
    """The two hourly series of the load-duration chart from an air handler's year.

    Returns
    -------
    dict
        ``{"Coil load": coil_total_kW, "Zone load": zone_sensible_kW + zone_latent_kW}``
        [kW], ready for :func:`load_duration_frame`.
    """
    return {"Coil load": _column(hourly, "coil_total_kW"), "Zone load": _hourly_zone_load(hourly)}
