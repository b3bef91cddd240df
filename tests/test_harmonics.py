"""Line-current harmonics, the power-factor split and the IEC 61000-3-2 limits.

References (rows of ../shared/references.md, source and status there):
H1-H7 the standard's classes and tables (C2: secondary copies of IEC
61000-3-2:2018+A1:2020), H8 the THD convention (M: from memory), H9 the
power-factor identity (D); numpy's FFT as an independent transform; ngspice's
line current for the whole chain (spice tier).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from lampcalc.circuit.steady import solve
from lampcalc.errors import InputError
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.physics import harmonic_limits as lim
from lampcalc.physics import harmonics as harm
from sites import ROOT
from spice import NGSPICE, run
from test_spice import DESIGNS

DEMO = ROOT / "docs" / "designs"


def synthetic(n: int = 1024) -> tuple[list[float], dict[int, tuple[float, float]]]:
    """A waveform with known orders: {order: (amplitude, phase against sin)}."""
    parts = {1: (2.0, 0.7), 3: (0.9, -1.1), 5: (0.35, 2.0), 7: (0.2, 0.3), 40: (0.05, 1.0)}
    xs = [0.1 + sum(a * math.sin(k * 2 * math.pi * j / n + ph) for k, (a, ph) in parts.items()) for j in range(n)]
    return xs, parts


# --- the transform -------------------------------------------------------------------------


def test_spectrum_recovers_known_orders_and_matches_numpy_fft() -> None:
    xs, parts = synthetic()
    sp = harm.spectrum(xs)
    for k in range(1, 41):
        a, ph = parts.get(k, (0.0, 0.0))
        assert sp.rms[k] == pytest.approx(a / math.sqrt(2), abs=1e-12)
        if a:
            assert math.remainder(sp.phase[k] - ph, 2 * math.pi) == pytest.approx(0.0, abs=1e-9)
    assert sp.rms[0] == pytest.approx(0.1, abs=1e-12)
    # numpy reference: |X_k| * 2 / N is the amplitude of order k
    ref = np.abs(np.fft.rfft(np.array(xs))) * 2 / len(xs) / math.sqrt(2)
    assert np.allclose(np.array(sp.rms[1:41]), ref[1:41], atol=1e-12)


def test_H8_thd_is_orders_2_to_40_over_the_fundamental_from_memory() -> None:
    xs, parts = synthetic()
    sp = harm.spectrum(xs)
    want = math.sqrt(sum(a * a for k, (a, _) in parts.items() if 2 <= k <= 40)) / parts[1][0]
    assert sp.thd == pytest.approx(want, rel=1e-12)
    # an order above 40 is left out of THD but counts in the rms (distortion factor)
    n = 1024
    xs2 = [x + 0.5 * math.sin(41 * 2 * math.pi * j / n) for j, x in enumerate(xs)]
    sp2 = harm.spectrum(xs2)
    assert sp2.thd == pytest.approx(want, rel=1e-9)
    assert sp2.distortion_pf < sp.distortion_pf


def test_H9_power_factor_is_distortion_times_displacement() -> None:
    # a leading fundamental (phase +60°) with a third harmonic, against a 230 V sine
    n = 2048
    xs = [
        math.sqrt(2) * (1.0 * math.sin(w + math.pi / 3) + 0.5 * math.sin(3 * w))
        for w in (2 * math.pi * j / n for j in range(n))
    ]
    sp = harm.spectrum(xs)
    assert sp.displacement_pf == pytest.approx(0.5, abs=1e-12)
    assert sp.leading
    assert sp.distortion_pf == pytest.approx(1 / math.sqrt(1.25), rel=1e-12)
    pw = harm.power_split(sp, 230.0)
    p_direct = sum(230 * math.sqrt(2) * math.sin(2 * math.pi * j / n) * x for j, x in enumerate(xs)) / n
    assert pw.active == pytest.approx(p_direct, rel=1e-9)
    assert pw.power_factor == pytest.approx(sp.distortion_pf * sp.displacement_pf, rel=1e-12)
    assert pw.reactive == pytest.approx(230 * math.sin(math.pi / 3), rel=1e-12)
    assert pw.apparent**2 == pytest.approx(pw.active**2 + pw.reactive**2 + pw.distortion**2, rel=1e-12)


def test_spectrum_rejects_too_few_samples() -> None:
    with pytest.raises(InputError) as e:
        harm.spectrum([0.0] * 80)
    assert e.value.field == "samples"


def test_samples_per_period_needed_for_order_40() -> None:
    """The resolution the spectrum needs: a dropper current sampled on 200
    points per period is off by up to about 0.1 % of the fundamental at some
    order; the check's 1024 agrees with 8192 to 0.01 %."""
    d = parse_design((DEMO / "panel-230.toml").read_text(encoding="utf-8"))
    ref = harm.spectrum(solve(d.circuit(), spectrum_points=8192).period_samples["line_current_A"])
    errs = {}
    for n in (200, harm.SAMPLES):
        sp = harm.spectrum(solve(d.circuit(), spectrum_points=n).period_samples["line_current_A"])
        errs[n] = max(abs(a - b) for a, b in zip(sp.rms[1:], ref.rms[1:])) / ref.rms[1]
    assert errs[harm.SAMPLES] < 1e-4
    assert errs[200] > 10 * errs[harm.SAMPLES]


