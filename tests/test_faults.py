"""Single faults and switch-on transients.

Outside references: ngspice (Debian) on the same netlist for the faulted
circuits (LED and line currents within 1 %) and for switch-on from the
discharged state (peak and I²t within 2 %); scipy's ODE integrator for the
closed-form back-to-back capacitor switching; fuse times from IEC 60127-2 and
UL 248-14 (from memory, marked so in the code).
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from lampcalc.circuit.steady import solve
from lampcalc.circuit.transient import Supply, expm, step_closing, switch_on
from lampcalc.fixture.check import check
from lampcalc.fixture.design import REFERENCE_L, REFERENCE_R, parse_design
from lampcalc.fixture.faults import FAULTS, f_module_short, f_smoothing_short, f_string_open, fuse_time
from scipy.integrate import solve_ivp
from scipy.linalg import expm as scipy_expm

DEMO = Path(__file__).resolve().parent.parent / "docs" / "designs"
HERE = Path(__file__).resolve().parent / "designs"


def design(name: str) -> object:
    return parse_design((DEMO / f"{name}.toml").read_text())


# --- the faults list --------------------------------------------------------------------------


def test_faults_list_shape_and_ids() -> None:
    ans = check(parse_design((DEMO / "panel-230.toml").read_text()))
    ids = [f["id"] for f in ans["faults"]]
    for fid in ("string.open", "array.open", "module.short", "smoothing.short", "smoothing.open", "dropper.short"):
        assert fid in ids
    known = {f.id for f in FAULTS}
    for f in ans["faults"]:
        assert f["id"] in known
        assert f["outcome"] in ("safe", "hazard")
        assert isinstance(f["fuse_clears"], bool)
        assert (f["fuse_time_s"] is None) == (not f["fuse_clears"])
        assert set(f["leads_to"]) <= known
        for o in f["over_rating"]:
            assert o["value"] > o["rating"] and o["check"]
        if f["operating_point"] is not None:
            assert set(ans["nominal"]) == set(f["operating_point"])


def test_string_open_cascades_in_a_parallel_dropper_array() -> None:
    # a dropper is close to a current source: one string open pushes its current into the others
    ans = check(parse_design((DEMO / "panel-230.toml").read_text()))
    f = next(f for f in ans["faults"] if f["id"] == "string.open")
    assert f["outcome"] == "hazard"
    assert any(o["check"] == "led.current" for o in f["over_rating"])
    assert f["leads_to"] == ["array.open"]  # two strings: the survivor opening leaves no load at all
    nominal = ans["nominal"]["string_current_avg_A"]
    assert f["operating_point"]["string_current_avg_A"] > 1.5 * nominal


# --- faults.single: a single fault's hazard is a verdict, not a footnote ----------------------------
# Rule: under one fault no fire, no burst, no live part (IEC 60598-1 cl. 12.5 abnormal conditions and
# IEC 61347-1 cl. 14 fault conditions, from memory of their structure); LEDs overdriven until they fail open
# along a chain that ends dark is a warning (common practice).


def _faults_single(ans: dict[str, object]) -> dict[str, object]:
    return next(c for c in ans["checks"] if c["id"] == "faults.single")  # type: ignore[attr-defined, index]


def test_a_hazard_with_fire_as_its_consequence_fails() -> None:
    # rev C of the panel: one string open puts 0.32 W into the other string's 0.25 W ballast
    text = (DEMO / "panel-230.toml").read_text()
    old = parse_design(text.replace('ballast_rating = "0.5 W"', 'ballast_rating = "0.25 W"'))
    c = _faults_single(check(old))
    assert c["status"] == "fail" and "string.open" in c["message"] and "ballast.power" in c["message"]
    assert c["would_pass"]


def test_leds_overdriven_along_a_chain_that_ends_dark_warns() -> None:
    ans = check(design("panel-230"))
    c = _faults_single(ans)
    assert c["status"] == "warn" and "string.open" in c["message"] and "array.open" in c["message"]
    assert next(f for f in ans["faults"] if f["id"] == "array.open")["outcome"] == "safe"
    assert ans["failed"] == 0


def test_unsafe_demo_fails_on_its_faults() -> None:
    c = _faults_single(check(design("unsafe-demo")))
    assert c["status"] == "fail" and "smoothing.open_load" in c["message"]


def _fault(fid: str, outcome: str, over: list[tuple[str, str]], leads: list[str]) -> dict[str, object]:
    return {
        "id": fid,
        "outcome": outcome,
        "over_rating": [{"check": c, "consequence": q} for c, q in over],
        "leads_to": leads,
    }


def test_faults_single_judges_the_whole_chain() -> None:
    from lampcalc.fixture.check import faults_check

    led = [("led.current", "string fails open")]
    safe_end = _fault("array.open", "safe", [], [])
    assert faults_check([safe_end]).status == "pass"
    assert faults_check([_fault("string.open", "hazard", led, ["array.open"]), safe_end]).status == "warn"
    # the same cascade, but open load bursts the bus capacitor: the chain ends in a hazard, so it fails
    burst_end = _fault("array.open", "hazard", [("smoothing.open_load", "burst")], [])
    assert faults_check([_fault("string.open", "hazard", led, ["array.open"]), burst_end]).status == "fail"
    # a chain to a fault the analysis did not reach is not assumed safe
    assert faults_check([_fault("string.open", "hazard", led, ["array.open"])]).status == "fail"
    # a hazard judged for a reason of its own (no rating named) fails
    assert faults_check([_fault("bleeder.open", "hazard", [], [])]).status == "fail"
    # LEDs overdriven with no chain named: the string fails open next, so that fault's outcome decides
    dried = _fault("smoothing.open", "hazard", led, [])
    assert faults_check([dried, safe_end]).status == "warn"  # one string: open load, which ends safe
    assert faults_check([dried, _fault("string.open", "hazard", led, ["array.open"]), burst_end]).status == "fail"


def test_faults_single_never_takes_an_unanalysed_fault_as_safe() -> None:
    from lampcalc.fixture.check import faults_check

    led = [("led.current", "string fails open")]
    safe_end = _fault("array.open", "safe", [], [])
    unknown = _fault("smoothing.open", "unanalysed", [], [])
    c = faults_check([safe_end, unknown])
    assert c.status == "warn" and "smoothing.open" in c.message and "could not be analysed" in c.message
    # a chain that runs into a fault the solver could not follow is not assumed to end safe
    unknown_end = _fault("array.open", "unanalysed", [], [])
    assert faults_check([_fault("string.open", "hazard", led, ["array.open"]), unknown_end]).status == "fail"


def test_a_fault_the_solver_cannot_follow_is_not_analysed_not_dark() -> None:
    # an invented design (tests/designs/chatter.toml): with the bus capacitor dried out to 2 %, the strings
    # chatter at their knee and the solver finds no periodic steady state at nominal mains; the fault was
    # once read as "dark, safe"
    ans = check(parse_design((HERE / "chatter.toml").read_text()))
    f = next(f for f in ans["faults"] if f["id"] == "smoothing.open")
    assert f["outcome"] == "unanalysed" and not f["dark"]
    assert any("not analysed at nominal" in n and "no periodic steady state" in n for n in f["notes"])
    c = _faults_single(ans)
    assert c["status"] in ("warn", "fail") and "smoothing.open" in c["message"]
    assert "could not be analysed" in c["message"]
    # the build sheet shows it as a warning, not a pass
    from lampcalc.present.html import sheet_html
    from lampcalc.present.sheet import build_sheet

    html = sheet_html(build_sheet(parse_design((HERE / "chatter.toml").read_text()), ans, None))
    assert '<span class="lb-st lb-warn">UNANALYSED</span>' in html


def test_unsafe_demo_dropper_short_bursts_before_the_fuse() -> None:
    ans = check(parse_design((DEMO / "unsafe-demo.toml").read_text()))
    f = next(f for f in ans["faults"] if f["id"] == "dropper.short")
    assert f["fuse_clears"] and f["outcome"] == "hazard"
    assert any("before the fuse clears" in n for n in f["notes"])


def test_open_resistor_goes_dark_safely() -> None:
    ans = check(parse_design((DEMO / "panel-230.toml").read_text()))
    f = next(f for f in ans["faults"] if f["id"] == "resistor.open")
    assert f["outcome"] == "safe" and f["operating_point"] is None and f["over_rating"] == []


def test_fuse_times_at_the_standard_points() -> None:
    # IEC 60127-2 (from memory): must open within 2 min at 2.1 In (time-lag), may carry 1.5 In
    assert fuse_time(2.1, 1.0, "time-lag") == pytest.approx(120.0)
    assert fuse_time(1.5, 1.0, "time-lag") is None
    assert fuse_time(10.0, 1.0, "time-lag") == pytest.approx(0.15)
    # UL 248-14 (from memory): 135 % within 1 h, 200 % within 2 min
    assert fuse_time(1.35, 1.0, "ul") == pytest.approx(3600.0)
    assert fuse_time(2.0, 1.0, "ul") == pytest.approx(120.0)
    assert fuse_time(1.3, 1.0, "ul") is None
    # beyond the table the last point's I²t is held: t ∝ 1/I²
    assert fuse_time(20.0, 1.0, "time-lag") == pytest.approx(0.15 / 4)


# --- transients ---------------------------------------------------------------------------------


def test_matrix_exponential_against_scipy() -> None:
    rng = np.random.default_rng(3)
    m = rng.normal(size=(6, 6)) * 1e4
    ours = np.array(expm(m.tolist(), 3e-4))
    assert np.allclose(ours, scipy_expm(m * 3e-4), rtol=1e-9, atol=1e-9 * np.abs(ours).max())


@pytest.mark.parametrize("r", [0.1, 2.0, 50.0])
def test_step_closing_against_scipy(r: float) -> None:
    # series RLC discharge of C1 (charged to dv) into C2, integrated by scipy (reference: circuit theory, Q6)
    c1, c2, dv, ll = 1e-6, 0.47e-6, 268.0, 0.5e-6
    ceq = c1 * c2 / (c1 + c2)

    def f(_t: float, y: list[float]) -> list[float]:
        q, i = y
        return [i, (dv - q / ceq - r * i) / ll]

    tau = max(10 * math.sqrt(ll * ceq), 10 * r * ceq)
    sol = solve_ivp(f, (0, 40 * tau), [0.0, 0.0], method="DOP853", rtol=1e-10, atol=1e-14, dense_output=True)
    t = np.linspace(0, 40 * tau, 400001)
    i = sol.sol(t)[1]
    peak, i2t = step_closing(c1, c2, dv, r, ll)
    assert peak == pytest.approx(np.abs(i).max(), rel=1e-3)
    assert i2t == pytest.approx(np.trapezoid(i * i, t), rel=1e-3)


def test_reference_impedance_defaults() -> None:
    # IEC TR 60725 reference 0.4 Ω + j0.25 Ω at 50 Hz (catalogue summary): 0.25 Ω is 0.80 mH
    assert REFERENCE_R == 0.4
    assert REFERENCE_L == pytest.approx(0.7958e-3, rel=1e-4)


def test_more_source_impedance_lowers_the_peak() -> None:
    c = design("panel-230").circuit()  # type: ignore[attr-defined]
    a = switch_on(c, Supply(0.4, 0.8e-3), 90.0)
    b = switch_on(c, Supply(0.4, 3e-3), 90.0)
    assert b.peak < a.peak


# --- ngspice --------------------------------------------------------------------------------------

SPICE_DESIGNS = ("panel-230", "worklight-120", "unsafe-demo")


def rel(a: float, b: float) -> float:
    return abs(a - b) / max(abs(b), 1e-12)


@pytest.mark.spice
@pytest.mark.parametrize("name", SPICE_DESIGNS)
@pytest.mark.parametrize("phase", [90.0, 60.0])
def test_switch_on_against_ngspice(name: str, phase: float) -> None:
    from spice import run_switch_on

    c = design(name).circuit()  # type: ignore[attr-defined]
    ours = switch_on(c, Supply(REFERENCE_R, REFERENCE_L), phase)
    ref = run_switch_on(c, REFERENCE_R, REFERENCE_L, phase, 5e-8)
    assert rel(ours.peak, ref.peak) < 0.02
    assert rel(ours.i2t, ref.i2t) < 0.02


@pytest.mark.spice
@pytest.mark.parametrize("fault", ["string.open", "module.short"])
def test_fault_against_ngspice(fault: str) -> None:
    from spice import run

    d = design("panel-230")
    c = d.circuit()  # type: ignore[attr-defined]
    fn = {"string.open": f_string_open, "module.short": f_module_short}[fault]
    faulted = fn(d, c)  # type: ignore[arg-type]
    assert faulted is not None and faulted.state is not None
    # the faulted circuit, rebuilt from the strings the fault left, in ngspice
    if fault == "string.open":
        fc = replace(c, strings=(replace(c.strings[0], count=c.strings[0].count - 1),))
    else:
        first = c.strings[0]
        shorted = replace(first, knee=first.knee * (d.array.series - 1) / d.array.series, count=1)  # type: ignore[attr-defined]
        shorted = replace(shorted, resistance=first.resistance - d.module.r_dynamic)  # type: ignore[attr-defined]
        fc = replace(c, strings=(shorted, replace(first, count=first.count - 1)))
    ours = solve(fc)
    assert ours.led_current.avg == pytest.approx(faulted.state.led_current.avg, rel=1e-9)
    ref = run(fc, periods=120)
    assert rel(ours.led_current.avg, ref.led_current_avg) < 0.01
    assert rel(ours.line_current_rms, ref.line_current_rms) < 0.01


@pytest.mark.spice
def test_smoothing_short_against_ngspice() -> None:
    from spice import run_edited

    d = design("panel-230")
    c = d.circuit()  # type: ignore[attr-defined]
    ours = f_smoothing_short(d, c)  # type: ignore[arg-type]
    ref = run_edited(c, {"Cs": "Rshort p x 1e-4"}, periods=20)
    assert ref.led_current_avg < 1e-6  # dark: the strings see no voltage
    assert rel(ours.line_rms, ref.line_current_rms) < 0.01


def test_bleeder_open_needs_a_second_path() -> None:
    # IEC 60335-1 cl. 22.5 (from memory, applied by analogy): 34 V within 1 s at the plug pins, one fault applied
    text = (DEMO / "panel-230.toml").read_text()
    two = check(parse_design(text))
    one = check(parse_design(text.replace("bleeder_paths = 2\n", "bleeder_paths = 1\n")))
    f2 = next(f for f in two["faults"] if f["id"] == "bleeder.open")
    f1 = next(f for f in one["faults"] if f["id"] == "bleeder.open")
    assert f2["outcome"] == "safe" and f1["outcome"] == "hazard"
    assert f1["over_rating"][0]["check"] == "bleeder.dropper"
