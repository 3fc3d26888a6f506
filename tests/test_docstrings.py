"""Every public function and class of the core and the Python API carries a numpydoc
docstring: a summary, each parameter named in Parameters, Returns, runnable Examples and
numbered References; public methods and properties at least a summary line.

Scope: the core (units, errors, roots, substances, states, media, processes, first law), the
cell-value rules both cell faces share (cellvalues) and the Python faces (``joulebook``,
``joulebook.faces.api``).  The worksheet adapters (formulas.py) are
documented through their catalog entries (docs/functions.md); the workbook and sheet faces,
the CLI, the demo and the generators are out of this rule (docs/design.md, "Python API").
The examples themselves run in the default suite (``--doctest-modules`` in pyproject).
"""

from __future__ import annotations

import importlib
import inspect

import numpydoc.docscrape as numpydoc
import pytest

MODULES = [
    "joulebook",
    "joulebook.faces.api",
    "joulebook.core.errors",
    "joulebook.core.units",
    "joulebook.core.roots",
    "joulebook.core.states",
    "joulebook.core.media",
    "joulebook.core.firstlaw",
    "joulebook.core.working",
    "joulebook.faces.files",
    "joulebook.catalog.cellvalues",
    "joulebook.core.substances.fluids",
    "joulebook.core.substances.gases",
    "joulebook.core.substances.solids",
    "joulebook.core.substances.if97",
    "joulebook.core.substances.mixtures",
    "joulebook.core.substances.humidair",
    "joulebook.core.substances.waterrelease",
    "joulebook.core.processes.work",
    "joulebook.core.processes.polytropic",
    "joulebook.core.processes.solve",
    "joulebook.core.processes.cycles",
    "joulebook.core.processes.stored",
    "joulebook.core.processes.blockedin",
    "joulebook.core.processes.timing",
    "joulebook.core.processes.pressuretests",
    "joulebook.core.processes.engines",
    "joulebook.core.substances.liquids",
    "joulebook.core.processes.wall",
    "joulebook.core.processes.cushion",
    "joulebook.core.processes.gasfire",
    "joulebook.core.processes.blowdown",
]


def _public(modname: str):
    mod = importlib.import_module(modname)
    for name, obj in sorted(vars(mod).items()):
        if name.startswith("_") or not (inspect.isfunction(obj) or inspect.isclass(obj)):
            continue
        if getattr(obj, "__module__", None) != mod.__name__:
            continue  # imported from elsewhere
        yield f"{modname}.{name}", obj


PUBLIC = [item for m in MODULES for item in _public(m)]


def _params(obj) -> list[str]:
    fn = obj.__init__ if inspect.isclass(obj) else obj
    try:
        sig = inspect.signature(fn)
    except (TypeError, ValueError):
        return []
    names = []
    for p in sig.parameters.values():
        if p.name in ("self", "cls") or p.name.startswith("_"):
            continue
        names.append(p.name)
    return names


def _documented(doc, section: str) -> set[str]:
    found = set()
    for item in doc[section]:
        for part in item.name.replace("*", "").split(","):
            found.add(part.strip())
    return found


def test_the_rule_covers_the_core():
    assert len(PUBLIC) > 100


@pytest.mark.parametrize("qualname, obj", PUBLIC, ids=[q for q, _ in PUBLIC])
def test_numpydoc_sections(qualname, obj):
    raw = inspect.getdoc(obj)
    assert raw, f"{qualname}: no docstring"
    doc = (numpydoc.ClassDoc if inspect.isclass(obj) else numpydoc.FunctionDoc)(
        obj, config={"show_class_members": False}
    )
    problems = []
    if not doc["Summary"]:
        problems.append("no summary line")
    params = _params(obj)
    if inspect.isclass(obj) and not params:
        pass
    else:
        named = _documented(doc, "Parameters") | _documented(doc, "Attributes")
        missing = [p for p in params if p not in named]
        if missing:
            problems.append(f"Parameters lacks {', '.join(missing)}")
    if inspect.isfunction(obj):
        ret = inspect.signature(obj).return_annotation
        if ret not in ("None", None) and not doc["Returns"] and not doc["Yields"]:
            problems.append("no Returns section")
    if ">>>" not in "\n".join(doc["Examples"]):
        problems.append("no runnable Examples")
    if not any(line.strip().startswith(".. [1]") for line in doc["References"]):
        problems.append("no numbered References")
    assert not problems, f"{qualname}: " + "; ".join(problems)


METHODS = [
    (f"{q}.{name}", member)
    for q, cls in PUBLIC
    if inspect.isclass(cls)
    for name, member in vars(cls).items()
    if not name.startswith("_") and (inspect.isfunction(member) or isinstance(member, property))
]


@pytest.mark.parametrize("qualname, member", METHODS, ids=[q for q, _ in METHODS])
def test_methods_have_a_summary(qualname, member):
    fn = member.fget if isinstance(member, property) else member
    assert (inspect.getdoc(fn) or "").strip(), f"{qualname}: no docstring"
