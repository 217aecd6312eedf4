"""Values placed on the hourly grid; missing hours and empty cells as gaps.

Gaps are errors unless the caller asks for them to be filled. Filling is linear
interpolation in time, only for runs of at most ``max_gap_hours`` with a known
value on both sides; every fill is listed in the notes.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from plantside.hourly_csv.layout import HourlyTable
from plantside.hourly_csv.time_axis import TimeAxis

__all__ = ["place_on_grid"]


def place_on_grid(
    table: HourlyTable,
    axis: TimeAxis,
    columns: Mapping[str, tuple[np.ndarray, np.ndarray]],
    *,
    fill_gaps: bool,
    max_gap_hours: int,
) -> dict[str, np.ndarray]:
    """Each column's values on the hourly grid from the first row's hour.

    Parameters
    ----------
    table : HourlyTable
        The file; problems and notes are added to it.
    axis : TimeAxis
        Hour of each row.
    columns : mapping
        Header -> (values of each row [any unit], mask of empty cells).
    fill_gaps : bool
        Fill gaps by linear interpolation (else report them).
    max_gap_hours : int
        Longest run filled [h].

    Returns
    -------
    dict
        Header -> values on the grid (NaN where a gap was left unfilled; the caller
        fails on ``table.problems``).
    """
    position = axis.hours.astype(int)
    grid_size = int(position[-1]) + 1
    grid = {}
    for header, (values, _) in columns.items():
        on_grid = np.full(grid_size, np.nan)
        on_grid[position] = values
        grid[header] = on_grid
    for _index, count, before, after in axis.gaps:
        text = f"{count} missing hour(s) between {before} and {after}"
        if not fill_gaps:
            table.problems.append(
                f"column {axis.header!r}: {text} (pass fill_gaps=True to interpolate gaps of "
                f"up to {max_gap_hours} h)"
            )
        elif count > max_gap_hours:
            table.problems.append(
                f"column {axis.header!r}: {text}, longer than max_gap_hours={max_gap_hours}"
            )
    if not fill_gaps:
        for header, (_, empty) in columns.items():
            if empty.any():
                table.problems.append(
                    f"column {header!r}: empty or missing values at "
                    f"{table.rows_text(np.flatnonzero(empty))} (pass fill_gaps=True to "
                    f"interpolate gaps of up to {max_gap_hours} h)"
                )
        return grid
    if table.problems:
        return grid
    filled = {}
    for header, values in grid.items():
        gap = np.isnan(values)
        if not gap.any():
            continue
        edges = np.diff(np.concatenate(([0], gap.astype(np.int8), [0])))
        starts, ends = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1)
        too_long = (ends - starts) > max_gap_hours
        at_edge = (starts == 0) | (ends == grid_size)
        for start, end in zip(starts[too_long | at_edge], ends[too_long | at_edge], strict=True):
            reason = (
                "at the start or end of the record"
                if (start == 0 or end == grid_size)
                else f"longer than max_gap_hours={max_gap_hours}"
            )
            table.problems.append(
                f"column {header!r}: {end - start} missing hour(s) {reason}, "
                f"{_grid_rows_text(table, position, start, end)}; cannot interpolate"
            )
        if table.problems:
            continue
        known = np.flatnonzero(~gap)
        values[gap] = np.interp(np.flatnonzero(gap), known, values[known])
        filled[header] = [
            _grid_rows_text(table, position, s, e) for s, e in zip(starts, ends, strict=True)
        ]
    for header, spans in filled.items():
        table.notes.append(
            f"column {header!r}: filled {len(spans)} gap(s) by linear interpolation: "
            + "; ".join(spans[:8])
            + ("; ..." if len(spans) > 8 else "")
        )
    return grid


def _grid_rows_text(table: HourlyTable, position: np.ndarray, start: int, end: int) -> str:
    """Describe grid hours [start, end) by the file rows around them."""
    inside = np.flatnonzero((position >= start) & (position < end))
    if inside.size:
        return table.rows_text(inside)
    before = np.searchsorted(position, start) - 1
    after = before + 1
    parts = []
    if before >= 0:
        parts.append(f"after row {table.row_numbers([before])[0]}")
    if after < position.size:
        parts.append(f"before row {table.row_numbers([after])[0]}")
    return " and ".join(parts) or "rows unknown"
