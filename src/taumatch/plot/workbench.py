"""Pictures of bench work: two captures before and after a trim, and a batch of captures."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from . import new_axes, new_figure
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_batch", "plot_comparison"]


_SHORT = {"as predicted": "went as predicted", "short": "not far enough yet",
          "too far": "went too far", "wrong way": "went the wrong way",
          "no measurable change": "no measurable change",
          "no prediction": "no change was predicted"}


def plot_comparison(c, ax=None):
    """Both averaged periods (from the rising edge) and the first diagnosis's prediction after
    its trim, with the leading corner up close beside them; returns ``(fig, axes)`` (one axes
    when ``ax`` is given: the periods only)."""
    from .diagnosis import corner_window

    if ax is None:
        fig = new_figure(figsize=(11, 4.6))
        gs = fig.add_gridspec(1, 2, width_ratios=[1.6, 1], wspace=0.25)
        axes = (fig.add_subplot(gs[0]), fig.add_subplot(gs[1]))
    else:
        fig, axes = ax.figure, (ax,)
    curves = []
    for d, name, color in ((c.before, c.names[0], COLORS["second"]),
                           (c.after, c.names[1], COLORS["measured"])):
        ap = d.metrics.averaged
        e = d.to_dict()["hf_dc_error"]["value"]
        curves.append((np.asarray(ap.t), np.asarray(ap.v), f"{name}: {100 * e:+.2f} %", color))
    pred = c.before.to_dict().get("prediction") or {}
    if pred.get("times") is not None:
        curves.append((np.asarray(pred["times"]), np.asarray(pred["square_after"]),
                       f"{c.names[0]}: predicted after its trim", COLORS["predicted"]))
    lo, hi = corner_window(c.before, curves[0][0])
    for k, a in enumerate(axes):
        for i, (t, v, label, color) in enumerate(curves):
            keep = slice(None) if k == 0 else (t >= lo) & (t <= hi)
            a.plot(t[keep], v[keep], color=color, lw=1.0 if i == 2 else 1.3,
                   ls="--" if i == 2 else "-", label=label)
        eng_axis(a.xaxis, "s")
        eng_axis(a.yaxis, "V")
        a.set_xlabel("time from the rising edge")
        a.set_ylabel("voltage")
    frac = (f" ({100 * c.fraction:.0f} % ± {100 * c.fraction_stderr:.0f} % of the prediction)"
            if c.fraction is not None else "")
    finish(axes[0], f"before and after: {_SHORT.get(c.outcome, c.outcome)}{frac}", ncols=1)
    if len(axes) > 1:
        top = [v[(t >= max(lo, hi / 50)) & (t <= hi)] for t, v, *_ in curves]
        top = [x for x in top if x.size]
        if top:
            y0, y1 = min(float(x.min()) for x in top), max(float(x.max()) for x in top)
            pad = 0.15 * (y1 - y0) or 1e-3
            axes[1].set_ylim(y0 - pad, y1 + pad)
        axes[1].set_xlim(lo, hi)
        finish(axes[1], "leading corner, up close", legend=None)
    return fig, axes if len(axes) > 1 else axes[0]


def plot_batch(result, ax=None):
    """Gain error of each diagnosed capture with one standard error, and the tolerance band."""
    rows = [r for r in result.rows if r.ok]
    fig, ax = new_axes(ax, figsize=(8, max(2.5, 0.3 * len(rows) + 1.2)))
    y = np.arange(len(rows))
    err = np.array([100 * r.gain_error for r in rows])
    se = np.array([100 * (r.gain_error_stderr or 0) for r in rows])
    tol = 100 * result.tolerance
    ax.axvspan(-tol, tol, color=COLORS["band"], alpha=0.12, label=f"within ±{tol:g} %")
    ax.errorbar(err, y, xerr=se, fmt="o", color=COLORS["measured"], ms=4, capsize=3,
                label="gain error ± one standard error")
    ax.axvline(0, color=COLORS["muted"], lw=0.8)
    ax.set_yticks(y, [Path(r.file).name for r in rows])
    ax.invert_yaxis()
    ax.set_xlabel("high/low-frequency gain error")
    unit_axis(ax.xaxis, "%")
    failed = len(result.rows) - len(rows)
    finish(ax, f"{len(rows)} captures diagnosed" + (f", {failed} not" if failed else ""))
    ax.grid(False, axis="y")
    return fig, ax
