"""Chart builders: valid specs, small payloads, units on every axis, data that follows the model.

Every chart is built from a real air-handler year (``plantside.air_handler.year`` on
a synthetic weather year of a fictional site, see ``test_charts_frames.study``).
"""

from __future__ import annotations

import itertools
import json
import re
import time
from dataclasses import replace
from functools import cache

import altair as alt
import numpy as np
import pytest
from plantside.air_handler.year import design_point, outdoor_air_sweep
from plantside.charts import (
    design_breakdown_chart,
    frames,
    load_distribution_chart,
    load_duration_chart,
    oa_sweep_chart,
    palette,
    part_load_chart,
    psychrometric_chart,
    year_scatter_chart,
)
from plantside.charts.compare import combine_scenarios
from plantside.errors import InputRangeError
from plantside.plant.staging import stage_machines
from test_charts_frames import DESIGN_OUTDOOR, KW_PER_TON, study

SWEEP_FRACTIONS = np.linspace(0.0, 1.0, 11)


@cache
def chart_frames(outdoor_air_fraction: float, system: str) -> dict:
    """Every chart's frames for one study, as the dashboard would build them."""
    weather, settings, zone, year, design = study(outdoor_air_fraction)
    pressure = float(np.mean(weather.pressure))
    series = frames.year_load_series(year)
    coil = series["Coil load"]
    capacities = [0.4 * coil.max() * 1.1, 0.6 * coil.max() * 1.1]
    staged = stage_machines(coil, capacities, 0.15)
    extent = frames.psychrometric_extent(
        np.r_[weather.drybulb, design.states["drybulb_C"]],
        np.r_[weather.humidity_ratio, design.states["humidity_ratio_kgkg"]],
        system,
    )
    # coil design load at each outdoor-air fraction: the model's design point per setting
    points = [
        design_point(
            replace(settings, minimum_outdoor_air_fraction=float(f)),
            zone,
            (*DESIGN_OUTDOOR, pressure),
        ).loads
        for f in SWEEP_FRACTIONS
    ]
    sweep = frames.oa_sweep_frame(
        SWEEP_FRACTIONS,
        {
            "Coil total": [p["coil_total_kW"] for p in points],
            "Coil sensible": [p["coil_sensible_kW"] for p in points],
            "Coil latent": [p["coil_latent_kW"] for p in points],
        },
        system,
    )
    return {
        "design": {"frame": frames.design_breakdown_frame(design.loads, system)},
        "year": {"frame": frames.year_scatter_frame(year, system)},
        "distribution": {
            "curves": frames.load_duration_frame(series, system),
            "lines": frames.capacity_lines_frame(capacities, system),
            "bins": frames.part_load_frame(coil, sum(capacities), system),
            "weights": frames.iplv_weights_frame(staged.machine_load, capacities, system),
        },
        "psychrometric": {
            "grid": frames.psychrometric_grid_frame(pressure, system, extent),
            "process": frames.process_frame(design.states, system, pressure),
            "density": frames.outdoor_density_frame(
                weather.drybulb, weather.humidity_ratio, system, extent
            ),
        },
        "oa_sweep": {
            "sweep": sweep,
            "marker": frames.oa_marker_frame(sweep, outdoor_air_fraction),
        },
    }


def build(name: str, f: dict):
    """Chart ``name`` from its frames."""
    if name == "design":
        return design_breakdown_chart(f["frame"])
    if name == "year":
        return year_scatter_chart(f["frame"])
    if name == "distribution":
        return load_distribution_chart(f["curves"], f["lines"], f["bins"], f["weights"])
    if name == "load_duration":
        return load_duration_chart(f["curves"], f["lines"])
    if name == "part_load":
        return part_load_chart(f["bins"], f["weights"])
    if name == "psychrometric":
        return psychrometric_chart(f["grid"], f["process"], f["density"])
    return oa_sweep_chart(f["sweep"], f["marker"])


CHARTS = (
    "design",
    "year",
    "distribution",
    "load_duration",
    "part_load",
    "psychrometric",
    "oa_sweep",
)
_FRAMES_OF = {"load_duration": "distribution", "part_load": "distribution"}


def frames_for(name: str, fraction: float, system: str) -> dict:
    return chart_frames(fraction, system)[_FRAMES_OF.get(name, name)]


def combined(name: str, system: str) -> dict:
    a = frames_for(name, 0.25, system)
    b = frames_for(name, 0.6, system)
    out = {}
    for key in b:
        if name == "psychrometric" and key == "grid":
            out[key] = b[key]
        else:
            out[key] = combine_scenarios({"A": a[key], "B": b[key]})
    return out


