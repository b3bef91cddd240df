"""Exact periodic steady state of a mains-fed LED array.

Circuit: sinusoidal mains -> series resistor -> dropper capacitor (optional,
with its bleeder) -> full bridge -> bus: smoothing capacitor (with ESR) in
parallel with a bleeder and the LED strings (each a knee voltage and a
resistance, from the module line, its ballast and an optional offset).

Method. Every element is piecewise linear: the straight-line diode exactly,
the exponential diode through a chord table fine enough that its voltage error
stays in the millivolts. Between events (a diode pair starting or stopping
conduction, a chord boundary, a string crossing its knee) the circuit is a
linear two-state system driven by a sine, solved in closed form from the
eigenvalues of its 2x2 matrix. Events are located by bracketing on a grid and
refining inside the bracket (Newton on the exact derivative, regula falsi
where Newton would leave it) to 1e-13 of a period, so sharp turn-ons (no
series resistor) are resolved to the limit of floating point, not to a step
size. The bridge is symmetric, so
the state after half a period is the mirror of the start (the dropper voltage
changes sign); Newton's method on that half-period map, with the Jacobian
taken as the product of the segments' transition matrices (exact for a
continuous piecewise-linear field), finds the steady state in a few
half-period passes whatever the time constants.
"""

from __future__ import annotations

import bisect
import math
import operator
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, field, replace
from typing import Any

from ..errors import ConvergenceError, InputError, NoSolutionError
from ..physics.flicker import ieee1789_band

Vec = tuple[float, float]
Mat = tuple[float, float, float, float]  # row major a, b, c, d
Lin = tuple[float, float, float, float]  # coefficients of (vcd, vcs, vs, 1)

THERMAL_VOLTAGE_PER_K = 1.380649e-23 / 1.602176634e-19


@dataclass(frozen=True)
class Bridge:
    """Diode model of the bridge. ``kind`` "line": each diode drops
    ``drop + resistance * I``. ``kind`` "exponential": each diode follows
    I = Is (exp(V / (n Vt)) - 1) with ``resistance`` in series."""

    kind: str = "line"
    drop: float = 0.9
    resistance: float = 0.05
    saturation_current: float = 1e-9
    emission_coefficient: float = 1.8
    temperature: float = 25.0

    def pair_drop(self, current: float) -> float:
        """Voltage across the two conducting diodes at a current."""
        if current <= 0:
            return 0.0 if self.kind == "exponential" else 2 * self.drop
        if self.kind == "line":
            return 2 * (self.drop + self.resistance * current)
        vt = self.emission_coefficient * THERMAL_VOLTAGE_PER_K * (self.temperature + 273.15)
        return 2 * (vt * math.log1p(current / self.saturation_current) + self.resistance * current)

    def threshold(self) -> float:
        return 2 * self.drop if self.kind == "line" else 0.0

    def chords(self, i_max: float, ratio: float = 1.6) -> tuple[tuple[float, float, float], ...]:
        """(start current, a, r) with pair drop = a + r I from each start on;
        successive chord ends ``ratio`` apart in current."""
        if self.kind == "line":
            return ((0.0, 2 * self.drop, 2 * self.resistance),)
        pts = [0.0]
        i = 1e-7
        while i < i_max * 4:
            pts.append(i)
            i *= ratio
        pts.append(i)
        out = []
        for k in range(len(pts) - 1):
            i0, i1 = pts[k], pts[k + 1]
            v0, v1 = self.pair_drop(i0), self.pair_drop(i1)
            r = (v1 - v0) / (i1 - i0)
            out.append((i0, v0 - r * i0, r))
        # beyond the table: continue the last chord
        return tuple(out)


@dataclass(frozen=True)
class StringLoad:
    """``count`` identical strings, each conducting (v - knee)/resistance
    above its knee."""

    knee: float
    resistance: float
    count: int = 1
    ballast: float = 0.0


@dataclass(frozen=True)
class Circuit:
    mains_voltage: float
    frequency: float
    series_resistance: float = 0.0
    dropper: float | None = None
    dropper_bleeder: float | None = None
    bridge: Bridge = field(default_factory=Bridge)
    smoothing: float = 100e-6
    esr: float = 0.0
    bleeder: float | None = None
    strings: tuple[StringLoad, ...] = ()

    def validate(self) -> None:
        def pos(name: str, x: float | None, allow_none: bool = False, allow_zero: bool = False) -> None:
            if x is None and allow_none:
                return
            if x is None or not math.isfinite(x) or x < 0 or (x == 0 and not allow_zero):
                raise InputError(
                    name, x, "a positive finite value" if not allow_zero else "a finite value of 0 or more"
                )

        pos("mains.voltage", self.mains_voltage)
        pos("mains.frequency", self.frequency)
        pos("dropper.series_resistance", self.series_resistance, allow_zero=True)
        pos("dropper.capacitance", self.dropper, allow_none=True)
        pos("dropper.bleeder", self.dropper_bleeder, allow_none=True)
        pos("smoothing.capacitance", self.smoothing)
        pos("smoothing.esr", self.esr, allow_zero=True)
        pos("smoothing.bleeder", self.bleeder, allow_none=True)
        b = self.bridge
        if b.kind not in ("line", "exponential"):
            raise InputError("bridge.model", b.kind, "'line' or 'exponential'")
        pos("bridge.resistance", b.resistance, allow_zero=True)
        if b.kind == "line":
            pos("bridge.drop", b.drop, allow_zero=True)
        else:
            pos("bridge.saturation_current", b.saturation_current)
            pos("bridge.emission_coefficient", b.emission_coefficient)
            if not -60 <= b.temperature <= 200:
                raise InputError("bridge.temperature", b.temperature, "a temperature from -60 °C to 200 °C")
        if self.series_resistance + 2 * b.resistance <= 0 and b.kind == "line":
            raise InputError("bridge.resistance", b.resistance, "more than 0 Ω when there is no series resistance")
        if self.dropper is None and self.series_resistance + 2 * b.resistance <= 0:
            raise InputError(
                "dropper.series_resistance",
                self.series_resistance,
                "a source resistance above 0 Ω when there is no dropper",
            )
        for k, s in enumerate(self.strings):
            if not (s.knee >= 0 and math.isfinite(s.knee)):
                raise InputError(f"strings[{k}].knee", s.knee, "a knee voltage of 0 V or more")
            if not (s.resistance > 0 and math.isfinite(s.resistance)):
                raise InputError(
                    f"strings[{k}].resistance",
                    s.resistance,
                    "a string resistance above 0 Ω (module Rd or a ballast)",
                )
            if s.count < 1:
                raise InputError(f"strings[{k}].count", s.count, "at least one string")


