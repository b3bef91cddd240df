"""Event glue. Parsing and rendering live in :mod:`lampbook.blocks`, bundling
in :mod:`lampbook.bundle`."""

from __future__ import annotations

import json
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
    "worker.js",
    "icon.svg",
    "icon-192.png",
    "icon-512.png",
    "offline.html",
)


class LampbookPlugin(BasePlugin[LampbookConfig]):  # type: ignore[no-untyped-call]  # as above
    def on_config(self, config: MkDocsConfig) -> MkDocsConfig:
        if not self.config.enabled:
            return config
        config.extra_css.append("assets/lampbook/lampbook.css")
        from mkdocs.config.config_options import ExtraScriptValue

        s = ExtraScriptValue("assets/lampbook/widget.js")
        s.type = "module"
        config.extra_javascript.append(s)
        self._safety: File | None = None
        return config

    def on_files(self, files: Files, config: MkDocsConfig) -> Files:
        self._safety = files.get_file_from_path("safety.md")
        if self.config.enabled and self.config.designs:
            from ..sheets import SheetError, sheet_pages

            try:
                pages = sheet_pages(Path(config.docs_dir), self.config.designs)
            except SheetError as e:
                raise PluginError(f"lampbook: {e}") from None
            for src_uri, text in pages:
                if files.get_file_from_path(src_uri) is None:
                    files.append(File.generated(config, src_uri, content=text))
        return files

    def on_page_markdown(self, markdown: str, /, *, page: Page, config: MkDocsConfig, files: Files) -> str:
        if not self.config.enabled:
            return markdown
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

    def on_post_page(self, output: str, /, *, page: Page, config: MkDocsConfig) -> str:
        if not self.config.enabled:
            return output
        base = get_relative_url(".", page.url).rstrip("/") + "/"
        site_json = json.dumps({"root": base, "timeout": self.config.load_timeout, "engine": self.config.engine})
        meta = (
            f'<link rel="manifest" href="{base}manifest.webmanifest">'
            f'<meta name="theme-color" content="#26323a">'
            f'<script type="application/json" id="lb-site">{site_json}</script>'
        )
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
            bundle.install_engine(site, runtime, stdlib)
        except bundle.BundleError as e:
            raise PluginError(f"lampbook: {e}") from None
        version = bundle.write_service_worker(site, (ASSETS / "sw.js").read_text())
        log.info("engine bundled, offline cache %s", version)
