"""From a :class:`~taumatch.network.netlist.Network` to its lumped descriptor system and its
transfer function (values :class:`Descriptor` and :class:`TransferInfo`)."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import ComputationError
from .sections import SectionChoice, choose_sections

__all__ = ["MAX_AUTO_UNKNOWNS", "Descriptor", "TransferInfo", "make_descriptor", "transfer_info"]

#: Largest lumped system the automatic section count may produce for the eigenvalue path
#: (dense QZ is O(n^3): about 15 s at 800 unknowns on one core of the test machine).
MAX_AUTO_UNKNOWNS = 1200


@dataclass(frozen=True)
class Descriptor:
    """Lumped descriptor system ``E x' = A x + B u``, ``y = C x + D u`` (s in rad/s).

    ``E, A`` are ``(n, n)``, ``B`` is ``(n, 1)``, ``C`` is ``(1, n)``, ``D`` is ``(1, 1)``;
    ``states`` names the unknowns (``v(node)`` in V, ``i(branch)`` in A).  Unpacks as
    ``E, A, B, C, D = net.descriptor(...)``.
    """

    E: np.ndarray
    A: np.ndarray
    B: np.ndarray
    C: np.ndarray
    D: np.ndarray
    states: tuple
    line_sections: dict = field(default_factory=dict)
    section_choice: SectionChoice | None = None

    def __iter__(self):
        return iter((self.E, self.A, self.B, self.C, self.D))

    def evaluate(self, s) -> np.ndarray:
        """``H(s) = C (s E - A)^-1 B + D`` at complex ``s`` [rad/s] (array)."""
        s = np.atleast_1d(np.asarray(s, dtype=complex))
        m = s[:, None, None] * self.E[None] - self.A[None]
        rhs = np.broadcast_to(self.B.astype(complex)[None], (len(s),) + self.B.shape)
        x = np.linalg.solve(m, rhs)
        return (self.C[None] @ x)[:, 0, 0] + self.D[0, 0]


def make_descriptor(net, source, output, *, line_sections=None, f_max=None) -> Descriptor:
    """See :meth:`taumatch.network.netlist.Network.descriptor`."""
    from .mna import build, dense, source_vector

    net.check(numeric=True)
    net._source(source)
    choice = None
    if net.lines() and line_sections is None:
        choice = choose_sections(net, source, output, f_max=f_max)
        line_sections = choice.sections
    sections = net._sections(line_sections) if net.lines() else {}
    st = build(net.elements, sections=sections, exact_lines=False)
    if choice is not None and st.size > MAX_AUTO_UNKNOWNS:
        raise ComputationError(
            f"lines need {choice.sections} sections each for {choice.tol:.3g} relative error up "
            f"to f_max = {choice.f_max:.4g} Hz, i.e. {st.size} unknowns (limit "
            f"{MAX_AUTO_UNKNOWNS}); give line_sections or a lower f_max, or use response() for "
            f"the exact frequency response"
        )
    c_row = net._output_row(st, output)
    e = dense(st, st.c)
    a = -dense(st, st.g)
    b = source_vector(st, source).reshape(-1, 1)
    return Descriptor(e, a, b, c_row.reshape(1, -1), np.zeros((1, 1)), tuple(st.names()),
                      sections, choice)


@dataclass(frozen=True)
class TransferInfo:
    """A transfer function in zero-pole-gain form and the record of how it was found.

    Attributes
    ----------
    zeros, poles : complex ndarray
        Finite zeros and poles [rad/s] after cancellation.
    gain : float
        ``H(s) = gain * prod(s - zeros) / prod(s - poles)``; ``inf`` when it is beyond the
        float range (high orders: use ``scaled_gain``).
    scaled_gain : float
        ``H(s) = scaled_gain * prod((s - zeros)/w0) / prod((s - poles)/w0)``, always finite.
    check_error : float
        Worst relative mismatch of the zero-pole-gain form against the direct solve
        ``C (sE - A)^-1 B + D`` at the test points (see :mod:`taumatch.network.pencil`).
    cancelled : tuple of (pole, zero)
        Pole-zero pairs removed as common factors (uncontrollable/unobservable modes, or an
        exact cancellation such as a compensated divider) [rad/s].
    infinite_poles : int
        Infinite generalised eigenvalues of the pencil (algebraic unknowns).
    w0 : float
        Frequency scale used for the eigenvalue computation [rad/s].
    line_sections : dict
        Pi sections used per line.
    section_choice : SectionChoice or None
        Outcome of the automatic section-count search, when it ran.
    """

    zeros: np.ndarray
    poles: np.ndarray
    gain: float
    cancelled: tuple
    infinite_poles: int
    w0: float
    line_sections: dict
    section_choice: SectionChoice | None = None
    scaled_gain: float = float("nan")
    check_error: float = 0.0

    @property
    def order(self) -> int:
        """Number of finite poles kept."""
        return len(self.poles)

    @property
    def rational(self):
        """The transfer function as :class:`taumatch.lti.Rational` (``from_zpk``)."""
        from ..lti import Rational

        if not np.isfinite(self.gain) or (self.gain == 0 and self.scaled_gain != 0):
            raise ComputationError(
                f"transfer function gain is beyond the float range ({len(self.poles)} poles, "
                f"{len(self.zeros)} zeros); use fewer line sections or the scaled form"
            )
        return Rational.from_zpk(self.zeros, self.poles, self.gain)

    def __call__(self, s):
        """``H(s)`` from the zero-pole-gain form at complex ``s`` [rad/s]."""
        x = np.asarray(s, dtype=complex) / self.w0
        num = np.prod(x[..., None] - self.zeros / self.w0, axis=-1) if self.zeros.size else 1.0
        den = np.prod(x[..., None] - self.poles / self.w0, axis=-1) if self.poles.size else 1.0
        return self.scaled_gain * num / den

    def to_dict(self) -> dict:
        return {
            "zeros_rad_s": list(self.zeros),
            "poles_rad_s": list(self.poles),
            "gain": self.gain if np.isfinite(self.gain) else None,
            "scaled_gain": self.scaled_gain,
            "w0_rad_s": self.w0,
            "cancelled": [list(p) for p in self.cancelled],
            "infinite_poles": self.infinite_poles,
            "check_error": self.check_error,
            "line_sections": dict(self.line_sections),
            "section_choice": None if self.section_choice is None
            else self.section_choice.to_dict(),
        }

    def summary(self) -> str:
        from ..units import format_quantity

        head = (f"transfer function: {len(self.zeros)} zeros, {len(self.poles)} poles, "
                f"gain {self.gain:.6g}")
        lines = [head]
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


def transfer_info(net, source, output, *, line_sections=None, f_max=None,
                  cancel_rtol=1e-8) -> TransferInfo:
    """See :meth:`taumatch.network.netlist.Network.transfer_info`."""
    from .pencil import descriptor_zpk

    if not (isinstance(cancel_rtol, (int, float)) and 0 <= cancel_rtol < 1):
        from ..errors import InputError

        raise InputError(f"cancel_rtol: must be a number in [0, 1), got {cancel_rtol!r}")
    d = make_descriptor(net, source, output, line_sections=line_sections, f_max=f_max)
    zpk = descriptor_zpk(d.E, d.A, d.B, d.C, d.D, cancel_rtol=cancel_rtol)
    return TransferInfo(zpk.zeros, zpk.poles, zpk.gain, zpk.cancelled, zpk.infinite_poles,
                        zpk.w0, d.line_sections, d.section_choice, zpk.scaled_gain,
                        zpk.check_error)
