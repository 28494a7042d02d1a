"""Pictures of a chain's figures: response and step, input impedance, predicted waveform."""

from __future__ import annotations

import numpy as np

from ..units import format_quantity
from . import new_axes
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_figures", "plot_loading", "plot_prediction", "plot_trim_prediction"]


def plot_figures(figures, ax=None):
    """|H(f)| (exact) with the -3 dB point, the exact step response and |Z_in|.

    ``figures`` is a :class:`taumatch.analysis.figures.ChainFigures`: its ``freqs`` and
    ``response``, ``band``, the band to show (``view``), the steps (``step_curve``,
    ``displayed_curve``) and ``loading``.  With ``ax`` given (one axes) only the magnitude
    is drawn there.  Returns ``(fig, (gain, step, impedance))``, or ``(fig, gain)``.
    """
    f, h = figures.freqs, np.abs(figures.response)
    band = figures.band
    ax_z = ax_s = None
    if ax is None:
        fig, axes = new_axes(None, nrows=3)
        ax_m, ax_s, ax_z = axes
    else:
        fig, ax_m = new_axes(ax)
    ax_m.semilogx(f, 20 * np.log10(np.maximum(h / band.reference, 1e-12)),
                  color=COLORS["predicted"], lw=1.4, label="gain against the reference")
    if np.isfinite(band.upper):
        ax_m.axvline(band.upper, ls="--", color=COLORS["muted"],
                     label=f"−3 dB at {format_quantity(band.upper, 'Hz')}")
    ax_m.set_ylim(bottom=max(ax_m.get_ylim()[0], -60))
    ax_m.set_xlim(*figures.view)
    eng_axis(ax_m.xaxis, "Hz")
    unit_axis(ax_m.yaxis, "dB")
    ax_m.set_xlabel("frequency")
    ax_m.set_ylabel("gain")
    finish(ax_m, "frequency response", grid_which="both")
    if ax_s is not None and figures.step_curve is not None:
        t, y = figures.step_curve
        ax_s.plot(t, y, color=COLORS["predicted"], lw=1.4, label="chain step (ideal source edge)")
        if figures.displayed_curve is not None:
            t, y = figures.displayed_curve
            ax_s.plot(t, y, color=COLORS["second"], lw=1.4, label="with the source edge")
        eng_axis(ax_s.xaxis, "s")
        ax_s.set_xlabel("time")
        ax_s.set_ylabel("output (V per V)")
        finish(ax_s, "step response")
    if ax_z is not None:
        plot_loading(figures.loading, ax=ax_z)
        ax_z.set_xlim(ax_m.get_xlim())     # the same band as the gain above it
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


def plot_trim_prediction(tp, ax=None):
    """A chain's waveform as it is and after its trim (a
    :class:`taumatch.analysis.predict.TrimPrediction`)."""
    fig, ax = new_axes(ax)
    ax.plot(tp.t, tp.before, color=COLORS["measured"], lw=1.4, label="as it is")
    ax.plot(tp.t, tp.after, color=COLORS["predicted"], lw=1.4, label="after the trim")
    eng_axis(ax.xaxis, "s")
    eng_axis(ax.yaxis, "V")
    ax.set_xlabel("time")
    ax.set_ylabel("voltage at the instrument")
    wave = "square-wave" if tp.waveform == "square" else tp.waveform
    finish(ax, f"{tp.name or 'chain'}: {wave} response before and after the trim")
    return fig, ax
