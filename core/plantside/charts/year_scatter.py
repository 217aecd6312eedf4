"""Chart 2: the year hour by hour, coil load against zone load, by economizer mode.

Each circle is one cell of zone load x coil load; its area is the number of
hours in the cell and its colour the economizer mode of those hours. The
diagonal marks coil load equal to zone load: hours above it are hours in which
the coil carries ventilation or fan heat on top of the room, hours below it
are hours in which the economizer or recovery takes load off the coil. The
8,760 hours arrive already counted in a few hundred cells
(:func:`plantside.charts.frames.year_scatter_frame`).
"""

from __future__ import annotations

import altair as alt
import numpy as np
import pandas as pd

from plantside.air.economizer import ECONOMIZER_MODES
from plantside.charts.compare import SCENARIO_COLUMN, SCENARIO_LABELS, scenarios_in
from plantside.charts.frames import MODE_LABELS, axis_title, frame_system, value_format
from plantside.charts.palette import (
    INK_SOFT,
    OUTLINE,
    WIDTH,
    chart_builder,
    concatenated,
    layered,
    mode_colours,
    plot_width,
    themed,
)

__all__ = ["year_scatter_chart"]


def _domains(frame: pd.DataFrame) -> tuple[list[float], list[float]]:
    """Axis extents: each axis from 0 (or below, for heating hours) to its own largest cell."""

    def extent(low: str, high: str) -> list[float]:
        if not len(frame):
            return [0.0, 1.0]
        lo = float(min(0.0, frame[low].min()))
        hi = float(max(frame[high].max(), lo + 1e-9))
        return [lo, hi]

    return extent("zone_low", "zone_high"), extent("coil_low", "coil_high")


def _ticks(domain: list[float]) -> list[float]:
    """Round tick values (multiples of a 1-2-5 step, zero included) inside an extent."""
    raw = (domain[1] - domain[0]) / 8
    power = 10 ** np.floor(np.log10(max(raw, 1e-9)))
    step = next(f * power for f in (1, 2, 5, 10) if raw <= f * power)
    first = np.ceil(domain[0] / step) * step
    return [float(v) for v in np.arange(first, domain[1] + 1e-9, step)]


