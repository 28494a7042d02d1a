"""The parts a network is made of: frozen values, validated once when made.

Every element has a unique ``name`` and connects named nodes; ``"0"`` and ``"gnd"``
are ground.  Values are SI floats, or sympy symbols / exact sympy numbers for the
symbolic view (:func:`taumatch.network.symbolic.transfer_symbolic`).

Sign conventions (the usual netlist ones):

* a voltage source ``(plus, minus)`` holds ``v(plus) - v(minus) = u``;
* a current source ``(plus, minus)`` drives ``u`` amperes from ``plus`` through the source
  to ``minus`` (so it *leaves* node ``plus`` and *enters* node ``minus``);
* a voltage-controlled voltage source holds
  ``v(plus) - v(minus) = gain * (v(ctrl_plus) - v(ctrl_minus))``;
* a transmission line joins ``a`` and ``b``, both referenced to ground.
"""

from __future__ import annotations

import math
import sys
from abc import ABC, abstractmethod
from dataclasses import dataclass

from ..errors import InputError

__all__ = [
    "GROUND_NAMES",
    "VCVS",
    "Capacitor",
    "Conductance",
    "CurrentSource",
    "Element",
    "Inductor",
    "Line",
    "Resistor",
    "VoltageSource",
    "is_ground",
    "is_symbolic",
]

GROUND_NAMES = ("0", "gnd")


def is_ground(node: str) -> bool:
    """True for the ground node names ``"0"`` and ``"gnd"`` (case-insensitive)."""
    return node.lower() in GROUND_NAMES


def is_symbolic(value) -> bool:
    """True when ``value`` is a sympy object that is not a plain float.

    A value can only be a sympy object once sympy has been imported, so the numeric path never
    pays for importing it.
    """
    sympy = sys.modules.get("sympy")
    if sympy is None or isinstance(value, (int, float)):
        return False
    return isinstance(value, sympy.Basic) and not isinstance(value, sympy.Float)


def _check_value(element: str, field: str, value, unit: str, *, allow_zero: bool = False):
    """Return ``value`` if it is a positive finite number (or a sympy value), else raise."""
    if isinstance(value, bool):
        raise InputError(f"element {element}: {field} must be a number in {unit}, got {value!r}")
    if is_symbolic(value):
        if value.is_number:
            if value.is_real is not True or value.is_negative or (
                value.is_zero and not allow_zero
            ):
                want = "zero or positive" if allow_zero else "positive"
                raise InputError(
                    f"element {element}: {field} must be {want} in {unit}, got {value}"
                )
        elif value.is_negative or value.is_nonpositive and not allow_zero:
            raise InputError(
                f"element {element}: {field} must be positive in {unit}, got {value} "
                f"(declared non-positive)"
            )
        return value
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise InputError(
            f"element {element}: {field} must be a number in {unit}, got {value!r}"
        ) from None
    if not math.isfinite(x) or x < 0 or (x == 0 and not allow_zero):
        want = "finite and zero or positive" if allow_zero else "finite and positive"
        raise InputError(f"element {element}: {field} must be {want} in {unit}, got {value!r}")
    return x


def _check_name(name) -> str:
    if not isinstance(name, str) or not name.strip() or any(c.isspace() for c in name):
        raise InputError(f"element name must be a non-empty word without spaces, got {name!r}")
    return name


def _check_node(element: str, field: str, node) -> str:
    if not isinstance(node, str) or not node.strip() or any(c.isspace() for c in node):
        raise InputError(
            f"element {element}: node {field} must be a non-empty name without spaces, "
            f"got {node!r}"
        )
    if "#" in node:
        raise InputError(
            f"element {element}: node {field} {node!r} must not contain '#' "
            f"(reserved for the inner nodes of line sections)"
        )
    return node


@dataclass(frozen=True)
class Element(ABC):
    """Base of all elements: a name and the nodes it touches (see :meth:`nodes`)."""

    name: str

    @abstractmethod
    def nodes(self) -> tuple[str, ...]:
        """The nodes the element connects, in its own order."""

    def values(self) -> tuple:
        """The element's physical values (used to decide numeric vs symbolic)."""
        return ()


@dataclass(frozen=True)
class _TwoTerminal(Element):
    a: str
    b: str

    def __post_init__(self):
        _check_name(self.name)
        _check_node(self.name, "a", self.a)
        _check_node(self.name, "b", self.b)
        if self.a == self.b or (is_ground(self.a) and is_ground(self.b)):
            raise InputError(
                f"element {self.name}: both ends on the same node {self.a!r}; "
                f"connect it between two different nodes"
            )

    def nodes(self) -> tuple[str, ...]:
        return (self.a, self.b)


