"""Serve the dashboards with Voila: ``python -m plantside.dashboard.serve``.

By default the server listens on this computer only (127.0.0.1). ``--lan``
serves colleagues on the local network: it binds every interface and protects
the pages with a token (generated unless ``--token`` is given).

Security note, printed whenever ``--lan`` is used: Voila runs only the code of
the notebooks it serves (it refuses code sent from the page), but anyone who
can reach the port and knows the token can use the dashboard and its kernels.
Use it on a trusted network or behind an authenticating proxy.

Kernels are pre-started (a page opens with its results already computed). The
page is Voila's "lab" page through plantside's own template (``jupyter_data/``):
it fetches nothing from a network, and closing or reloading a page shuts its
kernel down at once; kernels idle for long (a browser that crashed) are culled
as a second line, so a day of meetings does not leave one Python process
behind per page view.
"""

from __future__ import annotations

import argparse
import os
import secrets
import socket
import subprocess
import sys
from pathlib import Path

__all__ = [
    "DEFAULT_PORT",
    "SCENARIO_ENVIRONMENT_VARIABLE",
    "SECURITY_NOTE",
    "TEMPLATE",
    "dashboards_folder",
    "lan_address",
    "main",
    "template_root",
    "voila_command",
    "voila_environment",
]

DEFAULT_PORT = 8866
#: Environment variable through which the served notebooks learn the scenario file to open.
SCENARIO_ENVIRONMENT_VARIABLE = "PLANTSIDE_SCENARIO"

#: plantside's Voila template (``jupyter_data/voila/templates/plantside``, based on "lab").
TEMPLATE = "plantside"

SECURITY_NOTE = (
    "Security note: Voila runs only the code of the notebooks it serves, but anyone who can "
    "reach this port and has the token can use the dashboard and its server-side kernels. "
    "Serve it on a trusted network or behind an authenticating proxy."
)


def lan_address() -> str:
    """This computer's address on the local network, as colleagues would type it.

    Asks the operating system which interface it would route an outside address
    through (a UDP "connect" sends no packet); falls back to the host name.
    """
    probe = socket.socket(socket.AF_INET, socket.SOCK_DGRAM)
    try:
        probe.connect(("10.255.255.255", 1))
        return str(probe.getsockname()[0])
    except OSError:
        return socket.gethostname()
    finally:
        probe.close()


def dashboards_folder() -> Path:
    """The ``dashboards/`` folder of the plantside source tree."""
    here = Path(__file__).resolve()
    for parent in here.parents:
        candidate = parent / "dashboards"
        if candidate.is_dir() and any(candidate.glob("*.ipynb")):
            return candidate
    raise FileNotFoundError(
        f"no dashboards/ folder with notebooks found above {here.parent}; pass --dashboards PATH"
    )


def template_root() -> Path:
    """The Jupyter data folder holding plantside's Voila template (package data)."""
    return Path(__file__).resolve().parent / "jupyter_data"


def voila_environment(environment: dict[str, str] | None = None) -> dict[str, str]:
    """``environment`` (default: this process's) with plantside's template on ``JUPYTER_PATH``.

    Voila finds templates under ``<jupyter path>/voila/templates/<name>``; the folder is put
    first, so the template is found whatever else the path holds.
    """
    result = dict(os.environ if environment is None else environment)
    parts = [str(template_root())]
    if result.get("JUPYTER_PATH"):
        parts.append(result["JUPYTER_PATH"])
    result["JUPYTER_PATH"] = os.pathsep.join(parts)
    return result


#: How long the notebook's execution waits for the outputs of a cell that has finished
#: [s] (nbclient's ``iopub_timeout``, 4 s by default).
IOPUB_TIMEOUT_S = 120