def data_rows(spec: dict) -> int:
    """Rows of data a spec carries: named datasets plus any inline values."""
    rows = sum(len(v) for v in spec.get("datasets", {}).values())

    def inline(node):
        count = 0
        if isinstance(node, dict):
            data = node.get("data")
            if isinstance(data, dict) and isinstance(data.get("values"), list):
                count += len(data["values"])
            count += sum(inline(v) for k, v in node.items() if k != "datasets")
        elif isinstance(node, list):
            count += sum(inline(v) for v in node)
        return count

    return rows + inline(spec)


def axis_titles(spec) -> list[str]:
    """Titles of every x and y encoding in a spec."""
    found = []
    if isinstance(spec, dict):
        encoding = spec.get("encoding", {})
        for channel in ("x", "y"):
            title = encoding.get(channel, {}).get("title") if channel in encoding else None
            if isinstance(title, str):
                found.append(title)
        for key, value in spec.items():
            if key != "datasets":
                found.extend(axis_titles(value))
    elif isinstance(spec, list):
        for value in spec:
            found.extend(axis_titles(value))
    return found


# ---------------------------------------------------------------------------------------
# specs
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("system", ["SI", "IP"])
@pytest.mark.parametrize("name", CHARTS)
def test_chart_spec_validates_round_trips_and_stays_small(name, system):
    chart = build(name, frames_for(name, 0.25, system))
    spec = chart.to_dict(validate=True)
    # JSON round trip: the text parses back to the same spec, and Altair rebuilds an
    # equal chart from it
    assert json.loads(chart.to_json()) == spec
    rebuilt = type(chart).from_dict(spec)
    assert rebuilt.to_dict(validate=True) == spec
    # pre-aggregated: no chart carries the 8,760 hours
    assert 0 < data_rows(spec) <= 1000
    assert spec["config"]["font"] == palette.FONT
    assert spec["title"]["text"]


_UNITS = {
    "SI": {"power": "[kW]", "temperature": "[°C]", "humidity": "[g/kg]"},
    "IP": {"power": "[tons]", "temperature": "[°F]", "humidity": "[gr/lb]"},
}
_EXPECTED_TITLES = {
    "design": ["Load {power}"],
    "year": ["Zone load {power}", "Coil total load {power}"],
    "distribution": [
        "Load {power}",
        "Hours at or above load [h]",
        "Load band [% of design capacity]",
        "IPLV rating point [% load]",
    ],
    "load_duration": ["Load {power}", "Hours at or above load [h]"],
    "part_load": ["Hours in band [h]", "Load band [% of design capacity]"],
    "psychrometric": ["Dry-bulb temperature {temperature}", "Humidity ratio {humidity}"],
    "oa_sweep": ["Outdoor air fraction [%]", "Coil design load {power}"],
}


@pytest.mark.parametrize("system", ["SI", "IP"])
@pytest.mark.parametrize("name", CHARTS)
def test_axis_titles_carry_units_in_both_systems(name, system):
    spec = build(name, frames_for(name, 0.25, system)).to_dict()
    titles = axis_titles(spec)
    for expected in _EXPECTED_TITLES[name]:
        assert expected.format(**_UNITS[system]) in titles
    other = "IP" if system == "SI" else "SI"
    for unit in _UNITS[other].values():
        assert not any(unit in title for title in titles)
    # every axis title names its unit in brackets
    assert all(title.endswith("]") and "[" in title for title in titles)


# ---------------------------------------------------------------------------------------
# data follows the model
# ---------------------------------------------------------------------------------------
def _dataset(spec, name):
    return spec["datasets"][name]


