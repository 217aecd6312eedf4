"""Charts to files: PNG at report resolution and SVG, stamped with the inputs that made them.

Rendering uses vl-convert, which bundles Vega and Vega-Lite and needs no
network and no browser; in this process, or in a short-lived child process for a
caller that must not keep vl-convert's engine (a dashboard kernel:
:mod:`plantside.charts.render_child`). Every exported chart carries a stamp under the plot:
the plantside version, the date, and the inputs the chart was drawn from, so a
figure pasted into a report can always be traced back to its study.

The stamp is added to a copy of the chart's spec (a footer view stacked below
it); the chart on screen is not changed.
"""

from __future__ import annotations

import base64
import datetime as _dt
import json
import re
import subprocess
import sys
import textwrap
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import altair as alt

from plantside import __version__
from plantside.charts.palette import FONT, INK_SOFT
from plantside.charts.render_child import render
from plantside.errors import InputRangeError, excerpt

__all__ = [
    "FORMATS",
    "ChartImage",
    "chart_bytes",
    "chart_images",
    "safe_filename",
    "save_chart",
    "stamp_lines",
    "stamped_spec",
]

#: File formats this module writes.
FORMATS = ("png", "svg")
#: Characters a chart file name may use (no folders, no spaces).
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,120}$")
#: Longest stamp line [characters] before it is wrapped.
_STAMP_WIDTH = 130
#: A child process drawing charts gets this long [s].
_CHILD_TIMEOUT_S = 120
#: Characters :func:`safe_filename` replaces.
_UNSAFE = re.compile(r"[^A-Za-z0-9._ -]+")


def safe_filename(name: str, default: str = "plantside-export") -> str:
    """Return ``name`` reduced to letters, digits, dot, dash, underscore and space.

    Used for the suggested name of a browser download and for the file names the
    command line writes; never a path (no folder separators survive).
    """
    cleaned = _UNSAFE.sub("_", str(name)).strip(" .")
    return cleaned[:120] or default


#: Top-level-only properties moved from the chart to the stamped wrapper.
_TOP_LEVEL = ("$schema", "config", "datasets", "background", "padding", "autosize", "usermeta")


def _vegalite_version() -> str | None:
    """The Vega-Lite version Altair writes (e.g. "6.4"); the drawing uses it if vl-convert
    bundles it (:func:`plantside.charts.render_child.render`)."""
    match = re.match(r"v?(\d+)\.(\d+)", alt.SCHEMA_VERSION)
    return f"{match.group(1)}.{match.group(2)}" if match else None


def stamp_lines(stamp=None, *, when: _dt.date | None = None) -> list[str]:
    """The stamp printed under an exported chart, as lines of text.

    Parameters
    ----------
    stamp : mapping, str or None
        The inputs that made the chart: a mapping (``{"climate": "Salvia
        Flats", "outdoor air": "20 %"}``) printed as ``key: value`` pairs, or
        a ready-made line of text. The plantside version and the date are added
        unless a given text already names the version.
    when : datetime.date, optional
        Date to print (default: today).

    Returns
    -------
    list of str
        Lines of at most about 130 characters.
    """
    day = (when or _dt.date.today()).isoformat()
    head = f"plantside {__version__} · {day}"
    if stamp is None:
        text = head
    elif isinstance(stamp, Mapping):
        pairs = "; ".join(f"{key}: {value}" for key, value in stamp.items())
        text = f"{head} · {pairs}" if pairs else head
    else:
        text = str(stamp).strip()
        if f"plantside {__version__}" not in text:
            text = f"{head} · {text}" if text else head
    return textwrap.wrap(text, _STAMP_WIDTH, break_long_words=True) or [head]


def _spec(chart) -> dict:
    if isinstance(chart, Mapping):
        return dict(chart)
    if hasattr(chart, "to_dict"):
        return chart.to_dict(validate=False)
    raise InputRangeError(
        "chart",
        f"chart: cannot export a {type(chart).__name__}; give an Altair chart or a Vega-Lite dict",
        "an Altair chart or a Vega-Lite spec dict",
    )


def stamped_spec(chart, stamp=None, *, when: _dt.date | None = None) -> dict:
    """The chart's Vega-Lite spec with the stamp as a footer under it.

    Parameters
    ----------
    chart : altair chart or dict
        The chart (or its spec).
    stamp : mapping, str or None
        See :func:`stamp_lines`.
    when : datetime.date, optional

    Returns
    -------
    dict
        A top-level ``vconcat`` spec: the chart, then a text view with the
        stamp lines (small grey type). Title, config, datasets and background
        stay at the top level.
    """
    inner = _spec(chart)
    outer = {key: inner.pop(key) for key in _TOP_LEVEL if key in inner}
    if "title" in inner:
        outer["title"] = inner.pop("title")
    if "params" in inner and not ("mark" in inner or "layer" in inner):
        outer["params"] = inner.pop("params")  # only a unit or layer spec may keep params
    lines = stamp_lines(stamp, when=when)
    footer = {
        "data": {"values": [{}]},
        "mark": {
            "type": "text",
            "text": lines,
            "align": "left",
            "baseline": "top",
            "font": FONT,
            "fontSize": 12,
            "lineHeight": 16,
            "color": INK_SOFT,
            "x": 0,
            "y": 0,
        },
        "width": 10,
        "height": 16 * len(lines),
        "view": {"stroke": None},
    }
    outer["vconcat"] = [inner, footer]
    outer["spacing"] = 18
    outer.setdefault("$schema", alt.SCHEMA_URL)
    return outer