def test_period_samples_leave_the_default_results_alone() -> None:
    d = parse_design((DEMO / "panel-230.toml").read_text(encoding="utf-8"))
    a, b = solve(d.circuit()), solve(d.circuit(), spectrum_points=512)
    assert a.led_current == b.led_current and a.waveform == b.waveform and a.power_factor == b.power_factor
    assert a.period_samples == {} and len(b.period_samples["line_current_A"]) == 512
    # the solver's own rms and power agree with the samples' (independent quadratures)
    sp = harm.spectrum(b.period_samples["line_current_A"])
    assert sp.total_rms == pytest.approx(a.line_current_rms, rel=2e-3)
    assert harm.power_split(sp, 230.0).active == pytest.approx(a.input_power, rel=1e-3)
    with pytest.raises(InputError):
        solve(d.circuit(), spectrum_points=513)


# --- the IEC 61000-3-2 tables (H2-H7, C2: secondary copies of the standard) ------------------


@pytest.mark.reference
def test_H2_class_A_table() -> None:
    want = {2: 1.08, 3: 2.30, 4: 0.43, 5: 1.14, 6: 0.30, 7: 0.77, 9: 0.40, 11: 0.33, 13: 0.21}
    for n, v in want.items():
        assert lim.class_a(n) == v
    assert lim.class_a(15) == pytest.approx(0.15)
    assert lim.class_a(39) == pytest.approx(0.15 * 15 / 39)
    assert lim.class_a(8) == pytest.approx(0.23)
    assert lim.class_a(40) == pytest.approx(0.046)
    assert lim.class_a(1) is None and lim.class_a(41) is None


@pytest.mark.reference
def test_H3_class_B_is_class_A_times_1_5() -> None:
    for n in range(2, 41):
        a, b = lim.class_a(n), lim.class_b(n)
        assert (a is None and b is None) or b == pytest.approx(1.5 * a)  # type: ignore[operator]


@pytest.mark.reference
def test_H4_class_C_above_25W_percentages() -> None:
    assert lim.class_c_percent(2, 0.9) == 2.0
    assert lim.class_c_percent(3, 0.9) == pytest.approx(27.0)  # 30 x lambda
    assert [lim.class_c_percent(n, 1.0) for n in (5, 7, 9, 11, 39)] == [10.0, 7.0, 5.0, 3.0, 3.0]
    assert lim.class_c_percent(4, 1.0) is None and lim.class_c_percent(40, 1.0) is None


@pytest.mark.reference
def test_H6_class_D_per_watt_capped_by_class_A() -> None:
    assert [lim.class_d_per_watt(n) for n in (3, 5, 7, 9, 11)] == [3.4, 1.9, 1.0, 0.5, 0.35]
    assert lim.class_d_per_watt(13) == pytest.approx(3.85 / 13)
    assert lim.class_d(3, 100.0) == pytest.approx(0.34)
    assert lim.class_d(3, 1000.0) == pytest.approx(2.30)  # 3.4 A would exceed Class A's 2.30 A
    assert lim.class_d(2, 100.0) is None


def spectrum_with(i1: float, pct: dict[int, float]) -> list[float]:
    out = [0.0, i1] + [0.0] * 39
    for n, p in pct.items():
        out[n] = p / 100 * i1
    return out


@pytest.mark.reference
@pytest.mark.parametrize(
    ("power", "band"),
    [
        (5.0, "≤ 5 W"),  # H7: no limits at or below 5 W
        (5.01, "5-25 W"),
        (25.0, "5-25 W"),  # H5: 5 W < P <= 25 W
        (25.01, "over 25 W"),  # H4
    ],
)
def test_H4_H5_H7_class_C_power_bands_at_the_boundaries(power: float, band: str) -> None:
    v = lim.verdict("C", spectrum_with(0.1, {3: 20.0}), power, 0.9, 230.0, (-20.0, 5.0, 95.0))
    assert band in v.band