def test_charts_update_when_the_outdoor_air_changes():
    low = {name: build(name, frames_for(name, 0.25, "SI")).to_dict() for name in CHARTS}
    high = {name: build(name, frames_for(name, 0.6, "SI")).to_dict() for name in CHARTS}
    for name in CHARTS:
        assert low[name]["datasets"] != high[name]["datasets"], name
    for fraction, specs in ((0.25, low), (0.6, high)):
        *_, year, design = study(fraction)
        # chart 1: the coil-load bar is the model's design coil load
        bars = {row["component"]: row for row in _dataset(specs["design"], "breakdown")}
        assert bars["Coil load"]["load"] == pytest.approx(design.loads["coil_total_kW"])
        # chart 2: every operating hour of the model is in the binned year
        hours = sum(row["hours"] for row in _dataset(specs["year"], "year"))
        assert hours == int(year["operating"].sum())
        # chart 3: each curve starts at the model's peak
        curves = _dataset(specs["distribution"], "curves")
        peak = next(r["load"] for r in curves if r["series"] == "Coil load")
        assert peak == pytest.approx(year["coil_total_kW"].max())
        # chart 4: the outdoor point is the design outdoor state
        process = {r["state"]: r for r in _dataset(specs["psychrometric"], "process")}
        assert process["outdoor"]["drybulb"] == pytest.approx(DESIGN_OUTDOOR[0])
        # chart 5: the marker sits at the current setting on the design-load line
        marker = _dataset(specs["oa_sweep"], "marker")
        assert [r["outdoor_air_percent"] for r in marker] == pytest.approx([100 * fraction] * 3)
    # more outdoor air at a hot, humid design hour: a larger design coil load
    coil = {
        key: next(
            r["load"]
            for r in _dataset(specs["design"], "breakdown")
            if r["component"] == "Coil load"
        )
        for key, specs in (("low", low), ("high", high))
    }
    assert coil["high"] > coil["low"]


def test_oa_sweep_chart_draws_the_models_design_points():
    weather, settings, zone, *_ = study(0.25)
    spec = build("oa_sweep", frames_for("oa_sweep", 0.25, "IP")).to_dict()
    rows = [r for r in _dataset(spec, "sweep") if r["series"] == "Coil total"]
    pressure = float(np.mean(weather.pressure))
    at_half = design_point(
        replace(settings, minimum_outdoor_air_fraction=0.5), zone, (*DESIGN_OUTDOOR, pressure)
    )
    row = next(r for r in rows if r["outdoor_air_percent"] == pytest.approx(50.0))
    assert row["load"] == pytest.approx(at_half.loads["coil_total_kW"] / KW_PER_TON)


def test_year_peak_sweep_frame_draws():
    weather, settings, zone, *_ = study(0.25)
    table = outdoor_air_sweep(settings, weather, zone, fractions=SWEEP_FRACTIONS)
    sweep = frames.oa_sweep_frame_from_sweep(table, "SI")
    spec = oa_sweep_chart(sweep, frames.oa_marker_frame(sweep, 0.25)).to_dict(validate=True)
    loads = [r["load"] for r in _dataset(spec, "sweep")]
    assert loads == pytest.approx(table["coil_total_peak_kW"].tolist())


# ---------------------------------------------------------------------------------------
# pinned A against current B
# ---------------------------------------------------------------------------------------
@pytest.mark.parametrize("name", CHARTS)
def test_every_chart_draws_both_scenarios(name):
    chart = build(name, combined(name, "SI"))
    spec = chart.to_dict(validate=True)
    assert data_rows(spec) <= 1000
    scenarios = {
        row.get("scenario")
        for rows in spec["datasets"].values()
        for row in rows
        if isinstance(row, dict)
    }
    assert {"A", "B"} <= scenarios
    text = json.dumps(spec)
    # A is told apart from B by the drawing (dash, opacity, offset, shape or its own panel)
    assert any(
        marker in text
        for marker in ('"strokeDash"', '"opacity"', '"xOffset"', '"yOffset"', '"A (pinned)"')
    )


# ---------------------------------------------------------------------------------------
# palette and theme
# ---------------------------------------------------------------------------------------
# Colour-vision-deficiency simulation matrices for linear RGB at severity 1.0, from
# G. M. Machado, M. M. Oliveira and L. A. F. Fernandes, "A Physiologically-based Model for
# Simulation of Color Vision Deficiency", IEEE TVCG 15(6), 2009 (values from memory).
_CVD = {
    "normal": np.eye(3),
    "protanopia": np.array(
        [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
         [-0.003882, -0.048116, 1.051998]]
    ),
    "deuteranopia": np.array(
        [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
         [-0.011820, 0.042940, 0.968881]]
    ),
    "tritanopia": np.array(
        [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602],
         [0.004733, 0.691367, 0.303900]]
    ),
}  # fmt: skip


def _linear_rgb(hex_colour: str) -> np.ndarray:
    """sRGB hex -> linear RGB (IEC 61966-2-1 transfer function)."""
    c = np.array([int(hex_colour[i : i + 2], 16) / 255 for i in (1, 3, 5)])
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def _lab(linear: np.ndarray) -> np.ndarray:
    """Linear RGB -> CIELAB (D65 white; sRGB primaries, IEC 61966-2-1; CIE 15:2004)."""
    xyz = np.array(
        [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
    ) @ np.clip(linear, 0, 1)
    t = xyz / np.array([0.95047, 1.0, 1.08883])
    f = np.where(t > (6 / 29) ** 3, np.cbrt(t), t / (3 * (6 / 29) ** 2) + 4 / 29)
    return np.array([116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])])


