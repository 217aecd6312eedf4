"""Plant design capacity and what a sizing margin buys over the year.

The design load comes from the governing design condition (a design-day run
of the air handlers, e.g. the 0.4 % cooling or 99.6 % heating condition). The
engineer adds a margin; this module sets that capacity beside the year's
hourly loads: the year's actual peak, the load exceeded 1 % and 0.4 % of the
hours, and how many hours (and how much energy) a given capacity would leave
unmet. The functions serve cooling and heating plants alike.

Load exceeded p % of the hours
------------------------------
For N hourly loads sorted from highest, :math:`x_{(1)} \\ge x_{(2)} \\ge \\dots
\\ge x_{(N)}`, and :math:`k = \\lfloor pN/100 \\rfloor`, the load exceeded
p % of the hours is :math:`x_{(k+1)}`: the lowest load that no more than p %
of the hours exceed. At most k hours lie strictly above it and at least k+1
hours are at or above it. There is no interpolation, so the result is always
one hour's actual load. Example: 8760 hours and p = 0.4 give k = 35 (0.4 % of
8760 = 35.04): the 36th highest hour. This follows the meaning of the 0.4 %,
1 % (cooling) and 99.6 %, 99 % (heating) design conditions of ASHRAE Handbook
Fundamentals (2021, Ch. 14, "Climatic design information": a value exceeded on
average by the stated fraction of the hours of the year; from memory), applied
to loads instead of weather; ASHRAE derives its weather values from binned frequency
distributions, so its rounding differs.

Cautions
--------
A capacity below the year's peak leaves hours unmet (comfort, humidity and
process risks); a capacity far above it short-cycles the machines at low load.
:func:`sizing_cautions` words both. The figures are a basis for the engineer's
decision, which must follow local codes and be made by a licensed engineer.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from plantside.arrays import scalar_or_array
from plantside.errors import check_range
from plantside.plant.loads import hourly_loads, load_matrix

__all__ = [
    "MARGIN_RANGE_PERCENT",
    "OVERSIZE_CAUTION_RATIO",
    "SIZING_DISCLAIMER",
    "design_capacity_from_design_load",
    "energy_above",
    "hours_above",
    "load_exceeded",
    "margin_table",
    "sizing_cautions",
    "sizing_summary",
]

#: Closing line of :func:`sizing_cautions` (a study carries its own disclaimer once and
#: leaves this one out).
SIZING_DISCLAIMER = (
    "These figures support, and do not replace, the judgement of a licensed engineer "
    "under the local codes."
)

#: Allowed sizing margin [%]. Project convention (no source): 0 to 100 % catches typing errors.
MARGIN_RANGE_PERCENT = (0.0, 100.0)
#: Capacity over the year's peak above which a short-cycling caution is shown [-].
#: Common practice (no source).
OVERSIZE_CAUTION_RATIO = 1.25


def design_capacity_from_design_load(design_load, margin_percent=0.0):
    """Design capacity: the design load plus the user's margin.

    Parameters
    ----------
    design_load : float or array_like
        Plant load at the governing design condition [kW], >= 0.
    margin_percent : float or array_like
        Sizing margin [%] of the design load, 0 to 100.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`Q_{design} (1 + m/100)` [kW], broadcast shape.
    """
    load = check_range("design_load", design_load, 0.0, None, "kW")
    low, high = MARGIN_RANGE_PERCENT
    margin = check_range("margin_percent", margin_percent, low, high, "%")
    result = load * (1.0 + margin / 100.0)
    return scalar_or_array(result)


def load_exceeded(loads, exceedance_percent):
    """Load exceeded in ``exceedance_percent`` % of the hours (see module notes).

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW], shape (hours,) or (hours, units) for several units
        at once.
    exceedance_percent : float or array_like
        Share of the hours [%] allowed above the result, 0 <= p < 100. p = 0
        gives the peak.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        Load [kW], of shape ``shape(exceedance_percent) + loads.shape[1:]``.
    """
    if np.ndim(loads) == 2 and np.shape(loads)[0] > 0:
        arr = load_matrix(np.asarray(loads, dtype=float)).matrix
    else:
        arr = hourly_loads(loads)
    percent = check_range(
        "exceedance_percent", exceedance_percent, 0.0, 100.0, "%", high_inclusive=False
    )
    n = arr.shape[0]
    # the tiny allowance keeps e.g. 1 % of 1000 h at exactly 10 h despite rounding
    k = np.floor(percent * n / 100.0 + 1e-9).astype(int)
    descending = -np.sort(-arr, axis=0)
    result = descending[np.minimum(k, n - 1)]
    return scalar_or_array(result)


def hours_above(loads, capacity):
    """Hours in which the load is above ``capacity`` (the plant would be short).

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW].
    capacity : float or array_like
        Capacity [kW], >= 0; an array gives one answer per capacity.

    Returns
    -------
    numpy.int64 or numpy.ndarray of int
        Number of hours with load > capacity.
    """
    arr = np.sort(hourly_loads(loads))
    cap = check_range("capacity", capacity, 0.0, None, "kW")
    result = arr.size - np.searchsorted(arr, cap, side="right")
    return result[()] if np.ndim(result) == 0 else result


def energy_above(loads, capacity):
    """Load energy above ``capacity`` over the year (the energy left unmet) [kWh].

    Parameters
    ----------
    loads : array_like
        Hourly loads [kW], each element one hour.
    capacity : float or array_like
        Capacity [kW], >= 0.

    Returns
    -------
    numpy.float64 or numpy.ndarray
        :math:`\\sum_h \\max(q_h - C, 0)` [kWh].
    """
    arr = np.sort(hourly_loads(loads))
    cap = check_range("capacity", capacity, 0.0, None, "kW")
    position = np.searchsorted(arr, cap, side="right")
    # sum of the loads above each capacity from a suffix sum of the sorted loads
    suffix = np.concatenate([np.cumsum(arr[::-1])[::-1], [0.0]])
    result = np.maximum(suffix[position] - (arr.size - position) * cap, 0.0)
    return scalar_or_array(result)


def margin_table(loads, design_load: float, margins_percent=(0, 5, 10, 15, 20, 25)):
    """What each margin buys: capacity, hours short and energy unmet over the year.

    Parameters
    ----------
    loads : array_like
        Hourly plant loads [kW] of the year.
    design_load : float
        Plant load at the governing design condition [kW].
    margins_percent : sequence of float
        Margins to compare [%], each 0 to 100.

    Returns
    -------
    pandas.DataFrame
        One row per margin: ``margin_percent``, ``capacity_kW``,
        ``capacity_over_peak`` (capacity / the year's peak, NaN for a year
        without load), ``hours_short`` (hours with load > capacity),
        ``percent_of_hours_short``, ``unmet_energy_kWh`` and
        ``largest_shortfall_kW`` (peak minus capacity, >= 0).
    """
    arr = hourly_loads(loads)
    margins = np.atleast_1d(
        check_range("margins_percent", margins_percent, *MARGIN_RANGE_PERCENT, "%")
    )
    capacity = np.atleast_1d(design_capacity_from_design_load(design_load, margins))
    peak = arr.max()
    short = np.atleast_1d(hours_above(arr, capacity))
    return pd.DataFrame(
        {
            "margin_percent": margins,
            "capacity_kW": capacity,
            "capacity_over_peak": capacity / peak if peak > 0 else np.full(capacity.shape, np.nan),
            "hours_short": short.astype(int),
            "percent_of_hours_short": 100.0 * short / arr.size,
            "unmet_energy_kWh": np.atleast_1d(energy_above(arr, capacity)),
            "largest_shortfall_kW": np.maximum(peak - capacity, 0.0),
        }
    )


def sizing_summary(
    loads, design_load: float, margin_percent: float = 0.0, exceedance_percents=(1.0, 0.4)
) -> pd.DataFrame:
    """Design load and capacity beside the year's peak and load percentiles.

    Parameters
    ----------
    loads : array_like
        Hourly plant loads [kW] of the year.
    design_load : float
        Plant load at the governing design condition [kW].
    margin_percent : float
        Sizing margin [%], 0 to 100.
    exceedance_percents : sequence of float
        Percentiles to show as "load exceeded p % of the hours" [%].

    Returns
    -------
    pandas.DataFrame
        Rows ``design_load``, ``design_capacity``, ``annual_peak`` and one
        ``exceeded_<p>_percent`` per percentile, with ``quantity`` (key),
        ``description``, ``load_kW``, ``percent_of_design_capacity``,
        ``hours_above`` (hours with load above this value) and
        ``energy_above_kWh`` (load energy above this value).
    """
    arr = hourly_loads(loads)
    capacity = float(design_capacity_from_design_load(design_load, margin_percent))
    percents = np.atleast_1d(np.asarray(exceedance_percents, dtype=float))
    exceeded = np.atleast_1d(load_exceeded(arr, percents))
    keys = ["design_load", "design_capacity", "annual_peak"]
    descriptions = [
        "load at the governing design condition",
        f"design load plus {float(margin_percent):g} % margin",
        "highest hourly load of the year",
    ]
    values = [float(design_load), capacity, float(arr.max())]
    for p, value in zip(percents, exceeded, strict=True):
        keys.append(f"exceeded_{p:g}_percent")
        descriptions.append(f"load exceeded in {p:g} % of the hours")
        values.append(float(value))
    values = np.asarray(values)
    return pd.DataFrame(
        {
            "quantity": keys,
            "description": descriptions,
            "load_kW": values,
            "percent_of_design_capacity": (
                100.0 * values / capacity if capacity > 0 else np.full(values.shape, np.nan)
            ),
            "hours_above": np.atleast_1d(hours_above(arr, values)).astype(int),
            "energy_above_kWh": np.atleast_1d(energy_above(arr, values)),
        }
    )


def sizing_cautions(loads, capacity: float, design_load: float | None = None) -> list[str]:
    """Plain-language cautions on a plant capacity against the year's loads.

    Parameters
    ----------
    loads : array_like
        Hourly plant loads [kW]: everything the plant serves (for heating, also the
        heat delivered outside the air handlers, such as perimeter heating).
    capacity : float
        Installed (or design) capacity [kW], > 0.
    design_load : float, optional
        The plant's load at the governing design condition [kW], >= 0. When given, the
        oversizing caution is measured against the larger of the year's peak and the
        design load, and never suggests a capacity below the design load: the year
        simulated is one year, the design condition the one the plant must meet.

    Returns
    -------
    list of str
        Empty when the capacity covers the year's peak and is below
        :data:`OVERSIZE_CAUTION_RATIO` times the larger of the peak and the design load.
    """
    arr = hourly_loads(loads)
    cap = float(check_range("capacity", capacity, 0.0, None, "kW", low_inclusive=False))
    peak = float(arr.max())
    notes = []
    short = int(hours_above(arr, cap))
    if short > 0:
        notes.append(
            f"Capacity {cap:.3f} kW is below the year's peak of {peak:.3f} kW: {short} hour(s) "
            f"and {float(energy_above(arr, cap)):.0f} kWh of load would be unmet. Check comfort, "
            "humidity and process needs in those hours."
        )
    if design_load is None:
        if peak > 0 and cap > OVERSIZE_CAUTION_RATIO * peak:
            notes.append(
                f"Capacity {cap:.3f} kW is {cap / peak:.2f} times the year's peak of "
                f"{peak:.3f} kW: expect short cycling and poor part-load control."
            )
    else:
        design = float(check_range("design_load", design_load, 0.0, None, "kW"))
        reference = max(peak, design)
        if reference > 0 and cap > OVERSIZE_CAUTION_RATIO * reference:
            notes.append(
                f"Capacity {cap:.3f} kW is {cap / reference:.2f} times the larger of the "
                f"year's peak ({peak:.3f} kW) and the design load ({design:.3f} kW): review "
                f"the margin, keeping at least the design load of {design:.3f} kW, and meet "
                "the low loads with turndown (more or smaller machines, a modulating lead "
                "machine)."
            )
        elif peak > 0 and cap > OVERSIZE_CAUTION_RATIO * peak:
            notes.append(
                f"The year's peak ({peak:.3f} kW) is well below the design load "
                f"({design:.3f} kW): the plant still needs at least the design load at the "
                "design condition; plan the low loads with turndown (more or smaller "
                "machines, a modulating lead machine), not with a smaller plant."
            )
    if notes:
        notes.append(SIZING_DISCLAIMER)
    return notes
