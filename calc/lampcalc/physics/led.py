"""LED module model: a straight line V = V0 + Rd*I above the knee.

V0 moves with temperature by the module's forward-voltage temperature
coefficient (negative: forward voltage falls as the module warms). The
tolerance band shifts V0 by a fraction of the forward voltage at the rated
current, the way datasheets print a minimum and a maximum forward voltage.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from ..errors import InputError

#: Default forward-voltage temperature coefficient per module, V/K. This is
#: the textbook value for one InGaN die (-3 mV/K); a module with several dies
#: in series has a proportionally larger one: set it from the datasheet.
DEFAULT_TEMPCO = -0.003
#: Temperature at which V0 and Rd are stated, °C.
REFERENCE_TEMPERATURE = 25.0


@dataclass(frozen=True)
class LedModule:
    v0: float  # V, knee voltage at the reference temperature
    r_dynamic: float  # ohm
    current_max: float = math.inf  # A
    vf_tempco: float = DEFAULT_TEMPCO  # V/K
    vf_spread: float = 0.0  # fraction of Vf at current_ref, +/- band
    current_ref: float | None = None  # A, the rated (test) current

    def __post_init__(self) -> None:
        if not (math.isfinite(self.v0) and self.v0 > 0):
            raise InputError("v0", self.v0, "a positive knee voltage such as '2.7 V'")
        if not (math.isfinite(self.r_dynamic) and self.r_dynamic >= 0):
            raise InputError("r_dynamic", self.r_dynamic, "a dynamic resistance of 0 Ω or more")
        if not (self.current_max > 0):
            raise InputError("current_max", self.current_max, "a positive current")
        if not (0 <= self.vf_spread < 0.5):
            raise InputError("vf_spread", self.vf_spread, "a tolerance from 0 % to 50 %")
        if not math.isfinite(self.vf_tempco) or abs(self.vf_tempco) > 1.0:
            raise InputError("vf_tempco", self.vf_tempco, "a temperature coefficient between -1 V/K and 1 V/K")

    @classmethod
    def from_points(cls, i1: float, v1: float, i2: float, v2: float, **kw: float) -> LedModule:
        """Fit the straight line through two datasheet points (I, V)."""
        if i1 <= 0 or i2 <= 0:
            raise InputError("points", (i1, i2), "two positive currents")
        if i1 == i2:
            raise InputError("points", (i1, i2), "two different currents")
        rd = (v2 - v1) / (i2 - i1)
        if rd < 0:
            raise InputError("points", ((i1, v1), (i2, v2)), "a voltage that rises with current")
        v0 = v1 - rd * i1
        if v0 <= 0:
            raise InputError(
                "points", ((i1, v1), (i2, v2)), "points whose straight line crosses zero current above 0 V"
            )
        return cls(v0=v0, r_dynamic=rd, **kw)

    def v0_at(self, temperature: float = REFERENCE_TEMPERATURE, corner: float = 0) -> float:
        """Knee voltage at a temperature; ``corner`` -1/0/+1 picks the low,
        nominal or high end of the tolerance band (values between move along it)."""
        base = self.v0 + self.vf_tempco * (temperature - REFERENCE_TEMPERATURE)
        if corner and self.vf_spread:
            ref = self.current_ref if self.current_ref is not None else 0.0
            base += corner * self.vf_spread * (self.v0 + self.r_dynamic * ref)
        return base

    def voltage(self, current: float, temperature: float = REFERENCE_TEMPERATURE, corner: float = 0) -> float:
        """Forward voltage at a current (the knee voltage at zero current)."""
        return self.v0_at(temperature, corner) + self.r_dynamic * max(current, 0.0)

    def current(self, voltage: float, temperature: float = REFERENCE_TEMPERATURE, corner: float = 0) -> float:
        """Current at a forward voltage (0 below the knee)."""
        over = voltage - self.v0_at(temperature, corner)
        if over <= 0:
            return 0.0
        if self.r_dynamic == 0:
            return math.inf
        return over / self.r_dynamic

    def with_spread(self, spread: float) -> LedModule:
        return replace(self, vf_spread=spread)
