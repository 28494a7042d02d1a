"""Modified nodal analysis: stamping elements into ``G x + C x' = b u``.

Unknowns ``x`` are the non-ground node voltages (in order of first appearance) followed by
one branch current per inductor, voltage source, controlled source and per lumped line
section (its series R-L branch); an exactly stamped line adds its two port currents.
KCL rows sum the currents *leaving* each node.

The stamps are kept as lists of ``(row, col, value)`` so that the same code serves float
matrices (numpy), exact/symbolic matrices (sympy) and frequency-dependent line stamps.
The lumped descriptor system used by the other layers is ``E x' = A x + B u`` with
``E = C`` and ``A = -G``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .elements import (
    VCVS,
    Capacitor,
    Conductance,
    CurrentSource,
    Inductor,
    Line,
    Resistor,
    VoltageSource,
    is_ground,
)
from .line import line_rows

__all__ = ["Stamped", "build", "complex_matrices", "dense"]


@dataclass
class Stamped:
    """The stamped equations of one network (mutable scratch object, internal)."""

    nodes: dict = field(default_factory=dict)  # node name -> row
    branches: list = field(default_factory=list)  # names of branch-current unknowns
    g: list = field(default_factory=list)  # (i, j, value)
    c: list = field(default_factory=list)
    sources: dict = field(default_factory=dict)  # source name -> [(i, value)]
    exact_lines: list = field(default_factory=list)  # (line, ia, ib, k1, k2, mode, sections)

    @property
    def size(self) -> int:
        return len(self.nodes) + len(self.branches)

    def names(self) -> list[str]:
        """Names of the unknowns: ``v(node)`` then ``i(branch)``."""
        return [f"v({n})" for n in self.nodes] + [f"i({b})" for b in self.branches]

    def node(self, name: str):
        """Row of node ``name``, or None for ground."""
        if is_ground(name):
            return None
        if name not in self.nodes:
            self.nodes[name] = len(self.nodes)
        return self.nodes[name]

    def branch(self, name: str) -> int:
        self.branches.append(name)
        return -len(self.branches)  # provisional: resolved by offset after all nodes are known


def _add(entries, i, j, v):
    if i is not None and j is not None:
        entries.append((i, j, v))


def _admittance(entries, a, b, y):
    _add(entries, a, a, y)
    _add(entries, b, b, y)
    _add(entries, a, b, -y)
    _add(entries, b, a, -y)


def build(elements, *, sections=None, exact_lines=True) -> Stamped:
    """Stamp ``elements`` into MNA form.

    Parameters
    ----------
    elements : sequence of Element
    sections : dict, optional
        ``{line name: N}``: lines expanded into ``N`` lumped pi sections.  A line not listed is
        stamped exactly (``exact_lines=True``) or through the ABCD power of its ladder when
        ``exact_lines`` is an int (a common section count).
    exact_lines : bool or int
        What to do with lines not in ``sections`` (see above).  ``False`` is an error for
        callers that need a lumped system; they must list every line in ``sections``.
    """
    st = Stamped()
    sections = dict(sections or {})
    # all nodes first, so that branch rows follow node rows
    for el in elements:
        for n in el.nodes():
            st.node(n)
    for el in elements:
        if isinstance(el, Line) and el.name in sections:
            for k in range(1, sections[el.name]):
                st.node(f"{el.name}#{k}")
    pending = []  # (kind, element, branch placeholder)
    g, c = st.g, st.c
    for el in elements:
        if isinstance(el, Resistor):
            _admittance(g, st.node(el.a), st.node(el.b), 1 / el.value)
        elif isinstance(el, Conductance):
            _admittance(g, st.node(el.a), st.node(el.b), el.value)
        elif isinstance(el, Capacitor):
            _admittance(c, st.node(el.a), st.node(el.b), el.value)
        elif isinstance(el, CurrentSource):
            vec = []
            if st.node(el.a) is not None:
                vec.append((st.node(el.a), -1))
            if st.node(el.b) is not None:
                vec.append((st.node(el.b), 1))
            st.sources[el.name] = vec
        elif isinstance(el, (Inductor, VoltageSource, VCVS)):
            pending.append((el, len(st.branches)))
            st.branches.append(el.name)
        elif isinstance(el, Line):
            if el.name in sections:
                n = sections[el.name]
                delta = el.length / n
                chain = [el.a] + [f"{el.name}#{k}" for k in range(1, n)] + [el.b]
                for k in range(n):
                    pending.append(((el, k, chain[k], chain[k + 1], delta), len(st.branches)))
                    st.branches.append(f"{el.name}#s{k + 1}")
                for k, node in enumerate(chain):
                    share = 0.5 if k in (0, n) else 1.0
                    i = st.node(node)
                    _add(c, i, i, share * el.c * delta)
                    if el.g:
                        _add(g, i, i, share * el.g * delta)
            else:
                if exact_lines is False:
                    raise ValueError(f"line {el.name} needs a section count")
                k1 = len(st.branches)
                st.branches.append(f"{el.name}:1")
                st.branches.append(f"{el.name}:2")
                st.exact_lines.append((el, st.node(el.a), st.node(el.b), k1, exact_lines))
        else:  # pragma: no cover - Network.add accepts only known elements
            raise TypeError(f"unknown element {el!r}")
    off = len(st.nodes)
    for item, kb in pending:
        k = off + kb
        if isinstance(item, tuple):  # one lumped line section: v_a - v_b - R i - L i' = 0
            el, _, na, nb, delta = item
            a, b = st.node(na), st.node(nb)
            _add(g, a, k, 1)
            _add(g, b, k, -1)
            _add(g, k, a, -1)
            _add(g, k, b, 1)
            if el.r:
                _add(g, k, k, el.r * delta)
            _add(c, k, k, el.l * delta)
            continue
        el = item
        if isinstance(el, VCVS):
            p, m = st.node(el.plus), st.node(el.minus)
            cp, cm = st.node(el.ctrl_plus), st.node(el.ctrl_minus)
        else:
            p, m = st.node(el.a), st.node(el.b)
        # branch current k flows from p through the element to m
        _add(g, p, k, 1)
        _add(g, m, k, -1)
        if isinstance(el, Inductor):  # -(v_p - v_m) + L i' = 0
            _add(g, k, p, -1)
            _add(g, k, m, 1)
            _add(c, k, k, el.value)
        else:  # -(v_p - v_m) [+ gain (v_cp - v_cm)] = -u
            _add(g, k, p, -1)
            _add(g, k, m, 1)
            if isinstance(el, VCVS):
                _add(g, k, cp, el.gain)
                _add(g, k, cm, -el.gain)
            else:
                st.sources[el.name] = [(k, -1)]
    st.exact_lines = [
        (el, a, b, off + k1, mode) for (el, a, b, k1, mode) in st.exact_lines
    ]
    return st


def dense(st: Stamped, entries, dtype=float) -> np.ndarray:
    """Dense matrix of a stamp list."""
    m = np.zeros((st.size, st.size), dtype=dtype)
    for i, j, v in entries:
        m[i, j] += v
    return m


def source_vector(st: Stamped, source: str, dtype=float) -> np.ndarray:
    b = np.zeros(st.size, dtype=dtype)
    for i, v in st.sources.get(source, ()):
        b[i] += v
    return b


def complex_matrices(st: Stamped, omega) -> np.ndarray:
    """Stacked complex MNA matrices ``G + j w C + line stamps`` for angular frequencies ``omega``
    [rad/s]; shape ``(len(omega), n, n)``."""
    omega = np.atleast_1d(np.asarray(omega, dtype=float))
    g = dense(st, st.g)
    c = dense(st, st.c)
    m = g[None, :, :] + 1j * omega[:, None, None] * c[None, :, :]
    for el, a, b, k1, mode in st.exact_lines:
        rows = line_rows(el, omega, None if mode is True else int(mode))
        cols = (a, b, k1, k1 + 1)  # V1, V2, I1, I2
        # KCL: I1 leaves node a into the line; I2 leaves the line into node b
        if a is not None:
            m[:, a, k1] += 1
        if b is not None:
            m[:, b, k1 + 1] -= 1
        for r in range(2):
            for q, col in enumerate(cols):
                if col is not None:
                    m[:, k1 + r, col] += rows[:, r, q]
    return m
