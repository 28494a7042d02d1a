"""All the figures of a chain in one result: bandwidth, rise time, loading, ringing.

What ``taumatch bandwidth`` prints.  Definitions are in :mod:`~taumatch.analysis.bandwidth`,
:mod:`~taumatch.analysis.loading` and :mod:`~taumatch.analysis.ringing`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import ComputationError
from ..units import format_quantity
from .bandwidth import Bandwidth, find_bandwidth, rise_time, rss_terms
from .loading import Loading, loading
from .model import ChainModel
from .ringing import Ringing, ringing

__all__ = ["ChainFigures", "chain_figures"]


def _rel(estimate, exact):
    if not exact:
        return None
    return (estimate - exact) / exact


@dataclass(frozen=True)
class ChainFigures:
    """Bandwidth, rise time, RSS estimate, loading and ringing of one chain.

    Attributes
    ----------
    model : ChainModel
    bandwidth : Bandwidth
        Of the chain itself (ideal step behind the source resistance), exact.
    rise_time : float or None
        10-90 % of the chain's step [s] (None when AC-coupled).
    displayed_rise_time : float or None
        10-90 % with the source edge as well [s].
    rss_terms : tuple of (str, float)
        Each part's own rise time [s], the source edge first when there is one.
    loading : Loading
    ringing : Ringing or None
    """

    model: ChainModel
    bandwidth: Bandwidth
    rise_time: float | None
    displayed_rise_time: float | None
    rss_terms: tuple
    loading: Loading
    ringing: Ringing | None

    @property
    def dc_gain(self) -> float:
        return float(self.model.transfer.dc_gain)

    @property
    def product(self) -> float | None:
        """Rise time x bandwidth (dimensionless)."""
        if self.rise_time is None or not math.isfinite(self.bandwidth.upper):
            return None
        return self.rise_time * self.bandwidth.upper

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

    def to_dict(self) -> dict:
        m = self.model
        out = {
            "chain": m.chain.name,
            "bandwidth": self.bandwidth.upper,
            "lower_bandwidth": self.bandwidth.lower,
            "ac_coupled": self.bandwidth.ac_coupled,
            "rise_time": self.rise_time,
            "dc_gain": self.dc_gain,
            "rise_time_bandwidth_product": self.product,
            "displayed_rise_time": self.displayed_rise_time,
            "rss_rise_time": self.rss_rise_time,
            "rss_error": self.rss_error,
            "rss_displayed_rise_time": self.rss_displayed_rise_time,
            "rss_displayed_error": self.rss_displayed_error,
            "rss_terms": [{"part": name, "rise_time": t} for name, t in self.rss_terms],
            "loading": self.loading.to_dict(),
            "line_sections": m.sections,
            "line_section_error": m.section_error,
            "line_f_max": m.f_max,
        }
        if self.ringing is not None:
            out["ringing"] = self.ringing.to_dict()
        return out

    def summary(self) -> str:
        bw = self.bandwidth
        lines = [f"chain: {self.model.chain.name or self.model.chain.origin}"]
        lines.append(f"bandwidth (-3 dB): {format_quantity(bw.upper, 'Hz')}"
                     + (f", lower {format_quantity(bw.lower, 'Hz')}" if bw.lower else ""))
        lines.append(f"DC gain: {self.dc_gain:.6g}")
        if self.rise_time is not None:
            err = self.rss_error
            lines.append(f"rise time (10-90 %): {format_quantity(self.rise_time, 's')}; "
                         f"rise time x bandwidth {self.product:.4g}; RSS estimate "
                         f"{format_quantity(self.rss_rise_time, 's')}"
                         + (f" ({err:+.1%})" if err is not None else ""))
        if self.displayed_rise_time is not None and self.model.edge is not None:
            err = self.rss_displayed_error
            lines.append(f"with the source edge: {format_quantity(self.displayed_rise_time, 's')}; "
                         f"RSS estimate {format_quantity(self.rss_displayed_rise_time, 's')}"
                         + (f" ({err:+.1%})" if err is not None else ""))
        for name, t in self.rss_terms:
            lines.append(f"  {name}: {format_quantity(t, 's')}")
        if self.rss_error is not None and abs(self.rss_error) > 0.3:
            lines.append("  (the root-sum-of-squares rule does not hold here: the parts interact "
                         "— peaking, reflections or loading — so trust the exact figure)")
        lines.append(self.loading.summary())
        if self.ringing is not None:
            lines.append(self.ringing.summary())
        if self.model.sections:
            lines.append(f"cables: {self.model.sections} pi sections in the time domain "
                         f"(within {self.model.section_error:.2g} of the exact line up to "
                         f"{format_quantity(self.model.f_max, 'Hz')})")
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
    lo, hi = model.sweep()
    bw = find_bandwidth(model.response, lo, hi)
    try:
        rt = rise_time(model.transfer).rise_time
    except ComputationError:
        rt = None
    try:
        shown = rise_time(model.displayed).rise_time
    except ComputationError:
        shown = None
    load = loading(model)
    terms = tuple(rss_terms(chain, load.c))
    ring = ringing(model, target_overshoot)
    return ChainFigures(model, bw, rt, shown, terms, load, ring)
