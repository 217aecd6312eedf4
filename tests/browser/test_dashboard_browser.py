"""The served dashboard in headless Chromium: sliders, charts, exports, uploads, sessions.

The server is the real one (``python -m plantside.dashboard.serve`` on a free
loopback port, see ``conftest.py``). Timings are measured and printed, never
asserted: the machine is shared. Every wait is for a widget or a value on the
page, with generous timeouts.
"""

from __future__ import annotations

import re
import time
from dataclasses import replace
from pathlib import Path

import pytest
from plantside.air_handler.year import cooling_design_points
from plantside.charts.study_frames import CHARTS
from plantside.climate.bundled import load_bundled_climate
from plantside.climate.design_conditions import design_conditions_from_weather
from plantside.dashboard.app import example_scenario, first_recirculating_unit
from plantside.units import tons_from_kw

pytestmark = pytest.mark.browser

NOTEBOOK = "air_handler.ipynb"
#: Time allowed for a widget to appear or a value to change [ms] (two shared cores).
WIDGET_TIMEOUT_MS = 120_000
CHART_HOST = ".plantside-chart-{name}"

#: Marks a chart's current drawing and watches for its replacement: the time [ms] from
#: "release" (this call, made just before the key is released) to the moment the new
#: drawing is in the page is left in ``window.__plantsideRedrawn[name]``.
_WATCH_CHART = """
(name) => {
  const host = document.querySelector(`.plantside-chart-${name}`);
  const drawn = host && host.querySelector('canvas, svg.marks');
  if (!drawn) { return false; }
  drawn.dataset.plantsideOld = '1';
  window.__plantsideRedrawn = window.__plantsideRedrawn || {};
  window.__plantsideRedrawn[name] = null;
  const released = performance.now();
  const observer = new MutationObserver(() => {
    const now = host.querySelector('canvas, svg.marks');
    if (now && !now.dataset.plantsideOld) {
      window.__plantsideRedrawn[name] = performance.now() - released;
      observer.disconnect();
    }
  });
  observer.observe(host, { childList: true, subtree: true });
  return true;
}
"""
#: Resolves true once no chart has changed for ``quiet`` ms, false if that has not happened
#: within ``limit`` ms (a page that redraws its charts without end).
_QUIET_WITHIN = """
([quiet, limit]) => new Promise((resolve) => {
  const done = (ok) => {
    observer.disconnect();
    clearTimeout(timer);
    clearTimeout(cap);
    resolve(ok);
  };
  const observer = new MutationObserver(() => {
    clearTimeout(timer);
    timer = setTimeout(() => done(true), quiet);
  });
  let timer = setTimeout(() => done(true), quiet);
  const cap = setTimeout(() => done(false), limit);
  for (const host of document.querySelectorAll('[class*="plantside-chart-"]')) {
    observer.observe(host, { childList: true, subtree: true });
  }
})
"""
_REDRAWN = "(name) => window.__plantsideRedrawn && window.__plantsideRedrawn[name]"
#: Resolves once no chart has changed for ``quiet`` ms (the page has settled after loading:
#: the charts are redrawn once at the width the page reports).
_SETTLED = """
(quiet) => new Promise((resolve) => {
  const done = () => { observer.disconnect(); resolve(); };
  let timer = setTimeout(done, quiet);
  const observer = new MutationObserver(() => {
    clearTimeout(timer);
    timer = setTimeout(done, quiet);
  });
  for (const host of document.querySelectorAll('[class*="plantside-chart-"]')) {
    observer.observe(host, { childList: true, subtree: true });
  }
})
"""


