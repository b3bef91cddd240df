"""Fixture design files: one TOML document describes a whole fixture.

Values are plain SI numbers or strings with units ("4.7 uF", "230 V").
Unknown keys, missing keys and wrong units are errors naming the key.
The text is parsed here (``tomllib`` is in the standard library); reading the
file is the caller's business.
"""

from __future__ import annotations

import math
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, replace
from typing import Any

from .errors import InputError, InputErrors
from .led import LedModule
from .steady import Bridge, Circuit, StringLoad
from .units import parse

# table -> key -> (dimension, required, default)
Spec = dict[str, tuple[str, bool, object]]

SCHEMA: dict[str, Spec] = {
    "": {"name": ("text", True, None), "revision": ("text", False, "1"), "date": ("text", False, ""),
         "description": ("text", False, ""), "ambient": ("temperature", False, 25.0)},
    "mains": {"voltage": ("voltage", True, None), "frequency": ("frequency", True, None),
              "tolerance": ("ratio", False, 0.10), "tolerance_minus": ("ratio", False, None), "region": ("text", False, None)},
    "supply": {"kind": ("text", True, None), "voltage": ("voltage", True, None), "tolerance": ("ratio", False, 0.05),
               "current_rating": ("current", False, None)},
    "module": {"v0": ("voltage", False, None), "r_dynamic": ("resistance", False, None), "points": ("points", False, None),
               "current_max": ("current", True, None), "vf_tempco": ("tempco", False, -0.003),
               "vf_spread": ("ratio", False, 0.0), "temperature": ("temperature", False, 25.0), "name": ("text", False, "")},
    "array": {"series": ("count", True, None), "parallel": ("count", False, 1.0), "ballast": ("resistance", False, 0.0),
              "offsets": ("voltages", False, None), "ballast_rating": ("power", False, None)},
    "dropper": {"capacitance": ("capacitance", False, None), "tolerance": ("ratio", False, 0.10),
                "series_resistance": ("resistance", False, 0.0), "bleeder": ("resistance", False, None),
                "ac_rating": ("voltage", False, None), "class": ("text", False, None), "steps": ("capacitances", False, None),
                "resistor_rating": ("power", False, None)},
    "bridge": {"model": ("text", False, "line"), "drop": ("voltage", False, 0.9), "resistance": ("resistance", False, 0.05),
               "saturation_current": ("current", False, 1e-9), "emission_coefficient": ("count", False, 1.8),
               "temperature": ("temperature", False, 25.0), "vrrm": ("voltage", False, None),
               "average_rating": ("current", False, None), "surge_rating": ("current", False, None),
               "tj_max": ("temperature", False, 150.0), "theta_jc": ("thermal_resistance", False, None),
               "theta_cs": ("thermal_resistance", False, 0.5), "theta_ja": ("thermal_resistance", False, None)},
    "smoothing": {"capacitance": ("capacitance", True, None), "esr": ("resistance", False, 0.0),
                  "bleeder": ("resistance", False, None), "voltage_rating": ("voltage", False, None),
                  "ripple_rating": ("current", False, None), "rated_life": ("time", False, None),
                  "rated_temperature": ("temperature", False, 105.0), "clamp": ("voltage", False, None)},
    "fuse": {"rating": ("current", True, None), "kind": ("text", False, "time-lag"), "standard": ("text", False, "IEC 60127")},
    "switch": {"rating": ("current", True, None), "surge_rating": ("current", False, None)},
    "review": {"discharge_voltage": ("voltage", False, 34.0), "discharge_time": ("time", False, 1.0),
               "temperature_cold": ("temperature", False, 0.0), "temperature_hot": ("temperature", False, None),
               "life_target": ("time", False, 20000 * 3600.0), "drop_limit": ("ratio", False, 0.03),
               "seed": ("count", False, 1.0), "samples": ("count", False, 1000.0)},
}  # fmt: skip
WIRE_SPEC: Spec = {"name": ("text", True, None), "size": ("area", True, None), "length": ("length", True, None),
                   "carries": ("text", False, "line"), "table": ("text", False, None), "temperature": ("temperature", False, 40.0)}  # fmt: skip
WIRE_CARRIES = ("line", "bus", "string", "supply")
MAINS_TABLES = ("mains", "module", "array", "smoothing")
CV_TABLES = ("supply", "module", "array")
OPTIONAL_TABLES = ("fuse", "switch")



