"""From a :class:`~taumatch.chain.parts.Chain` to the elements of a network (MNA).

Node names: ``vs`` is the ideal source, ``tip`` the probe point (after the source
resistance), ``n<k>`` the node after part ``k``, ``out`` the node the output is read at.
Element names start with ``P<k>`` for part ``k``.

How each part becomes elements:

* source: voltage source ``Vs``; with a ``rise_time`` a buffered one-pole filter
  (``VCVS -> R -> C -> VCVS``, time constant ``rise_time / ln 9``) shapes its edge; then
  the source resistance ``Rs`` to ``tip`` (a unity VCVS when it is zero).
* series: ``r || c`` from the part's node to the next, then ``l`` in series.
* lead: an inductor of Grover's value (and ``r`` in series when given).
* shunt: ``r``, ``c``, ``l`` and the ``branch`` (``r`` then ``c``) from the node to ground.
* line: the network's line element (exact in frequency, ladder sections in time).
* buffer: ``r``, ``c`` to ground at its input; a VCVS of ``gain`` drives a new node,
  then the optional front-end filter, then ``r_out`` to the next node.
* input: ``r``, ``c`` to ground; the optional front end is modelled after the node
  (VCVS of gain 1 then the filter) so it does not load it.

Front-end filters are built from a unity-gain VCVS driving ``1 kohm`` into a capacitor
(one pole), two such sections (``"two-pole"``), or ``1 kohm``, ``L`` and ``C`` with damping
``sqrt(3)/2`` (``"bessel"``), scaled so the -3 dB frequency equals the bandwidth.

A *trim* build (``mode="trim"``) leaves out the fast parasitics for
:mod:`taumatch.analysis.trim`: the source drives ``tip`` directly, lines become their total
capacitance (and conductance) to ground, inductors and leads are shorted, front ends are
bypassed.  A *load* build (``mode="load"``) has no source at all: the probe as the circuit
sees it from ``tip``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from .parts import RESPONSES, Buffer, Chain, Input, Lead, Line, Series, Shunt

__all__ = ["FILTER_R", "ChainNetwork", "build", "front_end_shape"]

#: Resistance of the filter sections that model front ends and the source edge [ohm].
FILTER_R = 1e3


def front_end_shape(bandwidth: float, response: str):
    """Natural frequency [rad/s] and damping of a front end with -3 dB at ``bandwidth`` [Hz].

    Returns ``(omega, None)`` for one pole at ``omega``; ``(omega_n, zeta)`` for a
    second-order section (``zeta = 1``: two equal poles at ``omega_n``).  For a second-order
    low-pass ``|H|^2 = 1/((1-x^2)^2 + (2 zeta x)^2)`` with ``x = omega/omega_n``, so the
    -3 dB point is at ``x^2 = (2 - 4 zeta^2 + sqrt((4 zeta^2 - 2)^2 + 4)) / 2`` (own derivation;
    ``zeta = 1`` gives ``x = sqrt(sqrt 2 - 1) = 0.6436``).
    """
    if response not in RESPONSES:
        raise InputError(f"response must be one of {', '.join(RESPONSES)}, got {response!r}")
    w3 = 2 * math.pi * bandwidth
    zeta = RESPONSES[response]
    if zeta is None:
        return w3, None
    k = 4 * zeta * zeta - 2
    x = math.sqrt((-k + math.sqrt(k * k + 4)) / 2)
    return w3 / x, zeta


@dataclass(frozen=True)
class ChainNetwork:
    """The elements a chain makes and the names needed to read it.

    Attributes
    ----------
    elements : tuple
        :mod:`taumatch.network` elements.
    source : str
        Name of the driving source (``"Vs"``; ``"Ip"``, a current source into ``tip``,
        in a ``"load"`` build).
    probe : str
        The probe-point node (``"tip"``).
    output : str
        The node the output is read at.
    nodes : tuple
        ``(part number, node before, node after)`` for every part.
    mode : str
        ``"full"``, ``"trim"`` or ``"load"``.
    """

    elements: tuple
    source: str | None
    probe: str
    output: str
    nodes: tuple
    mode: str

    def lines(self):
        """The line elements."""
        from ..network import Line as NetLine

        return tuple(e for e in self.elements if isinstance(e, NetLine))

    def network(self):
        """A :class:`taumatch.network.Network` of these elements."""
        from ..network import Network

        return Network(self.elements)


class _Builder:
    def __init__(self):
        from .. import network as net

        self.net = net
        self.elements = []

    def add(self, cls, *args, **kwargs):
        self.elements.append(getattr(self.net, cls)(*args, **kwargs))

    def filter(self, prefix: str, node: str, bandwidth: float, response: str, gain=1.0) -> str:
        """Buffered low-pass from ``node``; returns the filter's output node."""
        w, zeta = front_end_shape(bandwidth, response)
        stages = [(w, None)] if zeta is None else ([(w, None), (w, None)] if zeta == 1.0
                                                    else [(w, zeta)])
        for k, (wk, zk) in enumerate(stages, 1):
            a, b = f"{prefix}f{k}a", f"{prefix}f{k}"
            self.add("VCVS", f"{prefix}E{k}", a, "0", node, "0", gain if k == 1 else 1.0)
            if zk is None:
                self.add("Resistor", f"{prefix}R{k}", a, b, FILTER_R)
                self.add("Capacitor", f"{prefix}C{k}", b, "0", 1.0 / (wk * FILTER_R))
            else:
                c = 2 * zk / (FILTER_R * wk)
                m = f"{prefix}f{k}m"
                self.add("Resistor", f"{prefix}R{k}", a, m, FILTER_R)
                self.add("Inductor", f"{prefix}L{k}", m, b, 1.0 / (wk * wk * c))
                self.add("Capacitor", f"{prefix}C{k}", b, "0", c)
            node = b
        return node

    def shunt_rc(self, prefix: str, node: str, r, c):
        if r is not None:
            self.add("Resistor", f"{prefix}R", node, "0", r)
        if c is not None:
            self.add("Capacitor", f"{prefix}C", node, "0", c)


