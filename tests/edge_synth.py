"""Synthetic fast-edge captures by a path independent of taumatch's chain model.

* The chain's transfer function from ABCD (chain) matrices written here (own derivation,
  the usual two-port algebra): a series impedance ``Z`` is ``[[1, Z], [0, 1]]``, a shunt
  admittance ``Y`` is ``[[1, 0], [Y, 1]]``, a uniform line of length ``d`` is
  ``[[cosh γd, Z0 sinh γd], [sinh γd / Z0, cosh γd]]`` with ``γ = √((r + s l)(g + s c))``,
  ``Z0 = √((r + s l)/(g + s c))`` (telegrapher's equations; Pozar, "Microwave Engineering").
  ``V_out / V_s = 1 / (A + C R_s)`` for the cascade's ``A``, ``C`` with the source resistance
  in front (open end).  The lead's inductance is Grover's straight-wire formula written out
  here (F. W. Grover, "Inductance Calculations", ``shared/CHECKS.md``).  The front end's
  natural frequency is found here by root-finding so that ``|H| = 1/√2`` at its bandwidth,
  not taken from taumatch.
* The step from that response by an inverse transform of our own: the Fourier series on a
  damped contour summed by FFT (Dubner & Abate, J. ACM 15, 115, 1968), here with no
  asymptote taken out and many terms (the source edge and the front end make ``H(s)/s`` fall
  as ``1/s⁴``, so the plain series converges), on a grid of the capture's own spacing.
* Quantisation: ``bits`` bits over a full scale, ``averages`` acquisitions each with
  Gaussian noise of ``noise_codes`` codes, rounded to codes and averaged (what an
  oscilloscope's averaging mode records), seeded.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq, least_squares

BESSEL_ZETA = math.sqrt(3.0) / 2.0  # second-order Bessel (maximally flat delay) damping


def grover(length, radius):
    return 0.2e-6 * length * (math.log(2 * length / radius) - 0.75)


def front_end(bandwidth, response):
    """``H(s)`` of a front end with ``|H| = 1/√2`` at ``bandwidth`` [Hz]."""
    w3 = 2 * math.pi * bandwidth
    if response == "single-pole":
        return lambda s: w3 / (s + w3)
    zeta = 1.0 if response == "two-pole" else BESSEL_ZETA

    def h(s, w):
        return w * w / (s * s + 2 * zeta * w * s + w * w)

    w = brentq(lambda w: abs(h(1j * w3, w)) - 1 / math.sqrt(2), 0.3 * w3, 10 * w3, xtol=1e-6)
    return lambda s: h(s, w)


def transfer(chain, s):
    """``V_out / V_s`` of ``chain`` (taumatch parts read as plain data) at complex ``s``."""
    s = np.asarray(s, dtype=complex)
    one, zero = np.ones_like(s), np.zeros_like(s)
    m = [one, zero, zero, one]  # A B C D

    def times(a, b, c, d):
        m[0], m[1], m[2], m[3] = (m[0] * a + m[1] * c, m[0] * b + m[1] * d,
                                  m[2] * a + m[3] * c, m[2] * b + m[3] * d)

    def par_y(r, c):
        return (0 if r is None else 1 / r) + (0 if c is None else s * c)

    for p in chain.parts:
        kind = p.kind
        if kind == "lead":
            times(one, p.r + s * grover(p.length, p.radius), zero, one)
        elif kind == "series":
            z = zero if p.l is None else s * p.l
            if p.r is not None or p.c is not None:
                z = z + 1 / par_y(p.r, p.c)
            times(one, z, zero, one)
        elif kind in ("shunt", "input"):
            y = par_y(p.r, p.c) + zero
            if kind == "shunt" and p.branch is not None:
                y = y + 1 / (p.branch.r + 1 / (s * p.branch.c))
            if kind == "shunt" and p.l is not None:
                y = y + 1 / (s * p.l)
            times(one, zero, y, one)
        elif kind == "line":
            zs, yp = p.r + s * p.l, p.g + s * p.c
            gd = np.sqrt(zs * yp) * p.length
            z0 = np.sqrt(zs / yp)
            times(np.cosh(gd), z0 * np.sinh(gd), np.sinh(gd) / z0, np.cosh(gd))
        else:
            raise ValueError(f"no {kind} in this reference")
    h = 1 / (m[0] + m[2] * chain.source.resistance)
    inp = chain.parts[-1]
    if inp.bandwidth is not None:
        h = h * front_end(inp.bandwidth, inp.response)(s)
    if chain.source.rise_time is not None:
        h = h / (1 + s * chain.source.rise_time / math.log(9.0))
    return h


def step(chain, dt, t_end):
    """``(t, g)``: the unit step of ``chain`` on ``0, dt, ... <= t_end`` (see the module)."""
    big_t = 4.0 * t_end  # period 2T of the series: the window is the first eighth
    gamma = 11.5 / (2 * big_t)  # alias weight exp(-2 gamma T) = 1e-5 ... on a decaying period
    n = 1 << math.ceil(math.log2(2 * big_t / dt))
    k = np.arange(n)
    s = gamma + 1j * k * math.pi / big_t
    s[0] = gamma
    f = transfer(chain, s) / s
    f[0] = f[0] / 2
    series = np.fft.ifft(f) * n
    t = np.arange(n) * (2 * big_t / n)
    g = np.exp(gamma * t) / big_t * series.real
    keep = t <= t_end + 1e-15
    return t[keep], g[keep]


def capture(chain, *, dt=50e-12, pre=400, post=3600, t_edge=1e-9, amplitude=2.0,
            full_scale=0.3, bits=8, noise_codes=1.0, averages=64, seed=0):
    """``(t, v)``: an averaged, quantised fast-edge capture of ``chain`` (seeded).

    The source steps by ``amplitude`` volts at ``t_edge``; the converter spans
    ``-full_scale/8 .. 7 full_scale/8``.
    """
    rng = np.random.default_rng(seed)
    t_grid, g = step(chain, dt / 4, (post + 1) * dt)
    t = (np.arange(-pre, post)) * dt
    y = amplitude * np.interp(t - t_edge, t_grid, g, left=0.0)
    code = full_scale / 2**bits
    lo = -full_scale / 8
    acc = np.zeros_like(t)
    for _ in range(averages):
        raw = np.round((y + rng.normal(0.0, noise_codes * code, t.size) - lo) / code)
        acc += np.clip(raw, 0, 2**bits - 1) * code + lo
    return t, acc / averages


def flat_window(chain, dt=20e-12, t_end=200e-9, start=5, end=100):
    """The flat window ``(t90, t_settled, t_end)`` of ``chain``'s own step: from its 90 %
    instant; from ``start`` to ``end`` time constants (10–90 % over ln 9) after its 50 %
    instant; plus the step ``(t, g)`` (levels by the mean of the window's late part)."""
    t, g = step(chain, dt, t_end)
    level = np.mean(g[(t > 0.5 * t_end) & (t < t_end)])
    x = g / level

    def cross(f):
        i = int(np.argmax(x >= f))
        return t[i - 1] + (f - x[i - 1]) * dt / (x[i] - x[i - 1])

    t10, t50, t90 = cross(0.1), cross(0.5), cross(0.9)
    tau = (t90 - t10) / math.log(9.0)
    return (t90, t50 + start * tau, t50 + end * tau), tau


def aberration(chain, window, dt=25e-12):
    """RMS-aberration residual of ``chain``'s step over ``window`` (the module's definition
    in taumatch's docs: overshoot only before ``t_settled``, both ways after)."""
    t, g = step(chain, dt, window[2] * 1.05)
    late = (t >= window[1]) & (t <= window[2])
    early = (t >= window[0]) & (t < window[1])
    level = np.mean(g[late])
    return np.concatenate([np.maximum(g[early] - level, 0), g[late] - level]) / level


def true_targets(chain, fields, window):
    """The values of ``fields`` ((part number, name) pairs) minimising the aberration of
    ``chain``'s step over ``window`` (scipy's least squares on the logarithms)."""
    start = [chain.parts[k - 1].value_of(n) for k, n in fields]

    def at(x):
        ch = chain
        for (k, n), v0, xi in zip(fields, start, x):
            ch = ch.with_value(k, n, v0 * math.exp(xi))
        return ch

    sol = least_squares(lambda x: aberration(at(x), window), np.zeros(len(fields)),
                        diff_step=1e-3, xtol=1e-10, ftol=1e-12)
    return [v0 * math.exp(xi) for v0, xi in zip(start, sol.x)], at(sol.x)
