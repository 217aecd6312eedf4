"""The guard every scenario and sweep file passes before and while it is parsed.

A TOML file comes from a user or, through the dashboard, from anyone who can reach the
page; it is refused at the edge, with a :class:`plantside.errors.ScenarioError` naming
the file and the limit, when it

- is missing, unreadable or has a file name longer than :data:`MAX_NAME_CHARS`;
- is larger than :data:`MAX_SCENARIO_BYTES` (a study is a few kilobytes);
- is not UTF-8 text;
- nests arrays or inline tables deeper than :data:`MAX_TOML_DEPTH`, counted on the raw
  text before :mod:`tomllib` sees it (its parser recurses once per level, so a file of
  ``[[[[...`` would otherwise end in a ``RecursionError``), or nests tables deeper than
  that through dotted keys (``a.b.c.d... = 1``), counted on the parsed document;
- is not valid TOML.

Messages quote at most a short excerpt of a file name or a value
(:func:`plantside.errors.excerpt`).

Written back (the scenario and air-handler tables), a number is rounded to
:data:`SAVE_SIGNIFICANT_DIGITS` significant digits (:func:`saved_number`).
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

from plantside.errors import ScenarioError, excerpt

__all__ = [
    "MAX_NAME_CHARS",
    "MAX_SCENARIO_BYTES",
    "MAX_TOML_DEPTH",
    "SAVE_SIGNIFICANT_DIGITS",
    "parse_toml_text",
    "read_toml_text",
    "saved_number",
    "toml_depth",
]

#: Largest scenario or sweep file read [bytes]; a study is a few kilobytes.
MAX_SCENARIO_BYTES = 1_000_000
#: Deepest nesting of arrays, inline tables and tables accepted [levels]; a scenario
#: uses at most four (``[[air_handler]]`` > ``zone`` > a value), a sweep five.
MAX_TOML_DEPTH = 32
#: Longest file name (with its folders) accepted [characters]; Linux allows 4,096 bytes.
MAX_NAME_CHARS = 4096

# Tokens of the raw text that matter for nesting: dotted keys (each part one table
# level), strings and comments (whose brackets do not count) and the brackets themselves.
_KEY_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*')"""
_TOKENS = re.compile(
    rf"(?P<key>{_KEY_PART}(?:[ \t]*\.[ \t]*{_KEY_PART})+)"
    r'|"""(?:[^"\\]|\\.|"(?!""))*"""?"?'
    r"|'''(?:[^']|'(?!''))*'''?'?"
    r'|"(?:[^"\\\n]|\\.)*"'
    r"|'[^'\n]*'"
    r"|#[^\n]*"
    r"|[\[\]{}]",
    re.DOTALL,
)
_KEY_DOTS = re.compile(rf"{_KEY_PART}|\.")


def toml_depth(text: str) -> int:
    """Deepest nesting of ``[`` and ``{`` in TOML text, outside strings and comments.

    Parameters
    ----------
    text : str
        TOML text (need not be valid).

    Returns
    -------
    int
        The largest number of levels open at once: brackets (a table header ``[a]``
        counts 1, ``[[a]]`` 2, ``x = [[1, 2]]`` 2) plus the parts of a dotted key there
        (``[a.b]`` 3, ``a.b.c = 1`` 3; a decimal number such as ``1.5`` counts 2, which
        only overstates). Unbalanced closing brackets never go below 0.
    """
    depth = deepest = 0
    for match in _TOKENS.finditer(text):
        token = match.group()
        if match.group("key") is not None:  # a dotted key: one level per part
            parts = sum(1 for m in _KEY_DOTS.finditer(token) if m.group() != ".")
            deepest = max(deepest, depth + parts)
        elif token in ("[", "{"):
            depth += 1
            deepest = max(deepest, depth)
        elif token in ("]", "}"):
            depth = max(0, depth - 1)
    return deepest


def _data_depth(data: dict) -> int:
    """Deepest nesting of tables and arrays in parsed TOML, walked without recursion."""
    deepest = 0
    stack = [(data, 1)]
    while stack:
        value, depth = stack.pop()
        deepest = max(deepest, depth)
        if depth > MAX_TOML_DEPTH:
            break
        children = value.values() if isinstance(value, dict) else value
        stack.extend((c, depth + 1) for c in children if isinstance(c, dict | list))
    return deepest


