"""Reports to file: one self-contained HTML page per result, for a calibration record or
a design review.

A report is built from what a result gives (``to_dict()``, ``summary()``, ``plot()``) into
a :class:`Report` (:mod:`.document`), then written as HTML (:mod:`.html`) with its
pictures inside.  matplotlib is imported only when a picture is drawn.

>>> from taumatch.report import Report, Headline, render_html
>>> page = render_html(Report("a <test>", (("capture", "x.csv"),), Headline("compensated", "good")))
>>> "<h1>a &lt;test&gt;</h1>" in page
True
"""

from __future__ import annotations

from pathlib import Path

from ..atomic import atomic_write
from ..errors import InputError
from .batch import batch_report
from .document import Figure, Headline, Link, Notes, Report, Section, Table, Text, figure_png
from .html import render_html
from .views import budget_table, chain_report, diagnosis_report, divider_report, plus_minus

__all__ = ["Figure", "Headline", "Link", "Notes", "Report", "Section", "Table", "Text",
           "batch_report", "budget_table", "chain_report", "check_report_path", "diagnosis_report", "divider_report",
           "figure_png", "plus_minus", "render_html", "write_report"]

SUFFIXES = (".html", ".htm")


def check_report_path(path, option: str = "report") -> Path:
    """Refuse, before any work is done, a report path that cannot be written."""
    p = Path(path)
    if p.suffix.lower() not in SUFFIXES:
        raise InputError(f"{option} {path}: a report is an HTML page; name it with .html "
                         f"(got {p.suffix or 'no suffix'})")
    folder = p.parent if str(p.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"{option} {path}: the folder {folder} does not exist")
    if p.is_dir():
        raise InputError(f"{option} {path}: that is a folder; name a file ending in .html")
    return p


def write_report(report: Report, path, option: str = "report") -> Path:
    """Write ``report`` as HTML to ``path`` atomically and return the path."""
    from .. import __version__

    p = check_report_path(path, option)
    try:
        return atomic_write(p, render_html(report, version=__version__))
    except OSError as exc:
        raise InputError(f"{option} {path}: cannot write ({exc.strerror or exc})") from None
