"""Is there a divider in front of the input at all?  The reading of a 1X capture.

Without a chain spec or resistances the diagnosis assumes a 10:1 probe.  A capture can
say otherwise: probe-compensation outputs give a square wave of a few volts (0.2–5 V,
common practice, no source), so a displayed swing of ``ONE_X_SWING`` or more behind an
assumed 10:1 divider means a source ten times larger than any such output.  Then

* if the plateaus are flat (the gain error within the acceptance band or the capture's
  resolution), nothing shows a divider: the capture is read as taken at 1X, with the
  figures that say so, and no trim is given;
* if a corner is rounded or peaked, the 10:1 reading is still given, with the doubt
  beside it: at 1X that corner belongs to the source or the cable, not to a trimmer.

A 10:1 probe on an instrument that scales its readings by ten also shows a few volts; the
reading says so too, so the user can tell the two apart (the tip resistance or a chain spec).
"""

from __future__ import annotations

from dataclasses import dataclass

from .units import format_quantity

__all__ = ["ONE_X_SWING", "DividerDoubt", "divider_doubt"]

#: Displayed swing (V) from which an assumed 10:1 divider would need a source beyond a
#: probe-compensation output's few volts.
ONE_X_SWING = 1.0


@dataclass(frozen=True)
class DividerDoubt:
    """Why the capture does not look taken through the assumed divider.

    Attributes
    ----------
    swing : float
        Displayed swing (V).
    ratio : float
        Division ratio assumed (R1 + R2)/R2.
    source : float
        Source swing (V) the assumed divider would need.
    flat : bool
        True when the plateaus are flat: nothing in the capture shows a divider.
    error, stderr, band : float
        Fitted gain error, its standard error and the band it was judged flat or not
        against (fractions).
    band_reason : str
        What set the band ("the acceptance band", "the resolution of this capture").
    """

    swing: float
    ratio: float
    source: float
    flat: bool
    error: float
    stderr: float
    band: float
    band_reason: str = "the acceptance band"

    def lines(self) -> list:
        """The reading, a headline and the figures behind it, one sentence each."""
        q = format_quantity
        source = (f"the {q(self.swing, 'V')} swing would need a {q(self.source, 'V')} source "
                  f"behind the assumed {self.ratio:.3g}:1 divider, far above a "
                  "probe-compensation output's few volts")
        band = f"±{100 * self.band:.2g} %"
        within = (f"within the {band} acceptance band"
                  if self.band_reason == "the acceptance band"
                  else f"within {band}, {self.band_reason}")
        if self.flat:
            return ["no divider in front of the input (1X): nothing to trim",
                    source,
                    (f"the plateaus are flat: gain error {100 * self.error:+.2f} % "
                     f"± {100 * self.stderr:.2g} %, {within}"),
                    (f"if a 10:1 probe is on and the instrument scales its readings by ten, it "
                     f"is compensated {within} (give the tip resistance or a chain spec to say so)")]
        corner = "peaked" if self.error > 0 else "rounded"
        return [f"perhaps no divider in front of the input (1X): {source}",
                (f"at 1X the {corner} corner ({100 * self.error:+.2f} %) comes from the source "
                 "or the cable, and there is nothing to trim; the trim given holds for a 10:1 "
                 "probe on an instrument that scales its readings by ten")]

    def describe(self) -> str:
        """The reading in one line."""
        return "; ".join(self.lines())

    def to_dict(self) -> dict:
        return {"status": "none" if self.flat else "doubtful", "swing": self.swing,
                "assumed_ratio": self.ratio, "source_needed": self.source, "flat": self.flat,
                "band": self.band, "reading": self.describe()}


def divider_doubt(swing: float, ratio: float, error: float, stderr: float, band: float,
                  band_reason: str = "the acceptance band") -> DividerDoubt | None:
    """The doubt about an assumed divider, or None when the capture is consistent with it.

    Parameters
    ----------
    swing : float
        Displayed swing (V).
    ratio : float
        Assumed division ratio (R1 + R2)/R2.
    error, stderr : float
        Fitted high/low-frequency gain error and its standard error (fractions).
    band : float
        Gain error still counted as flat: the acceptance band or the capture's resolution,
        whichever is larger (fraction).
    band_reason : str
        What set the band, for the reading.

    Examples
    --------
    >>> divider_doubt(3.1, 10.0, 0.004, 0.001, 0.01).flat
    True
    >>> divider_doubt(0.31, 10.0, 0.004, 0.001, 0.01) is None
    True
    """
    swing = abs(swing)
    if swing < ONE_X_SWING or ratio <= 1.5:
        return None
    return DividerDoubt(swing, ratio, swing * ratio, abs(error) <= band, error,
                        stderr if stderr is not None else float("nan"), band, band_reason)
