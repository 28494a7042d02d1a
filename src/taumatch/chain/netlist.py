"""A chain as a deck in the widely used SPICE text format.

One card per element: ``R``, ``C``, ``L`` and ``E`` (voltage-controlled voltage source)
cards, the source as a ``V`` card with a ``PULSE`` waveform built from the chain's source
(and ``AC 1`` for small-signal runs), ``.tran`` and ``.ac`` lines and a comment header.
Lines are written out as the same pi-section ladder taumatch uses in the time domain
(series ``R`` and ``L`` per section, half a section's ``C`` at each end).  Values are
written as plain floating-point numbers (``9e+06``), which every SPICE reads the same way
(no ``M``/``MEG`` ambiguity).

The source edge and the instrument's front end are not physical parts; they are written as
the behavioural cards taumatch models them with (``E`` buffers driving ``R``-``C`` or
``R``-``L``-``C`` sections), so the deck simulates the same network.  The ``PULSE`` edge
itself is made short (``1e-6`` of the run) because the edge filter shapes it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from .build import ChainNetwork

__all__ = ["Deck", "deck", "netlist_text"]


@dataclass(frozen=True)
class Deck:
    """A chain's deck and what it holds.

    Attributes
    ----------
    text : str
        The deck (:func:`netlist_text`).
    elements : int
        Element cards (every line that is neither a comment nor a dot command).
    line_sections : int
        Pi sections per cable (0 for a chain without one).
    tstop, fstart, fstop : float
        End of the transient run [s] and the ``.ac`` sweep [Hz]
        (:attr:`taumatch.chain.model.ChainModel.netlist_window`).
    """

    text: str
    elements: int
    line_sections: int
    tstop: float
    fstart: float
    fstop: float

    def to_dict(self) -> dict:
        return {"elements": self.elements, "line_sections": self.line_sections,
                "tstop": self.tstop, "fstart": self.fstart, "fstop": self.fstop}

    def summary(self) -> str:
        cables = f", cables as {self.line_sections} pi sections" if self.line_sections else ""
        return f"{self.elements} cards{cables}"


def deck(chain, sections: int | None = None) -> Deck:
    """The deck of ``chain``: its full build with the source edge, cables as ``sections``
    pi sections each (default: as many as the time domain uses), the runs' windows from
    the chain's :class:`~taumatch.chain.model.ChainModel`."""
    from .model import ChainModel

    model = ChainModel.from_chain(chain, sections=sections)
    n = model.sections or 1
    tstop, fstart, fstop = model.netlist_window
    full = model.built_with_edge
    text = netlist_text(chain, full, n, tstop=tstop, fstart=fstart, fstop=fstop)
    cards = [ln for ln in text.splitlines() if ln and ln[0] not in "*."]
    return Deck(text, len(cards), n if full.lines() else 0, tstop, fstart, fstop)


def _num(x: float) -> str:
    return f"{x:.12g}"


def _card(letter: str, name: str) -> str:
    return name if name[:1].upper() == letter else f"{letter}{name}"


