"""The record of a network's transfer function: :class:`TransferInfo`, the
:class:`taumatch.lti.Rational` with how it was found.  A leaf of the package: the pencil
makes it, the transfer path and the analyses read it."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

__all__ = ["TransferInfo"]


@dataclass(frozen=True)
class TransferInfo:
    """A transfer function and the record of how it was found.

    Attributes
    ----------
    rational : Rational
        ``H(s)`` (:class:`taumatch.lti.Rational`, zeros and poles in rad/s).
    cancelled : tuple of (pole, zero)
        Pole-zero pairs removed as common factors (uncontrollable/unobservable modes, or an
        exact cancellation such as a compensated divider) [rad/s].
    infinite_poles : int
        Infinite generalised eigenvalues of the pencil (algebraic unknowns), and lone roots
        judged spurious (``dropped``).
    check_error : float
        Worst relative mismatch of ``rational`` against the direct solve
        ``C (sE - A)^-1 B + D`` at the test points (see :mod:`taumatch.network.pencil`).
    line_sections : dict
        Pi sections used per line.
    section_choice : taumatch.network.sections.SectionChoice or None
        Outcome of the automatic section-count search, when it ran.
    dropped : tuple
        ``(("pole" | "zero", value), ...)``: lone roots judged spurious.
    """

    rational: object
    cancelled: tuple = ()
    infinite_poles: int = 0
    check_error: float = 0.0
    line_sections: dict = field(default_factory=dict)
    section_choice: object = None  # a sections.SectionChoice, when the search ran
    dropped: tuple = ()

    @property
    def zeros(self) -> np.ndarray:
        """Finite zeros [rad/s] after cancellation."""
        return self.rational.zeros

    @property
    def poles(self) -> np.ndarray:
        """Finite poles [rad/s] after cancellation."""
        return self.rational.poles

    @property
    def gain(self) -> float:
        """Ratio of the leading coefficients (``inf`` when beyond the float range)."""
        return self.rational.leading_gain

    @property
    def order(self) -> int:
        """Number of finite poles kept."""
        return len(self.poles)

    def to_dict(self) -> dict:
        return {
            "zeros_rad_s": list(self.zeros),
            "poles_rad_s": list(self.poles),
            "gain": self.gain if np.isfinite(self.gain) else None,
            "gain_scaled": self.rational.gain,
            "frequency_scale_rad_s": self.rational.w0,
            "cancelled": [list(p) for p in self.cancelled],
            "infinite_poles": self.infinite_poles,
            "check_error": self.check_error,
            "line_sections": dict(self.line_sections),
            "section_choice": None if self.section_choice is None
            else self.section_choice.to_dict(),
        }

    def summary(self) -> str:
        from ..units import format_quantity

        h = self.rational
        gain = (f"gain {self.gain:.6g}" if np.isfinite(self.gain)
                else f"gain {h.gain:.6g} relative to {h.w0:.6g} rad/s")
        lines = [f"transfer function: {len(self.zeros)} zeros, {len(self.poles)} poles, {gain}"]
        for p in self.poles:
            lines.append(f"  pole {p.real:.6g} {p.imag:+.6g}j rad/s "
                         f"({format_quantity(abs(p) / (2 * np.pi), 'Hz')})")
        for z in self.zeros:
            lines.append(f"  zero {z.real:.6g} {z.imag:+.6g}j rad/s")
        for p, z in self.cancelled:
            lines.append(f"  cancelled pole {p:.6g} with zero {z:.6g} rad/s")
        if self.line_sections:
            lines.append("  line sections: " + ", ".join(
                f"{k} {v}" for k, v in self.line_sections.items()))
        if self.section_choice is not None:
            ch = self.section_choice
            lines.append(f"  ladder error {ch.error:.3g} up to "
                         f"{format_quantity(ch.f_max, 'Hz')} (tolerance {ch.tol:.3g})")
        return "\n".join(lines)
