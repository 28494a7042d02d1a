"""Pictures of divider designs: frequency response trimmed vs untrimmed, Monte Carlo spread."""

from __future__ import annotations

import numpy as np

from . import new_axes
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_divider_response", "plot_monte_carlo"]


def _span(design):
    """Frequencies (Hz) where the divider's response can change: from a decade and a half
    below its slowest corner 1/(2π τ) to a decade and a half above its fastest."""
    tau = [t for t in (design.r1 * design.c1, design.r2 * design.c2,
                       design.r1 * design.earth_c) if t > 0]
    lo = 1.0 / (2 * np.pi * max(tau)) / 30
    hi = 1.0 / (2 * np.pi * min(tau)) * 30
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
    for trimmed, label, style, color in (
            (False, "untrimmed, worst tolerance corner", "--", COLORS["model"]),
            (True, "trimmed (nominal parts)", "-", COLORS["predicted"])):
        h = np.abs(design.response(f, trimmed=trimmed))
        ax.semilogx(f, 20 * np.log10(h), style, color=color, lw=1.4, label=label)
    if design.earth_c > 0 and design.sections > 1:
        from ..design.hv import ladder_response

        h = ladder_response(2j * np.pi * f, design.r1, design.c1, design.r2, design.c2,
                            design.earth_c, design.sections) * design.target_ratio
        ax.semilogx(f, 20 * np.log10(np.abs(h)), ":", color=COLORS["second"], lw=1.4,
                    label=f"trimmed, {design.sections}-section lumped ladder")
    ax.axhline(0.0, color=COLORS["muted"], lw=0.8)
    ax.set_xlim(f[0], f[-1])
    eng_axis(ax.xaxis, "Hz")
    unit_axis(ax.yaxis, "dB")
    ax.set_xlabel("frequency")
    ax.set_ylabel(f"gain against 1/{design.target_ratio:g}")
    kind = "distributed column model" if design.earth_c > 0 else "lumped two-arm model"
    finish(ax, f"divider {design.target_ratio:g}:1, trimmer in the {design.trimmer_arm} arm "
               f"({kind})", ncols=2, grid_which="both")
    return fig, ax


def plot_monte_carlo(result, ax=None):
    """Histogram of the trimmer value each Monte Carlo draw needs, with the trimmer's range."""
    fig, ax = new_axes(ax)
    ax.hist(result.trim, bins=80, color=COLORS["measured"], alpha=0.85, label="draws")
    lo, hi = result.trimmer
    for k, v in enumerate((lo, hi)):
        ax.axvline(v, color=COLORS["model"], ls="--", lw=1.2,
                   label="the trimmer's range" if k == 0 else None)
    ylo, yhi = result.trimmer_for_yield
    ax.axvspan(ylo, yhi, color=COLORS["band"], alpha=0.15,
               label=f"{100 * result.yield_target:g} % of draws")
    eng_axis(ax.xaxis, "F")
    ax.set_xlabel("trimmer capacitance needed")
    ax.set_ylabel("draws")
    finish(ax, f"Monte Carlo, {result.draws} draws: yield of the trimmer "
               f"{100 * result.yield_of_trimmer:.2f} %")
    return fig, ax
