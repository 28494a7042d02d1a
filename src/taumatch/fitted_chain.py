"""A diagnosis as a chain: the fitted divider written back as a chain spec.

The chain is the currency between commands (DESIGN.md): what ``taumatch diagnose`` found can
be handed to ``predict``, ``bandwidth``, ``trim`` and ``netlist`` as a spec, as found or as it
will be after the trim.

* With the chain the diagnosis was given, that chain is kept and only what the capture
  measured changes: the tip arm's capacitance becomes the fitted C1; the shunt arm's fitted
  C2 goes to the trimmer when the spec marks one there, else to the instrument input's
  capacitance; the source takes the fitted step, the measured period and the fitted edge.
* Without one, the chain is the two-arm divider itself: an ideal source with the fitted
  step, period and edge, a series tip arm R1 ∥ C1, and the instrument input R2 ∥ C2 with its
  capacitance marked as the trimmer (the whole shunt arm, what the trim moves).

A fast-edge diagnosis (:mod:`taumatch.edge_diagnosis`) is written as the chain it fitted, as
found or after the adjustments (:func:`edge_fitted_chain`).

An unresolved source edge is written at its upper bound (the comment says so), so a
prediction from the spec is the slowest the capture allows.  The written chain is reduced
again (:meth:`taumatch.chain.two_arm.TwoArm.from_chain`) and must give back the fitted
arms, or nothing is written.
"""

from __future__ import annotations

import math
from dataclasses import replace

from .errors import ComputationError
from .units import format_quantity

__all__ = ["edge_fitted_chain", "fitted_chain"]


def _arm_values(d, trimmed: bool) -> tuple:
    """(C1, C2, trimmer setting or None) of the chain to write."""
    fit, t = d.fit, d.trim
    c1, c2 = fit.c1, fit.c2
    setting = t.present if t.part is not None else None
    if not trimmed:
        return c1, c2, setting
    target = t.trimmer_at if t.other_arm is not None else t.required
    move = target - t.present
    if t.arm == "shunt":
        c2 += move
    else:
        c1 += move
    if t.other_arm is not None:
        if t.other_arm.arm == "shunt":
            c2 += t.other_arm.change
        else:
            c1 += t.other_arm.change
    return c1, c2, (target if t.part is not None else None)


def _source(d, base):
    """The source with the fitted step, the measured period and the edge (its bound when
    the capture does not resolve it)."""
    from .chain.parts import Source

    fit = d.fit
    edge = fit.estimates["edge_time"]
    rise = edge.bound if not edge.resolved else edge.value
    values = {"amplitude": abs(fit.estimates["amplitude"].value),
              "period": d.metrics.period or fit.period, "rise_time": rise}
    if base is None:
        return Source(resistance=0.0, **values)
    return replace(base, **values)


def _from_given(d, c1: float, c2: float, setting):
    """The diagnosis's chain with the fitted values put in."""
    from .chain.topology import tip_arm
    from .chain.two_arm import TwoArm

    facts = d.chain
    chain = facts.chain
    tip = tip_arm(chain)
    out = chain.with_value(tip, "c", c1) if c1 > 0 else chain
    tr = facts.trimmer
    spec_arms = TwoArm.from_chain(chain)
    if tr is not None and tr.arm == "shunt":
        value = setting if setting is not None else tr.present + (c2 - spec_arms.c2)
        if not value > 0:
            raise ComputationError(f"the fitted shunt capacitance {format_quantity(c2, 'F')} is "
                                   "below the spec's fixed parts: no trimmer setting holds it")
        out = out.with_value(tr.part, tr.field, value)
    else:
        if tr is not None and setting is not None:  # a tip trimmer: its setting is C1
            out = out.with_value(tr.part, tr.field, setting)
        n = len(out.parts)
        now = out.parts[-1].c or 0.0
        extra = c2 - TwoArm.from_chain(out).c2
        if abs(extra) > 1e-9 * c2:
            if not now + extra > 0:
                raise ComputationError(f"the fitted shunt capacitance {format_quantity(c2, 'F')}"
                                       " is below the spec's fixed parts: the spec cannot hold it")
            out = out.with_value(n, "c", now + extra)
    return replace(out, source=_source(d, chain.source))


def _from_fit(d, c1: float, c2: float):
    """The two-arm divider itself as a chain."""
    from .chain.parts import Adjust, Chain, Input, Series

    fit = d.fit
    held = " (held, not measured)" if fit.estimates["shunt_capacitance"].held else ""
    parts = (Series(r=fit.r1, c=c1 if c1 > 0 else None, label="tip arm (fitted)"),
             Input(r=fit.r2, c=c2, adjust=Adjust("c"),
                   label=f"shunt arm: cable, trimmer and instrument input as one{held}"))
    return Chain(source=_source(d, None), parts=parts, name="fitted by taumatch diagnose")


