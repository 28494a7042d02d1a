"""From a :class:`~taumatch.network.netlist.Network` to its lumped descriptor system and its
transfer function: :class:`Descriptor` (the matrices) and :class:`TransferInfo` (the
:class:`taumatch.lti.Rational` with the record of how it was found)."""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from ..errors import ComputationError, InputError
from .info import TransferInfo
from .sections import SectionChoice, choose_sections

__all__ = ["MAX_UNKNOWNS", "Descriptor", "TransferInfo", "make_descriptor", "transfer_info"]

#: Largest lumped system the eigenvalue path accepts (dense QZ is O(n^3): about 4 s at 800
#: unknowns on one core of the test machine, and the memory grows as n^2).
MAX_UNKNOWNS = 1200


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
        from .band import sweep_range

        sweep = None if f_max is not None else sweep_range(net, source, output)
        choice = choose_sections(lambda f, n: net.response(f, source, output, line_sections=n),
                                 f_max=f_max, sweep=sweep)
        line_sections = choice.sections
    sections = net._sections(line_sections) if net.lines() else {}
    st = build(net.elements, sections=sections, exact_lines=False)
    if st.size > MAX_UNKNOWNS:
        raise ComputationError(
            f"{st.size} unknowns with {max(sections.values())} sections per line is beyond the "
            f"limit of {MAX_UNKNOWNS} for poles and zeros; give fewer line_sections or a lower "
            f"f_max, or use response() for the exact frequency response"
        )
    c_row = net._output_row(st, output)
    e = dense(st, st.c)
    a = -dense(st, st.g)
    b = source_vector(st, source).reshape(-1, 1)
    return Descriptor(e, a, b, c_row.reshape(1, -1), np.zeros((1, 1)), tuple(st.names()),
                      sections, choice)


def transfer_info(net, source, output, *, line_sections=None, f_max=None,
                  cancel_rtol=1e-8) -> TransferInfo:
    """See :meth:`taumatch.network.netlist.Network.transfer_info`."""
    from .pencil import descriptor_zpk

    if not (isinstance(cancel_rtol, (int, float)) and 0 <= cancel_rtol < 1):
        raise InputError(f"cancel_rtol: must be a number in [0, 1), got {cancel_rtol!r}")
    d = make_descriptor(net, source, output, line_sections=line_sections, f_max=f_max)
    info = descriptor_zpk(d.E, d.A, d.B, d.C, d.D, cancel_rtol=cancel_rtol)
    return replace(info, line_sections=d.line_sections, section_choice=d.section_choice)
