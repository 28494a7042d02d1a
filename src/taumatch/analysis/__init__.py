"""What a chain does to a signal: bandwidth, peaking, step, loading, ringing, trim, prediction.

* :func:`chain_figures` — every figure of a chain (:class:`ChainFigures`).
* :class:`ChainModel` — a chain built once with what every analysis needs
  (:mod:`taumatch.chain.model`).
* :mod:`~taumatch.analysis.bandwidth`, :mod:`~taumatch.analysis.step`,
  :mod:`~taumatch.analysis.loading`, :mod:`~taumatch.analysis.ringing`,
  :mod:`~taumatch.analysis.trim`, :mod:`~taumatch.analysis.predict` — the single figures.
"""

from ..chain.model import ChainModel
from .bandwidth import find_bandwidth, rise_time
from .figures import ChainFigures, chain_figures
from .loading import Loading, loading
from .ringing import Ringing, ringing, zeta_from_overshoot
from .step import StepFigures, step_figures
from .trim import Trim, trim

__all__ = [
    "ChainFigures",
    "ChainModel",
    "Loading",
    "Ringing",
    "StepFigures",
    "Trim",
    "chain_figures",
    "find_bandwidth",
    "loading",
    "ringing",
    "rise_time",
    "step_figures",
    "trim",
    "zeta_from_overshoot",
]
