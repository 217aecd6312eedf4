"""The package's layers: every import runs downward, and no module imports itself back.

The layers are the contributor guide's architecture map (DEVELOPERS.md, "Layers"):
a module may import from its own subpackage and from any lower layer, never from
a sibling subpackage of the same layer or from a layer above. ``plantside/__init__``
is the scripting facade and is exempt; an import of one of its entry points is
checked against the module that defines it.
"""

import ast
from pathlib import Path

import plantside
import pytest

PACKAGE = Path(plantside.__file__).resolve().parent

#: Top-level part of the package -> layer (lower imports nothing above it).
LAYERS = {
    "errors": 0,
    "arrays": 0,
    "constants": 0,
    "units": 1,
    "hourly_csv": 2,
    "air": 2,
    "climate": 3,
    "air_handler": 3,
    "plant": 3,
    "study": 4,
    "charts": 5,
    "dashboard": 6,
    "cli": 6,
}


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _imports(path: Path):
    """(imported module, line, at module level) for every plantside import in ``path``."""
    name = _module_name(path)
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    tree = ast.parse(path.read_text(encoding="utf-8"))
    top_level = {id(node) for node in tree.body}
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            targets = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - (node.level - 1)]
                module = ".".join([*base, node.module] if node.module else base)
            else:
                module = node.module or ""
            targets = [module]
            if module == "plantside":
                # ``from plantside import run_study``: the facade's entry point's own module
                targets = [plantside._ENTRY_POINTS.get(a.name, "plantside") for a in node.names]
            else:
                # ``from plantside.air import moist_air`` names a submodule
                targets = [
                    f"{module}.{a.name}"
                    if (PACKAGE.parent / f"{module}.{a.name}".replace(".", "/"))
                    .with_suffix(".py")
                    .exists()
                    else module
                    for a in node.names
                ]
        else:
            continue
        for target in targets:
            if target == "plantside" or target.startswith("plantside."):
                yield target, node.lineno, id(node) in top_level


def _part(module: str) -> str | None:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else None


MODULES = sorted(p for p in PACKAGE.rglob("*.py") if p.name != "__main__.py")


def test_every_part_of_the_package_has_a_layer():
    parts = {_part(_module_name(p)) for p in MODULES} - {None}
    assert parts <= set(LAYERS), f"add these to LAYERS and the guide: {parts - set(LAYERS)}"


@pytest.mark.parametrize("path", MODULES, ids=lambda p: _module_name(p))
def test_imports_run_downward(path):
    module = _module_name(path)
    own = _part(module)
    if own is None:
        return  # the facade
    wrong = []
    for target, line, _ in _imports(path):
        other = _part(target)
        if other is None or other == own:
            continue
        if LAYERS[other] >= LAYERS[own]:
            wrong.append(
                f"{path.relative_to(PACKAGE.parent)}:{line} imports {target} "
                f"({other}, layer {LAYERS[other]}) from {own} (layer {LAYERS[own]})"
            )
    assert not wrong, "imports that run up or sideways:\n" + "\n".join(wrong)


def test_no_circular_imports_at_module_level():
    graph = {}
    known = {_module_name(p) for p in MODULES}
    for path in MODULES:
        name = _module_name(path)
        edges = set()
        for target, _, top in _imports(path):
            while target not in known and "." in target:
                target = target.rpartition(".")[0]
            if top and target in known and target != name and target != "plantside":
                edges.add(target)
        graph[name] = edges
    cycles = []
    state = {}

    def visit(node, trail):
        state[node] = "open"
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == "open":
                cycles.append(" -> ".join([*trail[trail.index(nxt) :], nxt]))
            elif nxt not in state:
                visit(nxt, [*trail, nxt])
        state[node] = "done"

    for node in sorted(graph):
        if node not in state:
            visit(node, [node])
    assert not cycles, "circular imports:\n" + "\n".join(cycles)


def test_a_wrong_import_is_caught(tmp_path, monkeypatch):
    # the check itself: a physics module that imports the dashboard must be refused
    fake = PACKAGE / "air" / "_layer_probe.py"
    fake.write_text("from plantside.dashboard import app\n", encoding="utf-8")
    try:
        with pytest.raises(AssertionError, match=r"imports plantside\.dashboard"):
            test_imports_run_downward(fake)
    finally:
        fake.unlink()
