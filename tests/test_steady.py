"""The steady-state solver: limits, conservation, errors."""

from __future__ import annotations

import math

import pytest
from lampcalc.circuit.steady import Bridge, Circuit, StringLoad, solve
from lampcalc.errors import InputError, NoSolutionError
from lampcalc.fixture.design import parse_design
from lampcalc.physics import dropper, ripple


def base(**kw: object) -> Circuit:
    args: dict[str, object] = dict(
        mains_voltage=230.0,
        frequency=50.0,
        series_resistance=47.0,
        dropper=1e-6,
        dropper_bleeder=470e3,
        bridge=Bridge("line", 0.9, 0.05),
        smoothing=220e-6,
        esr=0.5,
        bleeder=220e3,
        strings=(StringLoad(34 * 2.7, 34 * 2.0, 2),),
    )
    args.update(kw)
    return Circuit(**args)  # type: ignore[arg-type]


@pytest.mark.parametrize(
    "c",
    [
        base(),
        base(series_resistance=0.0, esr=0.0),
        base(bridge=Bridge("exponential", resistance=0.1)),
        base(dropper=None, series_resistance=300.0),
        base(frequency=60.0, mains_voltage=120.0, strings=(StringLoad(20 * 2.7, 20 * 2.0, 1),)),
    ],
    ids=["dropper", "no-series-R", "exponential", "resistor-fed", "120V"],
)
def test_power_balance_within_0_1_percent(c: Circuit) -> None:
    st = solve(c)
    assert st.input_power == pytest.approx(st.led_power + sum(st.losses.values()), rel=1e-3)
    assert st.power_factor <= 1.0


@pytest.mark.parametrize(
    "c",
    [base(), base(series_resistance=0.0), base(bridge=Bridge("exponential", resistance=0.1))],
    ids=["line", "no-R", "exp"],
)
def test_charge_balance_on_the_smoothing_capacitor(c: Circuit) -> None:
    # in the steady state the smoothing capacitor's charge returns each period: the bridge's average output
    # equals what the LEDs and the bleeder take (nothing in the solver imposes this; periodicity implies it)
    st = solve(c)
    into_bus = 2 * st.diode_current_avg
    out_of_bus = st.led_current.avg + st.bus_voltage.avg / (c.bleeder or math.inf)
    assert into_bus == pytest.approx(out_of_bus, rel=1e-3)  # the conservation target: 0.1 %


def test_dropper_voltage_swings_by_charge_balance() -> None:
    # ideal diodes, steady bus: the dropper swings between +/-(Vpk - Vbus')
    # and carries 4 f C (Vpk - Vbus') on average (X8)
    c = base(
        series_resistance=0.0,
        esr=0.0,
        smoothing=10e-3,
        bleeder=None,
        bridge=Bridge("line", 0.9, 0.01),
        dropper_bleeder=None,
    )
    st = solve(c)
    swing = math.sqrt(2) * 230 - st.bus_voltage.avg - 1.8
    assert st.dropper_voltage_peak == pytest.approx(swing, rel=2e-3)


def test_approaches_charge_balance_in_its_valid_limit() -> None:
    # large smoothing, no series resistor, ideal-ish diodes: the closed form I = 4 f C (Vpk - Vbus - 2 Vd) should hold
    c = base(
        series_resistance=0.0,
        esr=0.0,
        smoothing=10e-3,
        bleeder=None,
        bridge=Bridge("line", 0.9, 0.01),
        dropper_bleeder=None,
    )
    st = solve(c)
    closed = dropper.average_current(230.0, 50.0, 1e-6, st.bus_voltage.avg, 0.9)
    assert st.led_current.avg == pytest.approx(closed, rel=2e-3)  # within 0.2 %

    # ripple: the closed form I/(2 f C) assumes the capacitor carries the load all the ripple period; a stiff
    # resistor feed with the bus near the crest (short conduction) is its valid limit: within 5 %, never below
    r = solve(
        Circuit(
            230.0,
            50.0,
            series_resistance=2.0,
            dropper=None,
            bridge=Bridge("line", 0.9, 0.01),
            smoothing=1e-3,
            strings=(StringLoad(300.0, 3000.0, 1),),
        )
    )
    pp = ripple.ripple_pp(r.led_current.avg, 50.0, 1e-3)
    assert r.ripple_pp == pytest.approx(pp, rel=0.05)
    assert r.ripple_pp < pp


def test_more_dropper_more_current() -> None:
    a = solve(base(dropper=1.0e-6)).led_current.avg
    b = solve(base(dropper=1.5e-6)).led_current.avg
    assert b > a * 1.3


def test_no_conduction_is_an_error() -> None:
    with pytest.raises(NoSolutionError, match="no conduction"):
        solve(base(strings=(StringLoad(400.0, 50.0, 1),)))


def test_non_convergence_says_what_and_why() -> None:
    from lampcalc.circuit.steady import Solver
    from lampcalc.errors import ConvergenceError

    with pytest.raises(ConvergenceError, match=r"state after a half period.*after 1 Newton steps"):
        Solver(base()).solve((0.0, 0.0), max_iter=1)


def test_nonphysical_values_are_input_errors() -> None:
    with pytest.raises(InputError, match=r"smoothing\.capacitance"):
        solve(base(smoothing=-1.0))
    with pytest.raises(InputError, match="strings"):
        solve(base(strings=(StringLoad(90.0, 0.0, 1),)))


def test_mismatched_strings_share_unevenly() -> None:
    c = base(strings=(StringLoad(34 * 2.7, 34 * 2.0, 1), StringLoad(34 * 2.7 + 1.5, 34 * 2.0, 1)))
    st = solve(c)
    lo, hi = sorted(s.avg for s in st.string_current)
    assert hi > lo * 1.05


def test_design_file_round_trip() -> None:
    d = parse_design(
        """
name = "t"
[mains]
voltage = "230 V"
frequency = 50
[module]
points = [["20 mA", "2.74 V"], ["60 mA", "2.82 V"]]
current_max = "60 mA"
[array]
series = 34
parallel = 2
[dropper]
capacitance = "1 uF"
series_resistance = 47
[smoothing]
capacitance = "220 uF"
"""
    )
    c = d.circuit()
    assert c.strings[0].knee == pytest.approx(34 * 2.70)
    assert c.strings[0].resistance == pytest.approx(34 * 2.0)
    assert math.isclose(c.dropper or 0, 1e-6)


def test_memo_answers_a_repeated_circuit_inside_its_block_only() -> None:
    from lampcalc.circuit import steady

    c = steady.Circuit(
        mains_voltage=230.0,
        frequency=50.0,
        series_resistance=47.0,
        dropper=1e-6,
        bridge=steady.Bridge(),
        smoothing=100e-6,
        strings=(steady.StringLoad(knee=60.0, resistance=200.0, count=2),),
    )
    fresh = steady.solve(c, points=120)
    with steady.memo():
        a = steady.solve(c, points=120)
        b = steady.solve(c, points=120, start=(0.0, 0.0))  # a warm start does not change the answer
        other = steady.solve(c, points=600)
    assert a is b and other is not a
    assert a.led_current.avg == pytest.approx(fresh.led_current.avg, rel=1e-9)
    assert steady.solve(c, points=120) is not a  # outside the block every call solves
