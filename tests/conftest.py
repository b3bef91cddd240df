from __future__ import annotations

import os
import sys
from collections.abc import Iterator

import pytest

sys.path.insert(0, os.path.dirname(__file__))


@pytest.fixture
def browser() -> Iterator[object]:
    """Debian's Chromium with the project's arguments, one per test."""
    from playwright.sync_api import sync_playwright

    # imported here: the Pyodide tier loads this conftest with only the core's test files beside it
    from sites import launch

    with sync_playwright() as p:
        b = launch(p)
        yield b
        b.close()
