"""Sweep charts: how a headline result moves across the cases of a sweep.

Two views of the tidy sweep table (:func:`plantside.study.sweep_run.results_table`,
one row per case, SI with unit-suffixed column names):

- a **line per climate** (or any other series column): a result such as the design
  coil load against one varied value such as the outdoor-air fraction;
- a **heat map of two axes**: one result in the cells of two varied values (or one
  value and the climate), with the number written in each cell.

As elsewhere in the chart layer, a ``*_frame`` function takes the SI table and
returns a small frame in display units (``frame.attrs["system"]``), and a
``*_chart`` function draws that frame and returns the chart, displaying nothing.
The sweep table is already one row per case, so the frames stay small: each plotted
point or cell must be one case. When other axes vary too, pick one slice first with
``where={column: value}``; the message names the columns that still vary.
"""

from __future__ import annotations

import re
from collections.abc import Mapping

import altair as alt
import numpy as np
import pandas as pd

from plantside.charts.frames import MAX_ROWS, frame_system, value_format
from plantside.charts.palette import CATEGORY_COLOURS, DENSITY_SCHEME, INK, WIDTH, themed
from plantside.errors import InputRangeError
from plantside.units import UnitSystem, to_display, unit_label

__all__ = [
    "column_label",
    "column_quantity",
    "sweep_charts",
    "sweep_heatmap_chart",
    "sweep_heatmap_frame",
    "sweep_line_chart",
    "sweep_line_frame",
    "water_side_options_frame",
]

#: Words for the headline columns of the sweep table (before any ``[air handler]``).
HEADLINE_LABELS = {
    "design_coil_total_kW": "Design coil load",
    "design_coil_sensible_kW": "Design coil sensible load",
    "design_coil_latent_kW": "Design coil latent load",
    "annual_peak_coil_total_kW": "Year's peak coil load",
    "annual_coil_total_kWh": "Year's coil energy",
    "heating_design_kW": "Heating design load",
    "cooling_design_load_kW": "Cooling plant design load",
    "cooling_design_capacity_kW": "Cooling plant design capacity",
    "cooling_annual_peak_kW": "Cooling plant: year's peak",
    "cooling_sum_of_coil_peaks_kW": "Sum of coil peaks",
    "cooling_energy_kWh": "Cooling energy",
    "cooling_hours_with_load": "Hours with cooling load",
    "cooling_hours_above_75_percent_capacity": "Hours above 75 % of capacity",
    "cooling_hours_above_capacity": "Hours above design capacity",
    "heating_design_load_kW": "Heating plant design load",
    "heating_design_capacity_kW": "Heating plant design capacity",
    "heating_annual_peak_kW": "Heating plant: year's peak",
    "heating_energy_kWh": "Heating energy",
    "caution_count": "Cautions",
    "climate": "Climate",
    # the water side, per plant option ([sweep] water_side = true)
    "chilled_water_plant_electricity_kWh": "Chilled-water plant electricity",
    "chilled_water_plant_seasonal_cop": "Chilled-water plant seasonal COP",
    "chiller_starts": "Chiller starts",
    "heating_fuel_kWh": "Boiler fuel",
    "hot_water_pump_electricity_kWh": "Hot-water pump electricity",
    "boiler_seasonal_efficiency": "Boiler seasonal efficiency",
    "boiler_starts": "Boiler starts",
    "option": "Plant option",
}
#: The options heat map's value: electricity above the lowest option of the column [%].
_ABOVE_LOWEST = "electricity_above_lowest_option_percent"
#: Name endings of columns that keep their unit in both unit systems (electricity and fuel
#: in kWh, as the water side's tables give them).
_FIXED_UNITS = (("_electricity_kWh", "kWh"), ("_fuel_kWh", "kWh"))

