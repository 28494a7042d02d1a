"""Synthetic divider captures from the textbook formulas (not from taumatch's own model).

Millman & Taub / Boylestad: the step into a two-arm divider jumps to C1/(C1+C2), settles
at R2/(R1+R2) with τ = (R1‖R2)(C1+C2).  For a square wave of period T (duty 1/2) the
periodic steady state follows from continuity at the edges (own derivation): with
q = e^(−T/2τ), g the DC and h the HF gain, the value just before each rising edge is
x = q·A·(g − h)/(1 + q).

A source edge that is a linear ramp of width w (10–90 % = 0.8·w) gives the running mean of
that response over w, computed exactly from its antiderivative (each plateau is a + b·e^(−t/τ),
whose integral is elementary; own derivation).
"""

import numpy as np


def _plateaus(r1, c1, r2, c2, amplitude, period):
    """(A·g, b, c, τ, q): the upper plateau is A·g + b·e^(−t/τ) from the rising edge, the lower
    c·e^(−(t − T/2)/τ) from the falling one, in the periodic steady state."""
    g = r2 / (r1 + r2)
    h = c1 / (c1 + c2)
    tau = r1 * r2 / (r1 + r2) * (c1 + c2)
    q = np.exp(-period / (2 * tau))
    x = q * amplitude * (g - h) / (1 + q)
    b = x + amplitude * h - amplitude * g
    c = amplitude * g + b * q - amplitude * h
    return amplitude * g, b, c, tau, q


def textbook_square(t, r1, c1, r2, c2, amplitude, period):
    ag, b, c, tau, _ = _plateaus(r1, c1, r2, c2, amplitude, period)
    tm = np.mod(t, period)
    return np.where(tm < period / 2, ag + b * np.exp(-tm / tau),
                    c * np.exp(-(tm - period / 2) / tau))


def textbook_square_integral(t, r1, c1, r2, c2, amplitude, period):
    """∫₀ᵗ of :func:`textbook_square` (V·s), in closed form."""
    ag, b, c, tau, q = _plateaus(r1, c1, r2, c2, amplitude, period)
    high = ag * period / 2 + b * tau * (1 - q)
    whole = high + c * tau * (1 - q)
    n, tm = np.divmod(np.asarray(t, dtype=float), period)
    first = ag * tm + b * tau * -np.expm1(-np.minimum(tm, period / 2) / tau)
    later = high + c * tau * -np.expm1(-(tm - period / 2) / tau)
    return n * whole + np.where(tm < period / 2, first, later)


def capture(c1, *, r1=9e6, r2=1e6, c2=100e-12, amplitude=5.0, period=1e-3, dt=4e-7,
            periods=10, noise=4e-3, offset=0.02, bits=8, span=1.6, seed=0, start=0.37e-4,
            ramp=0.0):
    """(t, v): the textbook square response with noise, offset and quantisation (seeded).

    The converter spans ``span`` volts from −span/4 upwards with ``bits`` bits.  ``ramp``
    (s) is the width of a linear source edge (10–90 % = 0.8·ramp); 0 for an ideal step.
    """
    rng = np.random.default_rng(seed)
    t = np.arange(int(round(periods * period / dt))) * dt
    if ramp > 0:
        ts = t + start + period  # positive times for the antiderivative
        args = (r1, c1, r2, c2, amplitude, period)
        v = (textbook_square_integral(ts, *args) - textbook_square_integral(ts - ramp, *args)) / ramp
    else:
        v = textbook_square(t + start, r1, c1, r2, c2, amplitude, period)
    v = v + offset
    v = v + rng.normal(0.0, noise, t.size)
    if bits:
        lsb = span / 2**bits
        v = np.clip(np.round((v + 0.25 * span) / lsb), 0, 2**bits - 1) * lsb - 0.25 * span
    return t, v


def c1_for_error(error, r1=9e6, r2=1e6, c2=100e-12):
    """Tip capacitance giving hf/dc − 1 = error: C1/(C1+C2) = (1+error)·R2/(R1+R2)."""
    k = (1 + error) * r2 / (r1 + r2)
    return k * c2 / (1 - k)


def write_csv(path, t, v):
    """The capture as a two-column CSV with a header saying it is invented test data."""
    with open(path, "w") as fh:
        fh.write("# invented test capture\nTime (s),CH1 (V)\n")
        np.savetxt(fh, np.column_stack([t, v]), delimiter=",", fmt="%.9g")
    return path
