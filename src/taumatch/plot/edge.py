"""Picture of a fast-edge diagnosis: the capture, the fitted chain and the step after the
adjustments (whole record, and the first part of the flat window magnified)."""

from __future__ import annotations

import numpy as np

from . import new_axes

__all__ = ["plot_edge"]

_UNITS = ((1e-6, "µs"), (1e-9, "ns"), (1e-12, "ps"))


def plot_edge(d, ax=None):
    """Two panels (or the given pair of axes): capture, fit and the predicted step after the
    adjustments; below, the top of the step near the edge.  Returns ``(fig, axes)``."""
    if ax is None:
        fig, ax = new_axes(None, nrows=2, ncols=1, figsize=(9, 7),
                           gridspec_kw={"height_ratios": [3, 2]})
    else:
        fig = ax[0].figure
    top, zoom = ax
    c = d.curves
    t = c["t"] - d.fit.t0
    span = float(np.max(np.abs(t)))
    scale, unit = next(((s, u) for s, u in _UNITS if span >= 10 * s), _UNITS[-1])
    w90, w0, w1 = d.window
    for a in (top, zoom):
        a.plot(t / scale, c["fitted"], color="tab:blue", lw=1.3, label="fitted chain (as found)")
        a.plot(t / scale, c["after"], color="tab:green", lw=1.3, ls="--",
               label="predicted after the adjustments")
        a.plot(t / scale, c["v"], ".", color="0.35", ms=2, label="capture")
        a.axvspan(w0 / scale, w1 / scale, color="tab:green", alpha=0.06, label="flat window")
        a.axvspan(w90 / scale, w0 / scale, color="tab:orange", alpha=0.08,
                  label="no overshoot (from the 90 % instant)")
        a.grid(True, alpha=0.3)
        a.set_ylabel("volts")
    top.set_title(f"fast edge: flat within ±{100 * d.before['peak']:.2f} % as found, "
                  f"±{100 * d.after['peak']:.2f} % after the adjustments")
    top.legend(loc="lower right", fontsize=8)
    # the top of the step near the edge, where the adjustments act
    near = (t >= w90 - 5 * d.edge_constant) & (t <= w0 + 0.3 * (w1 - w0))
    zoom.set_xlim(t[near][0] / scale, t[near][-1] / scale)
    levels = [float(np.median(y[(t >= w0) & (t <= w1)])) for y in (c["fitted"], c["after"])]
    lo, hi = min(levels), max(levels)
    pad = 0.08 * max(abs(hi), abs(lo))
    zoom.set_ylim(lo - pad, hi + pad)
    zoom.set_xlabel(f"time after the source step ({unit})")
    return fig, (top, zoom)
