"""The chart layer's colours, roles and theme.

Every colour a chart uses is named here by the role it plays, so the same
quantity looks the same in every chart (coil load is always one blue, zone
load always one orange) and a reader who has learnt one chart can read the
next.

Sources of the colours
----------------------
The hues are taken from two open, published colour-blind-safe sets; the
choice of colours and the roles are our own.

[1] M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures
    and presentations that are friendly to colorblind people", J*FLY, 2008
    (the eight-colour set: black, orange, sky blue, bluish green, yellow,
    blue, vermillion, reddish purple).
[2] P. Tol, "Colour Schemes", SRON technical note SRON/EPS/TN/09-002,
    issue 3.2, 2021 (the "muted" qualitative set and the "iridescent"
    sequential scheme). Hex values from memory, checked for colour-blind
    separation and ordered lightness in ``tests/test_charts.py``.

Contrast (WCAG 2.1 AA)
----------------------
Colours are checked against :data:`BACKGROUND` with the relative luminance and
contrast ratio of WCAG 2.1 [3] (``tests/test_palette_contrast.py``): text at
least 4.5:1 (SC 1.4.3), lines, rules and points at least 3:1 (SC 1.4.11).
Filled marks whose colour is lighter than that (bars, circles) carry an
:data:`OUTLINE` of at least 3:1, the border of WCAG Technique G209 [4]. Two
hues were darkened for this, keeping their hue: the zone orange and the
vermillion of the plant capacity and the design process (which then also reads
as text). The density scheme is the one exception: its lightest steps mean
"few hours" and are meant to recede; the legend and the tooltips give the
counts.

[3] W3C, "Web Content Accessibility Guidelines (WCAG) 2.1", Recommendation,
    2018: definitions "relative luminance" and "contrast ratio"; SC 1.4.3
    Contrast (Minimum), SC 1.4.11 Non-text Contrast.
[4] W3C, "Techniques for WCAG 2.1", G209: Provide sufficient contrast at the
    boundaries between adjoining colors.

Theme
-----
:data:`THEME_NAME` is registered with Altair (``alt.theme.enable("plantside")``
applies it to charts made elsewhere), but the builders do not rely on a global
switch: :func:`themed` writes the same configuration into each chart, so a
chart renders identically in the dashboard, in a notebook and through
vl-convert. Type is sized for a meeting-room projector: 15 px tick labels,
17 px axis titles, 22 px chart titles, a default plot of 760 x 400 px.
"""

from __future__ import annotations

import functools
import textwrap

import altair as alt

from plantside.charts.altair_internals import debug_mode
from plantside.charts.frames import records
from plantside.errors import InputRangeError

__all__ = [
    "BACKGROUND",
    "CATEGORY_COLOURS",
    "COIL",
    "COMPONENT_COLOURS",
    "DENSITY_SCHEME",
    "FONT",
    "GRID",
    "HEIGHT",
    "INK",
    "INK_SOFT",
    "MAX_WIDTH",
    "MIN_WIDTH",
    "MODE_COLOURS",
    "OUTLINE",
    "PLANT",
    "PROCESS",
    "REFERENCE",
    "SCENARIO_SWATCH",
    "STAGE",
    "STANDARD",
    "THEME_NAME",
    "WIDTH",
    "ZONE",
    "chart_builder",
    "concatenated",
    "layered",
    "mode_colours",
    "plot_width",
    "theme_config",
    "themed",
]

# --- neutral roles ------------------------------------------------------------------------
#: Text, axes and the saturation curve: a dark blue-grey, softer than black on a projector.
INK = "#1d2733"
#: Secondary text (subtitles, stamps, RH and enthalpy line labels).
INK_SOFT = "#5b6673"
#: Grid lines and the psychrometric chart's RH/enthalpy lines.
GRID = "#d5dae0"
#: Chart background (white prints and projects best).
BACKGROUND = "#ffffff"
#: Border of filled marks (bars, circles) whose fill is lighter than 3:1 on the background
#: (WCAG Technique G209 [4]): the ink, 15:1 on white, 3.8:1 still on pinned A's bars drawn
#: at 0.55 opacity (``compare.py``).
OUTLINE = INK

