"""Altair's internals that plantside uses are where plantside expects them.

No physics here: these checks guard the one module that reaches below Altair's public API
(:mod:`plantside.charts.altair_internals`). When an Altair release moves a name, this file
fails first and says which name and which file to update, instead of a chart failing later
somewhere in the dashboard.
"""

import ast
import importlib
import tomllib
from pathlib import Path

import altair as alt
import pytest
from packaging.requirements import Requirement
from packaging.version import Version

ROOT = Path(__file__).parents[1]
PACKAGE = ROOT / "core" / "plantside"
INTERNALS = "plantside/charts/altair_internals.py"


def _moved(what: str) -> str:
    return f"Altair {alt.__version__} moved {what}: update {INTERNALS}"


def test_the_internal_modules_import():
    try:
        importlib.import_module("plantside.charts.altair_internals")
    except ImportError as error:  # a module or a name imported from it has gone
        pytest.fail(_moved(f"{error.name or error}"))


def test_every_internal_name_used_exists():
    from plantside.charts import altair_internals

    missing = altair_internals.missing_names()
    assert not missing, _moved(", ".join(missing))


def test_no_other_module_imports_altair_internals():
    # Only altair_internals.py may import from altair.<anything>; everywhere else uses
    # `import altair as alt` (the public API) or the names altair_internals re-exports.
    offenders = []
    for path in sorted(PACKAGE.rglob("*.py")):
        if path.as_posix().endswith(INTERNALS):
            continue
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("altair"):
                offenders.append(f"{path.relative_to(PACKAGE)}: from {node.module} import ...")
            elif isinstance(node, ast.Import):
                offenders += [
                    f"{path.relative_to(PACKAGE)}: import {alias.name}"
                    for alias in node.names
                    if alias.name.startswith("altair.")
                ]
    assert not offenders, f"Altair internals imported outside {INTERNALS}: {offenders}"


def test_declared_altair_range_is_the_one_checked():
    # pyproject.toml states the range altair_internals.py was checked with (6.0 to 6.x); the
    # installed Altair must be inside it, and the range must not admit 5.x (no vegalite.v6,
    # no alt.theme before 5.5) or an unchecked 7.x.
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    (altair,) = [Requirement(r) for r in project["dependencies"] if Requirement(r).name == "altair"]
    assert Version(alt.__version__) in altair.specifier, (alt.__version__, str(altair.specifier))
    assert Version("5.5.0") not in altair.specifier
    assert Version("6.0.0") in altair.specifier
    assert Version("7.0.0") not in altair.specifier
