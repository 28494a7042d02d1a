"""How hard the chain loads the circuit: Z_in(f), its R || C, and the edge slowing.

``Z_in`` is the impedance the circuit sees at the probe point (``tip``, after the source
resistance), source removed, cables exact (:meth:`ChainModel.impedance`).  Its equivalent
parallel ``R || C``:

* ``r = 1 / Re Y_in`` at DC (at the bottom of the sweep when there is no DC path);
* ``c = Im Y_in / omega`` at ``f_c``: 1 % of the chain's -3 dB bandwidth by default, below
  the parasitic resonances (for a compensated divider ``c`` is flat there).

Edge slowing: the 10-90 % rise time of the voltage at the probe point with the probe
attached (source edge through the source resistance into ``Z_in``: the exact step,
:attr:`ChainModel.probe_step`) against the source edge alone (its ``rise_time``; 0 for an
ideal source).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..units import format_quantity
from .step import step_figures

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
        10-90 % of the probe-point voltage with and without the probe [s] (None: not a
        rising edge there, e.g. an ideal source with no resistance).
    ideal_source : bool
        True when the source has neither resistance nor a rise time (the probe point is
        the ideal step itself).
    """

    freqs: np.ndarray
    impedance: np.ndarray
    r: float
    c: float
    f_c: float
    rise_with_probe: float | None
    rise_without_probe: float | None
    ideal_source: bool = False

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
        r = (format_quantity(self.r, 'Ω') if math.isfinite(self.r)
             else "no resistance to ground")
        if self.c > 0:
            text = f"loading: {r} || {format_quantity(self.c, 'F')} "
            text += f"(C at {format_quantity(self.f_c, 'Hz')})"
        else:  # a shunt inductance after the tip: the probe is inductive there
            w = 2 * math.pi * self.f_c
            inductive = (f"|| {format_quantity(-1 / (w * w * self.c), 'H')}" if self.c < 0
                         else "and no reactance")
            text = (f"loading: {r} {inductive} (inductive at "
                    f"{format_quantity(self.f_c, 'Hz')}: no capacitance to give)")
        if self.ideal_source:
            text += ("; the source is ideal (no resistance, no rise time): the probe point "
                     "follows it, the probe does not slow it")
        elif self.rise_with_probe == 0 and not self.rise_without_probe:
            text += ("; the probe point follows the ideal source edge at once (what is in "
                     "series at the tip isolates the probe at the first instant)")
        elif self.rise_with_probe is not None:
            without = ("the ideal source edge" if not self.rise_without_probe
                       else format_quantity(self.rise_without_probe, 's') + " without")
            text += (f"; edge at the probe point {format_quantity(self.rise_with_probe, 's')} "
                     f"with the probe, {without}")
        return text

    def plot(self, ax=None):
        """|Z_in| and phase over frequency (see :func:`taumatch.plot.chain.plot_loading`)."""
        from ..plot.chain import plot_loading

        return plot_loading(self, ax=ax)


def _reference_frequency(model) -> float:
    """The chain's band edge [Hz]: its -3 dB bandwidth, or its resonance (a peak of more than
    1 dB) where that is lower or there is no -3 dB point, else the middle of the sweep."""
    band = model.band
    peak = band.peak_frequency if band.peaking_db > 1.0 else None
    cands = [f for f in (band.upper, peak) if f and np.isfinite(f)]
    if cands:
        return float(min(cands))
    lo, hi = model.sweep
    return math.sqrt(lo * hi)


def loading(model, f_c: float | None = None, points: int = 400) -> Loading:
    """Input impedance, its R || C and the edge slowing for a :class:`ChainModel`.

    Parameters
    ----------
    model : ChainModel
    f_c : float, optional
        Frequency for the equivalent capacitance [Hz]; default 1 % of the bandwidth (or of
        the first resonance, when that is lower or there is no -3 dB point).
    points : int
        Points of the returned sweep.
    """
    lo, hi = model.view_range
    freqs = np.logspace(math.log10(lo), math.log10(hi), points)
    z = model.impedance(freqs)
    z_dc = complex(model.impedance(np.array([0.0]))[0])
    if not (np.isfinite(z_dc) and z_dc.real > 0):
        z_dc = complex(z[0])
    y_lo = 1 / z_dc
    r = float(1 / y_lo.real) if y_lo.real > 0 else math.inf
    if f_c is None:
        f_c = _reference_frequency(model) / 100
    y_c = 1 / complex(model.impedance(np.array([f_c]))[0])
    c = float(y_c.imag / (2 * math.pi * f_c))
    src = model.chain.source
    ideal = src.resistance == 0 and src.rise_time is None
    with_probe = without = None
    if not ideal:
        without = src.rise_time if src.rise_time is not None else 0.0
        figs = step_figures(model.probe_step)
        with_probe = figs.rise_time if figs is not None else None
    return Loading(freqs, z, r, c, float(f_c), with_probe, without, ideal)
