"""Drawing Vega-Lite specs to PNG or SVG with vl-convert, here or in a process of its own.

vl-convert draws with a JavaScript engine that, once started, stays in the process:
about 85-100 MB and 0.5 s to start, measured on a 2-core machine. The command line pays
it once for all its charts. A dashboard kernel (one per page view) would keep it for
the rest of the meeting after a single export, so the dashboard draws in a short-lived
child process instead: this file run as a script (``python render_child.py``) reads the
jobs as JSON on stdin and writes the images, base64 in a JSON list, on stdout.

This module imports nothing from plantside and nothing heavy at import, so the child
starts with vl-convert alone.
"""

from __future__ import annotations

import base64
import json
import sys

__all__ = ["render"]


def render(spec: dict, fmt: str, scale: float, vl_version: str | None) -> bytes:
    """One Vega-Lite spec as PNG (``scale`` pixels per chart pixel, tagged 72 x scale
    pixels per inch) or SVG (UTF-8); nothing is fetched from a network."""
    import vl_convert

    options: dict = {"allowed_base_urls": []}
    if vl_version and vl_version in vl_convert.get_vegalite_versions():
        options["vl_version"] = vl_version
    if fmt == "png":
        return vl_convert.vegalite_to_png(spec, scale=1.0, ppi=72.0 * scale, **options)
    return vl_convert.vegalite_to_svg(spec, **options).encode("utf-8")


def main() -> None:
    jobs = json.load(sys.stdin)
    images = [base64.b64encode(render(**job)).decode("ascii") for job in jobs]
    json.dump(images, sys.stdout)


if __name__ == "__main__":
    main()