def voila_command(
    dashboards: Path,
    *,
    port: int = DEFAULT_PORT,
    lan: bool = False,
    token: str | None = None,
    pool_size: int = 1,
    preheat: bool = True,
    cull_idle_timeout: int = 900,
    cull_interval: int = 60,
    open_browser: bool = False,
) -> list[str]:
    """The argument list that starts Voila on ``dashboards``.

    Parameters
    ----------
    dashboards : pathlib.Path
        Folder (tree of notebooks) or one notebook to serve.
    port : int
        TCP port [-], 1024..65535.
    lan : bool
        Bind all interfaces (``--Voila.ip=0.0.0.0``) instead of 127.0.0.1.
    token : str or None
        Access token; required by the caller when ``lan`` is true.
    pool_size : int
        Pre-started kernels per notebook [-], 0..8 (0 disables pre-starting).
    preheat : bool
        Pre-start kernels (``--preheat_kernel``).
    cull_idle_timeout, cull_interval : int
        Shut down kernels idle for longer than this [s]; check every interval [s].
    """
    if not 1024 <= int(port) <= 65535:
        raise ValueError(f"port = {port}; allowed 1024 to 65535")
    if not 0 <= int(pool_size) <= 8:
        raise ValueError(f"pool size = {pool_size}; allowed 0 to 8 kernels per notebook")
    if lan and not token:
        raise ValueError("serving on the local network needs a token")
    command = [
        sys.executable,
        "-m",
        "voila",
        str(dashboards),
        f"--port={int(port)}",
        f"--Voila.ip={'0.0.0.0' if lan else '127.0.0.1'}",
        f"--Voila.open_browser={open_browser}",
        "--show_tracebacks=False",
        f"--template={TEMPLATE}",
        f"--MappingKernelManager.cull_idle_timeout={int(cull_idle_timeout)}",
        f"--MappingKernelManager.cull_interval={int(cull_interval)}",
        "--MappingKernelManager.cull_connected=False",
        # outputs a busy machine delivers late are waited for, not dropped: with the
        # default 4 s, pages opened together on 2 cores stayed blank ("Timeout waiting
        # for IOPub output" in the server log)
        f"--VoilaExecutor.iopub_timeout={IOPUB_TIMEOUT_S}",
    ]
    if preheat and pool_size > 0:
        command += ["--preheat_kernel=True", f"--pool_size={int(pool_size)}"]
    if token:
        command.append(f"--token={token}")
    return command


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="python -m plantside.dashboard.serve",
        description="Serve the plantside dashboards with Voila (on this computer by default).",
    )
    parser.add_argument("--port", type=int, default=DEFAULT_PORT, help="TCP port (default 8866)")
    parser.add_argument(
        "--lan",
        action="store_true",
        help="serve colleagues on the local network (binds 0.0.0.0, requires a token)",
    )
    parser.add_argument("--token", default=None, help="access token (generated with --lan)")
    parser.add_argument(
        "--scenario", type=Path, default=None, help="scenario TOML to open (default: the example)"
    )
    parser.add_argument(
        "--dashboards", type=Path, default=None, help="folder of notebooks (default: dashboards/)"
    )
    parser.add_argument(
        "--pool-size", type=int, default=1, help="pre-started kernels per notebook (default 1)"
    )
    parser.add_argument(
        "--no-preheat", action="store_true", help="do not pre-start kernels (slower first page)"
    )
    parser.add_argument(
        "--cull-idle-timeout",
        type=int,
        default=900,
        help="shut down kernels of pages idle this long, in seconds (default 900)",
    )
    parser.add_argument(
        "--cull-interval", type=int, default=60, help="how often to look for idle kernels [s]"
    )
    parser.add_argument("--open", action="store_true", help="open a browser on start")
    parser.add_argument("--dry-run", action="store_true", help="print the Voila command and exit")
    return parser


def main(argv: list[str] | None = None) -> int:
    """Command-line entry: parse options, print how to connect, run Voila until stopped."""
    args = _parser().parse_args(argv)
    dashboards = args.dashboards or dashboards_folder()
    if not dashboards.exists():
        print(f"error: {dashboards} does not exist", file=sys.stderr)
        return 2
    token = args.token
    if args.lan and not token:
        token = secrets.token_urlsafe(24)
    try:
        command = voila_command(
            dashboards,
            port=args.port,
            lan=args.lan,
            token=token,
            pool_size=args.pool_size,
            preheat=not args.no_preheat,
            cull_idle_timeout=args.cull_idle_timeout,
            cull_interval=args.cull_interval,
            open_browser=args.open,
        )
    except ValueError as error:
        print(f"error: {error}", file=sys.stderr)
        return 2
    environment = voila_environment()
    if args.scenario is not None:
        scenario = args.scenario.resolve()
        if not scenario.is_file():
            print(f"error: scenario file {scenario} not found", file=sys.stderr)
            return 2
        environment[SCENARIO_ENVIRONMENT_VARIABLE] = str(scenario)
    host = lan_address() if args.lan else "127.0.0.1"
    query = f"?token={token}" if token else ""
    notebooks = sorted(p.name for p in dashboards.glob("*.ipynb")) if dashboards.is_dir() else []
    print("plantside dashboards:")
    for name in notebooks:
        print(f"  http://{host}:{args.port}/voila/render/{name}{query}")
    if not notebooks:
        print(f"  http://{host}:{args.port}/{query}")
    if args.lan:
        print(SECURITY_NOTE)
    print(
        "A preliminary design aid: final equipment selection by a licensed engineer "
        "under local codes."
    )
    if args.dry_run:
        print(" ".join(command))
        return 0
    sys.stdout.flush()
    if os.name == "posix":
        # Become the Voila process, so stopping this process stops the server and its kernels.
        os.execve(command[0], command, environment)
    try:  # pragma: no cover - other systems
        return subprocess.call(command, env=environment)
    except KeyboardInterrupt:  # pragma: no cover
        return 0


if __name__ == "__main__":
    raise SystemExit(main())
