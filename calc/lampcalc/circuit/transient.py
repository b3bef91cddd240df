"""Switch-on from the discharged state: a time-domain run of the same
piecewise-linear circuit, with the supply's own impedance in series.

Circuit: mains source (closing at a chosen phase) -> source resistance and
inductance (the cord and the supply) -> series resistor -> dropper (with its
bleeder) -> bridge (its chord table, so the exponential model too) -> bus:
smoothing capacitor behind its ESR, bleeder, LED strings. Every capacitor starts
discharged.

Method. The state is (line current, dropper voltage, smoothing voltage); with
the sine written as two more states (sin, cos) and a constant, every linear
piece is x' = M x, propagated *exactly* over a step by the matrix exponential
(scaling and squaring of a Taylor series; cached per piece). Events (the bridge
starting or stopping, a string crossing its knee) are located inside a step by
bisection on exact propagations, so the step only sets how finely the
current is sampled for I²t (Simpson on the step and its midpoint) and where the
peak search starts; the peak itself is refined by golden-section search on
exact propagations. The chord of an exponential bridge is chosen at the start
of each step (the chords are fine; this is the model's only step-size error).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .steady import Circuit, Memo, active_memo

Mat6 = list[list[float]]
Vec6 = list[float]

#: Smallest source inductance used: the piece with no inductance at all has no
#: current state; 1 µH is far below any cord (about 1 µH per metre of pair).
MIN_INDUCTANCE = 1e-6


@dataclass(frozen=True)
class Supply:
    """Source impedance in series with the mains (cord plus supply)."""

    resistance: float = 0.4
    inductance: float = 0.25 / (2 * math.pi * 50)


@dataclass(frozen=True)
class Surge:
    peak: float  # A, largest |line current|
    time_of_peak: float  # s after closing
    i2t: float  # A²s, line current over the first half period
    phase_deg: float  # mains phase at closing, 0 at the positive-going zero crossing
    resistor_energy: float  # J in the series resistor over the half period
    bus_end: float  # V, the bus after the half period


def _matmul(a: Mat6, b: Mat6) -> Mat6:
    if len(b) != 6:
        cols = list(zip(*b))
        return [[sum(x * y for x, y in zip(row, col)) for col in cols] for row in a]
    # written out for the six states (the matrix exponential's inner loop)
    cols = list(zip(*b))
    out = []
    for r0, r1, r2, r3, r4, r5 in a:
        out.append([r0 * p0 + r1 * p1 + r2 * p2 + r3 * p3 + r4 * p4 + r5 * p5 for p0, p1, p2, p3, p4, p5 in cols])
    return out


def _matvec(a: Mat6, x: Vec6) -> Vec6:
    # written out for the six states: this product is the inner loop of every run
    x0, x1, x2, x3, x4, x5 = x
    return [r[0] * x0 + r[1] * x1 + r[2] * x2 + r[3] * x3 + r[4] * x4 + r[5] * x5 for r in a]


def expm(m: Mat6, h: float) -> Mat6:
    """exp(m h) by scaling and squaring a 10-term Taylor series (the scaled
    matrix has norm at most 1/4, so the truncation is below 1e-13)."""
    n = len(m)
    norm = max(sum(abs(v) for v in row) for row in m) * abs(h)
    k = max(0, math.ceil(math.log2(norm / 0.25))) if norm > 0.25 else 0
    s = h / 2**k
    a = [[v * s for v in row] for row in m]
    out = [[1.0 if i == j else 0.0 for j in range(n)] for i in range(n)]
    term = [row[:] for row in out]
    for j in range(1, 11):
        term = _matmul(term, a)
        term = [[v / j for v in row] for row in term]
        out = [[o + t for o, t in zip(ro, rt)] for ro, rt in zip(out, term)]
    for _ in range(k):
        out = _matmul(out, out)
    return out


class _Run:
    def __init__(self, c: Circuit, supply: Supply, phase: float) -> None:
        self.c = c
        self.w = 2 * math.pi * c.frequency
        self.vpk = math.sqrt(2) * c.mains_voltage
        self.L = max(supply.inductance, MIN_INDUCTANCE)
        self.r_src = supply.resistance + c.series_resistance
        r_loop = self.r_src + 2 * c.bridge.resistance + c.esr
        i_est = self.vpk / r_loop if r_loop > 0 else 1e4
        # chord ends 4x apart: the chord stays within about 0.1 nVt (a few mV) of the diode curve
        self.chords = c.bridge.chords(max(i_est, 1e-3), ratio=4.0)
        self.phase = phase
        self.cache: dict[tuple[int, int, tuple[bool, ...]], Mat6] = {}
        self.bus_cache: dict[tuple[bool, ...], tuple[float, float, float, float, float]] = {}
        self.step_cache: dict[tuple[tuple[int, int, tuple[bool, ...]], float], Mat6] = {}

    # (the matrix exponential is cached per piece and step length: the run uses three lengths)

    def chord_of(self, i: float) -> int:
        k = 0
        for j, (start, _, _) in enumerate(self.chords):
            if abs(i) >= start:
                k = j
        return k

    def loads(self, on: tuple[bool, ...]) -> tuple[float, float]:
        c = self.c
        g = 1 / c.bleeder if c.bleeder else 0.0
        j = 0.0
        for s, o in zip(c.strings, on):
            if o:
                g += s.count / s.resistance
                j += s.count * s.knee / s.resistance
        return g, j

    def bus_coeffs(self, on: tuple[bool, ...]) -> tuple[float, float, float, float, float]:
        """v_b = al vcs + be |i| + ga, and the load's G and J."""
        got = self.bus_cache.get(on)
        if got is None:
            g, j = self.loads(on)
            re = self.c.esr
            al = 1 / (1 + re * g)
            got = self.bus_cache[on] = (al, re * al, re * j * al, g, j)
        return got

    def matrix(self, sigma: int, chord: int, on: tuple[bool, ...]) -> Mat6:
        key = (sigma, chord, on)
        if key in self.cache:
            return self.cache[key]
        c = self.c
        al, be, ga, g, j = self.bus_coeffs(on)
        m = [[0.0] * 6 for _ in range(6)]
        # states: 0 i, 1 vcd, 2 vcs, 3 sin, 4 cos, 5 one
        m[3][4] = self.w
        m[4][3] = -self.w
        if sigma:
            _, a, r = self.chords[chord]
            s = float(sigma)
            inv_l = 1 / self.L
            m[0][0] = -(self.r_src + r + be) * inv_l
            m[0][1] = -inv_l if c.dropper else 0.0
            m[0][2] = -s * al * inv_l
            m[0][3] = self.vpk * inv_l
            m[0][5] = -s * (a + ga) * inv_l
            # smoothing: i_cap = s i - (G v_b - J), v_b = al vcs + be s i + ga
            inv_cs = 1 / c.smoothing
            m[2][0] = (s - g * be * s) * inv_cs
            m[2][2] = -g * al * inv_cs
            m[2][5] = (-g * ga + j) * inv_cs
        else:
            inv_cs = 1 / c.smoothing
            m[2][2] = -g * al * inv_cs
            m[2][5] = (-g * ga + j) * inv_cs
        if c.dropper:
            gb = 1 / c.dropper_bleeder if c.dropper_bleeder else 0.0
            m[1][0] = 1 / c.dropper if sigma else 0.0
            m[1][1] = -gb / c.dropper
        self.cache[key] = m
        return m

    def step(self, key: tuple[int, int, tuple[bool, ...]], x: Vec6, h: float) -> Vec6:
        sk = (key, h)
        e = self.step_cache.get(sk)
        if e is None:
            e = expm(self.matrix(*key), h)
            if len(self.step_cache) < 512:
                self.step_cache[sk] = e
        return _matvec(e, x)

    def vbus(self, on: tuple[bool, ...], x: Vec6) -> float:
        al, be, ga, _, _ = self.bus_coeffs(on)
        return al * x[2] + be * abs(x[0]) + ga

    def events(self, key: tuple[int, int, tuple[bool, ...]], x: Vec6) -> list[float]:
        """Signed event functions: each stays > 0 while the piece holds."""
        sigma, _, on = key
        vb = self.vbus(on, x)
        out = [(vb - s.knee) * (1 if o else -1) for s, o in zip(self.c.strings, on)]
        if sigma:
            out.append(sigma * x[0])
        else:
            a0 = self.chords[0][1]
            drive = self.vpk * x[3] - (x[1] if self.c.dropper else 0.0)
            out.append(vb + a0 - abs(drive))
        return out

    def next_key(self, key: tuple[int, int, tuple[bool, ...]], x: Vec6) -> tuple[int, int, tuple[bool, ...]]:
        sigma, _, on = key
        vb = self.vbus(on, x)
        on2 = tuple(vb > s.knee for s in self.c.strings)
        if sigma and sigma * x[0] <= 0:
            return (0, 0, on2)
        if not sigma:
            a0 = self.chords[0][1]
            drive = self.vpk * x[3] - (x[1] if self.c.dropper else 0.0)
            if abs(drive) > vb + a0:
                return (1 if drive > 0 else -1, 0, on2)
        return (sigma, self.chord_of(x[0]) if sigma else 0, on2)


