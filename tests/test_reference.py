"""Checks against published tables, standards and worked examples.

Each check names its row of ../shared/references.md (its source and status are
given there) in the test id: D rows are arithmetic from the cited formula,
C/C2 rows are copies of published tables, M rows come from memory and R rows are
common practice with no source.
"""

from __future__ import annotations

import math

import pytest
from lampcalc.calculators import CALCULATORS
from lampcalc.physics import dropper, flicker, ripple, wire
from lampcalc.physics.led import LedModule
from lampcalc.physics.strings import cv_options
from lampcalc.quantities import eseries
from lampcalc.quantities.regions import PRESETS
from lampcalc.quantities.units import awg_diameter
from lampcalc.schema import evaluate

pytestmark = pytest.mark.reference


# --- mains -------------------------------------------------------------------------


def test_V4_iec60038_230V_range() -> None:
    p = PRESETS["230-50"]
    assert (p.low, p.high) == pytest.approx((207.0, 253.0))


def test_V1_ansi_c84_1_range_A_120V_secondary_copy() -> None:
    p = PRESETS["120-60"]
    assert (p.low, p.high) == pytest.approx((114.0, 126.0))


@pytest.mark.parametrize(
    ("vrms", "vpk"),
    [(100, 141.42), (120, 169.71), (127, 179.61), (230, 325.27), (240, 339.41), (253, 357.80)],
)
def test_V8_peak_of_sine(vrms: float, vpk: float) -> None:
    r = evaluate(
        CALCULATORS["mains"],
        {"region": "custom", "mains_voltage": f"{vrms} V", "frequency": "50 Hz", "mains_tolerance": "0 %"},
    )
    assert r.values["peak_V"] == pytest.approx(vpk, rel=1e-4)


# --- copper and wire ---------------------------------------------------------------


@pytest.mark.parametrize(
    ("t", "ratio"),
    [(0, 0.9214), (25, 1.0197), (40, 1.0786), (60, 1.1572), (75, 1.2162), (90, 1.2751), (105, 1.3341)],
)
def test_CU6_copper_resistance_ratio(t: float, ratio: float) -> None:
    assert wire.resistance_ratio(t) == pytest.approx(ratio, abs=1e-4)


# AWG 10-30 table, arithmetic from ASTM B258 and IACS copper (row A7): d (mm), area (mm²), ohm/km at 20 °C
A7 = {
    10: (2.5882, 5.2612, 3.277),
    12: (2.0525, 3.3088, 5.211),
    14: (1.6277, 2.0809, 8.286),
    16: (1.2908, 1.3087, 13.174),
    18: (1.0237, 0.8230, 20.948),
    20: (0.8118, 0.5176, 33.309),
    22: (0.6438, 0.3255, 52.963),
    24: (0.5106, 0.2047, 84.215),
    26: (0.4049, 0.1288, 133.907),
    28: (0.3211, 0.0810, 212.921),
    30: (0.2546, 0.0509, 338.557),
}


@pytest.mark.parametrize("gauge", sorted(A7))
def test_A7_awg_table_ASTM_B258_IACS(gauge: int) -> None:
    d, a, r = A7[gauge]
    s = wire.awg_size(gauge)
    assert s.diameter * 1e3 == pytest.approx(d, rel=1e-3)
    assert s.area * 1e6 == pytest.approx(a, rel=2e-3)
    assert wire.resistance_per_metre(s.area) * 1e3 == pytest.approx(r, rel=1e-3)


def test_A6_quick_anchors() -> None:
    # 10 AWG ~ 0.9989 ohm/1000 ft; 18 AWG 1.0237 mm; 40 AWG 1048.9 ohm/1000 ft (arithmetic from A1 and CU2)
    per_kft = lambda n: wire.resistance_per_metre(wire.awg_size(n).area) * 304.8  # noqa: E731
    assert per_kft(10) == pytest.approx(0.9989, rel=1e-3)
    assert awg_diameter(18) * 1e3 == pytest.approx(1.0237, rel=1e-4)
    assert per_kft(40) == pytest.approx(1048.9, rel=1e-3)


