"""What a chain does to a signal: bandwidth, rise time, loading, ringing.

* :func:`chain_figures` — every figure of a chain (:class:`ChainFigures`).
* :class:`ChainModel` — a chain's network, exact response and closed-form transfer.
* :mod:`~taumatch.analysis.bandwidth`, :mod:`~taumatch.analysis.loading`,
  :mod:`~taumatch.analysis.ringing` — the single figures.
"""

from .bandwidth import find_bandwidth, rise_time
from .figures import ChainFigures, chain_figures
from .loading import Loading, loading
from .model import ChainModel, ScaledRational
from .ringing import Ringing, ringing, zeta_from_overshoot

__all__ = [
    "ChainFigures",
    "ChainModel",
    "Loading",
    "Ringing",
    "ScaledRational",
    "chain_figures",
    "find_bandwidth",
    "loading",
    "ringing",
    "rise_time",
    "zeta_from_overshoot",
]
