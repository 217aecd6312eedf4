"""The chart widget's script, bundled once and kept on disk, so a page fetches nothing.

Altair's chart widget (``alt.JupyterChart``) loads Vega, Vega-Lite and Vega-Embed from a
CDN unless ``JupyterChart.enable_offline()`` is called, which bundles them into one
script with vl-convert. That call starts vl-convert's JavaScript engine inside the
process: measured on a 2-core machine, 1.2 s and about 105 MB of memory that the engine
keeps for the life of the process. In a dashboard kernel (one per page view) both would
be paid on every page.

:func:`use_offline_charts` gives the chart widget the same script without that cost in
the kernel: the script is made once per set of versions (Altair, vl-convert, Vega-Lite)
by a short-lived child process and kept in plantside's cache folder; later kernels read
the file (0.9 MB). If the folder cannot be written, the kernel falls back to Altair's
own ``enable_offline()`` and the page still fetches nothing.

The cache folder is ``$PLANTSIDE_CACHE_DIR``, else ``$XDG_CACHE_HOME/plantside``, else
``~/.cache/plantside``. Deleting it is always safe.
"""

from __future__ import annotations

import contextlib
import hashlib
import os
import subprocess
import sys
import tempfile
from pathlib import Path

import altair as alt

__all__ = ["CACHE_ENVIRONMENT_VARIABLE", "bundle_path", "cache_folder", "use_offline_charts"]

#: Environment variable naming the folder the bundled script is kept in.
CACHE_ENVIRONMENT_VARIABLE = "PLANTSIDE_CACHE_DIR"
#: The child process that makes the script gets this long [s].
_BUNDLE_TIMEOUT_S = 300


def cache_folder(environ=None) -> Path:
    """plantside's cache folder (module notes)."""
    environ = os.environ if environ is None else environ
    if environ.get(CACHE_ENVIRONMENT_VARIABLE):
        return Path(environ[CACHE_ENVIRONMENT_VARIABLE])
    base = environ.get("XDG_CACHE_HOME") or Path.home() / ".cache"
    return Path(base) / "plantside"


def _versions_key() -> str:
    """A digest of everything the bundled script depends on."""
    from importlib.metadata import version

    from plantside.charts.altair_internals import chart_widget_sources

    # vl-convert's version from its metadata: importing it costs 8 MB a kernel never uses
    converter = version("vl-convert-python")
    parts = (alt.__version__, converter, *chart_widget_sources())
    return hashlib.sha256("\0".join(parts).encode("utf-8")).hexdigest()[:20]


def bundle_path(environ=None) -> Path:
    """Where the bundled script for the installed versions is kept."""
    return cache_folder(environ) / f"chart-widget-{_versions_key()}.js"


def _write_bundle(path: Path) -> None:
    """Bundle the script in this process and write it to ``path`` atomically."""
    alt.JupyterChart.enable_offline()
    text = alt.JupyterChart._esm
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(dir=path.parent, prefix=".chart-widget-", suffix=".js")
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as file:
            file.write(text)
        os.chmod(temporary, 0o644)  # mkstemp makes it private; any user's kernel may read it
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise


def _bundle_in_child(path: Path) -> None:
    """Make the script in a child process, one process at a time (a lock file)."""
    import fcntl

    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path.parent / ".chart-widget.lock", "w") as lock:
        fcntl.flock(lock, fcntl.LOCK_EX)  # eight kernels starting at once: one bundles
        if path.is_file():
            return
        subprocess.run(
            [sys.executable, "-m", "plantside.dashboard.offline_charts", str(path)],
            check=True,
            timeout=_BUNDLE_TIMEOUT_S,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )


def _cached_bundle(environ=None) -> str | None:
    """The bundled script from the cache, made first if missing; None if that fails."""
    try:
        path = bundle_path(environ)
        if not path.is_file():
            _bundle_in_child(path)
        text = path.read_text(encoding="utf-8")
    except (OSError, subprocess.SubprocessError, ImportError):
        return None
    return text or None


def use_offline_charts(environ=None) -> None:
    """Give Altair's chart widget its bundled script (module notes); once per process."""
    if alt.JupyterChart._is_offline:
        return
    text = _cached_bundle(environ)
    if text is None:  # no cache folder to write to: bundle here, as Altair does
        alt.JupyterChart.enable_offline()
        return
    # What JupyterChart.enable_offline() sets, with the script it would have made.
    alt.JupyterChart._esm = text
    alt.JupyterChart._is_offline = True


if __name__ == "__main__":  # the child process of _bundle_in_child
    _write_bundle(Path(sys.argv[1]))
