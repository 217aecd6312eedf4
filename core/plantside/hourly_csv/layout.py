"""From text to a table of cells: header row, separator, decimal comma, row numbers.

The header row is found by its column names: the reader says what a header must
name (``is_header``), and the first of the first :data:`HEADER_SEARCH_ROWS`
non-comment lines that does is the header. Lines above it that are not comments
(a station record, a title) are skipped and listed in the notes. When no line
qualifies, the first non-comment line is taken as the header, so that the reader
can say which columns are missing there.

Lines starting with ``#`` and blank lines before the header are comments. Row
numbers are line numbers of the file: the header of a file without comment lines
is row 1 and its first data row row 2.
"""

from __future__ import annotations

import csv
import io
import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from plantside.errors import InputFileError
from plantside.hourly_csv.messages import cell_text, rows_text
from plantside.hourly_csv.source import SourceText

__all__ = [
    "HEADER_SEARCH_ROWS",
    "MAX_LINE_CHARACTERS",
    "HourlyTable",
    "read_hourly_table",
    "separator_of",
]

#: Non-comment lines searched for the header row.
HEADER_SEARCH_ROWS = 20
#: Longest line accepted [characters] (an hourly row is well under 200).
MAX_LINE_CHARACTERS = 10_000
#: Separators recognised, in order of preference on a tie.
SEPARATORS = (",", ";", "\t")


@dataclass
class HourlyTable:
    """The cells of one hourly CSV file, with where they are in the file.

    One object per read: readers append to ``problems`` and ``notes`` as they check.

    Attributes
    ----------
    name : str
        The file's name, used in messages.
    frame : pandas.DataFrame
        One row per data row, one column per header cell; cells are text ("" when
        empty or missing).
    raw_headers : list of str
        The header cells as written (duplicates kept).
    header_row : int
        File row number of the header.
    separator : str
        ``,``, ``;`` or tab.
    decimal_comma : bool
        Whether a decimal comma is accepted (``;`` or tab separator).
    header_found : bool
        Whether a row naming the required columns was found (else the first
        non-comment line was taken as the header).
    searched_rows : tuple of int
        First and last file row searched for the header.
    notes, problems : list of str
        Notes and problems collected so far.
    """

    name: str
    frame: pd.DataFrame
    raw_headers: list[str]
    header_row: int
    separator: str
    decimal_comma: bool
    header_found: bool
    searched_rows: tuple[int, int]
    notes: list[str] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)

    @property
    def headers(self) -> list[str]:
        """Header of each column of ``frame``."""
        return [str(c) for c in self.frame.columns]

    @property
    def header_list(self) -> str:
        """The headers quoted and joined, for messages."""
        return ", ".join(repr(h) for h in self.headers)

    def row_numbers(self, index) -> np.ndarray:
        """File row numbers of data-row positions (0 = first data row)."""
        return np.asarray(index, dtype=int) + self.header_row + 1

    def rows_text(self, index) -> str:
        """:func:`~plantside.hourly_csv.messages.rows_text` of data-row positions."""
        return rows_text(self.row_numbers(index))

    def looked_for(self, what: str, names: Sequence[str], limit: int = 12) -> str:
        """Which names the header search looked for, for a missing-column message."""
        shown = ", ".join(repr(n) for n in names[:limit]) + (", ..." if len(names) > limit else "")
        first, last = self.searched_rows
        where = f"row {first}" if first == last else f"rows {first}-{last}"
        return (
            f"looked for a header row naming the {what} ({shown}; any case, spaces and "
            f"punctuation ignored) in {where}"
        )

    def fail(self):
        """Raise every problem collected so far as one :class:`InputFileError`."""
        raise InputFileError(self.name, self.problems)


def separator_of(line: str) -> str:
    """The separator of a header line: the most frequent of ``,``, ``;`` and tab."""
    return max(SEPARATORS, key=line.count)


def _cells(line: str) -> list[str]:
    try:
        return next(csv.reader([line], delimiter=separator_of(line)), [])
    except csv.Error:
        return []


def _is_comment(line: str) -> bool:
    return not line.strip() or line.lstrip().startswith("#")


