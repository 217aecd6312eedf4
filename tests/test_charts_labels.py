"""Chart labels and colours a reader relies on: heating on the year chart, A and B swatches.

References: the chart layer's own colour roles (``charts/palette.py``: orange means zone
load, the coil blue coil load) and the sign convention of the hourly results
(``DEVELOPERS.md`` glossary: loads cooling positive, so a zone load below 0 is heating).
"""

from __future__ import annotations

import json

import pytest
from plantside.charts import palette
from test_charts import build, combined, frames_for


def _layers(spec):
    for key in ("layer", "hconcat", "vconcat"):
        for part in spec.get(key, []):
            yield part
            yield from _layers(part)


def _points_layer(spec):
    return next(
        layer
        for layer in _layers(spec)
        if isinstance(layer.get("mark"), dict) and layer["mark"]["type"] == "circle"
    )


def test_year_chart_shows_heating_as_a_positive_labelled_load():
    frame = frames_for("year", 0.25, "IP")["frame"]
    assert (frame["zone_low"] < 0).any(), "the study must have heating hours for this test"
    spec = build("year", {"frame": frame}).to_dict()
    points = _points_layer(spec)
    x_axis = points["encoding"]["x"]["axis"]
    # tick labels drop the sign: a heating load of 10 tons reads "10", left of 0
    assert "abs(datum.value)" in x_axis["labelExpr"]
    assert any(v < 0 for v in x_axis["values"])
    # the two sides of zero are named on the plot
    words = {
        row["t"]
        for layer in _layers(spec)
        for row in (layer.get("data") or {}).get("values", [])
        if isinstance(row, dict) and "t" in row
    }
    assert {"heating", "cooling"} <= words
    # the tooltip says which load a cell is and gives it as a positive number
    tooltip = {t["field"]: t for t in points["encoding"]["tooltip"]}
    assert "zone_side" in tooltip and "zone_from" in tooltip and "zone_to" in tooltip
    calculate = json.dumps(points.get("transform", []))
    assert "Zone heating load" in calculate and "abs(datum.zone_low)" in calculate


def test_year_chart_without_heating_keeps_plain_labels():
    frame = frames_for("year", 0.25, "SI")["frame"]
    cooling = frame[frame["zone_low"] >= 0].copy()
    cooling.attrs = dict(frame.attrs)
    spec = build("year", {"frame": cooling}).to_dict()
    assert "labelExpr" not in _points_layer(spec)["encoding"]["x"]["axis"]


def test_waterfall_a_and_b_swatches_are_the_documented_scenario_colour():
    spec = build("design", combined("design", "SI")).to_dict()
    bars = next(
        layer
        for layer in _layers(spec)
        if layer.get("mark", {}).get("type") == "bar" and "opacity" in layer["encoding"]
    )
    legend = bars["encoding"]["opacity"]["legend"]
    # A light and B strong in the coil blue, outlined like the bars: never grey and black,
    # never orange (orange is the zone load's colour in every chart)
    assert legend["symbolFillColor"] == palette.SCENARIO_SWATCH == palette.COIL
    assert legend["symbolStrokeColor"] == palette.OUTLINE
    assert palette.SCENARIO_SWATCH != palette.ZONE
    opacity = bars["encoding"]["opacity"]["scale"]["range"]
    assert opacity[0] < opacity[1]  # A lighter than B
    # the A/B legend of the part-load histogram shares the swatch
    distribution = build("distribution", combined("distribution", "SI")).to_dict()
    text = json.dumps(distribution)
    assert f'"symbolFillColor": "{palette.SCENARIO_SWATCH}"' in text


def test_no_chart_line_is_drawn_in_sky_blue_or_the_light_orange():
    # both are under 3:1 on white (tests/test_palette_contrast.py): kept only as fills
    # of outlined marks
    for name in ("distribution", "oa_sweep"):
        text = json.dumps(build(name, frames_for(name, 0.25, "SI")).to_dict()).upper()
        assert "#56B4E9" not in text and "#E69F00" not in text, name


def test_design_condition_lines_are_not_drawn_in_the_plant_black():
    from plantside.charts import frames, oa_sweep_chart

    fractions = [0.0, 0.5, 1.0]
    names = ["Dry-bulb condition, 0.4 %", "Dew-point condition, 0.4 %", "Enthalpy condition, 0.4 %"]
    sweep = frames.oa_sweep_frame(
        fractions, {name: [10.0 + i, 20.0 + i, 30.0 + i] for i, name in enumerate(names)}, "SI"
    )
    spec = oa_sweep_chart(sweep).to_dict()
    colours = [
        c.lower()
        for layer in _layers(spec)
        for c in layer.get("encoding", {}).get("color", {}).get("scale", {}).get("range", [])
    ]
    assert len(set(colours)) == 3
    # black (or the ink) means the plant load in every chart; orange zone load, blue coil load
    for taken in ("#000000", palette.PLANT, palette.ZONE, palette.COIL):
        assert taken.lower() not in colours


def test_every_chart_describes_itself_for_a_screen_reader():
    # Vega writes a spec's description as the drawing's aria-label (WCAG 2.1 SC 1.1.1)
    for name in ("design", "year", "distribution", "psychrometric", "oa_sweep"):
        spec = build(name, frames_for(name, 0.25, "SI")).to_dict()
        title = spec["title"]["text"]
        title = " ".join(title) if isinstance(title, list) else title
        assert spec["description"].startswith(title.split(" ")[0]), name
        assert len(spec["description"]) > len(title) * 0.8, name


@pytest.mark.parametrize(("system", "unit"), [("IP", "gr/lb"), ("SI", "g/kg")])
def test_the_dehumidification_condition_names_its_humidity_ratio(system, unit):
    import contextlib
    import io
    from pathlib import Path

    from plantside.charts.labels import condition_text
    from plantside.cli.main import main
    from plantside.climate.design_conditions import DesignCondition

    # 20 °C dew point, 0.0150 kg/kg = 105.0 gr/lb = 15.0 g/kg (1 lb = 7000 gr, NIST SP 811)
    condition = DesignCondition(
        kind="dehumidification",
        percent=0.4,
        drybulb=35.0,
        wet_bulb=25.0,
        dew_point=20.0,
        humidity_ratio=0.0150,
        enthalpy=73.6,
        pressure=101325.0,
        label="",
    )
    shown = condition_text(condition, system)
    assert ("105.0 gr/lb" if system == "IP" else "15.0 g/kg") in shown
    # the command line says it too (one function words a condition everywhere)
    scenarios = Path(__file__).resolve().parents[1] / "example_data" / "scenarios"
    example = "quillon_clinic.toml" if system == "IP" else "linden_office_si.toml"
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(["design", str(scenarios / example)]) == 0
    line = next(x for x in out.getvalue().splitlines() if "condition dehumidification" in x)
    assert f" {unit} / " in line