def _check_format(fmt: str) -> str:
    text = str(fmt).lower().lstrip(".")
    if text not in FORMATS:
        raise InputRangeError("format", f"format = {fmt!r} cannot be written", "'png' or 'svg'")
    return text


@dataclass(frozen=True)
class ChartImage:
    """One image to draw: a chart (or its spec) as PNG or SVG, stamped (:func:`chart_bytes`)."""

    chart: object
    fmt: str = "png"
    stamp: object = None
    scale: float = 2.0
    when: _dt.date | None = None


def _job(image: ChartImage) -> dict:
    fmt = _check_format(image.fmt)
    scale = float(image.scale)
    if not 1.0 <= scale <= 6.0:
        raise InputRangeError("scale", f"scale = {scale:g} is outside 1 to 6", "1 to 6")
    spec = stamped_spec(image.chart, image.stamp, when=image.when)
    return {"spec": spec, "fmt": fmt, "scale": scale, "vl_version": _vegalite_version()}


def _render_in_child(jobs: list[dict]) -> list[bytes]:
    """Draw ``jobs`` in a child process (:mod:`plantside.charts.render_child`)."""
    script = Path(__file__).with_name("render_child.py")
    try:
        done = subprocess.run(
            [sys.executable, str(script)],
            input=json.dumps(jobs).encode("utf-8"),
            capture_output=True,
            timeout=_CHILD_TIMEOUT_S,
            check=False,
        )
    except (OSError, subprocess.SubprocessError) as error:
        raise InputRangeError(
            "chart", f"the chart could not be drawn: {excerpt(str(error))}", "a chart to draw"
        ) from error
    if done.returncode != 0:
        last = done.stderr.decode("utf-8", "replace").strip().splitlines()[-1:] or ["no message"]
        raise InputRangeError(
            "chart", f"the chart could not be drawn: {excerpt(last[0])}", "a chart to draw"
        )
    return [base64.b64decode(text) for text in json.loads(done.stdout)]


def chart_images(images: Sequence[ChartImage], *, separate_process: bool = False) -> list[bytes]:
    """Draw several charts, stamped, to PNG or SVG bytes (in order).

    Parameters
    ----------
    images : sequence of ChartImage
    separate_process : bool
        Draw in one short-lived child process (about 0.5 s to start) instead of in this
        one, which would keep vl-convert's JavaScript engine (85-100 MB) afterwards:
        what a dashboard kernel does (:mod:`plantside.charts.render_child`).

    Returns
    -------
    list of bytes
        PNG image data or SVG text encoded as UTF-8, one per image.
    """
    jobs = [_job(image) for image in images]
    if separate_process:
        return _render_in_child(jobs)
    return [render(**job) for job in jobs]


def chart_bytes(
    chart,
    fmt: str = "png",
    *,
    stamp=None,
    scale: float = 2.0,
    when: _dt.date | None = None,
    separate_process: bool = False,
) -> bytes:
    """Render a chart, stamped, to PNG or SVG bytes.

    Parameters
    ----------
    chart : altair chart or dict
        The chart (or its Vega-Lite spec).
    fmt : {"png", "svg"}
        Output format.
    stamp : mapping, str or None
        The inputs that made the chart (see :func:`stamp_lines`).
    scale : float
        PNG pixels per chart pixel, 1 to 6 (default 2: report resolution; the
        image is tagged 72 x scale pixels per inch, so it prints at the chart's
        own size). Ignored for SVG.
    when : datetime.date, optional
        Date in the stamp (default: today).
    separate_process : bool
        Draw in a child process (see :func:`chart_images`).

    Returns
    -------
    bytes
        PNG image data, or SVG text encoded as UTF-8.
    """
    image = ChartImage(chart, fmt, stamp, scale, when)
    return chart_images([image], separate_process=separate_process)[0]


def save_chart(
    chart,
    folder,
    name: str,
    formats: Sequence[str] = FORMATS,
    *,
    stamp=None,
    scale: float = 2.0,
    when: _dt.date | None = None,
) -> list[Path]:
    """Write a chart, stamped, to ``folder/name.png`` and ``folder/name.svg``.

    Parameters
    ----------
    chart : altair chart or dict
    folder : str or path
        Output folder (created if missing).
    name : str
        File name without extension: letters, digits, ``.``, ``-`` and ``_``.
    formats : sequence of {"png", "svg"}
    stamp : mapping, str or None
        See :func:`stamp_lines`.
    scale : float
        PNG scale (see :func:`chart_bytes`).
    when : datetime.date, optional

    Returns
    -------
    list of pathlib.Path
        The files written, in the order of ``formats``.
    """
    if not _NAME.match(str(name)):
        raise InputRangeError(
            "name",
            f"chart file name {name!r} is not allowed",
            "letters, digits, '.', '-' and '_', starting with a letter or digit",
        )
    kinds = [_check_format(fmt) for fmt in formats]
    if not kinds:
        raise InputRangeError("formats", "no format given", "'png' and/or 'svg'")
    out = Path(folder)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    for fmt in kinds:
        path = out / f"{name}.{fmt}"
        path.write_bytes(chart_bytes(chart, fmt, stamp=stamp, scale=scale, when=when))
        written.append(path)
    return written
