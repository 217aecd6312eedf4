"""Chart export: real PNG and SVG files from vl-convert, stamped with their inputs.

Checked against the file formats themselves: the PNG signature and IHDR chunk
(ISO/IEC 15948, PNG specification, sections 5.2 and 11.2.2), and the SVG as
XML (W3C SVG 1.1).
"""

from __future__ import annotations

import datetime
import shutil
import struct
import subprocess
import sys
import textwrap
import xml.etree.ElementTree as ET
import zlib

import pytest
from plantside import __version__
from plantside.charts.export import chart_bytes, save_chart, stamp_lines, stamped_spec
from plantside.errors import InputRangeError
from test_charts import CHARTS, build, frames_for

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification section 5.2
DAY = datetime.date(2026, 5, 4)
STAMP = {
    "site": "Salvia Flats (fictional)",
    "outdoor air": "25 %",
    "supply": "13.0 °C",
    "note": "A & B <pinned>",
}


def png_header(data: bytes) -> tuple[int, int]:
    """Width and height [px] from the IHDR chunk, checking its CRC (PNG spec 5.3, 11.2.2)."""
    assert data[:8] == PNG_SIGNATURE
    length, kind = struct.unpack(">I4s", data[8:16])
    assert kind == b"IHDR" and length == 13
    body = data[16 : 16 + length]
    (crc,) = struct.unpack(">I", data[16 + length : 20 + length])
    assert crc == zlib.crc32(kind + body)
    width, height = struct.unpack(">II", body[:8])
    return width, height


def svg_text(data: bytes) -> str:
    """All text of an SVG document, with XML entities resolved."""
    root = ET.fromstring(data)
    assert root.tag == "{http://www.w3.org/2000/svg}svg"
    return " ".join(" ".join(root.itertext()).split())


@pytest.mark.parametrize("name", CHARTS)
def test_every_chart_writes_png_and_svg(tmp_path, name):
    chart = build(name, frames_for(name, 0.25, "IP"))
    paths = save_chart(chart, tmp_path / "out", f"chart-{name}", stamp=STAMP, when=DAY)
    assert [p.suffix for p in paths] == [".png", ".svg"]
    assert all(p.exists() and p.parent == tmp_path / "out" for p in paths)
    width, height = png_header(paths[0].read_bytes())
    # report resolution: scale 2 makes every chart at least 1,600 px wide
    assert width >= 1600 and height >= 600
    text = svg_text(paths[1].read_bytes())
    for line in stamp_lines(STAMP, when=DAY):
        assert line in text
    assert f"plantside {__version__} · 2026-05-04" in text
    assert "note: A & B <pinned>" in text
    assert chart.to_dict()["title"]["text"] in text


def test_png_scale_sets_resolution_and_size():
    chart = build("oa_sweep", frames_for("oa_sweep", 0.25, "SI"))
    one = png_header(chart_bytes(chart, "png", scale=1))
    two = png_header(chart_bytes(chart, "png", scale=2))
    assert two[0] == pytest.approx(2 * one[0], abs=2)
    data = chart_bytes(chart, "png", scale=2)
    # pHYs chunk (PNG spec 11.3.5.3): pixels per metre for 144 pixels per inch
    at = data.index(b"pHYs")
    x_ppm, y_ppm, unit = struct.unpack(">IIB", data[at + 4 : at + 13])
    assert unit == 1 and x_ppm == y_ppm == pytest.approx(144 / 0.0254, abs=1)


def test_stamp_as_text_or_nothing():
    assert stamp_lines(None, when=DAY) == [f"plantside {__version__} · 2026-05-04"]
    given = f"plantside {__version__} · study X · 2026-05-04"
    assert stamp_lines(given, when=DAY) == [given]  # a text naming the version is kept as is
    long = stamp_lines({f"input {i}": "x" * 20 for i in range(12)}, when=DAY)
    assert len(long) > 1 and all(len(line) <= 130 for line in long)
    spec = stamped_spec(build("design", frames_for("design", 0.25, "SI")), "study X", when=DAY)
    assert spec["vconcat"][1]["mark"]["text"] == [f"plantside {__version__} · 2026-05-04 · study X"]
    assert "datasets" in spec and "config" in spec and "datasets" not in spec["vconcat"][0]


