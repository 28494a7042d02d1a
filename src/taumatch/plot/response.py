"""Pictures of time and frequency responses."""

from __future__ import annotations

import numpy as np

from . import new_axes
from .style import COLORS, eng_axis, finish

__all__ = ["plot_time_response"]


def plot_time_response(t, y, ax=None, label=None, title=None, ylabel="response"):
    """Draw y(t) against t (tick labels in engineering notation, ``100 µs``); returns (fig, ax)."""
    fig, ax = new_axes(ax)
    roles = ("measured", "predicted", "model", "second")
    color = COLORS[roles[len(ax.get_lines()) % len(roles)]]   # a second curve stands apart
    ax.plot(np.asarray(t, dtype=float), y, lw=1.4, color=color, label=label)
    eng_axis(ax.xaxis, "s")
    ax.set_xlabel("time")
    ax.set_ylabel(ylabel)
    finish(ax, title, legend="above" if label else None)
    return fig, ax