# --- series roles (Okabe-Ito [1]) ----------------------------------------------------------
#: Coil load, wherever it appears (Okabe-Ito blue).
COIL = "#0072B2"
#: Zone load, wherever it appears: Okabe-Ito orange (#E69F00, 2.2:1 on white) darkened in
#: linear RGB, hue kept, to 3.1:1 so a zone-load line reads on white (SC 1.4.11 [3]).
ZONE = "#C38600"
#: Plant (coincident) load (Okabe-Ito black, drawn as INK).
PLANT = INK
#: Plant capacity and the current-setting marker: Okabe-Ito vermillion (#D55E00, 3.9:1)
#: darkened to 5.5:1, so its labels read as text (SC 1.4.3 [3]) and it stays apart from the
#: darkened zone orange for colour-blind readers. The dashboard's warning colour too.
REFERENCE = "#B34700"
#: The design process on the psychrometric chart (the same vermillion).
PROCESS = REFERENCE
#: Stage (machine) capacity lines: a mid grey.
STAGE = "#6b747e"
#: AHRI 550/590 rating weights beside the building's own (Okabe-Ito reddish purple).
STANDARD = "#CC79A7"

# --- design breakdown components (Tol muted [2]) ------------------------------------------
#: One colour per component of the design coil load. Sensible parts are the darker of
#: each pair and latent parts the lighter, so the pairs read together in grey too.
COMPONENT_COLOURS = {
    "Zone sensible": "#882255",  # wine
    "Zone latent": "#CC6677",  # rose
    "Ventilation sensible": "#117733",  # green
    "Ventilation latent": "#44AA99",  # teal
    "Fan heat": "#DDCC77",  # sand
    "Economizer / recovery": "#88CCEE",  # cyan: a load taken away
    "Terminal reheat": "#332288",  # indigo
    "Dehumidification reheat": "#663333",  # dark red (Tol dark): reheat after the coil
    "Preheat and heating coil": "#777722",  # olive, darkened: apart from the zone orange
    "Condensate heat": "#DDDDDD",  # pale grey: a small correction
    "Distribution gain": "#661100",  # dark brown (Tol dark): pumps and pipes, plant view
    "Morning pick-up": "#004488",  # dark blue (Tol high-contrast): pull-down allowance
    "Zone load": ZONE,
    "Coil load": COIL,
    "Plant load": PLANT,  # plant view: the coils plus the distribution gain and pick-up
}

# --- economizer modes (Okabe-Ito [1]) -----------------------------------------------------
#: Colour of each economizer mode of :data:`plantside.air.economizer.ECONOMIZER_MODES`, fixed
#: so a mode keeps its colour from chart to chart and from scenario A to B. Okabe-Ito's
#: yellow is left out (too light on white for a projector); "off" is grey.
MODE_COLOURS = {
    "off": "#3a3f45",
    "minimum_outdoor_air": "#0072B2",  # blue
    "free_cooling": "#009E73",  # bluish green
    "integrated": "#56B4E9",  # sky blue
    "locked_out": REFERENCE,  # vermillion (darkened)
    "heating": "#CC79A7",  # reddish purple
    "all_outdoor_air": ZONE,  # orange (darkened)
}

#: Colours for categories with no fixed role (Okabe-Ito order). Yellow and sky blue are left
#: out: below 3:1 on white, and sky blue darkened to 3:1 meets the bluish green for
#: tritanopes. Each is at least 3:1 on white, so they serve for lines.
CATEGORY_COLOURS = (
    "#0072B2",
    ZONE,
    "#009E73",
    "#CC79A7",
    REFERENCE,
    "#000000",
)

#: Fill of the legend swatches of pinned "A" and current "B" where scenarios differ only
#: by opacity (A 0.55, B 0.95: ``charts/compare.py``): the coil blue, as the building's own
#: A and B bars of the IPLV weights draw them, never orange (orange means zone load).
SCENARIO_SWATCH = COIL

# --- density (Tol iridescent [2], every other step of 23 from the second) ------------------
#: Sequential colours for hour counts (binned density), light = few hours, dark = many.
DENSITY_SCHEME = (
    "#FCF7D5",
    "#EAF0B5",
    "#D0E7CA",
    "#B5DDD8",
    "#9BD2E1",
    "#81C4E7",
    "#7EB2E4",
    "#9398D2",
    "#9D7DB2",
    "#906388",
    "#684957",
)

#: Font stack: the first that the renderer has wins. Liberation Sans and DejaVu Sans ship
#: with most Linux systems, so vl-convert finds one; browsers fall through to their sans-serif.
FONT = "Liberation Sans, DejaVu Sans, Helvetica, Arial, sans-serif"

#: Name under which the theme is registered with Altair.
THEME_NAME = "plantside"

#: Default plot size [px]; at export scale 2 the image is wider than 1,600 px.
WIDTH = 760
HEIGHT = 400
#: Space around the chart [px].
_PADDING = 16
#: Narrowest and widest plot a builder draws [px] (a 1024 px page leaves ~300 px of plot
#: beside the controls; a 1920 px page ~1,300).
MIN_WIDTH = 240
MAX_WIDTH = 1600


