"""Pictures of pulse measurements: the averaged period with its levels and crossings."""

from __future__ import annotations

import math

from ..units import format_quantity
from . import new_axes
from .style import COLORS, eng_axis, finish, readable

__all__ = ["plot_averaged_period", "plot_pulse_metrics"]


def plot_averaged_period(ap, ax=None):
    """Draw an :class:`~taumatch.pulse.AveragedPeriod`; returns ``(fig, ax)``."""
    fig, ax = new_axes(ax)
    ax.plot(ap.t, ap.v, lw=1.2, color=COLORS["measured"],
            label=f"average of {ap.n_periods} periods")
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time from the rising edge")
    ax.set_ylabel("voltage")
    finish(ax, "averaged period")
    return fig, ax


def plot_pulse_metrics(metrics, ax=None):
    """Draw the waveform a :class:`~taumatch.pulse.PulseMetrics` was taken on.

    The averaged period (or nothing but the levels, for a record without a full period),
    the state levels, the 10/50/90 % reference levels and the reference-level instants of
    each transition.  Returns ``(fig, ax)``.
    """
    fig, ax = new_axes(ax)
    ap = metrics.averaged
    if ap is not None:
        ax.plot(ap.t, ap.v, lw=1.2, color=COLORS["measured"],
                label=f"average of {ap.n_periods} periods")
    elif metrics.waveform is not None:
        t, v = metrics.waveform
        step = max(1, t.size // 200_000)
        ax.plot(t[::step], v[::step], lw=1.0, color=COLORS["measured"], label="record")
    lv = metrics.levels
    for frac, style in ((0.0, "-"), (0.1, ":"), (0.5, "--"), (0.9, ":"), (1.0, "-")):
        ax.axhline(lv.reference(frac), color=COLORS["muted"], lw=0.7, ls=style)
    for tr, color in ((metrics.rising, COLORS["model"]), (metrics.falling, COLORS["predicted"])):
        if tr is None:
            continue
        pts = [(tr.start, 0.1), (tr.middle, 0.5), (tr.end, 0.9)]
        if tr.polarity == "falling":
            pts = [(tr.start, 0.9), (tr.middle, 0.5), (tr.end, 0.1)]
        xs = [p[0] for p in pts if math.isfinite(p[0])]
        ys = [lv.reference(p[1]) for p in pts if math.isfinite(p[0])]
        ax.plot(xs, ys, "o", ms=4, color=color,
                label=f"{tr.polarity}: 10-90 % {format_quantity(tr.duration, 's')}, "
                      f"overshoot {100 * tr.overshoot:.2f} %")
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time from the rising edge" if ap is not None else "time")
    ax.set_ylabel("voltage")
    title = metrics.channel or "pulse measurements"
    if metrics.flags:
        title += " — " + ", ".join(readable(f) for f in metrics.flags)
    finish(ax, title, ncols=2)
    return fig, ax
