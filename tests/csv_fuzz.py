"""The fuzz harness shared by the weather and zone-load CSV fuzz tests.

A valid file is held as a :class:`Table` (headers split into name and unit, cells as
text) that mutations edit; :func:`mutated_tables` applies one to four random
mutations (columns dropped, swapped or relabelled, text and extreme numbers in cells,
unit words changed, rows dropped, repeated or broken, other separators and decimal
commas, and the reader's own argument mutations); :func:`file_bytes` writes the table
with a random line end and encoding and may then damage the bytes (truncation, junk,
a byte-order mark, other content). :func:`judge` reads the bytes and accepts only a
loaded result the reader's test checks, or a clean refusal whose every problem says
where it is.

Both readers go through one intake (``plantside.hourly_csv``); the harness is one too,
so a mutation added here fuzzes both. The example count and the printed case count
come from ``tests/fuzz_counts.py``, shared with the scenario fuzz.
"""

from __future__ import annotations

import re
import traceback
from collections import Counter
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field, replace

from hypothesis import strategies as st
from plantside.errors import InputFileError, InputRangeError

#: Text a person or a spreadsheet might leave in a number cell, including formula-
#: injection and path-like strings (they must be read as text, never acted on).
JUNK_CELLS = [
    "abc",
    "N/A",
    "",
    " ",
    "1.2.3",
    "--",
    "twelve",
    "=cmd|' /C calc'!A0",
    '=HYPERLINK("http://example.invalid")',
    "@SUM(1+1)",
    "+1+1",
    "../../etc/passwd",
    "C:\\Windows\\system.ini",
    "/dev/zero",
    "__import__('os').system('true')",
    "nan",
    "inf",
    "-inf",
    "Infinity",
    "1e999",
    "-1e999",
    "0x1A",
    "١٢",  # Arabic-Indic digits
    "12\u00a05",  # no-break space inside a number
    "1,5",
    '"quoted',
    "\x00",
    "\ufeff12",
]
EXTREME_NUMBERS = [
    "1e308",
    "-1e308",
    "1e-308",
    "5e-324",
    "0",
    "-0.0",
    "1e15",
    "-9999",
    "9999",
    "99999999999999999999",
    "1E+02",
    ".5",
    "+7",
]
SEPARATORS = [",", ";", "\t", "|", " "]


# ---------------------------------------------------------------------------------------
# a CSV as a structure that mutations edit
# ---------------------------------------------------------------------------------------
@dataclass
class Table:
    """A CSV file as headers (name + unit), rows of text cells, and how it is written."""

    names: list[str]  # quantity part of each header
    units: list[str]  # unit word of each header ("" for none)
    rows: list[list[str]]  # cells with '.' decimals
    style: str = "suffix"  # "suffix": name_unit; "paren": name (unit); "bracket": name [unit]
    separator: str = ","
    decimal_comma: bool = False
    comments: list[str] = field(default_factory=list)  # lines written above the header
    kwargs: dict = field(default_factory=dict)  # arguments of the reader

    def header(self, i: int) -> str:
        if not self.units[i]:
            return self.names[i]
        if self.style == "paren":
            return f"{self.names[i]} ({self.units[i]})"
        if self.style == "bracket":
            return f"{self.names[i]} [{self.units[i]}]"
        return f"{self.names[i]}_{self.units[i]}"

    def text(self, newline: str = "\n", final_newline: bool = True) -> str:
        def cell(value: str) -> str:
            if self.decimal_comma and re.fullmatch(r"-?\d+\.\d+", value):
                value = value.replace(".", ",")
            return value

        lines = list(self.comments)
        lines.append(self.separator.join(self.header(i) for i in range(len(self.names))))
        lines += [self.separator.join(cell(c) for c in row) for row in self.rows]
        return newline.join(lines) + (newline if final_newline else "")

    def copy(self) -> Table:
        return replace(
            self,
            names=list(self.names),
            units=list(self.units),
            rows=[list(r) for r in self.rows],
            comments=list(self.comments),
            kwargs=dict(self.kwargs),
        )


# ---------------------------------------------------------------------------------------
# mutations
# ---------------------------------------------------------------------------------------
_KINDS = [
    "drop_column",
    "swap_columns",
    "swap_headers",
    "text_in_number",
    "extreme_number",
    "unit_word",
    "rename_header",
    "drop_row",
    "repeat_row",
    "swap_rows",
    "extra_field",
    "missing_field",
    "blank_line",
    "separator",
    "decimal_comma",
]


def rearranged(table: Table, order, semicolon: bool) -> Table:
    """``table`` with its columns in ``order``, and with ``;`` and decimal commas if asked.

    Neither changes what the file says: a reader must give the same result.
    """
    table = replace(
        table,
        names=[table.names[i] for i in order],
        units=[table.units[i] for i in order],
        rows=[[row[i] for i in order] for row in table.rows],
    )
    return replace(table, separator=";", decimal_comma=True) if semicolon else table


