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
   ``|H(j 2 pi f_m)| = |H(0)|``, bracketed first around the two-arm model's value
   (:class:`taumatch.chain.two_arm.TwoArm`, when the chain reduces to two arms and the
   field is a capacitance in one of them), else searched outwards from the present value.
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
the DC gain (peaked corner), *under-compensated* when below (rounded corner), through
:func:`taumatch.chain.compensation.compensation_state` with an acceptance band; the result is the
package's one trim record, :class:`taumatch.chain.compensation.Trim`.
"""

from __future__ import annotations

import math

import numpy as np

from ..chain.compensation import DEFAULT_ACCEPT, Trim
from ..errors import ComputationError, InputError, TaumatchError

__all__ = ["Trim", "comparison_frequency", "hf_dc_error_at", "trim"]

_NETWORK = "reduced network, |H(f_m)| = |H(0)| by regula falsi"
_LINEAR = "reduced network, linear in the arm's capacitance"


def _reduced_gain(chain, freq: float):
    from ..chain.build import build

    b = build(chain, "trim")
    net = b.network()
    h = net.response(np.array([0.0, freq]), b.source, b.output)
    return abs(h[0]), abs(h[1])


def hf_dc_error_at(chain, freq: float) -> float:
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


def trim(chain, part: int | None = None, field: str | None = None, *,
         accept: float = DEFAULT_ACCEPT) -> Trim:
    """Required value of the adjustable field (the spec's ``adjust``, or ``part``/``field``).

    Parameters
    ----------
    chain : Chain
    part : int, optional
        Part number (from 1) to trim instead of the spec's ``adjust``.
    field : str, optional
        Field of that part (``"c"`` by default).
    tolerance : float
        Gain error counted as compensated, for the verdict (fraction).

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
    from ..chain.topology import arm_of
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
    arm = arm_of(chain, part)
    f_m = comparison_frequency(chain)

    def g(logx):
        return hf_dc_error_at(chain.with_value(part, field, math.exp(logx)), f_m)

    x0 = math.log(present)
    e0 = g(x0)
    record = {"arm": arm, "field": field, "present": float(present), "hf_dc_error": float(e0),
                  "accept": accept, "part": part, "kind": p.kind, "minimum": lo_lim, "maximum": hi_lim,
                  "frequency": f_m, "dc_gain": float(_reduced_gain(chain, f_m)[0])}
    if e0 == 0:
        required = present
    else:
        found = _bracket(g, _two_arm_estimate(chain, arm, field, present), math.log(1.01),
                         math.log(4.0))
        if found is None:
            found = _bracket(g, (x0, e0), math.log(2.0), math.log(1e6))
        if found is None:
            return _out_of_reach(chain, record, f_m)
        required = math.exp(bracketed_root(g, *found, rtol=1e-15))
    out = Trim(required=float(required), method=_NETWORK, **record)
    if out.in_range is False and field == "c" and arm is not None:
        at = _limit(required, lo_lim, hi_lim, present)
        out = Trim(required=float(required), method=_NETWORK,
                   other_arm=_other_arm(chain, part, arm, at, f_m, accept), trimmer_at=at,
                   **record)
    return out


def _two_arm_estimate(chain, arm, field, present):
    """``(log x, None)`` of the two-arm model's compensating value of a capacitance in an
    arm, or None when the chain does not reduce to two arms or the value is not positive."""
    from ..chain.two_arm import TwoArm

    if arm is None or field not in ("c", "branch.c"):
        return None
    try:
        need = present + float(TwoArm.from_chain(chain).change(arm))
    except TaumatchError:
        return None
    return (math.log(need), None) if need > 0 and math.isfinite(need) else None


def _bracket(g, start, step, limit):
    """``(a, b)`` in log-value with a sign change of ``g``, searched outwards from
    ``start = (x, g(x) or None)`` in steps doubling from ``step`` up to ``limit``; or None."""
    if start is None:
        return None
    x, gx = start
    gx = g(x) if gx is None else gx
    if gx == 0:
        return x, x
    while step <= limit:
        a, b = x - step, x + step
        ga, gb = g(a), g(b)
        if ga * gx <= 0:
            return a, x
        if gb * gx <= 0:
            return x, b
        step *= 2
    return None


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
    us = [1 / (1 + hf_dc_error_at(chain.with_value(part, field, x), f_m)) for x in xs]
    v = [1 / x for x in xs] if inverse else list(xs)
    slope = (us[1] - us[0]) / (v[1] - v[0])
    if slope == 0:
        raise ComputationError(f"part {part}: its {field} does not move the high-frequency gain")
    need = v[0] + (1 - us[0]) / slope
    if inverse:
        return 1 / need if need > 0 else -math.inf
    return need


def _other_arm(chain, part, arm, at, f_m, accept) -> Trim | None:
    """The other arm's change that compensates with the trimmer (``part``) at ``at``: the tip
    part's capacitance, or capacitance added at the shunt arm's node (``part`` None); None
    when not even an estimate exists."""
    from ..chain.topology import tip_arm, with_shunt_capacitance

    base = chain.with_value(part, "c", at)
    error = hf_dc_error_at(base, f_m)
    tip = tip_arm(chain)
    if arm == "shunt":
        now = chain.parts[tip - 1].c or 0.0
        need = _linear_need(base, tip, "c", f_m, True, now or 1e-12)
        if not math.isfinite(need):
            return None
        if need > 0:  # the exact root from the estimate
            need = trim(base.with_value(tip, "c", need), part=tip, field="c").required
        return Trim("tip", "c", now, need, error, accept, part=tip,
                    kind=chain.parts[tip - 1].kind, reachable=need > 0, frequency=f_m,
                    method=_NETWORK if need > 0 else _LINEAR)
    extra = with_shunt_capacitance(base, tip, 1e-12)
    need = _linear_need(extra, tip + 1, "c", f_m, False, 1e-12)
    if not math.isfinite(need):
        return None
    if need > 0:
        need = trim(extra.with_value(tip + 1, "c", need), part=tip + 1, field="c").required
    return Trim("shunt", "c", 0.0, need, error, accept, frequency=f_m,
                method=_NETWORK if need > 0 else _LINEAR)


def _out_of_reach(chain, record: dict, f_m) -> Trim:
    """The trim when no positive value within a factor 1e6 compensates (see module text)."""
    part, field, arm, present = record["part"], record["field"], record["arm"], record["present"]
    if arm is None or field != "c":
        raise ComputationError(
            f"part {part} ({record['kind']}): no value of {field} within a factor 1e6 of "
            f"{present:.4g} makes HF and DC gain equal"
        )
    need = _linear_need(chain, part, field, f_m, arm == "tip", present)
    at = _limit(need, record["minimum"], record["maximum"], present)
    other = _other_arm(chain, part, arm, at, f_m, record["accept"])
    return Trim(required=float(need), method=_LINEAR, reachable=False, other_arm=other,
                trimmer_at=at, **record)
