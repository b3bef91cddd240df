"""lampbook: the build-time package (command line, MkDocs plugin, Pyodide
bundler). It imports the core, never the other way round."""

from __future__ import annotations

__version__ = "0.1.0"