# --- small linear algebra -------------------------------------------------------


def _lin(a: float = 0.0, b: float = 0.0, c: float = 0.0, d: float = 0.0) -> Lin:
    return (a, b, c, d)


def _add(p: Lin, q: Lin, k: float = 1.0) -> Lin:
    return (p[0] + k * q[0], p[1] + k * q[1], p[2] + k * q[2], p[3] + k * q[3])


def _scale(p: Lin, k: float) -> Lin:
    return (p[0] * k, p[1] * k, p[2] * k, p[3] * k)


def _g1p(z: float) -> float:
    """Derivative of expm1(z)/z."""
    if abs(z) < 1e-3:
        return 0.5 + z / 3 + z * z / 8
    return (math.exp(z) * (z - 1) + 1) / (z * z)


class Mode:
    """One linear piece: which diode pair conducts (sigma), on which chord,
    and which strings are on."""

    __slots__ = (
        "A",
        "B",
        "Xi",
        "Xr",
        "c",
        "chord",
        "den_inv",
        "evs",
        "g_hi",
        "g_lo",
        "g_on",
        "i_lin",
        "ic_lin",
        "key",
        "l1",
        "l2",
        "on",
        "sigma",
        "strings_g",
        "vb_lin",
    )

    def __init__(self, sol: Solver, sigma: int, chord: int, on: tuple[bool, ...]) -> None:
        c = sol.c
        self.key = (sigma, chord, on)
        self.evs: list[tuple[float, float, float, float, str, int]] | None = None  # see Solver.half_period
        self.sigma, self.chord, self.on = sigma, chord, on
        G = (1.0 / c.bleeder) if c.bleeder else 0.0
        J = 0.0
        for s, is_on in zip(sol.loads, on):
            if is_on:
                G += s.count / s.resistance
                J += s.count * s.knee / s.resistance
        re = c.esr
        kd = 1.0 if c.dropper else 0.0
        u = _lin(-kd * sigma, 0.0, float(sigma), 0.0)  # sigma (vs - vcd)
        vcs = _lin(0.0, 1.0, 0.0, 0.0)
        if sigma:
            _, a, r = sol.chords[chord]
            rt = c.series_resistance + r
            dnm = 1 + re * (1 / rt + G)
            vb = _scale(_add(_add(vcs, _scale(_add(u, _lin(d=-a)), re / rt)), _lin(d=re * J)), 1 / dnm)
            idc = _scale(_add(_add(u, vb, -1.0), _lin(d=-a)), 1 / rt)
            i = _scale(idc, float(sigma))
        else:
            vb = _scale(_add(vcs, _lin(d=re * J)), 1 / (1 + re * G))
            idc = _lin()
            i = _lin()
        ic = _add(_add(idc, vb, -G), _lin(d=J))
        self.vb_lin, self.i_lin, self.ic_lin = vb, i, ic
        dcs = _scale(ic, 1 / c.smoothing)
        if c.dropper:
            gb = 1 / c.dropper_bleeder if c.dropper_bleeder else 0.0
            dcd = _scale(_add(i, _lin(a=1.0), -gb), 1 / c.dropper)
        else:
            dcd = _lin(a=-1.0)  # a decoupled placeholder state that decays to zero
        self.A: Mat = (dcd[0], dcd[1], dcs[0], dcs[1])
        self.B: Vec = (dcd[2], dcs[2])
        self.c: Vec = (dcd[3], dcs[3])
        a11, a12, a21, a22 = self.A
        half_trace = (a11 + a22) / 2
        det = a11 * a22 - a12 * a21
        disc = half_trace * half_trace - det
        d = math.sqrt(disc) if disc > 0 else 0.0
        self.l1, self.l2 = half_trace + d, half_trace - d
        # sinusoidal particular solution X: (i w I - A) X = B (-i Vpk)
        w, vpk = sol.omega, sol.vpk
        m11, m12, m21, m22 = complex(-a11, w), complex(-a12, 0), complex(-a21, 0), complex(-a22, w)
        b1, b2 = complex(0, -vpk * self.B[0]), complex(0, -vpk * self.B[1])
        dd = m11 * m22 - m12 * m21
        x1 = (b1 * m22 - m12 * b2) / dd
        x2 = (m11 * b2 - m21 * b1) / dd
        self.Xr = (x1.real, x2.real)
        self.Xi = (x1.imag, x2.imag)
        # event functions (value > 0 means "stay")
        self.g_on: tuple[Lin, ...] = ()
        self.g_lo: Lin | None = None
        self.g_hi: Lin | None = None
        if sigma:
            start = sol.chords[chord][0]
            self.g_lo = _add(idc, _lin(d=-start)) if chord > 0 else idc
            if chord + 1 < len(sol.chords):
                self.g_hi = _add(_scale(idc, -1.0), _lin(d=sol.chords[chord + 1][0]))
        else:
            a0 = sol.chords[0][1]
            up = _add(_add(_lin(-kd, 0.0, 1.0, 0.0), vb, -1.0), _lin(d=-a0))  # (vs - vcd) - vb - a0
            dn = _add(_add(_lin(kd, 0.0, -1.0, 0.0), vb, -1.0), _lin(d=-a0))
            self.g_on = (_scale(up, -1.0), _scale(dn, -1.0))
        self.strings_g = tuple(
            _scale(_add(vb, _lin(d=-s.knee)), 1.0 if is_on else -1.0) for s, is_on in zip(sol.loads, on)
        )