def netlist_text(chain, cn: ChainNetwork, sections: int, *, tstop: float, fstart: float,
                 fstop: float, points: int = 1000, title: str | None = None) -> str:
    """The deck as text.

    Parameters
    ----------
    chain : Chain
        The chain (for the source waveform and the header).
    cn : ChainNetwork
        Its ``"full"`` build (:func:`taumatch.chain.build.build`).
    sections : int
        Pi sections per line.
    tstop : float
        End of the transient run [s].
    fstart, fstop : float
        Range of the ``.ac`` sweep [Hz].
    points : int
        Transient print step is ``tstop / points``; the sweep has ``points // 20`` points
        per decade (at least 10).
    title : str, optional
        First line of the deck (SPICE treats it as the title).

    Returns
    -------
    str
    """
    from .. import network as net

    if cn.mode != "full":
        raise InputError(f"netlist: needs a full build, got mode {cn.mode!r}")
    if not (isinstance(sections, int) and sections >= 1):
        raise InputError(f"netlist: sections must be a whole number >= 1, got {sections!r}")
    if not (tstop > 0 and 0 < fstart < fstop):
        raise InputError(
            f"netlist: need tstop > 0 and 0 < fstart < fstop, got {tstop!r}, {fstart!r}, {fstop!r}"
        )
    src = chain.source
    edge = tstop * 1e-6
    if src.period is not None:
        width = max(src.period / 2 - edge, edge)
        pulse = f"PULSE(0 {_num(src.amplitude)} 0 {_num(edge)} {_num(edge)} {_num(width)} " \
                f"{_num(src.period)})"
    else:
        pulse = f"PULSE(0 {_num(src.amplitude)} 0 {_num(edge)} {_num(edge)} {_num(10 * tstop)} " \
                f"{_num(20 * tstop)})"
    def one_line(text) -> str:  # free text never breaks out of a comment card
        return " ".join(str(text).split())

    has_line = any(p.kind == "line" for p in chain.parts)
    out = [
        one_line(title) if title else f"* {one_line(chain.name or 'chain')}",
        f"* chain spec: {one_line(chain.origin)}; written by taumatch",
        f"* parts: {', '.join(p.kind for p in chain.parts)}",
        *(f"* part {k} ({p.kind}): {one_line(p.label)}" for k, p in enumerate(chain.parts, 1)
          if getattr(p, "label", "")),
        (f"* lines as {sections} pi sections each; " if has_line else "* ")
        + f"output node {cn.output}, probe point {cn.probe}",
        "* source edge and front-end filters are behavioural (E buffers with R-C / R-L-C)",
    ]
    if chain.is_high_voltage("square" if src.period else "step"):
        out.append("* HIGH VOLTAGE: check ratings, measurement category and earthing before use")
    for e in cn.elements:
        if isinstance(e, net.Resistor):
            out.append(f"{_card('R', e.name)} {e.a} {e.b} {_num(e.value)}")
        elif isinstance(e, net.Conductance):
            out.append(f"{_card('R', e.name)} {e.a} {e.b} {_num(1.0 / e.value)}")
        elif isinstance(e, net.Capacitor):
            out.append(f"{_card('C', e.name)} {e.a} {e.b} {_num(e.value)}")
        elif isinstance(e, net.Inductor):
            out.append(f"{_card('L', e.name)} {e.a} {e.b} {_num(e.value)}")
        elif isinstance(e, net.VCVS):
            out.append(f"{_card('E', e.name)} {e.plus} {e.minus} {e.ctrl_plus} {e.ctrl_minus} "
                       f"{_num(e.gain)}")
        elif isinstance(e, net.VoltageSource):
            out.append(f"{_card('V', e.name)} {e.a} {e.b} DC 0 AC 1 {pulse}")
        elif isinstance(e, net.Line):
            out.extend(_ladder(e, sections))
        else:  # pragma: no cover - build() makes only the elements above
            raise InputError(f"netlist: cannot write element {e!r}")
    per_decade = max(10, points // 20)
    out.append(f".tran {_num(tstop / points)} {_num(tstop)}")
    out.append(f".ac dec {per_decade} {_num(fstart)} {_num(fstop)}")
    out.append(f".print tran v({cn.output})")
    out.append(".end")
    return "\n".join(out) + "\n"


def _ladder(line, n: int) -> list[str]:
    """Cards of ``n`` pi sections (as :func:`taumatch.network.mna.build` stamps them)."""
    delta = line.length / n
    name = line.name
    nodes = [line.a] + [f"{name}_{k}" for k in range(1, n)] + [line.b]
    cards = [(f"* line {name}: {_num(line.length)} m, Z0 {_num(math.sqrt(line.l / line.c))} "
              f"ohm, {n} pi sections")]
    for k in range(n):
        a, b = nodes[k], nodes[k + 1]
        if line.r:
            m = f"{name}_m{k + 1}"
            cards.append(f"R{name}_{k + 1} {a} {m} {_num(line.r * delta)}")
            cards.append(f"L{name}_{k + 1} {m} {b} {_num(line.l * delta)}")
        else:
            cards.append(f"L{name}_{k + 1} {a} {b} {_num(line.l * delta)}")
    for k, node in enumerate(nodes):
        share = 0.5 if k in (0, n) else 1.0
        cards.append(f"C{name}_c{k} {node} 0 {_num(share * line.c * delta)}")
        if line.g:
            cards.append(f"R{name}_g{k} {node} 0 {_num(1.0 / (share * line.g * delta))}")
    return cards
