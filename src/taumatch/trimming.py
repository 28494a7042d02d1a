"""The trims a diagnosis gives, as the package's one trim record.

From the fitted divider (:class:`taumatch.chain.two_arm.TwoArm`) and the uncertainty budget
(:mod:`taumatch.budget`): the change of each arm's whole capacitance that compensates, and,
when the chain spec marks a trimmer, the trimmer's setting — each a
:class:`taumatch.chain.compensation.Trim` (one JSON schema wherever a trim appears), its
state the diagnosis's verdict (:func:`~taumatch.chain.compensation.compensation_state`
against the band the diagnosis judged by).  A trimmer that cannot reach its setting carries
the change at the other arm that would do it with the trimmer at its nearest limit.
"""

from __future__ import annotations

from .chain.compensation import Trim
from .units import format_quantity

__all__ = ["METHOD", "arm_trims", "trimmer_trim"]

METHOD = "two-arm divider fitted to the capture, R1·C1 = R2·C2"
_OTHER = {"tip": "shunt", "shunt": "tip"}


def arm_trims(fit, budgets: dict, band: float) -> dict:
    """``{"shunt": Trim, "tip": Trim}``: each arm's whole capacitance from its fitted value to
    the one that compensates, with the budget's standard uncertainties."""
    arms = fit.arms
    e = budgets["hf_dc_error"]
    out = {}
    for arm, present in (("shunt", fit.c2), ("tip", fit.c1)):
        out[arm] = Trim(arm=arm, field="c", present=present, required=arms.required(arm),
                        hf_dc_error=e.value, accept=band,
                        reachable=bool(arms.required(arm) > 0),
                        required_stderr=budgets[f"{arm}_required"].stderr,
                        change_stderr=budgets[f"{arm}_change"].stderr,
                        hf_dc_error_stderr=e.stderr, dc_gain=arms.dc_gain, method=METHOD)
    return out


def trimmer_trim(fit, budgets: dict, band: float, chain, warnings: list) -> Trim:
    """The chain's trimmer: its setting now as the fit sees it (the fitted arm less its fixed
    parts, or the spec's value when the arm's capacitance was held), the setting that
    compensates, and — out of its range — the change at the other arm with the trimmer at
    its nearest limit.  Appends a warning when it cannot reach."""
    tr = chain.trimmer
    arms = fit.arms
    e = budgets["hf_dc_error"]
    if tr.arm == "shunt":
        held = fit.estimates["shunt_capacitance"].held
        present = tr.present if held else fit.c2 - chain.fixed_c
    else:
        present = fit.c1 - chain.fixed_c
    change = arms.change(tr.arm)
    required = present + change
    lo = tr.minimum if tr.minimum is not None else 0.0
    hi = tr.maximum if tr.maximum is not None else float("inf")
    other = at = None
    if not (lo <= required <= hi and required > 0):
        at = min(max(required, lo), hi)
        moved = arms.with_values(**{"c2" if tr.arm == "shunt" else "c1":
                                    (arms.c2 if tr.arm == "shunt" else arms.c1) + at - present})
        other = moved.trim(_OTHER[tr.arm], min(band, 0.999))
        warnings.append(f"the trimmer (part {tr.part}) cannot reach "
                        f"{format_quantity(required, 'F')}: set it to "
                        f"{format_quantity(at, 'F')} and change the {other.arm} arm's "
                        f"capacitance by {format_quantity(other.change, 'F')}")
    return Trim(arm=tr.arm, field=tr.field, present=present, required=required,
                hf_dc_error=e.value, accept=band, part=tr.part, kind=tr.kind,
                minimum=tr.minimum, maximum=tr.maximum, reachable=bool(required > 0),
                required_stderr=budgets["trimmer_required"].stderr,
                change_stderr=budgets[f"{tr.arm}_change"].stderr,
                hf_dc_error_stderr=e.stderr, nominal=tr.present, dc_gain=arms.dc_gain,
                method=METHOD, other_arm=other, trimmer_at=at)