class Solver:
    def __init__(self, circuit: Circuit, grid: int = 160) -> None:
        circuit.validate()
        self.c = circuit
        self.omega = 2 * math.pi * circuit.frequency
        self.vpk = math.sqrt(2) * circuit.mains_voltage
        self.period = 1 / circuit.frequency
        self.half = self.period / 2
        self.loads = circuit.strings
        r_loop = circuit.series_resistance + 2 * circuit.bridge.resistance + circuit.esr
        i_est = self.vpk / r_loop if r_loop > 0 else 1e3
        if circuit.dropper:
            i_est = min(i_est, 3 * self.omega * circuit.dropper * self.vpk)
        self.chords = circuit.bridge.chords(max(i_est, 1e-3))
        self.starts = [start for start, _, _ in self.chords]
        self.grid = grid
        self.modes: dict[tuple[int, int, tuple[bool, ...]], Mode] = {}
        self.steps = 0
        self.iterations = 0
        self.segments: list[tuple[float, float, Mode, Vec]] = []  # of the last converged half period

    def chord_drop(self, current: float) -> float:
        """Pair drop of the piecewise-linear bridge model actually solved."""
        if current <= 0:
            return 0.0
        _, a, r = self.chords[max(bisect.bisect_right(self.starts, current) - 1, 0)]
        return a + r * current

    def mode(self, sigma: int, chord: int, on: tuple[bool, ...]) -> Mode:
        key = (sigma, chord, on)
        m = self.modes.get(key)
        if m is None:
            m = self.modes[key] = Mode(self, sigma, chord, on)
        return m

    # -- evaluation inside one mode ---------------------------------------------

    def transition(self, m: Mode, tau: float) -> Mat:
        """The transition matrix exp(A tau) of mode ``m`` (the state itself: :meth:`track`)."""
        l1, l2 = m.l1, m.l2
        a11, a12, a21, a22 = m.A
        z1, z2 = l1 * tau, l2 * tau
        e2 = math.exp(z2)
        dz = z1 - z2
        # divided difference of exp, as in track
        if dz > 30:
            de = (math.exp(z1) - e2) / (l1 - l2)
        elif dz > 1e-9:
            de = e2 * math.expm1(dz) / (l1 - l2)
        else:
            de = tau * e2
        return (e2 + de * (a11 - l2), de * a12, de * a21, e2 + de * (a22 - l2))

    def track(self, m: Mode, t0: float, x0: Vec) -> Callable[[float], tuple[float, float, float, float]]:
        """The state inside mode ``m`` from (t0, x0) as a function of t: the
        closed form x = E y + F c + p(t) (E = exp(A tau), F its integral, p the
        sinusoidal particular solution, y = x0 - p(t0)) with the piece's
        constants hoisted out (the march and the event search call it hundreds
        of times per half period). Returns (vcd, vcs, sin(omega t), cos(omega t))."""
        l1, l2 = m.l1, m.l2
        a11, a12, a21, a22 = m.A
        dl = l1 - l2
        w = self.omega
        xr0, xr1 = m.Xr
        xi0, xi1 = m.Xi
        cw0, sw0 = math.cos(w * t0), math.sin(w * t0)
        y0 = x0[0] - (xr0 * cw0 - xi0 * sw0)
        y1 = x0[1] - (xr1 * cw0 - xi1 * sw0)
        c0, c1 = m.c
        # x = E y + F c + p(t) with E = e2 I + de (A - l2 I), F = f2 I + df (A - l2 I)
        u0, u1 = (a11 - l2) * y0 + a12 * y1, a21 * y0 + (a22 - l2) * y1
        v0, v1 = (a11 - l2) * c0 + a12 * c1, a21 * c0 + (a22 - l2) * c1
        exp, expm1, cos, sin = math.exp, math.expm1, math.cos, math.sin

        def at(t: float) -> tuple[float, float, float, float]:
            tau = t - t0
            z1, z2 = l1 * tau, l2 * tau
            e2 = exp(z2)
            dz = z1 - z2
            if dz > 30:
                de = (exp(z1) - e2) / dl
            elif dz > 1e-9:
                de = e2 * expm1(dz) / dl
            else:
                de = tau * e2
            g2 = 1.0 + z2 / 2 + z2 * z2 / 6 if -1e-5 < z2 < 1e-5 else expm1(z2) / z2
            f2 = tau * g2
            if dz > (1e-4 if -1.0 < z2 < 1.0 else (-1e-4 * z2 if z2 < 0 else 1e-4 * z2)):
                g1 = 1.0 + z1 / 2 + z1 * z1 / 6 if -1e-5 < z1 < 1e-5 else expm1(z1) / z1
                df = tau * (g1 - g2) / dl
            else:
                df = tau * tau * _g1p((z1 + z2) / 2)
            wt = w * t
            ct, st = cos(wt), sin(wt)
            return (
                e2 * y0 + de * u0 + f2 * c0 + df * v0 + xr0 * ct - xi0 * st,
                e2 * y1 + de * u1 + f2 * c1 + df * v1 + xr1 * ct - xi1 * st,
                st,
                ct,
            )

        return at

    def value(self, lin: Lin, x: Vec, t: float) -> float:
        return lin[0] * x[0] + lin[1] * x[1] + lin[2] * self.vpk * math.sin(self.omega * t) + lin[3]

    def mode_at(self, t: float, x: Vec) -> Mode:
        """The mode consistent with state x at time t."""
        on = tuple(x[1] > s.knee for s in self.loads)
        for _ in range(len(self.loads) + 2):
            m = self.mode(0, 0, on)
            vb = self.value(m.vb_lin, x, t)
            new_on = tuple(vb > s.knee for s in self.loads)
            if new_on == on:
                break
            on = new_on
        m = self.mode(0, 0, on)
        for k, g in enumerate(m.g_on):
            if self.value(g, x, t) < 0:
                sigma = 1 if k == 0 else -1
                for j in range(len(self.chords)):
                    mm = self.mode(sigma, j, on)
                    if (mm.g_hi is None or self.value(mm.g_hi, x, t) >= 0) and self.value(
                        mm.g_lo or _lin(d=1.0), x, t
                    ) >= 0:
                        return self._settle_strings(mm, t, x)
                return self._settle_strings(self.mode(sigma, len(self.chords) - 1, on), t, x)
        return m

    def _settle_strings(self, m: Mode, t: float, x: Vec) -> Mode:
        for _ in range(len(self.loads) + 2):
            vb = self.value(m.vb_lin, x, t)
            on = tuple(vb > s.knee for s in self.loads)
            if on == m.on:
                return m
            m = self.mode(m.sigma, m.chord, on)
        return m

    def _events(self, m: Mode) -> list[tuple[Lin, str, int]]:
        ev: list[tuple[Lin, str, int]] = []
        for k, g in enumerate(m.g_on):
            ev.append((g, "on", 1 if k == 0 else -1))
        if m.g_lo is not None:
            ev.append((m.g_lo, "lo", 0))
        if m.g_hi is not None:
            ev.append((m.g_hi, "hi", 0))
        for k, g in enumerate(m.strings_g):
            ev.append((g, "str", k))
        return ev

    def _next_mode(self, m: Mode, kind: str, k: int) -> Mode:
        if kind == "on":
            return self.mode(k, 0, m.on)
        if kind == "lo":
            return self.mode(0, 0, m.on) if m.chord == 0 else self.mode(m.sigma, m.chord - 1, m.on)
        if kind == "hi":
            return self.mode(m.sigma, m.chord + 1, m.on)
        on = list(m.on)
        on[k] = not on[k]
        return self.mode(m.sigma, m.chord, tuple(on))

    def _crossing(
        self,
        m: Mode,
        at: Callable[[float], tuple[float, float, float, float]],
        g: Lin,
        lo: float,
        glo: float,
        hi: float,
        ghi: float,
    ) -> float:
        """The first time in (lo, hi] where the event function g (vs scaled to
        the peak) turns negative, given g(lo) >= 0 > g(hi): Newton steps on the
        exact state (its derivative is A x + B vs + c) kept inside the bracket,
        the Illinois variant of regula falsi where Newton would leave it, and a
        last probe just across the root so the bracket closes from both sides.
        Returns the bracket's negative end, within 1e-13 of a period of the root."""
        g0, g1, g2, g3 = g
        a11, a12, a21, a22 = m.A
        b0, b1 = m.B[0] * self.vpk, m.B[1] * self.vpk
        c0, c1 = m.c
        w = self.omega
        tol = 1e-13 * self.period
        side = 0
        newton = 8  # Newton attempts before plain regula falsi
        mid = hi - ghi * (hi - lo) / (ghi - glo) if ghi != glo else 0.5 * (lo + hi)
        for _ in range(80):
            if hi - lo < tol:
                break
            if not lo < mid < hi:
                mid = 0.5 * (lo + hi)
            x0, x1, st, ct = at(mid)
            self.steps += 1
            gm = g0 * x0 + g1 * x1 + g2 * st + g3
            if gm < 0:
                hi, ghi = mid, gm
                if side == -1:
                    glo *= 0.5
                side = -1
            else:
                lo, glo = mid, gm
                if side == 1:
                    ghi *= 0.5
                side = 1
            if hi - lo < tol:
                break
            nt = lo - 1.0
            if newton > 0:
                newton -= 1
                dg = g0 * (a11 * x0 + a12 * x1 + b0 * st + c0) + g1 * (a21 * x0 + a22 * x1 + b1 * st + c1) + g2 * w * ct
                if dg != 0:
                    nt = mid - gm / dg
                    if abs(nt - mid) < 0.25 * tol:
                        nt += 0.5 * tol if gm >= 0 else -0.5 * tol
            if lo < nt < hi:
                mid = nt
            else:
                mid = hi - ghi * (hi - lo) / (ghi - glo) if ghi != glo else 0.5 * (lo + hi)
        return hi

    def half_period(self, x0: Vec, record: bool = False) -> tuple[Vec, Mat, list[tuple[float, float, Mode, Vec]]]:
        """Integrate from t = 0 to T/2. Returns the end state, d(end)/d(start)
        and, if asked, the segments (t0, t1, mode, state at t0)."""
        t = 0.0
        x = x0
        m = self.mode_at(t, x)
        M: Mat = (1.0, 0.0, 0.0, 1.0)
        segs: list[tuple[float, float, Mode, Vec]] = []
        h = self.half / self.grid
        vpk, w = self.vpk, self.omega
        end = self.half * (1 - 1e-14)
        guard = 0
        while t < self.half * (1 - 1e-14):
            guard += 1
            if guard > 10 * self.grid:  # valid solves seen: at most 116 pieces per half period (43 chords)
                raise ConvergenceError("events", "too many switching events in one half period")
            t_seg0, x_seg0 = t, x
            at = self.track(m, t, x)
            evs = m.evs
            if evs is None:
                evs = m.evs = [(g[0], g[1], g[2] * vpk, g[3], kind, k) for g, kind, k in self._events(m)]
            # march the grid until an event function turns negative
            hit: tuple[float, str, int] | None = None
            ta = t
            ra = (x[0], x[1], math.sin(w * t), math.cos(w * t))
            while ta < end and hit is None:
                tb = min(ta + h, self.half)
                rb = at(tb)
                self.steps += 1
                best = None
                for g0, g1, g2, g3, kind, k in evs:
                    gb = g0 * rb[0] + g1 * rb[1] + g2 * rb[2] + g3
                    if gb < 0:
                        ga = g0 * ra[0] + g1 * ra[1] + g2 * ra[2] + g3
                        tc = self._crossing(m, at, (g0, g1, g2, g3), ta, ga, tb, gb)
                        if best is None or tc < best[0]:
                            best = (tc, kind, k)
                if best is not None:
                    hit = best
                else:
                    ta, ra = tb, rb
            if hit is None:
                t_end = self.half
                kind, k = "", 0
            else:
                t_end, kind, k = hit
            xa, xb, _, _ = at(t_end)
            self.steps += 1
            x_end, E = (xa, xb), self.transition(m, t_end - t_seg0)
            M = (
                E[0] * M[0] + E[1] * M[2],
                E[0] * M[1] + E[1] * M[3],
                E[2] * M[0] + E[3] * M[2],
                E[2] * M[1] + E[3] * M[3],
            )
            if record:
                segs.append((t_seg0, t_end, m, x_seg0))
            t, x = t_end, x_end
            if hit is not None:
                m = self._next_mode(m, kind, k)
        return x, M, segs

    def solve(self, x0: Vec, tol: float = 1e-10, max_iter: int = 40) -> Vec:
        """Newton on x = S * Phi_half(x), S = diag(-1, 1)."""
        x = x0
        scale = max(self.vpk, 1.0)
        last = math.inf
        for it in range(max_iter):
            self.iterations = it + 1
            y, M, segs = self.half_period(x, record=True)
            r = (-y[0] - x[0], y[1] - x[1])
            norm = max(abs(r[0]), abs(r[1]))
            if norm < tol * scale:
                self.segments = segs  # the converged pass: no need to run it again to record it
                return x
            # J = S M - I
            j11, j12, j21, j22 = -M[0] - 1, -M[1], M[2], M[3] - 1
            det = j11 * j22 - j12 * j21
            if det == 0 or not math.isfinite(det):
                raise ConvergenceError(
                    "Jacobian", "the half-period map is singular (a state that no current ever reaches)"
                )
            dx = ((j22 * r[0] - j12 * r[1]) / det, (-j21 * r[0] + j11 * r[1]) / det)
            step = 1.0
            if norm > last:
                step = 0.5
            x = (x[0] - step * dx[0], x[1] - step * dx[1])
            last = norm
        raise ConvergenceError(
            "state after a half period", f"residual still {norm:.3g} V after {max_iter} Newton steps"
        )


