"""What every chart frame shares: the row limit, the unit system it records, axis titles.

A chart frame (see :mod:`plantside.charts.frames`) is small, tidy and in display units;
``frame.attrs["system"]`` records its unit system and ``frame.attrs["kind"]`` which
frame it is (``_finish``). Here also: reading an hourly column by name (a missing one
is named in the error), SI -> display units (``_display``), a 1-2-5 bin step, rows as
JSON-ready records and the number format of value labels.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from plantside.air_handler.results import zone_load
from plantside.errors import InputRangeError
from plantside.units import UnitSystem, to_display, unit_label

__all__ = ["MAX_ROWS", "axis_title", "frame_system", "records", "value_format"]


#: Largest number of rows any chart frame may carry.
MAX_ROWS = 1000


def _system(system) -> UnitSystem:
    return UnitSystem.parse(system)


def _finish(frame: pd.DataFrame, system: UnitSystem, kind: str) -> pd.DataFrame:
    if len(frame) > MAX_ROWS:  # guards the promise to the dashboard; bins keep it below
        raise InputRangeError(
            "rows", f"{kind} frame has {len(frame)} rows", f"at most {MAX_ROWS} rows"
        )
    frame.attrs["system"] = system.value
    frame.attrs["kind"] = kind
    return frame


def frame_system(frame: pd.DataFrame, system=None) -> UnitSystem:
    """Unit system of a chart frame: ``system`` if given, else ``frame.attrs["system"]``."""
    if system is not None:
        return _system(system)
    if "system" not in frame.attrs:
        raise InputRangeError(
            "system",
            "the chart frame does not say its unit system; build it with "
            "plantside.charts.frames or pass system='SI' or 'IP'",
            "'SI' or 'IP'",
        )
    return _system(frame.attrs["system"])


def axis_title(label: str, quantity: str, system) -> str:
    """Axis title in the trade's words with the display unit: ``"Coil load [tons]"``."""
    return f"{label} [{unit_label(quantity, system)}]"


def _display(quantity: str, value_si, system: UnitSystem) -> np.ndarray:
    return np.asarray(to_display(quantity, value_si, system)[0], dtype=float)


def _column(hourly: pd.DataFrame, name: str) -> np.ndarray:
    if name not in hourly.columns:
        raise InputRangeError(
            name,
            f"hourly results have no column {name!r}",
            f"a frame with column {name!r}",
        )
    return hourly[name].to_numpy(dtype=float)


def _nice_step(span: float, target_steps: int) -> float:
    """A 1-2-5 step that divides ``span`` into about ``target_steps`` parts."""
    if not np.isfinite(span) or span <= 0:
        return 1.0
    raw = span / target_steps
    power = 10.0 ** np.floor(np.log10(raw))
    for factor in (1.0, 2.0, 2.5, 5.0, 10.0):
        if raw <= factor * power:
            return float(factor * power)
    return float(10.0 * power)


def _hourly_zone_load(hourly: pd.DataFrame) -> np.ndarray:
    for name in ("zone_sensible_kW", "zone_latent_kW"):
        _column(hourly, name)  # a missing column is named in the error
    return zone_load(hourly)


def records(frame: pd.DataFrame) -> list[dict]:
    """Rows of a chart frame as JSON-ready dicts (NaN and infinities become None).

    Builders hand these to Vega-Lite as named datasets, which skips Altair's
    own DataFrame sanitising (the larger part of a chart's serialisation time).
    Numbers keep 10 significant digits, far beyond what a chart can show.
    """
    return json.loads(frame.to_json(orient="records", double_precision=10))


def value_format(values) -> str:
    """A d3 number format for value labels: one decimal below 100, none above."""
    arr = np.abs(np.asarray(values, dtype=float))
    arr = arr[np.isfinite(arr)]
    largest = float(arr.max()) if arr.size else 0.0
    return ",.1f" if largest < 100.0 else ",.0f"
