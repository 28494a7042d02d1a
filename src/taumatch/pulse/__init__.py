"""Pulse measurements on captures: edges, coherent averaging, IEEE Std 181-2011 metrics.

* :func:`measure` — levels, transition durations, aberrations, settling, quality flags.
* :func:`average_period` — all full periods averaged into one (for fitting).
* :func:`state_levels`, :func:`find_edges` — the building blocks.
"""

from .averaging import AveragedPeriod, average_period
from .edges import Edges, find_edges
from .levels import StateLevels, state_levels
from .metrics import PulseMetrics, measure
from .transitions import Transition

__all__ = [
    "measure", "PulseMetrics", "average_period", "AveragedPeriod", "state_levels",
    "StateLevels", "find_edges", "Edges", "Transition",
]
