"""Pinned "A" against current "B": one frame, one chart, both scenarios drawn.

A chart frame may carry a ``scenario`` column with the values ``"A"`` (the
result the engineer pinned) and ``"B"`` (the result of the controls as they
are now). :func:`combine_scenarios` builds such a frame from two frames of the
same kind; every builder then draws both, A in the role colours but dashed,
lighter or hollow, B solid, so colour keeps meaning the quantity and the
drawing style means the scenario. A frame without the column is drawn as one
scenario, as it always was.
"""

from __future__ import annotations

from collections.abc import Mapping

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.palette import INK, OUTLINE, SCENARIO_SWATCH
from plantside.errors import InputRangeError

__all__ = [
    "SCENARIOS",
    "SCENARIO_COLUMN",
    "SCENARIO_LABELS",
    "axis_top",
    "combine_scenarios",
    "has_scenarios",
    "scenario_dash",
    "scenario_opacity",
    "scenario_shape",
    "scenarios_in",
    "spread_labels",
]

#: Column naming the scenario of each row.
SCENARIO_COLUMN = "scenario"
#: Allowed scenario values, in drawing order.
SCENARIOS = ("A", "B")
#: Legend text of each scenario.
SCENARIO_LABELS = {"A": "A (pinned)", "B": "B (current)"}

_DASH = {"A": [9, 5], "B": [1, 0]}
#: A's opacity keeps a bar's ink outline (``palette.OUTLINE``) at 3.8:1 on white (WCAG 2.1
#: SC 1.4.11), while its fill reads as the lighter of the two.
_OPACITY = {"A": 0.55, "B": 0.95}
_SHAPE = {"A": "diamond", "B": "circle"}


def combine_scenarios(frames: Mapping[str, pd.DataFrame]) -> pd.DataFrame:
    """Stack chart frames of the same kind with a ``scenario`` column.

    Parameters
    ----------
    frames : mapping of str to pandas.DataFrame
        ``{"A": pinned_frame, "B": current_frame}``; either key may be left
        out. Frames must come from the same frame function in the same unit
        system (their ``attrs["system"]`` must agree).

    Returns
    -------
    pandas.DataFrame
        The rows of each frame with ``scenario`` set, A first. ``attrs`` are
        those of the first frame, and ``attrs["scenarios"]`` holds each
        scenario's own ``attrs`` (e.g. the hours left out of each).

    Raises
    ------
    InputRangeError
        For a key other than "A"/"B", no frames, frames of different unit
        systems or different columns.
    """
    if not frames:
        raise InputRangeError("frames", "no scenario frames given", "'A' and/or 'B'")
    unknown = sorted(set(frames) - set(SCENARIOS))
    if unknown:
        raise InputRangeError(
            "scenario", f"scenario {unknown[0]!r} is not allowed", "'A' (pinned) or 'B' (current)"
        )
    keys = [key for key in SCENARIOS if key in frames]
    systems = {frames[key].attrs.get("system") for key in keys}
    if len(systems) > 1:
        raise InputRangeError(
            "system",
            f"scenario frames are in different unit systems {sorted(map(str, systems))}",
            "one unit system for A and B",
        )
    columns = [tuple(c for c in frames[key].columns if c != SCENARIO_COLUMN) for key in keys]
    if len(set(columns)) > 1:
        raise InputRangeError(
            "frames", "scenario frames have different columns", "frames of the same kind"
        )
    parts = [frames[key].assign(**{SCENARIO_COLUMN: key}) for key in keys]
    combined = pd.concat(parts, ignore_index=True)
    combined.attrs = dict(frames[keys[0]].attrs)
    combined.attrs["scenarios"] = {key: dict(frames[key].attrs) for key in keys}
    return combined


def has_scenarios(frame: pd.DataFrame) -> bool:
    """True when the frame carries a ``scenario`` column."""
    return SCENARIO_COLUMN in frame.columns


def scenarios_in(frame: pd.DataFrame) -> list[str]:
    """Scenario values present in the frame, in drawing order ([] without the column)."""
    if not has_scenarios(frame):
        return []
    present = set(frame[SCENARIO_COLUMN].unique())
    return [key for key in SCENARIOS if key in present]