@dataclass(frozen=True)
class Stats:
    avg: float
    rms: float
    min: float
    max: float


def _stats(xs: Sequence[float]) -> Stats:
    n = len(xs)
    return Stats(sum(xs) / n, math.sqrt(sum(v * v for v in xs) / n), min(xs), max(xs))


@dataclass(frozen=True)
class SteadyState:
    led_current: Stats
    string_current: tuple[Stats, ...]  # per string group, one string
    bus_voltage: Stats
    ripple_pp: float
    percent_flicker: float  # percent
    flicker_index: float
    flicker_frequency: float
    flicker_band: str
    low_risk_limit: float
    no_effect_limit: float
    dropper_current_rms: float
    dropper_voltage_peak: float
    smoothing_ripple_current_rms: float
    diode_current_avg: float
    diode_current_rms: float
    diode_current_peak: float
    line_current_rms: float
    input_power: float
    apparent_power: float
    power_factor: float
    led_power: float
    losses: dict[str, float]
    waveform: dict[str, tuple[float, ...]]
    iterations: int
    steps: int
    #: one whole period on a uniform grid of ``spectrum_points`` (empty unless asked for): "t", "mains_V",
    #: "line_current_A", "led_current_A" and "string{k}_A" (one string of group k)
    period_samples: dict[str, tuple[float, ...]] = field(default_factory=dict)
    start: Vec = (0.0, 0.0)  # the state at t = 0 (a warm start for a nearby circuit)


