"""A header cell split into the column's name and its unit.

Names are compared case-insensitively, ignoring spaces, underscores and
punctuation (``Dry-bulb``, ``dry_bulb`` and ``DryBulb`` are one name). A unit may
follow in brackets (``Dry bulb (°C)``, ``Latent [Btu/h]``) or as the last word(s)
(``drybulb_F``, ``RH %``, ``humidity_ratio_g_per_kg``). Each reader gives the unit
words it knows (its alias table); the rules of the split are shared.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass

__all__ = ["HeaderCell", "canonical_unit", "role_of", "split_header"]


@dataclass(frozen=True)
class HeaderCell:
    """One header cell: as written, its normalised name, its unit.

    Attributes
    ----------
    header : str
        The cell as written (stripped).
    name : str
        Lower-case letters and digits of the name part.
    unit : str or None
        Canonical unit found in the cell (a value of the reader's alias table).
    unit_text : str or None
        The unit as written, also when it is not recognised (then ``unit`` is None).
    """

    header: str
    name: str
    unit: str | None
    unit_text: str | None


def unit_key(text: str) -> str:
    """The form a unit word is looked up in: lower case, ``°`` as ``deg``, no spaces."""
    key = text.strip().lower().replace("°", "deg").replace("º", "deg")
    key = key.replace("degrees", "deg").replace("degree", "deg")
    key = re.sub(r"[\s_]+", "", key)
    return key.replace("per", "/")


def canonical_unit(text: str, aliases: Mapping[str, str]) -> str | None:
    """The canonical unit of a unit word, or None when ``aliases`` does not know it."""
    return aliases.get(unit_key(text))


def normalised_name(text: str) -> str:
    """Lower-case letters and digits of ``text`` (how names are compared)."""
    return re.sub(r"[^a-z0-9]", "", text.lower())


def split_header(header: str, aliases: Mapping[str, str]) -> HeaderCell:
    """Split one header cell into its name and unit.

    Parameters
    ----------
    header : str
        The cell as written.
    aliases : mapping
        Unit word (in :func:`unit_key` form) -> canonical unit, of the reader.

    Returns
    -------
    HeaderCell
    """
    header = header.strip()
    text = header.replace("%", " % ")
    bracket = re.search(r"[\(\[\{]([^\)\]\}]*)[\)\]\}]", text)
    unit_text = None
    unit = None
    if bracket:
        unit_text = bracket.group(1).strip()
        text = (text[: bracket.start()] + " " + text[bracket.end() :]).strip()
        unit = canonical_unit(unit_text, aliases) if unit_text else None
    else:
        tokens = [t for t in re.split(r"[\s_]+", text) if t]
        for length in (4, 3, 2, 1):
            if len(tokens) > length:
                candidate = " ".join(tokens[-length:])
                found = canonical_unit(candidate, aliases)
                if found is not None:
                    unit, unit_text = found, candidate
                    text = " ".join(tokens[:-length])
                    break
    return HeaderCell(header, normalised_name(text), unit, unit_text or None)


def role_of(name: str, role_names: Mapping[str, Iterable[str]]) -> str | None:
    """The role whose accepted names include ``name`` (normalised), or None."""
    for role, names in role_names.items():
        if name in names:
            return role
    return None