@st.composite
def mutated_tables(
    draw,
    bases: list[Table],
    *,
    junk: list[str],
    extreme: list[str],
    unit_words: list[str],
    renames: list[str],
    arguments: Mapping[str, Callable] = {},
    base: Table | None = None,
):
    """A base table (``base`` or one of ``bases``) with one to four random mutations.

    ``arguments`` maps a mutation name to ``mutate(draw, table)`` changing the reader's
    arguments (``table.kwargs``).
    """
    table = (draw(st.sampled_from(bases)) if base is None else base).copy()
    for _ in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(_KINDS + list(arguments)))
        width, height = len(table.names), len(table.rows)
        if kind == "drop_column" and width > 1:
            i = draw(st.integers(0, width - 1))
            for part in (table.names, table.units):
                del part[i]
            for row in table.rows:
                if i < len(row):
                    del row[i]
        elif kind in ("swap_columns", "swap_headers") and width > 1:
            i, j = draw(st.integers(0, width - 1)), draw(st.integers(0, width - 1))
            for part in (table.names, table.units):
                part[i], part[j] = part[j], part[i]
            if kind == "swap_columns":
                for row in table.rows:
                    if max(i, j) < len(row):
                        row[i], row[j] = row[j], row[i]
        elif kind in ("text_in_number", "extreme_number") and height and width:
            r, c = draw(st.integers(0, height - 1)), draw(st.integers(0, width - 1))
            pool = junk if kind == "text_in_number" else extreme
            if c < len(table.rows[r]):
                table.rows[r][c] = draw(st.sampled_from(pool))
        elif kind == "unit_word" and width:
            table.units[draw(st.integers(0, width - 1))] = draw(st.sampled_from(unit_words))
        elif kind == "rename_header" and width:
            table.names[draw(st.integers(0, width - 1))] = draw(st.sampled_from(renames))
        elif kind == "drop_row" and height:
            del table.rows[draw(st.integers(0, height - 1))]
        elif kind == "repeat_row" and height:
            r = draw(st.integers(0, height - 1))
            table.rows.insert(r, list(table.rows[r]))
        elif kind == "swap_rows" and height > 1:
            i, j = draw(st.integers(0, height - 1)), draw(st.integers(0, height - 1))
            table.rows[i], table.rows[j] = table.rows[j], table.rows[i]
        elif kind == "extra_field" and height:
            table.rows[draw(st.integers(0, height - 1))].append(draw(st.sampled_from(["1", ""])))
        elif kind == "missing_field" and height:
            row = table.rows[draw(st.integers(0, height - 1))]
            if row:
                row.pop()
        elif kind == "blank_line" and height:
            table.rows.insert(draw(st.integers(0, height)), [])
        elif kind == "separator":
            table.separator = draw(st.sampled_from(SEPARATORS))
        elif kind == "decimal_comma":
            table.decimal_comma = draw(st.booleans())
        elif kind in arguments:
            arguments[kind](draw, table)
    return table


@st.composite
def file_bytes(draw, table_strategy, encodings: list[str]):
    """Serialised bytes of a (mutated) table, then byte-level damage; with its kwargs."""
    table = draw(table_strategy)
    newline = draw(st.sampled_from(["\n", "\r\n", "\r"]))
    text = table.text(newline, final_newline=draw(st.booleans()))
    encoding = draw(st.sampled_from(encodings))
    try:
        data = text.encode(encoding)
    except UnicodeEncodeError:
        data = text.encode("utf-8")
    damage = draw(st.sampled_from(["none", "none", "truncate", "junk", "replace", "bom"]))
    if damage == "truncate":
        data = data[: draw(st.integers(0, len(data)))]
    elif damage == "junk":
        at = draw(st.integers(0, len(data)))
        data = data[:at] + draw(st.binary(min_size=1, max_size=64)) + data[at:]
    elif damage == "replace":
        data = draw(
            st.one_of(
                st.just(b""),
                st.just(b"\n\n\r\n"),
                st.just(b"\xef\xbb\xbf"),
                st.just(b"\xff\xfe"),
                st.just(b"# only a comment\n"),
                st.binary(max_size=512),
                st.text(max_size=200).map(lambda s: s.encode("utf-8")),
            )
        )
    elif damage == "bom":
        data = draw(st.sampled_from([b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff"])) + data
    return data, table.kwargs


# ---------------------------------------------------------------------------------------
# the oracle
# ---------------------------------------------------------------------------------------
def _known_defect(error: BaseException, known_defects: Mapping) -> str | None:
    frames = traceback.extract_tb(error.__traceback__)
    ours = [f for f in frames if "/plantside/" in f.filename.replace("\\", "/")]
    if not ours:
        return None
    for (kind, function), defect in known_defects.items():
        if isinstance(error, kind) and ours[-1].name == function:
            return defect
    return None


def judge(
    read: Callable,
    data: bytes,
    kwargs: dict,
    *,
    outcomes: Counter,
    names_place: re.Pattern,
    check_loaded: Callable,
    known_defects: Mapping = {},
):
    """Read ``data``; return the result or the documented error; fail on anything else.

    A refusal must be an :class:`InputFileError` whose every problem matches
    ``names_place`` (names a row and/or a column), or an :class:`InputRangeError`
    naming its argument. A loaded result is checked by ``check_loaded``. Defects in
    ``known_defects`` ((exception type, plantside function) -> id) are counted, not
    failed, while they are unfixed.
    """
    try:
        result = read(data, **kwargs)
    except InputFileError as error:
        assert error.problems, "InputFileError without any problem listed"
        for problem in error.problems:
            assert names_place.search(problem), f"problem names no row or column: {problem!r}"
        assert str(error).startswith(error.source)
        outcomes["refused (InputFileError)"] += 1
        return error
    except InputRangeError as error:
        assert error.field and error.field in str(error), str(error)
        outcomes["refused (InputRangeError)"] += 1
        return error
    except Exception as error:
        defect = _known_defect(error, known_defects)
        if defect is None:
            raise
        outcomes[f"known defect {defect} (reported)"] += 1
        return error
    check_loaded(result, kwargs)
    outcomes["loaded"] += 1
    return result