def _panel(
    scenario,
    system,
    domains,
    modes,
    colours,
    size_max,
    fmt,
    width,
    height,
    legend="right",
    legend_title="Economizer mode",
    load_label="Coil total load",
):
    power = axis_title("Zone load", "power", system)
    coil_title = axis_title(load_label, "power", system)
    x_domain, y_domain = domains
    diagonal_name = load_label.split()[0].lower()
    # the coil = zone diagonal across the part of the plot where both axes overlap
    low = max(x_domain[0], y_domain[0])
    high = min(x_domain[1], y_domain[1])
    diagonal = alt.Chart(alt.Data(values=[{"x": low, "y": low}, {"x": high, "y": high}])).mark_line(
        color=INK_SOFT, strokeDash=[6, 4], strokeWidth=1.5
    )
    diagonal = diagonal.encode(
        x=alt.X("x:Q", scale=alt.Scale(domain=x_domain, nice=False)),
        y=alt.Y("y:Q", scale=alt.Scale(domain=y_domain, nice=False)),
    )
    diagonal_label = (
        # "coil = zone" for an air handler, "plant = zone" for the plant's load
        alt.Chart(alt.Data(values=[{"x": high, "y": high, "t": f"{diagonal_name} = zone"}]))
        .mark_text(align="right", baseline="top", dx=-4, dy=6, color=INK_SOFT, fontSize=14)
        .encode(x=alt.X("x:Q"), y=alt.Y("y:Q"), text=alt.Text("t:N"))
    )
    heating = x_domain[0] < 0
    points = alt.Chart(alt.NamedData(name="year"))
    if scenario is not None:
        points = points.transform_filter(alt.datum[SCENARIO_COLUMN] == scenario)
    # a cell lies wholly on one side of 0 (0 is a cell edge): heating cells are told as a
    # heating load, a positive number, as the axis labels show it
    points = points.transform_calculate(
        zone_side="datum.zone_high <= 0 ? 'Zone heating load' : 'Zone cooling load'",
        zone_from="min(abs(datum.zone_low), abs(datum.zone_high))",
        zone_to="max(abs(datum.zone_low), abs(datum.zone_high))",
    )
    points = points.mark_circle(
        fillOpacity=0.8, stroke=OUTLINE, strokeWidth=0.7, strokeOpacity=0.9
    ).encode(
        x=alt.X(
            "zone_load:Q",
            title=power,
            scale=alt.Scale(domain=x_domain, nice=False),
            # heating left of 0 as a positive load: the labels drop the sign
            axis=alt.Axis(values=_ticks(x_domain), labelExpr="format(abs(datum.value), ',')")
            if heating
            else alt.Axis(values=_ticks(x_domain)),
        ),
        y=alt.Y(
            "coil_load:Q",
            title=coil_title,
            scale=alt.Scale(domain=y_domain, nice=False),
            axis=alt.Axis(values=_ticks(y_domain)),
        ),
        size=alt.Size(
            "hours:Q",
            title="Hours in cell",
            # area grows with the square root of the hours, from a visible minimum, so
            # one crowded cell does not shrink the rest to dots; the legend keeps the
            # true hour counts readable
            scale=alt.Scale(type="sqrt", domain=[0, size_max], range=[18, 620], zero=False),
            legend=alt.Legend(
                orient=legend,
                symbolFillColor="#9aa3ad",
                symbolStrokeColor=OUTLINE,
                symbolStrokeWidth=0.7,
                values=_legend_hours(size_max),
            ),
        ),
        color=alt.Color(
            "mode_label:N",
            title=legend_title,
            # below the panels: two columns, so the row is no wider than A and B
            legend=alt.Legend(
                orient=legend, symbolStrokeColor=OUTLINE, symbolStrokeWidth=0.7, columns=2
            )
            if legend == "bottom"
            else alt.Legend(orient=legend, symbolStrokeColor=OUTLINE, symbolStrokeWidth=0.7),
            scale=alt.Scale(
                domain=[MODE_LABELS.get(m, m) for m in modes],
                range=[colours[m] for m in modes],
            ),
        ),
        order=alt.Order("hours:Q", sort="descending"),
        tooltip=[
            alt.Tooltip("mode_label:N", title=legend_title),
            alt.Tooltip("zone_side:N", title="Zone"),
            alt.Tooltip("zone_from:Q", title=f"{power}, from", format=fmt),
            alt.Tooltip("zone_to:Q", title="to", format=fmt),
            alt.Tooltip("coil_low:Q", title=f"{coil_title}, from", format=fmt),
            alt.Tooltip("coil_high:Q", title="to", format=fmt),
            alt.Tooltip("hours:Q", title="Hours"),
        ],
    )
    layers = [diagonal, diagonal_label, points]
    if heating:
        layers[:0] = _heating_cooling_marks(x_domain, y_domain)
    return layered(
        layers,
        width=width,
        height=height,
        title=SCENARIO_LABELS[scenario] if scenario else alt.Undefined,
    )


def _heating_cooling_marks(x_domain, y_domain) -> list:
    """A rule at zero zone load and the words "heating" and "cooling" either side of it."""
    rule = (
        alt.Chart(alt.Data(values=[{"x": 0.0}]))
        .mark_rule(color=INK_SOFT, strokeWidth=1.2)
        .encode(x=alt.X("x:Q", scale=alt.Scale(domain=x_domain, nice=False)))
    )
    words = [
        alt.Chart(alt.Data(values=[{"x": 0.0, "y": y_domain[1], "t": text}]))
        .mark_text(align=align, baseline="top", dx=dx, dy=4, color=INK_SOFT, fontSize=14)
        .encode(x=alt.X("x:Q"), y=alt.Y("y:Q"), text=alt.Text("t:N"))
        for text, align, dx in (("heating", "right", -6), ("cooling", "left", 6))
    ]
    return [rule, *words]


def _legend_hours(size_max: int) -> list[int]:
    """Three or four round hour counts up to the largest cell, for the size legend."""
    values = {1}
    for share in (0.1, 0.35, 1.0):
        raw = size_max * share
        power = 10 ** max(0, int(np.floor(np.log10(max(raw, 1)))))
        values.add(max(1, int(round(raw / power) * power)))
    return sorted(v for v in values if v <= max(size_max, 1))


