"""Writing a :class:`~taumatch.chain.parts.Chain` as a chain spec (TOML, version 1).

The inverse of :mod:`taumatch.chain.spec`: :func:`dumps` gives text that
:func:`taumatch.chain.spec.loads` reads back as the same chain (every field, labels, the
trimmer and the tolerances included; only ``origin``, which names the file, differs).
Tolerances are written by field: a relative one as a percentage (``"2%"``), an absolute
one as a number in SI units, as the spec reads them.  Numbers are written as
TOML floats with every digit Python needs to read them back exactly (``repr``), each with a
comment in engineering notation for the reader.

A front-end ``response`` without a ``bandwidth`` has no effect on the network, and the spec
does not accept one: it is not written.

Examples
--------
>>> from taumatch.chain import Chain, Input, Series, Source, loads
>>> chain = Chain(Source(50.0), (Series(r=9e6, c=12.2e-12, label="tip arm"),
...                              Input(r=1e6, c=110e-12)), name="10:1")
>>> text = dumps(chain)
>>> print(text.split(chr(10) * 2)[2])
[[part]]
kind = "series"
label = "tip arm"
r = 9000000.0  # 9 MΩ
c = 1.22e-11  # 12.2 pF
>>> loads(text).parts == chain.parts
True
"""

from __future__ import annotations

import math
from decimal import Decimal

from ..atomic import atomic_write
from ..units import format_quantity
from .parts import Buffer, Chain, Input, Lead, Line, Series, Shunt
from .spec import SPEC_VERSION

__all__ = ["dump", "dumps"]

_UNIT = {"r": "Ω", "c": "F", "l": "H", "length": "m", "radius": "m", "bandwidth": "Hz",
         "r_out": "Ω", "resistance": "Ω", "amplitude": "V", "period": "s", "rise_time": "s"}
_LINE_UNIT = {"r": "Ω/m", "l": "H/m", "c": "F/m", "g": "S/m", "length": "m"}
# fields of each part in the order the spec lists them
_FIELDS = {
    Series: ("r", "c", "l"),
    Shunt: ("r", "c", "l"),
    Line: ("length", "r", "l", "c", "g"),
    Lead: ("length", "radius", "r"),
    Input: ("r", "c", "bandwidth"),
    Buffer: ("r", "c", "gain", "bandwidth", "r_out"),
}


def _string(text: str) -> str:
    """A TOML basic string (quotes, backslashes and control characters escaped)."""
    out = ['"']
    for ch in text:
        code = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif code < 0x20 or code == 0x7F:
            out.append({"\t": "\\t", "\n": "\\n", "\r": "\\r"}.get(ch, f"\\u{code:04X}"))
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _number(value: float) -> str:
    text = repr(float(value))
    return text if ("." in text or "e" in text) else text + ".0"


def _comment(text: str) -> str:
    return " ".join(str(text).split())


def _percent(fraction: float) -> str:
    """The shortest percentage text that reads back as ``fraction``: exactly where a
    percentage can hold it (every tolerance a spec or an option gave), else to the last bit
    (``x / 100`` misses some fractions, such as 1/3, by one unit in the last place)."""
    hundred = 100.0 * fraction
    for candidate in [hundred] + [math.nextafter(hundred, d) for d in (math.inf, -math.inf)]:
        for digits in range(1, 18):
            text = format(Decimal(f"{candidate:.{digits}g}"), "f")  # no exponent
            if float(text) / 100.0 == fraction:
                return f'"{text}%"'
    return f'"{format(Decimal(repr(hundred)), "f")}%"'


def _tolerance_line(tols, units: dict) -> str | None:
    """``tolerance = { field = ..., ... }`` of one part's ``[(field, Tolerance)]``."""
    if not tols:
        return None
    items, shown = [], []
    for key, t in tols:
        unit = units.get(key, "").split("/")[0]
        items.append(f"{key} = {_percent(t.amount) if t.relative else _number(t.amount)}")
        shown.append(f"{key} {t.describe(unit)}")
    return f"tolerance = {{{', '.join(items)}}}  # {', '.join(shown)}"


def _field(name: str, value: float, unit: str) -> str:
    line = f"{name} = {_number(value)}"
    if unit:
        shown = (format_quantity(value, unit.split("/")[0]) + ("/" + unit.split("/")[1]
                 if "/" in unit else ""))
        line += f"  # {shown}"
    return line


def dumps(chain: Chain, comment: str | None = None) -> str:
    """The chain spec of ``chain`` as TOML text.

    Parameters
    ----------
    chain : Chain
    comment : str, optional
        Text written as comment lines at the top (one ``#`` line per line of text).
    """
    lines = []
    if comment:
        lines += [f"# {_comment(c)}" if c.strip() else "#" for c in str(comment).splitlines()]
    lines += [f"version = {SPEC_VERSION}", f"name = {_string(chain.name)}", "", "[source]"]
    tols = {}
    for number, key, t in chain.tolerances:
        tols.setdefault(number, []).append((key, t))
    src = chain.source
    for name in ("resistance", "amplitude", "period", "rise_time"):
        value = getattr(src, name)
        if value is not None:
            lines.append(_field(name, value, _UNIT[name]))
    line = _tolerance_line(tols.get(0), _UNIT)
    if line:
        lines.append(line)
    for number, part in enumerate(chain.parts, 1):
        lines += ["", "[[part]]", f"kind = {_string(part.kind)}"]
        if part.label:
            lines.append(f"label = {_string(part.label)}")
        units = _LINE_UNIT if isinstance(part, Line) else _UNIT
        for name in _FIELDS[type(part)]:
            value = getattr(part, name)
            if value is not None:
                lines.append(_field(name, value, units.get(name, "")))
        line = _tolerance_line(tols.get(number), units)
        if line:
            lines.append(line)
        if isinstance(part, (Input, Buffer)) and part.bandwidth is not None:
            lines.append(f"response = {_string(part.response)}")
        if isinstance(part, Shunt) and part.branch is not None:
            b = part.branch
            lines.append(f"branch = {{r = {_number(b.r)}, c = {_number(b.c)}}}  "
                         f"# {format_quantity(b.r, 'Ω')} + {format_quantity(b.c, 'F')}")
        marks = part.adjust_marks() if hasattr(part, "adjust_marks") else ()
        if len(marks) == 1:
            adj = marks[0]
            lines.append(f"adjust = {_string(adj.field)}")
            unit = _UNIT.get(adj.field.split(".")[-1], "")
            for key in ("min", "max"):
                value = getattr(adj, key)
                if value is not None:
                    lines.append(_field(key, value, unit))
        elif marks:  # several: each with its own range
            items = []
            for adj in marks:
                ends = [f"{key} = {_number(getattr(adj, key))}" for key in ("min", "max")
                        if getattr(adj, key) is not None]
                items.append(_string(adj.field) if not ends else
                             "{" + ", ".join([f"field = {_string(adj.field)}"] + ends) + "}")
            lines.append(f"adjust = [{', '.join(items)}]")
    return "\n".join(lines) + "\n"


def dump(chain: Chain, path, comment: str | None = None) -> None:
    """Write the chain spec of ``chain`` to ``path`` atomically (see :func:`dumps`)."""
    atomic_write(path, dumps(chain, comment))
