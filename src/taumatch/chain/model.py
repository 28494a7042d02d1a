"""``ChainModel``: one chain, built once, and everything the analyses ask of it, cached.

* the networks (:func:`taumatch.chain.build.build`: full, with the source edge, load, trim),
  each built on first use and then kept;
* the exact response (:class:`~taumatch.chain.cascade.Cascade`: cables by the telegrapher's
  equations) at the output, at the probe point, and the impedance the circuit sees;
* the frequency range that covers the chain (:func:`taumatch.network.sweep_range`) and its
  band: -3 dB points and peaking, found once (:func:`taumatch.network.find_bandwidth`);
* the exact step responses (:mod:`taumatch.network.inverse_laplace`) of the chain itself,
  of what the instrument shows (source edge included) and at the probe point, over a fast
  window sized from the band (and the cables' delays) and, while the response has not
  settled, longer windows up to the chain's slowest feature;
* the section count of the cables, chosen once (:func:`taumatch.network.choose_sections`,
  0.1 % up to three times the bandwidth, at most
  :data:`~taumatch.network.sections.MAX_SECTIONS`), and with it the transfer function as a
  :class:`taumatch.lti.Rational` where poles are the answer (closed forms, the dominant pole
  pair, the prediction of square and sine responses);
* the time and frequency windows of plots, predictions and netlists.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from .build import build
from .cascade import Cascade
from .parts import Chain

__all__ = ["LINE_TOLERANCE", "ChainModel", "StepResponse"]

#: Relative complex error allowed for the cable ladders (0.1 %).
LINE_TOLERANCE = 1e-3
#: Settling band the windows are extended for (fraction of the final value).
SETTLE_BAND = 0.02


@dataclass(frozen=True)
class StepResponse:
    """An exact step response on one or more windows.

    Attributes
    ----------
    t, y : ndarray
        Times [s] and the response to a unit step [V/V].
    final : float
        The final value, ``H(0)`` [V/V].
    error : float
        Largest stated error of the inversion over the windows [V/V].
    converged : bool
        Whether every window met its truncation target.
    resolution : float
        Sample spacing of the first window [s].
    t_fast : float
        End of the first (unblurred) window [s]; later samples are blurred by about
        ``t / 2000``.
    jump : float
        ``y(0+)``: the step's jump at ``t = 0`` (the initial-value theorem) [V/V].
    """

    t: np.ndarray
    y: np.ndarray
    final: float
    error: float
    converged: bool
    resolution: float
    t_fast: float
    jump: float = 0.0


@dataclass(frozen=True, eq=False)
class ChainModel:
    """A chain and what every analysis needs of it, computed once (see the module text).

    Parameters
    ----------
    chain : Chain
    forced_sections : int, optional
        A section count for the cables instead of the automatic one.
    step_tol : float
        Truncation target of the step inversions, relative to the step's size (1e-6; a
        search over many changed chains may ask less).
    """

    chain: Chain
    forced_sections: int | None = None
    step_tol: float = 1e-6

    @classmethod
    def from_chain(cls, chain: Chain, *, sections: int | None = None) -> ChainModel:
        """The model of ``chain`` (``sections`` forces the cables' section count)."""
        return cls(chain, sections)

    # ------------------------------------------------------------------ networks
    @cached_property
    def built(self):
        """The full build without the source edge (the chain's own response)."""
        return build(self.chain, "full", edge=False)

    @cached_property
    def built_with_edge(self):
        """The full build with the source edge (what the instrument shows)."""
        return build(self.chain, "full", edge=True)

    @cached_property
    def network(self):
        return self.built.network()

    @cached_property
    def cascade(self) -> Cascade:
        return Cascade(self.chain)

    @property
    def has_lines(self) -> bool:
        return bool(self.built.lines())

    # ------------------------------------------------------------------ exact responses
    def response(self, freqs, *, with_edge: bool = False, at: str = "output") -> np.ndarray:
        """Exact response at ``freqs`` [Hz] (``at="probe"``: at the probe point)."""
        return self.cascade.response(freqs, at=at, edge=with_edge)

    def impedance(self, freqs, after: int = 0) -> np.ndarray:
        """Impedance [ohm] towards the instrument at the node after part ``after`` (0: the
        probe point, the circuit's view of the probe), ``freqs`` in Hz."""
        return self.cascade.impedance(2j * np.pi * np.asarray(freqs, dtype=float), after)

    @cached_property
    def dc_gain(self) -> float:
        """``H(0)`` [V/V]."""
        return float(self.response(np.array([0.0]))[0].real)

    @cached_property
    def sweep(self) -> tuple[float, float]:
        """Frequency range [Hz] covering the chain's characteristic frequencies: from 1e-3 of
        the slowest to 1e3 of the fastest of ``1/(R C)``, ``R/L`` and ``1/sqrt(L C)`` over
        every pair of element values of the build, and each line's ``1/delay``, ``r/l``,
        ``g/c`` (no eigenvalue problem: these bound the poles and zeros loosely, and a
        wider sweep costs only points)."""
        from ..network import elements as el

        rs, cs, ls, omegas = [], [], [], []
        for e in self.built.elements:
            if isinstance(e, (el.Resistor, el.Conductance)):
                rs.append(e.value if isinstance(e, el.Resistor) else 1 / e.value)
            elif isinstance(e, el.Capacitor):
                cs.append(e.value)
            elif isinstance(e, el.Inductor):
                ls.append(e.value)
            elif isinstance(e, el.Line):
                omegas.append(1 / e.delay)
                omegas += [e.r / e.l] if e.r else []
                omegas += [e.g / e.c] if e.g else []
                ls.append(e.l * e.length)
                cs.append(e.c * e.length)
        r, c, l = (np.array(v, dtype=float) for v in (rs, cs, ls))
        with np.errstate(divide="ignore", over="ignore"):
            if r.size and c.size:
                omegas += list(np.ravel(1 / np.outer(r, c)))
            if r.size and l.size:
                omegas += list(np.ravel(np.outer(r, 1 / l)))
            if l.size and c.size:
                omegas += list(np.ravel(1 / np.sqrt(np.outer(l, c))))
        w = np.array(omegas, dtype=float)
        w = w[np.isfinite(w) & (w > 0)]
        if not w.size:
            return 1.0, 1e9
        return float(w.min() / (2 * np.pi) * 1e-3), float(w.max() / (2 * np.pi) * 1e3)

    @cached_property
    def band(self):
        """-3 dB points and peaking of the exact response (:class:`taumatch.network.Band`)."""
        from ..errors import ComputationError
        from ..network import find_bandwidth

        try:
            return find_bandwidth(self.response, *self.sweep)
        except ComputationError as exc:
            raise ComputationError(f"{self.chain.origin}: {exc}") from None

    @property
    def bandwidth(self) -> float:
        """Upper -3 dB frequency [Hz] (nan when there is none)."""
        return self.band.upper

    @cached_property
    def view_range(self) -> tuple[float, float]:
        """Frequency range [Hz] worth showing: from 1e-2 of the slowest feature to 1e2 of the
        band edge (the bandwidth or the resonance, whichever is higher), within the sweep."""
        lo, hi = self.sweep
        band = self.band
        edge = max([f for f in (band.upper, band.peak_frequency) if f and math.isfinite(f)]
                   or [hi / 1e3])
        return max(lo, self.slowest_feature / 100), min(hi, 100 * edge)

    @cached_property
    def slowest_feature(self) -> float:
        """The lowest frequency [Hz] at which the response departs from its DC value by 1e-3
        (of the larger of the two): where the step's slowest settling lives."""
        lo, hi = self.sweep
        f = np.logspace(math.log10(lo), math.log10(hi), 400)
        h = self.response(f)
        h0 = self.dc_gain
        off = np.abs(h - h0) > 1e-3 * np.maximum(abs(h0), np.abs(h))
        return float(f[np.argmax(off)]) if off.any() else float(hi)

    def _fast_window(self, with_edge: bool) -> float:
        band = self.band
        hi = self.sweep[1]
        f_ref = band.upper if math.isfinite(band.upper) else hi / 1e3
        t = 40.0 / (2 * math.pi * f_ref)
        if band.peak_frequency:
            q = max(band.peak_q or 1.0, 1.0)
            t = max(t, 6 * q / (math.pi * band.peak_frequency))
        delays = sum(ln.delay for ln in self.built.lines())
        t = max(t, 20 * delays)
        src = self.chain.source
        if with_edge and src.rise_time is not None:
            t = max(t, 10 * src.rise_time)
        return t

    def _step(self, transfer, with_edge: bool, final: float) -> StepResponse:
        from ..network.inverse_laplace import step_response

        scale = 2 * math.pi * self.sweep[1] / 1e3
        t_end = self._fast_window(with_edge)
        band = self.band
        f_band = max([f for f in (band.upper, band.peak_frequency) if f and math.isfinite(f)]
                     or [self.sweep[1] / 1e3])
        r = step_response(transfer, t_end, scale=scale, band=f_band, tol=self.step_tol)
        ts, ys = [r.t], [r.y]
        error, converged = r.error, r.converged
        t_max = max(10.0 / (2 * math.pi * self.slowest_feature), t_end)
        if with_edge and self.chain.source.rise_time is not None:
            t_max = max(t_max, 10 * self.chain.source.rise_time)
        while t_end < t_max and not _settled(ys[-1], final):
            t_next = min(t_end * 16, t_max * 1.01)
            w = step_response(transfer, t_next, scale=scale, smooth=t_next / 2000,
                              n_max=1 << 14, band=min(f_band, 2000 / t_next),
                              tol=self.step_tol)
            keep = w.t > t_end
            ts.append(w.t[keep])
            ys.append(w.y[keep])
            error, converged = max(error, w.error), converged and w.converged
            t_end = t_next
        return StepResponse(np.concatenate(ts), np.concatenate(ys), final, error, converged,
                            float(r.t[1] - r.t[0]), float(r.t[-1]), r.jump)

    @cached_property
    def step(self) -> StepResponse:
        """Exact unit step of the chain itself (ideal source edge)."""
        c = self.cascade
        return self._step(lambda s: c.transfer(s), False, self.dc_gain)

    @cached_property
    def displayed_step(self) -> StepResponse:
        """Exact unit step the instrument shows (the source edge included)."""
        c = self.cascade
        return self._step(lambda s: c.transfer(s, edge=True), True, self.dc_gain)

    @cached_property
    def probe_step(self) -> StepResponse:
        """Exact unit step at the probe point, source edge included."""
        c = self.cascade
        final = float(c.transfer(np.array([0.0]), at="probe")[0].real)
        return self._step(lambda s: c.transfer(s, at="probe", edge=True), True, final)

    # ------------------------------------------------------------------ ladder and poles
    @cached_property
    def section_choice(self):
        """The cables' section count and the band it holds over (None without cables)."""
        from ..network import choose_sections
        from ..network.sections import BANDWIDTH_FACTOR, SectionChoice, check_freqs, ladder_error

        if not self.has_lines:
            return None
        bw = self.bandwidth
        f_max = BANDWIDTH_FACTOR * bw if math.isfinite(bw) else self.sweep[1] / 1e3

        def resp(f, n):
            return Cascade(self.chain, n).response(f)

        if self.forced_sections is not None:
            n = int(self.forced_sections)
            freqs = check_freqs(f_max)
            return SectionChoice(n, f_max, bw, ladder_error(resp(freqs, None), resp(freqs, n)), None,
                                 LINE_TOLERANCE)
        from ..errors import ComputationError

        try:
            return choose_sections(resp, f_max=f_max, tol=LINE_TOLERANCE)
        except ComputationError as exc:
            raise ComputationError(f"{self.chain.origin}: {exc} (the poles a closed form needs "
                                   "come from that ladder; the chain's bandwidth, rise time and "
                                   "step come from the exact response and need none)") from None

    @property
    def sections_chosen(self) -> bool:
        """Whether the section count has been asked for (and so computed) yet."""
        return "section_choice" in self.__dict__

    @property
    def sections(self) -> int:
        """Pi sections per cable in the lumped model (0 without cables)."""
        ch = self.section_choice
        return 0 if ch is None else ch.sections

    @property
    def section_error(self) -> float | None:
        ch = self.section_choice
        return None if ch is None else ch.error

    @property
    def f_max(self) -> float | None:
        ch = self.section_choice
        return None if ch is None else ch.f_max

    @cached_property
    def transfer_info(self):
        """The lumped transfer function and how it was found (cables as the ladder)."""
        from ..errors import ComputationError

        b = self.built
        sections = self.sections or None  # its own refusal names the spec already
        try:
            info = self.network.transfer_info(b.source, b.output, line_sections=sections)
        except ComputationError as exc:  # the fact, in the chain's words (not the network's)
            raise ComputationError(
                f"{self.chain.origin}: the chain's poles cannot be had: "
                f"{str(exc).split(';')[0]} (lump parts together or shorten the cables; the "
                "bandwidth, rise time and step come from the exact response and need none)"
            ) from None
        _check_stable(info.rational.poles, self.chain.origin)
        return info

    @property
    def transfer(self):
        """Source to output as a :class:`taumatch.lti.Rational` (ideal step behind the
        source resistance; cables as the chosen ladder)."""
        return self.transfer_info.rational

    @property
    def has_edge(self) -> bool:
        """Whether the source has an edge (a rise time) of its own."""
        return self.chain.source.edge_time_constant is not None

    @cached_property
    def edge(self):
        """The source edge filter ``1/(1 + s tau)`` as a Rational, or None."""
        from ..lti import Rational

        tau = self.chain.source.edge_time_constant
        if tau is None:
            return None
        return Rational.from_zpk_scaled([], [-1.0 / tau], 1.0, 1.0 / tau)

    @property
    def displayed(self):
        """The lumped transfer function with the source edge (what the instrument shows)."""
        return self.transfer if self.edge is None else self.transfer * self.edge

    # ------------------------------------------------------------------ windows
    @cached_property
    def step_window(self) -> float:
        """End of the time window [s] in which the displayed step settles (2 % band), or the
        longest window searched."""
        st = self.displayed_step
        return float(st.t[-1])

    @cached_property
    def netlist_window(self) -> tuple[float, float, float]:
        """``(tstop, fstart, fstop)`` for a deck's transient and AC analyses [s, Hz, Hz]."""
        lo, hi = self.sweep
        bw = self.bandwidth
        fstart = min(lo * 10, 10.0)
        fstop = min(hi / 10, 30 * bw) if math.isfinite(bw) else hi / 10
        period = self.chain.source.period
        tstop = 2 * period if period else self.step_window
        return tstop, fstart, fstop


def _check_stable(poles, origin: str) -> None:
    """Every chain is stable (passive parts; buffers feed forward only), so a pole on or right
    of the imaginary axis is one the eigenvalue solver lost to rounding: the chain's time
    constants span more than double precision resolves.  Refused, with the span, rather than
    answered from that pole."""
    from ..errors import ComputationError
    from ..units import format_quantity

    p = np.asarray(poles, dtype=complex)
    bad = p[p.real >= 0]
    if not bad.size:
        return
    fastest = format_quantity(float(np.abs(p).max()) / (2 * math.pi), "Hz")
    raise ComputationError(
        f"{origin}: the chain's time constants lie too far apart for double precision: beside "
        f"a pole at {fastest} another came out at {complex(bad[0]).real:.3g}"
        f"{complex(bad[0]).imag:+.3g}j rad/s, which a stable chain cannot have; bring its "
        "fastest and slowest time constants closer (docs/ranges.md)")


def _settled(y, final) -> bool:
    """Whether the last quarter of ``y`` lies within half the settling band of ``final``."""
    if y.size < 4 or final == 0:
        return True
    tail = y[-max(y.size // 4, 1):]
    return bool(np.max(np.abs(tail - final)) <= 0.5 * SETTLE_BAND * abs(final))