_SUFFIX_QUANTITIES = (
    ("_kWh", "energy"),
    ("_kW", "power"),
    ("_C", "temperature"),
    ("_m3s", "airflow"),
    ("_kJkg", "enthalpy"),
)
_NAME = re.compile(r"^(?P<name>[^\[]+?)(?:\[(?P<unit>[^\]]+)\])?$")
_AXIS = re.compile(r"^(?P<section>air_handler\[[^\]]+\](?:\.zone)?|site|plant)\.(?P<field>.+)$")


def _split(column: str) -> tuple[str, str | None]:
    """``"design_coil_total_kW[AHU-2]"`` -> (``"design_coil_total_kW"``, ``"AHU-2"``)."""
    if _AXIS.match(column):
        return column, None
    match = _NAME.match(column)
    return (match["name"], match["unit"]) if match else (column, None)


def _fixed_unit(column: str) -> str | None:
    """The unit of a column shown as it is in both unit systems (None: by its quantity)."""
    name, _ = _split(column)
    return next((unit for suffix, unit in _FIXED_UNITS if name.endswith(suffix)), None)


def column_quantity(column: str) -> str | None:
    """Physical quantity of a sweep-table column from its unit suffix (None: plain number).

    Heating loads and energies are ``heating_power`` / ``heating_energy`` (MBH and MMBtu
    in I-P); cooling loads ``power`` / ``energy`` (tons and ton·h). Electricity and fuel
    (``*_electricity_kWh``, ``*_fuel_kWh``) stay in kWh in both: None.
    """
    name, _ = _split(column)
    if _fixed_unit(column):
        return None
    for suffix, quantity in _SUFFIX_QUANTITIES:
        if name.endswith(suffix):
            if "heating" in name and quantity in ("power", "energy"):
                return f"heating_{quantity}"
            return quantity
    return None


def column_label(column: str) -> str:
    """Words for a column: ``"Design coil load, AHU-2 offices"`` or
    ``"Minimum outdoor air fraction (air_handler[2])"``."""
    axis = _AXIS.match(column)
    if axis:
        field = axis["field"]
        for suffix, _ in _SUFFIX_QUANTITIES:
            field = field.removesuffix(suffix)
        words = field.replace("_", " ")
        return f"{words[:1].upper()}{words[1:]} ({axis['section']})"
    name, unit = _split(column)
    label = HEADLINE_LABELS.get(name, name.replace("_", " "))
    return f"{label}, {unit}" if unit else label


def _title(column: str, label: str | None, system: UnitSystem) -> str:
    label = column_label(column) if label is None else label
    fixed = _fixed_unit(column)
    if fixed:
        return f"{label} [{fixed}]"
    quantity = column_quantity(column)
    return f"{label} [{unit_label(quantity, system)}]" if quantity else label


def _values(table: pd.DataFrame, column: str, system: UnitSystem) -> np.ndarray:
    if column not in table.columns:
        allowed = ", ".join(map(str, table.columns))
        raise InputRangeError(
            column,
            f"the sweep table has no column {column!r}; its columns: {allowed}",
            "a column of the sweep table",
        )
    quantity = column_quantity(column)
    if quantity is None:
        return table[column].to_numpy()
    return np.asarray(to_display(quantity, table[column].to_numpy(float), system)[0], float)


def _slice(table: pd.DataFrame, where: Mapping | None) -> pd.DataFrame:
    if not where:
        return table
    mask = np.ones(len(table), dtype=bool)
    for column, value in where.items():
        if column not in table.columns:
            raise InputRangeError(column, f"no column {column!r} to filter on", "a table column")
        data = table[column]
        if pd.api.types.is_numeric_dtype(data):
            mask &= np.isclose(data.to_numpy(float), float(value), rtol=1e-9, atol=1e-12)
        else:
            mask &= (data == value).to_numpy()
    chosen = table[mask]
    if chosen.empty:
        raise InputRangeError("where", f"no case has {dict(where)}", "values present in the table")
    return chosen


