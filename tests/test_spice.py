"""The steady-state solver against ngspice on the same circuit and models.

Accuracy targets: 0.5 % on average LED current, bus voltage and power factor;
1 % on rms currents; 2 % on ripple peak to peak, smoothing ripple current and
percent flicker. The designs are invented to span the range the trade uses.
"""

from __future__ import annotations

import pytest
from lampcalc.circuit.steady import Bridge, Circuit, StringLoad, solve
from spice import NGSPICE, run

pytestmark = pytest.mark.spice

LINE = Bridge("line", 0.9, 0.05)
EXP = Bridge("exponential", saturation_current=1e-9, emission_coefficient=1.8, resistance=0.05, temperature=25.0)


def s(n: int, v0: float = 2.7, rd: float = 2.0, p: int = 1, ballast: float = 0.0) -> tuple[StringLoad, ...]:
    return (StringLoad(n * v0, n * rd + ballast, p, ballast),)


DESIGNS = {
    # 230 V / 50 Hz dropper, bus ~0.3 of peak, small smoothing
    "230-1uF-bus30pct-47uF": Circuit(230, 50, 100, 1e-6, 470e3, LINE, 47e-6, 0.8, 100e3, s(36)),
    # 230 V dropper, bus ~0.75 of peak, no series resistor, exponential bridge
    "230-2u2-bus75pct-noR-exp": Circuit(230, 50, 0.0, 2.2e-6, 330e3, EXP, 470e-6, 0.3, 220e3, s(86, p=2)),
    # 120 V / 60 Hz dropper, two strings with ballast
    "120-4u7-bus40pct-ballast": Circuit(120, 60, 33, 4.7e-6, 220e3, LINE, 220e-6, 0.4, 100e3, s(24, p=2, ballast=22)),
    # 240 V / 50 Hz, large dropper bank (20 uF) and 2200 uF smoothing, bus ~0.2 of peak
    "240-20uF-bus20pct-2200uF": Circuit(240, 50, 10, 20e-6, 100e3, LINE, 2200e-6, 0.05, 47e3, s(24, p=6)),
    # 120 V, a 200 uF dropper bank (about 13 Ω at 60 Hz) feeding ten ballasted strings, large smoothing
    "120-200uF-bus40pct-10mF": Circuit(120, 60, 2.2, 200e-6, 1e5, LINE, 10000e-6, 0.02, 10e3, s(24, p=10, ballast=4.7)),
    # 230 V, 100 uF bank and 4700 uF smoothing, bus about 0.35 of the peak
    "230-100uF-bus35pct-4700uF": Circuit(230, 50, 4.7, 100e-6, 1e5, LINE, 4700e-6, 0.05, 10e3, s(40, p=10, ballast=10)),
    # 230 V resistor-fed, bus near the crest
    "230-resistor-fed": Circuit(230, 50, 680, None, None, LINE, 100e-6, 0.5, 220e3, s(110, p=1)),
    # 240 V open load: no strings, only the bleeder
    "240-open-load": Circuit(240, 50, 47, 1e-6, 470e3, LINE, 22e-6, 1.0, 100e3, ()),
    # 230 V with mismatched strings (one 1.5 V higher)
    "230-mismatch": Circuit(
        230,
        50,
        47,
        1.5e-6,
        330e3,
        LINE,
        220e-6,
        0.6,
        220e3,
        (StringLoad(34 * 2.7, 68, 1), StringLoad(34 * 2.7 + 1.5, 68, 1)),
    ),
    # 120 V, tiny smoothing (10 uF): big ripple, strings dropping out each cycle
    "120-1u5-10uF-dropout": Circuit(120, 60, 68, 1.5e-6, 470e3, LINE, 10e-6, 1.0, 100e3, s(28)),
}


def rel(a: float, b: float) -> float:
    return abs(a - b) / max(abs(b), 1e-12)


@pytest.mark.parametrize("name", sorted(DESIGNS))
def test_against_ngspice(name: str) -> None:
    assert NGSPICE is not None, "ngspice missing: `make test` installs it"
    c = DESIGNS[name]
    ours = solve(c)
    periods = 120 if c.smoothing >= 1e-3 or not c.strings else 60
    ref = run(c, periods=periods)
    assert rel(ours.bus_voltage.avg, ref.bus_voltage_avg) < 0.005
    assert rel(ours.power_factor, ref.power_factor) < 0.005
    assert rel(ours.line_current_rms, ref.line_current_rms) < 0.01
    assert rel(ours.input_power, ref.input_power) < 0.01
    if c.strings:
        assert rel(ours.led_current.avg, ref.led_current_avg) < 0.005
        assert rel(ours.led_current.rms, ref.led_current_rms) < 0.01
        assert rel(ours.percent_flicker, ref.percent_flicker) < 0.02
    assert rel(ours.ripple_pp, ref.ripple_pp) < 0.02
    assert rel(ours.smoothing_ripple_current_rms, ref.smoothing_ripple_current_rms) < 0.02
