"""The tree shows the layers, and the imports keep to them: core ← catalog ← faces.

Read from the import statements of the package's own files (ast), so a lazy import inside a
function counts as much as one at the top.  The layers are defined once, by folder
(:data:`LAYERS`); every module of the package belongs to exactly one.
"""

from __future__ import annotations

import ast
import fnmatch
import itertools
from functools import cache
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "funcs" / "joulebook"

#: layer → glob of its files (relative to funcs/joulebook); the first match wins
LAYERS = {
    "core": "core/*",
    "catalog": "catalog/*",
    "sheet": "faces/sheet/*",
    "calc": "faces/calc/*",
    "workbook": "faces/workbook/*",
    "api": "faces/api/*",
    "cli": "faces/cli.py",
    "shared": "faces/*.py",  # file helpers the faces share (files, runio) and the faces' index
    "tools": "tools/*",
    "root": "*.py",  # the package's index and ``python -m joulebook``
}
FACES = ("sheet", "calc", "workbook", "api")
#: what each layer may import (besides itself)
ALLOWED = {
    "core": set(),
    "catalog": {"core"},
    **{face: {"core", "catalog", "shared"} for face in FACES},
    "shared": {"core"},
    "cli": {"core", "catalog", "shared", "workbook", "tools"},
    "tools": {"core", "catalog", "shared", *FACES},
    "root": {"core", "catalog", "api", "cli"},
}

#: private names one module still reads of another; each is a debt, and the list may only
#: shrink (a new reach-in fails, and so does an entry no longer needed)
KNOWN_REACH_INS: set[tuple[str, str]] = {
    ("joulebook.catalog.adapters", "joulebook.core.substances.fluids._flash"),
    ("joulebook.catalog.adapters", "joulebook.core.substances.solids._check"),
    ("joulebook.core.media", "joulebook.core.substances.fluids._flash"),
    ("joulebook.core.media", "joulebook.core.substances.fluids._is_two_phase"),
    ("joulebook.core.media", "joulebook.core.substances.gases._check_T"),
    ("joulebook.core.media", "joulebook.core.substances.gases._ig"),
    ("joulebook.core.processes.blockedin", "joulebook.core.substances.fluids._psat"),
    ("joulebook.core.processes.engines", "joulebook.core.processes.work._clean_pairs"),
    ("joulebook.core.processes.polytropic", "joulebook.core.processes.work._clean_pairs"),
    ("joulebook.core.processes.pressuretests", "joulebook.core.processes.stored._check"),
    ("joulebook.core.substances.gases", "joulebook.core.substances.fluids._coolprop"),
    ("joulebook.core.substances.gases", "joulebook.core.substances.fluids._state"),
    ("joulebook.core.substances.gases", "joulebook.core.substances.fluids._up"),
    ("joulebook.faces.api", "joulebook.catalog.adapters._wall_compliance"),
    ("joulebook.faces.cli", "joulebook.faces.workbook.check._same"),
    ("joulebook.faces.workbook.audit", "joulebook.core.substances.fluids._psat"),
    ("joulebook.faces.workbook.audit", "joulebook.faces.workbook.auditflags._units_named"),
    ("joulebook.faces.workbook.auditfig", "joulebook.catalog.adapters._solved"),
    ("joulebook.faces.workbook.engine", "joulebook.faces.workbook.refs._RUNS"),
    ("joulebook.faces.workbook.engine", "joulebook.faces.workbook.refs._SCIENTIFIC"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._EXAMPLE_UNITS"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._SEED_CONVS"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._SEED_DIMS"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._SEED_KINDS"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._pint_conv"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._pint_kind"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._system_convs"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._to_pint"),
    ("joulebook.tools.unitseedgen", "joulebook.core.units._ureg"),
}