#: Sub-steps a step is cut into where an event or the peak falls in it.
SUB = 128

Key = tuple[int, int, tuple[bool, ...]]


def _crossed(e0: list[float], e1: list[float]) -> bool:
    return any(a > 0 >= b for a, b in zip(e0, e1))


def switch_on(c: Circuit, supply: Supply, phase_deg: float = 90.0, steps: int = 1000) -> Surge:
    """Close at ``phase_deg`` onto the discharged circuit and run one half period."""
    c.validate()
    ph = math.radians(phase_deg)
    run = _Run(c, supply, ph)
    half = 0.5 / c.frequency
    h = half / steps
    hs = h / SUB
    x: Vec6 = [0.0, 0.0, 0.0, math.sin(ph), math.cos(ph), 1.0]
    key: Key = run.next_key((0, 0, tuple(False for _ in c.strings)), x)
    i2t = 0.0
    peak, t_peak = 0.0, 0.0
    best: tuple[float, Key, Vec6, float] | None = None
    for n in range(steps):
        t = n * h
        y = run.step(key, x, h)
        nk = run.next_key(key, y)
        same = (nk[0], nk[2]) == (key[0], key[2]) and abs(nk[1] - key[1]) <= 1  # a chord step of one is fine
        if same and not _crossed(run.events(key, x), run.events(key, y)):
            ym = run.step(key, x, h / 2)
            simpson = h / 6 * (x[0] ** 2 + 4 * ym[0] ** 2 + y[0] ** 2)
            trapezoid = h / 4 * (x[0] ** 2 + 2 * ym[0] ** 2 + y[0] ** 2)
            if abs(simpson - trapezoid) > 1e-2 * simpson + 1e-15:  # Simpson is then within 1e-4 of the step
                simpson = _i2t_fine(run, key, x, h)  # a sharp piece inside the step: integrate it finely
            i2t += simpson
            for tt, v in ((t + h / 2, ym[0]), (t + h, y[0])):
                if abs(v) > peak:
                    peak, t_peak, best = abs(v), tt, (t, key, x[:], 2 * h)
            x, key = y, nk  # an exponential bridge moves to the chord of the new current here
            continue
        # an event inside the step: march it in sub-steps, switching piece where an event falls
        z = x
        for j in range(SUB):
            z1 = run.step(key, z, hs)
            e0, e1 = run.events(key, z), run.events(key, z1)
            if _crossed(e0, e1):
                # the crossing inside the sub-step, by linear interpolation of the event functions
                f = min((a / (a - b) for a, b in zip(e0, e1) if a > 0 >= b), default=1.0)
                z1 = [p + f * (q - p) for p, q in zip(z, z1)]
                nk = run.next_key(key, z1)
                if nk[0] == 0:
                    z1[0] = 0.0
                rest = (1 - f) * hs
                i2t += f * hs / 2 * (z[0] ** 2 + z1[0] ** 2)
                key = nk
                z2 = _matvec(expm(run.matrix(*key), rest), z1) if rest > 0 else z1
                i2t += rest / 2 * (z1[0] ** 2 + z2[0] ** 2)
                z1 = z2
            else:
                i2t += hs / 2 * (z[0] ** 2 + z1[0] ** 2)
                key = run.next_key(key, z1)
            if abs(z1[0]) > peak:
                peak, t_peak, best = abs(z1[0]), t + (j + 1) * hs, (t + j * hs, key, z[:], 2 * hs)
            z = z1
        x = z
    if best is not None:
        peak, t_peak = _refine_peak(run, best, peak, t_peak)
    return Surge(
        peak=peak,
        time_of_peak=t_peak,
        i2t=i2t,
        phase_deg=phase_deg,
        resistor_energy=c.series_resistance * i2t,
        bus_end=run.vbus(key[2], x),
    )


