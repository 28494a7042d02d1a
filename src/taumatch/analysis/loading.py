"""How hard the chain loads the circuit: Z_in(f), its R || C, and the edge slowing.

``Z_in`` is the impedance the circuit sees at the probe point (``tip``, after the source
resistance), source removed, cables exact.  Its equivalent parallel ``R || C``:

* ``r = 1 / Re Y_in`` at DC (at the bottom of the sweep when there is no DC path);
* ``c = Im Y_in / omega`` at ``f_c``: 1 % of the chain's -3 dB bandwidth by default, below
  the parasitic resonances (for a compensated divider ``c`` is flat there).

Edge slowing: the 10-90 % rise time of the voltage at the probe point with the probe
attached (source edge through the source resistance into ``Z_in``, closed form from the
lti) against the source edge alone (its ``rise_time``; 0 for an ideal source).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError
from ..units import format_quantity
from .bandwidth import rise_time

__all__ = ["Loading", "loading"]


@dataclass(frozen=True)
class Loading:
    """The probe as the circuit sees it.

    Attributes
    ----------
    freqs : ndarray
        Sweep [Hz].
    impedance : ndarray
        ``Z_in`` [ohm] (complex) at ``freqs``.
    r : float
        Equivalent parallel resistance [ohm].
    c : float
        Equivalent parallel capacitance [F] at ``f_c``.
    f_c : float
        Frequency ``c`` is taken at [Hz].
    rise_with_probe, rise_without_probe : float or None
        10-90 % of the probe-point voltage with and without the probe [s].
    """

    freqs: np.ndarray
    impedance: np.ndarray
    r: float
    c: float
    f_c: float
    rise_with_probe: float | None
    rise_without_probe: float | None

    @property
    def slowing(self) -> float | None:
        """Added rise time at the probe point [s] (with minus without)."""
        if self.rise_with_probe is None or self.rise_without_probe is None:
            return None
        return self.rise_with_probe - self.rise_without_probe

    def to_dict(self) -> dict:
        return {
            "r": self.r,
            "c": self.c,
            "f_c": self.f_c,
            "rise_time_with_probe": self.rise_with_probe,
            "rise_time_without_probe": self.rise_without_probe,
            "edge_slowing": self.slowing,
        }

    def summary(self) -> str:
        text = (f"loading: {format_quantity(self.r, 'Ω')} || {format_quantity(self.c, 'F')} "
                f"(C at {format_quantity(self.f_c, 'Hz')})")
        if self.rise_with_probe is not None:
            text += (f"; edge at the probe point {format_quantity(self.rise_with_probe, 's')} "
                     f"with the probe, {format_quantity(self.rise_without_probe, 's')} without")
        return text

    def plot(self, ax=None):
        """|Z_in| and phase over frequency (see :func:`taumatch.plot.chain.plot_loading`)."""
        from ..plot.chain import plot_loading

        return plot_loading(self, ax=ax)


def input_capacitance(net, source: str, node: str, f_c: float) -> float:
    """``Im Y / omega`` [F] of the impedance seen at ``node`` at ``f_c`` [Hz]."""
    z = net.response(np.array([f_c]), source, node)[0]
    return float((1 / z).imag / (2 * math.pi * f_c))


def loading(model, f_c: float | None = None, points: int = 400) -> Loading:
    """Input impedance, its R || C and the edge slowing for a :class:`ChainModel`.

    Parameters
    ----------
    model : ChainModel
    f_c : float, optional
        Frequency for the equivalent capacitance [Hz]; default 1 % of the bandwidth.
    points : int
        Points of the returned sweep.
    """
    from ..chain.build import build
    from .model import _scaled_transfer

    chain = model.chain
    lb = build(chain, "load")
    net = lb.network()
    lo, hi = model.sweep()
    freqs = np.logspace(math.log10(lo), math.log10(hi), points)
    z = net.response(freqs, lb.source, lb.probe)
    try:  # DC: capacitors open, inductors shorted
        with np.errstate(all="ignore"):
            z_dc = complex(net.response(np.array([0.0]), lb.source, lb.probe)[0])
    except (ValueError, ArithmeticError, np.linalg.LinAlgError):
        z_dc = complex("nan")
    if not (np.isfinite(z_dc) and z_dc.real > 0):
        z_dc = complex(z[0])
    y_lo = 1 / z_dc
    r = float(1 / y_lo.real) if y_lo.real > 0 else math.inf
    if f_c is None:
        bw = model.bandwidth_hint
        if not np.isfinite(bw):
            from .bandwidth import find_bandwidth

            bw = find_bandwidth(model.response, lo, hi).upper
        f_c = bw / 100 if np.isfinite(bw) else math.sqrt(lo * hi)
    c = input_capacitance(net, lb.source, lb.probe, f_c)
    # edge at the probe point
    src = chain.source
    without = src.rise_time if src.rise_time is not None else 0.0
    with_probe = None
    full = build(chain, "full", edge=True)
    fnet = full.network()
    # The probe point needs the cable only up to a few times its own (much lower) bandwidth,
    # so it gets its own, smaller section count (never more than the chain's).
    sections = model.sections or None
    if sections and full.lines():
        from ..network import choose_sections
        from .bandwidth import find_bandwidth

        try:
            bw_tip = find_bandwidth(lambda f: fnet.response(f, full.source, full.probe),
                                    lo, hi).upper
            if np.isfinite(bw_tip):
                choice = choose_sections(fnet, full.source, full.probe, f_max=3 * bw_tip)
                sections = min(sections, max(choice.sections, 1))
        except ComputationError:
            pass
    h_tip = _scaled_transfer(fnet, full.source, full.probe, sections)
    try:
        with_probe = rise_time(h_tip).rise_time
    except ComputationError:  # a probe point that does not settle to a DC level
        with_probe = None
    return Loading(freqs, z, r, c, float(f_c), with_probe, without)