#: Smallest CIE76 colour difference we accept between colours that share a chart, under
#: each simulated vision: about 5 times a just-noticeable difference of 2.3 (common
#: practice, no source).
MIN_DELTA_E = 12.0


@pytest.mark.parametrize(
    "role",
    ["components", "modes", "categories", "series"],
)
def test_palette_roles_stay_apart_for_colour_blind_readers(role):
    colours = {
        "components": palette.COMPONENT_COLOURS,
        "modes": palette.MODE_COLOURS,
        "categories": {c: c for c in palette.CATEGORY_COLOURS},
        "series": {
            "coil": palette.COIL,
            "zone": palette.ZONE,
            "plant": palette.PLANT,
            "reference": palette.REFERENCE,
            "stage": palette.STAGE,
            "standard": palette.STANDARD,
        },
    }[role]
    for vision, matrix in _CVD.items():
        lab = {name: _lab(matrix @ _linear_rgb(c)) for name, c in colours.items()}
        for a, b in itertools.combinations(lab, 2):
            difference = float(np.linalg.norm(lab[a] - lab[b]))
            assert difference >= MIN_DELTA_E, (vision, a, b, difference)


def test_density_scheme_darkens_steadily():
    # a sequential scheme must read in order in grey too: CIE L* falls at every step
    lightness = [_lab(_linear_rgb(c))[0] for c in palette.DENSITY_SCHEME]
    assert np.all(np.diff(lightness) < -2.0)


def test_theme_is_registered_and_sized_for_a_projector():
    assert palette.THEME_NAME in alt.theme.names()
    config = palette.theme_config()["config"]
    assert config["axis"]["labelFontSize"] >= 14
    assert config["title"]["fontSize"] >= 20
    assert palette.mode_colours(["free_cooling", "new_mode"])["free_cooling"] == "#009E73"


# ---------------------------------------------------------------------------------------
# errors
# ---------------------------------------------------------------------------------------
def test_builders_name_bad_input():
    f = frames_for("distribution", 0.25, "SI")
    with pytest.raises(InputRangeError, match="measure"):
        part_load_chart(f["bins"], measure="tons")
    bare = f["curves"].copy()
    bare.attrs = {}
    with pytest.raises(InputRangeError, match="unit system"):
        load_duration_chart(bare)
    assert load_duration_chart(bare, system="SI").to_dict(validate=True)


# ---------------------------------------------------------------------------------------
# speed
# ---------------------------------------------------------------------------------------
def _best(function, repeat=7):
    best = np.inf
    for _ in range(repeat):
        start = time.perf_counter()
        result = function()
        best = min(best, time.perf_counter() - start)
    return best, result


@pytest.mark.benchmark
def test_benchmark_builders_against_a_raw_hourly_chart():
    """Frame + build + serialise each chart; baseline: a raw 8,760-point scatter."""
    *_, year, _ = study(0.25)
    raw = year[["zone_sensible_kW", "coil_total_kW"]]

    def baseline():
        chart = alt.Chart(raw).mark_point().encode(x="zone_sensible_kW:Q", y="coil_total_kW:Q")
        return chart.to_dict(validate=False)

    with alt.data_transformers.disable_max_rows():
        base, spec = _best(baseline)
    assert len(spec["datasets"][next(iter(spec["datasets"]))]) == len(year)
    print(f"\nbaseline: raw {len(year)}-hour scatter, build + to_dict {1e3 * base:.1f} ms")
    for name in CHARTS:
        f = frames_for(name, 0.25, "SI")
        build_time, chart = _best(lambda n=name, f=f: build(n, f))
        dict_time, spec = _best(lambda c=chart: c.to_dict(validate=False))
        size = len(json.dumps(spec))
        assert data_rows(spec) <= 1000
        print(
            f"{name:>14}: build {1e3 * build_time:5.1f} ms, to_dict {1e3 * dict_time:5.1f} ms "
            f"(build+to_dict / baseline {(build_time + dict_time) / base:4.2f}), "
            f"spec {size / 1024:5.1f} KiB, {data_rows(spec)} rows"
        )


