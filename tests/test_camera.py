"""Frame exposure under a rippling light.

References: K1 (exposure is the light integrated over the open shutter; a
whole number of ripple periods sees no ripple), K2 (shutter time from angle),
K3 (common frame rates, trade practice) in ../shared/references.md; numpy's
trapezoid integration on a fine grid as the independent integral; the closed
form for a sine ripple is derived here from K1 (D).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from lampcalc.api import compute
from lampcalc.circuit.steady import solve
from lampcalc.errors import InputError
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.physics import camera
from sites import ROOT

DEMO = ROOT / "docs" / "designs"


def sine_light(m: float, n: int = 2048) -> list[float]:
    return [1 + m * math.sin(2 * math.pi * k / n) for k in range(n)]


@pytest.mark.reference
@pytest.mark.parametrize(("angle", "fps", "t"), [(180, 24, 1 / 48), (180, 25, 1 / 50), (172.8, 24, 1 / 50)])
def test_K2_shutter_time_from_angle(angle: float, fps: float, t: float) -> None:
    assert camera.shutter_from_angle(angle, fps) == pytest.approx(t, rel=1e-12)


@pytest.mark.reference
@pytest.mark.parametrize("tau", [0.01, 0.02, 0.03])
def test_K1_whole_ripple_periods_give_zero_variation(tau: float) -> None:
    # 100 Hz ripple: 10 ms is one period
    exp = camera.Exposure(sine_light(0.3), 0.01)
    assert camera.Exposure(sine_light(0.3), 0.01).variation(tau)[0] == pytest.approx(0.0, abs=1e-12)
    assert exp.variation(tau * 1.1)[0] > 0.01


def test_K1_zero_variation_with_the_solver_waveform() -> None:
    """One ripple period (half the mains period) of a real fixture's light gives zero variation."""
    d = parse_design((DEMO / "unsafe-demo.toml").read_text(encoding="utf-8"))
    st = solve(d.circuit(), spectrum_points=2048)
    exp = camera.Exposure(list(st.period_samples["led_current_A"]), 0.02)
    assert exp.variation(0.01)[0] == pytest.approx(0.0, abs=1e-12)
    assert exp.variation(0.005)[0] > 0.5


def test_sine_ripple_against_the_closed_form() -> None:
    """For L = 1 + m sin(2 pi f t) the exposure over tau is tau + m/(2 pi f)(cos a - cos(a + 2 pi f tau)),
    whose spread over the phase a is (2 m / (pi f)) |sin(pi f tau)| (derived from K1)."""
    m, f = 0.2, 100.0
    exp = camera.Exposure(sine_light(m, 4096), 1 / f)
    for tau in (1 / 4000, 1 / 1000, 1 / 300, 1 / 48, 1 / 60):
        want = 2 * m / (math.pi * f) * abs(math.sin(math.pi * f * tau)) / tau
        assert exp.variation(tau)[0] == pytest.approx(want, rel=1e-4, abs=1e-6)
    assert exp.variation(1e-7)[0] == pytest.approx(2 * m, rel=1e-3)  # a very short shutter sees the whole swing


def test_exposure_against_numpy_integration_of_the_solver_waveform() -> None:
    """Each window's exposure against numpy's trapezoid rule on a fine grid (linear interpolation of the
    same samples at 16x the resolution), and the variation against a brute-force phase scan."""
    d = parse_design((DEMO / "panel-230.toml").read_text(encoding="utf-8"))
    st = solve(d.circuit(), spectrum_points=2048)
    x = np.array(st.period_samples["led_current_A"])
    T = 0.02
    exp = camera.Exposure(list(x), T)
    t_s = np.arange(len(x)) * T / len(x)
    fine = np.linspace(0, 3 * T, 3 * len(x) * 16 + 1)
    y = np.interp(fine, np.concatenate([t_s, t_s + T, t_s + 2 * T, [3 * T]]), np.concatenate([x, x, x, x[:1]]))

    def direct(t0: float, tau: float) -> float:
        mask = (fine >= t0) & (fine <= t0 + tau)
        tt, yy = fine[mask], y[mask]
        # close the ends exactly
        tt = np.concatenate([[t0], tt, [t0 + tau]])
        yy = np.concatenate([[np.interp(t0, fine, y)], yy, [np.interp(t0 + tau, fine, y)]])
        return float(np.trapezoid(yy, tt))

    for tau in (1 / 2000, 1 / 250, 1 / 48, 0.0377):
        for t0 in (0.0, 0.0031, 0.0127, 0.0199):
            assert exp.window(t0, tau) == pytest.approx(direct(t0, tau), rel=1e-6)
        phases = np.linspace(0, T, 160, endpoint=False)
        e = np.array([direct(p, tau) for p in phases])
        ref = (e.max() - e.min()) / (tau * x.mean())
        assert exp.variation(tau)[0] == pytest.approx(ref, rel=2e-3, abs=1e-5)


