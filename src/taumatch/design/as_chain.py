"""A designed divider as a chain: the parts it is built from, in the chain's words.

The chain every chain analysis reads (``bandwidth``, ``trim``, ``predict``, ``netlist``):

* source: ideal (0 Ω), amplitude the design's peak working voltage (1 V without one), so
  the chain commands print the cautions a high-voltage design needs; no period (the
  commands then treat the drive as dc: 60 V threshold);
* the tip arm: one series part ``R1 ∥ C1``; a column as its sections (the ladder of
  :func:`taumatch.design.ladder.column_parts`: each section's resistors and grading
  capacitor, the earth capacitance lumped at the junctions and half at each end);
* the shunt arm: the shunt resistor(s) as one resistance, the fixed capacitor(s), the
  cable as its capacitance, the trimmer (``adjust = "c"`` with the range every tolerance
  corner needs; with the trimmer in the tip arm the tip part is adjustable, its range
  shifted by the fixed capacitance), and the instrument input ``Ri ∥ Ci`` last.

For a lumped design the chain is the design exactly; for a column it is the ladder of its
sections, whose figures differ from the distributed column's by the ladder's lumping (the
design reports that ladder's response time).
"""

from __future__ import annotations

from ..chain import Adjust, Chain, Input, Series, Shunt, Source
from ..errors import InputError
from ..units import format_quantity as q

__all__ = ["design_chain", "spec_comment"]


def _adjust(trimmer, fixed: float) -> Adjust:
    """The trimmer's range as the part's (the fixed capacitance added); no range when the
    tolerances leave none (every corner needs the nominal value)."""
    present = fixed + trimmer.nominal
    lo = min(fixed + trimmer.minimum, present)
    hi = max(fixed + trimmer.maximum, present)
    if not hi > lo:
        return Adjust("c")
    return Adjust("c", lo if lo > 0 else None, hi)


def design_chain(design) -> Chain:
    """The :class:`~taumatch.chain.Chain` of a :class:`~taumatch.design.divider.DividerDesign`
    (see the module text).

    Raises
    ------
    InputError
        When the nominal trimmer setting is not positive (the design then warns that the
        fixed capacitance is too large): no part can hold it.
    """
    from .ladder import column_parts

    t = design.trimmer
    if not t.nominal > 0:
        raise InputError(f"trimmer: the nominal setting {q(t.nominal, 'F')} is not positive; "
                         "the design has no chain (lower the fixed capacitance)")
    n = design.sections
    per_section = tuple(design.tip_resistors[: len(design.tip_resistors) // n])
    if design.tip_capacitors and len(design.tip_capacitors) == n:
        c_section = design.tip_capacitors[0]
    else:  # one capacitor across the whole arm (or none)
        c_section = design.c1_fixed
    parts = list(column_parts(per_section, c_section * 1.0, design.earth_c, n))
    if t.arm == "tip":
        tip = parts[-1]
        parts[-1] = Series(r=tip.r, c=design.c1, adjust=_adjust(t, design.c1_fixed),
                           label=tip.label + f" (trimmer across it, {q(design.c1_fixed, 'F')} "
                           "fixed)")
    if design.shunt_resistors:
        joined = (" ∥ " if design.shunt_resistors_kind == "parallel" else " + ").join(
            q(r, "Ω") for r in design.shunt_resistors)
        parts.append(Shunt(r=design.shunt_resistor, label=f"shunt resistor: {joined}"))
    if design.shunt_capacitors:
        parts.append(Shunt(c=float(sum(design.shunt_capacitors)),
                           label="fixed shunt capacitor: " + " + ".join(
                               q(c, "F") for c in design.shunt_capacitors)))
    if design.cable_c > 0:
        parts.append(Shunt(c=design.cable_c, label="cable, lumped"))
    if t.arm == "shunt":
        parts.append(Shunt(c=t.nominal, adjust=_adjust(t, 0.0),
                           label="trimmer (nominal setting; range from the tolerance corners)"))
    inst = design.instrument
    parts.append(Input(r=inst.r, c=inst.c or None, label="instrument input"))
    amplitude = design.rating.voltage if design.rating is not None else 1.0
    return Chain(Source(0.0, amplitude=amplitude), tuple(parts),
                 name=f"{design.target_ratio:g}:1 divider designed by taumatch",
                 origin="divider design")


def spec_comment(design) -> str:
    """The comment a designed divider's chain spec opens with: what was designed, where the
    trimmer sits, the source, the column's lumping, the high-voltage caution."""
    t = design.trimmer
    lines = [(f"A {design.target_ratio:g}:1 divider designed by taumatch divider: input "
              f"{q(design.input_resistance, 'Ω')} ∥ {q(design.input_capacitance, 'F')}, ratio "
              f"{design.ratio:.6g}."),
             (f"Trimmer in the {t.arm} arm at its nominal setting {q(t.nominal, 'F')}; its "
              f"range {q(t.minimum, 'F')} to {q(t.maximum, 'F')} covers every tolerance "
              "corner."),
             "Source: ideal, amplitude the peak working voltage (1 V when none was given)."]
    if design.column is not None:
        lines.append(f"The column is written as its {design.sections} section(s) with the earth "
                     "capacitance lumped at the junctions (half at each end).")
    if design.cautions:
        lines.append("HIGH VOLTAGE: design aids, not a safety assessment; local codes, the "
                     "standards and licensed practice decide.")
    return "\n".join(lines)
