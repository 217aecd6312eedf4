"""Charts as wide as their panel: the page reports widths, the kernel picks plot widths.

Vega-Lite can stretch a single chart to its container, but not a concatenated one
(the load distribution; A beside B), and the builders place labels in pixels. So
the page measures instead: :class:`PanelWidth` is an invisible anywidget whose
script (``panel_width.js``, package data, no imports) reports for each chart the
width its panel offers and the width it is drawn at [px]. The chart's axes and
legend take a width that hardly depends on the plot's, so one correction,
:func:`fitted_plot_width`, makes the chart fit; the dashboard then redraws it.
Exports keep the builders' fixed width.
"""

from __future__ import annotations

import math
from pathlib import Path

import anywidget
import traitlets

from plantside.charts.palette import MAX_WIDTH, MIN_WIDTH

__all__ = ["FIT_TOLERANCE_PX", "PanelWidth", "fitted_plot_width"]

#: A chart within this many pixels of its panel's width is left as it is [px].
FIT_TOLERANCE_PX = 8
#: Room left between the chart and its panel's edge [px].
_MARGIN_PX = 4


def fitted_plot_width(plot_width: float, offered: float, drawn: float) -> int | None:
    """The plot width that makes a chart drawn ``drawn`` px wide fill ``offered`` px.

    Parameters
    ----------
    plot_width : float
        Plot width the chart was built with [px].
    offered : float
        Width of the panel's content box [px].
    drawn : float
        Width of the drawn chart (plot, axes, legend, padding) [px].

    Returns
    -------
    int or None
        The new plot width [px], within the builders' 240 to 1600 px. None when the chart
        fits with less than :data:`FIT_TOLERANCE_PX` to spare, or cannot change. A chart
        too wide by any amount is corrected.
    """
    room = offered - _MARGIN_PX - drawn
    if 0 <= room < FIT_TOLERANCE_PX:
        return None  # fits, with less than the tolerance to spare: no redraw (no loop)
    target = int(min(max(math.floor(plot_width + room), MIN_WIDTH), MAX_WIDTH))
    return None if target == plot_width else target


class PanelWidth(anywidget.AnyWidget):
    """Invisible widget: ``report`` maps a chart's name to ``[offered, drawn]`` widths [px].

    Display it once inside the dashboard; observe ``report``. Any page can send widget
    messages, so a report that is not a small mapping of known names to two finite
    widths between 0 and 20,000 px is ignored (the last good one is kept).
    """

    _esm = Path(__file__).with_name("panel_width.js")
    names = traitlets.List(traitlets.Unicode()).tag(sync=True)
    report = traitlets.Dict().tag(sync=True)

    @traitlets.validate("report")
    def _validate_report(self, proposal):
        value = proposal["value"]
        if not isinstance(value, dict) or len(value) > len(self.names):
            return self.report
        clean = {}
        for name, pair in value.items():
            if name not in self.names or not isinstance(pair, list | tuple) or len(pair) != 2:
                return self.report
            try:
                numbers = [float(x) for x in pair]
            except (TypeError, ValueError):
                return self.report
            if not all(math.isfinite(x) and 0 <= x <= 20_000 for x in numbers):
                return self.report
            clean[name] = numbers
        return clean