def _i2t_fine(run: _Run, key: Key, x: Vec6, h: float) -> float:
    """∫ i² over one step by Simpson on SUB exact sub-steps (SUB even)."""
    hs = h / SUB
    z = x
    acc = z[0] ** 2
    for j in range(1, SUB + 1):
        z = run.step(key, z, hs)
        acc += (z[0] ** 2) * (1 if j == SUB else (4 if j % 2 else 2))
    return acc * hs / 3


def _refine_peak(
    run: _Run, best: tuple[float, Key, Vec6, float], peak: float, t_peak: float, levels: int = 2
) -> tuple[float, float]:
    """The largest |i| near the sampled maximum: ``span`` from ``t0`` cut into
    2·SUB exact sub-steps, then the two sub-steps around their maximum cut
    again, ``levels`` times (resolution span / SUB^levels; no extrapolation,
    so a sharp turn-on is never overshot)."""
    t0, key, x0, span = best
    for _ in range(levels):
        n = 2 * SUB
        dt = span / n
        z = x0
        samples = [(abs(z[0]), t0, z)]
        for j in range(n):
            z = run.step(key, z, dt)
            samples.append((abs(z[0]), t0 + (j + 1) * dt, z))
        k = max(range(len(samples)), key=lambda m: samples[m][0])
        if samples[k][0] > peak:
            peak, t_peak = samples[k][0], samples[k][1]
        kk = max(k - 1, 0)
        _, t0, x0 = samples[kk]
        span = 2 * dt
    return peak, t_peak