def read_hourly_table(
    source: SourceText,
    *,
    is_header: Callable[[list[str]], bool],
    example_header: str,
    row_limit: Callable[[int, int], str | None],
) -> HourlyTable:
    """Find the header row and read the data rows as text cells.

    Parameters
    ----------
    source : SourceText
        The decoded file (:func:`plantside.hourly_csv.source.read_text`).
    is_header : callable
        ``is_header(cells)`` is True for a line of header cells naming the columns
        the reader needs.
    example_header : str
        A header the reader accepts, for the message on an empty file.
    row_limit : callable
        ``row_limit(data_rows, header_row)`` returns the message refusing a file of
        ``data_rows`` data rows, or None; asked before any row is parsed.

    Returns
    -------
    HourlyTable

    Raises
    ------
    InputFileError
        An empty file, too many rows, a line too long, rows with more fields than
        the header, or a header without data rows.
    """
    name, notes = source.name, source.notes
    lines = source.text.replace("\r\n", "\n").replace("\r", "\n").split("\n")
    if lines and lines[-1] == "":
        lines.pop()

    def refuse(problem: str):
        raise InputFileError(name, [problem])

    candidates = [i for i, line in enumerate(lines) if not _is_comment(line)]
    if not candidates:
        refuse(
            "row 1: the file is empty (no header row, no columns); expected a header such "
            f"as {example_header!r} and one row per hour"
        )
    searched = candidates[:HEADER_SEARCH_ROWS]
    header = None
    for index in searched:
        if len(lines[index]) > MAX_LINE_CHARACTERS:
            break
        if is_header([c.strip() for c in _cells(lines[index])]):
            header = index
            break
    header_found = header is not None
    if header is None:
        header = candidates[0]
    header_row = header + 1
    skipped = [i for i in candidates if i < header]
    if skipped:
        shown = "; ".join(cell_text(lines[i]) for i in skipped[:3])
        notes.append(
            f"skipped {rows_text(np.asarray(skipped) + 1)} above the header (row {header_row}), "
            f"not column names: {shown}"
        )

    message = row_limit(len(lines) - header - 1, header_row)
    if message:
        refuse(message)
    header_line = lines[header]
    if len(header_line) > MAX_LINE_CHARACTERS:
        refuse(
            f"row {header_row}: the header is {len(header_line):,} characters long (more than "
            f"{MAX_LINE_CHARACTERS:,}), so no columns can be read; is this an hourly CSV file?"
        )
    lengths = np.fromiter(
        map(len, lines[header + 1 :]), dtype=np.int64, count=len(lines) - header - 1
    )
    too_long = np.flatnonzero(lengths > MAX_LINE_CHARACTERS)
    if too_long.size:
        row = header_row + 1 + int(too_long[0])
        refuse(
            f"row {row}: cannot be read as CSV (a line of {lengths[too_long[0]]:,} characters, "
            f"more than {MAX_LINE_CHARACTERS:,}; is this an hourly CSV file?)"
        )
    separator = separator_of(header_line)
    raw_headers = next(csv.reader([header_line], delimiter=separator), [])
    body = "\n".join(lines[header:])
    extra_rows: list[str] = []
    try:
        frame = _parse(body, separator)
    except pd.errors.ParserError as error:
        match = re.search(r"Expected (\d+) fields in line (\d+), saw (\d+)", str(error))
        if not match:
            refuse(f"row {header_row}: the file cannot be read as CSV")
        frame, extra_rows = _parse_with_extra_fields(body, separator, header_row)
        if frame is None:
            expected, line, saw = (int(g) for g in match.groups())
            refuse(
                f"row {line + header}: {saw} fields where the header (row {header_row}) has "
                f"{expected} columns; check the separator {separator!r} and decimal marks"
            )
    except csv.Error as error:
        refuse(f"row {header_row}: the file cannot be read as CSV ({error})")
    except pd.errors.EmptyDataError:
        refuse(f"row {header_row}: the file is empty (no columns)")
    frame = frame.fillna("")
    table = HourlyTable(
        name=name,
        frame=frame,
        raw_headers=list(raw_headers),
        header_row=header_row,
        separator=separator,
        decimal_comma=separator in (";", "\t"),
        header_found=header_found,
        searched_rows=(searched[0] + 1, searched[-1] + 1),
        notes=notes,
        problems=extra_rows,
    )
    # Trailing rows in which every field is empty (spreadsheet export debris) are dropped.
    filled = (frame.apply(lambda column: column.str.strip()) != "").any(axis=1).to_numpy()
    last = int(np.flatnonzero(filled)[-1]) + 1 if filled.any() else 0
    if last < len(frame):
        notes.append(
            f"ignored {len(frame) - last} empty row(s) at the end of the file "
            f"({table.rows_text(np.arange(last, len(frame)))})"
        )
        table.frame = frame = frame.iloc[:last]
    if len(frame) == 0:
        refuse(
            f"row {header_row + 1}: the file has a header but no data rows "
            f"(columns: {', '.join(repr(str(c)) for c in frame.columns)})"
        )
    return table


def _parse(body: str, separator: str, **options) -> pd.DataFrame:
    return pd.read_csv(
        io.StringIO(body),
        sep=separator,
        dtype=str,
        keep_default_na=False,
        skip_blank_lines=False,
        engine="c",
        quotechar='"',
        **({"header": 0} | options),
    )


def _parse_with_extra_fields(body: str, separator: str, header_row: int):
    """Read a file some of whose rows have more fields than the header.

    Every such row is reported (not only the first); fields after the last column
    that are empty (a trailing separator) are accepted. Returns (frame, problems),
    or (None, []) when the file cannot be read this way either.
    """
    columns = _parse(body.split("\n", 1)[0], separator).columns
    width = len(columns)
    lines = np.array(body.split("\n")[1:], dtype=str)
    most = int(np.char.count(lines, separator).max(initial=0)) + 1
    try:
        wide = _parse(body, separator, header=None, skiprows=1, names=range(max(most, width)))
    except (pd.errors.ParserError, csv.Error, ValueError):
        return None, []
    wide = wide.fillna("")
    extra = wide.iloc[:, width:]
    filled = (extra.apply(lambda column: column.str.strip()) != "").to_numpy()
    over = filled.any(axis=1)
    problems = []
    if over.any():
        index = np.flatnonzero(over)
        fields = width + filled.shape[1] - np.argmax(filled[:, ::-1], axis=1)
        rows = index + header_row + 1
        first = f"{fields[index[0]]} fields where the header (row {header_row}) has {width} columns"
        where = rows_text(rows)
        if index.size > 1:
            first = (
                f"more fields than the header (row {header_row}) has columns ({width}); "
                f"first row {rows[0]}: {first}"
            )
        problems.append(f"{where}: {first}; check the separator {separator!r} and decimal marks")
    frame = wide.iloc[:, :width].copy()
    frame.columns = columns
    return frame, problems
