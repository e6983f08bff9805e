"""Sphinx configuration of the contourkit API reference (docs/api).

Build:  python -m sphinx -W -b html docs/api docs/api/_build
"""
import os
import sys

sys.path.insert(0, os.path.abspath(os.path.join(os.path.dirname(__file__), "..", "..")))

project = "contourkit"
author = "the contourkit developers"
copyright = "the contourkit developers"
extensions = ["sphinx.ext.autodoc", "sphinx.ext.napoleon", "sphinx.ext.mathjax"]
napoleon_google_docstring = False
napoleon_numpy_docstring = True
napoleon_use_rtype = False
napoleon_use_ivar = True
autodoc_default_options = {"members": True, "undoc-members": False, "show-inheritance": True}
autodoc_member_order = "bysource"
autodoc_typehints = "none"
exclude_patterns = ["_build"]
html_theme = "alabaster"
# type fields written in words ("sympy expression in k") make ambiguous cross-references
# numpydoc References sections list sources without citing them in the text
suppress_warnings = ["ref.python", "ref.footnote", "ref.citation"]

_LITERAL = __import__("re").compile(r"(``.*?``|`[^`]*`)")


def _escape_bars(app, what, name, obj, options, lines):
    """Docstrings write absolute values as |beta|^2; outside literals, keep the bars literal for docutils."""
    for i, line in enumerate(lines):
        if "|" in line and not line.lstrip().startswith("+"):
            parts = _LITERAL.split(line)
            lines[i] = "".join(p if j % 2 else p.replace("|", r"\|") for j, p in enumerate(parts))


_FOOTNOTE_DEF = __import__("re").compile(r"^(\s*\.\.\s+)\[(\d+)\]")
_FOOTNOTE_REF = __import__("re").compile(r"\[(\d+)\]_")


def _unique_references(app, what, name, obj, options, lines):
    """Give each docstring's numbered references ([1]_) labels of its own.

    A module page shows the module's docstring and its members' docstrings together, and
    each numbers its References from 1; docutils would see the same target twice.
    """
    key = name.replace("_", "-")
    for i, line in enumerate(lines):
        line = _FOOTNOTE_DEF.sub(lambda m: f"{m.group(1)}[{key}-{m.group(2)}]", line)
        lines[i] = _FOOTNOTE_REF.sub(lambda m: f"[{key}-{m.group(1)}]_", line)


def setup(app):
    app.connect("autodoc-process-docstring", _escape_bars)
    app.connect("autodoc-process-docstring", _unique_references)
