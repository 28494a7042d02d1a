"""Pictures of divider designs: frequency response trimmed vs untrimmed, Monte Carlo spread."""

from __future__ import annotations

import numpy as np

from . import new_axes
from .style import COLORS, eng_axis, finish, unit_axis

__all__ = ["plot_divider_response", "plot_monte_carlo"]


def plot_divider_response(curves, ax=None):
    """Gain relative to the target ratio (dB) of the trimmed design and its worst untrimmed
    case, and for a column of several sections its lumped ladder.

    Parameters
    ----------
    curves : taumatch.design.divider.DividerCurves
        What :meth:`taumatch.design.divider.DividerDesign.curves` gives (the arrays and the
        band :attr:`~taumatch.design.divider.DividerCurves.view` to show).
    ax : matplotlib Axes, optional

    Returns
    -------
    (Figure, Axes)
    """
    fig, ax = new_axes(ax)
    f = curves.f
    worst = 20 * np.log10(np.abs(curves.untrimmed_worst))
    ax.semilogx(f, worst, "--", color=COLORS["model"], lw=1.4,
                label="untrimmed, worst tolerance corner")
    ax.semilogx(f, 20 * np.log10(np.abs(curves.trimmed)), "-", color=COLORS["predicted"], lw=1.4,
                label="trimmed (nominal parts)")
    if curves.ladder is not None:
        ax.semilogx(f, 20 * np.log10(np.abs(curves.ladder)), ":", color=COLORS["second"], lw=1.4,
                    label=f"trimmed, {curves.sections}-section lumped ladder")
    ax.axhline(0.0, color=COLORS["muted"], lw=0.8)
    ax.set_xlim(*curves.view)
    eng_axis(ax.xaxis, "Hz")
    unit_axis(ax.yaxis, "dB")
    ax.set_xlabel("frequency")
    ax.set_ylabel(f"gain against 1/{curves.target_ratio:g}")
    kind = "distributed column model" if curves.column else "lumped two-arm model"
    finish(ax, f"divider {curves.target_ratio:g}:1, trimmer in the {curves.arm} arm ({kind})",
           ncols=2, grid_which="both")
    return fig, ax


def plot_monte_carlo(result, ax=None):
    """Histogram of the trimmer value each Monte Carlo draw needs, with the trimmer's range
    (a :class:`taumatch.design.tolerance.MonteCarloResult`: its draws ``trim``, ``trimmer``,
    ``trimmer_for_yield``, ``yield_target``, ``draws`` and ``yield_of_trimmer``)."""
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
