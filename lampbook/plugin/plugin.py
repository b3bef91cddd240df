"""Event glue. Parsing and rendering live in :mod:`lampbook.blocks`, bundling
in :mod:`lampbook.bundle`."""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

from mkdocs.config.defaults import MkDocsConfig
from mkdocs.exceptions import PluginError
from mkdocs.plugins import BasePlugin, event_priority, get_plugin_logger
from mkdocs.structure.files import File, Files
from mkdocs.structure.pages import Page
from mkdocs.utils import get_relative_url

from .. import blocks, bundle
from .config import LampbookConfig

log = get_plugin_logger(__name__)
ASSETS = Path(__file__).resolve().parent.parent / "assets"
SITE_ASSETS = (
    "lampbook.css",
    "widget.js",
    "workbench.js",
    "lbutil.js",
    "worker.js",
    "icon.svg",
    "icon-192.png",
    "icon-512.png",
    "offline.html",
)


# Start the engine while the page is still being read (widget.js takes the worker over and
# replays what it said before then): its start-up is the wait every reader sees.
_EARLY_START = (
    "<script>if(!window.lbEngine&&window.Worker){(function(){var q=[],w=new Worker("
    'new URL(WORKER,location.href),{type:"module"});w.onmessage=function(e){q.push(e)};'
    "w.onerror=function(e){q.push(e)};window.lbEngine={worker:w,queue:q}})()}</script>"
)


#: where a sheet's searchable text sits in the page until the whole body replaces it
BODY_START = '<span hidden data-lb-sheet-start=""></span>'
BODY_END = '<span hidden data-lb-sheet-end=""></span>'
_UNSEARCHED = re.compile(r"<(svg|table|figure)\b.*?</\1>", re.S)


def _searchable(body: str) -> str:
    """A sheet body's headings, cautions, verdict and notes: its tables and figures left out."""
    return _UNSEARCHED.sub("", body)


