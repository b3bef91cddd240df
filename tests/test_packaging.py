"""Packaging: the browser wheel is built from calc/pyproject.toml by its
declared build backend, holds exactly the core's files, and comes out the
same byte for byte on every build; the version has one source."""

from __future__ import annotations

import hashlib
import subprocess
import sys
import zipfile
from pathlib import Path

import lampcalc
from sites import ROOT

import lampbook
from lampbook.bundle import build_wheel

CORE = ROOT / "calc" / "lampcalc"


def test_wheel_holds_exactly_the_core(tmp_path: Path) -> None:
    wheel = build_wheel(tmp_path)
    assert wheel.name == f"lampcalc-{lampcalc.__version__}-py3-none-any.whl"
    with zipfile.ZipFile(wheel) as z:
        shipped = {n: z.read(n) for n in z.namelist() if n.startswith("lampcalc/")}
        meta = z.read(f"lampcalc-{lampcalc.__version__}.dist-info/METADATA").decode()
    on_disk = {
        "lampcalc/" + p.relative_to(CORE).as_posix(): p.read_bytes()
        for p in CORE.rglob("*")
        if p.is_file() and (p.suffix == ".py" or p.name == "py.typed") and "__pycache__" not in p.parts
    }
    assert sorted(shipped) == sorted(on_disk)
    assert all(shipped[n] == on_disk[n] for n in on_disk)
    assert f"Version: {lampcalc.__version__}" in meta


def test_wheel_is_reproducible(tmp_path: Path) -> None:
    a = build_wheel(tmp_path / "a")
    b = build_wheel(tmp_path / "b")
    assert hashlib.sha256(a.read_bytes()).hexdigest() == hashlib.sha256(b.read_bytes()).hexdigest()


def test_one_version() -> None:
    assert lampbook.__version__ == lampcalc.__version__
    r = subprocess.run([sys.executable, "-m", "lampbook.cli", "--version"], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip() == f"lampbook {lampcalc.__version__}"
    text = (ROOT / "pyproject.toml").read_text() + (ROOT / "calc" / "pyproject.toml").read_text()
    assert lampcalc.__version__ not in text, "the version is written only in calc/lampcalc/__init__.py"


def test_stdlib_measurement_runs_one_design_per_shape_and_keeps_its_key_across_edits(tmp_path: Path) -> None:
    # a handbook of many variants of a few designs is measured on those few, and editing a number in a
    # design does not start a new measurement (the key names shapes, not texts)
    from lampbook.bundle import design_shape, exercise

    demo = ROOT / "docs" / "designs"
    base = (demo / "panel-230.toml").read_text(encoding="utf-8")
    files = []
    for k in range(12):
        p = tmp_path / f"panel-{k:02d}.toml"
        p.write_text(base.replace('name = "', f'name = "v{k} ', 1), encoding="utf-8")
        files.append(p)
    other = tmp_path / "worklight.toml"
    other.write_text((demo / "worklight-120.toml").read_text(encoding="utf-8"), encoding="utf-8")
    files.append(other)
    wheel = tmp_path / "lampcalc-0-py3-none-any.whl"
    with zipfile.ZipFile(wheel, "w") as z:
        z.writestr("lampcalc/__init__.py", "")
    sheets = [r for r in exercise(wheel, files)["requests"] if r["kind"] == "sheet"]
    assert len(sheets) == 1 + len({design_shape(p.read_text(encoding="utf-8")) for p in files})
    assert len(sheets) <= 4  # the starter design, the panel variants (one shape), the worklight
    key = exercise(wheel, files, texts=False)
    assert all(str(r.get("toml", "")).startswith(("shape:", "[not toml")) for r in key["requests"] if "toml" in r)
    # a number edited in the first file: same shape, same key; a table added: a new shape
    first = files[0]
    first.write_text(first.read_text(encoding="utf-8").replace("revision = ", "revision = 'Z' #", 1), encoding="utf-8")
    assert exercise(wheel, files, texts=False) == key
    first.write_text(first.read_text(encoding="utf-8") + '\n[extra_table]\nnote = "x"\n', encoding="utf-8")
    assert exercise(wheel, files, texts=False) != key
    assert design_shape("[not toml") != design_shape("[still not toml")


def test_engine_digest_follows_every_file_the_engine_ships(tmp_path: Path) -> None:
    """The digest under which a page keeps its engine's memory snapshot changes with any file of the
    engine (so a snapshot is never restored over other files), and only with them."""
    import json

    from sites import RUNTIME

    from lampbook import bundle

    bundle.install_engine(tmp_path, RUNTIME)
    eng = tmp_path / "engine"
    lock = eng / "pyodide-lock.json"
    key = bundle.stamp_engine(tmp_path)
    assert key and json.loads(lock.read_text())["lampbook"] == {"engine": key}
    assert bundle.stamp_engine(tmp_path) == key  # the lock file itself is not part of it
    wheel = json.loads(lock.read_text())["packages"]["lampcalc"]["file_name"]
    for name in (*bundle.RUNTIME_FILES, wheel):
        data = (eng / name).read_bytes()
        (eng / name).write_bytes(data + b"\0")
        assert bundle.stamp_engine(tmp_path) != key, name
        (eng / name).write_bytes(data)
    assert bundle.stamp_engine(tmp_path) == key
    assert bundle.stamp_engine(tmp_path, snapshot=False) is None
    assert "lampbook" not in json.loads(lock.read_text())
