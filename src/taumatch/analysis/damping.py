"""Damping advice held to the exact step before it is printed.

The lead model (:mod:`taumatch.analysis.ringing`) proposes a series resistance and a lead
length for a target overshoot; it knows only the loop's ``L``, ``R`` and the probe's ``C``.
Here each proposal is applied to the chain and the exact step of the changed chain
(:attr:`taumatch.chain.model.ChainModel.step`) is measured:

* the resistance: when the lead model's value leaves the step above the target, the smallest
  resistance up to :data:`MAX_FACTOR` times it that reaches the target is searched
  (bisection on ``log R``; the overshoot falls with ``R`` while the lead dominates);
* the lead length: the lead model's, checked the same way, or the longest that reaches the
  target (bisection on ``log length`` down to ten wire radii), or none;
* when no resistance in that range reaches the target, the dominant cause is found by
  taking the parts away one kind at a time with the lead model's resistance in place:
  cables lumped (no reflections), front ends removed, the trimmer set by
  :func:`taumatch.analysis.trim.trim`; the first that reaches the target is named, with
  what would help.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import TaumatchError
from ..units import format_quantity

__all__ = ["MAX_FACTOR", "SLACK", "Advice", "check_advice"]

#: Largest multiple of the lead model's resistance searched.
MAX_FACTOR = 30.0
#: Overshoot above the target still counted as reaching it (fraction of the final value).
SLACK = 0.005


def _overshoot(chain) -> float:
    from ..chain.model import ChainModel
    from .step import step_figures

    # the overshoot is compared with the target to SLACK: 1e-4 of the step is plenty
    st = step_figures(ChainModel(chain, step_tol=1e-4).step)
    return math.inf if st is None else st.overshoot


@dataclass(frozen=True)
class Advice:
    """What damps the ringing, as the exact step of the changed chain shows.

    Attributes
    ----------
    target : float
        Target overshoot (fraction).
    present : float
        The chain's own step overshoot now.
    model_resistance : float
        The lead model's series resistance [ohm].
    model_resistance_overshoot : float or None
        The exact step's overshoot with it.
    resistance : float or None
        Series resistance [ohm] that reaches the target by the exact step (None: none up to
        :data:`MAX_FACTOR` times the lead model's).
    lead_length : float or None
        A lead length [m] that reaches the target by the exact step (the lead model's, or
        shorter where that is not enough; None when not even ten wire radii do), and
        ``lead_length_overshoot`` with it.
    cause, remedy : str or None
        When the resistance cannot reach the target: what keeps the step ringing and what
        would help.
    """

    target: float
    present: float
    model_resistance: float
    model_resistance_overshoot: float | None
    resistance: float | None
    lead_length: float | None
    lead_length_overshoot: float | None
    cause: str | None = None
    remedy: str | None = None
    lead_checked: bool = False

    def to_dict(self) -> dict:
        return {"target_overshoot": self.target, "present_overshoot": self.present,
                "lead_model_resistance": self.model_resistance,
                "lead_model_resistance_overshoot": self.model_resistance_overshoot,
                "checked_resistance": self.resistance, "lead_length": self.lead_length,
                "lead_length_overshoot": self.lead_length_overshoot,
                "cause": self.cause, "remedy": self.remedy}

    def summary(self) -> str:
        q = format_quantity
        lines = []
        if self.resistance is not None:
            lines.append(f"for {self.target:.0%} overshoot: add {q(self.resistance, 'Ω')} in "
                         "series (checked: the exact step of the damped chain reaches it)")
            if (self.model_resistance_overshoot is not None
                    and self.resistance > self.model_resistance * 1.01):
                lines.append(f"  (the lead model's {q(self.model_resistance, 'Ω')} would leave "
                             f"{self.model_resistance_overshoot:.0%})")
        else:
            lines.append(f"for {self.target:.0%} overshoot a series resistance is not enough: "
                         f"the lead model's {q(self.model_resistance, 'Ω')} leaves "
                         f"{self.model_resistance_overshoot:.0%}, and up to "
                         f"{MAX_FACTOR:g} times it does not reach the target")
        if self.lead_length is not None:
            lines.append(f"  or shorten the lead to {q(self.lead_length, 'm')} (checked: "
                         f"{self.lead_length_overshoot:.1%} overshoot by the exact step)")
        elif self.lead_checked:
            lines.append("  no lead length (down to ten wire radii) reaches it either")
        if self.cause:
            lines.append(f"  dominant cause: {self.cause}; what would help: {self.remedy}")
        return "\n".join(lines)


def check_advice(model, ringing, present: float) -> Advice | None:
    """Hold the ringing figures' advice to the exact step (see the module text).

    Parameters
    ----------
    model : ChainModel
    ringing : Ringing
    present : float
        The chain's own step overshoot now (fraction).

    Returns None when the step is already within the target.
    """
    from ..chain import topology

    target = ringing.target_overshoot
    if present <= target + SLACK:
        return None
    chain = model.chain
    loop = topology.lead_loop(chain)
    r0 = max(ringing.damping_resistance, 1.0)

    def damped(r, base=chain):
        return topology.with_series_resistance(base, loop.first_probe_part, r)

    os0 = _overshoot(damped(r0))
    found = r0 if os0 <= target + SLACK else None
    if found is None and _overshoot(damped(r0 * MAX_FACTOR)) <= target + SLACK:
        lo, hi = math.log(r0), math.log(r0 * MAX_FACTOR)
        for _ in range(8):
            mid = 0.5 * (lo + hi)
            if _overshoot(damped(math.exp(mid))) <= target + SLACK:
                hi = mid
            else:
                lo = mid
        found = math.exp(hi)
    length = length_os = None
    if ringing.max_lead_length is not None and len(loop.leads) == 1:
        length, length_os = _checked_length(chain, loop, ringing.max_lead_length, target)
    cause = remedy = None
    if found is None or found > 2 * r0:
        cause, remedy = _cause(chain, damped, r0, target)
    return Advice(target, present, ringing.damping_resistance, os0, found, length, length_os,
                  cause, remedy, len(loop.leads) == 1)


def _checked_length(chain, loop, proposed, target):
    """The lead model's length, or where it leaves the step above the target, the longest
    length down to ten wire radii that reaches it (bisection on ``log length``); the
    overshoot with it.  ``(None, None)`` when not even the shortest wire does."""
    lead = loop.leads[0]
    number = next(k for k in loop.parts if chain.parts[k - 1] is lead)

    def os_at(length):
        return _overshoot(chain.with_value(number, "length", length))

    shortest = 10 * lead.radius * (1 + 1e-9)
    try:
        got = os_at(proposed)
    except TaumatchError:  # shorter than the straight-wire formula allows
        return None, None
    if got <= target + SLACK:
        return proposed, got
    if os_at(shortest) > target + SLACK:
        return None, None
    lo, hi = math.log(shortest), math.log(proposed)
    for _ in range(8):
        mid = 0.5 * (lo + hi)
        if os_at(math.exp(mid)) <= target + SLACK:
            lo = mid
        else:
            hi = mid
    return math.exp(lo), os_at(math.exp(lo))


def _cause(chain, damped, r0, target):
    from ..chain import topology

    lines = topology.line_impedances(chain)
    if lines and _overshoot(damped(r0, topology.with_lines_lumped(chain))) <= target + SLACK:
        z0 = ", ".join(format_quantity(z, "Ω") for _, z in lines)
        return (f"reflections on the cable (it is not terminated in its impedance, {z0})",
                ("terminate the cable in its impedance at one end, or use a resistive (lossy) "
                 "probe cable, then damp the lead"))
    if topology.front_ends(chain) and _overshoot(
            damped(r0, topology.without_front_ends(chain))) <= target + SLACK:
        return ("the front end's own peaking",
                "a front end with a flatter response (Bessel) or a lower bandwidth")
    if chain.adjustable is not None:
        from .trim import trim

        try:
            t = trim(chain)
            trimmed = chain.with_value(t.part, t.field, t.required)
        except TaumatchError:
            trimmed = None
        if trimmed is not None and _overshoot(damped(r0, trimmed)) <= target + SLACK:
            return ("the divider's compensation (its high-frequency gain is above its DC gain)",
                    "trim the divider first (taumatch trim), then damp the lead")
    return ("resonances of the chain beyond the lead loop",
            ("lower the Q of the chain's own resonances (series resistance at the cable, a "
             "lossy cable)"))