class LampbookPlugin(BasePlugin[LampbookConfig]):  # type: ignore[no-untyped-call]  # as above
    BYPASS_MARKDOWN = True
    """Generated sheet bodies (HTML from the core) go into the page without a Markdown pass."""

    def on_config(self, config: MkDocsConfig) -> MkDocsConfig:
        if not self.config.enabled:
            return config
        config.extra_css.append("assets/lampbook/lampbook.css")
        from mkdocs.config.config_options import ExtraScriptValue

        s = ExtraScriptValue("assets/lampbook/widget.js")
        s.type = "module"
        config.extra_javascript.append(s)
        if self.config.designs and self.config.designs_index:
            config.extra_css.append("assets/lampbook/catalogue.css")
            config.extra_javascript.append("assets/lampbook/catalogue.js")
        self._safety: File | None = None
        self._sheets: dict[str, tuple[str, str, str]] = {}
        return config

    def on_files(self, files: Files, config: MkDocsConfig) -> Files:
        self._safety = files.get_file_from_path("safety.md")
        if self.config.enabled and self.config.designs:
            self._design_pages(files, config, self.config.designs)
        return files

    def _design_pages(self, files: Files, config: MkDocsConfig, folder: str) -> None:
        """A build sheet per design file, reviewed once per content (see :mod:`lampbook.sheets`), and the index."""
        from ..catalogue import default_jobs
        from ..fixtureindex import IndexRow, index_markdown
        from ..reviewcache import ReviewCache
        from ..sheets import SheetError, design_sheets

        jobs = self.config.review_jobs
        if jobs < 0:
            raise PluginError(f"lampbook: review_jobs: got {jobs}; expected 0 (as many as there are cores) or more")
        jobs = jobs or default_jobs()
        cache = None
        if self.config.review_cache:
            cache = ReviewCache(Path(config.config_file_path).parent / self.config.cache_dir / "reviews")

        def start(todo: int, cached: int) -> None:
            if todo > 1 and jobs > 1:
                log.info(
                    "reviewing %d designs in %d worker processes (%d from the cache)", todo, min(jobs, todo), cached
                )
            elif todo:
                log.info("reviewing %d design%s (%d from the cache)", todo, "s" if todo != 1 else "", cached)

        def progress(done: int, total: int, seconds: float) -> None:
            if done < total:
                log.info("reviewed %d of %d designs (%.0f s)", done, total, seconds)

        try:
            run = design_sheets(Path(config.docs_dir), folder, cache, jobs, progress, start)
        except SheetError as e:
            raise PluginError(f"lampbook: {e}") from None
        for msg in run.cache_errors[:1]:
            log.info("review cache not written (%s); the build goes on without it", msg)
        log.info(
            "designs: %d sheets, %d reviewed (%.1f s of review), %d from the cache; %.1f s",
            len(run.sheets),
            run.reviewed,
            run.review_seconds,
            run.cached,
            run.seconds,
        )
        pages = {}
        self._sheets = {}
        for sheet in run.sheets:
            f = files.get_file_from_path(sheet.src_uri)
            if f is None:
                f = File.generated(config, sheet.src_uri, content=sheet.markdown)
                files.append(f)
                if self.BYPASS_MARKDOWN and sheet.stub is not None and sheet.body is not None:
                    self._sheets[sheet.src_uri] = (sheet.markdown, sheet.stub, sheet.body)
            pages[sheet.design] = f
        if not self.config.designs_index:
            return
        for name in ("catalogue.js", "catalogue.css"):  # named in extra_javascript / extra_css by on_config
            files.append(File.generated(config, f"assets/lampbook/{name}", abs_src_path=str(ASSETS / name)))
        index_uri = folder.strip("/") + "/index.md"
        if not run.sheets or files.get_file_from_path(index_uri) is not None:
            return
        index = File.generated(config, index_uri, content="")
        rows = [
            IndexRow(s.summary, get_relative_url(pages[s.design].url, index.url), s.design.rsplit("/", 1)[-1])
            for s in run.sheets
        ]
        safety = get_relative_url(self._safety.url, index.url) if self._safety is not None else None
        index.content_string = index_markdown(rows, safety_href=safety)
        files.append(index)

    def on_page_markdown(self, markdown: str, /, *, page: Page, config: MkDocsConfig, files: Files) -> str:
        if not self.config.enabled:
            return markdown
        sheet = self._sheets.get(page.file.src_uri)
        if sheet is not None and markdown == sheet[0]:
            return sheet[1]  # the core's HTML body waits for on_page_content
        safety = None
        if self._safety is not None and page.file.src_uri != self._safety.src_uri:
            safety = get_relative_url(self._safety.url, page.file.url)
        try:
            out, n = blocks.replace_blocks(markdown, self.config.fence, safety)
        except blocks.BlockError as e:
            raise PluginError(f"lampbook: {page.file.src_uri}: {e}") from None
        if n:
            log.debug("%s: %d calculator blocks", page.file.src_uri, n)
        return out

    def on_page_content(self, html: str, /, *, page: Page, config: MkDocsConfig, files: Files) -> str:
        """A generated sheet's body is HTML already: it skipped the Markdown pass and is put back here."""
        from ..sheets import SHEET_SLOT

        sheet = self._sheets.get(page.file.src_uri) if self.config.enabled else None
        if sheet is None or SHEET_SLOT not in html:
            return html
        # the search index reads the page's content next: it gets the sheet's words without its tables and
        # drawings (hundreds of sheets index in a second, and the index a phone downloads stays small); the
        # whole body goes into the written page in on_post_page
        return html.replace(SHEET_SLOT, BODY_START + _searchable(sheet[2]) + BODY_END, 1)

    def on_post_page(self, output: str, /, *, page: Page, config: MkDocsConfig) -> str:
        if not self.config.enabled:
            return output
        sheet = self._sheets.get(page.file.src_uri)
        if sheet is not None and BODY_START in output:
            i = output.index(BODY_START)
            j = output.find(BODY_END, i)
            if j < 0:
                raise PluginError(f"lampbook: {page.file.src_uri}: the sheet's body was cut by another plugin")
            output = output[:i] + sheet[2] + output[j + len(BODY_END) :]
        base = get_relative_url(".", page.url).rstrip("/") + "/"
        site_json = json.dumps({"root": base, "timeout": self.config.load_timeout, "engine": self.config.engine})
        meta = (
            f'<link rel="manifest" href="{base}manifest.webmanifest">'
            f'<meta name="theme-color" content="#26323a">'
            f'<script type="application/json" id="lb-site">{site_json}</script>'
        )
        if self.config.engine and 'class="lb-calc"' in output:
            meta += _EARLY_START.replace("WORKER", json.dumps(base + "assets/lampbook/worker.js"))
        return output.replace("</head>", meta + "</head>", 1)

    # after every other plugin (the search index must exist before the offline precache is listed)
    @event_priority(-100)
    def on_post_build(self, *, config: MkDocsConfig) -> None:
        if not self.config.enabled:
            return
        site = Path(config.site_dir)
        dest = site / "assets" / "lampbook"
        dest.mkdir(parents=True, exist_ok=True)
        for name in SITE_ASSETS:
            shutil.copyfile(ASSETS / name, dest / name)
        shutil.copyfile(ASSETS / "offline.html", site / "offline.html")
        manifest = {
            "name": config.site_name,
            "short_name": config.site_name[:12],
            "start_url": "./",
            "scope": "./",
            "display": "standalone",
            "background_color": "#f4f1ea",
            "theme_color": "#26323a",
            "icons": [
                {"src": "assets/lampbook/icon-192.png", "sizes": "192x192", "type": "image/png"},
                {"src": "assets/lampbook/icon-512.png", "sizes": "512x512", "type": "image/png"},
                {"src": "assets/lampbook/icon.svg", "sizes": "any", "type": "image/svg+xml"},
            ],
        }
        (site / "manifest.webmanifest").write_text(json.dumps(manifest, indent=1, sort_keys=True))
        if not self.config.engine:
            return
        try:
            here = Path(config.config_file_path).parent
            runtime = bundle.find_runtime(self.config.runtime, str(here))
            stdlib = (
                bundle.compiled_stdlib(runtime, here / self.config.cache_dir) if self.config.compile_stdlib else None
            )
            cache = here / self.config.cache_dir
            bundle.install_engine(site, runtime, stdlib, cache if self.config.compile_stdlib else None)
            if self.config.trim_stdlib:
                designs = (
                    sorted((Path(config.docs_dir) / self.config.designs).glob("*.toml")) if self.config.designs else []
                )
                t = bundle.trim_engine_stdlib(site, cache, list(self.config.stdlib_modules), designs)
                log.info("standard library trimmed to %d of %d files (%d bytes)", t["files"], t["of"], t["bytes"])
            engine_key = bundle.stamp_engine(site, self.config.engine_snapshot)
        except bundle.BundleError as e:
            raise PluginError(f"lampbook: {e}") from None
        langs = self.config.precache_search_languages
        version = bundle.write_service_worker(
            site,
            (ASSETS / "sw.js").read_text(),
            [str(x) for x in langs] if langs is not None else _search_languages(config),
            self.config.precache_source_maps,
            engine_key,
        )
        if self.config.compress:
            bundle.write_compressed(site, Path(config.config_file_path).parent / self.config.cache_dir)
        log.info("engine bundled, offline cache %s", version)


def _search_languages(config: MkDocsConfig) -> list[str] | None:
    """The search plugin's languages (its default: the theme's language, else English);
    None when the site has no search plugin we know (then every bundle is cached)."""
    for name in ("search", "material/search"):
        plugin = config.plugins.get(name)
        if plugin is not None:
            lang = plugin.config.get("lang")
            if not lang:
                theme_lang = config.theme.get("language") or config.theme.get("locale") or "en"
                lang = [str(theme_lang).split("_")[0].split("-")[0]]
            return [str(x) for x in (lang if isinstance(lang, list) else [lang])]
    return None