@dataclass(frozen=True)
class Resistor(_TwoTerminal):
    """Resistance ``value`` [ohm] between nodes ``a`` and ``b``."""

    value: object = None

    def __post_init__(self):
        super().__post_init__()
        object.__setattr__(self, "value", _check_value(self.name, "resistance", self.value, "ohm"))

    def values(self):
        return (self.value,)


@dataclass(frozen=True)
class Conductance(_TwoTerminal):
    """Conductance ``value`` [S] between nodes ``a`` and ``b``."""

    value: object = None

    def __post_init__(self):
        super().__post_init__()
        object.__setattr__(self, "value", _check_value(self.name, "conductance", self.value, "S"))

    def values(self):
        return (self.value,)


@dataclass(frozen=True)
class Capacitor(_TwoTerminal):
    """Capacitance ``value`` [F] between nodes ``a`` and ``b``."""

    value: object = None

    def __post_init__(self):
        super().__post_init__()
        object.__setattr__(self, "value", _check_value(self.name, "capacitance", self.value, "F"))

    def values(self):
        return (self.value,)


@dataclass(frozen=True)
class Inductor(_TwoTerminal):
    """Inductance ``value`` [H] between nodes ``a`` and ``b``."""

    value: object = None

    def __post_init__(self):
        super().__post_init__()
        object.__setattr__(self, "value", _check_value(self.name, "inductance", self.value, "H"))

    def values(self):
        return (self.value,)


@dataclass(frozen=True)
class VoltageSource(_TwoTerminal):
    """Independent voltage source: ``v(a) - v(b) = u`` [V] (``a`` is plus)."""


@dataclass(frozen=True)
class CurrentSource(_TwoTerminal):
    """Independent current source: ``u`` [A] leaves node ``a``, flows through it, enters ``b``."""


@dataclass(frozen=True)
class VCVS(Element):
    """Voltage-controlled voltage source (an ideal buffer or amplifier, dimensionless ``gain``).

    ``v(plus) - v(minus) = gain * (v(ctrl_plus) - v(ctrl_minus))``; the control terminals
    draw no current, so the controlling node is not loaded.
    """

    plus: str = ""
    minus: str = ""
    ctrl_plus: str = ""
    ctrl_minus: str = ""
    gain: object = 1.0

    def __post_init__(self):
        _check_name(self.name)
        for field in ("plus", "minus", "ctrl_plus", "ctrl_minus"):
            _check_node(self.name, field, getattr(self, field))
        if self.plus == self.minus:
            raise InputError(f"element {self.name}: output plus and minus are the same node")
        if self.ctrl_plus == self.ctrl_minus:
            raise InputError(f"element {self.name}: control plus and minus are the same node")
        if is_symbolic(self.gain):
            return
        try:
            g = float(self.gain)
        except (TypeError, ValueError):
            raise InputError(
                f"element {self.name}: gain must be a finite number, got {self.gain!r}"
            ) from None
        if not math.isfinite(g) or g == 0:
            raise InputError(
                f"element {self.name}: gain must be finite and non-zero, got {self.gain!r}"
            )
        object.__setattr__(self, "gain", g)

    def nodes(self):
        return (self.plus, self.minus, self.ctrl_plus, self.ctrl_minus)

    def values(self):
        return (self.gain,)


@dataclass(frozen=True)
class Line(_TwoTerminal):
    """Two-conductor transmission line from node ``a`` to node ``b``, return conductor on ground.

    Parameters
    ----------
    length : float
        Physical length [m], positive.
    r : float
        Series resistance per metre [ohm/m], zero or positive.
    l : float
        Series inductance per metre [H/m], positive.
    g : float
        Shunt conductance per metre [S/m], zero or positive.
    c : float
        Shunt capacitance per metre [F/m], positive.
    """

    length: float = 0.0
    r: float = 0.0
    l: float = 0.0
    g: float = 0.0
    c: float = 0.0

    def __post_init__(self):
        super().__post_init__()
        for field, unit, zero in (
            ("length", "m", False),
            ("r", "ohm/m", True),
            ("l", "H/m", False),
            ("g", "S/m", True),
            ("c", "F/m", False),
        ):
            value = getattr(self, field)
            if is_symbolic(value):
                raise InputError(
                    f"element {self.name}: line {field} must be a number in {unit} "
                    f"(lines are not supported symbolically), got {value}"
                )
            object.__setattr__(
                self, field, _check_value(self.name, field, value, unit, allow_zero=zero)
            )

    def values(self):
        return (self.length, self.r, self.l, self.g, self.c)

    @property
    def delay(self) -> float:
        """Lossless one-way delay ``length * sqrt(l c)`` [s]."""
        return self.length * math.sqrt(self.l * self.c)

    @property
    def z0_lossless(self) -> float:
        """Lossless characteristic impedance ``sqrt(l / c)`` [ohm]."""
        return math.sqrt(self.l / self.c)