def _one_row_each(table: pd.DataFrame, keys: list[str], what: str) -> None:
    if table.duplicated(subset=keys).any():
        others = [
            c
            for c in table.columns
            if (_AXIS.match(c) or c == "climate") and c not in keys and table[c].nunique() > 1
        ]
        raise InputRangeError(
            "where",
            f"several cases fall on one {what} ({', '.join(keys)}); other varied columns: "
            f"{', '.join(others) or '(none)'}. Choose one value of each with where={{...}}",
            "one case per point",
        )


def _finish(frame: pd.DataFrame, system: UnitSystem, kind: str, **attrs) -> pd.DataFrame:
    if len(frame) > MAX_ROWS:
        raise InputRangeError(
            "rows", f"{kind} frame has {len(frame)} rows", f"at most {MAX_ROWS} rows"
        )
    frame.attrs.update(system=system.value, kind=kind, **attrs)
    return frame


# ---------------------------------------------------------------------------------------
# a result against one varied value, a line per series
# ---------------------------------------------------------------------------------------
def sweep_line_frame(
    table: pd.DataFrame,
    x: str,
    y: str,
    *,
    series: str = "climate",
    system="SI",
    where: Mapping | None = None,
    x_label: str | None = None,
    y_label: str | None = None,
) -> pd.DataFrame:
    """One result against one varied value, one line per ``series`` value, display units.

    Parameters
    ----------
    table : pandas.DataFrame
        The sweep table (SI, unit-suffixed column names).
    x : str
        Column of the varied value, e.g. ``"air_handler[2].minimum_outdoor_air_fraction"``.
    y : str
        Result column, e.g. ``"design_coil_total_kW[AHU-2 offices]"`` [kW].
    series : str
        Column that makes the lines (default the climate).
    system : {"SI", "IP"}
        Display units (tons in I-P for cooling loads, °F for temperatures).
    where : mapping, optional
        Column -> value: keep only these cases (SI values), when other axes vary too.
    x_label, y_label : str, optional
        Words for the axes (default from the column names); the unit is added.

    Returns
    -------
    pandas.DataFrame
        Columns ``x``, ``y``, ``series``; ``attrs``: ``system``, ``x_title``, ``y_title``,
        ``series_title``.
    """
    system = UnitSystem.parse(system)
    chosen = _slice(table, where)
    frame = pd.DataFrame(
        {
            "x": _values(chosen, x, system),
            "y": _values(chosen, y, system),
            "series": _values(chosen, series, system),
        }
    )
    frame["series"] = frame["series"].astype(str)
    _one_row_each(chosen, [x, series], "point")
    order = {name: i for i, name in enumerate(dict.fromkeys(frame["series"]))}
    frame = (
        frame.assign(_order=frame["series"].map(order))
        .sort_values(["_order", "x"], kind="stable")
        .drop(columns="_order")
        .reset_index(drop=True)
    )
    return _finish(
        frame,
        system,
        "sweep_line",
        x_title=_title(x, x_label, system),
        y_title=_title(y, y_label, system),
        series_title=column_label(series),
    )


def sweep_line_chart(frame: pd.DataFrame, *, title: str | None = None, subtitle=None):
    """Lines with points: ``frame["y"]`` against ``frame["x"]``, one colour per series.

    Parameters
    ----------
    frame : pandas.DataFrame
        From :func:`sweep_line_frame`.
    title, subtitle : str, optional
        Chart title (default: the y axis against the x axis) and subtitle lines.

    Returns
    -------
    altair.LayerChart
    """
    frame_system(frame)
    x_title, y_title = frame.attrs["x_title"], frame.attrs["y_title"]
    series = list(dict.fromkeys(frame["series"]))
    colours = [CATEGORY_COLOURS[i % len(CATEGORY_COLOURS)] for i in range(len(series))]
    y_format = value_format(frame["y"])
    encoding = {
        "x": alt.X("x:Q", title=x_title, scale=alt.Scale(zero=False)),
        "y": alt.Y("y:Q", title=y_title, scale=alt.Scale(zero=False)),
        "color": alt.Color(
            "series:N",
            title=frame.attrs.get("series_title", "Series"),
            scale=alt.Scale(domain=series, range=colours),
            sort=series,
        ),
        "tooltip": [
            alt.Tooltip("series:N", title=frame.attrs.get("series_title", "Series")),
            alt.Tooltip("x:Q", title=x_title, format=",.4~g"),
            alt.Tooltip("y:Q", title=y_title, format=y_format),
        ],
    }
    base = alt.Chart(frame).encode(**encoding)
    chart = alt.layer(base.mark_line(strokeWidth=3), base.mark_point(size=70, filled=True))
    chart = chart.properties(width=WIDTH, height=400)
    if title is None:
        title = f"{y_title.split(' [')[0]} against {x_title.split(' [')[0].lower()}"
    if subtitle is None:
        subtitle = "One line per " + frame.attrs.get("series_title", "series").lower()
    return themed(chart, title=title, subtitle=subtitle)


