"""Bytes of an hourly CSV file, with a size limit, decoded to text.

Both readers take the same sources and decode them the same way; every choice the
decoding makes (a byte-order mark, a fallback encoding) is written to the notes.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

from plantside.errors import InputFileError

__all__ = ["SourceText", "binary_kind", "decode", "read_bytes", "read_text"]


@dataclass
class SourceText:
    """A file's text, the name used in messages, and what decoding it noted.

    Attributes
    ----------
    text : str
        The decoded text.
    name : str
        The file name (or the caller's name for an upload), used in every message.
    stem : str or None
        The file name without extension, for a path; None for content.
    notes : list of str
        Notes made while reading (e.g. the Windows-1252 fallback).
    """

    text: str
    name: str
    stem: str | None
    notes: list[str] = field(default_factory=list)


def size_message(size: int, max_bytes: int) -> str:
    """The message for a file above ``max_bytes`` (the same for every reader)."""
    return (
        f"the file is {size:,} bytes (or more), above the limit of {max_bytes:,} bytes "
        f"(max_bytes): at most {max_bytes:,} bytes are accepted; an hourly year is usually "
        f"under 1 MB: check that this is an hourly CSV file, or raise max_bytes. Nothing "
        f"was read (row 1 onwards, all columns)"
    )


def read_bytes(
    source, *, max_bytes: int, kind: str, name: str | None = None, text_allowed: bool = False
) -> tuple[bytes, str, str | None]:
    """Bytes of ``source``, the name used in messages, and the file stem (paths only).

    Parameters
    ----------
    source : str, os.PathLike, bytes, bytearray, memoryview or file object
        A path, or the content (an upload) as bytes or an open file. A ``str`` is a
        path, unless ``text_allowed`` and it contains a line break (then it is the
        content). Content is never used as a path.
    max_bytes : int
        Largest file accepted [bytes]; a larger one is refused before it is read
        (a stream is read up to ``max_bytes + 1`` bytes only).
    kind : str
        What the file is, for messages (``"weather file"``, ``"zone loads"``).
    name : str, optional
        Name used in messages instead of the file's own.
    text_allowed : bool
        Whether a ``str`` with a line break is content rather than a path.

    Raises
    ------
    InputFileError
        Missing file, a folder, an unreadable file, or above ``max_bytes``.
    """
    stem = None
    if isinstance(source, bytes | bytearray | memoryview):
        data = bytes(source)
        name = name or kind
    elif isinstance(source, str) and text_allowed and ("\n" in source or "\r" in source):
        data = source.encode("utf-8")
        name = name or kind
    elif isinstance(source, str | os.PathLike):
        path = Path(source)
        name = name or path.name
        stem = path.stem
        try:
            size = path.stat().st_size
            if path.is_dir():
                raise IsADirectoryError
            if size > max_bytes:
                raise InputFileError(name, [size_message(size, max_bytes)])
            data = path.read_bytes()
        except FileNotFoundError:
            raise InputFileError(name, [f"no file '{path.name}' was found"]) from None
        except IsADirectoryError:
            raise InputFileError(name, [f"'{path.name}' is a folder, not a file"]) from None
        except OSError as error:
            raise InputFileError(name, [f"the file cannot be read ({error.strerror})"]) from None
    elif hasattr(source, "read"):
        data = source.read(max_bytes + 1)
        if isinstance(data, str):
            data = data.encode("utf-8")
        name = name or str(getattr(source, "name", kind))
    else:
        raise InputFileError(name or kind, [f"cannot read a {kind} from a {type(source).__name__}"])
    if len(data) > max_bytes:
        raise InputFileError(name, [size_message(len(data), max_bytes)])
    return data, name, stem


#: Start of files that are never CSV text, by what they are (their published signatures).
_SIGNATURES = {
    b"\x89PNG": "a PNG image",
    b"GIF8": "a GIF image",
    b"\xff\xd8\xff": "a JPEG image",
    b"%PDF": "a PDF document",
    b"PK\x03\x04": "a ZIP archive, such as an .xlsx workbook",
    b"\xd0\xcf\x11\xe0": "an .xls workbook or another Office file",
    b"\x1f\x8b": "a gzip archive",
}
#: Largest share of control bytes (other than tab, line feed, carriage return and form
#: feed) in a text file; a CSV has none, random or compressed bytes about 1 in 9.
MAX_CONTROL_SHARE = 0.01
_CONTROL_BYTES = bytes([*range(0, 9), 11, *range(14, 32), 127])


def binary_kind(data: bytes) -> str:
    """What ``data`` is if it is not text (e.g. "a PNG image"), or "" for text.

    A file is not text if it starts with the signature of an image, document or
    archive, or if more than :data:`MAX_CONTROL_SHARE` of its bytes are control
    characters (counted on the raw bytes, before any decoding).

    Examples
    --------
    >>> binary_kind(b"\\x89PNG\\r\\n\\x1a\\n...")
    'a PNG image'
    >>> binary_kind(b"drybulb_C\\n20.5\\n")
    ''
    """
    for signature, kind in _SIGNATURES.items():
        if data.startswith(signature):
            return kind
    if not data:
        return ""
    controls = len(data) - len(data.translate(None, _CONTROL_BYTES))
    if controls > MAX_CONTROL_SHARE * len(data):
        return f"{controls:,} of its {len(data):,} bytes are control characters"
    return ""


def decode(data: bytes, name: str, notes: list[str]) -> str:
    """Text of ``data``: UTF-16 with a byte-order mark, UTF-8 (BOM or not), else Windows-1252.

    The fallback is written to ``notes``: the reader never silently guesses an
    encoding. Bytes that Windows-1252 leaves undefined are read as Latin-1 (noted).

    Raises
    ------
    InputFileError
        NUL bytes outside UTF-16, any other file that is not text
        (:func:`binary_kind`), or a broken UTF-16 file.
    """
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        try:
            return data.decode("utf-16")
        except UnicodeDecodeError:
            raise InputFileError(name, ["row 1: the file cannot be read as UTF-16 text"]) from None
    if b"\x00" in data:
        row = data[: data.index(b"\x00")].count(b"\n") + 1
        raise InputFileError(
            name,
            [
                f"row {row}: the file contains NUL bytes: it is not a text (CSV) file; save "
                f"it as UTF-8 CSV"
            ],
        )
    binary = binary_kind(data)
    if binary:
        raise InputFileError(
            name, [f"row 1: the file is not text ({binary}); save it as a UTF-8 CSV file"]
        )
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        pass
    try:
        text = data.decode("cp1252")
        notes.append("the file is not UTF-8; it was read as Windows-1252 text")
        return text
    except UnicodeDecodeError:
        notes.append("the file is neither UTF-8 nor Windows-1252; it was read as Latin-1 text")
        return data.decode("latin-1")


def read_text(
    source, *, max_bytes: int, kind: str, name: str | None = None, text_allowed: bool = False
) -> SourceText:
    """Read and decode ``source`` (see :func:`read_bytes` and :func:`decode`)."""
    data, name, stem = read_bytes(
        source, max_bytes=max_bytes, kind=kind, name=name, text_allowed=text_allowed
    )
    notes: list[str] = []
    text = decode(data, name, notes)
    return SourceText(text=text, name=name, stem=stem, notes=notes)
