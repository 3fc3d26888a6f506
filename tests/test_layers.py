"""Dependencies point one way: core ← catalog ← faces; the faces never import each other.

Read from the import statements of the package's own files (ast), so a lazy import inside a
function counts as much as one at the top.
"""

import ast
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parents[1] / "funcs" / "joulebook"
FACES = ("sheet", "workbook")
#: core modules: they import neither the catalog nor a face
CORE = ("units", "errors", "roots", "states", "media", "firstlaw", "working", "files")


def _imports(path: Path) -> set[str]:
    """The joulebook modules *path* imports, as dotted names under joulebook."""
    here = path.relative_to(PKG).with_suffix("").parts[:-1]
    out = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = list(here[: len(here) - (node.level - 1)])
                mod = ".".join(base + ([node.module] if node.module else []))
            elif (node.module or "").startswith("joulebook"):
                mod = node.module.removeprefix("joulebook").lstrip(".")
            else:
                continue
            names = [mod] + [f"{mod}.{a.name}".lstrip(".") for a in node.names]
            out.update(n for n in names if n)
        elif isinstance(node, ast.Import):
            for a in node.names:
                if a.name.startswith("joulebook."):
                    out.add(a.name.removeprefix("joulebook."))
    return out


def _files(sub: str):
    return sorted((PKG / sub).rglob("*.py"))


@pytest.mark.parametrize("face", FACES)
def test_faces_never_import_each_other(face):
    others = [f for f in FACES if f != face]
    for path in _files(face):
        for mod in _imports(path):
            assert not any(mod == o or mod.startswith(o + ".") for o in others), (path, mod)


def test_core_imports_no_catalog_and_no_face():
    for name in CORE:
        for mod in _imports(PKG / f"{name}.py"):
            top = mod.split(".")[0]
            assert top not in FACES + ("catalog", "cli", "demo", "docgen"), (name, mod)
    for sub in ("substances", "processes"):
        for path in _files(sub):
            for mod in _imports(path):
                assert mod.split(".")[0] not in FACES + ("catalog", "cli"), (path, mod)