def build(chain: Chain, mode: str = "full", *, edge: bool = True) -> ChainNetwork:
    """Elements of the network a chain makes (see the module text for the rules).

    Parameters
    ----------
    chain : Chain
    mode : {"full", "trim", "load"}
        ``"full"``: everything; ``"trim"``: fast parasitics left out; ``"load"``: no
        voltage source; a current source ``Ip`` drives ``tip`` (its impedance is
        ``response(f, "Ip", "tip")``).
    edge : bool
        In a full build, shape the source edge by its ``rise_time`` (False: an ideal step
        behind the source resistance, for the chain's own bandwidth and rise time).

    Returns
    -------
    ChainNetwork
    """
    if mode not in ("full", "trim", "load"):
        raise InputError(f"mode must be full, trim or load, got {mode!r}")
    b = _Builder()
    src = chain.source
    source = None
    if mode == "full":
        source = "Vs"
        node = "vs"
        b.add("VoltageSource", "Vs", node, "0")
        if src.rise_time is not None and edge:
            tau = src.edge_time_constant
            b.add("VCVS", "SE1", "se1a", "0", node, "0", 1.0)
            b.add("Resistor", "SR1", "se1a", "se1", FILTER_R)
            b.add("Capacitor", "SC1", "se1", "0", tau / FILTER_R)
            node = "se1"
        if src.resistance > 0:
            if node != "vs":  # buffer the edge filter from the source resistance
                b.add("VCVS", "SE2", "se2", "0", node, "0", 1.0)
                node = "se2"
            b.add("Resistor", "Rs", node, "tip", src.resistance)
        else:
            b.add("VCVS", "SE2", "tip", "0", node, "0", 1.0)
    elif mode == "trim":
        source = "Vs"
        b.add("VoltageSource", "Vs", "tip", "0")
    else:
        source = "Ip"
        b.add("CurrentSource", "Ip", "0", "tip")
    node = "tip"
    nodes = []
    output = None
    for k, part in enumerate(chain.parts, 1):
        p = f"P{k}"
        before = node
        nxt = f"n{k}"
        if isinstance(part, Series):
            has_rc = part.r is not None or part.c is not None
            if has_rc:
                end = nxt if (part.l is None or mode == "trim") else f"{p}m"
                if part.r is not None:
                    b.add("Resistor", f"{p}R", node, end, part.r)
                if part.c is not None:
                    b.add("Capacitor", f"{p}C", node, end, part.c)
                if end != nxt:
                    b.add("Inductor", f"{p}L", end, nxt, part.l)
                node = nxt
            elif mode != "trim":  # an inductor alone (shorted in a trim build)
                b.add("Inductor", f"{p}L", node, nxt, part.l)
                node = nxt
        elif isinstance(part, Lead):
            if mode != "trim":
                if part.r > 0:
                    b.add("Resistor", f"{p}R", node, f"{p}m", part.r)
                    b.add("Inductor", f"{p}L", f"{p}m", nxt, part.inductance)
                else:
                    b.add("Inductor", f"{p}L", node, nxt, part.inductance)
                node = nxt
        elif isinstance(part, Shunt):
            b.shunt_rc(p, node, part.r, part.c)
            if part.l is not None:
                b.add("Inductor", f"{p}L", node, "0", part.l)
            if part.branch is not None:
                b.add("Resistor", f"{p}BR", node, f"{p}b", part.branch.r)
                b.add("Capacitor", f"{p}BC", f"{p}b", "0", part.branch.c)
        elif isinstance(part, Line):
            if mode == "trim":
                b.add("Capacitor", f"{p}C", node, "0", part.c * part.length)
                if part.g:
                    b.add("Conductance", f"{p}G", node, "0", part.g * part.length)
            else:
                b.add("Line", f"{p}T", node, nxt, length=part.length, r=part.r, l=part.l,
                      g=part.g, c=part.c)
                node = nxt
        elif isinstance(part, Buffer):
            b.shunt_rc(p, node, part.r, part.c)
            drive, gain = node, part.gain
            if part.bandwidth is not None and mode != "trim":
                drive, gain = b.filter(p, node, part.bandwidth, part.response, gain=gain), 1.0
            if part.r_out > 0:
                b.add("VCVS", f"{p}E", f"{p}o", "0", drive, "0", gain)
                b.add("Resistor", f"{p}Ro", f"{p}o", nxt, part.r_out)
            else:
                b.add("VCVS", f"{p}E", nxt, "0", drive, "0", gain)
            node = nxt
        elif isinstance(part, Input):
            b.shunt_rc(p, node, part.r, part.c)
            output = node
            if part.bandwidth is not None and mode != "trim":
                output = b.filter(p, node, part.bandwidth, part.response)
        nodes.append((k, before, node))
    return ChainNetwork(tuple(b.elements), source, "tip", output, tuple(nodes), mode)
