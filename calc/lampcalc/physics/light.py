"""Light output of LED modules and the illuminance of a beam.

Flux model (stated, simple, and only as good as the datasheet numbers typed in):
one module gives ``flux`` lumens at ``test_current`` and ``test_temperature``
(datasheet values). Away from that point

    flux(I, T) = flux x (I / I_t) x [1 - d (I / I_t - 1)] x [1 - k (T - T_t)]

with d the current droop (the fraction of efficacy lost per test current of
extra current: d = 0.1 means 10 % fewer lumens per ampere at twice the test
current, 10 % more at zero current) and k the thermal droop per kelvin. Both
come from the datasheet's relative-flux curves: read d from the flux at about
twice (or half) the test current, k from the flux at a second temperature.
Typical white LEDs have d of 0.05-0.2 and k of 0.1-0.5 %/K (from memory:
use the datasheet). The flux is clamped at zero where the line would go below.
For a current that varies over the mains period the flux is averaged over the
waveform (the model is quadratic in I, so its mean needs the rms as well as
the mean current).

Beam geometry (point source, all of the beam's lumens in a cone of full angle
beta, target square to the axis):

- uniform-intensity cone, on axis: solid angle Omega = 2 pi (1 - cos(beta/2)),
  intensity I = flux / Omega, illuminance E = I / d^2 (inverse-square law);
- flat disc, average: field radius r = d tan(beta/2), E = flux / (pi r^2).

The two differ (about 5 % at 30 degrees, 24 % at 60 degrees); both are stated
wherever a figure is shown. 1 fc = 1 lm/ft^2 = 10.764 lx.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import InputError
from ..quantities.units import FOOT

LUX_PER_FOOTCANDLE = 1.0 / FOOT**2


@dataclass(frozen=True)
class FluxModel:
    flux: float  # lm per module at the test point
    test_current: float  # A
    test_temperature: float = 25.0  # °C
    current_droop: float = 0.0  # d, see the module text
    thermal_droop: float = 0.0  # k, per kelvin

    def validate(self, prefix: str = "") -> None:
        if not (self.flux > 0 and math.isfinite(self.flux)):
            raise InputError(prefix + "flux", self.flux, "the module's luminous flux at the test current, above 0 lm")
        if not (self.test_current > 0 and math.isfinite(self.test_current)):
            raise InputError(prefix + "test_current", self.test_current, "the datasheet's test current, above 0 A")
        if not -60 <= self.test_temperature <= 200:
            raise InputError(prefix + "test_temperature", self.test_temperature, "a temperature from -60 °C to 200 °C")
        if not 0 <= self.current_droop < 1:
            raise InputError(prefix + "current_droop", self.current_droop, "a droop from 0 up to (not including) 1")
        if not 0 <= self.thermal_droop < 0.05:
            raise InputError(prefix + "thermal_droop", self.thermal_droop, "a thermal droop from 0 to 5 % per kelvin")

    def thermal_factor(self, temperature: float) -> float:
        return max(1.0 - self.thermal_droop * (temperature - self.test_temperature), 0.0)

    def at(self, current: float, temperature: float) -> float:
        """Lumens of one module at a steady current and temperature."""
        x = max(current, 0.0) / self.test_current
        return max(self.flux * x * (1.0 - self.current_droop * (x - 1.0)), 0.0) * self.thermal_factor(temperature)

    def mean(self, currents: Sequence[float], temperature: float) -> float:
        """Mean lumens of one module over equally spaced current samples."""
        if not currents:
            raise InputError("currents", "[]", "at least one current sample")
        return sum(self.at(i, temperature) for i in currents) / len(currents)


def solid_angle(beam: float) -> float:
    """Solid angle (sr) of a cone of full angle ``beam`` (radians)."""
    _check_beam(beam, 2 * math.pi)
    omega = 4 * math.pi * math.sin(beam / 4) ** 2  # = 2 pi (1 - cos(beam / 2)), without the cancellation
    if omega <= 0:
        raise InputError("beam_angle", math.degrees(beam), "a beam angle of 0.1° or more")
    return omega


def _check_beam(beam: float, top: float) -> None:
    if not (0 < beam <= top and math.isfinite(beam)):
        raise InputError(
            "beam_angle", math.degrees(beam), f"a full beam angle above 0° and up to {math.degrees(top):.0f}°"
        )


def _check_distance(distance: float) -> None:
    if not (distance > 0 and math.isfinite(distance)):
        raise InputError("distance", distance, "a distance above 0 m")


def cone_intensity(flux: float, beam: float) -> float:
    """Luminous intensity (cd) of a uniform-intensity cone holding ``flux``."""
    return flux / solid_angle(beam)


def cone_illuminance(flux: float, beam: float, distance: float) -> float:
    """On-axis illuminance (lx) of a uniform-intensity cone: I / d^2."""
    _check_distance(distance)
    return cone_intensity(flux, beam) / distance**2


def field_diameter(beam: float, distance: float) -> float:
    """Diameter (m) of the lit field on a flat target square to the axis."""
    _check_beam(beam, math.pi * 0.999)
    _check_distance(distance)
    return 2 * distance * math.tan(beam / 2)


def disc_illuminance(flux: float, beam: float, distance: float) -> float:
    """Average illuminance (lx) over the flat field: flux / (pi r^2)."""
    r = field_diameter(beam, distance) / 2
    return flux / (math.pi * r * r)


def footcandles(lux: float) -> float:
    return lux / LUX_PER_FOOTCANDLE


def feet(metres: float) -> float:
    return metres / FOOT
