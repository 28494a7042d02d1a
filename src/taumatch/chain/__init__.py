"""The measurement chain: its parts as frozen values, the TOML spec, the network it makes.

* :mod:`~taumatch.chain.parts` — :class:`Source`, :class:`Series`, :class:`Shunt`,
  :class:`Line`, :class:`Lead`, :class:`Input`, :class:`Buffer`, :class:`Chain`.
* :mod:`~taumatch.chain.spec` — :func:`load` / :func:`loads` a chain spec (TOML, version 1).
* :mod:`~taumatch.chain.ground_lead` — Grover's straight-wire inductance.
* :mod:`~taumatch.chain.write` — :func:`dump` / :func:`dumps` a chain as a spec (the loader's
  inverse).
* :mod:`~taumatch.chain.two_arm` — :class:`TwoArm`, the two-arm divider model (imported on
  first use: it needs numpy).
* :mod:`~taumatch.chain.compensation` — :func:`compensation_state` and the trim record
  :class:`Trim`.
"""

from .ground_lead import grover_inductance, lead_length_for_inductance
from .parts import (
    RESPONSES,
    Adjust,
    Branch,
    Buffer,
    Chain,
    Input,
    Lead,
    Line,
    Series,
    Shunt,
    Source,
)
from .spec import load, loads

# imported when first asked for, not with the package (the two-arm model needs numpy; the
# chain figures need neither the trim record nor the writer)
_LAZY = {
    "TwoArm": "two_arm",
    "Trim": "compensation",
    "compensation_state": "compensation",
    "dump": "write",
    "dumps": "write",
}


def __getattr__(name):
    if name in _LAZY:
        from importlib import import_module

        value = getattr(import_module(f"{__name__}.{_LAZY[name]}"), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'taumatch.chain' has no attribute {name!r}")


__all__ = [
    "RESPONSES",
    "Adjust",
    "Branch",
    "Buffer",
    "Chain",
    "Input",
    "Lead",
    "Line",
    "Series",
    "Shunt",
    "Source",
    "Trim",
    "TwoArm",
    "compensation_state",
    "dump",
    "dumps",
    "grover_inductance",
    "lead_length_for_inductance",
    "load",
    "loads",
]
