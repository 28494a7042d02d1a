"""Picture of a diagnosis: the averaged capture, the fit and the trimmed prediction."""

from __future__ import annotations

import numpy as np

from . import new_axes
from .response import _time_scale

__all__ = ["plot_diagnosis"]


def plot_diagnosis(d, axes=None):
    """Two panels: one period (capture, fit, after the trim) and the residual; returns (fig, axes)."""
    if axes is None:
        fig, axes = new_axes(None, nrows=2, ncols=1, sharex=True,
                             gridspec_kw={"height_ratios": [3, 1]}, figsize=(9, 6))
    else:
        fig = axes[0].figure
    f = d.fit
    t, v = f.t, f.v
    scale, unit = _time_scale(float(np.max(np.abs(t))))
    ax, axr = axes
    ax.plot(t / scale, v, color="0.55", lw=0.8, label="capture (averaged period)")
    ax.plot(t / scale, f.model(t), color="tab:blue", lw=1.4, label="fitted chain")
    if d.trim is not None:  # no trim, no prediction (no divider seen)
        ax.plot(t / scale, f.model(t, trimmed=True), color="tab:green", lw=1.4, ls="--",
                label="predicted after the trim")
    e = d.hf_dc_error
    band = f", within ±{100 * d.band:.2g} %" if d.verdict in ("compensated", "no divider") else ""
    ax.set_title(f"{d.verdict}: gain error {100 * e.value:+.2f} % ± {100 * (e.stderr or 0):.2f} %"
                 f"{band}")
    ax.set_ylabel("volts")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize=8)
    axr.plot(t / scale, v - f.model(t), color="tab:red", lw=0.6)
    axr.axhline(0, color="k", lw=0.5)
    axr.set_ylabel("residual (V)")
    axr.set_xlabel(f"time from the rising edge ({unit})")
    axr.grid(True, alpha=0.3)
    return fig, axes
