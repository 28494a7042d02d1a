"""The overview page of a batch: one row per capture, linked to its own report."""

from __future__ import annotations

import os
from pathlib import Path

from .document import Figure, Headline, Link, Notes, Report, Section, Table, figure_png
from .views import plus_minus

__all__ = ["batch_report"]


def batch_report(result, *, title: str, inputs=(), page=None) -> Report:
    """The report of a :class:`~taumatch.workbench.BatchResult`.

    Parameters
    ----------
    result : BatchResult
        The batch.
    title : str
        The page title.
    inputs : sequence of (str, str)
        The settings as given.
    page : path, optional
        Where the page will be written; per-capture reports are linked relative to it.
    """
    data = result.to_dict()
    rows = []
    for r in result.rows:
        name = Path(r.file).name
        cell = name
        if r.report and page is not None:
            cell = Link(name, os.path.relpath(Path(r.report).resolve(),
                                              Path(page).resolve().parent))
        if r.ok:
            err = f"{100 * r.gain_error:+.2f} % ± {100 * (r.gain_error_stderr or 0):.2f} %"
            trim = "—" if r.shunt_change is None else (
                f"{'add' if r.shunt_change > 0 else 'remove'} "
                + plus_minus(abs(r.shunt_change), r.shunt_change_stderr, "F"))
            rows.append((cell, r.verdict, err, trim, "; ".join(r.warnings)))
        else:
            rows.append((cell, r.status.upper(), "—", "—", r.error or ""))
    failed = len(result.failed)
    head = (f"{data['diagnosed']} of {data['files']} captures diagnosed"
            + (f"; {failed} not (see below)" if failed else ""))
    sections = [Section("Captures", (Table(
        ("file", "verdict", "gain error ± standard error", "trim at the shunt arm",
         "warnings or reason"), tuple(rows),
        f"accepting ±{100 * result.accept:g} %; each file name links to its own report "
        "where one was written"),))]
    bad = [f"{Path(r.file).name}: {r.status}: {r.error}" for r in result.failed]
    if bad:
        sections.append(Section("Captures not diagnosed", (Notes("warning", tuple(bad)),)))
    if data["diagnosed"]:
        fig, _ = result.plot()
        sections.append(Section("Pictures", (Figure(
            figure_png(fig), "Gain error of each diagnosed capture with one standard error; "
            "the shaded band is the gain error accepted as compensated.", "gain errors of the batch"),)))
    tone = "fail" if failed else "plain"
    return Report(title, tuple(inputs), Headline(head, tone), tuple(sections), raw=data)