# ---------------------------------------------------------------------------------------
# A and B together: labels legible, panels within the dashboard's chart column
# ---------------------------------------------------------------------------------------
def test_spread_labels_keep_order_and_one_line_apart():
    from plantside.charts.compare import spread_labels

    values = np.array([40.7, 39.6, 35.2, 36.0, 80.0])
    placed = spread_labels(values, 2.0)
    ordered = placed[np.argsort(values)]
    assert np.all(np.diff(ordered) >= 2.0 - 1e-9)
    assert placed[4] == pytest.approx(80.0)  # a label far from the others stays put
    assert np.max(np.abs(placed - values)) < 2.0


def _svg_width(chart) -> float:
    from plantside.charts.export import chart_bytes

    svg = chart_bytes(chart, "svg").decode()
    return float(re.search(r'<svg[^>]*\swidth="([\d.]+)', svg).group(1))


def test_pinned_year_chart_fits_the_dashboard_chart_column():
    # the dashboard's chart column at a 1600 px window is ~1,150 px wide (dashboard.css:
    # 1600 px less the 320 px control column and padding; common practice (no source))
    chart = build("year", combined("year", "IP"))
    assert _svg_width(chart) <= 1100
    spec = chart.to_dict()
    assert '"orient": "bottom"' in json.dumps(spec)


@pytest.mark.parametrize("system", ["SI", "IP"])
def test_marker_labels_of_a_and_b_do_not_overlap(system):
    chart = build("oa_sweep", combined("oa_sweep", system))
    spec = chart.to_dict()
    rows = _dataset(spec, "marker")
    top = next(
        layer["encoding"]["y"]["scale"]["domain"][1]
        for layer in spec["layer"]
        if "y" in layer.get("encoding", {}) and "scale" in layer["encoding"]["y"]
    )
    pixels = 400 / top  # the chart is 400 px high on a fixed zero-based domain
    for side in ("left", "right"):
        places = sorted(r["label_load"] for r in rows if r["label_side"] == side)
        assert np.all(np.diff(places) * pixels >= 18.9), (side, places)
    # A and B are labelled on opposite sides of their markers
    assert {r["label_side"] for r in rows} == {"left", "right"}


def test_plant_capacity_labels_of_a_and_b_do_not_overlap():
    f = combined("distribution", "IP")
    lines = f["lines"].copy()
    # B's plant 1 % above A's: the two labels would print over each other
    a = lines[(lines["scenario"] == "A") & (lines["kind"] == "capacity")]["load"].iloc[0]
    lines.loc[(lines["scenario"] == "B") & (lines["kind"] == "capacity"), "load"] = 1.01 * a
    f["lines"] = lines
    chart = build("distribution", f)
    spec = chart.to_dict()
    rows = _dataset(spec, "lines")
    text = json.dumps(spec)
    top = float(
        re.search(
            r'"domain": \[0(?:\.0)?, ([\d.]+)\], "nice": false\}, "title": "Load', text
        ).group(1)
    )
    # each label's box in pixels (the curves panel is 360 px high on a zero-based domain;
    # a label 14 px type, 18 px with its spacing): above its line, or below it
    px = 360 / top
    boxes = [
        (r["label_load"] * px - 18, r["label_load"] * px)
        if r["label_below"]
        else (r["label_load"] * px, r["label_load"] * px + 18)
        for r in rows
    ]
    for i, (low, high) in enumerate(boxes):
        for other_low, other_high in boxes[i + 1 :]:  # no label over another
            assert high <= other_low + 1e-6 or other_high <= low + 1e-6, boxes
        for r in rows:  # no line through a label (its own line at its edge is fine)
            assert not low + 1e-6 < r["load"] * px < high - 1e-6, (r["line"], boxes[i])
    capacity = [r for r in rows if r["kind"] == "capacity"]
    assert {r["label_below"] for r in capacity} == {True, False}  # one above, one below
    assert all(r["label_load"] == r["load"] for r in capacity)  # each beside its own line


def test_process_labels_near_the_right_edge_sit_west_of_their_point():
    # A label drawn east of a point in the right 15 % of the axis would be cut off.
    import pandas as pd
    from plantside.charts.psychrometric import _with_label_positions

    process = pd.DataFrame({"state": ["outdoor", "return", "mixed"], "drybulb": [44.0, 24.0, 30.0]})
    placed = _with_label_positions(process, (-15.0, 45.0))
    assert list(placed["label_position"]) == ["nw", "se", "nw"]
    assert list(_with_label_positions(process)["label_position"]) == ["ne", "se", "nw"]