@pytest.mark.reference
def test_H4_class_C_above_25W_third_scaled_by_power_factor() -> None:
    # lambda 0.9: the third may be 27 % of the fundamental
    ok = lim.verdict("C", spectrum_with(0.2, {3: 26.9}), 30.0, 0.9, 230.0)
    over = lim.verdict("C", spectrum_with(0.2, {3: 27.1}), 30.0, 0.9, 230.0)
    assert ok.passed and not over.passed and over.failures == (3,)
    assert over.limits[3] == pytest.approx(0.2 * 0.27)
    # the same spectrum at 25 W is judged by the 5-25 W rules instead
    assert lim.verdict("C", spectrum_with(0.2, {3: 27.1}), 25.0, 0.9, 230.0, (-20.0, 5.0, 95.0)).passed


@pytest.mark.reference
def test_H5_class_C_5_to_25W_alternatives() -> None:
    # 20 W, I1 = 0.1 A: Class D limit for the 3rd is 3.4 mA/W x 20 W = 68 mA (68 % of I1)
    s = spectrum_with(0.1, {3: 80.0, 5: 50.0})
    good_shape = (-20.0, 5.0, 95.0)
    v = lim.verdict("C", s, 20.0, 0.5, 230.0, good_shape)
    assert v.passed and "angles" in v.band  # 80 % <= 86 %, 50 % <= 61 %, shape met
    late_stop = (-20.0, 5.0, 85.0)  # stops before 90°
    v2 = lim.verdict("C", s, 20.0, 0.5, 230.0, late_stop)
    assert not v2.passed and 3 in v2.failures and "per watt" in v2.band
    # just over 86 % fails the second alternative even with a good shape
    v3 = lim.verdict("C", spectrum_with(0.1, {3: 86.1}), 20.0, 0.5, 230.0, good_shape)
    assert not v3.passed
    assert lim.verdict("C", spectrum_with(0.1, {3: 67.9}), 20.0, 0.5, 230.0, late_stop).passed  # Class D route


@pytest.mark.reference
def test_H2_class_A_absolute_whatever_the_power() -> None:
    s = [0.0, 10.0, 0.0, 2.29, 0.0, 1.14] + [0.0] * 35
    assert lim.verdict("A", s, 2000.0, 0.9, 230.0).passed
    s[3] = 2.31
    v = lim.verdict("A", s, 4.0, 0.9, 230.0)  # no 5 W exemption outside Class C
    assert not v.passed and v.failures == (3,)


@pytest.mark.reference
def test_H1_120V_is_a_guide_only() -> None:
    v = lim.verdict("C", spectrum_with(0.2, {3: 40.0}), 30.0, 0.9, 120.0)
    assert not v.passed and not v.applies
    assert any("220-240 V" in n for n in v.notes)
    assert lim.verdict("C", spectrum_with(0.2, {3: 40.0}), 30.0, 0.9, 230.0).applies


def test_bad_class_names_the_field() -> None:
    with pytest.raises(InputError) as e:
        lim.verdict("E", spectrum_with(0.1, {}), 30.0, 0.9, 230.0)
    assert e.value.field == "emissions.class"


# --- the fixture check ----------------------------------------------------------------------


@pytest.mark.parametrize("name", ["panel-230", "worklight-120", "unsafe-demo"])
def test_check_json_has_the_harmonic_fields_per_corner(name: str) -> None:
    d = parse_design((DEMO / f"{name}.toml").read_text(encoding="utf-8"))
    ans = check(d)
    for corner in ("nominal", "low", "high"):
        p = ans[corner]
        h = p["harmonics"]
        assert [x["order"] for x in h] == list(range(1, 41))
        assert set(h[0]) == {"order", "current_A", "limit_A", "status"}
        assert all(x["status"] in ("pass", "fail", "no limit") for x in h)
        i1 = h[0]["current_A"]
        thd = math.sqrt(sum(x["current_A"] ** 2 for x in h[1:])) / i1
        assert p["thd"] == pytest.approx(thd, rel=1e-12)
        # H9: the solver's own power factor is distortion x displacement
        assert p["power_factor"] == pytest.approx(p["displacement_pf"] * p["distortion_pf"], rel=2e-3)
        assert p["reactive_leading"]  # a dropper draws a leading current
    ids = [c["id"] for c in ans["checks"]]
    assert "harmonics.iec61000_3_2" in ids


def test_review_fails_the_unsafe_demo_and_names_the_order() -> None:
    d = parse_design((DEMO / "unsafe-demo.toml").read_text(encoding="utf-8"))
    c = next(c for c in check(d)["checks"] if c["id"] == "harmonics.iec61000_3_2")
    assert c["status"] == "fail" and "order" in c["message"]


