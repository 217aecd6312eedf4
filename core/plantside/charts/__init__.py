"""Chart builders: tidy, pre-aggregated frames in, Altair charts out, nothing displayed.

Two steps, kept apart so each can be tested on its own:

1. :mod:`plantside.charts.frames` turns SI model results (an air handler's
   hourly year, a design point, a plant's loads) into small tidy frames in the
   display units of a unit system ("SI" or "IP"), never more than
   :data:`~plantside.charts.frames.MAX_ROWS` rows;
2. a builder draws a frame: :func:`design_breakdown_chart`,
   :func:`year_scatter_chart`, :func:`load_distribution_chart` (with its parts
   :func:`load_duration_chart` and :func:`part_load_chart`),
   :func:`psychrometric_chart` and :func:`oa_sweep_chart`.

Frames of a pinned scenario "A" and the current "B" are stacked with
:func:`combine_scenarios`; every builder then draws both. Charts are exported
with :func:`save_chart` / :func:`chart_bytes` (PNG and SVG through vl-convert,
stamped with the inputs). Colours and the theme are in
:mod:`plantside.charts.palette`.
"""

from plantside.charts.compare import combine_scenarios
from plantside.charts.design_breakdown import design_breakdown_chart
from plantside.charts.export import chart_bytes, save_chart
from plantside.charts.load_duration import (
    load_distribution_chart,
    load_duration_chart,
    part_load_chart,
)
from plantside.charts.oa_sweep import oa_sweep_chart
from plantside.charts.psychrometric import psychrometric_chart
from plantside.charts.year_scatter import year_scatter_chart

__all__ = [
    "chart_bytes",
    "combine_scenarios",
    "design_breakdown_chart",
    "load_distribution_chart",
    "load_duration_chart",
    "oa_sweep_chart",
    "part_load_chart",
    "psychrometric_chart",
    "save_chart",
    "year_scatter_chart",
]
