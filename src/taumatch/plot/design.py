"""Pictures of divider designs: frequency response trimmed vs untrimmed, Monte Carlo spread."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from . import new_axes

if TYPE_CHECKING:  # pragma: no cover
    from ..design.divider import DividerCurves
    from ..design.tolerance import MonteCarloResult

__all__ = ["plot_divider_response", "plot_monte_carlo"]


def plot_divider_response(curves: DividerCurves, ax=None):
    """Gain relative to the target ratio (dB) of the trimmed design and its worst untrimmed
    case, and for a column of several sections its lumped ladder.

    Parameters
    ----------
    curves : DividerCurves
        What :meth:`taumatch.design.divider.DividerDesign.curves` gives.
    ax : matplotlib Axes, optional

    Returns
    -------
    (Figure, Axes)
    """
    fig, ax = new_axes(ax)
    f = curves.f
    ax.semilogx(f, 20 * np.log10(np.abs(curves.untrimmed_worst)), "--",
                label="untrimmed, worst tolerance corner")
    ax.semilogx(f, 20 * np.log10(np.abs(curves.trimmed)), "-", label="trimmed (nominal parts)")
    if curves.ladder is not None:
        ax.semilogx(f, 20 * np.log10(np.abs(curves.ladder)), ":",
                    label=f"trimmed, {curves.sections}-section lumped ladder")
    ax.axhline(0.0, color="0.6", lw=0.8)
    ax.set_xlabel("frequency (Hz)")
    ax.set_ylabel(f"gain relative to 1/{curves.target_ratio:g} (dB)")
    kind = "distributed column model" if curves.column else "lumped two-arm model"
    ax.set_title(f"Divider {curves.target_ratio:g}:1, trimmer in the {curves.arm} arm ({kind})")
    ax.grid(True, which="both", alpha=0.3)
    ax.legend()
    return fig, ax


def plot_monte_carlo(result: MonteCarloResult, ax=None):
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
