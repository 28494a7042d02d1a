"""Pictures of a chain's figures: response and step, input impedance, predicted waveform."""

from __future__ import annotations

import numpy as np

from . import new_axes

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
    ax_m.semilogx(f, 20 * np.log10(np.maximum(h / ref, 1e-12)), label="|H| / reference")
    if np.isfinite(figures.bandwidth.upper):
        ax_m.axvline(figures.bandwidth.upper, ls="--", color="grey",
                     label=f"-3 dB at {figures.bandwidth.upper:.4g} Hz")
    ax_m.set_ylim(bottom=max(ax_m.get_ylim()[0], -60))
    ax_m.set_xlabel("frequency (Hz)")
    ax_m.set_ylabel("gain (dB)")
    ax_m.legend(loc="lower left")
    ax_m.grid(True, which="both", alpha=0.3)
    if ax_s is not None and figures.step is not None:
        st = model.step
        keep = st.t <= st.t_fast
        ax_s.plot(st.t[keep], st.y[keep], label="chain step (ideal source edge)")
        if figures.displayed is not None:
            ds = model.displayed_step
            keep = ds.t <= st.t_fast
            ax_s.plot(ds.t[keep], ds.y[keep], label="with the source edge")
        ax_s.set_xlabel("time (s)")
        ax_s.set_ylabel("output (V per V)")
        ax_s.legend(loc="lower right")
        ax_s.grid(True, alpha=0.3)
    if ax_z is not None:
        plot_loading(figures.loading, ax=ax_z)
    fig.tight_layout()
    return fig, (ax_m, ax_s, ax_z) if ax_s is not None else ax_m


def plot_loading(loading, ax=None):
    """|Z_in| and its phase over frequency."""
    fig, ax = new_axes(ax)
    z = loading.impedance
    ax.loglog(loading.freqs, np.abs(z), label="|Z_in|")
    ax.set_xlabel("frequency (Hz)")
    ax.set_ylabel("|Z_in| (ohm)")
    ax.grid(True, which="both", alpha=0.3)
    ax2 = ax.twinx()
    ax2.semilogx(loading.freqs, np.degrees(np.angle(z)), color="tab:orange", label="phase")
    ax2.set_ylabel("phase (degrees)")
    from ..units import format_quantity

    ax.set_title(f"seen by the circuit: {format_quantity(loading.r, 'ohm')} || "
                 f"{format_quantity(loading.c, 'F')}")
    return fig, ax


def plot_prediction(prediction, ax=None):
    """The predicted waveform at the instrument."""
    fig, ax = new_axes(ax)
    label = prediction.waveform + (" after the trim" if prediction.trim is not None else "")
    ax.plot(prediction.t, prediction.v, label=label)
    ax.set_xlabel("time (s)")
    ax.set_ylabel("voltage at the instrument (V)")
    ax.set_title(prediction.name or "predicted response")
    ax.legend(loc="best")
    ax.grid(True, alpha=0.3)
    return fig, ax
