"""All the figures of a chain in one result: band, peaking, step, loading, ringing.

What ``taumatch bandwidth`` prints.  The band (-3 dB points, peaking) comes from the exact
frequency response, the step figures (10-90 % rise, overshoot, settling) from the exact
step (:mod:`taumatch.network.inverse_laplace`), both cables exact; the root-sum-of-squares
estimate is set beside them (:mod:`~taumatch.analysis.bandwidth`), with loading and ringing
(:mod:`~taumatch.analysis.loading`, :mod:`~taumatch.analysis.ringing`).

When the response peaks by more than :data:`PEAKING_DB` or its step overshoots by more than
:data:`OVERSHOOT`, the first line says so: the -3 dB figure alone would hide it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..chain.model import ChainModel
from ..network import Band
from ..units import format_quantity
from .bandwidth import rss_terms
from .loading import Loading, loading
from .ringing import Ringing, ringing
from .step import StepFigures, step_figures

__all__ = ["OVERSHOOT", "PEAKING_DB", "ChainFigures", "chain_figures"]

#: Peaking above which the summary's first line warns [dB].
PEAKING_DB = 1.0
#: Step overshoot above which the summary's first line warns (fraction).
OVERSHOOT = 0.10
#: Stated inversion error (fraction of the final value) up to which a step counts as resolved.
RESOLVED = 1e-3


def _rel(estimate, exact):
    if not exact:
        return None
    return (estimate - exact) / exact


def _resolved(st: StepFigures) -> bool:
    """Whether the step's stated error is small against its largest value."""
    return st.error / max(1.0, abs(st.initial), 1.0 + st.overshoot) <= RESOLVED


def _jump_text(st: StepFigures) -> str:
    """A step that jumps at once (its jump is the high-frequency gain over the DC gain), in
    words that say what is true: above the DC gain, equal to it within the step's stated
    error, or below it (by less than 10 %: a step from below 90 % has a rise time)."""
    margin = max(st.error, 1e-9)
    if st.initial > 1 + margin:
        return (f"the step jumps at once to {st.initial:.4g} times its final value "
                "(high-frequency gain above the DC gain)")
    if st.initial < 1 - margin:
        return (f"the step jumps at once to {st.initial:.4g} times its final value "
                "(high-frequency gain below the DC gain, by less than 10 %)")
    return ("the step jumps at once to its final value (high-frequency gain equal to the "
            "DC gain)")


def _step_text(st: StepFigures, resolved: bool = True) -> str:
    if not resolved:
        return (f"NOT resolved (the computed step carries an error of {st.error:.2g} of its "
                f"final value); 10-90 % about {format_quantity(st.rise_time or 0.0, 's')}, "
                f"overshoot about {st.overshoot:.0%}")
    if st.jumps:
        return f"{_jump_text(st)}: no 10-90 % rise time"
    parts = [f"rise (10-90 %) {format_quantity(st.rise_time, 's')}",
             f"overshoot {st.overshoot:.1%}"]
    if st.settling is not None:
        parts.append(f"settles within {st.band:.0%} in {format_quantity(st.settling, 's')}")
    else:
        parts.append(f"not settled within {st.band:.0%} after "
                     f"{format_quantity(st.window, 's')}")
    return ", ".join(parts)