def plot_width(width: int | float | None, default: int = WIDTH) -> int:
    """The plot width a builder draws [px]: ``width`` within MIN_WIDTH..MAX_WIDTH, or
    ``default`` when None (the exports' fixed width)."""
    if width is None:
        return int(default)
    if not MIN_WIDTH <= float(width) <= MAX_WIDTH:
        raise InputRangeError(
            "width",
            f"chart width = {width} px; allowed {MIN_WIDTH} to {MAX_WIDTH} px",
            f"{MIN_WIDTH} to {MAX_WIDTH} px",
        )
    return int(width)


def mode_colours(modes) -> dict[str, str]:
    """Colour of each economizer mode (fixed roles; unknown modes take spare colours).

    Parameters
    ----------
    modes : iterable of str
        Mode names (:data:`plantside.air.economizer.ECONOMIZER_MODES` values).

    Returns
    -------
    dict
        Mode name -> hex colour.
    """
    colours = {}
    spare = iter(CATEGORY_COLOURS * 4)
    for mode in modes:
        colours[mode] = MODE_COLOURS.get(mode) or next(spare)
    return colours


def theme_config() -> dict:
    """The plantside chart theme as a Vega-Lite top-level dict (``config`` and friends)."""
    axis = {
        "labelFontSize": 15,
        "titleFontSize": 17,
        "titleFontWeight": "normal",
        "labelColor": INK,
        "titleColor": INK,
        "domainColor": INK_SOFT,
        "tickColor": INK_SOFT,
        "gridColor": GRID,
        "gridWidth": 0.8,
        "titlePadding": 10,
        "labelPadding": 4,
    }
    return {
        "background": BACKGROUND,
        "padding": _PADDING,
        "config": {
            "font": FONT,
            "view": {"continuousWidth": WIDTH, "continuousHeight": HEIGHT, "stroke": None},
            "axis": axis,
            "axisBand": {"grid": False},
            "legend": {
                "labelFontSize": 15,
                "titleFontSize": 15,
                "titleFontWeight": "bold",
                "labelColor": INK,
                "titleColor": INK,
                "symbolSize": 160,
                "labelLimit": 320,
                "orient": "right",
            },
            "header": {
                "labelFontSize": 17,
                "titleFontSize": 17,
                "labelColor": INK,
                "titleColor": INK,
            },
            "title": {
                "fontSize": 22,
                "fontWeight": "bold",
                "color": INK,
                "subtitleFontSize": 15,
                "subtitleColor": INK_SOFT,
                "anchor": "start",
                "offset": 14,
            },
            "text": {"fontSize": 14, "color": INK},
            "line": {"strokeWidth": 3},
            "rule": {"strokeWidth": 2},
            "point": {"size": 90, "filled": True},
            # an outline on every bar, so a light fill still has a 3:1 border (G209 [4])
            "bar": {"stroke": OUTLINE, "strokeWidth": 0.8},
            "range": {"category": list(CATEGORY_COLOURS), "ramp": list(DENSITY_SCHEME)},
            "concat": {"spacing": _CONCAT_SPACING},
        },
    }


@alt.theme.register(THEME_NAME, enable=False)
def _plantside_theme() -> alt.theme.ThemeConfig:
    return alt.theme.ThemeConfig(**theme_config())


#: Width of an average character as a share of the font size [-] (Liberation Sans: text
#: 0.5-0.55, bold 0.56-0.6; rounded up, so a wrapped line is never wider than its span).
_CHARACTER_WIDTH = 0.56
_BOLD_CHARACTER_WIDTH = 0.62
#: Room a title may use besides the plot's width [px]: the y axis and part of a legend.
_TITLE_MARGIN = 180
#: Space between concatenated panels [px] (the theme's ``concat.spacing``).
_CONCAT_SPACING = 40


def _plots_width(chart) -> float | None:
    """Width of a chart's plots [px]: side by side they add up (with the concat spacing),
    stacked the widest counts; None when a plot's width is not a number."""
    width = getattr(chart, "width", None)
    if isinstance(width, int | float):
        return float(width)
    for attribute, combine in (("hconcat", sum), ("vconcat", max)):
        parts = getattr(chart, attribute, None)
        if isinstance(parts, list) and parts:
            widths = [_plots_width(part) for part in parts]
            if any(w is None for w in widths):
                return None
            spacing = _CONCAT_SPACING * (len(parts) - 1) if attribute == "hconcat" else 0
            return combine(widths) + spacing
    return None