def test_review_warns_only_at_120V() -> None:
    text = (DEMO / "unsafe-demo.toml").read_text(encoding="utf-8")
    d = parse_design(text.replace('voltage = "230 V"', 'voltage = "120 V"', 1).replace('"50 Hz"', '"60 Hz"'))
    c = next(c for c in check(d)["checks"] if c["id"] == "harmonics.iec61000_3_2")
    assert c["status"] in ("warn", "pass")
    assert "220-240 V" in c["source"]


def test_emissions_class_key_is_checked() -> None:
    text = (DEMO / "panel-230.toml").read_text(encoding="utf-8").replace('class = "C"  #', 'class = "Z"  #')
    with pytest.raises(InputError) as e:
        check(parse_design(text))
    assert e.value.field == "emissions.class"


def test_class_A_stage_luminaire_uses_absolute_limits() -> None:
    text = (DEMO / "panel-230.toml").read_text(encoding="utf-8").replace('class = "C"  #', 'class = "A"  #')
    ans = check(parse_design(text))
    h = ans["nominal"]["harmonics"]
    assert h[2]["limit_A"] == 2.30 and ans["nominal"]["harmonic_band"].startswith("Class A")


# --- against ngspice ------------------------------------------------------------------------

SPICE_DESIGNS = ("230-1uF-bus30pct-47uF", "120-4u7-bus40pct-ballast", "230-mismatch", "230-resistor-fed")


@pytest.mark.spice
@pytest.mark.parametrize("name", SPICE_DESIGNS)
def test_line_current_spectrum_against_ngspice_fft(name: str) -> None:
    """numpy's FFT of ngspice's line current (last period, 20 000 points) against
    lampbook's spectrum: orders 1-15 within 2 % of the fundamental, THD within
    1 % absolute (the issue's targets); in practice they agree far closer."""
    assert NGSPICE is not None, "ngspice missing: `make test` installs it"
    c = DESIGNS[name]
    ours = harm.spectrum(solve(c, spectrum_points=harm.SAMPLES).period_samples["line_current_A"])
    ref = run(c, periods=120 if c.smoothing >= 1e-3 else 60)
    assert ref.line_current_period is not None
    x = ref.line_current_period
    amp = np.abs(np.fft.rfft(x)) * 2 / len(x) / math.sqrt(2)
    i1 = amp[1]
    for n in range(1, 16):
        assert abs(ours.rms[n] - amp[n]) < 0.02 * i1, (n, ours.rms[n], amp[n])
    thd_ref = math.sqrt(float(np.sum(amp[2:41] ** 2))) / i1
    assert abs(ours.thd - thd_ref) < 0.01
    # the displacement factor too: the phase of ngspice's fundamental against its sine source
    phase = math.atan2(float(np.fft.rfft(x)[1].real), -float(np.fft.rfft(x)[1].imag))
    assert abs(math.cos(phase) - ours.displacement_pf) < 0.01


def test_half_wave_symmetric_shortcut_matches_numpy() -> None:
    """A bridge's current has x(t + T/2) = -x(t): the transform sums only the first half; numpy sums all."""
    n = 1024
    xs = [
        math.sin(w + 0.4) + 0.6 * math.sin(3 * w - 1.0) + 0.1 * math.sin(39 * w)
        for w in (2 * math.pi * k / n for k in range(n))
    ]
    sp = harm.spectrum(xs)
    ref = np.abs(np.fft.rfft(np.array(xs))) * 2 / n / math.sqrt(2)
    assert np.allclose(np.array(sp.rms[1:41]), ref[1:41], atol=1e-12)
    assert sp.phase[3] == pytest.approx(-1.0, abs=1e-12)


@pytest.mark.reference
def test_H4_H7_harmonics_calculator_bands_and_verdict() -> None:
    from lampcalc.api import compute

    base = {"fundamental": "0.1 A", "power_factor": "0.9", "h3": "26.9 %"}
    assert compute("harmonics", {**base, "active_power": "25.01 W"})["values"]["verdict"] == "pass"  # 27 % limit
    over = compute("harmonics", {**base, "h3": "27.1 %", "active_power": "25.01 W"})
    assert over["values"]["verdict"] == "over a limit" and over["warnings"]
    assert "5-25 W" in compute("harmonics", {**base, "active_power": "25 W"})["values"]["band"]
    assert "no limits" in compute("harmonics", {**base, "active_power": "5 W"})["values"]["band"]
    a = compute("harmonics", {"emission_class": "A", "active_power": "500 W"})
    assert a["rows"][1]["order"] == 3 and a["rows"][1]["limit_A"] == 2.30
    us = compute("harmonics", {**base, "mains_voltage": "120 V", "active_power": "40 W"})
    assert us["values"]["applies"].startswith("guide only")
    bad = compute("harmonics", {"emission_class": "E"})
    assert not bad["ok"] and bad["errors"][0]["field"] == "emission_class"