# ---------------------------------------------------------------------------------------
# a result over two varied values
# ---------------------------------------------------------------------------------------
def _category_text(values) -> list[str]:
    if pd.api.types.is_numeric_dtype(np.asarray(values)):
        return [f"{v:.4g}" for v in np.asarray(values, float)]
    return [str(v) for v in values]


def sweep_heatmap_frame(
    table: pd.DataFrame,
    x: str,
    y: str,
    value: str,
    *,
    system="SI",
    where: Mapping | None = None,
    x_label: str | None = None,
    y_label: str | None = None,
    value_label: str | None = None,
) -> pd.DataFrame:
    """One result in the cells of two varied values (display units).

    Parameters
    ----------
    table : pandas.DataFrame
        The sweep table (SI, unit-suffixed column names).
    x, y : str
        Columns of the two varied values (an axis column or ``"climate"``).
    value : str
        Result column drawn as the cell colour and written in the cell.
    system : {"SI", "IP"}
        Display units.
    where : mapping, optional
        Column -> value: keep only these cases, when other axes vary too.
    x_label, y_label, value_label : str, optional
        Words for the axes and the legend (default from the column names).

    Returns
    -------
    pandas.DataFrame
        Columns ``x``, ``y`` (text, in sweep order), ``x_order``, ``y_order`` (int) and
        ``value``; ``attrs``: ``system``, titles, ``x_sort`` and ``y_sort``.
    """
    system = UnitSystem.parse(system)
    chosen = _slice(table, where)
    _one_row_each(chosen, [x, y], "cell")
    x_values, y_values = _values(chosen, x, system), _values(chosen, y, system)
    frame = pd.DataFrame(
        {
            "x": _category_text(x_values),
            "y": _category_text(y_values),
            "x_raw": np.asarray(x_values),
            "y_raw": np.asarray(y_values),
            "value": np.asarray(_values(chosen, value, system), float),
        }
    )

    def order(raw_column, text_column):
        raw = frame[raw_column]
        if pd.api.types.is_numeric_dtype(raw):
            keys = frame.sort_values(raw_column, kind="stable")[text_column]
        else:  # categories (climates) in their order of appearance: the sweep's order
            keys = frame[text_column]
        return list(dict.fromkeys(keys))

    x_sort, y_sort = order("x_raw", "x"), order("y_raw", "y")
    frame["x_order"] = frame["x"].map({k: i for i, k in enumerate(x_sort)})
    frame["y_order"] = frame["y"].map({k: i for i, k in enumerate(y_sort)})
    frame = frame.drop(columns=["x_raw", "y_raw"])
    frame = frame.sort_values(["y_order", "x_order"]).reset_index(drop=True)
    return _finish(
        frame,
        system,
        "sweep_heatmap",
        x_title=_title(x, x_label, system),
        y_title=_title(y, y_label, system),
        value_title=_title(value, value_label, system),
        x_sort=x_sort,
        y_sort=y_sort,
    )


