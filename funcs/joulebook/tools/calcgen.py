"""Write the LibreOffice Calc extension (.oxt) from the catalog.

``joulebook calc-extension -o joulebook.oxt`` writes a zip with:

* ``types.rdb`` — the type library declaring ``org.joulebook.calc.XFunctions``, one method per
  worksheet function (a hidden caller, one ``any`` per argument, a 2-D array result);
* ``joulebook_calc.py`` — the component (this package's ``component.py``) and
  ``joulebook_calc.json`` — the catalog's names, help and arguments, and the Python that runs
  the calls (the interpreter running this command unless ``--python`` says otherwise);
* ``joulebook.components``, ``Jobs.xcu`` (the job that rewrites unresolved calls when a
  workbook opens), ``description.xml`` and ``META-INF/manifest.xml``.

The zip's entries carry a fixed date, so the same catalog and Python give the same bytes.
"""

from __future__ import annotations

import json
import sys
import zipfile
from importlib import resources
from pathlib import Path

from joulebook.catalog.arghelp import arg_doc
from joulebook.core.version import __version__
from joulebook.faces.calc.typelib import type_library

from ..catalog import CATALOG

__all__ = ["INTERFACE", "SERVICE", "files", "metadata", "methods", "write"]

INTERFACE = "org.joulebook.calc.XFunctions"
IDENTIFIER = "org.joulebook.calc"
#: the prefix of a function's stored name in Calc ("_xludf.JB_PROP" in an .xlsx it saves,
#: the prefix Excel gives a user-defined function)
SERVICE = "_xludf"
CALLER = "com.sun.star.beans.XPropertySet"
_DATE = (2020, 1, 1, 0, 0, 0)


def metadata(python: str) -> dict:
    """What the component needs: the functions' names, help and arguments, the Python."""
    return {
        "version": __version__,
        "python": python,
        "service": SERVICE,
        "functions": [
            {
                "name": f.name,
                "help": f.help,
                "args": [
                    {"name": a.name, "help": arg_doc(a), "optional": a.optional} for a in f.all_args
                ],
            }
            for f in CATALOG
        ],
    }


def methods() -> list:
    """The interface's methods: (name, return type, parameters)."""
    return [
        (
            f.name,
            "[][]any",
            [("caller", CALLER)] + [(f"a{i}", "any") for i in range(len(f.all_args))],
        )
        for f in CATALOG
    ]


_MANIFEST = """<?xml version="1.0" encoding="UTF-8"?>
<manifest:manifest xmlns:manifest="http://openoffice.org/2001/manifest">
 <manifest:file-entry manifest:full-path="types.rdb"
  manifest:media-type="application/vnd.sun.star.uno-typelibrary;type=RDB"/>
 <manifest:file-entry manifest:full-path="joulebook.components"
  manifest:media-type="application/vnd.sun.star.uno-components"/>
 <manifest:file-entry manifest:full-path="Jobs.xcu"
  manifest:media-type="application/vnd.sun.star.configuration-data"/>
</manifest:manifest>
"""

_COMPONENTS = """<?xml version="1.0" encoding="UTF-8"?>
<components xmlns="http://openoffice.org/2010/uno-components">
 <component loader="com.sun.star.loader.Python" uri="joulebook_calc.py">
  <implementation name="org.joulebook.calc.Functions">
   <service name="com.sun.star.sheet.AddIn"/>
  </implementation>
  <implementation name="org.joulebook.calc.OpenedWorkbook">
   <service name="org.joulebook.calc.OpenedWorkbook"/>
  </implementation>
 </component>
</components>
"""

_JOBS = """<?xml version="1.0" encoding="UTF-8"?>
<oor:component-data xmlns:oor="http://openoffice.org/2001/registry"
 xmlns:xs="http://www.w3.org/2001/XMLSchema" oor:name="Jobs" oor:package="org.openoffice.Office">
 <node oor:name="Jobs">
  <node oor:name="JoulebookOpenedWorkbook" oor:op="replace">
   <prop oor:name="Service"><value>org.joulebook.calc.OpenedWorkbook</value></prop>
  </node>
 </node>
 <node oor:name="Events">{events}
 </node>
</oor:component-data>
"""
_EVENT = """
  <node oor:name="{event}" oor:op="fuse">
   <node oor:name="JobList">
    <node oor:name="JoulebookOpenedWorkbook" oor:op="replace"/>
   </node>
  </node>"""
#: the document events that run the job (a document loaded with or without a view)
EVENTS = ("onDocumentOpened", "OnLoadFinished")

_DESCRIPTION = """<?xml version="1.0" encoding="UTF-8"?>
<description xmlns="http://openoffice.org/extensions/description/2006"
 xmlns:xlink="http://www.w3.org/1999/xlink">
 <identifier value="{identifier}"/>
 <version value="{version}"/>
 <display-name><name lang="en">joulebook worksheet functions</name></display-name>
 <extension-description><src lang="en" xlink:href="description-en.txt"/></extension-description>
</description>
"""

_ABOUT = (
    "joulebook's worksheet functions (JB_...) for closed-system energy analysis, computed by "
    "joulebook {version} in {python}. Results are engineering estimates; pressure equipment "
    "is governed by the applicable codes and the judgement of a competent, licensed engineer.\n"
)


def files(python: str) -> dict[str, bytes]:
    """The extension's members and their bytes."""
    component = resources.files("joulebook.faces.calc").joinpath("component.py").read_bytes()
    meta = json.dumps(metadata(python), indent=1, ensure_ascii=False) + "\n"
    return {
        "META-INF/manifest.xml": _MANIFEST.encode(),
        "description.xml": _DESCRIPTION.format(identifier=IDENTIFIER, version=__version__).encode(),
        "description-en.txt": _ABOUT.format(version=__version__, python=python).encode(),
        "joulebook.components": _COMPONENTS.encode(),
        "Jobs.xcu": _JOBS.format(events="".join(_EVENT.format(event=e) for e in EVENTS)).encode(),
        "types.rdb": type_library(INTERFACE, methods()),
        "joulebook_calc.py": component,
        "joulebook_calc.json": meta.encode("utf-8"),
    }


def write(path: Path, python: str | None = None) -> Path:
    """Write the extension to *path*; *python* runs the calls (default: this interpreter)."""
    path = Path(path)
    python = python or sys.executable
    tmp = path.with_name(path.name + ".part")
    with zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as z:
        for name, data in files(python).items():
            info = zipfile.ZipInfo(name, _DATE)
            info.compress_type = zipfile.ZIP_DEFLATED
            info.external_attr = 0o644 << 16
            z.writestr(info, data)
    tmp.replace(path)
    return path