@dataclass(frozen=True)
class Design:
    name: str
    revision: str
    date: str
    description: str
    values: Mapping[str, Mapping[str, Any]]  # parsed, SI
    wires: tuple[Mapping[str, Any], ...] = ()

    def get(self, table: str, key: str) -> Any:
        return self.values.get(table, {}).get(key)

    @property
    def module(self) -> LedModule:
        m = self.values["module"]
        pts = m.get("points")
        kw = {"current_max": m["current_max"], "vf_tempco": m["vf_tempco"], "vf_spread": m["vf_spread"]}
        if pts:
            (i1, v1), (i2, v2) = pts
            return LedModule.from_points(i1, v1, i2, v2, **kw)
        return LedModule(v0=m["v0"], r_dynamic=m["r_dynamic"], **kw)

    @property
    def is_cv(self) -> bool:
        return "supply" in self.values

    @property
    def has_dropper(self) -> bool:
        return self.get("dropper", "capacitance") is not None

    def mains_band(self) -> tuple[float, float, float]:
        t = self.values["supply"] if self.is_cv else self.values["mains"]
        v = t["voltage"]
        plus = t["tolerance"]
        minus = t.get("tolerance_minus")
        minus = plus if minus is None else minus
        return v, v * (1 - minus), v * (1 + plus)

    def circuit(
        self,
        mains_voltage: float | None = None,
        dropper_scale: float = 1.0,
        vf_corner: float = 0,
        temperature: float | None = None,
        frequency: float | None = None,
    ) -> Circuit:
        """The circuit at a corner: mains, dropper capacitance scale, Vf end
        of the band (-1/0/+1), module temperature."""
        mod = self.module
        arr = self.values["array"]
        s, p = int(arr["series"]), int(arr["parallel"])
        t = self.values["module"]["temperature"] if temperature is None else temperature
        i_ref = mod.current_max
        mod = replace(mod, current_ref=i_ref)
        knee = s * mod.v0_at(t, vf_corner)
        res = s * mod.r_dynamic + arr["ballast"]
        offsets = arr.get("offsets")
        if offsets:
            groups: dict[float, int] = {}
            for o in offsets:
                groups[o] = groups.get(o, 0) + 1
            loads = tuple(StringLoad(knee + o, res, n, arr["ballast"]) for o, n in sorted(groups.items()))
        else:
            loads = (StringLoad(knee, res, p, arr["ballast"]),)
        br = self.values["bridge"]
        bridge = Bridge(kind=br["model"], drop=br["drop"], resistance=br["resistance"], saturation_current=br["saturation_current"],
                        emission_coefficient=br["emission_coefficient"], temperature=br["temperature"])  # fmt: skip
        d = self.values.get("dropper", {})
        sm = self.values["smoothing"]
        cap = d.get("capacitance")
        return Circuit(
            mains_voltage=self.values["mains"]["voltage"] if mains_voltage is None else mains_voltage,
            frequency=self.values["mains"]["frequency"] if frequency is None else frequency,
            series_resistance=d.get("series_resistance", 0.0) or 0.0,
            dropper=cap * dropper_scale if cap else None,
            dropper_bleeder=d.get("bleeder"),
            bridge=bridge,
            smoothing=sm["capacitance"],
            esr=sm["esr"],
            bleeder=sm.get("bleeder"),
            strings=loads,
        )