def test_export_names_bad_input(tmp_path):
    chart = build("design", frames_for("design", 0.25, "SI"))
    with pytest.raises(InputRangeError, match="name"):
        save_chart(chart, tmp_path, "../escape")
    with pytest.raises(InputRangeError, match="format"):
        chart_bytes(chart, "gif")
    with pytest.raises(InputRangeError, match="scale"):
        chart_bytes(chart, "png", scale=20)
    with pytest.raises(InputRangeError, match="chart"):
        chart_bytes(object(), "svg")


def test_export_refuses_external_data():
    spec = {
        "data": {"url": "https://example.invalid/hours.csv"},
        "mark": "point",
        "encoding": {"x": {"field": "x", "type": "quantitative"}},
    }
    with pytest.raises(ValueError, match="not allowed"):
        chart_bytes(spec, "svg")


_OFFLINE_SCRIPT = textwrap.dedent(
    """
    import socket
    from test_charts import build, frames_for
    from plantside.charts.export import chart_bytes
    chart = build("psychrometric", frames_for("psychrometric", 0.25, "SI"))
    png = chart_bytes(chart, "png")
    svg = chart_bytes(chart, "svg")
    assert png[:8] == b"\\x89PNG\\r\\n\\x1a\\n" and b"<svg" in svg[:200]
    try:
        socket.create_connection(("1.1.1.1", 53), timeout=1)
        print("NETWORK")
    except OSError:
        print("OFFLINE")
    """
)


def test_rendering_needs_no_network(tmp_path):
    """vl-convert bundles Vega and Vega-Lite: render in a process with no network at all."""
    command = [sys.executable, "-c", _OFFLINE_SCRIPT]
    unshare = shutil.which("unshare")
    if unshare:
        probe = subprocess.run([unshare, "--net", "true"], capture_output=True)
        if probe.returncode == 0:
            command = [unshare, "--net", *command]
    tests = str(__import__("pathlib").Path(__file__).parent)
    result = subprocess.run(
        command, capture_output=True, text=True, cwd=tests, timeout=300, check=False
    )
    assert result.returncode == 0, result.stderr[-2000:]
    if command[0] == unshare:
        # in its own empty network namespace the process really had no network
        assert result.stdout.strip().endswith("OFFLINE")


def test_a_child_process_draws_the_same_images():
    # the dashboard draws in a child process so its kernel does not keep vl-convert's engine
    from plantside.charts.export import ChartImage, chart_images

    chart = build("design", frames_for("design", 0.25, "IP"))
    images = [ChartImage(chart, "svg", STAMP, when=DAY), ChartImage(chart, "png", STAMP, 1.0, DAY)]
    here = chart_images(images)
    there = chart_images(images, separate_process=True)
    assert there[0] == here[0]  # the same SVG text
    assert png_header(there[1]) == png_header(here[1])  # the same PNG size


def test_a_chart_the_child_cannot_draw_is_a_message_not_a_traceback():
    from plantside.charts.export import ChartImage, chart_images

    broken = {"mark": "point", "encoding": {"x": {"field": "a", "type": "no such type"}}}
    with pytest.raises(InputRangeError, match="could not be drawn"):
        chart_images([ChartImage(broken, "svg")], separate_process=True)


def test_dashboard_exports_leave_the_kernel_without_vl_convert():
    # vl-convert's engine stayed in the kernel after one export: 213 -> 297 MB, measured
    code = textwrap.dedent(
        """
        import sys
        from plantside.dashboard.app import Dashboard
        from plantside.dashboard.report_export import dashboard_report_html
        dashboard = Dashboard(view="plant")
        assert dashboard.export_chart("design", "png").endswith(".png")
        assert dashboard.export_plant_chart("cooling", "svg").endswith(".svg")
        assert dashboard_report_html(dashboard.state).count("<svg") == 5
        print("vl_convert" in sys.modules)
        """
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=600, check=False
    )
    assert done.returncode == 0, done.stderr[-3000:]
    assert done.stdout.strip().splitlines()[-1] == "False"
