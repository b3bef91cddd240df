"""The core's layers: each subpackage imports only the layers below it, and the
core as a whole imports only the standard library (calc/README.md states the
rule; this test keeps it)."""

from __future__ import annotations

import ast
import sys
from pathlib import Path

import pytest
from sites import ROOT

CORE = ROOT / "calc" / "lampcalc"

# what each part of the core may import from inside lampcalc; every part may name the page protocol's shapes
# (protocol.py: stdlib typing only, the bottom layer)
ALLOWED: dict[str, set[str]] = {
    "protocol": set(),
    "errors": {"protocol"},
    "cautions": set(),
    "quantities": {"errors", "protocol"},
    "physics": {"errors", "quantities", "protocol"},
    "circuit": {"errors", "quantities", "physics", "protocol"},
    "fixture": {"errors", "cautions", "quantities", "physics", "circuit", "protocol"},
    "present": {"errors", "cautions", "quantities", "physics", "circuit", "fixture", "protocol"},
    "schema": {"errors", "cautions", "quantities", "physics", "protocol"},
    "calculators": {"errors", "cautions", "quantities", "physics", "schema", "protocol"},
}
TOP = {"api", "design_api"}  # the entry points may import anything in the core


def _part(path: Path) -> str:
    rel = path.relative_to(CORE).with_suffix("")
    return rel.parts[0]


def _imports(path: Path) -> list[tuple[str, int]]:
    """Absolute dotted names of what a module imports, with line numbers."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    pkg = ["lampcalc", *path.relative_to(CORE).parent.parts]
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out += [(a.name, node.lineno) for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = pkg[: len(pkg) - node.level + 1]
                mod = ".".join(base + ([node.module] if node.module else []))
                if node.module is None:
                    out += [(f"{mod}.{a.name}", node.lineno) for a in node.names]
                    continue
            else:
                mod = node.module or ""
            out.append((mod, node.lineno))
    return out


def _modules() -> list[Path]:
    return sorted(p for p in CORE.rglob("*.py"))


@pytest.mark.parametrize("path", _modules(), ids=lambda p: p.relative_to(CORE).as_posix())
def test_core_imports_follow_the_layers(path: Path) -> None:
    part = _part(path)
    bad = []
    for name, line in _imports(path):
        top = name.split(".")[0]
        if top == "lampcalc":
            inner = name.split(".")[1] if "." in name else ""
            if inner and part not in TOP and inner != part and inner not in ALLOWED.get(part, set()):
                bad.append(f"line {line}: {name}")
        elif top != "__future__" and top not in sys.stdlib_module_names:
            bad.append(f"line {line}: {name} is not in the standard library")
    assert not bad, f"{path.relative_to(ROOT)} breaks its import rule: " + "; ".join(bad)


def test_every_subpackage_states_its_import_rule() -> None:
    for init in CORE.glob("*/__init__.py"):
        doc = ast.get_docstring(ast.parse(init.read_text(encoding="utf-8"))) or ""
        assert "Import rule:" in doc, f"{init.relative_to(ROOT)} has no import rule in its docstring"


def test_every_part_of_the_core_has_a_rule() -> None:
    parts = {_part(p) for p in _modules() if p.name != "__init__.py" or p.parent != CORE}
    unknown = parts - set(ALLOWED) - TOP
    assert not unknown, f"parts of the core with no import rule in this test: {sorted(unknown)}"
