"""Coincident plant load from several coils, and the diversity between them.

A central plant serves several air handlers at once (for example a 100 %
outdoor-air unit beside recirculating units). Each hour the plant sees the
*coincident* sum of its coils' loads, plus a distribution gain for pumps and
pipes. Because the coils do not peak in the same hour, the coincident plant
peak is at most the sum of the individual coil peaks; the ratio between the
two is the diversity.

The functions are the same for a cooling plant (cooling coil loads) and a
heating plant (preheat, heating and reheat coil loads): they only add hourly
loads. Loads are magnitudes in kW (heat removed by a cooling coil, heat added
by a heating coil), never negative. Each row of an hourly array is one hour;
hour indices returned here are 0-based positions in that array.

Definitions used in :func:`diversity_table`
-------------------------------------------
- sum of peaks: :math:`\\sum_u \\max_h q_{h,u}` (each unit's own peak, whatever the hour)
- coincident peak: :math:`\\max_h \\sum_u q_{h,u}` (the peak of the hourly sum)
- diversity factor = sum of peaks / coincident peak (>= 1)
- coincidence factor = coincident peak / sum of peaks (<= 1), the reciprocal

These are the usual definitions of electrical and HVAC demand practice (from
memory: e.g. IEEE Std 141 "Red Book", Chapter 2 defines the diversity factor
as the sum of individual maximum demands over the maximum demand of the whole);
some texts call the reciprocal the "diversity factor", which is why both are
reported with their definitions.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import NamedTuple

import numpy as np
import pandas as pd

from plantside.errors import InputRangeError, check_range

__all__ = [
    "DISTRIBUTION_GAIN_RANGE_PERCENT",
    "LoadMatrix",
    "coincident_load",
    "diversity_table",
    "hourly_loads",
    "load_matrix",
    "peak_table",
    "plant_load_from_coil_loads",
]

#: Allowed distribution gain (pumps, pipes) [%] of the coincident coil load.
#: Project convention (no source): 0 % (none) to 100 % (doubling) catches typing errors.
DISTRIBUTION_GAIN_RANGE_PERCENT = (0.0, 100.0)


def hourly_loads(loads, field: str = "loads") -> np.ndarray:
    """Validate one series of hourly loads and return it as a float array.

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW], one value per hour, finite and >= 0.
    field : str
        Name used in error messages.

    Returns
    -------
    numpy.ndarray
        1-D float array [kW].

    Raises
    ------
    InputRangeError
        If ``loads`` is not a non-empty 1-D numeric array, or has a negative or
        non-finite value.
    """
    try:
        arr = np.asarray(loads, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputRangeError(
            field,
            f"{field} must be a one-dimensional array of numbers [kW]: {exc}",
            "1-D array of numbers >= 0 kW",
        ) from None
    if arr.ndim != 1 or arr.size == 0:
        raise InputRangeError(
            field,
            f"{field} must be a one-dimensional array with at least one hour; "
            f"got shape {arr.shape}",
            "1-D array of numbers >= 0 kW",
        )
    check_range(field, arr, 0.0, None, "kW")
    return arr


class LoadMatrix(NamedTuple):
    """Several units' hourly loads stacked as hours x units, with the units' names."""

    matrix: np.ndarray  #: loads [kW], shape (hours, units)
    names: list[str]  #: one name per unit


def load_matrix(loads, names: Sequence[str] | None = None, field: str = "loads") -> LoadMatrix:
    """Validate several units' hourly loads and stack them as hours x units.

    Parameters
    ----------
    loads : array_like, sequence of array_like, mapping or pandas.DataFrame
        Hourly loads [kW] of several units: a 2-D array (hours x units), a
        list of equally long 1-D arrays (one per unit), a mapping
        ``{unit name: 1-D array}``, or a DataFrame with one column per unit.
        A single 1-D array is one unit.
    names : sequence of str, optional
        Unit names, one per unit. Default: the mapping keys or DataFrame
        columns, else ``"unit 1"``, ``"unit 2"``, ...
    field : str
        Name used in error messages.

    Returns
    -------
    LoadMatrix
        Named tuple of ``matrix``, a float array of shape (hours, units) [kW], and
        ``names``, one name per unit.

    Raises
    ------
    InputRangeError
        If the units do not cover the same number of hours, a value is negative
        or non-finite, or ``names`` has the wrong length.
    """
    default_names = None
    if isinstance(loads, pd.DataFrame):
        default_names = [str(c) for c in loads.columns]
        columns = [loads[c].to_numpy() for c in loads.columns]
    elif isinstance(loads, Mapping):
        default_names = [str(k) for k in loads]
        columns = list(loads.values())
    elif isinstance(loads, np.ndarray) and loads.ndim == 2:
        columns = [loads[:, i] for i in range(loads.shape[1])]
    elif isinstance(loads, np.ndarray) and loads.ndim == 1:
        columns = [loads]
    elif isinstance(loads, Sequence) and len(loads) > 0 and np.ndim(loads[0]) == 0:
        columns = [loads]  # a plain list of numbers is one unit
    elif isinstance(loads, Sequence):
        columns = list(loads)
    else:
        raise InputRangeError(
            field,
            f"{field} must be a 2-D array (hours x units), a list of 1-D arrays, a mapping "
            f"or a DataFrame; got {type(loads).__name__}",
            "hours x units array of numbers >= 0 kW",
        )
    if len(columns) == 0:
        raise InputRangeError(field, f"{field} has no units", "at least one unit")
    arrays = [hourly_loads(col, f"{field}[{i}]") for i, col in enumerate(columns)]
    hours = arrays[0].size
    for i, arr in enumerate(arrays):
        if arr.size != hours:
            raise InputRangeError(
                f"{field}[{i}]",
                f"{field}[{i}] has {arr.size} hours but {field}[0] has {hours}; every unit "
                "must cover the same hours",
                f"{hours} hours",
            )
    matrix = np.column_stack(arrays)
    if names is None:
        names = default_names or [f"unit {i + 1}" for i in range(len(arrays))]
    names = [str(n) for n in names]
    if len(names) != len(arrays):
        raise InputRangeError(
            "names",
            f"names has {len(names)} entries but {field} has {len(arrays)} units",
            f"{len(arrays)} names",
        )
    return LoadMatrix(matrix, names)


def _distribution_factor(distribution_gain_percent: float) -> float:
    low, high = DISTRIBUTION_GAIN_RANGE_PERCENT
    gain = float(
        check_range("distribution_gain_percent", distribution_gain_percent, low, high, "%")
    )
    return 1.0 + gain / 100.0


def coincident_load(loads) -> np.ndarray:
    """Hourly coincident sum of several units' loads.

    Parameters
    ----------
    loads : array_like, sequence of array_like, mapping or pandas.DataFrame
        Hourly loads [kW] of several units (see :func:`load_matrix`).

    Returns
    -------
    numpy.ndarray
        Sum over units for each hour [kW], shape (hours,).
    """
    matrix, _ = load_matrix(loads)
    return matrix.sum(axis=1)


def plant_load_from_coil_loads(coil_loads, distribution_gain_percent: float = 0.0) -> np.ndarray:
    """Hourly plant load: coincident coil load plus a distribution gain.

    Parameters
    ----------
    coil_loads : array_like, sequence of array_like, mapping or pandas.DataFrame
        Hourly coil loads [kW] of every coil the plant serves, hours x coils
        (see :func:`load_matrix`). Cooling coils for a chiller plant; preheat,
        heating and reheat coils for a heating plant.
    distribution_gain_percent : float
        Pump heat and pipe gains (cooling) or pipe losses (heating) [%] of the
        coincident coil load, 0 to 100. Default 0.

    Returns
    -------
    numpy.ndarray
        Plant load [kW] for each hour, shape (hours,).

    Notes
    -----
    :math:`Q_{plant,h} = (1 + g/100) \\sum_u q_{h,u}`. The gain is taken as a
    fixed fraction of the load (common practice, no source); a constant pump
    heat at zero load is not modelled.
    """
    factor = _distribution_factor(distribution_gain_percent)
    matrix, _ = load_matrix(coil_loads, field="coil_loads")
    return matrix.sum(axis=1) * factor


def peak_table(loads, names: Sequence[str] | None = None) -> pd.DataFrame:
    """Each unit's own peak beside its load in the hour of the coincident peak.

    Parameters
    ----------
    loads : array_like, sequence of array_like, mapping or pandas.DataFrame
        Hourly loads [kW] of several units (coils or zones), see :func:`load_matrix`.
    names : sequence of str, optional
        Unit names.

    Returns
    -------
    pandas.DataFrame
        One row per unit: ``unit``, ``peak_kW`` (the unit's own peak),
        ``peak_hour`` (0-based hour of that peak, first if tied),
        ``load_at_coincident_peak_kW`` (the unit's load in the hour when the
        sum of all units peaks) and ``share_of_coincident_peak`` [-].
    """
    matrix, names = load_matrix(loads, names)
    total = matrix.sum(axis=1)
    peak_hour_total = int(np.argmax(total))
    coincident = matrix[peak_hour_total]
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.where(total[peak_hour_total] > 0, coincident / total[peak_hour_total], np.nan)
    return pd.DataFrame(
        {
            "unit": names,
            "peak_kW": matrix.max(axis=0),
            "peak_hour": np.argmax(matrix, axis=0),
            "load_at_coincident_peak_kW": coincident,
            "share_of_coincident_peak": share,
        }
    )


def _diversity_row(level: str, matrix: np.ndarray, factor: float = 1.0) -> dict:
    total = matrix.sum(axis=1) * factor
    sum_of_peaks = float(matrix.max(axis=0).sum() * factor)
    hour = int(np.argmax(total))
    coincident_peak = float(total[hour])
    if coincident_peak > 0:
        diversity, coincidence = sum_of_peaks / coincident_peak, coincident_peak / sum_of_peaks
    else:
        diversity = coincidence = float("nan")
    return {
        "level": level,
        "units": matrix.shape[1],
        "sum_of_peaks_kW": sum_of_peaks,
        "coincident_peak_kW": coincident_peak,
        "coincident_peak_hour": hour,
        "diversity_factor": diversity,
        "coincidence_factor": coincidence,
    }


def diversity_table(
    coil_loads, zone_loads=None, distribution_gain_percent: float = 0.0
) -> pd.DataFrame:
    """Sum of individual peaks beside the coincident peak, for zones, coils and plant.

    Puts the zone block load, the sum of coil peaks and the coincident plant
    peak side by side, as a design meeting compares them.

    Parameters
    ----------
    coil_loads : array_like, sequence of array_like, mapping or pandas.DataFrame
        Hourly coil loads [kW], hours x coils (see :func:`load_matrix`).
    zone_loads : same forms as ``coil_loads``, optional
        Hourly zone loads [kW], hours x zones, over the same hours. The zone
        block load is their coincident peak.
    distribution_gain_percent : float
        Distribution gain [%] added at the plant level only (0 to 100).

    Returns
    -------
    pandas.DataFrame
        One row per level (``"zones"`` if given, ``"coils"``, ``"plant"``) with
        ``units``, ``sum_of_peaks_kW``, ``coincident_peak_kW``,
        ``coincident_peak_hour`` (0-based), ``diversity_factor`` (sum of peaks
        / coincident peak, >= 1) and ``coincidence_factor`` (its reciprocal).
        Both factors are NaN when every load is zero. The plant row applies the
        distribution gain to every coil, so its factors equal the coil row's.

    Raises
    ------
    InputRangeError
        On negative or non-finite loads, or zone and coil loads over a
        different number of hours.
    """
    factor = _distribution_factor(distribution_gain_percent)
    coils, _ = load_matrix(coil_loads, field="coil_loads")
    rows = []
    if zone_loads is not None:
        zones, _ = load_matrix(zone_loads, field="zone_loads")
        if zones.shape[0] != coils.shape[0]:
            raise InputRangeError(
                "zone_loads",
                f"zone_loads has {zones.shape[0]} hours but coil_loads has {coils.shape[0]}",
                f"{coils.shape[0]} hours",
            )
        rows.append(_diversity_row("zones", zones))
    rows.append(_diversity_row("coils", coils))
    rows.append(_diversity_row("plant", coils, factor))
    return pd.DataFrame(rows)
