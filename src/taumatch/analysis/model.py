"""A chain ready for analysis: exact frequency response and closed-form time response.

Frequency domain: the network's exact response (cables by the telegrapher's equations).
Time domain: cables as pi-section ladders; the section count is the smallest that keeps
the ladder within 0.1 % (complex, relative) of the exact response up to
:data:`BANDWIDTH_FACTOR` times the chain's exact -3 dB bandwidth
(:func:`taumatch.network.choose_sections`), at most :data:`MAX_SECTIONS`; when that is
not enough, ``f_max`` is lowered to the band the maximum count holds 0.1 % over.

A ladder of many sections has hundreds of poles spread over decades; their product
overflows a float.  The transfer function is therefore kept in a normalised frequency
``sigma = s / w0`` (``w0`` the largest pole or zero magnitude) as
:class:`ScaledRational`, whose time functions take seconds and hertz.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from ..chain.build import ChainNetwork, build
from ..chain.parts import Chain
from ..errors import ComputationError

__all__ = ["BANDWIDTH_FACTOR", "LINE_TOLERANCE", "MAX_SECTIONS", "ChainModel", "ScaledRational"]

#: The ladder is held to the exact line up to this many times the chain bandwidth.
BANDWIDTH_FACTOR = 3.0
#: Relative complex error allowed for the ladder (0.1 %).
LINE_TOLERANCE = 1e-3
#: Most pi sections per line in the closed form.  A chain that needs more (a long cable
#: with a fast front end) gets this many, and the band where they hold 0.1 % is reported.
MAX_SECTIONS = 200


@dataclass(frozen=True)
class ScaledRational:
    """``H(s) = R(s / w0)``: a :class:`taumatch.lti.Rational` ``R`` in normalised frequency.

    Parameters
    ----------
    rational : Rational
        The function of ``sigma = s / w0``.
    w0 : float
        Frequency scale [rad/s].
    """

    rational: object
    w0: float

    @classmethod
    def from_rational(cls, h, w0: float | None = None) -> ScaledRational:
        """Wrap an ordinary Rational of s [rad/s], normalised by ``w0`` (default: its scale)."""
        from ..lti import Rational

        if w0 is None:
            roots = np.concatenate([h.poles, h.zeros])
            roots = np.abs(roots[np.abs(roots) > 0])
            w0 = float(np.exp(np.mean(np.log(roots)))) if roots.size else 1.0
        k = len(h.poles) - len(h.zeros)
        return cls(Rational.from_zpk(h.zeros / w0, h.poles / w0, h.gain * w0 ** (-k)), w0)

    @property
    def poles(self) -> np.ndarray:
        """Poles [rad/s]."""
        return self.rational.poles * self.w0

    @property
    def zeros(self) -> np.ndarray:
        """Zeros [rad/s]."""
        return self.rational.zeros * self.w0

    @property
    def dc_gain(self) -> float:
        return self.rational.dc_gain

    @property
    def hf_gain(self) -> float:
        return self.rational.hf_gain

    def __call__(self, s):
        return self.rational(np.asarray(s, dtype=complex) / self.w0)

    def freqresp(self, f):
        """``H(j 2 pi f)``, ``f`` in Hz."""
        return self.rational.freqresp(np.asarray(f, dtype=float) / self.w0)

    def __mul__(self, other: ScaledRational) -> ScaledRational:
        from ..lti import Rational

        o = other.rational
        if other.w0 != self.w0:
            k = len(o.poles) - len(o.zeros)
            r = other.w0 / self.w0
            o = Rational.from_zpk(o.zeros * r, o.poles * r, o.gain * r ** (-k))
        return ScaledRational(self.rational * o, self.w0)

    @cached_property
    def _step_function(self):
        # R(sigma)/sigma once, so that its partial fractions are computed once (Rational.step
        # builds the product anew at every call)
        from ..lti import Rational

        return self.rational * Rational.from_zpk([], [0.0], 1.0)

    def step(self, t):
        """Unit-step response at ``t`` [s]."""
        return self._step_function.impulse(np.asarray(t, dtype=float) * self.w0)

    def impulse(self, t):
        """Impulse response [1/s] at ``t`` [s] (regular part)."""
        return self.rational.impulse(np.asarray(t, dtype=float) * self.w0) * self.w0

    def sine(self, t, frequency: float, phase: float = 0.0):
        """Response to ``sin(2 pi f t + phase) u(t)``; ``t`` [s], ``frequency`` [Hz]."""
        return self.rational.sine(np.asarray(t, dtype=float) * self.w0,
                                  frequency / self.w0, phase)

    def square(self, t, period: float, duty: float = 0.5, low: float = 0.0, high: float = 1.0):
        """Periodic steady state for a square wave of ``period`` [s] rising at ``t = 0``."""
        return self.rational.square(np.asarray(t, dtype=float) * self.w0, period * self.w0,
                                    duty, low, high)

    def checks(self):
        """The lti hand checks (times and frequencies in the normalised units ``1/w0``)."""
        return self.rational.checks()


def _scaled_transfer(net, source: str, output: str, sections) -> ScaledRational:
    """Transfer function of the lumped network, normalised by its largest root.

    Poles and zeros come from the network's descriptor pencil; the gain is fixed from the
    lumped network's own response at one point (DC, or a passband frequency when the DC
    gain is zero), summed in logarithms so that hundreds of poles cannot overflow.
    """
    from ..lti import Rational
    from ..network import descriptor_zpk

    d = net.descriptor(source, output, line_sections=sections)
    with np.errstate(over="ignore"):  # the unscaled gain may overflow; it is not used
        z = descriptor_zpk(d.E, d.A, d.B, d.C, d.D)
    poles, zeros = np.asarray(z.poles, complex), np.asarray(z.zeros, complex)
    roots = np.abs(np.concatenate([poles, zeros]))
    roots = roots[roots > 0]
    w0 = float(roots.max()) if roots.size else 1.0
    kw = {} if sections is None else {"line_sections": sections}
    h_dc = net.response(np.array([0.0]), source, output, **kw)[0]
    f1 = 0.0
    if not (np.isfinite(h_dc) and abs(h_dc) > 0):
        lo = float(roots.min()) if roots.size else 1.0
        f1 = math.sqrt(lo * w0) / (2 * math.pi)
        h_dc = net.response(np.array([f1]), source, output, **kw)[0]
    if not (np.isfinite(h_dc) and abs(h_dc) > 0):
        raise ComputationError(f"the response from {source} to {output} is zero")
    x = 2j * math.pi * f1 / w0
    with np.errstate(divide="ignore"):
        logk = (np.log(complex(h_dc)) + np.sum(np.log(x - poles / w0))
                - np.sum(np.log(x - zeros / w0)))
    k = complex(np.exp(logk))
    if not (np.isfinite(k) and k != 0):
        raise ComputationError(
            f"transfer function from {source} to {output} is out of float range "
            f"({len(poles)} poles); use fewer line sections"
        )
    return ScaledRational(Rational.from_zpk(zeros / w0, poles / w0, k.real), w0)


def _ladder_error(net, source, output, n: int, f_max: float) -> float:
    from ..network.sections import check_freqs

    f = check_freqs(f_max)
    h = net.response(f, source, output)
    hn = net.response(f, source, output, line_sections=n)
    ref = np.maximum(np.abs(h), 1e-9 * np.max(np.abs(h)))
    return float(np.max(np.abs(hn - h) / ref))


def _sections_for(net, source, output, f_max: float):
    """Section count, its error and the band it holds over (see :data:`MAX_SECTIONS`)."""
    from ..network import choose_sections

    try:
        choice = choose_sections(net, source, output, f_max=f_max, tol=LINE_TOLERANCE)
        if choice.sections <= MAX_SECTIONS:
            return choice.sections, choice.error, f_max
    except ComputationError:
        pass
    # too many sections for a closed form: use MAX_SECTIONS and find the band they hold
    n = MAX_SECTIONS
    lo, hi = math.log(f_max / 1e4), math.log(f_max)
    if _ladder_error(net, source, output, n, math.exp(lo)) > LINE_TOLERANCE:
        return n, _ladder_error(net, source, output, n, f_max), f_max
    for _ in range(20):
        mid = 0.5 * (lo + hi)
        if _ladder_error(net, source, output, n, math.exp(mid)) <= LINE_TOLERANCE:
            lo = mid
        else:
            hi = mid
    return n, _ladder_error(net, source, output, n, math.exp(lo)), math.exp(lo)


def sweep_range(*roots_sets) -> tuple[float, float]:
    """A frequency range [Hz] spanning ``1e-3`` of the slowest to ``1e3`` of the fastest root."""
    mags = np.concatenate([np.abs(np.asarray(r, dtype=complex)) for r in roots_sets])
    mags = mags[mags > 0]
    if not mags.size:
        return 1.0, 1e9
    return float(mags.min() / (2 * math.pi) * 1e-3), float(mags.max() / (2 * math.pi) * 1e3)


@dataclass(frozen=True)
class ChainModel:
    """A chain with its network, exact response and closed-form transfer function.

    Build with :meth:`from_chain`.  Everything is computed once.

    Attributes
    ----------
    chain : Chain
    built : ChainNetwork
        The ``"full"`` build without the source edge (the chain's own response).
    network : Network
    sections : int
        Pi sections per line in the time domain (0 when the chain has no line).
    section_error : float or None
        The ladder's relative error against the exact response up to ``f_max``.
    f_max : float or None
        Band the ladder is held to [Hz].
    transfer : ScaledRational
        Source to output, ideal step behind the source resistance.
    edge : ScaledRational or None
        The source edge filter ``1/(1 + s tau)``, ``tau = rise_time / ln 9``.
    """

    chain: Chain
    built: ChainNetwork
    network: object
    sections: int
    section_error: float | None
    f_max: float | None
    transfer: ScaledRational
    edge: ScaledRational | None
    bandwidth_hint: float = field(default=float("nan"))  # exact -3 dB [Hz] if computed

    @classmethod
    def from_chain(cls, chain: Chain, *, sections: int | None = None) -> ChainModel:
        """Build the network, choose the section count and find the transfer function.

        Parameters
        ----------
        chain : Chain
        sections : int, optional
            Force a section count instead of choosing it.
        """
        from ..lti import Rational

        built = build(chain, "full", edge=False)
        net = built.network()
        error = f_max = None
        bw = float("nan")
        if not built.lines():
            n = 0
            h = _scaled_transfer(net, built.source, built.output, None)
        else:
            lumped = _scaled_transfer(net, built.source, built.output, 1)
            lo, hi = sweep_range(lumped.poles, lumped.zeros,
                                 [1 / ln.delay for ln in built.lines()])
            from .bandwidth import find_bandwidth

            resp = lambda f: net.response(f, built.source, built.output)
            bw = find_bandwidth(resp, lo, hi).upper
            f_max = BANDWIDTH_FACTOR * bw if np.isfinite(bw) else hi / 1e3
            if sections is None:
                n, error, f_max = _sections_for(net, built.source, built.output, f_max)
            else:
                n = int(sections)
                error = _ladder_error(net, built.source, built.output, n, f_max)
            h = _scaled_transfer(net, built.source, built.output, n)
        edge = None
        tau = chain.source.edge_time_constant
        if tau is not None:
            edge = ScaledRational(Rational.from_zpk([], [-1.0 / (tau * h.w0)], 1.0 / (tau * h.w0)),
                                  h.w0)
        return cls(chain, built, net, n, error, f_max, h, edge, bw)

    @property
    def displayed(self) -> ScaledRational:
        """Transfer function including the source edge (what the instrument shows)."""
        return self.transfer if self.edge is None else self.transfer * self.edge

    def response(self, freqs, *, with_edge: bool = False) -> np.ndarray:
        """Exact frequency response at ``freqs`` [Hz] (lines exact)."""
        h = self.network.response(freqs, self.built.source, self.built.output)
        if with_edge and self.edge is not None:
            h = h * self.edge.freqresp(freqs)
        return h

    def sweep(self) -> tuple[float, float]:
        """Frequency range [Hz] that covers the chain's poles and zeros."""
        extra = [1 / ln.delay for ln in self.built.lines()]
        return sweep_range(self.transfer.poles, self.transfer.zeros, extra)
