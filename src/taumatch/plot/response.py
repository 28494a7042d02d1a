"""Pictures of time and frequency responses."""

from __future__ import annotations

import numpy as np

from . import new_axes

__all__ = ["plot_time_response"]


def plot_time_response(t, y, ax=None, label=None, title=None, ylabel="response"):
    """Draw y(t) against t (seconds shown with an engineering prefix); returns (fig, ax)."""
    fig, ax = new_axes(ax)
    t = np.asarray(t, dtype=float)
    span = float(np.max(np.abs(t))) if t.size else 1.0
    scale, unit = _time_scale(span)
    ax.plot(t / scale, y, lw=1.4, label=label)
    ax.set_xlabel(f"time ({unit})")
    ax.set_ylabel(ylabel)
    ax.grid(True, alpha=0.3)
    if title:
        ax.set_title(title)
    if label:
        ax.legend(loc="best")
    return fig, ax


def _time_scale(span: float):
    for scale, unit in ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns"), (1e-12, "ps")):
        if span >= scale:
            return scale, unit
    return 1e-12, "ps"
