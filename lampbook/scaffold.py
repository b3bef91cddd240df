"""`lampbook new FOLDER`: a handbook of one's own that `mkdocs build` turns into an offline site."""

from __future__ import annotations

import errno
import json
import os
import shutil
import tempfile
from pathlib import Path

from .bundle import PYODIDE_VERSION

MKDOCS = """site_name: {yaml_name}
theme:
  name: material
  font: false
  features:
    - navigation.instant
plugins:
  - search
  - lampbook:
      designs: designs
markdown_extensions:
  - tables
  - admonition
  - attr_list
  - md_in_html
extra:
  generator: false
"""

INDEX = """# {name}

!!! danger "Mains work"
    Dropper-fed fixtures have no isolation and their capacitors hold charge. Local codes and licensed
    practice decide.

## Dropper check

```lampbook
calculator: dropper
```

## Our fixtures

- [First fixture](designs/first-fixture.md)

## Open a design from this device

```lampbook-open
```
"""

DESIGN = """# A first fixture: edit every value for your own build.
name = "First fixture"
revision = "A"
date = ""
description = "One string of 30 modules on a dropper; replace with your own."

[mains]
voltage = "230 V"
frequency = "50 Hz"
tolerance = "10 %"

[module]
v0 = "2.7 V"
r_dynamic = "2 Ω"
current_max = "60 mA"
vf_spread = "3 %"
temperature = "50 °C"

[array]
series = 30
parallel = 1

[dropper]
capacitance = "0.68 uF"
class = "X2"
ac_rating = "310 V"
series_resistance = "100 Ω"
bleeder = "470 kΩ"

[bridge]
vrrm = "1000 V"
surge_rating = "30 A"

[smoothing]
capacitance = "470 uF"
esr = "0.3 Ω"
bleeder = "100 kΩ"
voltage_rating = "400 V"

[fuse]
rating = "250 mA"
"""


class ScaffoldError(ValueError):
    pass


def _check_name(name: str) -> None:
    if not name.strip() or len(name) > 200 or any(ord(ch) < 32 or ord(ch) == 127 for ch in name):
        raise ScaffoldError(
            f"--name: got {name!r}; expected a title of 1 to 200 characters on one line, such as 'Shop handbook'"
        )


def scaffold(folder: str, name: str) -> Path:
    """Write the handbook into a temporary folder beside FOLDER and rename it
    into place: FOLDER appears whole or not at all, and of two runs into one
    folder only the first succeeds."""
    _check_name(name)
    root = Path(folder)
    if root.exists() and not root.is_dir():
        raise ScaffoldError(f"FOLDER: '{folder}' is a file; expected a new or empty folder")
    if root.is_dir() and any(root.iterdir()):
        raise ScaffoldError(f"FOLDER: '{folder}' exists and is not empty; expected a new or empty folder")
    parent = root.absolute().parent
    try:
        parent.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise ScaffoldError(
            f"FOLDER: cannot make '{parent}': {e.strerror}; expected a folder that can be made"
        ) from None
    try:
        tmp = Path(tempfile.mkdtemp(prefix=f".{root.name}.", suffix=".new", dir=parent))
    except OSError as e:
        raise ScaffoldError(f"FOLDER: cannot write in '{parent}': {e.strerror}; expected a writable place") from None
    try:
        # a JSON string is a YAML double-quoted scalar: colons, quotes and '#' stay text
        yaml_name = json.dumps(name, ensure_ascii=True)
        (tmp / "docs" / "designs").mkdir(parents=True)
        (tmp / "mkdocs.yml").write_text(MKDOCS.format(yaml_name=yaml_name), encoding="utf-8")
        (tmp / "docs" / "index.md").write_text(INDEX.format(name=name), encoding="utf-8")
        (tmp / "docs" / "designs" / "first-fixture.toml").write_text(DESIGN, encoding="utf-8")
        (tmp / "package.json").write_text(
            json.dumps({"name": "handbook", "private": True, "dependencies": {"pyodide": PYODIDE_VERSION}}, indent=2)
            + "\n",
            encoding="utf-8",
        )
        tmp.chmod(0o777 & ~_umask())
        os.rename(tmp, root)  # onto a missing or empty folder only; a filled one refuses
    except OSError as e:
        shutil.rmtree(tmp, ignore_errors=True)
        if e.errno in (errno.ENOTEMPTY, errno.EEXIST, errno.ENOTDIR, errno.EISDIR):
            raise ScaffoldError(
                f"FOLDER: '{folder}' was filled or taken while writing; expected a new or empty folder"
            ) from None
        raise ScaffoldError(f"FOLDER: cannot write '{folder}': {e.strerror}; expected a writable place") from None
    return root


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask
