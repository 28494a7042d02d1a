"""Questions of a chain's topology: the lead loop, the capacitance a line charges, which
lines are terminated, the front ends and buffer outputs.

These read the parts in order, the way the circuit is wired (a cascade from the probe point
to the instrument); the analyses ask here instead of inspecting part kinds themselves.
"""

from __future__ import annotations

from dataclasses import dataclass

from .parts import Buffer, Input, Lead, Line, Series, Shunt

__all__ = [
    "LeadLoop",
    "arm_of",
    "buffer_loads",
    "charged_capacitance",
    "front_ends",
    "is_terminated",
    "lead_loop",
    "line_impedances",
    "lossy_lines",
    "tip_arm",
    "with_lines_lumped",
    "with_series_resistance",
    "with_shunt_capacitance",
    "without_front_ends",
]


@dataclass(frozen=True)
class LeadLoop:
    """The loop that carries the tip current through the ground lead.

    Attributes
    ----------
    parts : tuple of int
        Numbers (from 1) of the parts in the loop: every lead, and every series part before
        the probe's first capacitive part (resistor-only series parts count as resistance).
    first_probe_part : int
        Number of the first part after the loop (the probe as the loop sees it).
    inductance : float
        Loop inductance [H] (Grover's value of each lead plus series inductances).
    resistance : float
        Loop resistance [ohm], the source resistance included.
    leads : tuple
        The :class:`~taumatch.chain.parts.Lead` parts (their radius gives a lead length for
        an inductance).
    """

    parts: tuple
    first_probe_part: int
    inductance: float
    resistance: float
    leads: tuple


def lead_loop(chain) -> LeadLoop | None:
    """The chain's lead loop, or None when it has no inductive lead before the probe."""
    numbers, first = [], len(chain.parts)
    for k, p in enumerate(chain.parts, 1):
        if isinstance(p, Lead) or (isinstance(p, Series) and p.r is None and p.c is None):
            numbers.append(k)
        elif isinstance(p, Series) and p.c is None and p.l is None:
            continue  # a resistor alone: part of the loop resistance
        else:
            first = k
            break
    if not numbers:
        return None
    inductance, resistance, leads = 0.0, chain.source.resistance, []
    for p in chain.parts[: first - 1]:
        if isinstance(p, Lead):
            inductance += p.inductance
            resistance += p.r
            leads.append(p)
        elif isinstance(p, Series):
            inductance += p.l or 0.0
            resistance += p.r or 0.0
    return LeadLoop(tuple(numbers), first, inductance, resistance, tuple(leads))


def is_terminated(chain, number: int) -> bool:
    """True when line part ``number`` (from 1) ends in a resistance to ground within a factor
    2 of its impedance (only shunt parts between): it then looks resistive, not capacitive."""
    parts = chain.parts
    z0 = parts[number - 1].impedance
    for p in parts[number:]:
        if isinstance(p, (Shunt, Input)) and p.r is not None:
            return z0 / 2 <= p.r <= 2 * z0
        if not isinstance(p, Shunt):
            return False
    return False


def charged_capacitance(chain, number: int) -> float:
    """Capacitance to ground [F] after part ``number`` up to the next series element or
    buffer: shunt, input and buffer-input capacitances, R-C branches and unterminated lines."""
    total = 0.0
    parts = chain.parts
    for j, p in enumerate(parts[number:], start=number + 1):
        if isinstance(p, Series) and (p.r is not None or p.c is not None):
            break
        if isinstance(p, (Shunt, Input, Buffer)) and p.c:
            total += p.c
        if isinstance(p, Shunt) and p.branch is not None:
            total += p.branch.c
        if isinstance(p, Line):
            if is_terminated(chain, j):
                break
            total += p.c * p.length
        if isinstance(p, Buffer):
            break
    return total


def _feeding_capacitance(chain, number: int):
    """A series capacitance feeding part ``number`` (a divider's tip arm), or None."""
    for p in reversed(chain.parts[: number - 1]):
        if isinstance(p, Series) and p.c is not None:
            return p.c
        if isinstance(p, (Series, Lead)):
            continue
        return None
    return None


