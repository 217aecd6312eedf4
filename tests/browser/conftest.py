"""Fixtures for the browser tests: a real Voila server and headless Chromium.

The browser is Debian's ``chromium`` (``/usr/bin/chromium``), driven by
playwright's sync API with ``executable_path``; playwright never downloads a
browser. The server is started with ``subprocess`` on a free loopback port and
stopped at the end of the session. Everything waits generously: the CI machine
has two shared cores.
"""

from __future__ import annotations

import os
import re
import shutil
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from dataclasses import dataclass, field
from pathlib import Path

import psutil
import pytest

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_FLAGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    "--disable-quic",
]
#: What the browser tests need from apt, as the README's test command installs it: the
#: browser without its recommended extras (headless, no GPU, no desktop), and the font the
#: charts name first (the committed screenshots are drawn in it).
CHROMIUM_PACKAGES = ("--no-install-recommends", "chromium", "fonts-liberation")
REPOSITORY = Path(__file__).resolve().parents[2]
#: The screenshots the README shows (tracked): rewritten only when asked, by setting
#: ``PLANTSIDE_REFRESH_SCREENSHOTS=1`` (DEVELOPERS.md, "Run").
COMMITTED_SCREENSHOTS = Path(__file__).resolve().parent / "screenshots"
#: Where every other run writes its screenshots (ignored by git), to look at after a run.
LATEST_SCREENSHOTS = Path(__file__).resolve().parent / ".screenshots"
REFRESH_SCREENSHOTS = "PLANTSIDE_REFRESH_SCREENSHOTS"
SERVER_START_TIMEOUT_S = 180.0
#: Time allowed for a widget to appear or a result to change on the page [ms].
WIDGET_TIMEOUT_MS = 120_000


def free_loopback_port() -> int:
    """A TCP port on 127.0.0.1 nobody listens on right now."""
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as sock:
        sock.bind(("127.0.0.1", 0))
        return int(sock.getsockname()[1])


@dataclass
class VoilaServer:
    """A Voila process started by the tests."""

    process: subprocess.Popen
    port: int
    log: Path
    base_url: str = field(init=False)

    def __post_init__(self):
        self.base_url = f"http://127.0.0.1:{self.port}"

    def notebook_url(self, name: str) -> str:
        return f"{self.base_url}/voila/render/{name}"

    def kernel_processes(self) -> list[psutil.Process]:
        """The kernel processes this server started (pre-started ones included)."""
        try:
            children = psutil.Process(self.process.pid).children(recursive=True)
        except psutil.NoSuchProcess:
            return []
        kernels = []
        for child in children:
            try:
                if any("ipykernel" in part for part in child.cmdline()):
                    kernels.append(child)
            except (psutil.NoSuchProcess, psutil.AccessDenied):
                continue
        return kernels

    def kernel_ids(self) -> set[str]:
        """Ids of the kernels whose processes are alive (from each kernel's connection file)."""
        ids = set()
        for kernel in self.kernel_processes():
            try:
                found = re.search(r"kernel-([0-9a-f-]+)\.json", " ".join(kernel.cmdline()))
            except (psutil.NoSuchProcess, psutil.AccessDenied):
                continue
            if found:
                ids.add(found.group(1))
        return ids

    def log_text(self) -> str:
        try:
            return self.log.read_text(errors="replace")[-20000:]
        except OSError:
            return ""


def _answers(url: str) -> bool:
    try:
        with urllib.request.urlopen(url, timeout=5) as response:
            return response.status == 200
    except (urllib.error.URLError, ConnectionError, TimeoutError, OSError):
        return False


def start_server(
    command: list[str],
    port: int,
    log: Path,
    env: dict | None = None,
    expected_kernels: int = 0,
    check_url: str = "/",
) -> VoilaServer:
    """Start ``command`` (a Voila server on ``port``) and wait until it answers.

    With ``expected_kernels`` > 0, also wait until that many kernels are
    pre-started, so that page-load timings do not include kernel start-up.
    """
    handle = log.open("wb")
    process = subprocess.Popen(
        command,
        stdout=handle,
        stderr=subprocess.STDOUT,
        cwd=REPOSITORY,
        env=env or dict(os.environ),
        start_new_session=True,
    )
    handle.close()
    server = VoilaServer(process=process, port=port, log=log)
    deadline = time.monotonic() + SERVER_START_TIMEOUT_S
    while time.monotonic() < deadline:
        if process.poll() is not None:
            raise RuntimeError(f"Voila exited with {process.returncode}:\n{server.log_text()}")
        if _answers(server.base_url + check_url):
            break
        time.sleep(0.5)
    else:
        stop_server(server)
        raise RuntimeError(f"Voila did not answer within {SERVER_START_TIMEOUT_S} s")
    while expected_kernels and time.monotonic() < deadline:
        # Voila logs "Kernel pool of <notebook> is filled" when the kernel has started
        if server.log_text().count("is filled") >= expected_kernels:
            break
        time.sleep(0.5)
    if expected_kernels:
        wait_for_idle_kernels(server, deadline)
    return server


