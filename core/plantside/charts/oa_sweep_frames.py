"""Frames of the outdoor-air sweep: coil design load against the outdoor-air fraction.

:func:`oa_sweep_frame` (the curves), :func:`oa_sweep_frame_from_sweep` (from
``plantside.air_handler.year.outdoor_air_sweep``) and :func:`oa_marker_frame` (the
current setting on each curve).
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
import pandas as pd

from plantside.charts.frame_common import _column, _display, _finish, _system
from plantside.errors import InputRangeError, check_range

__all__ = ["oa_marker_frame", "oa_sweep_frame", "oa_sweep_frame_from_sweep"]


def oa_sweep_frame(outdoor_air_fraction, loads: Mapping[str, object], system="SI") -> pd.DataFrame:
    """Coil design load over a sweep of outdoor-air fraction.

    Parameters
    ----------
    outdoor_air_fraction : array_like
        Outdoor-air fractions swept [-], 0 to 1.
    loads : mapping of str to array_like
        Series label -> design coil load at each fraction [kW], e.g.
        ``{"Coil total": total, "Coil sensible": sensible, "Coil latent": latent}``.
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        ``outdoor_air_percent`` [%], ``series`` (str), ``load`` [display power].
    """
    system = _system(system)
    fraction = np.atleast_1d(check_range("outdoor_air_fraction", outdoor_air_fraction, 0.0, 1.0))
    if not loads:
        raise InputRangeError("loads", "no load series given", "one or more series")
    parts = []
    for label, values in loads.items():
        arr = np.atleast_1d(check_range(str(label), values, None, None, "kW"))
        if arr.shape != fraction.shape:
            raise InputRangeError(
                str(label),
                f"{label} has {arr.size} values for {fraction.size} outdoor-air fractions",
                f"{fraction.size} values",
            )
        parts.append(
            pd.DataFrame(
                {
                    "outdoor_air_percent": 100.0 * fraction,
                    "series": str(label),
                    "load": _display("power", arr, system),
                }
            )
        )
    return _finish(pd.concat(parts, ignore_index=True), system, "oa_sweep")


def oa_sweep_frame_from_sweep(sweep: pd.DataFrame, system="SI") -> pd.DataFrame:
    """:func:`oa_sweep_frame` from ``plantside.air_handler.year.outdoor_air_sweep`` results.

    Parameters
    ----------
    sweep : pandas.DataFrame
        Columns ``minimum_outdoor_air_fraction`` [-] and
        ``coil_total_peak_kW`` (the year's peak coil load at each setting).
    system : {"SI", "IP"}

    Returns
    -------
    pandas.DataFrame
        As :func:`oa_sweep_frame`, one series "Year's peak coil load".
    """
    fraction = _column(sweep, "minimum_outdoor_air_fraction")
    peak = _column(sweep, "coil_total_peak_kW")
    return oa_sweep_frame(fraction, {"Year's peak coil load": peak}, system)


def oa_marker_frame(sweep_frame: pd.DataFrame, current_fraction: float) -> pd.DataFrame:
    """The current outdoor-air setting on each curve of an outdoor-air sweep frame.

    Parameters
    ----------
    sweep_frame : pandas.DataFrame
        From :func:`oa_sweep_frame` (optionally with a ``scenario`` column).
    current_fraction : float
        The current (minimum) outdoor-air fraction [-], 0 to 1.

    Returns
    -------
    pandas.DataFrame
        One row per series (and scenario): ``outdoor_air_percent`` [%],
        ``series``, ``load`` [display power] interpolated linearly along the
        sweep (sweeps are fine-grained, 1 % steps by default).
    """
    current = 100.0 * float(check_range("current_fraction", current_fraction, 0.0, 1.0, "-"))
    keys = ["series"] + (["scenario"] if "scenario" in sweep_frame.columns else [])
    rows = []
    for key, part in sweep_frame.groupby(keys, sort=False):
        part = part.sort_values("outdoor_air_percent")
        load = np.interp(current, part["outdoor_air_percent"], part["load"])
        key = key if isinstance(key, tuple) else (key,)
        rows.append((current, *key, float(load)))
    frame = pd.DataFrame(rows, columns=["outdoor_air_percent", *keys, "load"])
    frame.attrs = dict(sweep_frame.attrs)
    frame.attrs["kind"] = "oa_marker"
    return frame