def _within_range(chain):
    """The chain with a trimmer range dropped when the written value lies outside it (the
    spec reader refuses such a trimmer), and a note, or None."""
    adj = chain.adjustable
    if adj is None:
        return chain, None
    number, part, a = adj
    value = part.value_of(a.field)
    if a.contains(value) is not False:
        return chain, None
    parts = list(chain.parts)
    parts[number - 1] = replace(part, adjust=replace(a, min=None, max=None))
    lo = format_quantity(a.min or 0.0, "F")
    hi = format_quantity(a.max, "F") if a.max is not None else "no limit"
    return replace(chain, parts=tuple(parts)), (
        f"the trimmer's value {format_quantity(value, 'F')} lies outside its range {lo} to "
        f"{hi}: the range is left out")


def fitted_chain(d, trimmed: bool = False, source_name: str = "the capture") -> tuple:
    """The chain a diagnosis found, as found or after the trim, and a comment for its spec.

    Parameters
    ----------
    d : taumatch.diagnosis.Diagnosis
    trimmed : bool
        The chain as it will be after the trim (the trimmer at its setting; out of range,
        at its limit with the other arm changed).
    source_name : str
        The capture's name, for the comment.

    Returns
    -------
    (Chain, str)

    Raises
    ------
    ComputationError
        When the diagnosis found no divider, or the fitted values do not fit the given
        chain's parts.
    """
    from .chain.two_arm import TwoArm

    if d.trim is None:
        raise ComputationError("no divider was seen in the capture: there is no fitted chain "
                               "to write (give tip_r= or chain= if a divider is there)")
    c1, c2, setting = _arm_values(d, trimmed)
    chain = _from_given(d, c1, c2, setting) if d.chain is not None and d.chain.chain is not None \
        else _from_fit(d, c1, c2)
    chain, note = _within_range(chain)
    back = TwoArm.from_chain(chain)
    if not (math.isclose(back.c1, c1, rel_tol=1e-9, abs_tol=1e-18)
            and math.isclose(back.c2, c2, rel_tol=1e-9)):
        raise ComputationError("the written chain does not reduce to the fitted divider "
                               f"(C1 {back.c1:.6g} F against {c1:.6g} F, C2 {back.c2:.6g} F "
                               f"against {c2:.6g} F)")
    q = format_quantity
    fit = d.fit
    e1, e2 = fit.estimates["tip_capacitance"], fit.estimates["shunt_capacitance"]
    edge = fit.estimates["edge_time"]
    lines = [f"written by taumatch diagnose from {source_name}: the fitted chain "
             + ("as it will be after the trim" if trimmed else "as found"),
             f"fitted C1 {q(e1.value, 'F')} ± {q(e1.stderr or 0, 'F')}, C2 {q(e2.value, 'F')}"
             + (" (held, not measured)" if e2.held else f" ± {q(e2.stderr or 0, 'F')}")
             + f"; gain error as found {100 * d.hf_dc_error.value:+.2f} %",
             ("source edge: at most " + q(edge.bound, "s") + " (not resolved; written at the "
              "bound)") if not edge.resolved else f"source edge {q(edge.value, 's')} (fitted)"]
    if trimmed:
        lines.append(f"trim applied: {d.trim.change_line()}")
    if note:
        lines.append(note)
    return chain, "\n".join(lines)


def edge_fitted_chain(d, trimmed: bool = False, source_name: str = "the capture") -> tuple:
    """``(chain, comment)``: the chain a fast-edge diagnosis ``d`` found (``trimmed``: after
    the adjustments), for :func:`taumatch.chain.write.dumps`.  A mark whose value now lies
    outside its own range is written without the range (the spec would refuse it), and the
    comment says so."""
    from .chain.parts import Adjust

    chain = d.adjusted if trimmed else d.found
    lines = [(f"Chain {'after the adjustments' if trimmed else 'as found'}: written by "
              f"taumatch diagnose from the fast-edge capture {source_name}.")]
    parts = list(chain.parts)
    for k, p in enumerate(parts, 1):
        marks = p.adjust_marks() if hasattr(p, "adjust_marks") else ()
        fixed = []
        for a in marks:
            if a.contains(p.value_of(a.field)) is False:
                lines.append(f"Part {k} {a.field}: the value lies outside the range "
                             f"{a.min!r} to {a.max!r} the input spec gave; range left out.")
                a = Adjust(a.field)
            fixed.append(a)
        if marks:
            parts[k - 1] = replace(p, adjust=fixed[0], more_adjust=tuple(fixed[1:]))
    return replace(chain, parts=tuple(parts)), "\n".join(lines)
