"""Cells to numbers and to on/off flags, all rows of a column at once."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

__all__ = ["FLAG_FALSE", "FLAG_TRUE", "MISSING_MARKERS", "ParsedColumn", "flags", "numbers"]

#: Cell texts read as "no value" (compared in lower case, stripped).
MISSING_MARKERS = frozenset({"", "na", "n/a", "nan", "null", "none"})
#: Cell texts read as on / off in a flag column (lower case).
FLAG_TRUE = frozenset({"1", "true", "yes", "y", "t"})
FLAG_FALSE = frozenset({"0", "false", "no", "n", "f"})


@dataclass(frozen=True)
class ParsedColumn:
    """The numbers of one column and which cells could not give one.

    Attributes
    ----------
    values : numpy.ndarray
        Values in the file's unit; NaN where ``missing`` or ``text``. May hold
        ±inf where the cell was an infinite number (``inf``, ``1e999``).
    missing : numpy.ndarray of bool
        Empty cells and missing-value markers.
    text : numpy.ndarray of bool
        Cells that are not a number (text, ``1.2.3``, ...).
    """

    values: np.ndarray
    missing: np.ndarray
    text: np.ndarray

    @property
    def infinite(self) -> np.ndarray:
        """Cells holding an infinite number."""
        return np.isinf(self.values)


def numbers(
    cells: pd.Series, *, decimal_comma: bool, missing_markers=MISSING_MARKERS
) -> ParsedColumn:
    """Numbers of a column of text cells.

    Parameters
    ----------
    cells : pandas.Series of str
        The cells as written.
    decimal_comma : bool
        Read ``12,5`` as 12.5 (files separated by ``;`` or tab).
    missing_markers : set of str
        Lower-case cell texts that mean "no value".
    """
    cells = cells.astype(str).str.strip()
    missing = cells.str.lower().isin(missing_markers).to_numpy()
    if decimal_comma:
        cells = cells.str.replace(",", ".", regex=False)
    values = pd.to_numeric(cells.where(~missing), errors="coerce").to_numpy(dtype=float, copy=True)
    text = np.isnan(values) & ~missing
    values[text | missing] = np.nan
    return ParsedColumn(values=values, missing=missing, text=text)


def flags(cells: pd.Series) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """On/off flags of a column: (values, empty cells, cells that are not a flag).

    ``1/0``, ``true/false``, ``yes/no``, ``y/n``, ``t/f`` in any case.
    """
    lower = cells.astype(str).str.strip().str.lower()
    on = lower.isin(FLAG_TRUE).to_numpy()
    off = lower.isin(FLAG_FALSE).to_numpy()
    empty = (lower == "").to_numpy()
    return on, empty, ~(on | off | empty)
