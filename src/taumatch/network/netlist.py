"""The :class:`Network` value: elements by name, nodes by name, analyses as methods.

A ``Network`` is frozen; each builder method returns a new network with one more element::

    net = (Network()
           .voltage_source("Vin", "in", "0")
           .resistor("R1", "in", "out", 1e3)
           .capacitor("C1", "out", "0", 10e-12))

The topology (ground reachable, no dangling ends) is checked when an analysis runs, because
a network under construction is legitimately incomplete; :meth:`Network.check` runs the same
checks on demand.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..errors import InputError
from . import elements as el
from .elements import is_ground, is_symbolic

__all__ = ["Network"]

_SOURCES = (el.VoltageSource, el.CurrentSource)
_DANGLE = (el.Resistor, el.Conductance, el.Capacitor, el.Inductor, el.CurrentSource)


def _canon(node: str) -> str:
    return "0" if is_ground(node) else node


@dataclass(frozen=True)
class Network:
    """A linear network of named elements between named nodes (``"0"``/``"gnd"`` is ground).

    Build with the element methods (each returns a new ``Network``), then analyse with
    :meth:`response`, :meth:`impedance`, :meth:`transfer`, :meth:`transfer_info`,
    :meth:`descriptor` or :meth:`transfer_symbolic`.

    Examples
    --------
    >>> net = (Network().voltage_source("V1", "in", "0")
    ...        .resistor("R1", "in", "out", 1e3).capacitor("C1", "out", "0", 10e-12))
    >>> info = net.transfer_info("V1", "out")
    >>> [round(p.real) for p in info.poles]
    [-100000000]
    >>> round(float(abs(net.response([15.915494e6], "V1", "out")[0])), 6)  # -3 dB at 1/(2 pi R C)
    0.707107
    """

    elements: tuple = ()

    def __post_init__(self):
        elems = tuple(self.elements)
        seen = set()
        for e in elems:
            if not isinstance(e, el.Element):
                raise InputError(f"network element must be an Element, got {e!r}")
            if e.name in seen:
                raise InputError(f"element {e.name}: duplicate name; every element needs its own")
            seen.add(e.name)
        object.__setattr__(self, "elements", elems)

    # ----------------------------------------------------------------- building
    def add(self, element: el.Element) -> Network:
        """A new network with ``element`` added (names must be unique)."""
        return replace(self, elements=self.elements + (element,))

    def resistor(self, name, a, b, value) -> Network:
        """Add resistor ``name`` of ``value`` [ohm] between nodes ``a`` and ``b``."""
        return self.add(el.Resistor(name, a, b, value))

    def conductance(self, name, a, b, value) -> Network:
        """Add conductance ``name`` of ``value`` [S] between nodes ``a`` and ``b``."""
        return self.add(el.Conductance(name, a, b, value))

    def capacitor(self, name, a, b, value) -> Network:
        """Add capacitor ``name`` of ``value`` [F] between nodes ``a`` and ``b``."""
        return self.add(el.Capacitor(name, a, b, value))

    def inductor(self, name, a, b, value) -> Network:
        """Add inductor ``name`` of ``value`` [H] between nodes ``a`` and ``b``."""
        return self.add(el.Inductor(name, a, b, value))

    def voltage_source(self, name, plus, minus="0") -> Network:
        """Add an independent voltage source ``v(plus) - v(minus) = u`` [V]."""
        return self.add(el.VoltageSource(name, plus, minus))

    def current_source(self, name, plus, minus="0") -> Network:
        """Add an independent current source: ``u`` [A] leaves ``plus``, enters ``minus``."""
        return self.add(el.CurrentSource(name, plus, minus))

    def vcvs(self, name, plus, minus, ctrl_plus, ctrl_minus, gain=1.0) -> Network:
        """Add a voltage-controlled voltage source (dimensionless ``gain``), e.g. a buffer."""
        return self.add(
            el.VCVS(name, plus, minus, ctrl_plus,
                    ctrl_minus, gain)
        )

    def line(self, name, a, b, *, length, l, c, r=0.0, g=0.0) -> Network:
        """Add a transmission line from ``a`` to ``b`` (return conductor on ground).

        ``length`` [m]; per metre ``r`` [ohm/m], ``l`` [H/m], ``g`` [S/m], ``c`` [F/m].
        """
        return self.add(el.Line(name, a, b, length, r, l, g, c))

    # ----------------------------------------------------------------- inspection
    def element(self, name: str) -> el.Element:
        """The element called ``name``."""
        for e in self.elements:
            if e.name == name:
                return e
        raise InputError(
            f"element {name!r} is not in the network (elements: "
            f"{', '.join(e.name for e in self.elements) or 'none'})"
        )

    def nodes(self) -> tuple[str, ...]:
        """Non-ground node names in order of first appearance."""
        out = []
        for e in self.elements:
            for n in e.nodes():
                if not is_ground(n) and n not in out:
                    out.append(n)
        return tuple(out)

    def lines(self) -> tuple[el.Line, ...]:
        """The transmission-line elements."""
        return tuple(e for e in self.elements if isinstance(e, el.Line))

    @property
    def is_symbolic(self) -> bool:
        """True when any element value is a sympy symbol or exact sympy number."""
        return any(is_symbolic(v) for e in self.elements for v in e.values())

    def subs(self, values) -> Network:
        """A new network with sympy symbols replaced by ``values`` (``{symbol: number}``)."""
        out = []
        for e in self.elements:
            changes = {}
            for f in ("value", "gain"):
                v = getattr(e, f, None)
                if is_symbolic(v):
                    v2 = v.subs(values)
                    changes[f] = float(v2) if v2.is_number else v2
            out.append(replace(e, **changes) if changes else e)
        return Network(tuple(out))

    # ----------------------------------------------------------------- checks
    def check(self, *, numeric: bool = False) -> None:
        """Raise :class:`InputError` for dangling ends and nodes with no path to ground
        (through elements other than current sources), and for loops of voltage sources.

        With ``numeric=True`` also require every value to be a number (not a sympy symbol).
        """
        if not self.elements:
            raise InputError("network has no elements")
        count: dict = {}
        owner: dict = {}
        for e in self.elements:
            terms = e.nodes()
            if isinstance(e, el.VCVS):
                kinds = [False, False, True, True]  # control terminals can dangle
            else:
                kinds = [isinstance(e, _DANGLE)] * len(terms)
            for n, k in zip(terms, kinds):
                n = _canon(n)
                count[n] = count.get(n, 0) + 1
                if k:
                    owner.setdefault(n, e.name)
        for n, k in count.items():
            if k == 1 and n != "0" and n in owner:
                raise InputError(
                    f"element {owner[n]}: node {n!r} connects to nothing else (dangling end)"
                )
        # connectivity to ground
        parent = {}

        def find(x):
            parent.setdefault(x, x)
            while parent[x] != x:
                parent[x] = parent[parent[x]]
                x = parent[x]
            return x

        def union(x, y):
            parent[find(_canon(x))] = find(_canon(y))

        find("0")
        for e in self.elements:
            if isinstance(e, el.VCVS):
                union(e.plus, e.minus)
                find(_canon(e.ctrl_plus))
                find(_canon(e.ctrl_minus))
            elif isinstance(e, el.Line):
                union(e.a, "0")
                union(e.b, "0")
            elif isinstance(e, el.CurrentSource):  # fixes a current, not a voltage
                find(_canon(e.a))
                find(_canon(e.b))
            else:
                union(e.a, e.b)
        for e in self.elements:
            for n in e.nodes():
                if find(_canon(n)) != find("0"):
                    raise InputError(
                        f"element {e.name}: node {n!r} has no connection to ground "
                        f"(\"0\" or \"gnd\")"
                    )
        # loops made only of voltage sources (and buffer outputs) fix no current: singular
        vparent: dict = {}

        def vfind(x):
            vparent.setdefault(x, x)
            while vparent[x] != x:
                x = vparent[x]
            return x

        for e in self.elements:
            if isinstance(e, (el.VoltageSource, el.VCVS)):
                p, m = (e.a, e.b) if isinstance(e, el.VoltageSource) else (e.plus, e.minus)
                rp, rm = vfind(_canon(p)), vfind(_canon(m))
                if rp == rm:
                    raise InputError(
                        f"element {e.name}: closes a loop made only of voltage sources "
                        f"(between {p!r} and {m!r}); put a resistance in the loop"
                    )
                vparent[rp] = rm
        if numeric:
            for e in self.elements:
                for v in e.values():
                    if is_symbolic(v):
                        raise InputError(
                            f"element {e.name}: value {v} is symbolic; use transfer_symbolic "
                            f"or subs() to give numbers"
                        )

    def _source(self, source: str) -> el.Element:
        e = self.element(source)
        if not isinstance(e, _SOURCES):
            raise InputError(
                f"element {source}: not an independent source (use a voltage_source or "
                f"current_source as the input)"
            )
        return e

    def _node_row(self, st, node, role):
        if not isinstance(node, str):
            raise InputError(f"{role}: node name must be a string, got {node!r}")
        if is_ground(node):
            return None
        if node not in self.nodes():
            raise InputError(
                f"{role}: node {node!r} is not in the network (nodes: {', '.join(self.nodes())})"
            )
        return st.nodes[node]

    def _output_row(self, st, output) -> np.ndarray:
        if isinstance(output, (tuple, list)):
            if len(output) != 2:
                raise InputError(f"output: give a node or a (plus, minus) pair, got {output!r}")
            plus, minus = output
        else:
            plus, minus = output, "0"
        c = np.zeros(st.size)
        i = self._node_row(st, plus, "output")
        j = self._node_row(st, minus, "output")
        if i is not None:
            c[i] += 1
        if j is not None:
            c[j] -= 1
        return c

    def _sections(self, line_sections) -> dict:
        lines = self.lines()
        if isinstance(line_sections, dict):
            out = {}
            for ln in lines:
                if ln.name not in line_sections:
                    raise InputError(f"element {ln.name}: line_sections gives no count for it")
                out[ln.name] = _count(ln.name, line_sections[ln.name])
            for k in line_sections:
                if k not in out:
                    raise InputError(f"line_sections: {k!r} is not a line of the network")
            return out
        return {ln.name: _count(ln.name, line_sections) for ln in lines}

    # ----------------------------------------------------------------- analyses
    def response(self, freqs, source, output, *, line_sections=None) -> np.ndarray:
        """Frequency response ``H(j 2 pi f) = y / u`` [V/V, or ohm for a current source].

        Solves the complex MNA system at every frequency; lines are stamped exactly
        (telegrapher's chain equations) unless ``line_sections`` (int, or ``{name: N}``)
        asks for their lumped pi-section ladders.

        Parameters
        ----------
        freqs : array_like
            Frequencies [Hz], zero or positive.
        source : str
            Name of the independent source taken as the input ``u``; other sources are zero.
        output : str or (str, str)
            Node whose voltage is the output, or ``(plus, minus)`` node pair.
        """
        from .mna import build, source_vector

        self.check(numeric=True)
        self._source(source)
        f = _freqs(freqs)
        modes = {} if line_sections is None else self._sections(line_sections)
        st = build(self.elements)
        st.exact_lines = [
            (ln, a, b, k, modes.get(ln.name, True)) for (ln, a, b, k, _) in st.exact_lines
        ]
        c = self._output_row(st, output)
        b = source_vector(st, source)
        return _solve(st, f, b, c, "response")

    def impedance(self, freqs, node_plus, node_minus="0") -> np.ndarray:
        """Driving-point impedance [ohm] between ``node_plus`` and ``node_minus``.

        Independent sources are zeroed (voltage sources short, current sources open); lines
        are exact.  ``freqs`` in Hz.
        """
        from .mna import build

        self.check(numeric=True)
        f = _freqs(freqs)
        if isinstance(node_plus, str) and isinstance(node_minus, str) and (
            _canon(node_plus) == _canon(node_minus)
        ):
            raise InputError(
                f"impedance: node_plus and node_minus are the same node {node_plus!r}"
            )
        st = build(self.elements)
        c = self._output_row(st, (node_plus, node_minus))
        return _solve(st, f, c.copy(), c, "impedance")

    def descriptor(self, source, output, *, line_sections=None, f_max=None):
        """Lumped descriptor system ``E x' = A x + B u, y = C x + D u`` (see :class:`Descriptor`).

        Lines are expanded into ``line_sections`` pi sections (int or ``{name: N}``); None
        chooses the count automatically (:func:`taumatch.network.sections.choose_sections`,
        up to ``f_max`` [Hz]).
        """
        from .transfer import make_descriptor

        return make_descriptor(self, source, output, line_sections=line_sections, f_max=f_max)

    def transfer_info(self, source, output, *, line_sections=None, f_max=None,
                      cancel_rtol=1e-8):
        """Zeros, poles and gain of the transfer function, with how they were obtained.

        Returns a :class:`taumatch.network.transfer.TransferInfo`; its ``rational`` is what
        :meth:`transfer` returns.  See :func:`taumatch.network.pencil.descriptor_zpk` for the
        method and ``cancel_rtol``.
        """
        from .transfer import transfer_info

        return transfer_info(self, source, output, line_sections=line_sections, f_max=f_max,
                             cancel_rtol=cancel_rtol)

    def transfer(self, source, output, *, line_sections=None, f_max=None, cancel_rtol=1e-8):
        """Transfer function ``y/u`` as a :class:`taumatch.lti.Rational` in s [rad/s]."""
        return self.transfer_info(source, output, line_sections=line_sections, f_max=f_max,
                                  cancel_rtol=cancel_rtol).rational

    def transfer_symbolic(self, source, output, s=None):
        """Exact transfer function as a cancelled sympy expression in ``s`` (no lines)."""
        from .symbolic import transfer_symbolic

        return transfer_symbolic(self, source, output, s=s)


def _count(name, n) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or n < 1:
        raise InputError(f"element {name}: line section count must be an integer >= 1, got {n!r}")
    return int(n)


def _freqs(freqs) -> np.ndarray:
    try:
        f = np.atleast_1d(np.asarray(freqs, dtype=float))
    except (TypeError, ValueError):
        raise InputError(f"freqs: must be frequencies in Hz, got {freqs!r}") from None
    if f.ndim != 1 or not np.all(np.isfinite(f)) or np.any(f < 0):
        raise InputError("freqs: must be a 1-D array of finite frequencies >= 0 Hz")
    return f


def _solve(st, f, b, c, what):
    from ..errors import ComputationError
    from .mna import complex_matrices

    m = complex_matrices(st, 2 * np.pi * f)
    rhs = np.broadcast_to(b.astype(complex)[None, :, None], (len(f), st.size, 1))
    # equilibrate rows then columns by powers of two (exact), one scaling per frequency:
    # element admittances span many decades (a uH inductor at 1 Hz next to megohms)
    with np.errstate(divide="ignore"):
        rmax = np.max(np.abs(m), axis=2)
        dr = np.exp2(-np.round(np.log2(np.where(rmax > 0, rmax, 1.0))))
        m = m * dr[:, :, None]
        cmax = np.max(np.abs(m), axis=1)
        dc = np.exp2(-np.round(np.log2(np.where(cmax > 0, cmax, 1.0))))
        m = m * dc[:, None, :]
    rhs = rhs * dr[:, :, None]
    try:
        x = np.linalg.solve(m, rhs)[..., 0] * dc
    except np.linalg.LinAlgError:
        # find the offending frequencies one by one for a useful message
        for k in range(len(f)):
            if np.linalg.cond(m[k]) > 1e15:
                raise ComputationError(
                    f"{what}: the network equations are singular at {f[k]:.6g} Hz "
                    f"(e.g. a node reached only through capacitors at DC, or a loop of "
                    f"voltage sources)"
                ) from None
        raise  # pragma: no cover
    return x @ c
