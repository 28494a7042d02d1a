"""The usual cautions for a high-voltage chain (common practice; the standards named).

A chain counts as high voltage when its source exceeds 60 V dc or 30 V rms
(:meth:`taumatch.chain.parts.Source.is_high_voltage`).
"""

from __future__ import annotations

__all__ = ["CAUTIONS", "cautions"]

CAUTIONS = (
    ("high voltage: use a probe and instrument rated for the voltage and frequency "
    "(passive-probe ratings fall with frequency) and for the measurement category of the "
    "circuit (IEC 61010-031 probe assemblies, IEC 61010-2-030 categories CAT II/III/IV)"),
    ("high voltage: an earthed instrument's ground lead on a live node is a short circuit; "
    "keep the reference lead on earth or use a differential or isolated measurement"),
    ("high voltage: rate every divider resistor and compensation capacitor for the voltage "
    "it sees, with margin, and mind the energy the capacitors store (1/2 C V^2)"),
    ("high voltage: these figures are a model, not a safety assessment; follow local codes, "
    "the standards above and licensed practice"),
)


def cautions(chain, waveform: str | None = None) -> list[str]:
    """The cautions for ``chain`` (empty when it is not high voltage).

    Parameters
    ----------
    chain : Chain
    waveform : {"step", "square", "sine"}, optional
        The drive; default square when the source has a period, else step.
    """
    if waveform is None:
        waveform = "square" if chain.source.period is not None else "step"
    return list(CAUTIONS) if chain.is_high_voltage(waveform) else []