@pytest.mark.parametrize(("gauge", "r75"), [(18, 7.77), (16, 4.89), (14, 3.07), (12, 1.93), (10, 1.21)])
def test_A8_nec_ch9_table8_solid_75C_from_memory(gauge: int, r75: float) -> None:
    # NEC Chapter 9 Table 8 (from memory, row A8): within 0.6 % as the row says
    r = wire.resistance_per_metre(wire.awg_size(gauge).area, 75.0) * 304.8
    assert r == pytest.approx(r75, rel=6e-3)


def test_M5_iec60228_class5_maximum_vs_iacs_nominal() -> None:
    s = wire.metric_size(0.75)
    assert wire.iec60228_max(s) == pytest.approx(26.0e-3)  # M1: IEC 60228 Table 3
    assert wire.resistance_per_metre(s.area) * 1e3 == pytest.approx(22.99, rel=1e-3)  # M5
    assert wire.iec60228_max(s, "1/2") == pytest.approx(24.5e-3)  # M3


def test_VD3_worked_drop_18AWG_5m_2A() -> None:
    r = evaluate(CALCULATORS["wire"], {"size": "18 AWG", "length": "5 m", "current": "2 A", "supply_voltage": "12 V"})
    assert r.values["loop_resistance_ohm"] == pytest.approx(0.2095, rel=1e-3)
    assert r.values["drop_V"] == pytest.approx(0.419, rel=1e-3)
    assert r.values["drop_fraction"] == pytest.approx(0.0349, rel=2e-3)


def test_AM5_nec_400_5_cord_table_is_named() -> None:
    r = evaluate(CALCULATORS["wire"], {"size": "18 AWG", "current": "2 A", "ampacity_table": "us-cord"})
    assert r.values["ampacity_A"] == 10.0
    assert "400.5(A)(1)" in str(r.values["ampacity_table"])


# --- preferred values --------------------------------------------------------------


def test_E2_E12_table_IEC60063() -> None:
    assert eseries.SERIES["E12"] == (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)


def test_E4_nesting_and_E6_formula_deviations() -> None:
    assert eseries.SERIES["E6"] == eseries.SERIES["E12"][::2]
    assert eseries.SERIES["E12"] == eseries.SERIES["E24"][::2]
    # E6 (row): the formula 10^(k/24) gives 4.2 where the standard has 4.3
    assert round(10 ** (15 / 24), 1) == 4.2 and 4.3 in eseries.SERIES["E24"]
    assert eseries.nearest(4200, "E24") == 4300


def test_E_series_up_down() -> None:
    assert eseries.next_up(6.86, "E24") == 7.5  # L5 worked: next higher E24 after 6.86 ohm
    assert eseries.next_down(443e3, "E12") == 390e3
    assert eseries.next_up(4.7e-6, "E12") == 4.7e-6


# --- capacitive dropper -----------------------------------------------------------


@pytest.mark.parametrize(
    ("c", "f", "xc"),
    [
        (1e-6, 50, 3183.1),
        (1e-6, 60, 2652.6),
        (10e-6, 60, 265.26),
        (0.1e-6, 60, 26526),
        (0.47e-6, 50, 6772.6),
        (2.2e-6, 60, 1205.7),
    ],
)
def test_X2_X5_reactance(c: float, f: float, xc: float) -> None:
    assert dropper.reactance(c, f) == pytest.approx(xc, rel=1e-4)


@pytest.mark.parametrize(
    ("v", "f", "ma_per_uf"),
    [(230, 50, 72.26), (240, 50, 75.40), (253, 50, 79.48), (120, 60, 45.24), (100, 50, 31.42)],
)
def test_X7_rms_mA_per_uF(v: float, f: float, ma_per_uf: float) -> None:
    assert dropper.naive_current(v, f, 1e-6) * 1e3 == pytest.approx(ma_per_uf, rel=1e-3)