def _title_span(chart) -> float | None:
    """Width a title may take [px]: the plots' and a y axis' (None: not known)."""
    width = _plots_width(chart)
    return None if width is None else width + _TITLE_MARGIN


def _as_lines(text: str | list[str]) -> list[str]:
    return [text] if isinstance(text, str) else text


def _wrapped(text: str, span: float | None, character_px: float) -> str | list[str]:
    """``text`` as lines no wider than ``span`` [px], or unchanged when it fits."""
    if span is None or len(text) * character_px <= span:
        return text
    return textwrap.wrap(text, max(12, int(span // character_px))) or text


def themed(
    chart,
    *,
    title: str,
    subtitle: str | list[str] | None = None,
    datasets: dict | None = None,
):
    """Give a finished chart its title and the plantside theme, as a top-level chart.

    Parameters
    ----------
    chart : altair.Chart, LayerChart, HConcatChart or VConcatChart
        The chart, not yet configured.
    title : str
        Chart title in the trade's words.
    subtitle : str or list of str, optional
        One or more subtitle lines (e.g. what the reader should look for).
    datasets : dict of str to pandas.DataFrame, optional
        Frames the chart refers to by name (``alt.NamedData(name)``); their
        rows become the spec's top-level ``datasets``. Attaching data here,
        after the layers and panels are composed, keeps Altair from copying
        and re-sanitising it at every step.

    Returns
    -------
    altair chart
        ``chart`` itself, with title, description (title and subtitle, the text a
        screen reader reads for the drawing), background, padding and config set.
        It can no longer be layered or concatenated (Altair's rule for
        configured charts), so build compositions before calling this.
    """
    span = _title_span(chart)
    params = {"text": _wrapped(title, span, 22 * _BOLD_CHARACTER_WIDTH), "anchor": "start"}
    if subtitle:
        lines = [subtitle] if isinstance(subtitle, str) else list(subtitle)
        params["subtitle"] = [
            part
            for line in lines
            for part in _as_lines(_wrapped(line, span, 15 * _CHARACTER_WIDTH))
        ]
        if isinstance(subtitle, str) and len(params["subtitle"]) == 1:
            params["subtitle"] = subtitle
    # Set the top-level properties on the chart itself: ``chart.properties()`` and
    # ``chart.copy()`` would validate the config or deep-copy every panel (tens of
    # milliseconds each). Builders pass a chart they have just composed, so nothing
    # else holds it; the complete spec is validated in the tests.
    finished = chart
    finished.title = alt.TitleParams(**params)
    # what a screen reader says for the drawing (Vega sets it as the chart's aria-label)
    finished.description = ". ".join([title, *(_as_lines(subtitle) if subtitle else [])])
    finished.background = BACKGROUND
    finished.padding = _PADDING
    finished.config = _config()
    if datasets:
        finished.datasets = {name: records(frame) for name, frame in datasets.items()}
    return finished


def chart_builder(function):
    """Decorator for the public chart builders: build without per-object validation.

    Altair validates many schema objects as they are created (its debug mode),
    which costs about a third of a millisecond per scale, axis or legend and
    dominates a builder's time. Builders run with it switched off; every
    builder's complete spec is validated once in ``tests/test_charts.py``
    (``chart.to_dict(validate=True)``), which is where a schema error would show.
    """

    @functools.wraps(function)
    def build(*args, **kwargs):
        with debug_mode(False):
            return function(*args, **kwargs)

    return build


def layered(layers, **properties):
    """An ``alt.LayerChart`` of ``layers``, built without Altair's defensive copies.

    ``alt.layer`` and the ``LayerChart`` constructor deep-copy every layer to
    merge selection parameters and shared data; the chart layer uses neither
    (no selections, data by name), and the copies cost tens of milliseconds per
    chart. The layers are set on an empty chart instead; the finished spec is
    validated in the tests.
    """
    chart = alt.LayerChart(**properties)
    chart.layer = list(layers)
    return chart


def concatenated(direction: str, charts, **properties):
    """An ``alt.HConcatChart`` (``"h"``) or ``alt.VConcatChart`` (``"v"``) without copies.

    See :func:`layered` for why.
    """
    if direction == "h":
        chart = alt.HConcatChart(**properties)
        chart.hconcat = list(charts)
    else:
        chart = alt.VConcatChart(**properties)
        chart.vconcat = list(charts)
    return chart


@functools.cache
def _config_cached() -> alt.Config:
    return alt.Config.from_dict(theme_config()["config"])


def _config() -> alt.Config:
    return _config_cached().copy(deep=True)
