"""Picture of a fast-edge diagnosis: the capture with the fitted chain on top, the step
predicted after the adjustments, the flat window marked; below, the top of the step near
the edge, where the adjustments act, magnified."""

from __future__ import annotations

import numpy as np

from . import new_axes
from .style import COLORS, eng_axis, finish

__all__ = ["plot_edge"]


def plot_edge(d, ax=None):
    """Draw a :class:`~taumatch.edge_diagnosis.EdgeDiagnosis` on two axes (the whole fit;
    the top of the step near the edge); returns ``(fig, axes)``."""
    if ax is None:
        fig, ax = new_axes(None, nrows=2, ncols=1, figsize=(9, 7.5),
                           gridspec_kw={"height_ratios": [3, 2], "hspace": 0.45})
    else:
        fig = ax[0].figure
    top, zoom = ax
    c = d.curves
    t = c["t"] - d.fit.t0
    w90, w0, w1 = d.window
    for a in (top, zoom):
        a.axvspan(w90, w0, color=COLORS["second"], alpha=0.08, lw=0,
                  label="no overshoot (from the 90 % instant)")
        a.axvspan(w0, w1, color=COLORS["band"], alpha=0.07, lw=0, label="flat window")
        a.plot(t, c["v"], color=COLORS["measured"], lw=1.8, label="capture")
        a.plot(t, c["fitted"], color=COLORS["model"], lw=0.9, ls="--",
               label="fitted chain (as found)")
        a.plot(t, c["after"], color=COLORS["predicted"], lw=1.1,
               label="predicted after the adjustments")
        eng_axis(a.xaxis, "s")
        eng_axis(a.yaxis, "V")
        a.set_ylabel("voltage")
    finish(top, f"fast edge: flat within ±{100 * d.before['peak']:.2f} % as found, "
                f"±{100 * d.after['peak']:.2f} % after the adjustments")
    near = (t >= w90 - 5 * d.edge_constant) & (t <= w0 + 0.3 * (w1 - w0))
    zoom.set_xlim(t[near][0], t[near][-1])
    levels = [float(np.median(y[(t >= w0) & (t <= w1)])) for y in (c["fitted"], c["after"])]
    pad = 0.08 * max(abs(x) for x in levels)
    zoom.set_ylim(min(levels) - pad, max(levels) + pad)
    zoom.set_xlabel("time after the source step")
    finish(zoom, "the top of the step near the edge", legend=None)
    return fig, (top, zoom)