def _module(path: Path) -> str:
    parts = path.relative_to(PKG.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


@cache
def _modules() -> dict[str, Path]:
    return {_module(p): p for p in PKG.rglob("*.py")}


def layer_of(path: Path) -> str:
    rel = path.relative_to(PKG).as_posix()
    for layer, pattern in LAYERS.items():
        if fnmatch.fnmatch(rel, pattern):
            return layer
    raise AssertionError(f"{rel} is in no layer")


def _target(path: Path, node: ast.ImportFrom) -> str | None:
    if not node.level:
        return node.module
    mod = _module(path).split(".")
    base = mod if path.name == "__init__.py" else mod[:-1]
    base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


@cache
def _imports(path: Path) -> tuple[tuple[str, str | None], ...]:
    """(joulebook module imported, name taken from it or None) for every import in *path*."""
    mods = _modules()
    out = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            target = _target(path, node)
            if not target or not target.startswith("joulebook"):
                continue
            for a in node.names:
                full = f"{target}.{a.name}"
                out.append((full, None) if full in mods else (target, a.name))
        elif isinstance(node, ast.Import):
            out.extend((a.name, None) for a in node.names if a.name.startswith("joulebook"))
    return tuple(out)


def _graph() -> dict[str, set[str]]:
    mods = _modules()
    return {
        m: {t for t, _ in _imports(p) if t in mods and t != m and not m.startswith(t + ".")}
        for m, p in mods.items()
    }


def test_every_module_is_in_one_layer():
    layers = {m: layer_of(p) for m, p in _modules().items()}
    assert {"core", "catalog", "workbook", "sheet", "calc", "api", "tools"} <= set(layers.values())
    assert layers["joulebook.core.units"] == "core"
    assert layers["joulebook.catalog"] == "catalog"
    assert layers["joulebook.faces.workbook.engine"] == "workbook"


@pytest.mark.parametrize("layer", sorted(set(LAYERS)))
def test_imports_keep_to_the_layers(layer):
    mods = _modules()
    bad = []
    for m, path in mods.items():
        if layer_of(path) != layer:
            continue
        for target, _name in _imports(path):
            if target not in mods:
                continue
            there = layer_of(mods[target])
            if there not in ALLOWED[layer] | {layer}:
                bad.append(f"{m} imports {target} ({there})")
    assert not bad, "\n".join(bad)


def test_faces_never_import_each_other():
    assert all(not (set(FACES) - {f}) & ALLOWED[f] for f in FACES)


def test_no_import_cycles():
    graph = _graph()
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on: set[str] = set()
    cycles = []
    counter = itertools.count()

    def visit(v):  # Tarjan's strongly connected components
        index[v] = low[v] = next(counter)
        stack.append(v)
        on.add(v)
        for w in graph[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                cycles.append(sorted(comp))

    for v in graph:
        if v not in index:
            visit(v)
    assert not cycles, cycles


def _reach_ins() -> set[tuple[str, str]]:
    mods = _modules()
    found = set()
    for m, path in mods.items():
        aliases = {}
        for target, name in _imports(path):
            if name is None:
                continue
            if name.startswith("_") and not name.startswith("__") and target != m:
                found.add((m, f"{target}.{name}"))
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom):
                target = _target(path, node)
                for a in node.names:
                    if f"{target}.{a.name}" in mods:
                        aliases[a.asname or a.name] = f"{target}.{a.name}"
            elif isinstance(node, ast.Import):
                for a in node.names:
                    if a.name in mods and a.asname:
                        aliases[a.asname] = a.name
        for node in ast.walk(tree):
            if (
                isinstance(node, ast.Attribute)
                and isinstance(node.value, ast.Name)
                and node.value.id in aliases
                and node.attr.startswith("_")
                and not node.attr.startswith("__")
                and aliases[node.value.id] != m
            ):
                found.add((m, f"{aliases[node.value.id]}.{node.attr}"))
    return found


def test_no_module_reaches_into_another_modules_private_names():
    found = _reach_ins()
    new = found - KNOWN_REACH_INS
    assert not new, "private names read across modules:\n" + "\n".join(map(str, sorted(new)))
    gone = KNOWN_REACH_INS - found
    assert not gone, f"no longer needed, delete from KNOWN_REACH_INS: {sorted(gone)}"


def test_the_rule_scanner_sees_what_it_must():
    # planted: each kind of import the scanner must read, in a file of its own
    src = "from joulebook.core.units import _x\nimport joulebook.core.units as u\nu._y\n"
    tree = ast.parse(src)
    kinds = {type(n).__name__ for n in ast.walk(tree)}
    assert {"ImportFrom", "Import", "Attribute"} <= kinds
    assert layer_of(PKG / "core" / "units.py") == "core"
    assert layer_of(PKG / "faces" / "files.py") == "shared"
    assert layer_of(PKG / "faces" / "cli.py") == "cli"
