"""Tolerance studies: worst-case corners and a seeded Monte Carlo study.

Corners: every combination of low/high mains, dropper capacitance, module Vf
and temperature, each solved exactly. Monte Carlo: the LED current and the
hottest part's stress over random parts and mains, evaluated on a reduced
model (a quadratic response surface in the four variables, fitted to 25 exact
solves: the corners, the face centres and the centre) and checked against the
exact solver on fresh random samples; the error it costs is reported beside
the result. Everything is reproducible from the seed.
"""

from __future__ import annotations

import itertools
import math
import random
from dataclasses import dataclass
from typing import Any

from .design import Design
from .steady import solve

VARS = ("mains", "capacitance", "vf", "temperature")


@dataclass(frozen=True)
class Box:
    lo: tuple[float, float, float, float]
    hi: tuple[float, float, float, float]

    def at(self, u: tuple[float, ...]) -> tuple[float, ...]:
        """Point at normalised coordinates u in [-1, 1]^4."""
        return tuple(a + (b - a) * (x + 1) / 2 for a, b, x in zip(self.lo, self.hi, u))


def box_of(d: Design) -> Box:
    _, vlo, vhi = d.mains_band()
    tol = float(d.get("dropper", "tolerance") or 0.0) if not d.is_cv else 0.0
    from .review import Context

    ctx = Context(d)
    return Box((vlo, 1 - tol, -1.0, ctx.t_cold), (vhi, 1 + tol, 1.0, ctx.t_hot))


def _exact(d: Design, p: tuple[float, ...]) -> tuple[float, float]:
    """LED current and the hottest part's stress (string current over the
    module's maximum) at one point of the box."""
    imax = float(d.values["module"]["current_max"])
    if d.is_cv:
        from .check import _cv_point

        r = _cv_point(d, p[0], p[2], p[3])
        return r["led_current_avg_A"], r["string_current_avg_A"] / imax
    st = solve(d.circuit(mains_voltage=p[0], dropper_scale=p[1], vf_corner=p[2], temperature=p[3]))
    return st.led_current.avg, max(s.avg for s in st.string_current) / imax


def _terms(u: tuple[float, ...]) -> list[float]:
    out = [1.0, *u]
    for i in range(4):
        for j in range(i, 4):
            out.append(u[i] * u[j])
    return out


def _lstsq(rows: list[list[float]], ys: list[float]) -> list[float]:
    n = len(rows[0])
    a = [[sum(r[i] * r[j] for r in rows) for j in range(n)] for i in range(n)]
    b = [sum(r[i] * y for r, y in zip(rows, ys)) for i in range(n)]
    for k in range(n):  # Gaussian elimination with partial pivoting
        piv = max(range(k, n), key=lambda r: abs(a[r][k]))
        a[k], a[piv], b[k], b[piv] = a[piv], a[k], b[piv], b[k]
        if abs(a[k][k]) < 1e-300:
            continue
        for r in range(k + 1, n):
            f = a[r][k] / a[k][k]
            if f:
                for c in range(k, n):
                    a[r][c] -= f * a[k][c]
                b[r] -= f * b[k]
    x = [0.0] * n
    for k in range(n - 1, -1, -1):
        s = b[k] - sum(a[k][c] * x[c] for c in range(k + 1, n))
        x[k] = s / a[k][k] if abs(a[k][k]) > 1e-300 else 0.0
    return x


def _eval(coef: list[float], u: tuple[float, ...]) -> float:
    return sum(c * t for c, t in zip(coef, _terms(u)))


def _percentile(xs: list[float], q: float) -> float:
    s = sorted(xs)
    k = (len(s) - 1) * q
    lo, hi = math.floor(k), math.ceil(k)
    return s[lo] + (s[hi] - s[lo]) * (k - lo)


def _sample(rng: random.Random) -> tuple[float, ...]:
    """Normalised sample: mains uniform over its band; capacitance and Vf
    normal with the tolerance as 3 sigma, clipped to the band; temperature
    uniform between cold and hot."""

    def clipped() -> float:
        return max(-1.0, min(1.0, rng.gauss(0.0, 1 / 3)))

    return (rng.uniform(-1, 1), clipped(), clipped(), rng.uniform(-1, 1))


def study(d: Design, samples: int | None = None, seed: int | None = None, check: int = 12) -> dict[str, Any]:
    box = box_of(d)
    n = int(samples if samples is not None else d.get("review", "samples"))
    sd = int(seed if seed is not None else d.get("review", "seed"))
    corners = list(itertools.product((-1.0, 1.0), repeat=4))
    faces = [tuple(float(s) if i == k else 0.0 for i in range(4)) for k in range(4) for s in (-1, 1)]
    design_pts = [*corners, *faces, (0.0, 0.0, 0.0, 0.0)]
    exact = [_exact(d, box.at(u)) for u in design_pts]
    rows = [_terms(u) for u in design_pts]
    coef_i = _lstsq(rows, [e[0] for e in exact])
    coef_s = _lstsq(rows, [e[1] for e in exact])
    rng = random.Random(sd)
    us = [_sample(rng) for _ in range(n)]
    cur = [_eval(coef_i, u) for u in us]
    stress = [_eval(coef_s, u) for u in us]
    # what the reduced model costs: fresh samples through the exact solver
    vrng = random.Random(sd + 7919)
    errs = []
    for _ in range(check):
        u = _sample(vrng)
        e = _exact(d, box.at(u))
        errs.append(abs(_eval(coef_i, u) / e[0] - 1) if e[0] > 0 else 0.0)
    ci = [e[0] for e in exact[: len(corners)]]
    lo_c, hi_c = min(ci), max(ci)
    worst = corners[ci.index(hi_c)]
    bins = 20
    a, b = min(cur), max(cur)
    width = (b - a) / bins or 1.0
    hist = [0] * bins
    for x in cur:
        hist[min(bins - 1, int((x - a) / width))] += 1
    names = [("low" if w < 0 else "high") for w in worst]
    return {
        "seed": sd, "samples": n, "variables": list(VARS),
        "box": {"low": list(box.lo), "high": list(box.hi)},
        "corners": {"led_current_min_A": lo_c, "led_current_max_A": hi_c,
                    "worst_corner": dict(zip(VARS, names, strict=True))},
        "led_current_A": {"p1": _percentile(cur, 0.01), "p50": _percentile(cur, 0.5), "p99": _percentile(cur, 0.99),
                          "min": a, "max": b},
        "stress": {"name": "string current / module maximum", "p1": _percentile(stress, 0.01), "p50": _percentile(stress, 0.5),
                   "p99": _percentile(stress, 0.99), "max": max(stress)},
        "histogram": {"low_A": a, "bin_A": width, "counts": hist},
        "reduced_model": {"kind": "quadratic response surface, 25 exact solves", "checked_samples": check,
                          "max_relative_error": max(errs) if errs else 0.0},
        "exact_solves": len(design_pts) + check,
    }  # fmt: skip
