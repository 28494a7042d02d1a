"""The one look of taumatch's pictures: its colours, engineering-notation axes, legends that
sit outside the data, and words (not identifiers) in titles.

Every picture module draws with these helpers, so a capture, a chain and a design look
alike: measured data solid and strong, a fitted model thin and dashed on top of it, a
prediction in the accent colour, thin grey grid, legend above the plot area.
"""

from __future__ import annotations

__all__ = ["COLORS", "eng_axis", "finish", "legend_outside", "readable", "unit_axis"]

#: the palette: ink for text and rules, then the roles curves play
COLORS = {
    "ink": "#1d2733",
    "measured": "#3a4a5c",   # what the instrument saw
    "model": "#d9480f",      # what was fitted to it
    "predicted": "#0f6e73",  # what the trim would give
    "second": "#9a5b00",     # a second capture or case
    "band": "#2f7d32",       # tolerance bands, "within"
    "grid": "#d5dbe3",
    "muted": "#7b8794",
}

_FLAG_WORDS = {
    "few_periods": "few periods",
    "edge_unresolved": "edge not resolved",
    "not_settled": "not settled",
    "low_snr": "low signal-to-noise",
    "tilt": "tilted plateaus",
    "clipped": "clipped",
}


def readable(flag: str) -> str:
    """A flag or key as words for a title: ``'edge_unresolved'`` → ``'edge not resolved'``."""
    return _FLAG_WORDS.get(flag, flag.replace("_", " "))


def eng_axis(axis, unit: str, places: int | None = None) -> None:
    """Tick labels in engineering notation with the unit on each (``100 µs``, ``200 mV``)."""
    from matplotlib.ticker import EngFormatter

    axis.set_major_formatter(EngFormatter(unit=unit, places=places))


def unit_axis(axis, unit: str) -> None:
    """Tick labels as plain numbers with a unit that takes no prefix (``-3 dB``, ``45°``)."""
    from matplotlib.ticker import FuncFormatter

    sep = "" if unit == "°" else " "
    axis.set_major_formatter(FuncFormatter(lambda x, _pos: f"{x:g}{sep}{unit}".replace("-", "−")))


def legend_outside(ax, where: str = "above", ncols: int | None = None):
    """A legend beside the plot area, never over the data: rows above it (``'above'``) or a
    column to its right (``'right'``).  Returns the number of rows it takes above the axes."""
    handles, _labels = ax.get_legend_handles_labels()
    if not handles:
        return 0
    if where == "right":
        ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), borderaxespad=0.0,
                  fontsize="small", frameon=False)
        return 0
    n = ncols or min(len(handles), 3)
    ax.legend(loc="lower left", bbox_to_anchor=(0.0, 1.01), ncols=n, borderaxespad=0.0,
              fontsize="small", frameon=False, handlelength=1.8, columnspacing=1.2)
    return -(-len(handles) // n)


def finish(ax, title: str | None = None, legend: str | None = "above",
           ncols: int | None = None, grid_which: str = "major") -> None:
    """The common look: thin grid under the data, quiet spines, the legend outside the plot
    area and the title, in words, above it all."""
    ax.grid(True, which=grid_which, color=COLORS["grid"], lw=0.6)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    for side in ("left", "bottom"):
        ax.spines[side].set_color(COLORS["muted"])
    ax.tick_params(colors=COLORS["ink"], labelsize="small")
    rows = legend_outside(ax, legend, ncols) if legend else 0
    if title:
        ax.set_title(title if " " in title else readable(title), loc="left", fontsize="medium",
                     color=COLORS["ink"], pad=6 + 13 * rows)
