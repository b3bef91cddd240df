"""lampbook: the build-time package (command line, MkDocs plugin, Pyodide
bundler). It imports the core, never the other way round."""

from __future__ import annotations

from lampcalc import __version__

__all__ = ["__version__"]
