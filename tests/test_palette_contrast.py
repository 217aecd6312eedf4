"""Chart and page colours pass WCAG 2.1 AA contrast against their background.

Reference: W3C, "Web Content Accessibility Guidelines (WCAG) 2.1", Recommendation 2018,
definitions "relative luminance" (sRGB channels linearised: c/12.92 at or below 0.03928,
else ((c + 0.055)/1.055)^2.4; L = 0.2126 R + 0.7152 G + 0.0722 B) and "contrast ratio"
((L1 + 0.05)/(L2 + 0.05), L1 the lighter). Thresholds: SC 1.4.3 Contrast (Minimum), 4.5:1
for text of normal size; SC 1.4.11 Non-text Contrast, 3:1 for graphical objects (lines,
points, the borders of filled marks). A light fill passes when its mark has a border of
3:1 (W3C Techniques for WCAG 2.1, G209). The ratios are threshold values, never rounded
(Understanding SC 1.4.11).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from plantside.charts import palette
from test_charts import CHARTS, build, combined, frames_for

TEXT = 4.5  # WCAG 2.1 SC 1.4.3, normal-size text
GRAPHICS = 3.0  # WCAG 2.1 SC 1.4.11
CSS = Path(__file__).resolve().parents[1] / "core" / "plantside" / "dashboard" / "dashboard.css"


def _channel(value: float) -> float:
    # WCAG 2.1 "relative luminance": the sRGB transfer function, as the definition writes it
    return value / 12.92 if value <= 0.03928 else ((value + 0.055) / 1.055) ** 2.4


def relative_luminance(colour: str) -> float:
    """Relative luminance of ``#rrggbb`` (or ``#rgb``), WCAG 2.1 definition."""
    text = colour.strip().lstrip("#")
    if len(text) == 3:
        text = "".join(c * 2 for c in text)
    r, g, b = (_channel(int(text[i : i + 2], 16) / 255) for i in (0, 2, 4))
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast_ratio(a: str, b: str) -> float:
    """WCAG 2.1 contrast ratio of two colours, 1 to 21."""
    high, low = sorted((relative_luminance(a), relative_luminance(b)), reverse=True)
    return (high + 0.05) / (low + 0.05)


