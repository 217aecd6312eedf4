"""Charts drawn to a width: they fit a dashboard panel, and their labels never overlap.

The dashboard's panels at the page widths a meeting room uses (1024 to 1920 px) offer
about 650 to 1,530 px (dashboard.css: the page less the 330 px control column, margins
and the panel's padding; measured in Chromium at 1280 and 1920 px, common practice for
the 1024 px case). The widths a chart is drawn at are read from vl-convert's SVG, the
same renderer as the exports.
"""

from __future__ import annotations

import re

import numpy as np
import pytest
from plantside.charts import palette
from plantside.charts.export import chart_bytes
from plantside.charts.psychrometric import (
    _GRID_LABEL_STYLE,
    _label_boxes,
    _process_label_boxes,
    _with_label_positions,
    psychrometric_chart,
)
from plantside.dashboard.panel_width import FIT_TOLERANCE_PX, fitted_plot_width
from plantside.errors import InputRangeError
from test_charts import CHARTS, build, combined, frames_for

#: Content width of a chart panel [px] at page widths 1024, 1280 and 1920 px.
PANELS_PX = {1024: 650, 1280: 894, 1920: 1524}


def _with_width(name: str, f: dict, width: int | None):
    """``build`` with a plot width."""
    chart = build(name, f)
    if width is None:
        return chart
    from plantside.charts import (
        design_breakdown_chart,
        load_distribution_chart,
        load_duration_chart,
        oa_sweep_chart,
        part_load_chart,
        year_scatter_chart,
    )

    if name == "design":
        return design_breakdown_chart(f["frame"], width=width)
    if name == "year":
        return year_scatter_chart(f["frame"], width=width)
    if name == "distribution":
        return load_distribution_chart(
            f["curves"], f["lines"], f["bins"], f["weights"], width=width
        )
    if name == "load_duration":
        return load_duration_chart(f["curves"], f["lines"], width=width)
    if name == "part_load":
        return part_load_chart(f["bins"], f["weights"], width=width)
    if name == "psychrometric":
        return psychrometric_chart(f["grid"], f["process"], f["density"], width=width)
    return oa_sweep_chart(f["sweep"], f["marker"], width=width)


def drawn_width(chart) -> float:
    """Width of the drawn chart [px]: plot, axes, legends and padding (no export stamp)."""
    svg = chart_bytes(chart, "svg").decode()
    return float(re.search(r'<svg[^>]*\swidth="([\d.]+)', svg).group(1))


def frames(name: str, pinned: bool) -> dict:
    return combined(name, "IP") if pinned else frames_for(name, 0.25, "IP")


def fit(name: str, f: dict, offered: float) -> tuple[int, float]:
    """What the dashboard does: draw at the default width, let the page measure, correct;
    again after each redraw (at most four redraws). Returns the plot and drawn widths."""
    width = palette.WIDTH
    drawn = drawn_width(_with_width(name, f, width))
    for _ in range(4):
        corrected = fitted_plot_width(width, offered, drawn)
        if corrected is None:
            break
        width = corrected
        drawn = drawn_width(_with_width(name, f, width))
    return width, drawn


@pytest.mark.parametrize("pinned", [False, True], ids=["current", "pinned"])
@pytest.mark.parametrize("name", CHARTS)
@pytest.mark.parametrize("page", [1280, 1920, 1024])
def test_a_chart_fits_its_panel(page, name, pinned):
    offered = PANELS_PX[page]
    width, drawn = fit(name, frames(name, pinned), offered)
    assert drawn <= offered, (width, drawn)
    # and the panel is used (at 1920 px the charts left ~450 px empty before)
    assert drawn >= offered - 4 - 2 * FIT_TOLERANCE_PX, (width, drawn)


def test_exports_keep_the_fixed_width():
    # the builders' own width when none is given: the PNG size the contributor guide states
    f = frames("oa_sweep", False)
    assert drawn_width(build("oa_sweep", f)) == drawn_width(_with_width("oa_sweep", f, 760))


@pytest.mark.parametrize("width", [palette.MIN_WIDTH - 1, palette.MAX_WIDTH + 1, float("nan")])
def test_a_width_out_of_range_is_refused_naming_it(width):
    f = frames("oa_sweep", False)
    with pytest.raises(InputRangeError, match=r"chart width = .* px; allowed 240 to 1600 px"):
        _with_width("oa_sweep", f, width)


def test_fitted_width_corrects_by_the_difference_and_stops_within_tolerance():
    # a chart 1,075 px wide drawn from a 760 px plot in an 894 px panel: 183 px too wide
    assert fitted_plot_width(760, 894, 1075) == 760 - 181 - 4
    assert fitted_plot_width(577, 894, 896) == 577 - 6  # 2 px too wide: corrected
    assert fitted_plot_width(577, 894, 890) is None  # fits: no redraw, no loop
    assert fitted_plot_width(760, 100, 1075) == palette.MIN_WIDTH
    assert fitted_plot_width(760, 20_000, 1075) == palette.MAX_WIDTH


def _overlaps(a, b, gap=0.0) -> bool:
    return not (a[0] > b[2] + gap or a[2] < b[0] - gap or a[1] > b[3] + gap or a[3] < b[1] - gap)


@pytest.mark.parametrize("system", ["SI", "IP"])
@pytest.mark.parametrize("width", [palette.MIN_WIDTH, 420, 650, 760, 1200])
def test_psychrometric_labels_never_print_over_each_other(system, width):
    f = combined("psychrometric", system)
    chart = psychrometric_chart(f["grid"], f["process"], f["density"], width=width)
    spec = chart.to_dict()
    grid = spec["datasets"]["grid"]
    import pandas as pd

    grid = pd.DataFrame(grid)
    labels = grid[grid["label"] & grid["family"].isin(list(_GRID_LABEL_STYLE))]
    x_domain = [float(grid["drybulb"].min()), float(grid["drybulb"].max())]
    y_domain = [0.0, float(grid["humidity_ratio"].max())]
    boxes = list(_label_boxes(labels, x_domain, y_domain, width, 460))
    process = _with_label_positions(f["process"], x_domain)
    boxes += _process_label_boxes(process, x_domain, y_domain, width, 460)
    grid_boxes = len(labels)  # the grid's labels first, then the process's
    for i, a in enumerate(boxes[:grid_boxes]):
        assert a[0] >= 0, "a label runs off the plot's left edge"
        for b in boxes[i + 1 :]:
            assert not _overlaps(a, b), (a, b)
    # labels remain: a chart without them would pass the test above
    assert (labels["family"] == "enthalpy").sum() >= 3
    assert (labels["family"] == "relative humidity").sum() >= 3


def test_the_reported_collisions_are_gone():
    # the cases at the exported width: "50 Btu/lb" on "90 %" (IP) and
    # "110 kJ/kg" on "90 %" (SI); one of each pair is left out
    for system, enthalpy in (("IP", "50 Btu/lb"), ("SI", "110 kJ/kg")):
        f = combined("psychrometric", system)
        chart = psychrometric_chart(f["grid"], f["process"], f["density"])
        rows = chart.to_dict()["datasets"]["grid"]
        shown = {r["line"] for r in rows if r["label"]}
        assert not {enthalpy, "90 %"} <= shown, system


def test_pinned_iplv_weights_are_coil_blue_light_and_strong_not_zone_orange():
    chart = build("distribution", combined("distribution", "IP"))
    text = str(chart.to_dict())
    scale = re.search(r"'domain': \['AHRI 550/590', [^\]]*\], 'range': \[([^\]]*)\]", text)
    colours = [c.strip(" '") for c in scale.group(1).split(",")]
    assert palette.ZONE.lower() not in [c.lower() for c in colours]
    a, b = colours[1], colours[2]
    # A: coil blue at the histogram's A opacity (0.55) on white; B: at 0.95 (compare.py)
    coil = np.array([int(palette.COIL[i : i + 2], 16) for i in (1, 3, 5)])
    for colour, opacity in ((a, 0.55), (b, 0.95)):
        rgb = np.array([int(colour[i : i + 2], 16) for i in (1, 3, 5)])
        assert np.allclose(rgb, 255 - opacity * (255 - coil), atol=1), colour
