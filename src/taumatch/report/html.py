"""A :class:`~taumatch.report.document.Report` as one self-contained HTML page.

Everything the page shows is inside it: the style sheet inline, the pictures as
``data:image/png;base64`` addresses, no script, no font or file from elsewhere, so it
opens the same on a machine without a network and can be filed as it is.  Every piece
of text is escaped; nothing a capture or a chain spec holds can become markup.
"""

from __future__ import annotations

import base64
import json
from datetime import datetime, timezone
from html import escape
from urllib.parse import quote

from .document import Figure, Headline, Link, Notes, Report, Table, Text

__all__ = ["render_html"]

_STYLE = """
:root { --ink:#1d2733; --muted:#5b6675; --rule:#d5dbe3; --accent:#0f6e73;
        --good:#2f7d32; --change:#9a5b00; --fail:#a8322d; --paper:#fbfcfd; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 62rem; padding: 1.5rem 1.25rem 3rem; color: var(--ink);
       background: var(--paper); font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; }
header { border-bottom: 3px solid var(--accent); margin-bottom: 1rem; }
h1 { font-size: 1.45rem; margin: 0 0 .25rem; }
h2 { font-size: 1.1rem; margin: 1.6rem 0 .5rem; color: var(--accent);
     border-bottom: 1px solid var(--rule); padding-bottom: .2rem; }
.stamp { color: var(--muted); font-size: .85rem; margin: 0 0 .6rem; }
.headline { font-size: 1.15rem; font-weight: 600; padding: .6rem .9rem; border-radius: 4px;
            border-left: 6px solid var(--muted); background: #eef1f4; }
.headline.good { border-color: var(--good); background: #e9f3ea; }
.headline.change { border-color: var(--change); background: #f8efe2; }
.headline.fail { border-color: var(--fail); background: #f7e7e6; }
table { border-collapse: collapse; margin: .4rem 0 .8rem; font-variant-numeric: tabular-nums; }
caption { text-align: left; color: var(--muted); font-size: .85rem; padding-bottom: .2rem; }
th, td { text-align: left; padding: .25rem .8rem .25rem 0; border-bottom: 1px solid var(--rule);
         vertical-align: top; }
th { font-weight: 600; color: var(--muted); }
ul.notes { padding-left: 1.2rem; margin: .3rem 0 .8rem; }
ul.notes li { margin: .2rem 0; }
ul.warning li::marker { color: var(--change); }
ul.caution { border: 2px solid var(--fail); border-radius: 4px; padding: .5rem .8rem .5rem 1.8rem; }
ul.caution li::marker { color: var(--fail); }
figure { margin: .8rem 0 1.2rem; }
figure img { max-width: 100%; height: auto; border: 1px solid var(--rule); background: #fff; }
figcaption { color: var(--muted); font-size: .85rem; }
pre { background: #f0f3f6; padding: .6rem .8rem; overflow-x: auto; font-size: .82rem; }
details summary { cursor: pointer; color: var(--accent); }
footer { margin-top: 2rem; color: var(--muted); font-size: .8rem; }
"""


def render_html(report: Report, *, generated: datetime | None = None, version: str = "") -> str:
    """The page for ``report``, as a string.

    Parameters
    ----------
    report : Report
        What to show.
    generated : datetime, optional
        The time stamp printed under the title (default: now, UTC).
    version : str
        The taumatch version printed in the footer.
    """
    when = (generated or datetime.now(timezone.utc)).strftime("%Y-%m-%d %H:%M %Z").strip()
    out = ["<!DOCTYPE html>", '<html lang="en">', "<head>", '<meta charset="utf-8">',
           '<meta name="viewport" content="width=device-width, initial-scale=1">',
           '<link rel="icon" href="data:,">',
           f"<title>{escape(report.title)}</title>", f"<style>{_STYLE}</style>", "</head>",
           "<body>", "<header>", f"<h1>{escape(report.title)}</h1>",
           f'<p class="stamp">made by taumatch {escape(version)} on {escape(when)}</p>',
           "</header>"]
    if report.headline is not None:
        out.append(_headline(report.headline))
    if report.inputs:
        out.append("<h2>Inputs</h2>")
        out.append(_table(Table(("input", "value"), tuple(report.inputs))))
    for section in report.sections:
        out.append(f"<h2>{escape(section.heading)}</h2>")
        out.extend(_block(b) for b in section.blocks)
    if report.raw is not None:
        text = json.dumps(report.raw, indent=2, ensure_ascii=False, default=_plain)
        out.append("<h2>All figures</h2>")
        out.append("<details><summary>the result as JSON (SI units: V, s, F, Ω, Hz; fractions, "
                   "not per cent)</summary>")
        out.append(f"<pre>{escape(text)}</pre></details>")
    out.append("<footer>Figures in engineering notation; uncertainties are one standard error "
               "unless stated otherwise.</footer>")
    out.extend(["</body>", "</html>", ""])
    return "\n".join(out)


def _plain(obj):
    """numpy values and complex numbers for the folded JSON (display only: NaN stays NaN)."""
    if hasattr(obj, "tolist"):
        return obj.tolist()
    if isinstance(obj, complex):
        return [obj.real, obj.imag]
    return str(obj)


def _headline(h: Headline) -> str:
    return f'<p class="headline {h.tone}">{escape(h.text)}</p>'


def _block(b) -> str:
    if isinstance(b, Table):
        return _table(b)
    if isinstance(b, Notes):
        items = "".join(f"<li>{escape(str(i))}</li>" for i in b.items)
        return f'<ul class="notes {escape(b.kind)}">{items}</ul>'
    if isinstance(b, Text):
        return f"<pre>{escape(b.body)}</pre>"
    if isinstance(b, Figure):
        data = base64.b64encode(b.png).decode("ascii")
        return (f'<figure><img src="data:image/png;base64,{data}" alt="{escape(b.alt)}">'
                f"<figcaption>{escape(b.caption)}</figcaption></figure>")
    if isinstance(b, Headline):
        return _headline(b)
    raise TypeError(f"a report cannot show a {type(b).__name__}")


def _table(t: Table) -> str:
    cap = f"<caption>{escape(t.caption)}</caption>" if t.caption else ""
    head = "".join(f"<th>{escape(str(c))}</th>" for c in t.header)
    rows = "".join("<tr>" + "".join(f"<td>{_cell(c)}</td>" for c in r) + "</tr>"
                   for r in t.rows)
    return f"<table>{cap}<thead><tr>{head}</tr></thead><tbody>{rows}</tbody></table>"


def _cell(c) -> str:
    if isinstance(c, Link):
        href = c.href.replace("\\", "/")
        if ":" in href.split("/")[0] or href.startswith("/"):
            return escape(c.text)   # only files beside the report: nothing to fetch from afar
        return f'<a href="{escape(quote(href, safe="/#"))}">{escape(c.text)}</a>'
    return escape(str(c))
