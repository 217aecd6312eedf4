"""Damage done to a whole TOML file's text and bytes, shared by the scenario and sweep fuzz.

A file a person saves can arrive cut short, with junk bytes inside, with Windows line
ends or a byte-order mark, replaced by other text, or in another encoding; each reader
must load it or refuse it with a message naming a field.
"""

from __future__ import annotations

from hypothesis import strategies as st

#: How a file is damaged ("none": only re-encoded).
DAMAGES = ("none", "truncate", "junk", "crlf", "bom", "replace")


def damaged_bytes(text: str, damage: str, encoding: str, data) -> bytes:
    """``text`` damaged by ``damage`` and encoded in ``encoding``; ``data`` is hypothesis' draw.

    Text the encoding cannot hold is written as UTF-8 instead (a file saved by an editor
    that ignored the chosen encoding).
    """
    if damage == "truncate":
        text = text[: data.draw(st.integers(0, len(text)))]
    elif damage == "crlf":
        text = text.replace("\n", "\r\n")
    elif damage == "bom":
        text = "\ufeff" + text
    elif damage == "replace":
        text = data.draw(st.text(max_size=300))
    try:
        raw = text.encode(encoding)
    except UnicodeEncodeError:
        raw = text.encode("utf-8")
    if damage == "junk":
        at = data.draw(st.integers(0, len(raw)))
        raw = raw[:at] + data.draw(st.binary(min_size=1, max_size=40)) + raw[at:]
    return raw