def expected_design_card(fraction: float) -> str:
    """The design coil load card's number for the example scenario at an outdoor-air fraction.

    Computed here by the model itself (the server runs the same example scenario): the
    air handler the page opens on, with its minimum outdoor air set to ``fraction``.
    """
    scenario = example_scenario()
    index = first_recirculating_unit(scenario)
    spec = scenario.air_handlers[index]
    settings = replace(
        spec.settings, minimum_outdoor_air_fraction=fraction, minimum_outdoor_airflow=None
    )
    weather = load_bundled_climate(scenario.climate)
    conditions = design_conditions_from_weather(weather).conditions
    zone = scenario.zone_loads(index, weather)  # the zone with the site's sun, as the study
    summary = cooling_design_points(
        settings, zone, conditions, percent=scenario.cooling_design_percent
    )
    load_kw = summary.points[summary.governing].loads["coil_total_kW"]
    tons = float(tons_from_kw(load_kw))  # the example is written in IP units
    return f"{tons:,.0f}" if abs(tons) >= 100 else f"{tons:,.1f}"


def open_dashboard(page, server, notebook: str = NOTEBOOK) -> float:
    """Open a dashboard page; return seconds until figures and all five charts are drawn."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    start = time.perf_counter()
    page.goto(server.notebook_url(notebook), wait_until="commit", timeout=WIDGET_TIMEOUT_MS)
    try:
        page.wait_for_selector(".plantside-figures .ps-card", timeout=WIDGET_TIMEOUT_MS)
        for name in ("design", "year", "distribution", "psychrometric", "sweep"):
            page.wait_for_selector(
                f"{CHART_HOST.format(name=name)} canvas, {CHART_HOST.format(name=name)} svg.marks",
                timeout=WIDGET_TIMEOUT_MS,
            )
    except PlaywrightTimeout:
        body = page.inner_text("body")[:2000]
        raise AssertionError(
            f"the dashboard did not appear.\nPage text:\n{body}\nServer log:\n{server.log_text()}"
        ) from None
    return time.perf_counter() - start


def screenshot_whole_dashboard(page, path: Path) -> None:
    """Screenshot of the whole dashboard (Voila scrolls inside the page, so grow the window)."""
    size = page.viewport_size
    height = page.evaluate(
        "() => Math.ceil(document.querySelector('.plantside-app').getBoundingClientRect().height)"
    )
    page.set_viewport_size({"width": size["width"], "height": int(height) + 60})
    page.evaluate("() => document.querySelector('.plantside-app').scrollIntoView()")
    page.wait_for_timeout(1500)  # let the charts settle at the new size
    page.screenshot(path=str(path), full_page=True)
    page.set_viewport_size(size)


def figures_text(page) -> str:
    return page.inner_text(".plantside-figures")


def card_value(page, title: str) -> str:
    cards = page.locator(".ps-card", has_text=title)
    return cards.first.locator(".ps-value").inner_text()


def slider_readout(page, name: str) -> str:
    return page.inner_text(f".plantside-{name} .widget-readout")


def move_slider(page, name: str, presses: int = 1, key: str = "ArrowRight") -> tuple:
    """Move a slider with the keyboard.

    Returns the time [ms] from the last key release to the first of the five charts
    redrawn and to the last (every chart's data changes with these sliders).
    """
    handle = page.locator(f".plantside-{name} .noUi-handle").first
    handle.focus()
    for _ in range(presses - 1):
        handle.press(key)
    for chart in CHARTS:
        # each chart drawn before the watch starts (a part just shown again, or a pin just
        # set, may be redrawing it)
        page.wait_for_function(_WATCH_CHART, arg=chart, polling=50, timeout=WIDGET_TIMEOUT_MS)
    handle.press(key)
    times = []
    for chart in CHARTS:
        redraw = page.wait_for_function(_REDRAWN, arg=chart, polling=50, timeout=WIDGET_TIMEOUT_MS)
        times.append(float(redraw.json_value()))
    return min(times), max(times)


def wait_for_change(page, before: str, timeout_ms: int = WIDGET_TIMEOUT_MS):
    page.wait_for_function(
        "(before) => document.querySelector('.plantside-figures').innerText !== before",
        arg=before,
        timeout=timeout_ms,
    )


def test_sliders_climate_exports_and_upload(dashboard_server, new_page, screenshots_folder):
    page = new_page(1600, 1100)
    load_s = open_dashboard(page, dashboard_server)
    print(f"\npage load (pre-started kernel) to figures and five charts drawn: {load_s:.1f} s")
    page.evaluate(_SETTLED, 500)  # time moves, not the page's last redraws after loading

    # --- outdoor-air fraction slider: figures and charts follow
    before = figures_text(page)
    readout = slider_readout(page, "outdoor-air-fraction")
    timings = []
    for _ in range(3):
        shown = figures_text(page)
        timings.append(move_slider(page, "outdoor-air-fraction"))
        wait_for_change(page, shown)
    assert figures_text(page) != before
    assert slider_readout(page, "outdoor-air-fraction") != readout
    print(
        "slider release to redrawn charts (outdoor air), first / last of five, ms: "
        + ", ".join(f"{a:.0f} / {b:.0f}" for a, b in timings)
    )

    # --- supply air temperature slider
    before = figures_text(page)
    design_before = card_value(page, "Design coil load")
    timings = []
    for _ in range(2):
        shown = figures_text(page)
        timings.append(move_slider(page, "supply-air-temperature", key="ArrowLeft"))
        wait_for_change(page, shown)
    assert card_value(page, "Design coil load") != design_before
    print(
        "slider release to redrawn charts (supply air), first / last of five, ms: "
        + ", ".join(f"{a:.0f} / {b:.0f}" for a, b in timings)
    )

    # --- climate dropdown: header, figures and the psychrometric chart change
    before = figures_text(page)
    assert page.evaluate(_WATCH_CHART, "psychrometric")
    page.select_option(".plantside-climate select", label="Mesa Ardiente (fictional)")
    climate_ms = float(
        page.wait_for_function(_REDRAWN, arg="psychrometric", polling=50).json_value()
    )
    print(f"climate change to redrawn psychrometric chart: {climate_ms:.0f} ms")
    wait_for_change(page, before)
    assert "Mesa Ardiente" in page.inner_text(".plantside-header")

    # --- export a chart as PNG and SVG: files arrive as downloads
    with page.expect_download(timeout=WIDGET_TIMEOUT_MS) as info:
        page.click(".plantside-export-design-png")
    png = Path(info.value.path()).read_bytes()
    assert info.value.suggested_filename.endswith("design-coil-load.png")
    assert png[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
    assert int.from_bytes(png[16:20], "big") >= 1400  # report resolution
    with page.expect_download(timeout=WIDGET_TIMEOUT_MS) as info:
        page.click(".plantside-export-sweep-svg")
    svg = Path(info.value.path()).read_text("utf-8")
    assert svg.lstrip().startswith("<svg") and svg.rstrip().endswith("</svg>")
    assert "Mesa Ardiente" in svg  # stamped with its inputs
    with page.expect_download(timeout=WIDGET_TIMEOUT_MS) as info:
        page.click(".plantside-export-csv")
    csv_text = Path(info.value.path()).read_text("utf-8")
    assert csv_text.startswith("# plantside") and csv_text.count("\n") > 8760

    # --- a bad weather CSV: message beside the climate control, results kept
    kept = figures_text(page)
    with page.expect_file_chooser(timeout=WIDGET_TIMEOUT_MS) as chooser:
        page.click(".plantside-weather-upload")
    chooser.value.set_files(
        files=[
            {
                "name": "broken year.csv",
                "mimeType": "text/csv",
                "buffer": b"hour,drybulb_C,dew_point_C\n1,25,12\n2,hot,12\n",
            }
        ],
    )
    message = page.wait_for_selector(
        ".plantside-message-climate .plantside-message", timeout=WIDGET_TIMEOUT_MS
    )
    text = message.inner_text()
    assert "broken year.csv" in text and re.search(r"row", text)
    assert figures_text(page) == kept

    # --- screenshots in both unit systems
    page.click(".plantside-unit-system button:has-text('SI')")
    page.wait_for_function(
        "() => document.querySelector('.plantside-figures').innerText.includes('kW')"
    )
    screenshot_whole_dashboard(page, screenshots_folder / "dashboard_si.png")
    page.click(".plantside-unit-system button:has-text('IP')")
    page.wait_for_function(
        "() => document.querySelector('.plantside-figures').innerText.includes('tons')"
    )
    screenshot_whole_dashboard(page, screenshots_folder / "dashboard_ip.png")


def test_plant_page_and_pinned_comparison(dashboard_server, new_page, screenshots_folder):
    page = new_page(1600, 1100)
    load_s = open_dashboard(page, dashboard_server, "plant.ipynb")
    print(f"\nplant page load (pre-started kernel): {load_s:.1f} s")
    assert "plant of" in page.inner_text(".plantside-header")
    page.click(".plantside-pin")
    shown = figures_text(page)
    move_slider(page, "outdoor-air-fraction", presses=5)
    wait_for_change(page, shown)
    page.wait_for_selector(".ps-pinned")
    screenshot_whole_dashboard(page, screenshots_folder / "plant_pinned_ip.png")


#: Colleagues opening the page at once (a design meeting's projector and laptops).
SESSIONS = 8
#: Resident memory a kernel may hold: the figure the README tells the person serving to plan
#: per colleague (the issue's target is 250 MB; measured 237-249 MB on a 2-core machine).
KERNEL_MEMORY_PLAN_MB = 300


def test_eight_sessions_at_once_all_work_and_keep_their_own_results(dashboard_server, new_page):
    # before the executor waited for late outputs, 3 to 5 of 8 pages opened together on
    # 2 cores stayed blank ("Timeout waiting for IOPub output" in the server log)
    pages = [new_page(1400, 1000) for _ in range(SESSIONS)]
    loads = []
    start = time.perf_counter()
    for page in pages:  # start all four page loads before waiting for any
        page.goto(
            dashboard_server.notebook_url(NOTEBOOK),
            wait_until="commit",
            timeout=WIDGET_TIMEOUT_MS,
        )
    for page in pages:
        page.wait_for_selector(".plantside-figures .ps-card", timeout=WIDGET_TIMEOUT_MS)
        page.wait_for_selector(".plantside-chart-sweep canvas, .plantside-chart-sweep svg.marks")
        loads.append(time.perf_counter() - start)
    print(
        f"\n{SESSIONS} pages opened together, ready after (s): "
        + ", ".join(f"{t:.1f}" for t in loads)
    )
    start_readout = float(slider_readout(pages[0], "outdoor-air-fraction"))
    # each page moves its outdoor-air slider by a different number of steps (1 % each)
    for steps, page in enumerate(pages, start=1):
        handle = page.locator(".plantside-outdoor-air-fraction .noUi-handle").first
        handle.focus()
        for _ in range(steps * 2):
            handle.press("ArrowRight")
    # every page must settle on the model's own design coil load for its own setting
    designs = []
    for steps, page in enumerate(pages, start=1):
        fraction = (start_readout + 2 * steps) / 100.0
        expected = expected_design_card(fraction)
        print(f"page {steps}: expecting {expected} at {100 * fraction:.0f} % outdoor air")
        page.wait_for_function(
            "(text) => [...document.querySelectorAll('.ps-card')].some(c =>"
            " c.textContent.includes('Design coil load') &&"
            " c.querySelector('.ps-value').innerText.startsWith(text))",
            arg=expected,
            timeout=WIDGET_TIMEOUT_MS,
        )
        designs.append(card_value(page, "Design coil load"))
    readouts = [slider_readout(page, "outdoor-air-fraction") for page in pages]
    print("outdoor air per page [%]: " + ", ".join(readouts))
    print("design coil load per page: " + ", ".join(designs))
    assert len(set(readouts)) == SESSIONS, "each page keeps its own slider value"
    assert len(set(designs)) == SESSIONS, "each page shows its own results"
    kernels = dashboard_server.kernel_processes()
    sizes = sorted(k.memory_info().rss / 1e6 for k in kernels)
    print(
        f"kernels running: {len(kernels)}; resident memory each (MB): "
        + ", ".join(f"{s:.0f}" for s in sizes)
    )
    assert len(kernels) >= SESSIONS
    print(f"resident memory of all kernels: {sum(sizes):,.0f} MB (target 250 MB a kernel)")
    assert max(sizes) <= KERNEL_MEMORY_PLAN_MB, (
        f"a kernel holds {max(sizes):.0f} MB, more than the {KERNEL_MEMORY_PLAN_MB} MB the README "
        "tells the person serving to plan per colleague"
    )


def page_kernel_id(page) -> str:
    """The id of the kernel a Voila page runs on (Voila writes it into the page's config)."""
    return page.evaluate(
        "() => JSON.parse(document.getElementById('jupyter-config-data').textContent).kernelId"
    )


def wait_until_kernel_gone(server, kernel_id: str, timeout_s: float = 20.0) -> float:
    """Seconds until the kernel's process has exited; fails after ``timeout_s``."""
    start = time.monotonic()
    while time.monotonic() - start < timeout_s:
        if kernel_id not in server.kernel_ids():
            return time.monotonic() - start
        time.sleep(0.25)
    raise AssertionError(
        f"kernel {kernel_id} still running {timeout_s:.0f} s after its page went away "
        f"(the page's shutdown request was refused or never sent).\n{server.log_text()[-3000:]}"
    )


def test_nothing_leaves_this_computer_and_a_closed_page_frees_its_kernel(
    dashboard_server, new_page
):
    """Every request of the page goes to the server on 127.0.0.1 (no CDN: the page must
    work offline), and reloading or closing a page shuts its kernel down at once instead
    of after the idle cull (the served default is 15 minutes; this server's, 20)."""
    from urllib.parse import urlsplit

    page = new_page(1280, 800)
    hosts = []
    page.on("request", lambda request: hosts.append(urlsplit(request.url).hostname))
    open_dashboard(page, dashboard_server, "plant.ipynb")
    first = page_kernel_id(page)
    assert first in dashboard_server.kernel_ids()
    page.reload(wait_until="commit")
    page.wait_for_selector(".plantside-chart-sweep canvas", timeout=WIDGET_TIMEOUT_MS)
    seconds = wait_until_kernel_gone(dashboard_server, first)
    print(f"\nreload: the old page's kernel gone after {seconds:.1f} s")
    second = page_kernel_id(page)
    assert second != first and second in dashboard_server.kernel_ids()
    page.close(run_before_unload=True)  # what a browser does when a tab is closed
    seconds = wait_until_kernel_gone(dashboard_server, second)
    print(f"close: the page's kernel gone after {seconds:.1f} s")
    outside = sorted({host for host in hosts if host not in ("127.0.0.1", None)})
    assert hosts and not outside, f"the page asked other hosts: {outside}"


#: For each chart: [width its panel offers, width it is drawn at, the panel's width, the
#: chart column's width] [px] (the first two as panel_width.js measures them).
_CHART_FIT = """
() => ['design', 'year', 'distribution', 'psychrometric', 'sweep'].map((name) => {
  const host = document.querySelector(`.plantside-chart-${name}`);
  const panel = host.closest('.plantside-chart');
  const column = panel.closest('.plantside-charts');
  const style = getComputedStyle(panel);
  const offered = panel.clientWidth - parseFloat(style.paddingLeft)
    - parseFloat(style.paddingRight);
  const canvas = host.querySelector('canvas');
  // the width it is drawn at, not as a style sheet may have scaled it down
  const drawn = canvas
    ? parseFloat(canvas.style.width) || canvas.width / (window.devicePixelRatio || 1)
    : 0;
  return [name, offered, drawn, Math.round(panel.getBoundingClientRect().width),
    Math.round(column.getBoundingClientRect().width)];
})
"""


def wait_until_charts_fit(page, timeout_ms: int = WIDGET_TIMEOUT_MS) -> list:
    """Wait until every chart is drawn no wider than its panel and fills at least 95 % of
    it (the dashboard redraws them to the width the page reports), and every panel spans
    the chart column (a panel as wide as its chart would follow it down); return the
    widths."""
    try:
        page.wait_for_function(
            f"() => ({_CHART_FIT})().every(([n, offered, drawn, panel, column]) =>"
            " drawn > 0 && drawn <= offered && drawn >= 0.95 * offered"
            " && panel >= column - 2)",
            polling=250,
            timeout=timeout_ms,
        )
    except Exception:  # report the widths that did not fit
        raise AssertionError(
            f"charts do not fit their panels: {page.evaluate(_CHART_FIT)}"
        ) from None
    return page.evaluate(_CHART_FIT)


@pytest.mark.parametrize("width,height", [(1280, 800), (1920, 1080)], ids=["1280", "1920"])
@pytest.mark.parametrize("notebook", ["plant.ipynb", NOTEBOOK], ids=["plant", "air_handler"])
def test_charts_fit_the_panel_at_projector_and_full_hd_widths(
    dashboard_server, new_page, screenshots_folder, notebook, width, height
):
    """At 1280 x 800 (a typical projector) the charts were 917-1,081 px in 906 px panels and
    the page scrolled sideways; at 1920 they left ~450 px empty. Now each fits its panel,
    in both unit systems, with and without a pinned A."""
    page = new_page(width, height)
    open_dashboard(page, dashboard_server, notebook)
    view = "plant" if notebook == "plant.ipynb" else "unit"
    fits = wait_until_charts_fit(page)
    print(f"\n{view} {width}x{height} IP: (chart, panel px, drawn px) {fits}")
    # nothing scrolls sideways
    assert page.evaluate("() => document.documentElement.scrollWidth") <= width
    screenshot_whole_dashboard(page, screenshots_folder / f"{view}_{width}_ip.png")
    page.click(".plantside-unit-system button:has-text('SI')")
    page.wait_for_function(
        "() => document.querySelector('.plantside-figures').innerText.includes('kW')"
    )
    wait_until_charts_fit(page)
    screenshot_whole_dashboard(page, screenshots_folder / f"{view}_{width}_si.png")
    page.click(".plantside-pin")
    shown = figures_text(page)
    move_slider(page, "outdoor-air-fraction", presses=5)
    wait_for_change(page, shown)
    page.wait_for_selector(".ps-pinned")
    fits = wait_until_charts_fit(page)
    print(f"{view} {width}x{height} SI pinned: {fits}")
    # and they come to rest: the plant page's parts once sized their panels by their
    # charts, and the width reports then narrowed every chart by 4 px each 0.4 s without end
    assert page.evaluate(_QUIET_WITHIN, [1500, 20_000]), "the charts never stop redrawing"
    wait_until_charts_fit(page, timeout_ms=1000)
    screenshot_whole_dashboard(page, screenshots_folder / f"{view}_{width}_si_pinned.png")
    page.click(".plantside-unit-system button:has-text('IP')")
    page.wait_for_function(
        "() => document.querySelector('.plantside-figures').innerText.includes('tons')"
    )
    wait_until_charts_fit(page)
    screenshot_whole_dashboard(page, screenshots_folder / f"{view}_{width}_ip_pinned.png")


def _show_part(page, title: str) -> None:
    """Show a part of the plant page from the keyboard (its switch: focus, then Enter)."""
    button = page.locator(".plantside-page-choice button", has_text=title).first
    button.focus()
    page.keyboard.press("Enter")
    page.wait_for_function(
        "(t) => [...document.querySelectorAll('.plantside-page-choice button')]"
        ".some((b) => b.textContent.includes(t) && b.classList.contains('mod-active'))",
        arg=title,
        timeout=WIDGET_TIMEOUT_MS,
    )


@pytest.mark.parametrize("width,height", [(1280, 800), (1920, 1080)], ids=["1280", "1920"])
def test_plant_page_parts_option_chooser_margin_and_heating_plant(
    dashboard_server, new_page, screenshots_folder, width, height
):
    """The plant page in parts: the water side is worked out only when its part is shown;
    the cooling and heating plants side by side; the option chooser and the margin move
    the plant; nothing scrolls sideways; every part's screenshot in IP and SI."""
    page = new_page(width, height)
    open_dashboard(page, dashboard_server, "plant.ipynb")
    # the water side is not on a slider move's path: its tables are not even drawn yet
    # (the Stack draws only the part on show: the water side's part is not in the page)
    assert (
        page.evaluate(
            "() => { const w = document.querySelector('.plantside-water-page .plantside-tables');"
            " return w ? w.innerText : ''; }"
        )
        == ""
    )
    _show_part(page, "Plant: cooling")
    for kind in ("cooling", "heating"):
        host = f".plantside-chart-plant_{kind}"
        page.wait_for_selector(f"{host} canvas", timeout=WIDGET_TIMEOUT_MS)
    heating = page.inner_text(".plantside-plant-heating")
    assert "MBH" in heating and "tons" not in heating  # heat in MBH (the example is I-P)
    assert "Heating plant" in heating and "Design capacity" in heating
    cooling = page.inner_text(".plantside-plant-cooling")
    scenario = example_scenario()
    first, second = (o.name for o in scenario.cooling_options[:2])
    assert f"{first} (shown)" in cooling
    # the chooser: the staging table and the stage lines follow the option chosen
    page.select_option(".plantside-cooling-option select", label=second)
    page.wait_for_function(
        "(t) => document.querySelector('.plantside-plant-cooling').innerText.includes(t)",
        arg=f"{second} (shown)",
        timeout=WIDGET_TIMEOUT_MS,
    )
    # the margin, from the keyboard: 10 % -> 15 %, shown on the card and in the table
    figures = figures_text(page)
    handle = page.locator(".plantside-cooling-margin-percent .noUi-handle").first
    handle.focus()
    for _ in range(5):
        handle.press("ArrowRight")
    wait_for_change(page, figures)
    page.wait_for_function(
        "() => document.querySelector('.plantside-figures').innerText.includes('15 % margin')",
        timeout=WIDGET_TIMEOUT_MS,
    )
    page.wait_for_function(
        "() => document.querySelector('.plantside-plant-cooling').innerText.includes('15 %')",
        timeout=WIDGET_TIMEOUT_MS,
    )
    assert page.evaluate("() => document.documentElement.scrollWidth") <= width
    with page.expect_download(timeout=WIDGET_TIMEOUT_MS) as download:
        page.click(".plantside-export-plant_heating-svg")
    assert download.value.suggested_filename.endswith("-heating-plant-load-duration.svg")
    screenshot_whole_dashboard(page, screenshots_folder / f"plant_parts_{width}_ip_plant.png")
    page.click(".plantside-unit-system button:has-text('SI')")
    page.wait_for_function(
        "() => document.querySelector('.plantside-plant-heating').innerText.includes('kW')",
        timeout=WIDGET_TIMEOUT_MS,
    )
    screenshot_whole_dashboard(page, screenshots_folder / f"plant_parts_{width}_si_plant.png")
    # the water side, when its part is shown
    _show_part(page, "Water side")
    page.wait_for_function(
        "() => (document.querySelector('.plantside-water-page')?.innerText || '').length > 100",
        timeout=WIDGET_TIMEOUT_MS,
    )
    page.wait_for_selector(".plantside-chart-water_side canvas", timeout=WIDGET_TIMEOUT_MS)
    assert page.evaluate("() => document.documentElement.scrollWidth") <= width
    screenshot_whole_dashboard(page, screenshots_folder / f"plant_parts_{width}_si_water.png")
    page.click(".plantside-unit-system button:has-text('IP')")
    page.wait_for_function(
        "() => (document.querySelector('.plantside-water-page')?.innerText || '').includes('gpm')",
        timeout=WIDGET_TIMEOUT_MS,
    )
    screenshot_whole_dashboard(page, screenshots_folder / f"plant_parts_{width}_ip_water.png")
