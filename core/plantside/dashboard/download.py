"""Deliver a file from the kernel to the browser user's downloads.

Voila serves the dashboard from a server the user may not have access to, so
an export written to the server's disk never reaches the person who clicked.
:class:`BrowserDownload` is a small anywidget: :meth:`BrowserDownload.send_file`
sends the bytes to the page in a custom widget message, and the page's script
(``download.js``, shipped in this package; nothing is loaded from a network)
wraps them in a blob and clicks a hidden link, so the browser saves the file.
"""

from __future__ import annotations

from pathlib import Path

import anywidget
import traitlets

from plantside.charts.export import safe_filename  # re-exported: the dashboard's name

__all__ = ["MAX_DOWNLOAD_BYTES", "BrowserDownload", "safe_filename"]

#: Largest file sent to a browser in one message [bytes]; an hourly year as CSV is ~1 MB.
MAX_DOWNLOAD_BYTES = 50 * 1024 * 1024


class BrowserDownload(anywidget.AnyWidget):
    """Invisible widget that makes the browser save bytes sent from the kernel.

    Display it once in the dashboard layout; then call :meth:`send_file`.

    Attributes
    ----------
    delivered : int
        Number of files the page reports having handed to the browser.
    """

    _esm = Path(__file__).with_name("download.js")
    delivered = traitlets.Int(0).tag(sync=True)

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.sent: list[tuple[str, str, int]] = []

    @traitlets.validate("delivered")
    def _validate_delivered(self, proposal):
        # Any page can send widget messages: accept only a non-negative count.
        value = proposal["value"]
        return value if isinstance(value, int) and value >= 0 else self.delivered

    def send_file(self, data: bytes, filename: str, mime: str = "application/octet-stream"):
        """Send ``data`` to the page, which saves it as ``filename``.

        Parameters
        ----------
        data : bytes
            File content.
        filename : str
            Suggested name of the download (made safe by :func:`safe_filename`).
        mime : str
            Media type, e.g. ``"image/png"``, ``"image/svg+xml"``, ``"text/csv"``.

        Returns
        -------
        str
            The file name actually sent.
        """
        payload = bytes(data)
        if len(payload) > MAX_DOWNLOAD_BYTES:
            raise ValueError(
                f"download of {len(payload)} bytes exceeds the limit of {MAX_DOWNLOAD_BYTES} bytes"
            )
        name = safe_filename(filename)
        self.send({"kind": "plantside-download", "filename": name, "mime": mime}, [payload])
        self.sent.append((name, mime, len(payload)))
        return name