def lossy_lines(chain):
    """``(number, resistance, capacitance)`` of every unterminated line with series loss: its
    total series resistance [ohm] and the capacitance it charges [F] (half its own plus what
    follows, in series with a tip arm's capacitance feeding it: Elmore's distributed RC)."""
    out = []
    for k, p in enumerate(chain.parts, 1):
        if isinstance(p, Line) and p.r > 0 and not is_terminated(chain, k):
            c_down = p.c * p.length / 2 + charged_capacitance(chain, k)
            c_up = _feeding_capacitance(chain, k)
            c_eff = c_down if c_up is None else c_up * c_down / (c_up + c_down)
            out.append((k, p.r * p.length, c_eff))
    return out


def front_ends(chain):
    """``(number, kind, bandwidth, response)`` of every part with a front-end filter."""
    return [(k, p.kind, p.bandwidth, p.response) for k, p in enumerate(chain.parts, 1)
            if isinstance(p, (Input, Buffer)) and p.bandwidth]


def buffer_loads(chain):
    """``(number, r_out, capacitance after)`` of every buffer with an output resistance."""
    return [(k, p.r_out, charged_capacitance(chain, k)) for k, p in enumerate(chain.parts, 1)
            if isinstance(p, Buffer) and p.r_out > 0]


def with_series_resistance(chain, before: int, resistance: float):
    """A copy of ``chain`` with a resistor of ``resistance`` [ohm] in series just before part
    ``before`` (from 1): a damping resistor in the lead loop."""
    from dataclasses import replace

    parts = list(chain.parts)
    parts.insert(before - 1, Series(r=resistance, label="damping resistor"))
    return replace(chain, parts=tuple(parts))


def with_lines_lumped(chain):
    """A copy of ``chain`` with every line replaced by its total capacitance (and shunt
    conductance) to ground: the chain as if its cables did not reflect."""
    from dataclasses import replace

    parts = []
    for p in chain.parts:
        if isinstance(p, Line):
            g = p.g * p.length
            parts.append(Shunt(r=1 / g if g > 0 else None, c=p.c * p.length,
                               label="cable, lumped"))
        else:
            parts.append(p)
    return replace(chain, parts=tuple(parts))


def without_front_ends(chain):
    """A copy of ``chain`` whose input and buffers have no front-end filter."""
    from dataclasses import replace

    return replace(chain, parts=tuple(
        replace(p, bandwidth=None) if isinstance(p, (Input, Buffer)) else p
        for p in chain.parts))


def line_impedances(chain):
    """``(number, lossless impedance [ohm])`` of every line part."""
    return [(k, p.impedance) for k, p in enumerate(chain.parts, 1) if isinstance(p, Line)]


def tip_arm(chain) -> int | None:
    """Number (from 1) of the tip arm: the series part with the largest resistance (the
    divider's top resistor), or None when no series part has a resistance."""
    tips = [(k, p) for k, p in enumerate(chain.parts, 1) if isinstance(p, Series) and p.r]
    return max(tips, key=lambda kp: kp[1].r)[0] if tips else None


def arm_of(chain, number: int) -> str | None:
    """``"tip"`` for the tip arm, ``"shunt"`` for a shunt or input part after it (to ground
    at the divider's output), else None."""
    tip = tip_arm(chain)
    if tip is None:
        return None
    if number == tip:
        return "tip"
    if number > tip and isinstance(chain.parts[number - 1], (Shunt, Input)):
        return "shunt"
    return None


def with_shunt_capacitance(chain, after: int, c: float):
    """A copy of ``chain`` with a capacitor of ``c`` [F] to ground just after part ``after``."""
    from dataclasses import replace

    parts = list(chain.parts)
    parts.insert(after, Shunt(c=c, label="added capacitance"))
    return replace(chain, parts=tuple(parts))
