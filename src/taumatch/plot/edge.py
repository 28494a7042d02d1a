"""Picture of a fast-edge diagnosis: the capture with the fitted chain on top, the step
predicted after the adjustments, the flat window marked; below, the top of the step near
the edge, where the adjustments act, magnified.  Everything drawn is carried by the
diagnosis's curves (:class:`taumatch.edge_diagnosis.EdgeCurves`)."""

from __future__ import annotations

from . import new_axes
from .style import COLORS, eng_axis, finish

__all__ = ["plot_edge"]


def plot_edge(curves, ax=None):
    """Draw a fast-edge diagnosis's curves on two axes (the whole fit; the top of the step
    near the edge); returns ``(fig, (top, zoom))``."""
    if ax is None:
        fig, ax = new_axes(None, nrows=2, ncols=1, figsize=(9, 7.5),
                           gridspec_kw={"height_ratios": [3, 2], "hspace": 0.45})
    else:
        fig = ax[0].figure
    top, zoom = ax
    c = curves
    w90, w0, w1 = c.window
    for a in (top, zoom):
        a.axvspan(w90, w0, color=COLORS["second"], alpha=0.08, lw=0,
                  label="no overshoot (from the 90 % instant)")
        a.axvspan(w0, w1, color=COLORS["band"], alpha=0.07, lw=0, label="flat window")
        a.plot(c.t, c.v, color=COLORS["measured"], lw=1.8, label="capture")
        a.plot(c.t, c.fitted, color=COLORS["model"], lw=0.9, ls="--",
               label="fitted chain (as found)")
        a.plot(c.t, c.after, color=COLORS["predicted"], lw=1.1,
               label="predicted after the adjustments")
        eng_axis(a.xaxis, "s")
        eng_axis(a.yaxis, "V")
        a.set_ylabel("voltage")
    finish(top, c.title)
    zoom.set_xlim(*c.zoom)
    zoom.set_ylim(*c.zoom_levels)
    zoom.set_xlabel("time after the source step")
    finish(zoom, "the top of the step near the edge", legend=None)
    return fig, (top, zoom)
