"""Mains presets by region, each with its tolerance band and where the band
comes from."""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError


@dataclass(frozen=True)
class MainsPreset:
    key: str
    voltage: float
    frequency: float
    minus: float  # fraction below nominal
    plus: float  # fraction above nominal
    source: str
    status: str  # "published", "secondary copy" or "from memory"

    @property
    def low(self) -> float:
        return self.voltage * (1 - self.minus)

    @property
    def high(self) -> float:
        return self.voltage * (1 + self.plus)

    @property
    def peak_high(self) -> float:
        return math.sqrt(2) * self.high

    @property
    def label(self) -> str:
        return f"{self.voltage:g} V / {self.frequency:g} Hz"


_ENVELOPE = (
    "IEC 60950-1 cl. 1.4.5 safety-test supply envelope for nominals other than 230 V "
    "(+6 % / -10 %); check the local supply code"
)

PRESETS: dict[str, MainsPreset] = {
    p.key: p
    for p in (
        MainsPreset(
            "120-60",
            120.0,
            60.0,
            0.05,
            0.05,
            "ANSI C84.1 Table 1, Range A service voltage (114-126 V)",
            "secondary copy",
        ),
        MainsPreset("230-50", 230.0, 50.0, 0.10, 0.10, "IEC 60038 (230 V +/-10 %, 207-253 V)", "published"),
        MainsPreset("240-50", 240.0, 50.0, 0.10, 0.06, _ENVELOPE, "secondary copy"),
        MainsPreset("100-50", 100.0, 50.0, 0.10, 0.06, _ENVELOPE, "secondary copy"),
        MainsPreset("100-60", 100.0, 60.0, 0.10, 0.06, _ENVELOPE, "secondary copy"),
        MainsPreset("127-60", 127.0, 60.0, 0.10, 0.06, _ENVELOPE, "secondary copy"),
        MainsPreset("220-60", 220.0, 60.0, 0.10, 0.06, _ENVELOPE, "secondary copy"),
    )
}


def preset(key: str) -> MainsPreset:
    try:
        return PRESETS[key]
    except KeyError:
        raise InputError("region", key, "one of " + ", ".join(PRESETS)) from None
