"""The measurement chain: its parts as frozen values, the TOML spec, the network it makes.

* :mod:`~taumatch.chain.parts` — :class:`Source`, :class:`Series`, :class:`Shunt`,
  :class:`Line`, :class:`Lead`, :class:`Input`, :class:`Buffer`, :class:`Chain`.
* :mod:`~taumatch.chain.spec` — :func:`load` / :func:`loads` a chain spec (TOML, version 1).
* :mod:`~taumatch.chain.ground_lead` — Grover's straight-wire inductance.
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
    "grover_inductance",
    "lead_length_for_inductance",
    "load",
    "loads",
]
