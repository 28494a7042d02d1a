"""Pictures of bench work: two captures before and after a trim, and a batch of captures."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from . import new_axes, new_figure
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_batch", "plot_comparison"]


_ROLES = {"before": (COLORS["second"], "-", 1.3), "after": (COLORS["measured"], "-", 1.3),
          "predicted": (COLORS["predicted"], "--", 1.0)}


def plot_comparison(curves, ax=None):
    """Draw a comparison's curves (:class:`taumatch.workbench.compare.ComparisonCurves`):
    both averaged periods and the first diagnosis's prediction after its trim, with the
    leading corner up close beside them; returns ``(fig, axes)`` (one axes when ``ax`` is
    given: the periods only)."""
    if ax is None:
        fig = new_figure(figsize=(11, 4.6))
        gs = fig.add_gridspec(1, 2, width_ratios=[1.6, 1], wspace=0.25)
        axes = (fig.add_subplot(gs[0]), fig.add_subplot(gs[1]))
    else:
        fig, axes = ax.figure, (ax,)
    lo, hi = curves.corner
    for k, a in enumerate(axes):
        for t, v, label, role in curves.curves:
            color, ls, lw = _ROLES[role]
            keep = slice(None) if k == 0 else (t >= lo) & (t <= hi)
            a.plot(t[keep], v[keep], color=color, lw=lw, ls=ls, label=label)
        eng_axis(a.xaxis, "s")
        eng_axis(a.yaxis, "V")
        a.set_xlabel("time from the rising edge")
        a.set_ylabel("voltage")
    finish(axes[0], curves.title, ncols=1)
    if len(axes) > 1:
        top = [v[(t >= curves.plateau_from) & (t <= hi)] for t, v, *_ in curves.curves]
        top = [x for x in top if x.size]
        if top:
            y0, y1 = min(float(x.min()) for x in top), max(float(x.max()) for x in top)
            pad = 0.15 * (y1 - y0) or 1e-3
            axes[1].set_ylim(y0 - pad, y1 + pad)
        axes[1].set_xlim(lo, hi)
        finish(axes[1], "leading corner, up close", legend=None)
    return fig, axes if len(axes) > 1 else axes[0]


def plot_batch(result, ax=None):
    """Gain error of each diagnosed capture with one standard error, and the acceptance band."""
    rows = [r for r in result.rows if r.ok]
    fig, ax = new_axes(ax, figsize=(8, max(2.5, 0.3 * len(rows) + 1.2)))
    y = np.arange(len(rows))
    err = np.array([100 * r.gain_error for r in rows])
    se = np.array([100 * (r.gain_error_stderr or 0) for r in rows])
    tol = 100 * result.accept
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
