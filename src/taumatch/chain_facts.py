"""What a chain spec tells the diagnosis: arm resistances, nominal shunt capacitance, trimmer.

The two-arm view of a chain: the tip arm is the series part with the largest resistance
(R1 ∥ C1); everything from the divider's output node to ground is the shunt arm —
shunt parts, the cable's total capacitance (per-metre c × length), the instrument
input's R ∥ C.  Slow-time-scale view: inductances and the cable's series resistance do
not matter at the divider's time constant (microseconds to milliseconds).
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import InputError

__all__ = ["ChainFacts", "facts_from_chain", "facts_from_spec"]


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


def facts_from_chain(chain) -> ChainFacts:
    """Reduce a :class:`taumatch.chain.Chain` to the two-arm facts."""
    tips = [(i, p) for i, p in enumerate(chain.parts, 1) if p.kind == "series" and p.r]
    if not tips:
        raise InputError(f"{chain.origin}: no series part with a resistance: no tip arm to diagnose")
    tip_no, tip = max(tips, key=lambda ip: ip[1].r)
    g = 0.0
    c = 0.0
    for i, p in enumerate(chain.parts, 1):
        if i <= tip_no:
            continue
        if p.kind in ("shunt", "input"):
            if getattr(p, "r", None):
                g += 1.0 / p.r
            c += getattr(p, "c", None) or 0.0
            branch = getattr(p, "branch", None)
            if branch is not None:
                c += branch.c
        elif p.kind == "line":
            c += p.c * p.length
            g += p.g * p.length
        elif p.kind == "buffer":
            if p.r:
                g += 1.0 / p.r
            c += p.c or 0.0
            break  # the buffer isolates what follows
    if g <= 0:
        raise InputError(f"{chain.origin}: the shunt arm has no resistance to ground")
    lead_l = 0.0
    lead_r = chain.source.resistance or 0.0
    for p in chain.parts[: tip_no - 1]:
        if p.kind == "lead":
            lead_l += p.inductance
            lead_r += p.r
        elif p.kind == "series":
            lead_l += p.l or 0.0
            if p.r and not p.c:
                lead_r += p.r
    facts = dict(tip_r=tip.r, lead_l=lead_l, lead_r=lead_r, shunt_r=1.0 / g, shunt_c=c if c > 0 else None, tip_c=tip.c,
                 name=chain.name)
    adj = chain.adjustable
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
        facts.update(adjust_part=number, adjust_field=a.field, adjust_arm=arm,
                     adjust_present=part.c, adjust_min=a.min, adjust_max=a.max)
    return ChainFacts(**facts)


def facts_from_spec(path) -> ChainFacts:
    """Load a chain spec (TOML) and reduce it to the two-arm facts."""
    from .chain import load

    return facts_from_chain(load(path))
