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
suppress_warnings = ["ref.python", "ref.footnote"]

_LITERAL = __import__("re").compile(r"(``.*?``|`[^`]*`)")


def _escape_bars(app, what, name, obj, options, lines):
    """Docstrings write absolute values as |beta|^2; outside literals, keep the bars literal for docutils."""
    for i, line in enumerate(lines):
        if "|" in line and not line.lstrip().startswith("+"):
            parts = _LITERAL.split(line)
            lines[i] = "".join(p if j % 2 else p.replace("|", r"\|") for j, p in enumerate(parts))


def setup(app):
    app.connect("autodoc-process-docstring", _escape_bars)
