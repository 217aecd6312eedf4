"""The dashboard redraws its charts to the width the page reports, and only then.

The page's reports are widget messages any visitor of a served page can send, so a
malformed report is ignored (common practice for widget input, as the controls do).
"""

from __future__ import annotations

import pytest
import traitlets
from plantside.charts.palette import MAX_WIDTH, MIN_WIDTH, WIDTH
from plantside.dashboard.app import Dashboard
from plantside.dashboard.panel_width import PanelWidth


@pytest.fixture(scope="module")
def dashboard():
    return Dashboard(view="plant")


def _plot_width(spec: dict) -> int:
    """The plot width written in a layered chart's spec [px]."""
    return int(spec["width"])


def test_a_report_redraws_the_charts_that_do_not_fit_and_only_those(dashboard):
    sweep_spec = dashboard.charts["sweep"].spec
    design_spec = dashboard.charts["design"].spec
    assert _plot_width(sweep_spec) == WIDTH
    # the sweep chart drawn 1,075 px wide in an 894 px panel (measured in Chromium at a
    # 1280 px page before the fix); the design chart already fits with 2 px to spare
    dashboard.panel_width.report = {"sweep": [894, 1075], "design": [894, 888]}
    assert dashboard.widths["sweep"] == WIDTH - (1075 - 894) - 4
    assert _plot_width(dashboard.charts["sweep"].spec) == dashboard.widths["sweep"]
    assert dashboard.charts["design"].spec is design_spec  # not redrawn
    # the same report again (the page re-measures after the redraw): nothing moves
    after = dashboard.charts["sweep"].spec
    dashboard.panel_width.report = {"sweep": [894, 890], "design": [894, 888]}
    assert dashboard.charts["sweep"].spec is after


def test_exports_keep_the_fixed_width_whatever_the_screen(dashboard):
    dashboard.panel_width.report = {"sweep": [500, 1075]}
    assert dashboard.widths["sweep"] < WIDTH
    exported = dashboard._build_chart("sweep")  # what export_chart renders
    assert exported.to_dict()["width"] == WIDTH


@pytest.mark.parametrize(
    "report",
    [
        {"sweep": [894]},
        {"sweep": ["wide", 10]},
        {"sweep": [float("nan"), 10]},
        {"sweep": [-1, 10]},
        {"unknown chart": [894, 1000]},
        ["sweep", 894, 1000],
        {f"c{i}": [1, 1] for i in range(50)},
    ],
)
def test_a_malformed_report_is_ignored(report):
    widget = PanelWidth(names=["sweep", "design"])
    widget.report = {"sweep": [894.0, 1000.0]}
    try:
        widget.report = report
    except traitlets.TraitError:  # not a mapping: refused by the trait's type itself
        pass
    assert widget.report == {"sweep": [894.0, 1000.0]}


def test_widths_stay_within_the_builders_range(dashboard):
    dashboard.panel_width.report = {"year": [10, 1075]}
    assert dashboard.widths["year"] == MIN_WIDTH
    dashboard.panel_width.report = {"year": [19_000, 500]}
    assert dashboard.widths["year"] == MAX_WIDTH


def test_a_panel_that_follows_its_chart_does_not_shrink_it_without_end():
    """A panel sized by its content (as the plant page's parts were, in a flex row) reports
    the same shortfall after each narrowing: measured in Chromium, the charts lost 4 px
    every 0.4 s and the page grew by 150 MB a second. One narrowing, then none."""
    dashboard = Dashboard(view="plant")
    dashboard.panel_width.report = {"design": [1520.0, 1520.0]}
    narrowed = dashboard.widths["design"]
    assert narrowed == WIDTH - 4
    for step in range(1, 6):  # the panel follows the chart down: the same room each time
        dashboard.panel_width.report = {"design": [1520.0 - 4 * step, 1520.0 - 4 * step]}
        assert dashboard.widths["design"] == narrowed
    # a real change of the panel (the window made narrower) still narrows the chart
    dashboard.panel_width.report = {"design": [1200.0, 1516.0]}
    assert dashboard.widths["design"] == narrowed - (1516 - 1200) - 4
    # and a wider window widens it
    dashboard.panel_width.report = {"design": [1500.0, 1196.0]}
    widened = dashboard.widths["design"]
    assert widened > narrowed - (1516 - 1200) - 4


def test_the_same_shortfall_again_in_the_same_panel_is_still_corrected():
    """A chart too wide by 5 px on loading (IP labels), fitted, then too wide by the same
    5 px again in the same panel (back from SI to IP): corrected both times."""
    dashboard = Dashboard(view="plant")
    dashboard.panel_width.report = {"psychrometric": [1524.0, 1529.0]}
    first = dashboard.widths["psychrometric"]
    assert first == WIDTH - 9
    dashboard.panel_width.report = {"psychrometric": [1524.0, 1520.0]}  # fits
    dashboard.widths["psychrometric"] = WIDTH  # as if another unit's labels took more room
    dashboard.panel_width.report = {"psychrometric": [1524.0, 1529.0]}
    assert dashboard.widths["psychrometric"] == first
