"""The register of unsourced values in DEVELOPERS.md names every file that holds one.

A value marked "from memory" (recalled, not confirmed) or "common practice" (a rule of
the trade) must be listed once in the contributor guide's register, with where it is
used and whether it has been checked. This test finds the markers in ``core/plantside``
and ``tests`` and fails for a file the register does not name (the register's own test,
this file, is exempt). It checks the bookkeeping, not the values: those are checked in
the tests the register points to.
"""

import re
from pathlib import Path

import plantside

PACKAGE = Path(plantside.__file__).resolve().parent
ROOT = PACKAGE.parent.parent
MARKER = re.compile(r"from memory|common practice|rule of thumb|recalled|recollection", re.I)


def _register() -> str:
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    start = text.index("## Register of unsourced values")
    end = text.find("\n## ", start + 1)
    return text[start : end if end > 0 else len(text)]


def _marked_files():
    for path in sorted(PACKAGE.rglob("*.py")):
        if MARKER.search(path.read_text(encoding="utf-8")):
            yield path.relative_to(PACKAGE).as_posix()
    for path in sorted((ROOT / "tests").glob("*.py")):
        if path.name != Path(__file__).name and MARKER.search(path.read_text(encoding="utf-8")):
            yield f"tests/{path.name}"


def test_every_file_with_an_unsourced_value_is_in_the_register():
    register = _register()
    missing = [name for name in _marked_files() if f"`{name}`" not in register]
    assert not missing, f"not in DEVELOPERS.md's register of unsourced values: {missing}"


def test_the_register_is_one_table_with_a_status_in_every_row():
    rows = [line for line in _register().splitlines() if line.startswith("| ")]
    header, *body = rows
    assert header.split("|")[1:5] == [" value ", " where used ", " claims ", " status "]
    statuses = ("checked", "corrected", "unconfirmed", "common practice", "removed")
    for row in body:
        status = row.rstrip(" |").split(" | ")[-1]
        assert any(f"**{word}**" in status for word in statuses), row
