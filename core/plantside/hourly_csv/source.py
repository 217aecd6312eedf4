"""Bytes of an hourly CSV file, with a size limit, decoded to text.

Both readers take the same sources and decode them the same way; every choice the
decoding makes (a byte-order mark, a fallback encoding) is written to the notes.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

from plantside.errors import InputFileError

__all__ = ["SourceText", "decode", "read_bytes", "read_text"]


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


def decode(data: bytes, name: str, notes: list[str]) -> str:
    """Text of ``data``: UTF-16 with a byte-order mark, UTF-8 (BOM or not), else Windows-1252.

    The fallback is written to ``notes``: the reader never silently guesses an
    encoding. Bytes that Windows-1252 leaves undefined are read as Latin-1 (noted).

    Raises
    ------
    InputFileError
        NUL bytes outside UTF-16 (a binary file), or a broken UTF-16 file.
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
