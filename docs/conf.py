"""Sphinx configuration: the API reference, generated from the package's numpy-style docstrings.

Build (CI runs this; warnings fail it): python -m sphinx -W --keep-going -b html docs docs/_build/html
"""

from __future__ import annotations

import interact

project = "interact"
author = "interact developers"
release = version = interact.__version__
extensions = ["sphinx.ext.autodoc", "sphinx.ext.napoleon"]
napoleon_google_docstring = False
napoleon_numpy_docstring = True
autodoc_member_order = "bysource"
autodoc_typehints = "description"
autodoc_default_options = {"members": True, "undoc-members": False, "show-inheritance": True}
exclude_patterns = ["_build"]
html_theme = "alabaster"
suppress_warnings = ["ref.python"]  # several modules re-export the same names; cross-references stay plain text
