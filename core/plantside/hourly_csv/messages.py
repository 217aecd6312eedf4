"""How row numbers and cell text are written in the messages of every reader."""

from __future__ import annotations

import numpy as np

__all__ = ["cell_text", "rows_text"]


def rows_text(rows, limit: int = 8) -> str:
    """Row numbers as people read them: ``row 5`` or ``rows 5, 9-12, 40 (6 rows)``.

    Parameters
    ----------
    rows : array_like of int
        File row numbers (any order; repeats are counted once).
    limit : int
        Most runs written out; more are shown as ``...``.

    Returns
    -------
    str
    """
    rows = np.unique(np.asarray(rows, dtype=int))
    if rows.size == 0:
        return "no rows"
    if rows.size == 1:
        return f"row {rows[0]}"
    breaks = np.flatnonzero(np.diff(rows) != 1)
    starts = np.concatenate(([rows[0]], rows[breaks + 1]))
    ends = np.concatenate((rows[breaks], [rows[-1]]))
    parts = [f"{a}" if a == b else f"{a}-{b}" for a, b in zip(starts, ends, strict=True)]
    text = ", ".join(parts[:limit]) + (", ..." if len(parts) > limit else "")
    return f"rows {text} ({rows.size} rows)"


def cell_text(text: str, limit: int = 60) -> str:
    """A cell or line quoted for a message, shortened to ``limit`` characters."""
    text = str(text)
    if len(text) > limit:
        text = text[: limit - 3] + "..."
    return repr(text)
