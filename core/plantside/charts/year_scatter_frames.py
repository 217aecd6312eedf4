"""Frames of the year, hour by hour, binned: zone load against coil load by economizer mode.

:func:`year_scatter_frame` bins an air handler's operating hours into a grid of zone
load and coil load cells per economizer mode (:data:`MODE_LABELS`), so 8,760 hours
become at most :data:`~plantside.charts.frame_common.MAX_ROWS` rows.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from plantside.charts.frame_common import (
    MAX_ROWS,
    _column,
    _display,
    _finish,
    _hourly_zone_load,
    _nice_step,
    _system,
)
from plantside.errors import InputRangeError, check_range

__all__ = ["MODE_LABELS", "year_scatter_frame"]


#: Words for the economizer modes of :data:`plantside.air.economizer.ECONOMIZER_MODES`.
MODE_LABELS = {
    "off": "Fan off",
    "minimum_outdoor_air": "Minimum outdoor air",
    "free_cooling": "Economizer, coil off",
    "integrated": "Economizer + coil",
    "locked_out": "Economizer locked out",
    "heating": "Heating",
    "all_outdoor_air": "100 % outdoor air",
}


def _operating(hourly: pd.DataFrame) -> np.ndarray:
    if "operating" in hourly.columns:
        return hourly["operating"].to_numpy(dtype=bool)
    if "economizer_mode" in hourly.columns:
        return hourly["economizer_mode"].astype(str).to_numpy() != "off"
    return np.ones(len(hourly), dtype=bool)


_SCATTER_NUMBERS = ("zone_load", "coil_load", "zone_low", "zone_high", "coil_low", "coil_high")


def year_scatter_frame(
    hourly: pd.DataFrame,
    system="SI",
    bins: int = 36,
    max_rows: int = 600,
    include_off: bool = False,
) -> pd.DataFrame:
    """Hours of the year counted in cells of zone load x coil load, per economizer mode.

    Parameters
    ----------
    hourly : pandas.DataFrame
        An air handler's year (``plantside.air_handler.year.hourly_year``), with
        columns ``coil_total_kW``, ``zone_sensible_kW``, ``zone_latent_kW``,
        ``economizer_mode`` and, if present, ``operating``.
    system : {"SI", "IP"}
        Display unit system.
    bins : int
        About how many cells along the longer axis. Both axes share one
        round cell width, so the coil-equals-zone diagonal stays a diagonal.
    max_rows : int
        Largest number of rows, 50 to 1000; cells are made coarser until the
        frame fits.
    include_off : bool
        Count the hours with the fan off (all loads 0) too. Default False:
        they are reported in ``attrs["hours_off"]`` instead.

    Returns
    -------
    pandas.DataFrame
        One row per occupied (zone cell, coil cell, mode): ``zone_load`` and
        ``coil_load`` (cell centres [display power]), ``zone_low``,
        ``zone_high``, ``coil_low``, ``coil_high`` (cell edges [display
        power]), ``mode`` (a :data:`plantside.air.economizer.ECONOMIZER_MODES`
        name), ``mode_label`` (its words), ``hours`` (int, > 0). Zone load is
        the load the unit meets (sensible + latent). Hours sum to the hours
        shown; ``attrs["hours_off"]`` holds the fan-off hours left out.
    """
    system = _system(system)
    zone_si = _hourly_zone_load(hourly)
    coil_si = _column(hourly, "coil_total_kW")
    if "economizer_mode" not in hourly.columns:
        raise InputRangeError(
            "economizer_mode", "hourly results have no column 'economizer_mode'", "mode names"
        )
    modes = hourly["economizer_mode"].astype(str).to_numpy()
    keep = np.ones(len(hourly), dtype=bool) if include_off else _operating(hourly)
    hours_off = int((~keep).sum())
    zone = _display("power", check_range("zone load", zone_si[keep], None, None, "kW"), system)
    coil = _display("power", check_range("coil_total_kW", coil_si[keep], None, None, "kW"), system)
    modes = modes[keep]
    bins = int(check_range("bins", bins, 2, 200, "bins"))
    # at one cell per axis (two edges' worth) every mode fits in 4 rows: 7 modes x 4 < 50
    max_rows = int(check_range("max_rows", max_rows, 50, MAX_ROWS, "rows"))
    if zone.size == 0:
        empty = {name: pd.Series(dtype=float) for name in _SCATTER_NUMBERS}
        frame = pd.DataFrame(empty).assign(
            mode=pd.Series(dtype=str), mode_label=pd.Series(dtype=str), hours=0
        )
        frame.attrs["hours_off"] = hours_off
        return _finish(frame, system, "year_scatter")
    mode_names, mode_code = np.unique(modes, return_inverse=True)
    while True:
        span = max(np.ptp(zone), np.ptp(coil), 1e-9)
        step = _nice_step(span, bins)
        zone_edges = _edges_with_step(zone, step)
        coil_edges = _edges_with_step(coil, step)
        nz, nc = zone_edges.size - 1, coil_edges.size - 1
        zone_index = np.clip(np.searchsorted(zone_edges, zone, "right") - 1, 0, nz - 1)
        coil_index = np.clip(np.searchsorted(coil_edges, coil, "right") - 1, 0, nc - 1)
        code = (mode_code * nz + zone_index) * nc + coil_index
        cells, hours = np.unique(code, return_counts=True)
        if cells.size <= max_rows or bins <= 1:
            break
        bins = max(1, int(bins * 0.8))
    coil_cell = cells % nc
    zone_cell = (cells // nc) % nz
    mode_cell = mode_names[cells // (nc * nz)]
    frame = pd.DataFrame(
        {
            "zone_load": 0.5 * (zone_edges[zone_cell] + zone_edges[zone_cell + 1]),
            "coil_load": 0.5 * (coil_edges[coil_cell] + coil_edges[coil_cell + 1]),
            "zone_low": zone_edges[zone_cell],
            "zone_high": zone_edges[zone_cell + 1],
            "coil_low": coil_edges[coil_cell],
            "coil_high": coil_edges[coil_cell + 1],
            "mode": mode_cell,
            "mode_label": [MODE_LABELS.get(m, m) for m in mode_cell],
            "hours": hours.astype(int),
        }
    )
    frame.attrs["hours_off"] = hours_off
    return _finish(frame, system, "year_scatter")


def _edges_with_step(values: np.ndarray, step: float) -> np.ndarray:
    start = np.floor(float(values.min()) / step) * step
    stop = np.floor(float(values.max()) / step) * step + step
    count = max(1, round((stop - start) / step))
    return start + step * np.arange(count + 1)