def parse_toml_text(text: str, source: str) -> dict:
    """Parse scenario or sweep TOML text after the depth check.

    Parameters
    ----------
    text : str
        The document (e.g. an upload, or what :func:`read_toml_text` returned).
    source : str
        Name used in messages (shortened to an excerpt there).

    Returns
    -------
    dict
        The parsed document.

    Raises
    ------
    ScenarioError
        If the text nests deeper than :data:`MAX_TOML_DEPTH` or is not valid TOML.
    """
    too_deep = (
        f"nested more than {MAX_TOML_DEPTH} levels deep (arrays, inline tables or dotted "
        "keys); a scenario needs at most a few"
    )
    if toml_depth(text) > MAX_TOML_DEPTH:
        raise ScenarioError(source, "(file)", too_deep)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise ScenarioError(source, "(syntax)", f"not valid TOML: {excerpt(str(error))}") from None
    except RecursionError:  # a nesting the raw count missed; never a traceback
        raise ScenarioError(source, "(file)", too_deep) from None
    if _data_depth(data) > MAX_TOML_DEPTH:
        raise ScenarioError(source, "(file)", too_deep)
    return data


def read_toml_text(path_or_bytes, source: str | None = None) -> str:
    """The text of a scenario or sweep file, after the checks every such file gets.

    Parameters
    ----------
    path_or_bytes : path-like or bytes
        The ``.toml`` file, or its content (an upload).
    source : str, optional
        Name used in messages; default the path.

    Returns
    -------
    str
        The file's text (UTF-8, a byte-order mark dropped).

    Raises
    ------
    ScenarioError
        If the file is missing or unreadable, its name is longer than
        :data:`MAX_NAME_CHARS`, it is larger than :data:`MAX_SCENARIO_BYTES` or it is
        not UTF-8 text.
    """
    limit = f"larger than the {MAX_SCENARIO_BYTES // 1000} kB allowed"
    if isinstance(path_or_bytes, bytes | bytearray | memoryview):
        data = bytes(path_or_bytes)
        source = "<upload>" if source is None else source
        if len(data) > MAX_SCENARIO_BYTES:
            raise ScenarioError(source, "(file)", limit)
    else:
        name = str(path_or_bytes)
        source = name if source is None else source
        if len(name) > MAX_NAME_CHARS:
            raise ScenarioError(
                source, "(file)", f"file name longer than the {MAX_NAME_CHARS} characters allowed"
            )
        path = Path(name)
        try:
            if not path.is_file():
                raise ScenarioError(source, "(file)", "file not found")
            if path.stat().st_size > MAX_SCENARIO_BYTES:
                raise ScenarioError(source, "(file)", limit)
            data = path.read_bytes()
        except OSError as error:
            reason = error.strerror or type(error).__name__
            raise ScenarioError(source, "(file)", f"cannot be read ({reason})") from None
        if len(data) > MAX_SCENARIO_BYTES:  # grew since stat
            raise ScenarioError(source, "(file)", limit)
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise ScenarioError(source, "(file)", f"not UTF-8 text ({error.reason})") from None


#: Significant digits of a number written to a scenario file: enough for any figure a
#: design team types or a control sets (0.1 °F in 100 °F, 1 cfm in 100,000 cfm), few enough
#: that a unit round trip (55 °F -> 12.777... °C -> 55 °F) writes back what was typed
#: (plantside's choice).
SAVE_SIGNIFICANT_DIGITS = 6


def saved_number(value) -> float:
    """``value`` as written to a scenario file: :data:`SAVE_SIGNIFICANT_DIGITS` digits.

    Examples
    --------
    >>> saved_number((57.0 - 32.0) / 1.8 * 1.8 + 32.0)
    57.0
    >>> saved_number(2123.7634944)
    2123.76
    """
    return float(f"{float(value):.{SAVE_SIGNIFICANT_DIGITS}g}")
