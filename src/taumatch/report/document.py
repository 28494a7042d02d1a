"""The parts a report is made of: a title, inputs, a headline, sections of tables, notes
and pictures.  Plain values only; :mod:`taumatch.report.html` turns them into a page.

Pictures are kept as PNG bytes, so a report holds everything it shows and needs no file
or network beside it.
"""

from __future__ import annotations

import io
from dataclasses import dataclass, field

__all__ = ["Figure", "Headline", "Link", "Notes", "Report", "Section", "Table", "Text", "figure_png"]

#: how a headline is coloured: fine, needs a change, could not be answered
TONES = ("good", "change", "fail", "plain")


@dataclass(frozen=True)
class Headline:
    """The answer in one line (a verdict), and the tone it is shown in."""

    text: str
    tone: str = "plain"

    def __post_init__(self):
        if self.tone not in TONES:
            raise ValueError(f"headline tone must be one of {', '.join(TONES)}, got {self.tone!r}")


@dataclass(frozen=True)
class Link:
    """A table cell that points to another file beside the report (a relative path)."""

    text: str
    href: str


@dataclass(frozen=True)
class Table:
    """Rows of cells (strings, or :class:`Link`); ``header`` names the columns."""

    header: tuple
    rows: tuple
    caption: str = ""


@dataclass(frozen=True)
class Notes:
    """A list of sentences of one kind: ``warning``, ``caution``, ``check``, ``note``."""

    kind: str
    items: tuple


@dataclass(frozen=True)
class Text:
    """Preformatted text (a command's own summary), shown as it is."""

    body: str


@dataclass(frozen=True)
class Figure:
    """A picture as PNG bytes with a caption and a text alternative."""

    png: bytes
    caption: str
    alt: str


@dataclass(frozen=True)
class Section:
    """A heading and the blocks under it."""

    heading: str
    blocks: tuple


@dataclass(frozen=True)
class Report:
    """A whole report: what it is about, what went in, the answer, and the sections."""

    title: str
    inputs: tuple            # (name, value) pairs, as strings
    headline: Headline | None
    sections: tuple = field(default_factory=tuple)
    raw: dict | None = None  # the result's to_dict(), shown folded at the end (SI units)


def figure_png(fig, dpi: int = 110) -> bytes:
    """Draw a matplotlib figure to PNG bytes and close it."""
    import matplotlib.pyplot as plt

    buf = io.BytesIO()
    try:
        fig.savefig(buf, format="png", dpi=dpi, bbox_inches="tight")
    finally:
        plt.close(fig)
    return buf.getvalue()