def test_beat_frequency() -> None:
    assert camera.beat_frequency(100.0, 24.0) == pytest.approx(4.0)
    assert camera.beat_frequency(100.0, 25.0) == pytest.approx(0.0)
    assert camera.beat_frequency(120.0, 25.0) == pytest.approx(5.0)
    assert camera.beat_frequency(100.0, 29.97) == pytest.approx(100 - 3 * 29.97)


@pytest.mark.reference
def test_K3_common_frame_rates_listed_common_practice() -> None:
    assert camera.FRAME_RATES == (23.976, 24.0, 25.0, 29.97, 30.0, 48.0, 50.0, 59.94, 60.0, 120.0)


def test_safe_ranges_hold_under_the_threshold() -> None:
    exp = camera.Exposure(sine_light(0.1), 0.01)
    ranges = camera.safe_ranges(exp, 24.0, 0.02)
    assert ranges
    for a, b in ranges:
        for t in (a, math.sqrt(a * b), b):
            assert exp.variation(t, 256)[0] <= 0.02 + 1e-9
    assert camera.ripple_multiples(100.0, 24.0) == pytest.approx((0.01, 0.02, 0.03, 0.04))


def test_camera_calculator() -> None:
    ans = compute("camera", {"shape": "sine", "percent_flicker": "20 %", "shutter": "time", "shutter_time": "1 ms"})
    assert ans["ok"], ans
    want = 2 * 0.2 / (math.pi * 100) * abs(math.sin(math.pi * 100 * 0.001)) / 0.001
    assert ans["values"]["variation"] == pytest.approx(want, rel=1e-3)
    assert ans["values"]["verdict"] == "over the threshold" and ans["warnings"]
    ans = compute("camera", {"shutter": "angle", "shutter_angle": "172.8°", "frame_rate": "24 fps"})
    assert ans["values"]["shutter_time_s"] == pytest.approx(0.02) and ans["values"]["variation"] < 1e-9
    assert any(r["setting"] == "1/100 s" and r["ok"] == "yes" for r in ans["rows"])


def test_camera_calculator_bad_input() -> None:
    ans = compute("camera", {"shutter": "time", "shutter_time": "0.5 s", "frame_rate": "24"})
    assert not ans["ok"] and ans["errors"][0]["field"] == "shutter_time"
    ans = compute("camera", {"frame_rate": "fast"})
    assert not ans["ok"] and ans["errors"][0]["field"] == "frame_rate"
    with pytest.raises(InputError):
        camera.shutter_from_angle(400.0, 24.0)


def test_check_json_camera_section() -> None:
    d = parse_design((DEMO / "panel-230.toml").read_text(encoding="utf-8"))
    c = check(d)["camera"]
    assert c["frame_rate_fps"] == 24.0 and c["ripple_frequency_Hz"] == 100.0
    by = {s["shutter"]: s for s in c["design_settings"]}
    assert by["1/100 s"]["variation"] < 1e-9 and by["1/100 s"]["ok"]
    assert by["1/4000 s"]["variation"] > by["1/250 s"]["variation"]
    assert c["ieee1789_band"] in ("no observable effect", "low risk", "above low risk")
