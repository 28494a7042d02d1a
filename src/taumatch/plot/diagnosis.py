"""Picture of a diagnosis: the averaged capture with the fit on top, the residual, the
leading corner up close with the step predicted after the trim, and the fitted probe's
frequency response as found and as trimmed."""

from __future__ import annotations

import numpy as np

from . import new_figure
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_diagnosis"]


def plot_diagnosis(d, axes=None):
    """Draw a :class:`~taumatch.Diagnosis`; returns ``(fig, axes)``.

    ``axes`` are, in order: the averaged period (capture, fit, prediction after the trim),
    the residual, the leading corner up close, the gain and the phase of the fitted probe
    (as found and as trimmed).  Given two axes (period, residual), only those are drawn.
    """
    f = d.fit
    t, v = np.asarray(f.t), np.asarray(f.v)
    fitted = f.model(t)
    after = f.model(t, trimmed=True) if d.trim is not None else None  # no trim, no prediction
    if axes is None:
        fig = new_figure(figsize=(11, 8.2))
        gs = fig.add_gridspec(2, 2, height_ratios=[4.2, 2.6], width_ratios=[1.55, 1],
                              hspace=0.42, wspace=0.28)
        left = gs[0, 0].subgridspec(2, 1, height_ratios=[3, 1.2], hspace=0.12)
        ax = fig.add_subplot(left[0])
        axr = fig.add_subplot(left[1], sharex=ax)
        axz = fig.add_subplot(gs[0, 1])
        axm, axp = fig.add_subplot(gs[1, 0]), fig.add_subplot(gs[1, 1])
        axes = (ax, axr, axz, axm, axp)
    else:
        fig = axes[0].figure
        axes = tuple(axes)
    ax, axr = axes[0], axes[1]
    _period(d, ax, t, v, fitted, after)
    axr.plot(t, v - fitted, color=COLORS["measured"], lw=0.5)
    axr.axhline(0, color=COLORS["ink"], lw=0.6)
    eng_axis(axr.xaxis, "s")
    eng_axis(axr.yaxis, "V")
    axr.set_xlabel("time from the rising edge")
    axr.set_ylabel("capture − fit")
    finish(axr, legend=None)
    if len(axes) >= 3:
        _corner(d, axes[2], t, v, fitted, after)
    if len(axes) >= 5:
        _bode(d, axes[3], axes[4])
    return fig, axes


def _period(d, ax, t, v, fitted, after):
    ax.plot(t, v, color=COLORS["measured"], lw=1.8, label="capture (averaged period)")
    ax.plot(t, fitted, color=COLORS["model"], lw=0.9, ls="--", label="fitted divider")
    if after is not None:
        ax.plot(t, after, color=COLORS["predicted"], lw=1.1, label="predicted after the trim")
    e = d.hf_dc_error
    band = f", within ±{100 * d.band:.2g} %" if d.verdict in ("compensated", "no divider") else ""
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_ylabel("voltage")
    ax.tick_params(labelbottom=False)
    finish(ax, f"{d.verdict}: gain error {100 * e.value:+.2f} % ± {100 * (e.stderr or 0):.2f} %"
               f"{band}")


def corner_window(d, t):
    """Time window (s) of the leading corner: from just before the rising edge to three
    divider time constants after it, at most half the period."""
    tau = d.fit.estimates["time_constant"].value
    half = 0.5 * (t[-1] - t[0])
    end = min(3 * tau, half) if np.isfinite(tau) and tau > 0 else half / 4
    edge = max(d.fit.estimates["edge_time"].value, 0.0)
    return -max(2 * edge, end / 40), end


def _corner(d, ax, t, v, fitted, after):
    lo, hi = corner_window(d, t)
    keep = (t >= lo) & (t <= hi)
    ax.plot(t[keep], v[keep], color=COLORS["measured"], lw=1.2, label="capture")
    ax.plot(t[keep], fitted[keep], color=COLORS["model"], lw=0.9, ls="--", label="fit")
    if after is not None:
        ax.plot(t[keep], after[keep], color=COLORS["predicted"], lw=1.1, label="after the trim")
    # the plateau, not the whole jump: from the settled level to the corner's extremes
    edge = max(d.fit.estimates["edge_time"].value, 0.0)
    late = keep & (t > max(4 * edge, hi / 50))
    curves = [v[late], fitted[late]] + ([after[late]] if after is not None else [])
    if late.any():
        y0 = min(float(np.min(c)) for c in curves)
        y1 = max(float(np.max(c)) for c in curves)
        pad = 0.15 * (y1 - y0) or 0.01 * abs(y1) or 1e-3
        ax.set_ylim(y0 - pad, y1 + pad)
    ax.set_xlim(lo, hi)
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time from the rising edge")
    ax.set_ylabel("voltage")
    finish(ax, "leading corner, up close")


def bode_band(d):
    """Frequencies (Hz) that show the divider's transition: a decade and a half either side
    of 1/(2π τ), τ the divider's time constant."""
    tau = d.fit.estimates["time_constant"].value
    fc = 1.0 / (2 * np.pi * tau)
    return np.logspace(np.log10(fc / 30), np.log10(fc * 30), 300)


def _bode(d, axm, axp):
    f = bode_band(d)
    cases = [(False, "as found", COLORS["model"], "-")]
    if d.trim:
        cases.append((True, "as trimmed", COLORS["predicted"], "-"))
    for trimmed, label, color, ls in cases:
        H = d.fit.transfer(trimmed=trimmed, edge=False)
        h = H.freqresp(f) / H.dc_gain
        axm.semilogx(f, 20 * np.log10(np.abs(h)), color=color, ls=ls, lw=1.4, label=label)
        axp.semilogx(f, np.degrees(np.angle(h)), color=color, ls=ls, lw=1.4, label=label)
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