@dataclass(frozen=True)
class ChainFigures:
    """Band, step figures, RSS estimate, loading and ringing of one chain.

    Attributes
    ----------
    model : ChainModel
    band : Band
        -3 dB points and peaking of the chain itself (ideal step behind the source
        resistance), exact.
    step : StepFigures or None
        The chain's own exact step (None when AC-coupled).
    displayed : StepFigures or None
        The exact step with the source edge as well (what the instrument shows).
    rss_terms : tuple of (str, float)
        Each part's own rise time [s], the source edge first when there is one.
    loading : Loading
    ringing : Ringing or None
    freqs, response : ndarray
        The exact response over the chain's sweep (what the plot draws) [Hz, V/V].
    """

    model: ChainModel
    band: Band
    step: StepFigures | None
    displayed: StepFigures | None
    rss_terms: tuple
    loading: Loading
    ringing: Ringing | None
    freqs: np.ndarray = None
    response: np.ndarray = None

    @property
    def bandwidth(self) -> Band:
        """The band (kept under its old name)."""
        return self.band

    # ------------------------------------------------------------ what the picture draws
    @property
    def view(self) -> tuple:
        """The frequencies [Hz] the picture shows: the sweep, up to 30 times the bandwidth
        (the roll-off's start is what matters, not 10 GHz)."""
        top = float(self.freqs[-1])
        if math.isfinite(self.band.upper):
            top = min(top, 30 * self.band.upper)
        return float(self.freqs[0]), top

    @property
    def step_curve(self) -> tuple | None:
        """``(t, y)`` of the chain's exact step over its first, unblurred window [s, V/V]
        (None when AC-coupled)."""
        if self.step is None:
            return None
        st = self.model.step
        keep = st.t <= st.t_fast
        return st.t[keep], st.y[keep]

    @property
    def displayed_curve(self) -> tuple | None:
        """``(t, y)`` of the step with the source edge, over the same window as
        :attr:`step_curve` (None without a source edge)."""
        if self.step is None or self.displayed is None:
            return None
        ds, end = self.model.displayed_step, self.model.step.t_fast
        keep = ds.t <= end
        return ds.t[keep], ds.y[keep]

    @property
    def dc_gain(self) -> float:
        return float(self.model.dc_gain)

    @property
    def rise_time(self) -> float | None:
        """10-90 % of the chain's exact step [s] (None when AC-coupled or when it jumps)."""
        if self.step is None or self.step.jumps:
            return None
        return self.step.rise_time

    @property
    def displayed_rise_time(self) -> float | None:
        """10-90 % with the source edge as well [s]."""
        if self.displayed is None or self.displayed.jumps:
            return None
        return self.displayed.rise_time

    @property
    def product(self) -> float | None:
        """Rise time x bandwidth (dimensionless)."""
        if self.rise_time is None or not math.isfinite(self.band.upper):
            return None
        return self.rise_time * self.band.upper

    @property
    def rss_rise_time(self) -> float:
        """RSS of the chain's own terms (source edge left out) [s]."""
        return math.sqrt(sum(t * t for name, t in self.rss_terms if name != "source edge"))

    @property
    def rss_displayed_rise_time(self) -> float:
        """RSS of all terms, source edge included [s]."""
        return math.sqrt(sum(t * t for _, t in self.rss_terms))

    @property
    def rss_error(self) -> float | None:
        """(RSS - exact rise time) / exact, for the chain's own step."""
        return _rel(self.rss_rise_time, self.rise_time)

    @property
    def rss_displayed_error(self) -> float | None:
        """(RSS - exact) / exact for the displayed step (source edge included)."""
        return _rel(self.rss_displayed_rise_time, self.displayed_rise_time)

    @property
    def warning(self) -> str | None:
        """The first line's warning when the response peaks or the step overshoots."""
        band, st = self.band, self.step
        peaks = band.peaking_db > PEAKING_DB
        over = st is not None and not st.jumps and st.overshoot > OVERSHOOT
        if not (peaks or over):
            return None
        what = []
        if peaks and band.peak_frequency:
            what.append(f"the response peaks {band.peaking_db:+.1f} dB at "
                        f"{format_quantity(band.peak_frequency, 'Hz')}")
        elif peaks:
            what.append(f"the high-frequency gain is {band.peaking_db:+.1f} dB above the DC "
                        "gain (no roll-off within the sweep)")
        if over:
            what.append(f"the step overshoots {st.overshoot:.0%}")
        return ("WARNING: " + " and ".join(what) + "; the -3 dB figure alone does not "
                "describe this chain (the rise time below is the 10-90 % of the actual step)")

    def to_dict(self) -> dict:
        m = self.model
        band = self.band
        out = {
            "chain": m.chain.name,
            "warning": self.warning,
            "bandwidth": band.upper,
            "lower_bandwidth": band.lower,
            "ac_coupled": band.ac_coupled,
            "peaking_db": band.peaking_db,
            "peak_frequency": band.peak_frequency,
            "rise_time": self.rise_time,
            "overshoot": None if self.step is None else self.step.overshoot,
            "settling_time": None if self.step is None else self.step.settling,
            "dc_gain": self.dc_gain,
            "rise_time_bandwidth_product": self.product,
            "displayed_rise_time": self.displayed_rise_time,
            "step": None if self.step is None else self.step.to_dict(),
            "displayed_step": None if self.displayed is None else self.displayed.to_dict(),
            "rss_rise_time": self.rss_rise_time,
            "rss_error": self.rss_error,
            "rss_displayed_rise_time": self.rss_displayed_rise_time,
            "rss_displayed_error": self.rss_displayed_error,
            "rss_terms": [{"part": name, "rise_time": t} for name, t in self.rss_terms],
            "loading": self.loading.to_dict(),
            "line_sections": m.sections if m.sections_chosen else None,
            "line_section_error": m.section_error if m.sections_chosen else None,
            "line_f_max": m.f_max if m.sections_chosen else None,
        }
        if self.ringing is not None:
            out["ringing"] = self.ringing.to_dict()
        return out

    def summary(self) -> str:
        band = self.band
        lines = []
        if self.warning:
            lines.append(self.warning)
        lines.append(f"chain: {self.model.chain.name or self.model.chain.origin}")
        hi = self.model.sweep[1]
        if math.isfinite(band.upper):
            text = f"bandwidth (-3 dB): {format_quantity(band.upper, 'Hz')}"
        else:
            text = f"bandwidth (-3 dB): none up to {format_quantity(hi, 'Hz')}"
        if band.lower:
            text += f", lower {format_quantity(band.lower, 'Hz')}"
        if band.peak_frequency:
            text += (f"; peaking {band.peaking_db:+.2f} dB at "
                     f"{format_quantity(band.peak_frequency, 'Hz')}")
        elif band.peaking_db > 0:
            text += f"; high-frequency gain {band.peaking_db:+.2f} dB above DC"
        lines.append(text)
        lines.append(f"DC gain: {self.dc_gain:.6g}")
        st = self.step
        if st is not None:
            text = "step: " + _step_text(st, _resolved(st))
            if self.product is not None:
                err = self.rss_error
                text += (f"; rise time x bandwidth {self.product:.4g}; RSS estimate "
                         f"{format_quantity(self.rss_rise_time, 's')}"
                         + (f" ({err:+.1%})" if err is not None else ""))
            lines.append(text)
        if self.displayed is not None and self.model.has_edge:
            text = "with the source edge: " + _step_text(self.displayed,
                                                         _resolved(self.displayed))
            if self.displayed_rise_time is not None:
                err = self.rss_displayed_error
                text += (f"; RSS estimate {format_quantity(self.rss_displayed_rise_time, 's')}"
                         + (f" ({err:+.1%})" if err is not None else ""))
                edge = self.model.chain.source.rise_time
                if self.displayed_rise_time < 0.95 * edge:
                    text += ("\n  (faster than the source edge itself: the chain overshoots "
                             "— it peaks, or its high-frequency gain is above its DC gain — so "
                             "the step passes 90 % of its final value early)")
            lines.append(text)
        for name, t in self.rss_terms:
            lines.append(f"  {name}: {format_quantity(t, 's')}")
        if self.rss_error is not None and abs(self.rss_error) > 0.3:
            lines.append("  (the root-sum-of-squares rule does not hold here: the parts interact "
                         "— peaking, reflections or loading — so trust the exact figure)")
        lines.append(self.loading.summary())
        if self.ringing is not None:
            lines.append(self.ringing.summary())
            if band.peak_frequency and band.peak_q and band.peaking_db > PEAKING_DB:
                lines.append(f"  resonance of the chain (exact response): "
                             f"{format_quantity(band.peak_frequency, 'Hz')}, Q about "
                             f"{band.peak_q:.3g}")
        if st is not None:
            steps = [self.model.step] + ([self.model.displayed_step]
                                         if self.displayed is not None else [])
            worst = max(s.error / max(abs(s.final), float(np.max(np.abs(s.y))))
                        for s in steps)
            if all(s.converged for s in steps) or worst <= RESOLVED:
                lines.append("steps by numerical inverse Laplace transform of the exact "
                             f"response, error within {max(worst, 1e-12):.1g} of the step's "
                             "largest value")
            else:
                res = self.model.step.resolution
                lines.append("steps by numerical inverse Laplace transform of the exact "
                             "response: NOT resolved (the response has jumps — lossless "
                             "cables without a band limit reflect sharp edges); times are "
                             f"good to about {format_quantity(res, 's')}, levels to "
                             f"{worst:.1g} of the step's largest value")
        if self.model.sections_chosen and self.model.sections:
            m = self.model
            lines.append(f"cables in the closed forms: {m.sections} pi sections (within "
                         f"{m.section_error:.2g} of the exact line up to "
                         f"{format_quantity(m.f_max, 'Hz')})")
        return "\n".join(lines)

    def plot(self, ax=None):
        """Magnitude response and step (see :func:`taumatch.plot.chain.plot_figures`)."""
        from ..plot.chain import plot_figures

        return plot_figures(self, ax=ax)


def chain_figures(chain, *, target_overshoot: float = 0.05, model: ChainModel | None = None
                  ) -> ChainFigures:
    """Compute every figure of ``chain`` (a :class:`~taumatch.chain.Chain`).

    Parameters
    ----------
    chain : Chain
    target_overshoot : float
        Overshoot the ringing-damping figures aim at (fraction).
    model : ChainModel, optional
        Reuse an already built model.
    """
    model = model or ChainModel.from_chain(chain)
    band = model.band
    own = step_figures(model.step) if not band.ac_coupled else None
    shown = None
    if model.has_edge and not band.ac_coupled:
        shown = step_figures(model.displayed_step)
    load = loading(model)
    terms = tuple(rss_terms(chain, load.c))
    ring = ringing(model, target_overshoot)
    if ring is not None and own is not None and not own.jumps:
        from dataclasses import replace

        from .damping import check_advice

        ring = replace(ring, advice=check_advice(model, ring, own.overshoot))
    lo, hi = model.view_range
    freqs = np.logspace(math.log10(lo), math.log10(hi), 600)
    return ChainFigures(model, band, own, shown, terms, load, ring, freqs,
                        model.response(freqs))
