from __future__ import annotations

from mkdocs.config import base
from mkdocs.config import config_options as c


class LampbookConfig(base.Config):  # type: ignore[no-untyped-call]  # mkdocs leaves __init_subclass__ untyped
    enabled = c.Type(bool, default=True)
    """Turn the plugin off (calculator blocks are then left as code)."""

    fence = c.Type(str, default="lampbook")
    """Info word of the fenced blocks that become calculators."""

    designs = c.Optional(c.Type(str))
    """Folder (inside docs_dir) whose fixture design files (*.toml) each become a build-sheet page next to them."""

    runtime = c.Optional(c.Dir(exists=True))
    """Folder holding the Pyodide npm package; default: node_modules/pyodide next to mkdocs.yml."""

    engine = c.Type(bool, default=True)
    """Ship the in-page engine (Pyodide, the core's wheel, the worker and the service worker)."""

    compile_stdlib = c.Type(bool, default=True)
    """Byte-compile Pyodide's standard library once with Pyodide on Node (about half the start-up time)."""

    cache_dir = c.Type(str, default=".cache/lampbook")
    """Where build products that outlive a build (the compiled standard library) are kept, relative to mkdocs.yml."""

    load_timeout = c.Type(int, default=60)
    """Seconds the page waits for the engine before saying it could not start."""

    trim_stdlib = c.Type(bool, default=True)
    """Ship only the part of the standard library the engine was measured to load (start-up, every module of
    the core, every kind of request); false ships all of it."""

    stdlib_modules = c.Type(list, default=[])
    """Standard-library modules or packages (dotted names) to ship beyond the measured part, for Python a
    handbook's own pages run in the engine."""

    precache_search_languages = c.Optional(c.Type(list))
    """Search-language bundles the offline cache takes (codes such as 'de'); default: the search plugin's
    languages. Bundles for other languages stay on the server and are not cached."""

    precache_source_maps = c.Type(bool, default=False)
    """Put JavaScript source maps (*.map) in the offline cache too."""

    engine_snapshot = c.Type(bool, default=True)
    """Let the page keep, on the device, a memory snapshot of the started engine (about 31 MB of storage,
    nothing sent over the network) and restore it on later visits: the engine is then ready in about a
    third of the time. False: every visit starts Python and imports the core afresh."""

    compress = c.Type(bool, default=True)
    """Write gzip (and, where the brotli package is installed, brotli) siblings of large text, JavaScript,
    JSON and wasm files, for hosts that serve precompressed files."""
    review_jobs = c.Type(int, default=0)
    """Worker processes that review designs needing a review: 0 for as many as the machine has cores, 1 for none."""

    review_cache = c.Type(bool, default=True)
    """Keep each design's review under cache_dir/reviews, keyed by the design text, the core and the options."""

    designs_index = c.Type(bool, default=True)
    """Generate the fixtures index page (index.md in the designs folder) unless the folder has its own."""