#: Closing phases tried for the worst switch-on: the crest, then 15° steps either side while the I²t grows.
PHASE_STEP = 15.0


def worst_switch_on(c: Circuit, supply: Supply, steps: int = 1000) -> Surge:
    """The closing phase that makes the line I²t worst, by climbing from the
    crest in 15° steps (between 30° and 150°) while it grows; crest closing is
    the usual worst, a large source inductance or a slow RC can move it."""
    memo = active_memo()
    key = ("worst_switch_on", c, supply, steps)
    if memo is not None and key in memo.other:
        hit = memo.other[key]
        assert isinstance(hit, Surge)
        return hit
    best = _worst_switch_on(c, supply, steps)
    if memo is not None:
        Memo.put(memo.other, key, best)
    return best


def _worst_switch_on(c: Circuit, supply: Supply, steps: int) -> Surge:
    runs = {p: switch_on(c, supply, p, steps) for p in (90.0 - PHASE_STEP, 90.0, 90.0 + PHASE_STEP)}
    best = max(runs.values(), key=lambda s: s.i2t)
    direction = 0.0 if best.phase_deg == 90.0 else (1.0 if best.phase_deg > 90.0 else -1.0)
    while direction and 30.0 <= best.phase_deg + direction * PHASE_STEP <= 150.0:
        nxt = switch_on(c, supply, best.phase_deg + direction * PHASE_STEP, steps)
        if nxt.i2t <= best.i2t:
            break
        best = nxt
    return best


def step_closing(c1: float, c2: float, dv: float, resistance: float, inductance: float) -> tuple[float, float]:
    """Closing a discharged capacitor c2 onto c1 charged to dv through a loop
    of ``resistance`` and ``inductance``: peak current and I²t of the series
    RLC discharge (C_eq = c1 c2 / (c1 + c2)); I²t = ½ C_eq ΔV² / R whatever L."""
    ceq = c1 * c2 / (c1 + c2)
    r, ll = max(resistance, 1e-6), max(inductance, 1e-9)
    alpha = r / (2 * ll)
    w0 = 1 / math.sqrt(ll * ceq)
    if alpha < w0:
        wd = math.sqrt(w0 * w0 - alpha * alpha)
        tp = math.atan(wd / alpha) / wd
        peak = dv / (wd * ll) * math.exp(-alpha * tp) * math.sin(wd * tp)
    else:
        # overdamped (or critical): peak of the difference of exponentials
        s = math.sqrt(max(alpha * alpha - w0 * w0, 1e-30))
        s1, s2 = -alpha + s, -alpha - s
        tp = math.log(s2 / s1) / (s1 - s2) if s1 != s2 else 1 / alpha
        peak = dv / (ll * (s1 - s2)) * (math.exp(s1 * tp) - math.exp(s2 * tp))
    return peak, 0.5 * ceq * dv * dv / r
