"""lampcalc: the calculation core of lampbook.

Pure Python, standard library only, SI floats inside, no I/O. The same code
runs natively and in the browser through Pyodide.
"""

from __future__ import annotations

__version__ = "0.1.0"
