"""Chart 1: from zone load to coil load at the design hour, step by step.

A horizontal waterfall: the zone's sensible and latent loads build up to the
zone load (a subtotal bar), then the ventilation air's sensible and latent
loads, the fan heat and the economizer or energy-recovery effect (a step
back when it takes load away) build up to the coil load (the total bar). The
reader sees at once what the coil carries that the zone never asked for.

Frame: :func:`plantside.charts.frames.design_breakdown_frame`.
"""

from __future__ import annotations

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.compare import SCENARIO_COLUMN, has_scenarios, scenario_opacity, scenarios_in
from plantside.charts.frames import axis_title, frame_system, value_format
from plantside.charts.palette import (
    COMPONENT_COLOURS,
    INK,
    STAGE,
    chart_builder,
    layered,
    plot_width,
    themed,
)

#: Plot width of the exported breakdown [px] (bars need less room than the curves).
_WIDTH = 720

__all__ = ["design_breakdown_chart"]

_OTHER_COLOUR = STAGE


def _value_text(value: float, kind: str, fmt: str) -> str:
    """Bar label: signed for a step ("+16", "-8"), plain for a total; never "-0"."""
    text = format(value, fmt)
    if float(text.replace(",", "")) == 0.0:
        return "0"
    return format(value, "+" + fmt) if kind == "part" else text


def _ratio_text(frame: pd.DataFrame) -> list[str]:
    lines = []
    for key in scenarios_in(frame) or [None]:
        part = frame if key is None else frame[frame[SCENARIO_COLUMN] == key]
        totals = part.set_index("component")["load"]
        # the plant view ends on the plant load (coils plus distribution gain)
        last = "Plant load" if "Plant load" in totals.index else "Coil load"
        zone, total = float(totals.get("Zone load", np.nan)), float(totals.get(last, np.nan))
        prefix = "" if key is None else f"{key}: "
        if np.isfinite(zone) and zone > 0:
            lines.append(f"{prefix}{last.lower()} is {total / zone:.2f} × the zone load")
    return lines


@chart_builder
def design_breakdown_chart(
    frame: pd.DataFrame, system=None, title: str | None = None, width: int | None = None
):
    """Waterfall of the design coil load, from zone load to coil load.

    Parameters
    ----------
    frame : pandas.DataFrame
        From :func:`~plantside.charts.frames.design_breakdown_frame`, or two
        such frames stacked by :func:`~plantside.charts.compare.combine_scenarios`.
    system : {"SI", "IP"}, optional
        Unit system of the frame (default: the frame's own).
    title : str, optional
        Chart title (default "Design coil load, from zone to coil").
    width : int, optional
        Plot width [px], 240 to 1600; default 720 (the exports' width). The dashboard passes the
        width that fits its panel.

    Returns
    -------
    altair.LayerChart
        Bars from ``start`` to ``end`` per component, value labels at the bar
        ends; with scenarios, A and B side by side (A lighter).
    """
    system = frame_system(frame, system)
    order = list(dict.fromkeys(frame.sort_values("order")["component"]))
    colours = {name: COMPONENT_COLOURS.get(name, _OTHER_COLOUR) for name in order}
    fmt = value_format(frame["load"])
    compare = has_scenarios(frame)
    data = frame.assign(
        label_at=np.maximum(frame["start"], frame["end"]),
        text=[_value_text(v, k, fmt) for v, k in zip(frame["load"], frame["kind"], strict=True)],
    )
    base = alt.Chart()
    y = alt.Y("component:N", sort=order, title=None, axis=alt.Axis(labelLimit=260))
    encoding = {
        "y": y,
        "x": alt.X("start:Q", title=axis_title("Load", "power", system)),
        "x2": alt.X2("end"),
        "color": alt.Color(
            "component:N",
            scale=alt.Scale(domain=order, range=[colours[n] for n in order]),
            legend=None,
        ),
        "tooltip": [
            alt.Tooltip("component:N", title="Component"),
            alt.Tooltip("load:Q", title=axis_title("Load", "power", system), format=fmt),
        ],
    }
    if compare:
        encoding["yOffset"] = alt.YOffset(f"{SCENARIO_COLUMN}:N", sort=list(scenarios_in(frame)))
        encoding["opacity"] = scenario_opacity(frame)
        encoding["tooltip"].insert(0, alt.Tooltip(f"{SCENARIO_COLUMN}:N", title="Scenario"))
    bars = base.mark_bar(cornerRadiusEnd=2).encode(**encoding)
    text_encoding = {"y": y, "x": alt.X("label_at:Q"), "text": alt.Text("text:N")}
    if compare:
        text_encoding["yOffset"] = encoding["yOffset"]
    labels = base.mark_text(align="left", dx=6, color=INK, fontSize=14).encode(**text_encoding)
    totals = (
        base.transform_filter(alt.datum.kind == "total")
        .mark_bar(filled=False, stroke=INK, strokeWidth=1.2)
        .encode(**{k: v for k, v in encoding.items() if k in ("y", "x", "x2", "yOffset")})
    )
    step = 26 if compare else 40
    chart = layered(
        [bars, totals, labels],
        data=alt.NamedData(name="breakdown"),
        height=alt.Step(step),
        width=plot_width(width, _WIDTH),
    )
    return themed(
        chart,
        title=title or "Design coil load, from zone to coil",
        subtitle=_ratio_text(frame),
        datasets={"breakdown": data},
    )
