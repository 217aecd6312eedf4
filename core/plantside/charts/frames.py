"""Model results -> small, tidy chart frames in display units.

Every function here takes SI results of the model (an air handler's hourly
year, its design point, a plant's loads) and returns a
:class:`pandas.DataFrame` that a chart builder draws as it is:

- values are already in the display units of ``system`` ("SI" or "IP"),
  converted with :func:`plantside.units.to_display` (power in kW or tons,
  energy in MWh or ton·h, temperature in °C or °F, humidity ratio in g/kg or
  gr/lb, enthalpy in kJ/kg or Btu/lb, each on its own system's reference);
- every frame is pre-aggregated: no frame has more than :data:`MAX_ROWS`
  rows, whatever the length of the year (8,760 hours become a few hundred
  bins or curve points);
- ``frame.attrs["system"]`` records the unit system, so builders label their
  axes with the right units without being told twice.

Column schemas are listed in each function's docstring and in
``notes/charts.md``. Frames from two scenarios are stacked with
:func:`plantside.charts.compare.combine_scenarios`.

The frames live in one module per chart, re-exported here, where readers look
first: :mod:`~plantside.charts.design_breakdown_frames` (the design-load waterfall),
:mod:`~plantside.charts.year_scatter_frames` (the year, binned),
:mod:`~plantside.charts.load_duration_frames` (load duration, part-load bins, IPLV
weights), :mod:`~plantside.charts.psychrometric_frames` (grid, process, outdoor hours)
and :mod:`~plantside.charts.oa_sweep_frames` (outdoor-air sweep), with
:mod:`~plantside.charts.frame_common` (row limit, unit system, axis titles, records).

These modules are the display edge: the only place in the chart layer that
converts units.
"""

from plantside.charts.design_breakdown_frames import (
    BREAKDOWN_COMPONENTS,
    BREAKDOWN_OPTIONAL,
    design_breakdown_frame,
)
from plantside.charts.frame_common import MAX_ROWS, axis_title, frame_system, records, value_format
from plantside.charts.load_duration_frames import (
    capacity_lines_frame,
    iplv_weights_frame,
    load_duration_frame,
    part_load_frame,
    year_load_series,
)
from plantside.charts.oa_sweep_frames import (
    oa_marker_frame,
    oa_sweep_frame,
    oa_sweep_frame_from_sweep,
)
from plantside.charts.psychrometric_frames import (
    STATE_LABELS,
    outdoor_density_frame,
    process_frame,
    psychrometric_extent,
    psychrometric_grid_frame,
)
from plantside.charts.year_scatter_frames import MODE_LABELS, year_scatter_frame

__all__ = [
    "BREAKDOWN_COMPONENTS",
    "BREAKDOWN_OPTIONAL",
    "MAX_ROWS",
    "MODE_LABELS",
    "STATE_LABELS",
    "axis_title",
    "capacity_lines_frame",
    "design_breakdown_frame",
    "frame_system",
    "iplv_weights_frame",
    "load_duration_frame",
    "oa_marker_frame",
    "oa_sweep_frame",
    "oa_sweep_frame_from_sweep",
    "outdoor_density_frame",
    "part_load_frame",
    "process_frame",
    "psychrometric_extent",
    "psychrometric_grid_frame",
    "records",
    "value_format",
    "year_load_series",
    "year_scatter_frame",
]
