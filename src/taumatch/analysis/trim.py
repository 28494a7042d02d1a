"""The trim: the value of a chain's adjustable field that makes HF and DC gain equal.

Method (computed from the network, not from the two-arm formula):

1. The chain is reduced to its *divider*: the source drives the probe point directly;
   cables become their total capacitance (and conductance) to ground; inductors and
   leads are shorted; front ends are bypassed (:func:`taumatch.chain.build.build` with
   ``mode="trim"``).  What is left are the arms' resistances and capacitances (and any
   small series resistors).
2. A comparison frequency ``f_m`` is taken from the present reduced network's poles
   (cancelled pole-zero pairs included): ten times the slowest pole (the divider corner),
   but no more than the geometric mean of the slowest pole and the next pole at least
   100 times faster, so that remaining fast poles barely touch it.
3. Regula falsi (Illinois) on the logarithm of the field value solves
   ``|H(j 2 pi f_m)| = |H(0)|``.
   For a divider whose slow part is one pole-zero pair the condition holds at the
   compensated value whatever ``f_m`` is; the fast poles bias it by about
   ``(f_m / f_fast)^2``.

For a two-arm divider (``R1 || C1`` over ``R2 || C2``) this gives ``R1 C1 = R2 C2``
exactly (to rounding).

When no positive value within a factor 1e6 does it, or the value lies outside the trimmer's
range, the trim says what it would take, as a diagnosis does: for a capacitance in the shunt
arm the inverse gain ratio ``|H(0)| / |H(f_m)|`` is linear in the arm's capacitance (the
capacitive divider ``C1 / (C1 + C2)``), for one in the tip arm linear in ``1 / C1``; two
evaluations give the value it would need, possibly negative (an arm that already holds more
than the whole target).  And the change at the other arm that compensates with the trimmer
at its nearest limit: the tip arm's capacitance, or capacitance added to (or taken from) the
shunt arm.  The trade's words: *over-compensated* when the HF gain is above
the DC gain (peaked corner), *under-compensated* when below (rounded corner).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..errors import ComputationError, InputError
from ..units import format_quantity

__all__ = ["Trim", "compensation_error", "trim"]

_UNITS = {"r": "Ω", "c": "F", "l": "H"}


@dataclass(frozen=True)
class Trim:
    """The trim of one adjustable field.

    Attributes
    ----------
    part : int
        Part number (from 1).
    kind : str
        The part's kind.
    field : str
        The field (``"c"``, ``"branch.c"``, ...).
    present, required : float
        Present and required values (SI).
    minimum, maximum : float or None
        The trimmer's range.
    frequency : float
        Comparison frequency ``f_m`` [Hz].
    error : float
        ``|H(f_m)| / |H(0)| - 1`` at the present value (positive: over-compensated).
    dc_gain : float
        DC gain of the chain [V/V].
    reachable : bool
        False when no positive value of the field compensates (``required`` is then the
        linear estimate, possibly negative).
    other_arm : tuple or None
        When the trim is out of reach or out of range: ``(arm, part, field, present,
        required)`` of the change at the other arm, with the trimmer at ``trimmer_at``
        (``part`` 0 for capacitance added at the shunt arm's node).
    trimmer_at : float or None
        The trimmer's value the other arm's change assumes.
    """

    part: int
    kind: str
    field: str
    present: float
    required: float
    minimum: float | None
    maximum: float | None
    frequency: float
    error: float
    dc_gain: float
    reachable: bool = True
    other_arm: tuple | None = None
    trimmer_at: float | None = None

    @property
    def change(self) -> float:
        """``required - present`` (SI)."""
        return self.required - self.present

    @property
    def in_range(self) -> bool | None:
        """Whether the required value lies in the trimmer's range (None: no range given)."""
        if not self.reachable or self.required <= 0:
            return False
        if self.minimum is None and self.maximum is None:
            return None
        lo = self.minimum if self.minimum is not None else 0.0
        hi = self.maximum if self.maximum is not None else math.inf
        return bool(lo <= self.required <= hi)

    @property
    def state(self) -> str:
        """``"over-compensated"``, ``"under-compensated"`` or ``"compensated"`` (|error| < 1e-4)."""
        if abs(self.error) < 1e-4:
            return "compensated"
        return "over-compensated" if self.error > 0 else "under-compensated"

    def to_dict(self) -> dict:
        return {
            "trim": {
                "part": self.part,
                "kind": self.kind,
                "field": self.field,
                "present": self.present,
                "required": self.required,
                "change": self.change,
                "in_range": self.in_range,
                "min": self.minimum,
                "max": self.maximum,
                "state": self.state,
                "gain_error": self.error,
                "frequency": self.frequency,
                "dc_gain": self.dc_gain,
                "reachable": self.reachable,
                "other_arm": None if self.other_arm is None else dict(zip(
                    ("arm", "part", "field", "present", "required"), self.other_arm)),
                "trimmer_at": self.trimmer_at,
                "method": ("reduced network, |H(f_m)| = |H(0)| by regula falsi" if self.reachable
                           else "reduced network, linear in the arm's capacitance"),
            }
        }

    def summary(self) -> str:
        unit = _UNITS.get(self.field.split(".")[-1], "")
        fq = lambda v: format_quantity(v, unit)
        if abs(self.change) <= 1e-9 * abs(self.present):
            change = "no change"
        else:
            change = f"change {'+' if self.change >= 0 else '-'}{fq(abs(self.change))}"
        corner = {"over-compensated": " (peaked corner)",
                  "under-compensated": " (rounded corner)"}.get(self.state, "")
        text = (f"now {self.state}{corner}: HF gain {self.error:+.2%} against DC at "
                f"{format_quantity(self.frequency, 'Hz')}\n"
                f"part {self.part} ({self.kind}) {self.field}: present {fq(self.present)}, "
                f"required {fq(self.required)}, {change}")
        if not self.reachable or self.required <= 0:
            text += (f"\n  no positive value does it: it would need about {fq(self.required)} "
                     "(the rest of its arm already holds more than the whole target)")
        elif self.in_range is False:
            text += (f"\n  outside the trimmer range {fq(self.minimum or 0.0)} to "
                     f"{fq(self.maximum) if self.maximum is not None else 'no limit'}")
        elif self.in_range is None:
            text += "\n  (no trimmer range given)"
        if self.other_arm is not None:
            arm, part, fld, now, need = self.other_arm
            at = f" with the trimmer at {fq(self.trimmer_at)}" if self.trimmer_at else ""
            ch = need - now
            verb = "add" if ch > 0 else "remove"
            if part:
                text += (f"\n  or change a fixed part{at}: {arm} arm, part {part} {fld}: "
                         f"{verb} {format_quantity(abs(ch), 'F')} ({fq(now)} -> "
                         f"{format_quantity(need, 'F')})")
            else:
                text += (f"\n  or change a fixed part{at}: {verb} "
                         f"{format_quantity(abs(ch), 'F')} of capacitance at the {arm} arm "
                         "(a fixed capacitor, or a shorter or longer cable)")
        elif self.in_range is False or not self.reachable:
            text += "\n  change a fixed part"
        return text

    def applied_summary(self) -> str:
        """What the trim did, for a result computed after it."""
        unit = _UNITS.get(self.field.split(".")[-1], "")
        fq = lambda v: format_quantity(v, unit)
        return (f"trimmed: part {self.part} ({self.kind}) {self.field} set from "
                f"{fq(self.present)} to {fq(self.required)}; before the trim the chain was "
                f"{self.state} (HF gain {self.error:+.2%} against DC at "
                f"{format_quantity(self.frequency, 'Hz')}), now compensated")


def _reduced_gain(chain, freq: float):
    from ..chain.build import build

    b = build(chain, "trim")
    net = b.network()
    h = net.response(np.array([0.0, freq]), b.source, b.output)
    return abs(h[0]), abs(h[1])


def compensation_error(chain, freq: float) -> float:
    """``|H(f)| / |H(0)| - 1`` of the chain's reduced divider network at ``freq`` [Hz]."""
    dc, hf = _reduced_gain(chain, freq)
    if not dc > 0:
        raise ComputationError("the divider has no DC path (DC gain 0): nothing to trim")
    return hf / dc - 1.0


def comparison_frequency(chain) -> float:
    """The frequency ``f_m`` [Hz] the trim compares gains at (see the module text)."""
    from ..chain.build import build

    b = build(chain, "trim")
    info = b.network().transfer_info(b.source, b.output)
    roots = list(info.poles) + [p for p, _ in info.cancelled]
    mags = np.sort(np.abs(np.asarray(roots, dtype=complex)))
    mags = mags[mags > 0]
    if not mags.size:
        raise ComputationError("the divider network has no time constant: nothing to trim")
    slow = mags[0]
    faster = mags[mags > 100 * slow]
    w = 10 * slow if not faster.size else min(10 * slow, math.sqrt(slow * faster[0]))
    return float(w / (2 * math.pi))


def trim(chain, part: int | None = None, field: str | None = None) -> Trim:
    """Required value of the adjustable field (the spec's ``adjust``, or ``part``/``field``).

    Parameters
    ----------
    chain : Chain
    part : int, optional
        Part number (from 1) to trim instead of the spec's ``adjust``.
    field : str, optional
        Field of that part (``"c"`` by default).

    Returns
    -------
    Trim

    Raises
    ------
    InputError
        When nothing is adjustable or the field has no value.
    ComputationError
        When no value in a factor of 1e6 either way equalises the gains.
    """
    from ..network.band import bracketed_root

    lo_lim = hi_lim = None
    if part is None:
        adj = chain.adjustable
        if adj is None:
            raise InputError(
                f"{chain.origin}: no part has adjust = ...; mark the trimmer (e.g. adjust = 'c')"
            )
        part, p, a = adj
        field, lo_lim, hi_lim = a.field, a.min, a.max
    else:
        if not 1 <= part <= len(chain.parts):
            raise InputError(f"{chain.origin}: part {part} does not exist (1..{len(chain.parts)})")
        p = chain.parts[part - 1]
        field = field or "c"
        if field not in p.adjustable_fields():
            raise InputError(f"{chain.origin}: part {part} ({p.kind}): {field} cannot be trimmed")
        if getattr(p, "adjust", None) is not None and p.adjust.field == field:
            lo_lim, hi_lim = p.adjust.min, p.adjust.max
    present = p.value_of(field)
    if present is None:
        raise InputError(f"{chain.origin}: part {part} ({p.kind}): {field} has no value to trim")
    f_m = comparison_frequency(chain)

    def g(logx):
        return compensation_error(chain.with_value(part, field, math.exp(logx)), f_m)

    x0 = math.log(present)
    e0 = g(x0)
    if e0 == 0:
        required = present
    else:
        step = math.log(2.0)
        a, b = x0, x0
        ga = gb = e0
        while ga * gb > 0:
            if step > math.log(1e6):
                return _out_of_reach(chain, part, p, field, present, lo_lim, hi_lim, f_m,
                                     e0)
            a, b = x0 - step, x0 + step
            ga, gb = g(a), g(b)
            if ga * e0 <= 0:
                b, gb = x0, e0
            elif gb * e0 <= 0:
                a, ga = x0, e0
            step *= 2
        required = math.exp(bracketed_root(g, a, b, rtol=1e-15))
    dc, _ = _reduced_gain(chain, f_m)
    out = Trim(part, p.kind, field, float(present), float(required), lo_lim, hi_lim, f_m,
               float(e0), float(dc))
    if out.in_range is False and field == "c":
        from ..chain.topology import arm_of

        arm = arm_of(chain, part)
        if arm is not None:
            at = _limit(required, lo_lim, hi_lim, present)
            other, _ = _other_arm(chain, part, arm, at, f_m)
            out = replace(out, other_arm=other, trimmer_at=at)
    return out


def _limit(required, lo, hi, present):
    """The trimmer's value nearest ``required`` within its range."""
    lo = lo if lo is not None else 0.0
    hi = hi if hi is not None else math.inf
    if required <= 0 and lo <= 0:
        return present
    return min(max(required, lo), hi) if lo > 0 or required > 0 else present


def _linear_need(chain, part, field, f_m, inverse: bool, start: float) -> float:
    """The value of capacitance ``field`` of ``part`` that compensates, from two evaluations
    of ``u = 1 / (1 + error)``, linear in the value (``inverse``: in its reciprocal)."""
    xs = (start, 1.5 * start)
    us = [1 / (1 + compensation_error(chain.with_value(part, field, x), f_m)) for x in xs]
    v = [1 / x for x in xs] if inverse else list(xs)
    slope = (us[1] - us[0]) / (v[1] - v[0])
    if slope == 0:
        raise ComputationError(f"part {part}: its {field} does not move the high-frequency gain")
    need = v[0] + (1 - us[0]) / slope
    if inverse:
        return 1 / need if need > 0 else -math.inf
    return need


def _other_arm(chain, part, arm, at, f_m):
    """The other arm's change that compensates with the trimmer (``part``) at ``at``."""
    from ..chain.topology import tip_arm, with_shunt_capacitance

    base = chain.with_value(part, "c", at)
    tip = tip_arm(chain)
    if arm == "shunt":
        now = chain.parts[tip - 1].c or 0.0
        need = _linear_need(base, tip, "c", f_m, True, now or 1e-12)
        if need > 0:  # the exact root from the estimate
            need = trim(base.with_value(tip, "c", need), part=tip, field="c").required
        return ("tip", tip, "c", now, need), need
    extra = with_shunt_capacitance(base, tip, 1e-12)
    need = _linear_need(extra, tip + 1, "c", f_m, False, 1e-12)
    if need > 0:
        need = trim(extra.with_value(tip + 1, "c", need), part=tip + 1, field="c").required
    return ("shunt", 0, "c", 0.0, need), need


def _out_of_reach(chain, part, p, field, present, lo_lim, hi_lim, f_m, e0) -> Trim:
    """The trim when no positive value within a factor 1e6 compensates (see module text)."""
    from ..chain.topology import arm_of

    arm = arm_of(chain, part) if field == "c" else None
    if arm is None:
        raise ComputationError(
            f"part {part} ({p.kind}): no value of {field} within a factor 1e6 of "
            f"{present:.4g} makes HF and DC gain equal"
        )
    need = _linear_need(chain, part, field, f_m, arm == "tip", present)
    at = _limit(need, lo_lim, hi_lim, present)
    other, _ = _other_arm(chain, part, arm, at, f_m)
    dc, _ = _reduced_gain(chain, f_m)
    return Trim(part, p.kind, field, float(present), float(need), lo_lim, hi_lim, f_m,
                float(e0), float(dc), reachable=False, other_arm=other, trimmer_at=at)
