"""Pictures of divider designs: frequency response trimmed vs untrimmed, Monte Carlo spread."""

from __future__ import annotations

import numpy as np

from . import new_axes

__all__ = ["plot_divider_response", "plot_monte_carlo"]


def _span(design):
    """Frequency span (Hz) around the divider's time constants."""
    tau = [design.r1 * design.c1, design.r2 * design.c2]
    if design.earth_c > 0:
        tau.append(design.r1 * design.earth_c)
    lo = 1.0 / (2 * np.pi * max(tau)) / 100
    hi = 1.0 / (2 * np.pi * min(t for t in tau if t > 0)) * 1e3
    return np.logspace(np.log10(lo), np.log10(hi), 400)


def plot_divider_response(design, ax=None, f=None):
    """Gain relative to the target ratio (dB) of the trimmed design and its worst untrimmed case.

    Parameters
    ----------
    design : DividerDesign
        The design (its ``response`` method gives the complex gain).
    ax : matplotlib Axes, optional
    f : array, optional
        Frequencies, Hz.

    Returns
    -------
    (Figure, Axes)
    """
    fig, ax = new_axes(ax)
    f = _span(design) if f is None else np.asarray(f, dtype=float)
    for trimmed, label, style in ((False, "untrimmed, worst tolerance corner", "--"),
                                  (True, "trimmed (nominal parts)", "-")):
        h = np.abs(design.response(f, trimmed=trimmed))
        ax.semilogx(f, 20 * np.log10(h), style, label=label)
    if design.earth_c > 0 and design.sections > 1:
        from ..design.hv import ladder_response

        h = ladder_response(2j * np.pi * f, design.r1, design.c1, design.r2, design.c2,
                            design.earth_c, design.sections) * design.target_ratio
        ax.semilogx(f, 20 * np.log10(np.abs(h)), ":",
                    label=f"trimmed, {design.sections}-section lumped ladder")
    ax.axhline(0.0, color="0.6", lw=0.8)
    ax.set_xlabel("frequency (Hz)")
    ax.set_ylabel(f"gain relative to 1/{design.target_ratio:g} (dB)")
    kind = "distributed column model" if design.earth_c > 0 else "lumped two-arm model"
    ax.set_title(f"Divider {design.target_ratio:g}:1, trimmer in the {design.trimmer_arm} arm "
                 f"({kind})")
    ax.grid(True, which="both", alpha=0.3)
    ax.legend()
    return fig, ax


def plot_monte_carlo(result, ax=None):
    """Histogram of the trimmer value each Monte Carlo draw needs, with the trimmer's range."""
    fig, ax = new_axes(ax)
    ax.hist(result.trim * 1e12, bins=80, color="C0", alpha=0.8)
    lo, hi = result.trimmer
    for v in (lo, hi):
        ax.axvline(v * 1e12, color="C3", ls="--")
    ylo, yhi = result.trimmer_for_yield
    ax.axvspan(ylo * 1e12, yhi * 1e12, color="C2", alpha=0.15,
               label=f"{100 * result.yield_target:g} % of draws")
    ax.set_xlabel("trimmer capacitance needed (pF)")
    ax.set_ylabel("draws")
    ax.set_title(f"Monte Carlo, {result.draws} draws: yield of the trimmer "
                 f"{100 * result.yield_of_trimmer:.2f} %")
    ax.legend()
    return fig, ax
