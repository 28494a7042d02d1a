"""Lumped and distributed linear networks by modified nodal analysis.

Build a :class:`Network` (each method returns a new one), then ask for

* :meth:`Network.response` — exact frequency response, lines by the telegrapher's equations;
* :meth:`Network.impedance` — driving-point impedance between two nodes;
* :meth:`Network.transfer` / :meth:`Network.transfer_info` — the transfer function as a
  :class:`taumatch.lti.Rational` from the descriptor pencil (lines as pi-section ladders);
* :meth:`Network.descriptor` — the lumped ``(E, A, B, C, D)`` matrices;
* :meth:`Network.transfer_symbolic` — exact sympy expression for small lumped networks.

See docs/network.md for the numerical method and the section-count rule.
"""

from .band import Band, find_bandwidth, sweep_range
from .elements import (
    VCVS,
    Capacitor,
    Conductance,
    CurrentSource,
    Element,
    Inductor,
    Line,
    Resistor,
    VoltageSource,
)
from .line import line_y_parameters

# imported when first asked for, not with the package: the pencil needs scipy.linalg, and the
# chain figures (the exact response) need neither the assembly nor the ladder's sections
_LAZY = {
    "descriptor_zpk": "pencil",
    "Network": "netlist",
    "SectionChoice": "sections",
    "choose_sections": "sections",
    "Descriptor": "transfer",
    "TransferInfo": "transfer",
}


def __getattr__(name):
    if name in _LAZY:
        from importlib import import_module

        value = getattr(import_module(f"{__name__}.{_LAZY[name]}"), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'taumatch.network' has no attribute {name!r}")


__all__ = [
    "VCVS",
    "Band",
    "Capacitor",
    "Conductance",
    "CurrentSource",
    "Descriptor",
    "Element",
    "Inductor",
    "Line",
    "Network",
    "Resistor",
    "SectionChoice",
    "TransferInfo",
    "VoltageSource",
    "choose_sections",
    "descriptor_zpk",
    "find_bandwidth",
    "line_y_parameters",
    "sweep_range",
]