def wait_for_idle_kernels(server: VoilaServer, deadline: float, quiet_s: float = 2.0) -> None:
    """Wait until the server's kernels stop using the processor.

    A pre-started kernel runs its notebook after Voila reports the pool filled; page
    timings should start from a kernel that has finished (as it has in normal use).
    Idle means no kernel used more than 0.1 s of processor time over ``quiet_s``.
    """

    def cpu(kernel):
        try:
            times = kernel.cpu_times()
            return times.user + times.system
        except psutil.NoSuchProcess:
            return 0.0

    while time.monotonic() < deadline:
        kernels = server.kernel_processes()
        before = [cpu(k) for k in kernels]
        time.sleep(quiet_s)
        after = [cpu(k) for k in kernels]
        if kernels and all(b - a < 0.1 for a, b in zip(before, after, strict=True)):
            return


def stop_server(server: VoilaServer) -> None:
    """Stop the server we started (by its process id) and any kernel it left running."""
    kernels = server.kernel_processes()
    if server.process.poll() is None:
        server.process.send_signal(signal.SIGTERM)
        try:
            server.process.wait(timeout=30)
        except subprocess.TimeoutExpired:
            server.process.kill()
            server.process.wait(timeout=10)
    for kernel in kernels:  # only processes this server started
        try:
            kernel.wait(timeout=10)
        except psutil.TimeoutExpired:
            kernel.kill()
        except psutil.NoSuchProcess:
            pass


@pytest.fixture(scope="session")
def chromium_executable() -> Path:
    """Debian's Chromium; installed with apt-get when missing, as the README's test command does."""
    if not CHROMIUM.exists() and shutil.which("apt-get") and os.geteuid() == 0:
        subprocess.run(["apt-get", "install", "-y", *CHROMIUM_PACKAGES], check=False, timeout=900)
    if not CHROMIUM.exists():
        pytest.fail(
            "browser tests need Debian's Chromium at /usr/bin/chromium: run "
            f"`apt-get install -y {' '.join(CHROMIUM_PACKAGES)}` (the README's test command does)"
        )
    return CHROMIUM


@pytest.fixture(scope="session")
def browser(chromium_executable):
    """Headless Chromium driven by playwright's sync API (no browser download)."""
    from playwright.sync_api import sync_playwright

    with sync_playwright() as playwright:
        instance = playwright.chromium.launch(
            executable_path=str(chromium_executable), args=CHROMIUM_FLAGS, headless=True
        )
        yield instance
        instance.close()


@pytest.fixture
def new_page(browser):
    """Factory of pages, each in its own context (own cookies, own downloads)."""
    contexts = []

    def make(width: int = 1500, height: int = 1000):
        context = browser.new_context(
            accept_downloads=True, viewport={"width": width, "height": height}
        )
        context.set_default_timeout(WIDGET_TIMEOUT_MS)
        contexts.append(context)
        return context.new_page()

    yield make
    for context in contexts:
        context.close()


@pytest.fixture(scope="session")
def dashboard_server(tmp_path_factory):
    """The real dashboard, served by ``python -m plantside.dashboard.serve`` on loopback."""
    port = free_loopback_port()
    log = tmp_path_factory.mktemp("voila") / "voila.log"
    command = [
        sys.executable,
        "-m",
        "plantside.dashboard.serve",
        f"--port={port}",
        "--pool-size=1",
        "--cull-idle-timeout=1200",
    ]
    notebooks = len(list((REPOSITORY / "dashboards").glob("*.ipynb")))
    server = start_server(command, port, log, expected_kernels=notebooks)
    yield server
    stop_server(server)


@pytest.fixture(scope="session")
def screenshots_folder() -> Path:
    """The folder the screenshot tests write to: the ignored ``.screenshots`` unless
    ``PLANTSIDE_REFRESH_SCREENSHOTS=1`` asks to refresh the committed ones."""
    refresh = os.environ.get(REFRESH_SCREENSHOTS, "") == "1"
    folder = COMMITTED_SCREENSHOTS if refresh else LATEST_SCREENSHOTS
    folder.mkdir(parents=True, exist_ok=True)
    return folder


@pytest.fixture(scope="module")
def voila_launcher():
    """Factory: ``launch(command, port, log)`` starts a server, stopped after the module."""
    servers = []

    def launch(command, port, log, env=None, expected_kernels=0, check_url="/"):
        server = start_server(
            command, port, log, env=env, expected_kernels=expected_kernels, check_url=check_url
        )
        servers.append(server)
        return server

    launch.free_port = free_loopback_port
    yield launch
    for server in servers:
        stop_server(server)