def test_the_formula_gives_the_definitions_end_points():
    # WCAG 2.1: ratios range from 1:1 (same colour) to 21:1 (black on white)
    assert contrast_ratio("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast_ratio("#777777", "#777777") == pytest.approx(1.0)
    # the order of the two colours does not matter
    assert contrast_ratio("#ffffff", "#0072b2") == contrast_ratio("#0072b2", "#ffffff")


# ------------------------------------------------------------------ palette roles
#: Colours the charts write text in.
_TEXT_ROLES = {
    "INK": palette.INK,
    "INK_SOFT": palette.INK_SOFT,
    "REFERENCE": palette.REFERENCE,  # the plant-capacity label
    "STAGE": palette.STAGE,  # the stage-capacity labels
    "PLANT": palette.PLANT,
}
#: Colours drawn as lines, rules, points or outlines (no border of their own).
_LINE_ROLES = {
    "COIL": palette.COIL,
    "ZONE": palette.ZONE,
    "PLANT": palette.PLANT,
    "PROCESS": palette.PROCESS,
    "REFERENCE": palette.REFERENCE,
    "STAGE": palette.STAGE,
    "STANDARD": palette.STANDARD,
    "OUTLINE": palette.OUTLINE,
    **{f"CATEGORY_COLOURS[{i}]": c for i, c in enumerate(palette.CATEGORY_COLOURS)},
}


@pytest.mark.parametrize("role", sorted(_TEXT_ROLES))
def test_text_colours_reach_4_5_to_1(role):
    ratio = contrast_ratio(_TEXT_ROLES[role], palette.BACKGROUND)
    assert ratio >= TEXT, (role, _TEXT_ROLES[role], round(ratio, 2))


@pytest.mark.parametrize("role", sorted(_LINE_ROLES))
def test_line_and_point_colours_reach_3_to_1(role):
    ratio = contrast_ratio(_LINE_ROLES[role], palette.BACKGROUND)
    assert ratio >= GRAPHICS, (role, _LINE_ROLES[role], round(ratio, 2))


def test_light_fills_are_drawn_with_a_3_to_1_outline():
    # component bars and economizer-mode circles may be light (Tol's and Okabe-Ito's light
    # hues keep them apart for colour-blind readers); their marks carry palette.OUTLINE
    light = {
        name: colour
        for name, colour in {**palette.COMPONENT_COLOURS, **palette.MODE_COLOURS}.items()
        if contrast_ratio(colour, palette.BACKGROUND) < GRAPHICS
    }
    assert light, "nothing light left: this test would check nothing"
    bar = palette.theme_config()["config"]["bar"]
    assert bar["stroke"] == palette.OUTLINE and bar["strokeWidth"] > 0
    assert contrast_ratio(palette.OUTLINE, palette.BACKGROUND) >= GRAPHICS


# ------------------------------------------------------------------ the charts' specs
def _marks(spec):
    """Every (mark type, mark properties, encoding) in a Vega-Lite spec."""
    if isinstance(spec, dict):
        if "mark" in spec:
            mark = spec["mark"]
            mark = mark if isinstance(mark, dict) else {"type": mark}
            yield mark["type"], mark, spec.get("encoding", {})
        for key in ("layer", "hconcat", "vconcat", "concat"):
            for part in spec.get(key, []):
                yield from _marks(part)


@pytest.mark.parametrize("variant", ["SI", "IP", "A-B"])
@pytest.mark.parametrize("name", CHARTS)
def test_chart_marks_reach_their_contrast(name, variant):
    frames = combined(name, "SI") if variant == "A-B" else frames_for(name, 0.25, variant)
    spec = build(name, frames).to_dict()
    case = f"{name}-{variant}"
    theme_bar = spec["config"].get("bar", {})
    checked = 0
    for kind, mark, encoding in _marks(spec):
        colour = mark.get("color") or mark.get("fill")
        if kind == "text" and isinstance(colour, str):
            assert contrast_ratio(colour, palette.BACKGROUND) >= TEXT, (case, mark)
            checked += 1
        if kind in ("line", "rule") and isinstance(colour, str):
            assert contrast_ratio(colour, palette.BACKGROUND) >= GRAPHICS, (case, mark)
            checked += 1
        scale = encoding.get("color", {}).get("scale", {})
        for value in scale.get("range", []) if isinstance(scale.get("range"), list) else []:
            if kind in ("line", "rule", "point", "text"):
                assert contrast_ratio(value, palette.BACKGROUND) >= GRAPHICS, (case, kind, value)
            elif kind == "bar":
                # a light bar is outlined by the theme (or by its own stroke)
                stroke = mark.get("stroke", theme_bar.get("stroke"))
                if contrast_ratio(value, palette.BACKGROUND) < GRAPHICS:
                    assert contrast_ratio(stroke, palette.BACKGROUND) >= GRAPHICS, (case, value)
            elif kind == "circle":
                if contrast_ratio(value, palette.BACKGROUND) < GRAPHICS:
                    assert mark.get("stroke") == palette.OUTLINE, (case, value)
                    assert mark.get("strokeOpacity", 1) >= 0.9, (case, mark)
            checked += 1
    assert checked, case


def _over_white(colour: str, opacity: float) -> str:
    """``colour`` drawn at ``opacity`` on white (source-over compositing), as #rrggbb."""
    rgb = [int(colour[i : i + 2], 16) for i in (1, 3, 5)]
    return "#" + "".join(f"{round(255 - opacity * (255 - c)):02x}" for c in rgb)


@pytest.mark.parametrize("name", ["design", "distribution"])
def test_pinned_a_bars_keep_a_3_to_1_outline(name):
    # A's bars are drawn lighter (opacity); the whole mark fades, outline included
    spec = build(name, combined(name, "SI")).to_dict()
    stroke = spec["config"]["bar"]["stroke"]
    found = 0
    for kind, mark, encoding in _marks(spec):
        if kind == "bar" and "opacity" in encoding:
            lowest = min(encoding["opacity"]["scale"]["range"])
            outline = _over_white(mark.get("stroke", stroke), lowest)
            assert contrast_ratio(outline, palette.BACKGROUND) >= GRAPHICS, (name, lowest)
            found += 1
    assert found


# ------------------------------------------------------------------ the page's style sheet
def _css_variables() -> dict[str, str]:
    return dict(re.findall(r"(--ps-[\w-]+):\s*(#[0-9a-fA-F]{3,6})", CSS.read_text()))


def test_page_text_colours_reach_4_5_to_1():
    v = _css_variables()
    css = CSS.read_text()
    message_background = re.search(r"\.plantside-message \{[^}]*background: (#[0-9a-f]{6})", css)
    header_sub = re.search(r"\.plantside-header \.ps-sub \{[^}]*color: (#[0-9a-f]{6})", css)
    help_colour = re.search(r"\.plantside-help \{[^}]*color: var\((--ps-[\w-]+)\)", css)
    assert message_background and header_sub and help_colour
    pairs = {
        "ink on white": (v["--ps-ink"], "#ffffff"),
        "ink on panel": (v["--ps-ink"], v["--ps-panel"]),
        "soft ink on white": (v["--ps-ink-soft"], "#ffffff"),
        "soft ink on panel": (v["--ps-ink-soft"], v["--ps-panel"]),
        "help line on panel": (v[help_colour.group(1)], v["--ps-panel"]),
        "warning on message": (v["--ps-warn"], message_background.group(1)),
        "header on band": ("#ffffff", v["--ps-band"]),
        "header subtitle on band": (header_sub.group(1), v["--ps-band"]),
    }
    for name, (ink, ground) in pairs.items():
        assert contrast_ratio(ink, ground) >= TEXT, (name, ink, ground)


def test_page_and_charts_share_the_role_colours():
    # a zone-load card on the page is the zone load's colour in the charts
    v = {name: colour.lower() for name, colour in _css_variables().items()}
    assert v["--ps-zone"] == palette.ZONE.lower()
    assert v["--ps-accent"] == palette.COIL.lower()
    assert v["--ps-warn"] == palette.REFERENCE.lower()
