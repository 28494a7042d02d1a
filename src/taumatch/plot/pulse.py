"""Pictures of pulse measurements: the averaged period with its levels and crossings."""

from __future__ import annotations

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
    elif metrics.shown_record is not None:
        t, v = metrics.shown_record
        ax.plot(t, v, lw=1.0, color=COLORS["measured"], label="record")
    for frac, level in metrics.reference_levels:
        ax.axhline(level, color=COLORS["muted"], lw=0.7, ls="-" if frac in (0.0, 1.0) else
                   "--" if frac == 0.5 else ":")
    colors = {"rising": COLORS["model"], "falling": COLORS["predicted"]}
    for tr, xs, ys in metrics.crossings:
        ax.plot(xs, ys, "o", ms=4, color=colors[tr.polarity],
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
