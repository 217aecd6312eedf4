"""The serving stack on its own: Voila + widgets + anywidget download in Chromium.

A trivial notebook in a temporary folder, so a failure here points at the
stack (Voila, Chromium, playwright, anywidget, the download widget), not at
the dashboard's model.
"""

from __future__ import annotations

import sys

import nbformat
import pytest

pytestmark = pytest.mark.browser

CELL = """\
import ipywidgets as widgets
from plantside.dashboard.download import BrowserDownload

download = BrowserDownload()
slider = widgets.IntSlider(value=3, min=0, max=10, description="count")
shown = widgets.HTML(value="<span class='echo'>value 3</span>")
button = widgets.Button(description="send file")


def on_value(change):
    shown.value = f"<span class='echo'>value {int(change['new'])}</span>"


def on_click(_):
    download.send_file(b"hour,load_kw\\n1,2.5\\n", "stack test.csv", "text/csv")


slider.observe(on_value, names="value")
button.on_click(on_click)
widgets.VBox([slider, shown, button, download])
"""


@pytest.fixture(scope="module")
def trivial_server(tmp_path_factory, voila_launcher):
    folder = tmp_path_factory.mktemp("stack")
    notebook = nbformat.v4.new_notebook()
    notebook.cells = [nbformat.v4.new_code_cell(CELL)]
    notebook.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3"}
    nbformat.write(notebook, folder / "stack.ipynb")
    port = voila_launcher.free_port()
    command = [
        sys.executable,
        "-m",
        "voila",
        str(folder),
        f"--port={port}",
        "--Voila.ip=127.0.0.1",
        "--Voila.open_browser=False",
    ]
    return voila_launcher(command, port, folder / "voila.log")


def test_widgets_and_download_reach_the_browser(trivial_server, new_page):
    page = new_page()
    page.goto(trivial_server.notebook_url("stack.ipynb"), wait_until="commit")
    page.wait_for_selector(".echo")
    assert "value 3" in page.inner_text(".echo")
    # move the slider with the keyboard: focus the handle, press the right arrow twice
    page.focus(".widget-slider .noUi-handle")
    page.keyboard.press("ArrowRight")
    page.keyboard.press("ArrowRight")
    page.wait_for_function("document.querySelector('.echo').textContent.includes('value 5')")
    with page.expect_download() as download_info:
        page.get_by_role("button", name="send file").click()
    download = download_info.value
    assert download.suggested_filename == "stack test.csv"
    assert open(download.path(), "rb").read() == b"hour,load_kw\n1,2.5\n"


def test_token_keeps_out_visitors_without_it(voila_launcher, tmp_path):
    """A served dashboard with a token (as ``--lan`` sets) refuses requests without it."""
    import urllib.error
    import urllib.request

    port = voila_launcher.free_port()
    command = [
        sys.executable,
        "-m",
        "plantside.dashboard.serve",
        f"--port={port}",
        "--token=test-token-123",
        "--no-preheat",
    ]
    server = voila_launcher(
        command, port, tmp_path / "voila.log", check_url="/?token=test-token-123"
    )
    with urllib.request.urlopen(f"{server.base_url}/?token=test-token-123", timeout=30) as reply:
        assert reply.status == 200
    try:
        with urllib.request.urlopen(f"{server.base_url}/voila/render/plant.ipynb", timeout=30) as r:
            final = r.geturl()  # redirected to the login page
            assert "login" in final, final
    except urllib.error.HTTPError as error:
        assert error.code in (401, 403)
