"""A chain's exact response as a cascade of two-ports, at any complex frequency.

The chain is a cascade: every part sits between the node before it and the node after it
(shunt parts on one node), and a buffer isolates what follows from what comes before.  So the
response needs no matrix solve: one sweep from the instrument back to the probe point keeps,
at every node, the impedance looking towards the instrument ``Z`` and the voltage ratio of
each part (own derivation, the usual two-port algebra):

* series impedance ``Zs`` (``r || c`` then ``l``; a lead ``r + s L``): ``Z <- Zs + Z``,
  ratio ``Z / (Zs + Z)``;
* shunt admittance ``Y`` (``r``, ``c``, ``l``, the ``r``-``c`` branch): ``Z <- Z / (1 + Y Z)``;
* line (exact, telegrapher's equations, or as ``N`` pi sections):
  ``Z <- (Z + p) / (q Z + 1)``, ratio ``inv_a Z / (Z + p)`` (:func:`line_twoport`);
* buffer: the circuit sees its ``r || c``; it drives ``gain`` times its input, through its
  front end and ``r_out`` into what follows: ratio ``gain F(s) / (1 + r_out / Z)``;
* input: ``r || c`` to ground, the output through the front end ``F(s)`` after the node.

The probe point (``tip``) is fed from the source through its resistance:
``V_tip / V_s = Z_tip / (R_s + Z_tip)``, times the source edge ``1 / (1 + s tau)`` when asked.
Front ends and the source edge have the shapes of :mod:`taumatch.chain.build`.  This is the
same network :func:`taumatch.chain.build.build` writes for modified nodal analysis (the test
suite holds the two together); it is evaluated here in O(parts) per frequency, vectorised
over frequencies, so a chain of many cables costs what a few do.  ``s = 0`` is evaluated at
``s = 1e-20j`` rad/s (an inductor to ground is then a short, a series capacitor an open; the
difference from the limit is far below double precision for any physical time constant).
"""

from __future__ import annotations

import numpy as np

from ..errors import ComputationError
from .build import front_end_shape
from .parts import Buffer, Input, Lead, Line, Series, Shunt

__all__ = ["DC_POINT", "Cascade"]

#: Where ``s = 0`` is evaluated [rad/s].
DC_POINT = 1e-20j


def filter_response(s, bandwidth, response):
    """The front end of ``bandwidth`` [Hz] and shape ``response`` at ``s`` [rad/s]."""
    w, zeta = front_end_shape(bandwidth, response)
    if zeta is None:
        return w / (s + w)
    if zeta == 1.0:
        return (w / (s + w)) ** 2
    return w * w / (s * s + 2 * zeta * w * s + w * w)


def _par(*admittances):
    return sum(admittances)


class Cascade:
    """The exact response of a :class:`~taumatch.chain.parts.Chain` (see the module text).

    Parameters
    ----------
    chain : Chain
    line_sections : int, optional
        Lines as ladders of this many pi sections instead of exact.
    """

    def __init__(self, chain, line_sections=None):
        self.chain = chain
        self.line_sections = line_sections

    def _sweep(self, s):
        """Impedance at every node from the end back, and each part's voltage ratio."""
        from ..network.elements import Line as NetLine
        from ..network.line import line_twoport

        parts = self.chain.parts
        n = len(parts)
        z_at = [None] * (n + 1)  # z_at[k]: impedance looking right at the node after part k
        ratio = [None] * (n + 1)  # ratio[k]: V(node after part k) / V(node before part k)
        z = None
        lines = {}  # identical cables are one two-port, computed once per call
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            for k in range(n, 0, -1):
                p = parts[k - 1]
                z_at[k] = z
                if isinstance(p, Input):
                    z = 1 / _shunt_y(s, p.r, p.c)
                    z_at[k] = z
                    ratio[k] = 1.0
                elif isinstance(p, Shunt):
                    y = _shunt_y(s, p.r, p.c)
                    if p.l is not None:
                        y = y + 1 / (s * p.l)
                    if p.branch is not None:
                        y = y + 1 / (p.branch.r + 1 / (s * p.branch.c))
                    z = z / (1 + y * z)
                    z_at[k] = z
                    ratio[k] = 1.0
                elif isinstance(p, (Series, Lead)):
                    if isinstance(p, Lead):
                        zs = p.r + s * p.inductance
                    else:
                        zs = 0.0 if p.l is None else s * p.l
                        if p.r is not None or p.c is not None:
                            zs = zs + 1 / _shunt_y(s, p.r, p.c)
                    ratio[k] = z / (zs + z)
                    z = zs + z
                elif isinstance(p, Line):
                    key = (p.length, p.r, p.l, p.g, p.c)
                    if key not in lines:
                        ln = NetLine("T", "a", "b", *key)
                        lines[key] = line_twoport(ln, s, self.line_sections)
                    pp, qq, inv_a = lines[key]
                    ratio[k] = inv_a * z / (z + pp)
                    z = (z + pp) / (qq * z + 1)
                elif isinstance(p, Buffer):
                    drive = p.gain
                    if p.bandwidth is not None:
                        drive = drive * filter_response(s, p.bandwidth, p.response)
                    ratio[k] = drive * z / (p.r_out + z)
                    z = 1 / _shunt_y(s, p.r, p.c)
        z_at[0] = z
        return z_at, ratio

    def _s(self, s):
        s = np.atleast_1d(np.asarray(s, dtype=complex))
        return np.where(s == 0, DC_POINT, s)

    def transfer(self, s, *, at: str = "output", edge: bool = False) -> np.ndarray:
        """``V / V_s`` at complex ``s`` [rad/s]: at the instrument's output (``"output"``,
        after its front end) or at the probe point (``"probe"``), with the source edge when
        ``edge`` is True."""
        s = self._s(s)
        z_at, ratio = self._sweep(s)
        src = self.chain.source
        with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
            h = np.ones(s.shape, dtype=complex)
            if src.resistance > 0:
                h = z_at[0] / (src.resistance + z_at[0])
            if edge and src.rise_time is not None:
                h = h / (1 + s * src.edge_time_constant)
            if at == "output":
                for r in ratio[1:]:
                    h = h * r
                inp = self.chain.input
                if inp.bandwidth is not None:
                    h = h * filter_response(s, inp.bandwidth, inp.response)
        return _finite(h, "transfer function")

    def response(self, freqs, *, at: str = "output", edge: bool = False) -> np.ndarray:
        """:meth:`transfer` at ``j 2 pi f``, ``freqs`` in Hz."""
        return self.transfer(2j * np.pi * np.asarray(freqs, dtype=float), at=at, edge=edge)

    def impedance(self, s, after: int = 0) -> np.ndarray:
        """Impedance [ohm] looking towards the instrument at the node after part ``after``
        (0: the probe point, source removed), at complex ``s`` [rad/s]."""
        z_at, _ = self._sweep(self._s(s))
        return _finite(z_at[after], "impedance")


def _shunt_y(s, r, c):
    y = 0.0 if r is None else 1.0 / r
    if c is not None:
        y = y + s * c
    return y + 0 * s


def _finite(h, what):
    h = np.asarray(h, dtype=complex)
    bad = ~np.isfinite(h)
    if np.any(bad):
        raise ComputationError(
            f"the chain's {what} is not a finite number at {int(bad.sum())} of "
            f"{h.size} frequencies: values beyond the float range (check the spec's values)"
        )
    return h
