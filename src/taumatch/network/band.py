"""The band of a frequency response: its -3 dB points, its peaking, and where to look.

* -3 dB bandwidth: a logarithmic sweep brackets the first crossing of
  ``|H| = |H_ref| / sqrt 2``, then the Illinois variant of regula falsi finds it to 1e-12
  relative (:func:`bracketed_root`: no scipy.optimize import on this path).  ``H_ref`` is
  the DC gain, or the passband peak when the response is AC-coupled (no DC path): then the
  lower -3 dB frequency is found too.  AC-coupled means ``H(0) = 0``: ``|H(0)|`` is compared
  with ``|H|`` at the bottom of the sweep (:data:`AC_LEVEL`), which by the sweep's contract
  lies below every feature of the response, so a DC-coupled response is flat there and an
  AC-coupled one falls towards 0; never with the peak, which an undamped resonance can put
  any number of decades above the DC gain.
* Peaking: the largest ``|H| / |H_ref|`` over the sweep (the grid maximum refined by
  golden-section search in ``log f``), in dB, its frequency, and its sharpness ``Q``; 0 dB
  when the response never rises above its reference; no frequency when the maximum is the
  top of the sweep (a high-frequency gain above the DC gain, such as an over-compensated
  divider's).
* :func:`sweep_range`: a frequency range spanning a network's characteristic frequencies
  (the poles and zeros of its one-section lumped model and each line's ``1/delay``,
  ``r/l``, ``g/c``), from 1e-3 of the slowest to 1e3 of the fastest (in Hz).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError

__all__ = ["AC_LEVEL", "Band", "bracketed_root", "find_bandwidth", "sweep_range"]

#: A response is AC-coupled when ``|H(0)|`` is below this fraction of ``|H(f_lo)|``.  The two
#: cases lie far on either side: a DC-coupled response has ``|H(0)|`` within a few per mille
#: of ``|H(f_lo)|`` (f_lo below every feature; less only by the zeros below ``f_lo``), an
#: AC-coupled one 0, or ``f_dc / f_lo`` of it where ``H(0)`` is evaluated at a tiny
#: ``f_dc`` (:data:`taumatch.chain.cascade.DC_POINT`, 1e-20 rad/s).
AC_LEVEL = 1e-9


def bracketed_root(g, a: float, b: float, rtol: float = 1e-12, maxiter: int = 200) -> float:
    """A root of ``g`` in ``[a, b]`` (``g(a)``, ``g(b)`` of opposite sign or zero): regula
    falsi with the Illinois modification, stopped when the bracket is ``rtol`` relative.

    >>> round(bracketed_root(lambda x: x * x - 2, 0.0, 2.0), 12)
    1.414213562373
    """
    a, b = float(a), float(b)
    fa, fb = float(g(a)), float(g(b))
    if fa == 0:
        return a
    if fb == 0:
        return b
    side = 0
    for _ in range(maxiter):
        c = (a * fb - b * fa) / (fb - fa)
        fc = float(g(c))
        if fc == 0:
            return c
        if (fc > 0) == (fb > 0):
            b, fb = c, fc
            if side == -1:
                fa /= 2
            side = -1
        else:
            a, fa = c, fc
            if side == 1:
                fb /= 2
            side = 1
        if abs(b - a) <= rtol * max(abs(a), abs(b)):
            break
    return (a * fb - b * fa) / (fb - fa) if fb != fa else 0.5 * (a + b)


def _golden_max(h, a, b, tol: float = 1e-10, maxiter: int = 200) -> np.ndarray:
    """Where each unimodal ``h`` on ``[a_i, b_i]`` is largest: golden-section search on all
    the brackets at once (``h`` maps an array of ``x`` to an array; one call per step for
    every bracket still open, so a response with many candidate peaks costs one evaluation
    per step, not one per peak and step)."""
    r = (math.sqrt(5.0) - 1) / 2
    a, b = np.array(a, dtype=float), np.array(b, dtype=float)
    c, d = b - r * (b - a), a + r * (b - a)
    hc, hd = h(c), h(d)
    for _ in range(maxiter):
        open_ = ~(np.abs(b - a) <= tol * np.maximum(np.maximum(np.abs(a), np.abs(b)), 1.0))
        if not open_.any():
            break
        left = open_ & (hc >= hd)  # the maximum is in [a, d]: b <- d, d <- c, new c
        right = open_ & ~(hc >= hd)  # in [c, b]: a <- c, c <- d, new d
        b = np.where(left, d, b)
        d, hd = np.where(left, c, d), np.where(left, hc, hd)
        a = np.where(right, c, a)
        c, hc = np.where(right, d, c), np.where(right, hd, hc)
        c = np.where(left, b - r * (b - a), c)
        d = np.where(right, a + r * (b - a), d)
        x = np.where(left, c, d)[open_]
        hx = h(x)
        k = np.nonzero(open_)[0]
        hc[k[left[open_]]] = hx[left[open_]]
        hd[k[right[open_]]] = hx[right[open_]]
    return np.where(hc >= hd, c, d)


@dataclass(frozen=True)
class Band:
    """-3 dB points and peaking of a response.

    Attributes
    ----------
    upper : float
        Upper -3 dB frequency [Hz] (nan if none in the sweep).
    lower : float or None
        Lower -3 dB frequency [Hz] of an AC-coupled response (None when DC-coupled).
    reference : float
        ``|H|`` the -3 dB points are relative to [V/V].
    ac_coupled : bool
    peaking_db : float
        ``20 log10(max |H| / reference)`` [dB], 0 when the response does not peak.
    peak_frequency : float or None
        Where the maximum is [Hz] (None when it does not peak, or when the maximum is at the
        top of the sweep: a high-frequency gain above the reference that does not roll off).
    peak_q : float or None
        Sharpness of the peak: its frequency over the width where ``|H|`` stays above
        ``max |H| / sqrt 2`` (twice the one-sided width where only one side falls that far);
        sets how long the step rings (about ``Q / (pi f)`` per e-fold).
    """

    upper: float
    lower: float | None
    reference: float
    ac_coupled: bool
    peaking_db: float = 0.0
    peak_frequency: float | None = None
    peak_q: float | None = None

    def to_dict(self) -> dict:
        return {"upper": self.upper, "lower": self.lower, "reference": self.reference,
                "ac_coupled": self.ac_coupled, "peaking_db": self.peaking_db,
                "peak_frequency": self.peak_frequency, "peak_q": self.peak_q}


def find_bandwidth(response, f_lo: float, f_hi: float, points_per_decade: int = 40) -> Band:
    """-3 dB points and peaking of ``response(freqs) -> complex array`` between ``f_lo`` and
    ``f_hi`` [Hz], ``f_lo`` below every feature of the response (where a DC-coupled response
    is flat).

    Examples
    --------
    >>> bw = find_bandwidth(lambda f: 1 / (1 + 1j * np.asarray(f) / 1e6), 1e2, 1e10)
    >>> round(bw.upper / 1e6, 9), bw.peaking_db
    (1.0, 0.0)
    """
    n = max(int(points_per_decade * math.log10(f_hi / f_lo)), 20)
    grid = np.logspace(math.log10(f_lo), math.log10(f_hi), n)
    mag = np.abs(response(grid))
    dc = float(np.abs(response(np.array([0.0]))[0]))
    peak = float(mag.max())
    if not peak > 0:
        raise ComputationError("the response is zero at every frequency")
    ac = not dc > AC_LEVEL * float(mag[0])
    ref = peak if ac else dc
    level = ref / math.sqrt(2.0)

    def g(f):
        return float(np.abs(response(np.array([f]))[0])) - level

    start = int(np.argmax(mag)) if ac else 0
    below = np.nonzero(mag[start:] < level)[0]
    upper = math.nan
    if below.size:
        i = start + int(below[0])
        upper = grid[0] if i == 0 else bracketed_root(g, grid[i - 1], grid[i])
    lower = None
    if ac:
        under = np.nonzero(mag[:start] < level)[0]
        if under.size:
            i = int(under[-1])
            lower = bracketed_root(g, grid[i], grid[i + 1])
    peaking, f_peak = 0.0, None
    k = int(np.argmax(mag))
    if not ac and peak > ref * (1 + 1e-9) and k == n - 1:
        peaking = 20 * math.log10(peak / ref)  # still rising at the top: a plateau, no peak
    elif not ac and peak > ref * (1 + 1e-9):
        # every local maximum of the grid near the top is refined: a coarse grid can rank two
        # peaks of similar height the wrong way
        def mag_at(x):
            return np.abs(response(np.exp(x)))

        inner = np.nonzero((mag[1:-1] >= mag[:-2]) & (mag[1:-1] >= mag[2:])
                           & (mag[1:-1] >= 0.7 * peak))[0] + 1
        best, x_best = peak, math.log(grid[k])
        cand = np.array(sorted(set(inner.tolist()) | {k}))
        xs = _golden_max(mag_at, np.log(grid[np.maximum(cand - 1, 0)]),
                         np.log(grid[np.minimum(cand + 1, n - 1)]))
        for x, m in zip(xs.tolist(), mag_at(xs).tolist()):
            if m > best:
                best, x_best = m, x
        f_peak = float(math.exp(x_best))
        peaking = 20 * math.log10(best / ref)
        q_peak = _q(response, f_peak, best)
        return Band(float(upper), lower, ref, bool(ac), float(peaking), f_peak, q_peak)
    return Band(float(upper), lower, ref, bool(ac), float(peaking), f_peak)


def _q(response, f_peak, top):
    """Peak frequency over its half-power width, from a fine grid around the peak."""
    f = f_peak * np.linspace(0.5, 1.5, 801)
    above = np.abs(response(f)) >= top / math.sqrt(2.0)
    c = 400
    lo = c - int(np.argmin(above[c::-1])) if not above[:c + 1].all() else None
    hi = c + int(np.argmin(above[c:])) if not above[c:].all() else None
    if lo is None and hi is None:
        return 1.0
    if lo is None:
        width = 2 * (f[hi] - f_peak)
    elif hi is None:
        width = 2 * (f_peak - f[lo])
    else:
        width = f[hi] - f[lo]
    return float(f_peak / width) if width > 0 else 1.0


def sweep_range(net, source, output) -> tuple[float, float]:
    """Frequency range [Hz] covering ``net``'s characteristic frequencies (see module text)."""
    from .mna import build, dense, source_vector
    from .pencil import descriptor_zpk

    lines = net.lines()
    omegas = []
    for ln in lines:
        omegas.append(1 / ln.delay)
        if ln.r:
            omegas.append(ln.r / ln.l)
        if ln.g:
            omegas.append(ln.g / ln.c)
    st = build(net.elements, sections={ln.name: 1 for ln in lines})
    e, a = dense(st, st.c), -dense(st, st.g)
    b = source_vector(st, source).reshape(-1, 1)
    c = net._output_row(st, output).reshape(1, -1)
    h = descriptor_zpk(e, a, b, c, np.zeros((1, 1))).rational
    omegas.extend(abs(r) for r in np.concatenate([h.poles, h.zeros]) if abs(r) > 0)
    if not omegas:
        return 1.0, 1e9
    omegas = np.array(omegas)
    return float(omegas.min() / (2 * np.pi) * 1e-3), float(omegas.max() / (2 * np.pi) * 1e3)
