"""The values of a chain a fast-edge fit may move, each read and written by name.

A :class:`ChainField` names one value of one part (or of the source) and says what it is to
the fit: an *adjustment* (a field the spec marks ``adjust``) or a *parasitic* (a value the
spec states but nobody turns: the lead's inductance and resistance, a cable's loss and delay,
the instrument's input capacitance, the tip capacitance, the source's edge).  Two fields are
views, not spec keys: a lead's ``inductance`` (Grover's value; written back as the lead's
length at its radius) and a cable's ``delay`` (``length sqrt(l c)``; written back as ``l``
per metre, the capacitance per metre kept, since cable tables state it).

:func:`candidates` lists what a fast edge can in principle show; the fit decides from the
capture which of them it resolves (:mod:`taumatch.fit.chain_fit`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..chain.ground_lead import grover_inductance, lead_length_for_inductance
from ..chain.parts import Input, Lead, Line, Series
from ..chain.topology import tip_arm

__all__ = ["ADJUST", "PARASITIC", "ChainField", "candidates", "low_frequency_trimmer"]

ADJUST = "adjust"
PARASITIC = "parasitic"

_UNITS = {"r": "Ω", "c": "F", "l": "H", "inductance": "H", "delay": "s", "rise_time": "s",
          "resistance": "Ω", "bandwidth": "Hz"}
_LINE_UNITS = {"r": "Ω/m", "c": "F/m", "l": "H/m"}
#: Size a zero-valued resistance is judged against [ohm] (a lead or a lossless cable's r).
_R_FLOOR = {"lead": 10.0, "line": 10.0}


@dataclass(frozen=True)
class ChainField:
    """One value of a chain, by part number and field name.

    Attributes
    ----------
    part : int
        Part number from 1; 0 is the source.
    name : str
        ``"c"``, ``"r"``, ``"l"``, ``"branch.r"``, ``"branch.c"``, ``"rise_time"``, or the
        views ``"inductance"`` (a lead) and ``"delay"`` (a cable).
    role : {"adjust", "parasitic", "assumed"}
    kind : str
        The part's kind (``"source"`` for the source).
    label : str
        The part's label (may be empty).
    minimum, maximum : float or None
        The adjustment's range from the spec [SI], if any.
    """

    part: int
    name: str
    role: str
    kind: str
    label: str = ""
    minimum: float | None = None
    maximum: float | None = None

    @property
    def key(self) -> str:
        """A short unique name: ``"part4.branch.r"``, ``"source.rise_time"``."""
        return f"source.{self.name}" if self.part == 0 else f"part{self.part}.{self.name}"

    @property
    def unit(self) -> str:
        if self.kind == "line" and self.name in _LINE_UNITS:
            return _LINE_UNITS[self.name]
        return _UNITS[self.name.split(".")[-1]]

    @property
    def floor(self) -> float:
        """The size a zero value is judged against (0 where a value cannot be zero)."""
        return _R_FLOOR.get(self.kind, 0.0) if self.name == "r" else 0.0

    def describe(self) -> str:
        """``"part 4 (shunt, HF box) branch.r"``, or ``"source rise_time"``."""
        if self.part == 0:
            return f"source {self.name.replace('_', ' ')}"
        what = f"{self.kind}, {self.label}" if self.label else self.kind
        return f"part {self.part} ({what}) {self.name}"

    def get(self, chain) -> float:
        """The value [SI] in ``chain``."""
        if self.part == 0:
            return float(getattr(chain.source, self.name))
        p = chain.parts[self.part - 1]
        if self.name == "inductance":
            return float(p.inductance) if isinstance(p, Lead) else float(p.l)
        if self.name == "delay":
            return float(p.delay)
        return float(p.value_of(self.name))

    def set(self, chain, value: float):
        """A new chain with this field at ``value`` [SI]."""
        from dataclasses import replace

        value = float(value)
        if self.part == 0:
            return replace(chain, source=replace(chain.source, **{self.name: value}))
        p = chain.parts[self.part - 1]
        if self.name == "inductance" and isinstance(p, Lead):
            return chain.with_value(self.part, "length", lead_length_for_inductance(value, p.radius))
        if self.name == "inductance":
            return chain.with_value(self.part, "l", value)
        if self.name == "delay":
            return chain.with_value(self.part, "l", (value / p.length) ** 2 / p.c)
        return chain.with_value(self.part, self.name, value)

    def bounds(self, chain) -> tuple[float, float]:
        """Range the fit may search [SI]: a factor of 20 either way of the value in ``chain``
        (from zero for a resistance that may be zero), within the spec's own range for an
        adjustment, and for a lead no shorter than the straight-wire formula allows."""
        value = self.get(chain)
        lo = 0.0 if self.floor else value / 20
        hi = max(value, self.floor) * 20
        p = chain.parts[self.part - 1] if self.part else None
        if isinstance(p, Lead) and self.name == "inductance":
            lo = max(lo, 1.01 * grover_inductance(10 * p.radius, p.radius))
        if self.minimum is not None:
            lo = max(lo, self.minimum)
        if self.maximum is not None:
            hi = min(hi, self.maximum)
        return lo, hi

    def to_dict(self) -> dict:
        return {"part": self.part, "field": self.name, "kind": self.kind, "label": self.label,
                "role": self.role, "unit": self.unit}


def low_frequency_trimmer(chain) -> ChainField | None:
    """The low-frequency trimmer: the chain's :attr:`~taumatch.chain.parts.Chain.adjustable`
    when it names a plain capacitance ``c``; None otherwise."""
    adj = chain.adjustable
    if adj is None or adj[2].field != "c":
        return None
    number, part, a = adj
    return ChainField(number, "c", ADJUST, part.kind, part.label, a.min, a.max)


def candidates(chain) -> tuple[list, list]:
    """``(adjustments, parasitics)``: every ``adjust`` mark (the low-frequency trimmer
    among them: at a fast edge it is one more capacitance at its node) and every parasitic
    a fast edge may show.

    Parasitics: the source's edge (when the spec gives one), each lead's inductance and
    resistance, each inductor-only series part's inductance, the tip arm's capacitance, each
    cable's loss (``r`` per metre) and delay, the instrument's input capacitance (when
    given).
    """
    adjust = [ChainField(number, a.field, ADJUST, part.kind, part.label, a.min, a.max)
              for number, part, a in chain.adjustments]
    marked = {(f.part, f.name) for f in adjust}
    para = []
    if chain.source.rise_time is not None:
        para.append(ChainField(0, "rise_time", PARASITIC, "source"))
    tip = tip_arm(chain)
    for k, p in enumerate(chain.parts, 1):
        names = []
        if isinstance(p, Lead):
            names = ["inductance", "r"]
        elif isinstance(p, Series) and p.l is not None and p.r is None and p.c is None:
            names = ["inductance"]
        elif isinstance(p, Series) and k == tip and p.c is not None:
            names = ["c"]
        elif isinstance(p, Line):
            names = ["r", "delay"]
        elif isinstance(p, Input) and p.c is not None:
            names = ["c"]
        para += [ChainField(k, n, PARASITIC, p.kind, p.label) for n in names
                 if (k, n) not in marked]
    # a value that is zero (and cannot be, to be scaled) or beyond the float range is held
    return [f for f in adjust if _scalable(f, chain)], [f for f in para if _scalable(f, chain)]


def _scalable(f: ChainField, chain) -> bool:
    v = f.get(chain)
    return math.isfinite(v) and (v > 0 or (f.floor > 0 and v == 0))

