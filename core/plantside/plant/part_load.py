"""How the year's hours spread over the plant's capacity: load-duration curve and part-load bins.

Every function takes one hourly load series [kW] (each element is one hour, so
a sum of kW over hours is kWh) and returns a tidy, pre-aggregated
:class:`pandas.DataFrame` small enough for a chart. Energies are kWh of
cooling (or heating); conversion to ton-hours belongs to the display edge
(:mod:`plantside.units`).

Definitions
-----------
No-load hour
    An hour whose load is at or below the no-load threshold. By default the
    threshold is 0.1 % of the year's peak load (:data:`NO_LOAD_FRACTION_OF_PEAK`;
    project convention, no source): far below anything a machine could serve,
    yet above the numerical noise a coil model leaves in an idle hour. A year
    without any load has a threshold of 0 kW. Pass ``no_load_threshold`` [kW]
    to set it explicitly. The same rule is used by :mod:`plantside.plant.staging`, so
    "hours with load" agree between the two.
Part-load band
    A band of width ``w`` % of the design capacity includes its upper edge:
    the 20-30 % band holds the hours with 20 % < load/capacity <= 30 %, so an
    hour at exactly 100 % is in the 90-100 % band, and "above 100 %" holds the
    hours with load/capacity > 1. The lowest band (0-10 %) starts above the
    no-load threshold. The energy of a band is the whole load of its hours.
Load-duration curve
    The hourly loads sorted from highest to lowest; the k-th point is the k-th
    highest load, plotted at k hours: the load was at or above that value for k
    hours (ties counted up to and including the point). The first point is the
    peak at 1 hour and the last the year's lowest load at N hours.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
import pandas as pd

from plantside.errors import InputRangeError, check_range
from plantside.plant.loads import hourly_loads

__all__ = [
    "NO_LOAD_FRACTION_OF_PEAK",
    "LoadBands",
    "band_edges",
    "band_index_from_ratio",
    "band_table_labels",
    "bands_from_width",
    "load_duration_curve",
    "no_load_threshold_from_loads",
    "part_load_bins",
]

#: Default no-load threshold as a fraction of the year's peak load [-].
#: Project convention (no source), see the module notes.
NO_LOAD_FRACTION_OF_PEAK = 0.001


def no_load_threshold_from_loads(loads, no_load_threshold: float | None = None) -> float:
    """The load [kW] at or below which an hour counts as an hour with no load.

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW], >= 0.
    no_load_threshold : float, optional
        Explicit threshold [kW], >= 0. Default: :data:`NO_LOAD_FRACTION_OF_PEAK`
        times the year's peak load.

    Returns
    -------
    float
        Threshold [kW].
    """
    if no_load_threshold is not None:
        return float(check_range("no_load_threshold", no_load_threshold, 0.0, None, "kW"))
    arr = hourly_loads(loads)
    return float(NO_LOAD_FRACTION_OF_PEAK * arr.max())


def bands_from_width(band_width_percent: float) -> int:
    """Number of bands between 0 and 100 % for a band width [%] that divides 100."""
    width = float(
        check_range("band_width_percent", band_width_percent, 0.0, 100.0, "%", low_inclusive=False)
    )
    bands = round(100.0 / width)
    if abs(bands * width - 100.0) > 1e-9:
        raise InputRangeError(
            "band_width_percent",
            f"band_width_percent = {width:g} % does not divide 100 % into whole bands",
            "a divisor of 100 %, e.g. 5, 10, 20, 25",
        )
    return bands


def band_index_from_ratio(ratio, bands: int) -> np.ndarray:
    """Band number of each load ratio: 1..bands for ratios in (0, 1], bands+1 above 1.

    Band k holds (k-1)/bands < ratio <= k/bands (upper edge included). A ratio
    of exactly 0 gets band 0. Edges are computed as ``k / bands`` so that a
    ratio such as 300/1000 lands exactly on the 0.3 edge.

    Parameters
    ----------
    ratio : array_like
        Load over capacity [-], >= 0.
    bands : int
        Number of bands between 0 and 1.

    Returns
    -------
    numpy.ndarray of int
    """
    edges = np.arange(bands + 1) / bands
    return np.searchsorted(edges, np.asarray(ratio, dtype=float), side="left")


class LoadBands(NamedTuple):
    """Labels and edges of the part-load bands (:func:`band_edges`)."""

    labels: list[str]  #: band labels, e.g. ``"20-30 %"``
    lower: np.ndarray  #: lower edges [% of capacity]
    upper: np.ndarray  #: upper edges [% of capacity]


def band_edges(bands: int) -> LoadBands:
    """Labels and lower and upper edges [%] of bands 1..bands (without the band above 100 %)."""
    k = np.arange(1, bands + 1)
    lower = (k - 1) * 100.0 / bands
    upper = k * 100.0 / bands
    labels = [f"{lo:g}-{hi:g} %" for lo, hi in zip(lower, upper, strict=True)]
    return LoadBands(labels, lower, upper)


def band_table_labels(bands: int) -> pd.DataFrame:
    """Labels and edges [%] of bands 1..bands and of the band above 100 %."""
    labels, lower, upper = band_edges(bands)
    return pd.DataFrame(
        {
            "band": [*labels, "above 100 %"],
            "lower_percent": [*lower, 100.0],
            "upper_percent": [*upper, np.inf],
        }
    )


def part_load_bins(
    loads,
    design_capacity: float,
    band_width_percent: float = 10.0,
    no_load_threshold: float | None = None,
) -> pd.DataFrame:
    """Hours and energy in each band of the design capacity, plus no-load hours.

    Parameters
    ----------
    loads : array_like
        Hourly plant loads [kW], >= 0.
    design_capacity : float
        Capacity the bands are a percentage of [kW], > 0.
    band_width_percent : float
        Width of each band [%] of design capacity; must divide 100. Default 10.
    no_load_threshold : float, optional
        Load [kW] at or below which an hour has no load (see the module notes).

    Returns
    -------
    pandas.DataFrame
        Rows ``"no load"``, ``"0-10 %"``, ..., ``"90-100 %"``, ``"above 100 %"``
        with ``band``, ``lower_percent``, ``upper_percent`` (edges in % of
        design capacity; the no-load row spans 0 to the threshold),
        ``hours``, ``energy_kWh``, ``percent_of_hours`` and
        ``percent_of_energy``. Hours sum to the length of ``loads``; energy
        sums to the year's load energy (the no-load row keeps the small energy
        below the threshold).
    """
    arr = hourly_loads(loads)
    capacity = float(
        check_range("design_capacity", design_capacity, 0.0, None, "kW", low_inclusive=False)
    )
    bands = bands_from_width(band_width_percent)
    threshold = no_load_threshold_from_loads(arr, no_load_threshold)
    index = np.where(arr <= threshold, 0, band_index_from_ratio(arr / capacity, bands))
    hours = np.bincount(index, minlength=bands + 2)
    energy = np.bincount(index, weights=arr, minlength=bands + 2)
    labels = band_table_labels(bands)
    frame = pd.concat(
        [
            pd.DataFrame(
                {
                    "band": ["no load"],
                    "lower_percent": [0.0],
                    "upper_percent": [100.0 * threshold / capacity],
                }
            ),
            labels,
        ],
        ignore_index=True,
    )
    total_energy = energy.sum()
    frame["hours"] = hours.astype(int)
    frame["energy_kWh"] = energy
    frame["percent_of_hours"] = 100.0 * hours / arr.size
    frame["percent_of_energy"] = (
        100.0 * energy / total_energy if total_energy > 0 else np.zeros_like(energy)
    )
    return frame


def _curve_ranks(hours: int, points: int) -> np.ndarray:
    """1-based ranks kept on the decimated curve: half log-spaced, half even."""
    if hours <= points:
        return np.arange(1, hours + 1)
    log_part = np.geomspace(1, hours, points // 2)
    even_part = np.linspace(1, hours, points - points // 2)
    ranks = np.unique(np.rint(np.concatenate([log_part, even_part])).astype(int))
    return ranks


def load_duration_curve(loads, points: int = 200) -> pd.DataFrame:
    """Load-duration curve: hours at or above each load, decimated for a chart.

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW], >= 0.
    points : int
        Largest number of points kept, >= 2. Default 200. A series no longer
        than ``points`` is returned whole.

    Returns
    -------
    pandas.DataFrame
        ``hours_at_or_above`` (k, 1..N), ``percent_of_hours`` (100 k / N) and
        ``load_kW`` (the k-th highest load), sorted by hours. The first row is
        always (1 h, peak) and the last (N h, lowest load), exactly.

    Notes
    -----
    Half of the points are spaced evenly in log(hours), half evenly in hours,
    so the few peak hours that govern sizing keep their shape while the long
    part-load tail is still drawn evenly. Every kept point is an exact point
    of the full curve (no averaging).
    """
    arr = hourly_loads(loads)
    points = int(check_range("points", points, 2, None, "points"))
    descending = np.sort(arr)[::-1]
    ranks = _curve_ranks(arr.size, points)
    return pd.DataFrame(
        {
            "hours_at_or_above": ranks,
            "percent_of_hours": 100.0 * ranks / arr.size,
            "load_kW": descending[ranks - 1],
        }
    )
