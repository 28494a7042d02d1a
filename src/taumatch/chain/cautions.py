"""The usual cautions for a high-voltage chain, in the project's shared words.

A chain counts as high voltage when its source exceeds 60 V dc or 30 V rms
(:meth:`taumatch.chain.parts.Source.is_high_voltage`); the text comes from
:func:`taumatch.safety.cautions` so that every command shows the same words.
"""

from __future__ import annotations

__all__ = ["cautions"]


def cautions(chain, waveform: str | None = None, frequency: float | None = None) -> list[str]:
    """The cautions for ``chain`` (empty when it is not high voltage).

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
    from .parts import Series

    if waveform is None:
        waveform = "square" if chain.source.period is not None else "step"
    if not chain.is_high_voltage(waveform):
        return []
    if frequency is None and chain.source.period is not None:
        frequency = 1.0 / chain.source.period
    adj = chain.adjustable
    in_top_arm = adj is not None and isinstance(adj[1], Series)
    kind = "dc" if waveform == "step" else "ac"
    return shared(chain.source.amplitude, kind, frequency=frequency,
                  trimmer_at_high_voltage=in_top_arm)
