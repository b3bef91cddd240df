"""The ``lampbook-workbench`` block: a design workbench in the page. The
block lists the designs a reader may start from (paths from the docs folder,
one per line, ``path.toml: label``); everything else happens in the page."""

from __future__ import annotations

import html
import json

NOSCRIPT = (
    "<noscript><p>The design workbench needs JavaScript: it runs the calculation core in this page. "
    "Every design's build sheet is in the handbook as an ordinary page.</p></noscript>"
)


class WorkbenchError(ValueError):
    pass


def render_workbench(index: int, body: str) -> str:
    starts = []
    for n, raw in enumerate(body.splitlines(), 1):
        line = raw.strip()
        if not line or line.startswith("#"):
            continue
        path, sep, label = line.partition(":")
        path, label = path.strip(), label.strip()
        if not sep or not path.endswith(".toml") or path.startswith(("/", "http:", "https:")) or ".." in path:
            raise WorkbenchError(
                f"workbench block {index}, line {n}: expected 'designs/name.toml: label' "
                f"(a design file inside the docs folder), got {line!r}"
            )
        starts.append({"path": path, "label": label or path})
    data = html.escape(json.dumps({"starts": starts}, sort_keys=True), quote=False)
    return (
        '<div class="lb-bench" data-block="' + str(index) + '">'
        '<div class="lb-head"><p class="lb-title"><strong>Design workbench</strong></p>'
        '<span class="lb-engine" role="status">answers computed at build time</span></div>'
        # inside a template: the theme's page changes re-create every script in the content as plain JavaScript
        f'<template class="lb-bench-tpl"><script type="application/json" class="lb-bench-data">{data}</script>'
        "</template>"
        '<div class="lb-bench-app"></div>' + NOSCRIPT + "</div>"
    )