def _table(table: str, spec: Spec, given: Mapping[str, object], errors: list[InputError]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key in given:
        if key not in spec:
            label = key if table == "" else f"{table}.{key}"
            errors.append(InputError(label, given[key], f"one of the keys of [{table or 'top level'}]: " + ", ".join(spec)))
    for key, (dim, required, default) in spec.items():
        label = key if table == "" else f"{table}.{key}"
        if key in given:
            try:
                out[key] = _value(dim, given[key], label)
            except InputError as e:
                errors.append(e)
        elif required:
            errors.append(InputError(label, "missing", f"a value for {label}"))
        else:
            out[key] = default
    return out


def _value(dim: str, raw: object, key: str) -> object:
    if dim == "text":
        if not isinstance(raw, str):
            raise InputError(key, raw, "text in quotes")
        return raw
    if dim == "points":
        if not (isinstance(raw, list) and len(raw) == 2 and all(isinstance(p, list) and len(p) == 2 for p in raw)):
            raise InputError(key, raw, 'two [current, voltage] pairs such as [["20 mA", "2.9 V"], ["60 mA", "3.1 V"]]')
        return [(parse(p[0], "current", key), parse(p[1], "voltage", key)) for p in raw]
    if dim in ("voltages", "capacitances"):
        one = dim[:-1]
        if not isinstance(raw, list) or not raw:
            raise InputError(key, raw, f"a list of {dim} such as " + ('["0 V", "0.5 V"]' if one == "voltage" else '["1 uF", "1.47 uF"]'))
        return [parse(v, one, key) for v in raw]
    x = parse(raw, dim, key)
    if not math.isfinite(x):
        raise InputError(key, raw, "a finite value")
    if dim == "count" and key.endswith(("series", "parallel")):
        if x != int(x) or x < 1:
            raise InputError(key, raw, "a whole number of 1 or more")
    return x


def parse_design(text: str) -> Design:
    """Parse and check a design; every problem is collected and reported."""
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise InputError("design", "TOML", f"valid TOML ({e})") from None
    errors: list[InputError] = []
    values: dict[str, dict[str, Any]] = {}
    schema = SCHEMA
    top = {k: v for k, v in doc.items() if not isinstance(v, dict) and k != "wire"}
    tables = {k: v for k, v in doc.items() if isinstance(v, dict)}
    cv = "supply" in tables
    required = CV_TABLES if cv else MAINS_TABLES
    for k in tables:
        if k not in schema or k == "":
            errors.append(InputError(f"[{k}]", "table", "one of the tables " + ", ".join(f"[{t}]" for t in schema if t) + ", [[wire]]"))
        elif cv and k in ("mains", "dropper", "bridge", "smoothing"):
            errors.append(InputError(f"[{k}]", "table", "no mains tables in a [supply] design (a constant-voltage supply feeds the array)"))
    for t in required:
        if t not in tables:
            errors.append(InputError(f"[{t}]", "missing", f"a [{t}] table"))
    for table, spec in schema.items():
        given = top if table == "" else tables.get(table)
        if given is None:
            if table in ("review",) or (not cv and table in ("dropper", "bridge")):
                given = {}
            else:
                continue
        values[table] = _table(table, spec, given, errors)
    wires = doc.get("wire", [])
    if not isinstance(wires, list) or not all(isinstance(w, dict) for w in wires):
        errors.append(InputError("[[wire]]", wires, "wire runs as [[wire]] tables"))
        wires = []
    runs = [_table(f"wire[{n}]", WIRE_SPEC, w, errors) for n, w in enumerate(wires)]
    for n, run in enumerate(runs):
        if run.get("carries") not in WIRE_CARRIES:
            errors.append(InputError(f"wire[{n}].carries", run.get("carries"), "one of " + ", ".join(WIRE_CARRIES)))
    sup = values.get("supply")
    if sup and sup.get("kind") != "cv":
        errors.append(InputError("supply.kind", sup.get("kind"), "'cv' (a constant-voltage supply with ballast resistors)"))
    m = values.get("module", {})
    if m and not m.get("points") and (m.get("v0") is None or m.get("r_dynamic") is None):
        errors.append(InputError("module.v0", "missing", "module.v0 and module.r_dynamic, or module.points"))
    br = values.get("bridge", {})
    if not cv and br.get("model") not in ("line", "exponential"):
        errors.append(InputError("bridge.model", br.get("model"), "'line' or 'exponential'"))
    arr = values.get("array", {})
    offs = arr.get("offsets")
    if offs is not None and arr.get("parallel") is not None and len(offs) != int(arr["parallel"]):
        errors.append(InputError("array.offsets", f"{len(offs)} values", f"one offset per string ({int(arr['parallel'])})"))
    if errors:
        raise errors[0] if len(errors) == 1 else InputErrors(errors)
    top_v = values.pop("")
    d = Design(str(top_v["name"]), str(top_v["revision"]), str(top_v["date"]), str(top_v["description"]),
               {**values, "": top_v}, tuple(runs))  # fmt: skip
    try:
        d.module  # noqa: B018 - validates the module line
        if not d.is_cv:
            d.circuit().validate()
    except InputError as e:
        raise InputError(_design_key(e.field), e.value, e.expected) from None
    return d


def _design_key(field: str) -> str:
    return {"v0": "module.v0", "r_dynamic": "module.r_dynamic", "points": "module.points", "current_max": "module.current_max",
            "vf_spread": "module.vf_spread", "vf_tempco": "module.vf_tempco"}.get(field, field)  # fmt: skip
