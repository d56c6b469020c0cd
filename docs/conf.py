"""Sphinx configuration for the perfchain documentation.

Build (from the repository root)::

    python3 -m pip install -e ".[docs]"
    python3 -m sphinx -W --keep-going -b html docs docs/_build/html

The API reference is generated from the code on every build (autosummary, recursive over the
``perfchain`` package), so new or renamed modules appear without editing these pages.
"""

from __future__ import annotations

import os
import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
# Document the checkout these pages belong to, not whatever perfchain is installed elsewhere.
sys.path.insert(0, str(ROOT))
# The API pages import every module; no module may compile the numba kernel just for that.
os.environ.setdefault("PERFCHAIN_NO_JIT", "1")

project = "perfchain"
author = "the perfchain contributors"
copyright = "the perfchain contributors, BSD-3-Clause"
try:
    from perfchain import __version__ as release
except Exception:  # pragma: no cover - the build still runs for the narrative pages
    release = "unknown"
version = release

extensions = [
    "sphinx.ext.autodoc",
    "sphinx.ext.autosummary",
    "sphinx.ext.napoleon",
    "sphinx.ext.mathjax",
    "sphinx.ext.viewcode",
    "myst_parser",                     # the reference pages moved out of the README are Markdown
]
source_suffix = {".rst": "restructuredtext", ".md": "markdown"}
myst_heading_anchors = 3

templates_path = ["_templates"]
# safety.rst is included by several pages, never built on its own
exclude_patterns = ["_build", "Thumbs.db", ".DS_Store", "safety.rst"]
root_doc = "index"

# -- API reference -----------------------------------------------------------------------------
autosummary_generate = True            # write the stub pages under docs/api/ at build time
autosummary_generate_overwrite = True
autosummary_imported_members = False   # a name is documented where it is defined
autodoc_default_options = {
    "members": True,
    "undoc-members": False,
    "show-inheritance": True,
    "member-order": "bysource",
}
autodoc_typehints = "description"      # type hints go beside the numpydoc text, not in the title
autodoc_typehints_description_target = "documented"  # no type lines for arguments the docstring omits
autodoc_typehints_format = "short"
autodoc_preserve_defaults = True       # show `ONE_ATM`, not 101325.0, in signatures
autodoc_class_signature = "separated"
autodoc_inherit_docstrings = True
# Optional extras: document the modules without needing them installed.
autodoc_mock_imports = ["dask", "distributed", "xarray"]

# numpydoc docstrings through napoleon
napoleon_google_docstring = False
napoleon_numpy_docstring = True
napoleon_use_rtype = True              # one "Return type" line, not a second from the annotation
napoleon_use_param = True
napoleon_use_ivar = True
napoleon_preprocess_types = False
napoleon_attr_annotations = True

# Names in docstrings that are types in prose ("float [Pa]", "array_like") are not cross-references
# to resolve; do not warn about them.
nitpicky = False
# Short names in numpydoc type fields ("oxidizer, fuel : str", "thrust : float") can match an
# attribute of several records (Performance.fuel, Engine.fuel, ...). Sphinx then links the first
# and warns "more than one target"; that is expected for a chain whose records share field names.
suppress_warnings = ["ref.python"]

# -- HTML ----------------------------------------------------------------------------------------
html_theme = "furo"
html_title = f"perfchain {release}"
html_static_path: list[str] = []
html_show_sourcelink = False


# -- Links in the hand-written pages must resolve ---------------------------------------------
# Docstrings name many types in prose ("float", "array_like"), so the build is not nitpicky as a
# whole. The task and reference pages are different: a link there that no longer resolves (a
# function moved to another module) is a broken page, and under -W it fails the build.
def _broken_link_in_page(app, env, node, contnode):
    page = node.get("refdoc", "")
    if not page.startswith("api/") and node.get("refdomain") == "py":
        from sphinx.util import logging

        logging.getLogger(__name__).warning(
            "page %s links to %r, which the API reference does not document", page,
            node.get("reftarget"), location=node)
    return None


# -- Record docstrings that list fields as runs ----------------------------------------------------
# Some records document their fields as runs of names sharing a unit ("pressure [Pa], temperature
# [K], ...") inside a numpydoc section; tests read those runs (tests/test_columns.py), so the code
# keeps them. numpydoc cannot parse such a section as entries, so it is shown as written, in a
# literal block, instead of failing the build. Conforming sections are left to napoleon.
_SECTIONS = ("Attributes", "Parameters", "Other Parameters", "Returns", "Yields")
_ENTRY = re.compile(r"\*{0,2}[A-Za-z_]\w*(\s*,\s*\*{0,2}[A-Za-z_]\w*)*(\s*:(\s.*)?)?$")


def _is_header(lines, i):
    return (i + 1 < len(lines) and lines[i].strip() != "" and lines[i + 1].strip() != ""
            and set(lines[i + 1].strip()) == {"-"} and not lines[i].startswith(" "))


def _literal_field_runs(app, what, name, obj, options, lines):
    i = 0
    while i < len(lines):
        if not (_is_header(lines, i) and lines[i].strip() in _SECTIONS):
            i += 1
            continue
        end = i + 2
        while end < len(lines) and not _is_header(lines, end):
            end += 1
        body = lines[i + 2:end]
        entries = [line for line in body if line.strip() and not line.startswith(" ")]
        if all(_ENTRY.match(line.strip()) for line in entries):
            i = end
            continue
        while body and not body[-1].strip():
            body.pop()
        block = [f"**{lines[i].strip()}**", "", "::", ""] + ["    " + line for line in body] + [""]
        lines[i:end] = block
        i += len(block)


def setup(app):
    app.connect("missing-reference", _broken_link_in_page)
    # before napoleon (priority 500) turns the sections into fields
    app.connect("autodoc-process-docstring", _literal_field_runs, priority=400)
