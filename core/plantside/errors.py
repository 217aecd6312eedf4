"""Exception types raised where a bad value enters the model.

Every error names the field, the offending value and what is allowed, so the
dashboard and the command line can show the message as it is.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

__all__ = [
    "InputFileError",
    "InputRangeError",
    "PlantsideError",
    "ScenarioError",
    "check_choice",
    "check_range",
    "excerpt",
]

#: Longest file name or value quoted whole in a message [characters]; longer ones are
#: shortened by :func:`excerpt`, so a message never echoes a huge input back.
EXCERPT_CHARS = 80
#: The same for a file name (with its folders) or a field name [characters].
NAME_EXCERPT_CHARS = 160
#: Most further mistakes of a scenario file listed in one message (the rest are counted).
MAX_LISTED_MISTAKES = 20


def excerpt(text, limit: int = EXCERPT_CHARS) -> str:
    """``text`` (any object, as ``str``) shortened to at most ``limit`` characters.

    The start and the end are kept (a file name's folder and its own name) with ``...``
    between them.

    Examples
    --------
    >>> excerpt("a" * 100, 11)
    'aaaa...aaaa'
    """
    text = str(text)
    if len(text) <= limit:
        return text
    keep = max(2, limit - 3)
    head = (keep + 1) // 2
    return text[:head] + "..." + text[len(text) - (keep - head) :]


class PlantsideError(Exception):
    """Base class of every error plantside raises on purpose."""


class InputRangeError(PlantsideError, ValueError):
    """A value (scalar or element of an array) outside its allowed range.

    Attributes
    ----------
    field : str
        Name of the quantity, as the caller calls it (e.g. ``"humidity_ratio"``).
    allowed : str
        Human-readable allowed range, with unit.
    indices : tuple of int
        Flat indices of the invalid elements (empty for a scalar).
    """

    def __init__(self, field: str, message: str, allowed: str = "", indices: Sequence[int] = ()):
        self.field = field
        self.allowed = allowed
        self.indices = tuple(int(i) for i in indices)
        super().__init__(message)


class InputFileError(PlantsideError, ValueError):
    """A file (weather CSV, zone-load CSV) that cannot be used as it is.

    Attributes
    ----------
    problems : list of str
        One line per problem, each naming the row number(s) and column.
    """

    def __init__(self, source: str, problems: Sequence[str]):
        self.source = source
        self.problems = list(problems)
        shown = self.problems[:20]
        more = len(self.problems) - len(shown)
        text = f"{excerpt(source, NAME_EXCERPT_CHARS)}: " + "; ".join(shown)
        if more > 0:
            text += f"; and {more} more problem(s)"
        super().__init__(text)


class ScenarioError(PlantsideError, ValueError):
    """A scenario file with a missing, mistyped or out-of-range field.

    Attributes
    ----------
    source : str
        The file (as named in messages).
    field : str
        The (first) field at fault, e.g. ``"air_handler[2].supply_drybulb"``.
    message : str
        What is wrong with it (value and allowed range, in the file's units).
    problems : tuple of (str, str)
        Every ``(field, message)`` found in the file (one for a single mistake).
    """

    def __init__(self, source: str, field: str, message: str, problems=()):
        self.source = source
        self.field = field
        self.message = message
        self.problems = tuple(problems) or ((field, message),)
        shown = excerpt(source, NAME_EXCERPT_CHARS), excerpt(field, NAME_EXCERPT_CHARS)
        super().__init__(f"{shown[0]}: {shown[1]}: {message}")

    @classmethod
    def several(cls, source: str, errors: Sequence[ScenarioError]) -> ScenarioError:
        """One error listing every mistake of ``errors`` (each its field and message).

        It reads as the first mistake (``"file: field: message"``, its ``field`` that
        one's), then one line per further mistake (at most :data:`MAX_LISTED_MISTAKES`).

        Examples
        --------
        >>> a = ScenarioError("s.toml", "site.altitude", "expected a number, got 'x'")
        >>> b = ScenarioError("s.toml", "plant.cooling_margin_percent", "-5 is outside 0 to 100 %")
        >>> print(ScenarioError.several("s.toml", [a, b]))
        s.toml: site.altitude: expected a number, got 'x'
          and 1 more mistake:
          plant.cooling_margin_percent: -5 is outside 0 to 100 %
        """
        problems = [p for error in errors for p in error.problems]
        (field, message), others = problems[0], problems[1:]
        if not others:
            return cls(source, field, message)
        shown = others[:MAX_LISTED_MISTAKES]
        lines = "".join(f"\n  {excerpt(f, NAME_EXCERPT_CHARS)}: {m}" for f, m in shown)
        if len(others) > len(shown):
            lines += f"\n  ... and {len(others) - len(shown)} more"
        more = f"{len(others)} more mistake{'s' if len(others) > 1 else ''}"
        return cls(source, field, f"{message}\n  and {more}:{lines}", problems)


def _describe_indices(bad: np.ndarray, size: int) -> str:
    idx = np.flatnonzero(bad)
    first = ", ".join(str(i) for i in idx[:5])
    tail = ", ..." if idx.size > 5 else ""
    return f" at {idx.size} of {size} elements (indices {first}{tail})"


def check_range(
    field: str,
    value,
    low: float | None = None,
    high: float | None = None,
    unit: str = "",
    *,
    low_inclusive: bool = True,
    high_inclusive: bool = True,
):
    """Raise :class:`InputRangeError` unless every element of ``value`` lies in range.

    NaN is always invalid. Scalars and arrays are both accepted; for an array
    the message says how many elements are invalid and which.

    Returns
    -------
    numpy.ndarray
        ``value`` as a float array (0-d for a scalar), for chaining.
    """
    arr = np.asarray(value, dtype=float)
    bad = ~np.isfinite(arr)
    if low is not None:
        bad |= (arr < low) if low_inclusive else (arr <= low)
    if high is not None:
        bad |= (arr > high) if high_inclusive else (arr >= high)
    if np.any(bad):
        lo = "-inf" if low is None else f"{low:g}"
        hi = "+inf" if high is None else f"{high:g}"
        lo = lo if low_inclusive or low is None else f"above {lo}"
        hi = hi if high_inclusive or high is None else f"below {hi}"
        allowed = f"{lo} to {hi} {unit}".strip()
        if arr.ndim == 0:
            message = f"{field} = {float(arr):g} {unit} is outside the allowed range {allowed}"
            raise InputRangeError(field, message.replace("  ", " "), allowed)
        first_bad = float(arr[bad].flat[0])
        message = (
            f"{field} outside the allowed range {allowed}"
            f"{_describe_indices(bad, arr.size)}; first bad value {first_bad:g} {unit}"
        )
        raise InputRangeError(field, message.strip(), allowed, np.flatnonzero(bad))
    return arr


def check_choice(field: str, value, allowed):
    """Raise :class:`InputRangeError` unless ``value`` is one of ``allowed``.

    Parameters
    ----------
    field : str
        Name of the setting, as the caller calls it (e.g. ``"condenser"``).
    value
        The value given.
    allowed : sequence of str
        The values accepted, in the order the message lists them.

    Returns
    -------
    object
        ``value``, for chaining.

    Examples
    --------
    >>> check_choice("condenser", "water", ("water", "air"))
    'water'
    """
    if value not in allowed:
        listed = ", ".join(allowed)
        raise InputRangeError(field, f"{field} = {value!r} is not one of {listed}", listed)
    return value
