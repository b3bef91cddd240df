"""Light output and beam geometry.

References (rows of ../shared/references.md, source and status there): P1 and
P4 the inverse-square law and its worked values, P6-P8 cone and flat-disc
geometry (D: derived arithmetic), P9 the foot-candle (D). The flux model is
our own stated model (physics/light.py); its tests check that lumens scale
with current and temperature exactly as that model says.
"""

from __future__ import annotations

import math

import pytest
from lampcalc.api import compute
from lampcalc.errors import InputError
from lampcalc.fixture.check import check
from lampcalc.fixture.design import parse_design
from lampcalc.physics import light
from sites import ROOT

DEMO = ROOT / "docs" / "designs"
pytestmark = pytest.mark.reference


def test_P4_inverse_square_worked_values() -> None:
    # 100 cd at 3 m -> 11.1 lx; at 2 m -> 25 lx. A cone of solid angle 1 sr holding 100 lm is 100 cd.
    beam = 2 * math.acos(1 - 1 / (2 * math.pi))  # full angle whose cone has 1 sr
    assert light.cone_intensity(100.0, beam) == pytest.approx(100.0, rel=1e-12)
    assert light.cone_illuminance(100.0, beam, 3.0) == pytest.approx(11.11, rel=1e-3)
    assert light.cone_illuminance(100.0, beam, 2.0) == pytest.approx(25.0, rel=1e-12)


def test_P3_halving_the_distance_quadruples_the_light() -> None:
    assert light.cone_illuminance(500.0, math.radians(40), 0.5) == pytest.approx(
        4 * light.cone_illuminance(500.0, math.radians(40), 1.0), rel=1e-12
    )


@pytest.mark.parametrize(
    ("flux", "beam", "d", "radius", "area", "lux"),
    [(1000, 30, 3, 0.8038, 2.030, 492.6), (1000, 60, 2, None, 4.189, 238.7), (500, 10, 5, None, 0.6012, 831.7)],
)
def test_P7_flat_disc_average(
    flux: float, beam: float, d: float, radius: float | None, area: float, lux: float
) -> None:
    dia = light.field_diameter(math.radians(beam), d)
    if radius is not None:
        assert dia / 2 == pytest.approx(radius, rel=1e-3)
    assert math.pi * (dia / 2) ** 2 == pytest.approx(area, rel=1e-3)
    assert light.disc_illuminance(flux, math.radians(beam), d) == pytest.approx(lux, rel=1e-3)


@pytest.mark.parametrize(
    ("beam", "omega", "cd", "lux"),
    [(30, 0.21409, 4671, 519.0), (60, 0.84179, 1188, 297.0), (10, 0.02391, 20912, 836.5)],
)
def test_P8_uniform_cone_on_axis(beam: float, omega: float, cd: float, lux: float) -> None:
    d = {30: 3.0, 60: 2.0, 10: 5.0}[beam]
    flux = 500.0 if beam == 10 else 1000.0
    b = math.radians(beam)
    assert light.solid_angle(b) == pytest.approx(omega, rel=1e-3)
    assert light.cone_intensity(flux, b) == pytest.approx(cd, rel=1e-3)
    assert light.cone_illuminance(flux, b, d) == pytest.approx(lux, rel=1e-3)


def test_P9_footcandle() -> None:
    assert light.footcandles(10.764) == pytest.approx(1.0, rel=1e-4)
    assert light.feet(3.048) == pytest.approx(10.0, rel=1e-12)


def test_hemisphere_has_no_flat_field() -> None:
    assert light.solid_angle(math.pi) == pytest.approx(2 * math.pi)
    with pytest.raises(InputError) as e:
        light.field_diameter(math.pi, 2.0)
    assert e.value.field == "beam_angle"


# --- the stated flux model ------------------------------------------------------------------


