"""Ground-lead ringing: natural frequency, damping, Q, overshoot, and what damps it.

Two views, both reported:

* **lead model** (the design figures): the lead's inductance ``L`` (every ``lead`` part and
  every inductor-only ``series`` part before the probe's first capacitive part), the
  probe's input capacitance ``C`` seen after the lead (at ``f_c``, see
  :mod:`taumatch.analysis.loading`) and the series resistance ``R`` in the loop (source
  resistance, lead resistance, resistor-only series parts before the probe) form a series
  RLC: ``f0 = 1/(2 pi sqrt(L C))``, ``zeta = (R/2) sqrt(C/L)``, ``Q = 1/(2 zeta)``,
  overshoot ``exp(-zeta pi / sqrt(1 - zeta^2))`` (Ogata, "Modern Control Engineering").
  For a wanted overshoot ``OS``, ``zeta = -ln OS / sqrt(pi^2 + ln^2 OS)`` (Ogata); the
  series resistance that reaches it is ``2 zeta sqrt(L/C)`` (less what is already there),
  and the longest lead that keeps it is the one whose Grover inductance is
  ``C (R / (2 zeta))^2``.
* **dominant pole pair** of a lumped chain (its exact poles): the complex pole pair whose
  term contributes most to the step response (``2 |K / p|`` of its partial fraction,
  relative to the DC gain); its natural frequency ``|p|/(2 pi)``, damping ``-Re p / |p|``.
  A chain with cables has infinitely many poles; its resonance is read off the exact
  response instead (the peak and its sharpness, :class:`taumatch.network.Band`).

The lead model's advice is then held to the exact step of the changed chain
(:mod:`taumatch.analysis.damping`) before it is printed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units import format_quantity

__all__ = [
    "Ringing",
    "SecondOrder",
    "damping_resistance",
    "overshoot_from_zeta",
    "ringing",
    "zeta_from_overshoot",
]


def damping_resistance(inductance: float, capacitance: float, zeta: float) -> float:
    """Series resistance [ohm] that gives damping ``zeta`` to ``inductance`` [H] with
    ``capacitance`` [F]: ``2 zeta sqrt(L/C)`` (from ``zeta = (R/2) sqrt(C/L)``).

    Examples
    --------
    >>> round(damping_resistance(150e-9, 10e-12, 1.0))   # critical damping
    245
    """
    if not (inductance > 0 and capacitance > 0 and zeta > 0):
        raise InputError(f"inductance, capacitance and zeta must be positive, got "
                         f"{inductance!r}, {capacitance!r}, {zeta!r}")
    return 2 * zeta * math.sqrt(inductance / capacitance)


def zeta_from_overshoot(overshoot: float) -> float:
    """Damping ratio for a fractional step overshoot (Ogata): ``-ln OS / sqrt(pi^2 + ln^2 OS)``.

    Examples
    --------
    >>> round(zeta_from_overshoot(0.20), 4)
    0.4559
    """
    if not 0 < overshoot < 1:
        raise InputError(f"overshoot must be a fraction between 0 and 1, got {overshoot!r}")
    ln = math.log(overshoot)
    return -ln / math.sqrt(math.pi ** 2 + ln * ln)


def overshoot_from_zeta(zeta: float) -> float:
    """Fractional step overshoot of a second-order system: ``exp(-zeta pi / sqrt(1 - zeta^2))``."""
    if zeta >= 1:
        return 0.0
    return math.exp(-zeta * math.pi / math.sqrt(1 - zeta * zeta))


@dataclass(frozen=True)
class SecondOrder:
    """A second-order figure: natural frequency [Hz] and damping ratio."""

    frequency: float
    damping: float
    model: str
    weight: float | None = None

    @property
    def q(self) -> float:
        return math.inf if self.damping == 0 else 1 / (2 * self.damping)

    @property
    def overshoot(self) -> float:
        return overshoot_from_zeta(self.damping)

    def to_dict(self) -> dict:
        out = {"frequency": self.frequency, "damping": self.damping, "q": self.q,
               "overshoot": self.overshoot, "model": self.model}
        if self.weight is not None:
            out["weight"] = self.weight
        return out


@dataclass(frozen=True)
class Ringing:
    """Ringing figures of a chain with an inductive lead.

    Attributes
    ----------
    lead : SecondOrder
        The lead model (L with the probe's C and the loop R).
    inductance, capacitance, resistance : float
        ``L`` [H], ``C`` [F], ``R`` [ohm] of the lead model.
    target_overshoot : float
        The overshoot the damping figures aim at (fraction).
    damping_resistance : float
        Series resistance to add [ohm] for the target (0 if already damped enough).
    max_inductance : float
        Largest loop inductance that keeps the target with the present ``R`` [H].
    max_lead_length : float or None
        The lead length that has it [m] (Grover; None without a ``lead`` part, or when
        even the shortest wire is too much).
    dominant : SecondOrder or None
        Dominant complex pole pair of a lumped chain (exact poles); for a chain with cables
        the exact response's peak and its sharpness stand for it (``taumatch bandwidth``
        prints them), so no ladder of hundreds of poles is solved for this figure.
    advice : Advice or None
        The damping advice held to the exact step (:mod:`taumatch.analysis.damping`); None
        when not checked or when the step is already within the target.
    """

    lead: SecondOrder
    inductance: float
    capacitance: float
    resistance: float
    target_overshoot: float
    damping_resistance: float
    max_inductance: float
    max_lead_length: float | None
    dominant: SecondOrder | None
    advice: object = None

    def to_dict(self) -> dict:
        out = self.lead.to_dict()
        out.update({
            "inductance": self.inductance,
            "capacitance": self.capacitance,
            "resistance": self.resistance,
            "target_overshoot": self.target_overshoot,
            "damping_resistance": self.damping_resistance,
            "max_inductance": self.max_inductance,
            "max_lead_length": self.max_lead_length,
            "dominant_pole_pair": None if self.dominant is None else self.dominant.to_dict(),
            "advice_checked": None if self.advice is None else self.advice.to_dict(),
        })
        return out

    def summary(self) -> str:
        lead = self.lead
        q = f"{lead.q:.3g}" if math.isfinite(lead.q) else "unbounded (no resistance in the loop)"
        text = (f"ringing (lead L with probe C): f0 {format_quantity(lead.frequency, 'Hz')}, "
                f"damping {lead.damping:.3g}, Q {q}, overshoot {lead.overshoot:.1%}; "
                f"L {format_quantity(self.inductance, 'H')}, C {format_quantity(self.capacitance, 'F')}, "
                f"R {format_quantity(self.resistance, 'Ω')}")
        if self.advice is not None:
            text += "\n  " + self.advice.summary().replace("\n", "\n  ")
        elif self.damping_resistance > 0:
            text += (f"\n  by the lead model, for {self.target_overshoot:.0%} overshoot: add "
                     f"{format_quantity(self.damping_resistance, 'Ω')} in series")
            if self.max_lead_length is not None:
                text += f", or shorten the lead to {format_quantity(self.max_lead_length, 'm')}"
        else:
            text += (f"\n  already within {self.target_overshoot:.0%} overshoot by the lead "
                     "model")
            if self.max_lead_length is not None:
                text += (f" (a lead up to {format_quantity(self.max_lead_length, 'm')} "
                         "keeps it)")
        if self.dominant is not None:
            d = self.dominant
            text += (f"\n  dominant pole pair of the chain: {format_quantity(d.frequency, 'Hz')}, "
                     f"damping {d.damping:.3g}, Q {d.q:.3g}")
        return text


def dominant_pair(h, dc_gain: float | None = None) -> SecondOrder | None:
    """Dominant complex pole pair of the Rational ``h``, or None."""
    dc = abs(dc_gain if dc_gain is not None else h.dc_gain) or 1.0
    best = None
    for term in h.partial_fractions().terms:
        p = complex(term.pole)
        if term.order != 1 or p.imag <= 0 or p == 0:
            continue
        weight = 2 * abs(term.coefficient / p) / dc
        if best is None or weight > best[0]:
            best = (weight, p)
    if best is None:
        return None
    weight, p = best
    return SecondOrder(abs(p) / (2 * math.pi), -p.real / abs(p), "dominant pole pair",
                       float(weight))


def ringing(model, target_overshoot: float = 0.05, f_c: float | None = None, *,
            poles: bool = False) -> Ringing | None:
    """Ringing figures of a :class:`ChainModel`; None when the chain has no inductive lead, or
    when what follows the lead is not capacitive at ``f_c`` (a shunt inductance after it: no
    ringing of the lead with the probe's capacitance to describe).

    Parameters
    ----------
    model : ChainModel
    target_overshoot : float
        Overshoot to design the damping for (fraction, e.g. 0.05).
    f_c : float, optional
        Frequency for the probe capacitance [Hz] (default as in :func:`loading`).
    poles : bool
        Also find the dominant pole pair of a lumped chain (its eigenvalues; the chain's exact
        resonance, :attr:`ChainModel.band`, needs none).
    """
    from ..chain.ground_lead import lead_length_for_inductance
    from ..chain.topology import lead_loop

    loop = lead_loop(model.chain)
    if loop is None:
        return None
    zeta_t = zeta_from_overshoot(target_overshoot)
    L, R = loop.inductance, loop.resistance
    if f_c is None:
        from .loading import _reference_frequency

        f_c = _reference_frequency(model) / 100
    y = 1 / complex(model.impedance(np.array([f_c]), after=loop.first_probe_part - 1)[0])
    C = float(y.imag / (2 * math.pi * f_c))
    if not (math.isfinite(C) and C > 0 and L > 0):
        return None  # the lead sees no capacitance there (an inductive load after it)
    f0 = 1 / (2 * math.pi * math.sqrt(L * C))
    zeta = R / 2 * math.sqrt(C / L)
    lead = SecondOrder(f0, zeta, "lead L with probe C")
    r_need = damping_resistance(L, C, zeta_t)
    damping_r = max(0.0, r_need - R)
    l_max = C * (R / (2 * zeta_t)) ** 2
    length = None
    if len(loop.leads) == 1:
        other = L - loop.leads[0].inductance
        try:
            length = lead_length_for_inductance(l_max - other, loop.leads[0].radius) \
                if l_max > other else None
        except InputError:
            length = None
    dom = None
    if poles and not model.has_lines:  # exact poles of a lumped chain
        try:
            dom = dominant_pair(model.transfer)
        except (ValueError, ArithmeticError, np.linalg.LinAlgError):
            dom = None
    return Ringing(lead, L, C, R, target_overshoot, damping_r, l_max, length, dom)
