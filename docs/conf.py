"""Sphinx configuration: the API reference (numpydoc) and the project's markdown docs (MyST).

Build: ``python -m sphinx -W --keep-going -b html docs docs/_build/html`` (``.ci/run``).
The tutorial's code runs at build time (matplotlib's plot directive); any failure is an error.
"""

from __future__ import annotations

import os
import sys

sys.path.insert(0, os.path.abspath(os.path.join(os.path.dirname(__file__), "..", "funcs")))
os.environ.setdefault("MPLBACKEND", "Agg")

import joulebook  # noqa: E402

project = "joulebook"
author = "joulebook developers"
copyright = "joulebook developers, MIT licence"
release = version = joulebook.__version__

extensions = [
    "sphinx.ext.autodoc",
    "sphinx.ext.mathjax",
    "numpydoc",
    "myst_parser",
    "matplotlib.sphinxext.plot_directive",
]
source_suffix = {".rst": "restructuredtext", ".md": "markdown"}
root_doc = "index"
exclude_patterns = ["_build", "README.md"]

# numpydoc: the sections as written, no member tables (autodoc lists the members)
numpydoc_show_class_members = False
numpydoc_class_members_toctree = False
numpydoc_xref_param_type = False
autodoc_member_order = "bysource"
autodoc_typehints = "none"  # the numpydoc Parameters carry types and units

# MyST: the markdown docs as they are on the repository's web view
myst_enable_extensions = ["dollarmath", "colon_fence"]
myst_heading_anchors = 3
suppress_warnings = ["myst.xref_missing"]  # links to files outside docs/ (README, sources)

# the tutorial: code shown, run at build time, figures embedded
plot_include_source = True
plot_html_show_source_link = False
plot_html_show_formats = False
plot_formats = [("png", 100)]

html_theme = "alabaster"
html_title = f"joulebook {release}"
