"""`lampbook new FOLDER`: a handbook of one's own that `mkdocs build` turns into an offline site."""

from __future__ import annotations

import json
from pathlib import Path

from .bundle import PYODIDE_VERSION

MKDOCS = """site_name: {name}
# The address the handbook is published at. Pages change in place (the calculators' engine keeps
# running) only for links under it. Offline use on a phone needs HTTPS (any HTTPS static host) or
# localhost on the device itself; plain http from a laptop on the shop network computes but is not
# kept offline.
site_url: !ENV [LAMPBOOK_SITE_URL, "http://127.0.0.1:8000/"]
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


def scaffold(folder: str, name: str) -> Path:
    root = Path(folder)
    if root.exists() and any(root.iterdir()):
        raise ScaffoldError(f"FOLDER: '{folder}' exists and is not empty; expected a new or empty folder")
    (root / "docs" / "designs").mkdir(parents=True, exist_ok=True)
    (root / "mkdocs.yml").write_text(MKDOCS.format(name=name), encoding="utf-8")
    (root / "docs" / "index.md").write_text(INDEX.format(name=name), encoding="utf-8")
    (root / "docs" / "designs" / "first-fixture.toml").write_text(DESIGN, encoding="utf-8")
    (root / "package.json").write_text(
        json.dumps({"name": "handbook", "private": True, "dependencies": {"pyodide": PYODIDE_VERSION}}, indent=2) + "\n"
    )
    return root