@chart_builder
def year_scatter_chart(
    frame: pd.DataFrame, system=None, title: str | None = None, width: int | None = None
):
    """Binned scatter of the year's hours: coil load against zone load, by economizer mode.

    Parameters
    ----------
    frame : pandas.DataFrame
        From :func:`~plantside.charts.frames.year_scatter_frame`, or two such
        frames stacked by :func:`~plantside.charts.compare.combine_scenarios`
        (then A and B are drawn side by side on the same scales).
    system : {"SI", "IP"}, optional
        Unit system of the frame (default: the frame's own).
    title : str, optional
        Chart title (default "The year hour by hour: coil load against zone load").
    width : int, optional
        Plot width [px], 240 to 1600 (A and B share it side by side); default 760 (the exports'
        width). The dashboard passes the width that fits its panel.

    Returns
    -------
    altair.LayerChart or altair.HConcatChart
    """
    system = frame_system(frame, system)
    present = set(frame["mode"]) if len(frame) else set()
    modes = [m for m in ECONOMIZER_MODES if m in present] + sorted(present - set(ECONOMIZER_MODES))
    colours = mode_colours(modes)
    domains = _domains(frame)
    size_max = int(frame["hours"].max()) if len(frame) else 1
    fmt = value_format(domains[0] + domains[1])
    keys = scenarios_in(frame)
    # a plant's hours have no one economizer mode: the frame then says what its colour means
    by_mode = any(m in ECONOMIZER_MODES for m in modes)
    legend_title = "Economizer mode" if by_mode else _frame_note(frame, "colour_label", "Hours")
    load_label = _frame_note(frame, "load_label", "Coil total load")
    total = plot_width(width)
    side = total if not keys else int(total * 0.5)
    # heights follow the default width, so a wide panel does not make a tall chart
    height = min(side * 0.6, WIDTH * 0.6) if not keys else min(side * 0.8, WIDTH * 0.4)
    subtitle = []
    if len(frame):
        step = float((frame["zone_high"] - frame["zone_low"]).iloc[0])
        unit = axis_title("", "power", system).strip()[1:-1]
        subtitle.append(
            f"Circle area: hours in a cell of {step:g} × {step:g} {unit}"
            + ("; colour: economizer mode" if by_mode else "")
        )
    off = _hours_off(frame, keys)
    if off:
        subtitle.append(f"Not shown: {_frame_note(frame, 'off_label', _OFF_LABEL)} ({off})")
    if not keys:
        chart = _panel(
            None,
            system,
            domains,
            modes,
            colours,
            size_max,
            fmt,
            side,
            height,
            "right",
            legend_title,
            load_label,
        )
    else:
        panels = [
            # legends below the two panels: A and B side by side fit a 1600 px window
            _panel(
                key,
                system,
                domains,
                modes,
                colours,
                size_max,
                fmt,
                side,
                height,
                "bottom",
                legend_title,
                load_label,
            )
            for key in keys
        ]
        chart = concatenated(
            "h", panels, resolve=alt.Resolve(scale={"color": "shared", "size": "shared"})
        )
    return themed(
        chart,
        title=title or "The year hour by hour: coil load against zone load",
        subtitle=subtitle,
        datasets={"year": frame},
    )


#: What the hours left out are, unless the frame says (``attrs["off_label"]``).
_OFF_LABEL = "hours with the fan off"


def _frame_note(frame: pd.DataFrame, key: str, default: str) -> str:
    """A note the frame carries in ``attrs`` (or, for A and B, in either scenario's)."""
    if frame.attrs.get(key):
        return str(frame.attrs[key])
    for attrs in frame.attrs.get("scenarios", {}).values():
        if attrs.get(key):
            return str(attrs[key])
    return default


def _hours_off(frame: pd.DataFrame, keys: list[str]) -> str:
    if not keys:
        off = int(frame.attrs.get("hours_off", 0))
        return f"{off:,} h" if off else ""
    by = frame.attrs.get("scenarios", {})
    parts = [f"{k}: {int(by.get(k, {}).get('hours_off', 0)):,} h" for k in keys]
    return ", ".join(parts) if any(by.get(k, {}).get("hours_off", 0) for k in keys) else ""