def test_flux_scales_with_current_as_the_stated_model_says() -> None:
    m = light.FluxModel(100.0, 0.06, 25.0, current_droop=0.1, thermal_droop=0.003)
    assert m.at(0.06, 25.0) == pytest.approx(100.0)
    assert m.at(0.12, 25.0) == pytest.approx(200.0 * 0.9)  # twice the current, 10 % less per ampere
    assert m.at(0.03, 25.0) == pytest.approx(50.0 * 1.05)
    assert m.at(0.06, 85.0) == pytest.approx(100.0 * (1 - 0.003 * 60))
    # without droop the flux is proportional to current
    plain = light.FluxModel(100.0, 0.06)
    assert [plain.at(i, 25.0) for i in (0.0, 0.02, 0.06)] == pytest.approx([0.0, 100 / 3, 100.0])


def test_flux_model_rejects_bad_values_by_name() -> None:
    with pytest.raises(InputError) as e:
        light.FluxModel(100.0, 0.06, current_droop=1.2).validate("light.")
    assert e.value.field == "light.current_droop"


def test_fixture_flux_uses_mean_and_rms_of_the_waveform() -> None:
    """The check's lumens (from each string's mean and rms current) equal the
    model averaged over the sampled waveform (numerical mean)."""
    d = parse_design((DEMO / "panel-230.toml").read_text(encoding="utf-8"))
    ans = check(d)
    from lampcalc.circuit.steady import solve

    st = solve(d.circuit(), spectrum_points=4096)
    m = light.FluxModel(26.0, 0.06, 25.0, 0.08, 0.003)
    per = m.mean(st.period_samples["string0_A"], 55.0)
    assert ans["nominal"]["flux_lm"] == pytest.approx(2 * 34 * per, rel=1e-4)
    assert ans["nominal"]["efficacy_lm_per_W"] == pytest.approx(
        ans["nominal"]["flux_lm"] / ans["nominal"]["input_power_W"]
    )
    # high mains gives more light than low mains; each step is listed
    assert ans["low"]["flux_lm"] < ans["nominal"]["flux_lm"] < ans["high"]["flux_lm"]
    assert [s["capacitance_F"] for s in ans["light"]["steps"]] == pytest.approx([1e-6, 1.47e-6])
    b = ans["light"]["beam"]
    assert b["illuminance_axis_lx"] == pytest.approx(
        light.cone_illuminance(ans["light"]["flux_lm"], math.radians(110), 3.0)
    )


def test_light_calculator_matches_P7_and_P8() -> None:
    ans = compute(
        "light",
        {
            "flux": "1000 lm",
            "test_current": "60 mA",
            "current": "60 mA",
            "temperature": "25 °C",
            "modules": "1",
            "beam_angle": "30°",
            "distance": "3 m",
            "current_droop": "0",
            "thermal_droop": "0 %/K",
        },
    )
    assert ans["ok"], ans
    assert ans["values"]["illuminance_average_lx"] == pytest.approx(492.6, rel=1e-3)  # P7
    assert ans["values"]["illuminance_axis_lx"] == pytest.approx(519.0, rel=1e-3)  # P8
    assert ans["values"]["intensity_cd"] == pytest.approx(4671, rel=1e-3)
    assert ans["display"]["illuminance_axis_fc"] == f"{519.0 / 10.7639:.4g} fc"


def test_light_calculator_bad_input_names_the_field() -> None:
    ans = compute("light", {"beam_angle": "400°"})
    assert not ans["ok"] and ans["errors"][0]["field"] == "beam_angle"
    ans = compute("light", {"flux": "lots"})
    assert not ans["ok"] and ans["errors"][0]["field"] == "flux"


def test_cv_design_light() -> None:
    d = parse_design((DEMO / "panel-24v.toml").read_text(encoding="utf-8"))
    ans = check(d)
    m = light.FluxModel(26.0, 0.06, 25.0, 0.08, 0.003)
    i = ans["nominal"]["string_current_avg_A"]
    assert ans["nominal"]["flux_lm"] == pytest.approx(6 * 7 * m.at(i, 50.0))
    assert ans["nominal"]["harmonics"] is None