def _lines(title: str) -> list[str]:
    """A legend title on two lines (label, then unit), so it is not cut short."""
    label, bracket, unit = title.partition(" [")
    return [label, f"[{unit}"] if bracket else [label]


def sweep_heatmap_chart(frame: pd.DataFrame, *, title: str | None = None, subtitle=None):
    """Cells coloured by value (light = low, dark = high) with the value written in each.

    Parameters
    ----------
    frame : pandas.DataFrame
        From :func:`sweep_heatmap_frame`.
    title, subtitle : str, optional

    Returns
    -------
    altair.LayerChart
    """
    frame_system(frame)
    attrs = frame.attrs
    fmt = value_format(frame["value"])
    finite = frame["value"][np.isfinite(frame["value"])]
    low, high = (float(finite.min()), float(finite.max())) if len(finite) else (0.0, 1.0)
    middle = low + 0.55 * (high - low)
    cell_width = max(36, min(110, WIDTH // max(1, len(attrs["x_sort"]))))
    cell_height = max(28, min(70, 420 // max(1, len(attrs["y_sort"]))))
    x = alt.X(
        "x:O", title=attrs["x_title"], sort=list(attrs["x_sort"]), axis=alt.Axis(labelAngle=0)
    )
    y = alt.Y("y:O", title=attrs["y_title"], sort=list(attrs["y_sort"]))
    tooltip = [
        alt.Tooltip("x:O", title=attrs["x_title"]),
        alt.Tooltip("y:O", title=attrs["y_title"]),
        alt.Tooltip("value:Q", title=attrs["value_title"], format=fmt),
    ]
    cells = (
        alt.Chart(frame)
        .mark_rect(stroke="#ffffff", strokeWidth=1)
        .encode(
            x=x,
            y=y,
            color=alt.Color(
                "value:Q",
                title=_lines(attrs["value_title"]),
                scale=alt.Scale(range=list(DENSITY_SCHEME)),
                legend=alt.Legend(orient="right", gradientLength=260),
            ),
            tooltip=tooltip,
        )
    )
    labels = (
        alt.Chart(frame)
        .mark_text(fontSize=13)
        .encode(
            x=x,
            y=y,
            text=alt.Text("value:Q", format=fmt),
            color=alt.condition(alt.datum.value > middle, alt.value("#ffffff"), alt.value(INK)),
            tooltip=tooltip,
        )
    )
    chart = alt.layer(cells, labels).properties(
        width=cell_width * len(attrs["x_sort"]), height=cell_height * len(attrs["y_sort"])
    )
    if title is None:
        title = attrs["value_title"].split(" [")[0]
    if subtitle is None:
        subtitle = (
            f"By {attrs['x_title'].split(' [')[0].lower()} and "
            f"{attrs['y_title'].split(' [')[0].lower()}; one case per cell"
        )
    return themed(chart, title=title, subtitle=subtitle)


# ---------------------------------------------------------------------------------------
# the standard set for a finished sweep
# ---------------------------------------------------------------------------------------
def _first_values(table: pd.DataFrame, columns) -> dict:
    return {c: table[c].iloc[0] for c in columns}


def _fixed_note(where: Mapping, system: UnitSystem) -> str | None:
    if not where:
        return None
    shown = []
    for column, value in where.items():
        quantity = column_quantity(column)
        if quantity is not None:
            value = float(to_display(quantity, value, system)[0])
            shown.append(f"{column_label(column)} = {value:.4g} {unit_label(quantity, system)}")
        else:
            shown.append(
                f"{column_label(column)} = {value:.4g}"
                if isinstance(value, float)
                else f"{column_label(column)} = {value}"
            )
    return "Other axes held at: " + "; ".join(shown)


def sweep_charts(table: pd.DataFrame, axis_columns, *, system="SI") -> dict:
    """The sweep's standard charts, by file name: each air handler's design coil load and
    the cooling plant's design capacity against the first axis (one line per climate),
    and a heat map of the capacity over the first two axes (or the first axis and the
    climate). Other axes are held at their first value, as the subtitle says.

    Parameters
    ----------
    table : pandas.DataFrame
        The sweep table (:func:`plantside.study.sweep_run.results_table`).
    axis_columns : sequence of str
        The axis columns of the table, in the sweep's order (``SweepAxis.column``).
    system : {"SI", "IP"}
        Display units.

    Returns
    -------
    dict
        File name (without extension) -> chart; empty if the table is empty.
    """
    system = UnitSystem.parse(system)
    axes = [c for c in axis_columns if c in table.columns]
    charts = {}
    if table.empty:
        return charts
    climates = table["climate"].nunique() > 1
    if axes:
        x, others = axes[0], axes[1:]
        where = _first_values(table, others)
        loads = [c for c in table.columns if c.startswith("design_coil_total_kW[")]
        for index, y in enumerate([*loads, "cooling_design_capacity_kW"]):
            frame = sweep_line_frame(table, x, y, system=system, where=where)
            subtitle = ["One line per climate"]
            if where:
                subtitle.append(_fixed_note(where, system))
            name = f"coil_load_{index + 1}" if y in loads else "plant_capacity"
            charts[f"sweep_{name}"] = sweep_line_chart(frame, subtitle=subtitle)
    pair = None
    if len(axes) >= 2:
        pair = (axes[0], axes[1])
    elif axes and climates:
        pair = (axes[0], "climate")
    if pair is not None:
        rest = [c for c in axes if c not in pair]
        where = _first_values(
            table, rest + ([] if "climate" in pair or not climates else ["climate"])
        )
        frame = sweep_heatmap_frame(
            table, pair[0], pair[1], "cooling_design_capacity_kW", system=system, where=where
        )
        note = _fixed_note(where, system)
        charts["sweep_plant_capacity_map"] = sweep_heatmap_chart(
            frame, subtitle=[s for s in ("One case per cell", note) if s]
        )
    electricity = "chilled_water_plant_electricity_kWh"
    options = water_side_options_frame(table, electricity, axes)
    if options is not None:
        # each cooling option's electricity against the lowest option of its column: by
        # climate (or by the first axis), the other axes held at their first values
        across = "climate" if climates or not axes else axes[0]
        held = [c for c in axes if c != across]
        where = _first_values(options, held)
        chosen = _slice(options, where).copy()
        lowest = chosen.groupby(across, sort=False)[electricity].transform("min")
        chosen[_ABOVE_LOWEST] = 100.0 * (chosen[electricity] / lowest - 1.0)
        frame = sweep_heatmap_frame(
            chosen, across, "option", _ABOVE_LOWEST, system=system, value_label="Extra [%]"
        )
        note = _fixed_note(where, system)
        charts["sweep_chiller_options_map"] = sweep_heatmap_chart(
            frame,
            title="Chilled-water plant options: electricity a year",
            subtitle=[
                s
                for s in (
                    "Above the column's lowest option [%]",
                    "Chillers, pumps and tower fans",
                    note,
                )
                if s
            ],
        )
    return charts


def water_side_options_frame(
    table: pd.DataFrame, name: str, axis_columns=()
) -> pd.DataFrame | None:
    """The water-side columns ``name[option]`` of a sweep table as rows: one per case and
    plant option, with the option's name in ``option`` and its value in ``name``, beside
    the climate and the axis columns (``axis_columns``, and any ``section.field`` column).
    None when the table has no such columns (a sweep without ``water_side = true``)."""
    columns = [c for c in table.columns if _split(c)[0] == name and _split(c)[1]]
    if not columns:
        return None
    keep = [c for c in table.columns if c == "climate" or c in axis_columns or _AXIS.match(c)]
    parts = [
        table[keep].assign(option=_split(column)[1], **{name: table[column].to_numpy(float)})
        for column in columns
    ]
    return pd.concat(parts, ignore_index=True)