def initial_state(c: Circuit) -> Vec:
    """A closed-form start: bus where the charge-balance supply meets the
    load line, dropper voltage from the ideal-diode waveform."""
    vpk = math.sqrt(2) * c.mains_voltage
    a0 = c.bridge.threshold()

    def load(v: float) -> float:
        i = sum(s.count * max(v - s.knee, 0.0) / s.resistance for s in c.strings)
        return i + (v / c.bleeder if c.bleeder else 0.0)

    def supply(v: float) -> float:
        head = max(vpk - v - a0, 0.0)
        if c.dropper:
            i = 4 * c.frequency * c.dropper * head
            r = c.series_resistance
            return i if r <= 0 else min(i, head / r)
        r = c.series_resistance + 2 * c.bridge.resistance
        return head / r * 0.3  # short conduction near the crest

    lo, hi = 0.0, max(vpk - a0, 0.0)
    for _ in range(60):
        mid = (lo + hi) / 2
        if supply(mid) > load(mid):
            lo = mid
        else:
            hi = mid
    vb = lo
    # at t = 0 the dropper holds -(Vpk - Vb') since the last crest, unless the
    # bridge already conducts (2 Vb' < Vpk), when it follows vs - Vb' = -Vb'
    vbp = vb + a0
    vcd = -max(min(vbp, vpk - vbp), 0.0) if c.dropper else 0.0
    return (vcd, vb)


