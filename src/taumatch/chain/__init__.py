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

from .compensation import Trim, compensation_state
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
from .write import dump, dumps


def __getattr__(name):
    # the two-arm model needs numpy: imported when first asked for, not with the package
    if name == "TwoArm":
        from .two_arm import TwoArm

        return TwoArm
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
