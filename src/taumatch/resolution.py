"""How small a gain error a capture can show: the room its noise and its codes leave.

Two things limit what a square-wave capture says about compensation:

* noise — the fitted gain error carries a standard error; a gain error within two of
  them is not told from zero;
* codes — averaging many periods lowers the noise but cannot resolve levels finer than
  the converter's code unless the noise dithers the codes.  The mean of quantised samples
  can sit up to :func:`taumatch.pulse.quality.quantisation_bias` away from the true level,
  and the gain error compares two levels (the corner's and the plateau's), which can each
  be off that much the opposite way: twice the offset, over the swing, is the least gain
  error the codes can show.  Estimates of noise below a code from quantised samples
  overstate it in two ways: a level on a code boundary flips between two codes with
  almost no noise, and sampling locked to the signal lands each period on the same
  codes; the diagnosis takes the smaller of the median sample-to-sample change (zero
  when most samples repeat the one before) and the scatter of one sample from period to
  period, so as not to claim more dither than there is.

The larger of the two is the capture's resolution of the gain error.  A diagnosis never
claims a tolerance tighter than that: "compensated within ±0.7 %, the resolution of this
capture" rather than "±0.5 %" when the data cannot show ±0.5 %.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .pulse.quality import quantisation_bias
from .units import format_quantity

__all__ = ["Resolution", "gain_resolution"]


@dataclass(frozen=True)
class Resolution:
    """The smallest gain error a capture tells from zero.

    Attributes
    ----------
    gain_error : float
        The resolution (fraction): the larger of ``quantisation`` and ``noise``.
    quantisation : float
        Gain error (fraction) that can hide in the codes: twice the quantisation offset of
        an averaged level, over the swing.
    noise : float
        Two standard uncertainties of the gain error (fraction), the codes left out;
        ``inf`` when unknown.
    code : float
        The record's code step (V).
    dither : float
        Noise (V rms) that moves the samples over the codes, from the median
        sample-to-sample change (zero when most samples repeat the one before).
    swing : float
        Displayed swing (V), upper minus lower state level.
    offset_rms : float
        RMS over levels of the quantisation offset (V): what the averaged period may
        depart from any smooth model by, beside its noise.
    noise_from : str
        What sets ``noise`` (the noise after averaging, or an assumed value's tolerance).
    """

    gain_error: float
    quantisation: float
    noise: float
    code: float
    dither: float
    swing: float
    offset_rms: float
    noise_from: str = "by the noise after averaging"

    @property
    def limited_by(self) -> str:
        """``"quantisation"`` or ``"noise"``: which of the two sets the resolution."""
        return "quantisation" if self.quantisation >= self.noise else "noise"

    def describe(self) -> str:
        """What sets the resolution, in a sentence."""
        q = format_quantity
        if self.limited_by == "quantisation":
            noise = (f"dithered by only {q(self.dither, 'V')} rms of noise" if self.dither > 0
                     else "not dithered by noise (most samples repeat the one before)")
            return (f"its {q(self.code, 'V')} codes ({100 * self.code / self.swing:.2g} % of the "
                    f"{q(self.swing, 'V')} swing) are {noise}, so a gain error under "
                    f"±{100 * self.quantisation:.2g} % can hide in them")
        return (f"two standard uncertainties of the gain error (±{100 * self.noise:.2g} %), "
                f"set {self.noise_from}")

    def to_dict(self) -> dict:
        return {"gain_error": self.gain_error, "quantisation": self.quantisation,
                "noise": self.noise if math.isfinite(self.noise) else None,
                "limited_by": self.limited_by, "code": self.code, "dither": self.dither,
                "swing": self.swing}


def gain_resolution(code: float, dither: float, swing: float,
                    stderr: float | None, noise_from: str = "by the noise after averaging"
                    ) -> Resolution:
    """The resolution of the gain error of one capture.

    Parameters
    ----------
    code : float
        Code step of the record (V); 0 for unquantised data.
    dither : float
        Noise (V rms) that moves the samples over the codes (see
        :attr:`taumatch.pulse.PulseMetrics.dither`).
    swing : float
        Displayed swing (V).
    stderr : float or None
        Standard uncertainty of the gain error (fraction): the fit's, with what was
        assumed (:mod:`taumatch.budget`), the codes' share left out.
    noise_from : str
        What sets it, for :meth:`Resolution.describe`.

    Examples
    --------
    Coarse codes (200 mV on a 3.16 V swing) with a quarter of a code of noise, and without:

    >>> r = gain_resolution(0.2, 0.05, 3.16, 0.002)
    >>> r.limited_by, round(100 * r.gain_error, 2)
    ('quantisation', 1.17)
    >>> round(100 * gain_resolution(0.2, 0.0, 3.16, 0.002).gain_error, 2)   # one code / swing
    6.33
    """
    swing = abs(swing)
    bias = quantisation_bias(code, dither)
    quant = 2.0 * bias / swing if swing > 0 else math.inf
    noise = 2.0 * stderr if stderr is not None and math.isfinite(stderr) else math.inf
    offset_rms = min(code / math.sqrt(12.0), bias / math.sqrt(2.0)) if code > 0 else 0.0
    return Resolution(max(quant, noise), quant, noise, code, dither, swing, offset_rms,
                      noise_from)
