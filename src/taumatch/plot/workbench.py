"""Pictures of bench work: two captures before and after a trim, and a batch of captures."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from . import new_axes
from .response import _time_scale

__all__ = ["plot_batch", "plot_comparison"]


def plot_comparison(c, ax=None):
    """Both averaged periods (from the rising edge) and the first diagnosis's prediction after
    its trim; returns ``(fig, ax)``."""
    fig, ax = new_axes(ax)
    curves = []
    for d, name, style in ((c.before, c.names[0], {"color": "#9a5b00", "lw": 1.1}),
                           (c.after, c.names[1], {"color": "#0f6e73", "lw": 1.1})):
        ap = d.metrics.averaged
        e = d.to_dict()["hf_dc_error"]["value"]
        curves.append((np.asarray(ap.t), np.asarray(ap.v), f"{name}: {100 * e:+.2f} %", style))
    pred = c.before.to_dict().get("prediction") or {}
    span = max(float(np.ptp(t)) for t, *_ in curves)
    scale, unit = _time_scale(span)
    for t, v, label, style in curves:
        ax.plot(t / scale, v, label=label, **style)
    if pred.get("times") is not None:
        ax.plot(np.asarray(pred["times"]) / scale, pred["square_after"], color="0.25", lw=0.9,
                ls="--", label=f"{c.names[0]}: predicted after its trim")
    ax.set_xlabel(f"time from the rising edge ({unit})")
    ax.set_ylabel("voltage (V)")
    ax.set_title(f"before and after: {c.describe().split(';')[0]}")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="upper right", fontsize="small")
    return fig, ax


def plot_batch(result, ax=None):
    """Gain error of each diagnosed capture with one standard error, and the tolerance band."""
    rows = [r for r in result.rows if r.ok]
    fig, ax = new_axes(ax, figsize=(8, max(2.5, 0.3 * len(rows) + 1.2)))
    y = np.arange(len(rows))
    err = np.array([100 * r.gain_error for r in rows])
    se = np.array([100 * (r.gain_error_stderr or 0) for r in rows])
    tol = 100 * result.tolerance
    ax.axvspan(-tol, tol, color="#2f7d32", alpha=0.12, label=f"within ±{tol:g} %")
    ax.errorbar(err, y, xerr=se, fmt="o", color="#0f6e73", ms=4, capsize=3,
                label="gain error ± one standard error")
    ax.axvline(0, color="0.4", lw=0.8)
    ax.set_yticks(y, [Path(r.file).name for r in rows])
    ax.invert_yaxis()
    ax.set_xlabel("high/low-frequency gain error (%)")
    failed = len(result.rows) - len(rows)
    ax.set_title(f"{len(rows)} captures diagnosed" + (f", {failed} not" if failed else ""))
    ax.grid(True, axis="x", alpha=0.3)
    ax.legend(loc="lower right", fontsize="small")
    return fig, ax
