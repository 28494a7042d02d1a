"""Pictures of a chain's figures: response and step, input impedance, predicted waveform."""

from __future__ import annotations

import numpy as np

from ..units import format_quantity
from . import new_axes
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_figures", "plot_loading", "plot_prediction"]


def plot_figures(figures, ax=None):
    """|H(f)| (exact) with the -3 dB point, the exact step response and |Z_in|.

    With ``ax`` given (one axes) only the magnitude is drawn there.
    """
    model = figures.model
    f, h = figures.freqs, np.abs(figures.response)
    ref = figures.bandwidth.reference
    ax_z = None
    if ax is None:
        fig, axes = new_axes(None, nrows=3)
        ax_m, ax_s, ax_z = axes
    else:
        fig, ax_m = new_axes(ax)
        ax_s = None
    ax_m.semilogx(f, 20 * np.log10(np.maximum(h / ref, 1e-12)), color=COLORS["predicted"],
                  lw=1.4, label="gain against the reference")
    if np.isfinite(figures.bandwidth.upper):
        ax_m.axvline(figures.bandwidth.upper, ls="--", color=COLORS["muted"],
                     label=f"−3 dB at {format_quantity(figures.bandwidth.upper, 'Hz')}")
    ax_m.set_ylim(bottom=max(ax_m.get_ylim()[0], -60))
    # up to a few times the bandwidth: the roll-off's start is what matters, not 10 GHz
    top = f[-1]
    if np.isfinite(figures.bandwidth.upper):
        top = min(top, 30 * figures.bandwidth.upper)
    ax_m.set_xlim(f[0], top)
    eng_axis(ax_m.xaxis, "Hz")
    unit_axis(ax_m.yaxis, "dB")
    ax_m.set_xlabel("frequency")
    ax_m.set_ylabel("gain")
    finish(ax_m, "frequency response", grid_which="both")
    if ax_s is not None and figures.step is not None:
        st = model.step
        keep = st.t <= st.t_fast
        ax_s.plot(st.t[keep], st.y[keep], color=COLORS["predicted"], lw=1.4,
                  label="chain step (ideal source edge)")
        if figures.displayed is not None:
            ds = model.displayed_step
            keep = ds.t <= st.t_fast
            ax_s.plot(ds.t[keep], ds.y[keep], color=COLORS["second"], lw=1.4,
                      label="with the source edge")
        eng_axis(ax_s.xaxis, "s")
        ax_s.set_xlabel("time")
        ax_s.set_ylabel("output (V per V)")
        finish(ax_s, "step response")
    if ax_z is not None:
        plot_loading(figures.loading, ax=ax_z)
        ax_z.set_xlim(ax_m.get_xlim())     # the same band as the gain above it
    if ax_z is not None:
        fig.set_size_inches(9, 11)
        fig.subplots_adjust(hspace=0.75)
    return fig, (ax_m, ax_s, ax_z) if ax_s is not None else ax_m


def plot_loading(loading, ax=None):
    """|Z_in| and its phase over frequency."""
    fig, ax = new_axes(ax)
    z = loading.impedance
    ax.loglog(loading.freqs, np.abs(z), color=COLORS["predicted"], lw=1.4, label="magnitude")
    ax.set_xlim(loading.freqs[0], loading.freqs[-1])
    eng_axis(ax.yaxis, "Ω")
    ax.set_xlabel("frequency")
    ax.set_ylabel("input impedance")
    ax2 = ax.twinx()
    ax2.semilogx(loading.freqs, np.degrees(np.angle(z)), color=COLORS["second"], lw=1.0,
                 ls="--", label="phase (right)")
    unit_axis(ax2.yaxis, "°")
    ax2.tick_params(colors=COLORS["ink"], labelsize="small")
    eng_axis(ax.xaxis, "Hz")     # after the twin's log scale, which resets the shared axis
    ax2.set_ylabel("phase")
    ax2.spines["top"].set_visible(False)
    ax.plot([], [], color=COLORS["second"], lw=1.0, ls="--", label="phase (right)")
    finish(ax, f"seen by the circuit: {format_quantity(loading.r, 'Ω')} ∥ "
               f"{format_quantity(loading.c, 'F')}")
    return fig, ax


def plot_prediction(prediction, ax=None):
    """The predicted waveform at the instrument."""
    fig, ax = new_axes(ax)
    label = prediction.waveform + (" after the trim" if prediction.trim is not None else "")
    ax.plot(prediction.t, prediction.v, color=COLORS["predicted"], lw=1.4, label=label)
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time")
    ax.set_ylabel("voltage at the instrument")
    finish(ax, prediction.name or "predicted response")
    return fig, ax
