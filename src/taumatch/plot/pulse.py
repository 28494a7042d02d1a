"""Pictures of pulse measurements: the averaged period with its levels and crossings."""

from __future__ import annotations

import math

import numpy as np

from . import new_axes

__all__ = ["plot_pulse_metrics", "plot_averaged_period"]


def _time_scale(span: float):
    for scale, prefix in ((1.0, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p")):
        if span >= scale:
            return scale, prefix
    return 1e-15, "f"


def plot_averaged_period(ap, ax=None):
    """Draw an :class:`~taumatch.pulse.AveragedPeriod`; returns ``(fig, ax)``."""
    fig, ax = new_axes(ax)
    scale, prefix = _time_scale(float(np.ptp(ap.t)))
    ax.plot(ap.t / scale, ap.v, lw=1.0, label=f"average of {ap.n_periods} periods")
    ax.set_xlabel(f"time from rising edge ({prefix}s)")
    ax.set_ylabel("V")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize="small")
    return fig, ax


def plot_pulse_metrics(metrics, ax=None):
    """Draw the waveform a :class:`~taumatch.pulse.PulseMetrics` was taken on.

    The averaged period (or nothing but the levels, for a record without a full period),
    the state levels, the 10/50/90 % reference levels and the reference-level instants of
    each transition.  Returns ``(fig, ax)``.
    """
    fig, ax = new_axes(ax)
    ap = metrics.averaged
    times = [tr.middle for tr in (metrics.rising, metrics.falling) if tr is not None]
    span = float(np.ptp(ap.t)) if ap is not None else (max(times) - min(times) or 1.0)
    scale, prefix = _time_scale(span)
    if ap is not None:
        ax.plot(ap.t / scale, ap.v, lw=1.0, color="C0",
                label=f"average of {ap.n_periods} periods")
    elif metrics.waveform is not None:
        t, v = metrics.waveform
        span = float(t[-1] - t[0]) or 1.0
        scale, prefix = _time_scale(span)
        step = max(1, t.size // 200_000)
        ax.plot(t[::step] / scale, v[::step], lw=1.0, color="C0", label="record")
    lv = metrics.levels
    for frac, style in ((0.0, "-"), (0.1, ":"), (0.5, "--"), (0.9, ":"), (1.0, "-")):
        ax.axhline(lv.reference(frac), color="0.5", lw=0.8, ls=style)
    for tr, color in ((metrics.rising, "C1"), (metrics.falling, "C2")):
        if tr is None:
            continue
        pts = [(tr.start, 0.1), (tr.middle, 0.5), (tr.end, 0.9)]
        if tr.polarity == "falling":
            pts = [(tr.start, 0.9), (tr.middle, 0.5), (tr.end, 0.1)]
        xs = [p[0] / scale for p in pts if math.isfinite(p[0])]
        ys = [lv.reference(p[1]) for p in pts if math.isfinite(p[0])]
        ax.plot(xs, ys, "o", ms=4, color=color,
                label=f"{tr.polarity}: 10-90 % {tr.duration / scale:.4g} {prefix}s, "
                      f"overshoot {100 * tr.overshoot:.2f} %")
    ax.set_xlabel(f"time from rising edge ({prefix}s)" if ap is not None else f"time ({prefix}s)")
    ax.set_ylabel("V")
    title = f"{metrics.channel or ''}"
    if metrics.flags:
        title += "  [" + ", ".join(metrics.flags) + "]"
    ax.set_title(title.strip())
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize="small")
    return fig, ax