@pytest.mark.parametrize(
    ("v", "f", "c", "bus", "ma"),
    [
        (230, 50, 0.47e-6, 90, 22.115),
        (230, 50, 1e-6, 200, 25.05),
        (120, 60, 1e-6, 60, 26.33),
        (120, 60, 2.2e-6, 90, 42.08),
    ],
)
def test_X10_X12_charge_balance_worked(v: float, f: float, c: float, bus: float, ma: float) -> None:
    assert dropper.average_current(v, f, c, bus, 0.0) * 1e3 == pytest.approx(ma, rel=1e-3)


def test_X8_X9_average_is_0_9_of_rms_into_short() -> None:
    assert dropper.average_current(230, 50, 1e-6, 0, 0) * 1e3 == pytest.approx(65.05, rel=1e-3)
    assert dropper.average_current(120, 60, 1e-6, 0, 0) * 1e3 == pytest.approx(40.73, rel=1e-3)
    # and the capacitor rms current into a short circuit is the naive V/Xc (X6)
    assert dropper.capacitor_rms_current(230, 50, 1e-6, 0, 0) == pytest.approx(
        dropper.naive_current(230, 50, 1e-6), rel=1e-9
    )


def test_X15_crest_energy() -> None:
    assert dropper.pulse_energy(1e-6, 325.3) * 1e3 == pytest.approx(52.9, rel=1e-3)
    assert dropper.pulse_energy(47e-6, 169.7) == pytest.approx(0.677, rel=1e-3)


# --- bleeders and surge -------------------------------------------------------------


@pytest.mark.parametrize(
    ("v0", "t", "vlim", "r"),
    [
        (325.3, 1, 34, 443e3),
        (357.8, 1, 34, 425e3),
        (169.7, 1, 34, 622e3),
        (179.6, 1, 34, 601e3),
        (325.3, 2, 60, 1.18e6),
        (357.8, 2, 60, 1.12e6),
    ],
)
def test_S13_bleeder_maxima_per_uF_IEC60335_1_cl22_5(v0: float, t: float, vlim: float, r: float) -> None:
    assert dropper.bleeder_max(1e-6, t, v0, vlim) == pytest.approx(r, rel=3e-3)


def test_S14_bleeder_dissipation_and_S17_switch_on() -> None:
    r = evaluate(CALCULATORS["dropper"], {"bleeder": "470 kΩ", "series_resistance": "100 Ω"})
    assert r.values["bleeder_power_W"] == pytest.approx(0.136, rel=3e-3)  # 470 k at 253 V
    assert r.values["switch_on_peak_A"] == pytest.approx(3.58, rel=2e-3)  # 357.8 V / 100 ohm
    assert dropper.switch_on_peak(325.3, 47) == pytest.approx(6.92, rel=1e-3)


# --- ripple and flicker ----------------------------------------------------------


@pytest.mark.parametrize(
    ("i", "c", "f", "pp"),
    [
        (20e-3, 100e-6, 50, 2.0),
        (20e-3, 100e-6, 60, 1.667),
        (2.0, 1000e-6, 60, 16.67),
        (50e-3, 47e-6, 50, 10.64),
        (50e-3, 47e-6, 60, 8.87),
    ],
)
def test_RP4_RP6_full_wave_ripple(i: float, c: float, f: float, pp: float) -> None:
    assert ripple.ripple_pp(i, f, c) == pytest.approx(pp, rel=2e-3)


def test_RP7_sawtooth_rms() -> None:
    # V_rms = V_pp / (2 sqrt 3) ~ V_pp / 3.46: compare with the rms of a sampled ramp
    n = 100000
    ramp = [2.0 * (k + 0.5) / n - 1.0 for k in range(n)]  # 2 V peak to peak about 0
    rms = math.sqrt(sum(v * v for v in ramp) / n)
    assert ripple.sawtooth_rms(2.0) == pytest.approx(rms, rel=1e-6)
    assert 2.0 / ripple.sawtooth_rms(2.0) == pytest.approx(3.46, rel=2e-3)


