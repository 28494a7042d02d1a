"""The usual cautions for a high-voltage chain, in the project's shared words.

The threshold and the text are :mod:`taumatch.safety`'s (60 V dc, 30 V rms), so every
command shows the same words; here the chain says what kind of voltage its source drives
and whether the trimmer sits in the tip arm, on the high-voltage side.
"""

from __future__ import annotations

__all__ = ["cautions"]


def cautions(chain, waveform: str | None = None, frequency: float | None = None) -> list[str]:
    """The cautions for ``chain`` (empty below the threshold).

    Parameters
    ----------
    chain : Chain
    waveform : {"step", "square", "sine"}, optional
        The drive; default square when the source has a period, else step.  A step is
        treated as dc, a square wave or sine as ac.
    frequency : float, optional
        Highest frequency of interest [Hz] (default: the chain's square-wave frequency).
    """
    from ..safety import cautions as shared
    from .topology import arm_of

    if waveform is None:
        waveform = "square" if chain.source.period is not None else "step"
    if frequency is None and chain.source.period is not None:
        frequency = 1.0 / chain.source.period
    adj = chain.adjustable
    trimmer_in_tip_arm = adj is not None and arm_of(chain, adj[0]) == "tip"
    kind = "dc" if waveform == "step" and chain.source.period is None else "ac"
    return shared(chain.source.amplitude, kind, frequency=frequency,
                  trimmer_at_high_voltage=trimmer_in_tip_arm)
