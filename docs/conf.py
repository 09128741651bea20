"""Sphinx configuration for the ionact API reference (built by ``make docs`` and in the tests)."""

import ionact

project = "ionact"
author = "The ionact developers"
copyright = "2026, The ionact developers"
version = release = ionact.__version__
extensions = ["sphinx.ext.autodoc", "sphinx.ext.autosummary", "numpydoc"]
autosummary_generate = True
autodoc_default_options = {"members": True, "undoc-members": False}
numpydoc_show_class_members = False
numpydoc_class_members_toctree = False
html_theme = "alabaster"
exclude_patterns = ["_build"]
nitpicky = False