class Memo:
    """Answers kept while a :func:`memo` block runs: steady states by
    (circuit, points, wave_points, spectrum_points) and anything else a
    solver module keys by its own tuple (the switch-on transient)."""

    def __init__(self) -> None:
        self.states: dict[tuple[Circuit, int, int, int], SteadyState] = {}
        self.other: dict[tuple[object, ...], object] = {}

    @staticmethod
    def put(table: dict[Any, Any], key: object, value: object) -> None:
        if len(table) >= MEMO_SIZE:
            del table[next(iter(table))]
        table[key] = value


_memo: Memo | None = None
MEMO_SIZE = 256


def active_memo() -> Memo | None:
    """The memo of the :func:`memo` block running now, if any."""
    return _memo


@contextmanager
def memo() -> Iterator[None]:
    """Within the block, a circuit solved again at the same resolution is
    answered from the first solve (the planner reviews each draft twice: to
    size its ratings and to judge the written design, which has the same
    circuit). The states are frozen; the oldest go past ``MEMO_SIZE``."""
    global _memo
    outer = _memo
    if outer is None:
        _memo = Memo()
    try:
        yield
    finally:
        if outer is None:
            _memo = None


def solve(
    c: Circuit, points: int = 600, wave_points: int = 200, spectrum_points: int = 0, start: Vec | None = None
) -> SteadyState:
    """The periodic steady state. ``spectrum_points`` (even, 0 for none) adds
    ``period_samples``: the waveforms on that many equally spaced points per
    period, for harmonic spectra and camera exposure. ``start`` is an optional
    warm start (the state at t = 0 of a nearby circuit); Newton converges to the
    same answer."""
    key = (c, points, wave_points, spectrum_points)
    if _memo is not None:
        hit = _memo.states.get(key)
        if hit is not None:
            return hit
    st = _solve(c, points, wave_points, spectrum_points, start)
    if _memo is not None:
        Memo.put(_memo.states, key, st)
    return st


def _solve(c: Circuit, points: int, wave_points: int, spectrum_points: int, start: Vec | None) -> SteadyState:
    if spectrum_points < 0 or spectrum_points % 2:
        raise InputError("spectrum_points", spectrum_points, "an even number of samples per period, or 0")
    sol = Solver(c)
    a0 = c.bridge.threshold()
    if c.strings and min(s.knee for s in c.strings) >= sol.vpk - a0:
        raise NoSolutionError(
            "array.series",
            f"{min(s.knee for s in c.strings):.4g} V knee",
            f"a string knee below the mains peak less the bridge drop ({sol.vpk - a0:.4g} V)",
            "no conduction: the LED strings need more than the mains peak",
        )
    sol.solve(start if start is not None else initial_state(c))
    segs = sol.segments
    st = _measure(sol, segs, points, wave_points)
    if spectrum_points:
        st = replace(st, period_samples=_period_samples(sol, segs, spectrum_points))
    return st