def _legend_scale(mapping: dict, frame: pd.DataFrame) -> alt.Scale:
    present = scenarios_in(frame) or list(SCENARIOS)
    return alt.Scale(domain=present, range=[mapping[key] for key in present])


def _legend(title: str = "Scenario", **extra) -> alt.Legend:
    return alt.Legend(title=title, labelExpr=_label_expression(), **extra)


def _label_expression() -> str:
    cases = " : ".join(
        f"datum.value === '{key}' ? '{label}'" for key, label in SCENARIO_LABELS.items()
    )
    return f"{cases} : datum.value"


def scenario_dash(frame: pd.DataFrame):
    """``strokeDash`` encoding: A dashed, B solid (for lines and rules)."""
    return alt.StrokeDash(
        f"{SCENARIO_COLUMN}:N",
        scale=_legend_scale(_DASH, frame),
        # long stroke symbols in the ink colour, so the dashes show in the legend
        legend=_legend(
            symbolType="stroke", symbolSize=900, symbolStrokeWidth=3, symbolStrokeColor=INK
        ),
    )


def scenario_opacity(frame: pd.DataFrame, legend: bool = True, **legend_options):
    """``opacity`` encoding: A light, B strong (for bars and areas); ``legend_options``
    (e.g. ``orient="bottom"``) go to its legend.

    The legend's swatches are :data:`~plantside.charts.palette.SCENARIO_SWATCH` (the coil
    blue) at A's and B's opacity, outlined as the bars are. (Vega-Lite draws no legend
    for ``fillOpacity``, so the whole mark fades, outline included: A's opacity is chosen
    so the outline keeps 3:1.)
    """
    return alt.Opacity(
        f"{SCENARIO_COLUMN}:N",
        scale=_legend_scale(_OPACITY, frame),
        legend=_legend(
            symbolType="square",
            symbolFillColor=SCENARIO_SWATCH,
            symbolStrokeColor=OUTLINE,
            symbolStrokeWidth=1,
            **legend_options,
        )
        if legend
        else None,
    )


def scenario_shape(frame: pd.DataFrame):
    """``shape`` encoding: A diamonds, B circles (for points)."""
    return alt.Shape(f"{SCENARIO_COLUMN}:N", scale=_legend_scale(_SHAPE, frame), legend=_legend())


def axis_top(values) -> float:
    """A round top for a zero-based axis over ``values``: the next multiple of a 1-2-5 step."""
    values = np.asarray(values, dtype=float)
    high = float(np.nanmax(values)) if values.size else 1.0
    high = high if np.isfinite(high) and high > 0 else 1.0
    raw = high / 8
    power = 10 ** np.floor(np.log10(raw))
    step = next(f * power for f in (1, 2, 5, 10) if raw <= f * power)
    return float(np.ceil(high * 1.02 / step) * step)


def spread_labels(values, gap: float) -> np.ndarray:
    """Label positions near ``values`` and at least ``gap`` apart (same units, any order).

    Labels of close lines (A and B, a plant and its stages) would print over
    each other; each keeps its order and moves as little as possible: pushed
    apart upwards, then the group shifted back so the mean move is zero.
    """
    values = np.asarray(values, dtype=float)
    if values.size < 2:
        return values.copy()
    order = np.argsort(values, kind="stable")
    placed = values[order].copy()
    for i in range(1, placed.size):
        placed[i] = max(placed[i], placed[i - 1] + gap)
    # shift each cluster (labels now touching) back by its mean move
    start = 0
    for i in range(1, placed.size + 1):
        if i == placed.size or placed[i] - placed[i - 1] > gap + 1e-12:
            cluster = slice(start, i)
            placed[cluster] -= np.mean(placed[cluster] - values[order][cluster])
            start = i
    for i in range(1, placed.size):  # a cluster moved back never reaches the one below
        placed[i] = max(placed[i], placed[i - 1] + gap)
    result = np.empty_like(placed)
    result[order] = placed
    return result