def test_F5_sine_modulation() -> None:
    n = 10000
    for m in (1.0, 0.1):
        w = [1 + m * math.sin(2 * math.pi * k / n) for k in range(n)]
        assert flicker.percent_flicker(w) == pytest.approx(100 * m, rel=1e-6)
        assert flicker.flicker_index(w) == pytest.approx(m / math.pi, rel=1e-4)


def test_F6_full_wave_rectified_sine() -> None:
    n = 20000
    w = [abs(math.sin(math.pi * k / n)) for k in range(n)]
    assert flicker.percent_flicker(w) == pytest.approx(100.0)
    assert flicker.flicker_index(w) == pytest.approx(0.2105, abs=2e-4)


@pytest.mark.parametrize(("duty", "fi"), [(0.5, 0.5), (0.25, 0.75)])
def test_F7_rectangular(duty: float, fi: float) -> None:
    n = 1000
    w = [1.0 if k < duty * n else 0.0 for k in range(n)]
    assert flicker.flicker_index(w) == pytest.approx(fi)


@pytest.mark.parametrize(("f", "low", "noe"), [(100, 8.0, 3.33), (120, 9.6, 4.0), (50, 1.25, 0.5), (60, 1.5, 0.6)])
def test_F10_F12_ieee1789_bands_from_memory(f: float, low: float, noe: float) -> None:
    # IEEE 1789-2015 cl. 8.1.1 limits: the rows are from memory (F8/F9)
    lo, ne = flicker.ieee1789_limits(f)
    assert lo == pytest.approx(low, rel=1e-3)
    assert ne == pytest.approx(noe, rel=2e-3)


# --- LED strings ---------------------------------------------------------------------


@pytest.mark.parametrize(
    ("vs", "n", "vf", "i", "r", "p"),
    [(12, 3, 3.0, 20e-3, 150, 0.060), (24, 6, 3.1, 20e-3, 270, 0.108), (24, 7, 3.0, 0.1, 30, 0.30)],
)
def test_L5_ballast_worked(vs: float, n: int, vf: float, i: float, r: float, p: float) -> None:
    m = LedModule(v0=vf, r_dynamic=0.0)
    opts = cv_options(m, vs, 0.0, i, 25.0, 25.0, "E24", 1.0)
    o = next(o for o in opts if o.series == n)
    assert o.ballast_exact == pytest.approx(r, rel=1e-9)
    assert o.ballast_exact * i**2 == pytest.approx(p, rel=1e-9)


def test_L5_next_higher_E24_recomputes_current() -> None:
    # 12 V, 3 x 3.2 V, 350 mA -> 6.86 ohm exact; 7.5 ohm gives 320 mA and 0.77 W
    m = LedModule(v0=3.2, r_dynamic=0.0)
    o = next(o for o in cv_options(m, 12.0, 0.0, 0.35, 25.0, 25.0, "E24", 1.0) if o.series == 3)
    assert o.ballast_exact == pytest.approx(6.857, rel=1e-3)
    assert o.ballast == 7.5
    assert o.current == pytest.approx(0.320, rel=1e-3)
    assert o.current**2 * o.ballast == pytest.approx(0.77, rel=1e-2)


def test_L2_textbook_tempco() -> None:
    # -3 mV/°C: 3.0 V at 25 °C -> 2.7 V at 125 °C
    m = LedModule(v0=3.0, r_dynamic=0.0, vf_tempco=-0.003)
    assert m.voltage(0.3, 125.0) == pytest.approx(2.7)


def test_L6_temperature_sensitivity_common_practice() -> None:
    # 3 LEDs x -2 mV/K x 50 K on a 150 ohm / 20 mA string: +2.0 mA
    m = LedModule(v0=3.0, r_dynamic=0.0, vf_tempco=-0.002)
    i25 = (12 - 3 * m.voltage(0, 25)) / 150
    i75 = (12 - 3 * m.voltage(0, 75)) / 150
    assert (i75 - i25) * 1e3 == pytest.approx(2.0, rel=1e-6)
