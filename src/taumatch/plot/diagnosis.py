"""Picture of a diagnosis: the averaged capture with the fit on top, the residual, the
leading corner up close with the step predicted after the trim, and the fitted probe's
frequency response as found and as trimmed.  Everything drawn is carried by the
diagnosis's curves (:class:`taumatch.diagnosis_curves.DiagnosisCurves`)."""

from __future__ import annotations

import numpy as np

from . import new_figure
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_diagnosis"]


def plot_diagnosis(curves, ax=None):
    """Draw a diagnosis's curves; returns ``(fig, axes)``.

    ``axes`` are, in order: the averaged period (capture, fit, prediction after the trim),
    the residual, the leading corner up close, the gain and the phase of the fitted probe
    (as found and as trimmed).  Given one axes, only the period is drawn there; given two
    (period, residual), only those.
    """
    c = curves
    if ax is None:
        fig = new_figure(figsize=(11, 8.2))
        gs = fig.add_gridspec(2, 2, height_ratios=[4.2, 2.6], width_ratios=[1.55, 1],
                              hspace=0.42, wspace=0.28)
        left = gs[0, 0].subgridspec(2, 1, height_ratios=[3, 1.2], hspace=0.12)
        top = fig.add_subplot(left[0])
        axr = fig.add_subplot(left[1], sharex=top)
        axz = fig.add_subplot(gs[0, 1])
        axm, axp = fig.add_subplot(gs[1, 0]), fig.add_subplot(gs[1, 1])
        axes = (top, axr, axz, axm, axp)
    else:
        axes = tuple(np.atleast_1d(ax).ravel())
        fig = axes[0].figure
    _period(c, axes[0], residual_below=len(axes) >= 2)
    if len(axes) >= 2:
        axr = axes[1]
        axr.plot(c.t, c.v - c.fitted, color=COLORS["measured"], lw=0.5)
        axr.axhline(0, color=COLORS["ink"], lw=0.6)
        eng_axis(axr.xaxis, "s")
        eng_axis(axr.yaxis, "V")
        axr.set_xlabel("time from the rising edge")
        axr.set_ylabel("capture − fit")
        finish(axr, legend=None)
    if len(axes) >= 3:
        _corner(c, axes[2])
    if len(axes) >= 5:
        _bode(c, axes[3], axes[4])
    return fig, axes


def _period(c, ax, residual_below: bool = True):
    ax.plot(c.t, c.v, color=COLORS["measured"], lw=1.8, label="capture (averaged period)")
    ax.plot(c.t, c.fitted, color=COLORS["model"], lw=0.9, ls="--", label="fitted divider")
    if c.after is not None:
        ax.plot(c.t, c.after, color=COLORS["predicted"], lw=1.1, label="predicted after the trim")
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_ylabel("voltage")
    if residual_below:
        ax.tick_params(labelbottom=False)
    else:
        ax.set_xlabel("time from the rising edge")
    finish(ax, c.headline)


def _corner(c, ax):
    t = c.t
    lo, hi = c.corner
    keep = (t >= lo) & (t <= hi)
    ax.plot(t[keep], c.v[keep], color=COLORS["measured"], lw=1.2, label="capture")
    ax.plot(t[keep], c.fitted[keep], color=COLORS["model"], lw=0.9, ls="--", label="fit")
    if c.after is not None:
        ax.plot(t[keep], c.after[keep], color=COLORS["predicted"], lw=1.1, label="after the trim")
    # the plateau, not the whole jump: from the settled level to the corner's extremes
    late = keep & (t > c.plateau_from)
    shown = [c.v[late], c.fitted[late]] + ([c.after[late]] if c.after is not None else [])
    if late.any():
        y0 = min(float(np.min(y)) for y in shown)
        y1 = max(float(np.max(y)) for y in shown)
        pad = 0.15 * (y1 - y0) or 0.01 * abs(y1) or 1e-3
        ax.set_ylim(y0 - pad, y1 + pad)
    ax.set_xlim(lo, hi)
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time from the rising edge")
    ax.set_ylabel("voltage")
    finish(ax, "leading corner, up close")


def _bode(c, axm, axp):
    f = c.f
    cases = [(c.found, "as found", COLORS["model"])]
    if c.trimmed is not None:
        cases.append((c.trimmed, "as trimmed", COLORS["predicted"]))
    for h, label, color in cases:
        axm.semilogx(f, 20 * np.log10(np.abs(h)), color=color, lw=1.4, label=label)
        axp.semilogx(f, np.degrees(np.angle(h)), color=color, lw=1.4, label=label)
    for a in (axm, axp):
        a.set_xlim(f[0], f[-1])
        eng_axis(a.xaxis, "Hz")
        a.set_xlabel("frequency")
    unit_axis(axm.yaxis, "dB")
    unit_axis(axp.yaxis, "°")
    axm.set_ylabel("gain against DC gain")
    axp.set_ylabel("phase")
    finish(axm, "fitted probe: gain", grid_which="both")
    finish(axp, "fitted probe: phase", grid_which="both")
