"""Picture of a fast-edge diagnosis: the capture, the fitted chain and the step after the
adjustments, with the flat window marked."""

from __future__ import annotations

import numpy as np

from . import new_axes

__all__ = ["plot_edge"]

_UNITS = ((1e-6, "µs"), (1e-9, "ns"), (1e-12, "ps"))


def plot_edge(d, ax=None):
    """One panel: capture, fit, predicted step after the adjustments; ``(fig, ax)``."""
    fig, ax = new_axes(ax, figsize=(9, 5))
    c = d.curves
    t = c["t"] - d.fit.t0
    span = float(np.max(np.abs(t)))
    scale, unit = next(((s, u) for s, u in _UNITS if span >= 10 * s), _UNITS[-1])
    ax.plot(t / scale, c["v"], color="0.55", lw=0.8, label="capture")
    ax.plot(t / scale, c["fitted"], color="tab:blue", lw=1.3, label="fitted chain (as found)")
    ax.plot(t / scale, c["after"], color="tab:green", lw=1.3, ls="--",
            label="predicted after the adjustments")
    w90, w0, w1 = d.window
    ax.axvspan(w0 / scale, w1 / scale, color="tab:green", alpha=0.06, label="flat window")
    ax.axvspan(w90 / scale, w0 / scale, color="tab:orange", alpha=0.06,
               label="no overshoot (from the 90 % instant)")
    ax.set_title(f"fast edge: flat within ±{100 * d.before['peak']:.2f} % as found, "
                 f"±{100 * d.after['peak']:.2f} % after")
    ax.set_xlabel(f"time after the source step ({unit})")
    ax.set_ylabel("volts")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize=8)
    return fig, ax