def _period_samples(sol: Solver, segs: list[tuple[float, float, Mode, Vec]], n: int) -> dict[str, tuple[float, ...]]:
    """Exact waveforms at t = k T / n, k = 0 .. n - 1 (the second half mirrors the first)."""
    half_n = n // 2
    rows: list[tuple[float, ...]] = []
    trackers: dict[int, Callable[[float], tuple[float, float, float, float]]] = {}
    si = 0
    for q in range(half_n):
        t = sol.half * q / half_n
        while si + 1 < len(segs) and t >= segs[si][1]:
            si += 1
        t0, _, m, x0 = segs[si]
        at = trackers.get(si)
        if at is None:
            at = trackers[si] = sol.track(m, t0, x0)
        xa, xb, st, _ = at(t)
        x = (xa, xb)
        vb = sol.value(m.vb_lin, x, t)
        per = tuple(max(vb - s.knee, 0.0) / s.resistance for s in sol.loads)
        led = sum(s.count * p for s, p in zip(sol.loads, per))
        rows.append((t, sol.vpk * st, sol.value(m.i_lin, x, t), led, *per))
    rows += [(r[0] + sol.half, -r[1], -r[2], *r[3:]) for r in rows]
    names = ["t", "mains_V", "line_current_A", "led_current_A"] + [f"string{k}_A" for k in range(len(sol.loads))]
    return {name: tuple(r[j] for r in rows) for j, name in enumerate(names)}


def _nodes(segs: list[tuple[float, float, Mode, Vec]], half: float, n: int) -> list[tuple[int, float, float]]:
    """Composite Simpson nodes within each segment (segment index, time,
    weight/half): every kink sits on a segment boundary, so each piece is smooth
    and short pieces (sharp current spikes) still get their own nodes."""
    out: list[tuple[int, float, float]] = []
    for k, (t0, t1, mode, _) in enumerate(segs):
        if t1 - t0 <= 0:
            continue
        # A decaying fast mode is resolved where it lives: the first SETTLE time constants of the piece get
        # nodes a third of a time constant apart; after them its part is below e^-SETTLE (2e-9) of where it
        # started and the rest of the piece is smooth, sampled for the time base alone.
        fast = -mode.l2 if mode.l2 < 0 else 0.0
        if fast * (t1 - t0) > 2 * SETTLE:
            tc = t0 + SETTLE / fast
            pieces = [(t0, tc, 3 * SETTLE), (tc, t1, 0.0)]
        else:
            pieces = [(t0, t1, min(fast * (t1 - t0), 400.0))]
        for a, b, stiff in pieces:
            dt = b - a
            m = max(2, 2 * math.ceil(max(n * dt / half, stiff) / 2))
            h = dt / m
            for j in range(m + 1):
                w = 1.0 if j in (0, m) else (4.0 if j % 2 else 2.0)
                out.append((k, a + j * h, w * h / 3 / half))
    return out


#: time constants of a piece's fast mode given dense nodes (see :func:`_nodes`)
SETTLE = 20.0


