"""What a chain spec tells the diagnosis: arm resistances, nominal shunt capacitance, trimmer.

The two-arm view of a chain: the tip arm is the series part with the largest resistance
(R1 ∥ C1); everything from the divider's output node to ground is the shunt arm —
shunt parts, the cable's total capacitance (per-metre c × length), the instrument
input's R ∥ C.  Slow-time-scale view: inductances and the cable's series resistance do
not matter at the divider's time constant (microseconds to milliseconds).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError

__all__ = ["ChainFacts", "facts_from_chain", "facts_from_spec"]

#: Where a combined tolerance came from, by how many of its elements the spec gave one.
SPEC, MIXED, DEFAULT = "chain spec", "chain spec and defaults", "default"


class _Sum:
    """A sum of values with independent tolerances (half-widths combined in quadrature,
    which keeps the standard uncertainty of a rectangular sum: JCGM 100 4.3.7 and 5.1.2)."""

    def __init__(self):
        self.value, self.sq, self.given, self.count = 0.0, 0.0, 0, 0

    def add(self, value, half_width, given):
        self.value += value
        self.sq += half_width**2
        self.given += bool(given)
        self.count += 1

    @property
    def half_width(self):
        return math.sqrt(self.sq)

    @property
    def origin(self):
        if self.count == 0 or self.given == 0:
            return DEFAULT
        return SPEC if self.given == self.count else MIXED


@dataclass(frozen=True)
class ChainFacts:
    """What a chain spec tells the diagnosis: resistances, nominal shunt C and the trimmer.

    Attributes
    ----------
    tip_r, shunt_r : float
        Tip-arm and shunt-arm resistance (ohm).
    shunt_c, tip_c : float or None
        Nominal total shunt and tip capacitance (F).
    adjust_part, adjust_field : int or None, str or None
        1-based part number and field of the trimmer, if the spec marks one.
    adjust_arm : {"shunt", "tip"} or None
        Which arm the trimmer sits in.
    adjust_present, adjust_min, adjust_max : float or None
        Present value and range of the trimmer (F).
    lead_l, lead_r : float
        Series inductance (H) between the source and the tip arm (ground lead, tip wiring) and
        the loop's resistance (ohm, the source's included).
    name : str
        The chain's name.
    fixed_c : float or None
        Capacitance of the trimmer's arm apart from the trimmer (F).
    tolerances : tuple
        ``(name, half-width in SI, origin)`` for ``tip_r``, ``shunt_r``, ``shunt_c``,
        ``fixed_c``, ``lead_l``, ``lead_r`` and ``trimmer``: the spec's tolerances where it
        gives them (:mod:`taumatch.chain.tolerance`), the defaults elsewhere, combined over
        the parts that make up each value; origin "chain spec", "chain spec and defaults"
        or "default".  The trimmer's default is half its range (it may be set anywhere in
        it), or ±50 % without one.
    source_amplitude, source_period : float or None
        The spec's source step (V) and period (s).
    high_voltage_trimmer : bool
        True when the trimmer sits in the tip (high-voltage) arm.
    """

    tip_r: float
    shunt_r: float
    shunt_c: float | None = None
    tip_c: float | None = None
    lead_l: float = 0.0
    lead_r: float = 0.0
    adjust_part: int | None = None
    adjust_field: str | None = None
    adjust_arm: str | None = None
    adjust_present: float | None = None
    adjust_min: float | None = None
    adjust_max: float | None = None
    name: str = ""
    fixed_c: float | None = None
    tolerances: tuple = ()
    source_amplitude: float | None = None
    source_period: float | None = None

    def tolerance(self, name: str):
        """``(half-width, origin)`` of one of :attr:`tolerances`, or None."""
        for key, half, origin in self.tolerances:
            if key == name:
                return half, origin
        return None


def facts_from_chain(chain) -> ChainFacts:
    """Reduce a :class:`taumatch.chain.Chain` to the two-arm facts and their tolerances."""
    from .chain.tolerance import default_for

    given = {(n, f): t for n, f, t in chain.tolerances}

    def tol(number, field, value, unit):
        t = given.get((number, field))
        return (t or default_for(unit)).half_width(value), t is not None

    tips = [(i, p) for i, p in enumerate(chain.parts, 1) if p.kind == "series" and p.r]
    if not tips:
        raise InputError(f"{chain.origin}: no series part with a resistance: no tip arm to diagnose")
    tip_no, tip = max(tips, key=lambda ip: ip[1].r)
    adj = chain.adjustable
    adj_no = adj[0] if adj is not None else None
    conductance, shunt_c, fixed = _Sum(), _Sum(), _Sum()

    def conduct(r, half, given_):  # a resistance to ground, as a conductance
        conductance.add(1.0 / r, half / r**2, given_)

    trim_tol = _trimmer_tolerance(adj, given) if adj is not None else None

    def capacitance(number, field, c, half, given_):
        if number == adj_no and adj[2].field == field:  # the trimmer: its own tolerance
            shunt_c.add(c, trim_tol[0], trim_tol[1] == SPEC)
        else:
            shunt_c.add(c, half, given_)
            fixed.add(c, half, given_)

    for i, p in enumerate(chain.parts, 1):
        if i <= tip_no:
            continue
        if p.kind in ("shunt", "input", "buffer"):
            if getattr(p, "r", None):
                conduct(p.r, *tol(i, "r", p.r, "ohm"))
            if getattr(p, "c", None):
                capacitance(i, "c", p.c, *tol(i, "c", p.c, "F"))
            branch = getattr(p, "branch", None)
            if branch is not None:
                capacitance(i, "branch.c", branch.c, *_default_tol(branch.c, "F"))
            if p.kind == "buffer":
                break  # the buffer isolates what follows
        elif p.kind == "line":
            half, g_ = tol(i, "c", p.c, "F/m")
            capacitance(i, "c", p.c * p.length, half * p.length, g_)
            if p.g:
                half, g_ = tol(i, "g", p.g, "ohm")
                conductance.add(p.g * p.length, half * p.length, g_)
    if conductance.value <= 0:
        raise InputError(f"{chain.origin}: the shunt arm has no resistance to ground")
    lead_l, lead_r = _Sum(), _Sum()
    rs = chain.source.resistance or 0.0
    if rs:
        lead_r.add(rs, *tol(0, "resistance", rs, "ohm"))
    for i, p in enumerate(chain.parts[: tip_no - 1], 1):
        if p.kind == "lead":
            lead_l.add(p.inductance, *_default_tol(p.inductance, "H"))
            if p.r:
                lead_r.add(p.r, *tol(i, "r", p.r, "ohm"))
        elif p.kind == "series":
            if p.l:
                lead_l.add(p.l, *tol(i, "l", p.l, "H"))
            if p.r and not p.c:
                lead_r.add(p.r, *tol(i, "r", p.r, "ohm"))
    g = conductance.value
    r2 = 1.0 / g
    tip_half, tip_given = tol(tip_no, "r", tip.r, "ohm")
    tolerances = [("tip_r", tip_half, SPEC if tip_given else DEFAULT),
                  ("shunt_r", r2 * conductance.half_width / g, conductance.origin),
                  ("lead_l", lead_l.half_width, lead_l.origin),
                  ("lead_r", lead_r.half_width, lead_r.origin)]
    if shunt_c.count:
        tolerances.append(("shunt_c", shunt_c.half_width, shunt_c.origin))
    facts = {"tip_r": tip.r, "lead_l": lead_l.value, "lead_r": lead_r.value, "shunt_r": r2,
             "shunt_c": shunt_c.value if shunt_c.value > 0 else None, "tip_c": tip.c,
             "name": chain.name, "source_amplitude": chain.source.amplitude,
             "source_period": chain.source.period}
    if adj is not None:
        number, part, a = adj
        if a.field != "c":
            raise InputError(f"{chain.origin}: part {number} ({part.kind}): the diagnosis trims a "
                             f"capacitance; adjust = {a.field!r} is not one")
        if number == tip_no:
            arm = "tip"
        elif number > tip_no and part.kind in ("shunt", "input"):
            arm = "shunt"
        else:
            raise InputError(f"{chain.origin}: part {number} ({part.kind}): the trimmer must sit in "
                             "the tip arm or the shunt arm")
        tolerances.append(("trimmer", *trim_tol))
        if arm == "shunt":
            tolerances.append(("fixed_c", fixed.half_width, fixed.origin))
        facts.update(adjust_part=number, adjust_field=a.field, adjust_arm=arm,
                     adjust_present=part.c, adjust_min=a.min, adjust_max=a.max,
                     fixed_c=fixed.value if arm == "shunt" else 0.0)
    return ChainFacts(**facts, tolerances=tuple(tolerances))


def _trimmer_tolerance(adj, given) -> tuple:
    """``(half-width, origin)`` of the trimmer's setting: the spec's, else anywhere in its
    range, else ±50 %."""
    number, part, a = adj
    t = given.get((number, a.field))
    value = part.value_of(a.field)
    if t is not None:
        return t.half_width(value), SPEC
    if a.min is not None and a.max is not None:
        return 0.5 * (a.max - a.min), "default: anywhere in its range"
    return 0.5 * value, "default: ±50 %, no range given"


def _default_tol(value, unit):
    """The default half-width of a value the spec cannot give a tolerance for."""
    from .chain.tolerance import default_for

    return default_for(unit).half_width(value), False


def facts_from_spec(path) -> ChainFacts:
    """Load a chain spec (TOML) and reduce it to the two-arm facts."""
    from .chain import load

    return facts_from_chain(load(path))