def _measure(sol: Solver, segs: list[tuple[float, float, Mode, Vec]], n: int, nw: int) -> SteadyState:
    c = sol.c
    half = sol.half

    trackers: dict[int, Callable[[float], tuple[float, float, float, float]]] = {}
    vpk = sol.vpk
    knees = [(s.knee, s.resistance) for s in sol.loads]

    def sample(k: int, t: float) -> tuple[float, float, float, float, float, float, float, tuple[float, ...]]:
        seg = segs[k]
        m = seg[2]
        track = trackers.get(k)
        if track is None:
            track = trackers[k] = sol.track(m, seg[0], seg[3])
        xa, xb, st, _ = track(t)
        vs = vpk * st
        vb = sol.value(m.vb_lin, (xa, xb), t)
        i = sol.value(m.i_lin, (xa, xb), t)
        ic = sol.value(m.ic_lin, (xa, xb), t)
        per = tuple((vb - kn) / rs if vb > kn else 0.0 for kn, rs in knees)
        return (t, vs, xa, xb, vb, i, ic, per)

    nodes = _nodes(segs, half, n)
    # the samples, as columns
    vsrc: list[float] = []
    xcd: list[float] = []
    vbus: list[float] = []
    line: list[float] = []
    icap: list[float] = []
    string_cols: list[list[float]] = [[] for _ in knees]
    cur = -1
    for k, t, _ in nodes:
        if k != cur:  # the nodes come piece by piece
            cur = k
            m = segs[k][2]
            track = trackers[k] = sol.track(m, segs[k][0], segs[k][3])
            b0, b1, b2, b3 = m.vb_lin
            i0, i1, i2, i3 = m.i_lin
            k0, k1, k2, k3 = m.ic_lin
        xa, xb, st, _ = track(t)
        vs = vpk * st
        vb = b0 * xa + b1 * xb + b2 * vs + b3
        vsrc.append(vs)
        xcd.append(xa)
        vbus.append(vb)
        line.append(i0 * xa + i1 * xb + i2 * vs + i3)
        icap.append(k0 * xa + k1 * xb + k2 * vs + k3)
        for col, (kn, rs) in zip(string_cols, knees):
            col.append((vb - kn) / rs if vb > kn else 0.0)
    wts = [w for _, _, w in nodes]

    def mean(xs: Sequence[float]) -> float:
        return float(sum(map(operator.mul, wts, xs)))

    def mean_of_product(a: Sequence[float], b: Sequence[float]) -> float:
        return float(sum(map(operator.mul, wts, map(operator.mul, a, b))))

    def stats(xs: Sequence[float]) -> Stats:
        return Stats(mean(xs), math.sqrt(max(mean_of_product(xs, xs), 0.0)), min(xs), max(xs))

    led = [0.0] * len(nodes)
    for s, col in zip(sol.loads, string_cols):
        led = [a + s.count * v for a, v in zip(led, col)]
    idc = [abs(v) for v in line]
    gb = 1 / c.dropper_bleeder if (c.dropper and c.dropper_bleeder) else 0.0
    i_cd = [i - v * gb for i, v in zip(line, xcd)]
    pin = mean_of_product(vsrc, line)
    line_sq = mean_of_product(line, line)
    irms = math.sqrt(line_sq)
    s_app = c.mains_voltage * irms
    led_power = 0.0
    ballast_loss = 0.0
    for s, ik in zip(sol.loads, string_cols):
        pb = s.ballast * mean_of_product(ik, ik)
        led_power += s.count * (mean_of_product(ik, vbus) - pb)
        ballast_loss += s.count * pb
    losses = {
        "series_resistor": c.series_resistance * line_sq,
        "bridge": mean([a * sol.chord_drop(a) for a in idc]),
        "esr": c.esr * mean_of_product(icap, icap),
        "bus_bleeder": mean_of_product(vbus, vbus) / c.bleeder if c.bleeder else 0.0,
        "dropper_bleeder": mean_of_product(xcd, xcd) * gb,
        "ballast": ballast_loss,
    }
    led_stats = stats(led)
    hi_l, lo_l = max(led), min(led)
    pf = 100.0 * (hi_l - lo_l) / (hi_l + lo_l) if hi_l + lo_l > 0 else 0.0
    fi = mean([max(v - led_stats.avg, 0.0) for v in led]) / led_stats.avg if led_stats.avg > 0 else 0.0
    band = ieee1789_band(pf, 2 * c.frequency)
    # waveform over a whole period on a uniform grid; the second half mirrors the first
    wave = []
    si = 0
    for q in range(nw // 2):
        t = half * q / (nw // 2)
        while si + 1 < len(segs) and t >= segs[si][1]:
            si += 1
        row = sample(si, t)
        wave.append((t, row[1], row[5], row[4], sum(s.count * p for s, p in zip(sol.loads, row[7]))))
    wave += [(t + half, -v, -i, b, lc) for t, v, i, b, lc in wave]
    return SteadyState(
        led_current=led_stats,
        string_current=tuple(stats(col) for col in string_cols),
        bus_voltage=stats(vbus),
        ripple_pp=max(vbus) - min(vbus),
        percent_flicker=pf,
        flicker_index=fi,
        flicker_frequency=2 * c.frequency,
        flicker_band=band.name,
        low_risk_limit=band.low_risk_limit,
        no_effect_limit=band.no_effect_limit,
        dropper_current_rms=math.sqrt(mean_of_product(i_cd, i_cd)) if c.dropper else 0.0,
        dropper_voltage_peak=max(map(abs, xcd)) if c.dropper else 0.0,
        smoothing_ripple_current_rms=math.sqrt(mean_of_product(icap, icap)),
        diode_current_avg=mean(idc) / 2,
        diode_current_rms=math.sqrt(line_sq / 2),
        diode_current_peak=max(idc),
        line_current_rms=irms,
        input_power=pin,
        apparent_power=s_app,
        power_factor=pin / s_app if s_app > 0 else 0.0,
        led_power=led_power,
        losses=losses,
        waveform={
            k: tuple(w[j] for w in wave)
            for j, k in enumerate(("t", "mains_V", "line_current_A", "bus_V", "led_current_A"))
        },
        iterations=sol.iterations,
        steps=sol.steps,
        start=segs[0][3] if segs else (0.0, 0.0),
    )


def switch_on(c: Circuit) -> tuple[float, float]:
    """Worst-case switch-on at the crest with everything discharged: peak
    current, and energy taken by the series resistor while the capacitors
    charge (its share of C V^2 / 2)."""
    vpk = math.sqrt(2) * c.mains_voltage
    r = c.series_resistance + 2 * c.bridge.resistance + c.esr
    if c.bridge.kind == "line":
        head = vpk - 2 * c.bridge.drop
        peak = head / r if r > 0 else math.inf
    else:
        lo, hi = 0.0, vpk / max(r, 1e-6)
        for _ in range(200):
            mid = (lo + hi) / 2
            if (c.series_resistance + c.esr) * mid + c.bridge.pair_drop(mid) < vpk:
                lo = mid
            else:
                hi = mid
        peak, head = lo, vpk
    ceq = c.smoothing if not c.dropper else c.dropper * c.smoothing / (c.dropper + c.smoothing)
    share = c.series_resistance / r if r > 0 else 0.0
    return peak, 0.5 * ceq * head**2 * share


def open_load(c: Circuit) -> tuple[float, float]:
    """Every string open: the bus voltage the smoothing capacitor climbs to,
    and the time constant of the climb (charge balance: Cs / (4 f Cd) through
    a dropper; about Cs (Rs + 2 Rd) through a resistor feed)."""
    v, tau, _ = open_load_state(c)
    return v, tau


def open_load_state(c: Circuit) -> tuple[float, float, SteadyState | None]:
    """:func:`open_load` and the steady state it solved (None without a bus
    bleeder: the bus then climbs to the peak and stays)."""
    vpk = math.sqrt(2) * c.mains_voltage
    st: SteadyState | None = None
    if c.bleeder:
        oc = Circuit(**{**c.__dict__, "strings": ()})
        st = solve(oc)
        v = st.bus_voltage.max
    else:
        v = vpk - c.bridge.threshold()
    if c.dropper:
        tau = c.smoothing / (4 * c.frequency * c.dropper)
    else:
        tau = c.smoothing * (c.series_resistance + 2 * c.bridge.resistance + c.esr) * math.pi
    return v, tau, st
