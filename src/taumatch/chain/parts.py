"""The parts of a measurement chain as frozen values (SI units inside).

A chain runs from a Thevenin :class:`Source` through an ordered tuple of parts to the
instrument :class:`Input`, where the output is read.  Each part validates its own values
when made; the spec loader (:mod:`taumatch.chain.spec`) adds the file name and part number
to the messages.

Examples
--------
>>> tip = Series(r=9e6, c=12.2e-12)
>>> tip.kind
'series'
>>> Shunt(c=17.5e-12, adjust=Adjust("c", 5e-12, 30e-12)).adjustable_fields()
('r', 'c', 'l', 'branch.r', 'branch.c')
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from ..errors import InputError, shown
from ..safety import is_hazardous
from .ground_lead import grover_inductance

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
]

#: Front-end response shapes: name -> damping ratio of its second-order section (None: one pole).
RESPONSES = {"single-pole": None, "two-pole": 1.0, "bessel": math.sqrt(3.0) / 2.0}


def _positive(where: str, name: str, value, *, allow_zero: bool = False, optional: bool = True):
    if value is None:
        if optional:
            return None
        raise InputError(f"{where}: {name} is required")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputError(f"{where}: {name} must be a number, got {shown(value)}")
    value = float(value)
    if not math.isfinite(value) or value < 0 or (value == 0 and not allow_zero):
        want = "zero or positive" if allow_zero else "positive"
        raise InputError(f"{where}: {name} must be {want}, got {shown(value)}")
    return value


@dataclass(frozen=True)
class Adjust:
    """The trimmer: which field of a part may be changed, and its optional range.

    Parameters
    ----------
    field : str
        Name of the adjustable field (``"c"``, ``"r"``, ``"l"``, ``"branch.c"``, ...).
    min, max : float, optional
        Range of the trimmer in the field's SI unit.
    """

    field: str
    min: float | None = None
    max: float | None = None

    def __post_init__(self):
        _positive("adjust", "min", self.min)
        _positive("adjust", "max", self.max)
        if self.min is not None and self.max is not None and not self.min < self.max:
            raise InputError(f"adjust: min must be below max, got min={shown(self.min)}, max={shown(self.max)}")

    def contains(self, value: float) -> bool | None:
        """True/False when a range is given, None when it is not."""
        if self.min is None and self.max is None:
            return None
        lo = self.min if self.min is not None else 0.0
        hi = self.max if self.max is not None else math.inf
        return bool(lo <= value <= hi)


@dataclass(frozen=True)
class Source:
    """What drives the chain: an ideal voltage behind a resistance (Thevenin).

    Parameters
    ----------
    resistance : float
        Source resistance [ohm]; 0 for an ideal source.
    amplitude : float
        Step height and square-wave high level [V].
    period : float, optional
        Square-wave period [s].
    rise_time : float, optional
        10-90 % duration of the source edge [s], modelled as one real pole with
        time constant ``rise_time / ln 9``.
    """

    resistance: float
    amplitude: float = 1.0
    period: float | None = None
    rise_time: float | None = None

    def __post_init__(self):
        _positive("source", "resistance", self.resistance, allow_zero=True, optional=False)
        _positive("source", "amplitude", self.amplitude, optional=False)
        _positive("source", "period", self.period)
        _positive("source", "rise_time", self.rise_time)

    @property
    def edge_time_constant(self) -> float | None:
        """Time constant [s] of the first-order source edge, ``rise_time / ln 9``."""
        return None if self.rise_time is None else self.rise_time / math.log(9.0)

    def is_high_voltage(self, waveform: str = "step") -> bool:
        """True when the drive is hazardous by :func:`taumatch.safety.is_hazardous`
        (above 60 V dc or 30 V rms).

        Parameters
        ----------
        waveform : {"step", "square", "sine"}
            A step without a period counts as dc; a square wave (0 to amplitude, 50 % duty,
            rms ``amplitude/sqrt(2)``) or a sine of peak ``amplitude`` as ac.
        """
        ac = waveform in ("square", "sine") or self.period is not None
        return is_hazardous(self.amplitude, "ac" if ac else "dc")


class _Part:
    kind = "part"
    _adjustable: tuple[str, ...] = ()

    def _check_adjust(self):
        marks = getattr(self, "adjust", None)
        if isinstance(marks, (tuple, list)):  # several marks in one: the first, then the rest
            first, *rest = tuple(marks) or (None,)
            object.__setattr__(self, "adjust", first)
            object.__setattr__(self, "more_adjust", tuple(rest) + tuple(self.more_adjust))
        object.__setattr__(self, "more_adjust", tuple(getattr(self, "more_adjust", ())))
        if self.more_adjust and self.adjust is None:
            raise InputError(f"{self.kind}: more_adjust needs adjust (the first mark)")
        seen = set()
        for adj in self.adjust_marks():
            if not isinstance(adj, Adjust):
                raise InputError(f"{self.kind}: adjust must be an Adjust, got {shown(adj)}")
            if adj.field not in self._adjustable:
                raise InputError(
                    f"{self.kind}: adjust must name one of {', '.join(self._adjustable)}, "
                    f"got {shown(adj.field)}"
                )
            if self.value_of(adj.field) is None:
                raise InputError(f"{self.kind}: adjust names {shown(adj.field)}, which has no value")
            if adj.field in seen:
                raise InputError(f"{self.kind}: adjust names {shown(adj.field)} twice")
            seen.add(adj.field)

    def adjust_marks(self) -> tuple:
        """Every :class:`Adjust` of this part: ``adjust`` first, then ``more_adjust``."""
        first = getattr(self, "adjust", None)
        return (() if first is None else (first,)) + tuple(getattr(self, "more_adjust", ()))

    def adjustable_fields(self) -> tuple[str, ...]:
        """Names of the fields that ``adjust`` may name."""
        return self._adjustable

    def value_of(self, name: str):
        """Value of field ``name`` (``"branch.c"`` reaches into the branch)."""
        if name.startswith("branch."):
            branch = getattr(self, "branch", None)
            return None if branch is None else getattr(branch, name.split(".", 1)[1])
        return getattr(self, name)

    def with_value(self, name: str, value: float):
        """A copy with field ``name`` set to ``value`` (SI)."""
        if name.startswith("branch."):
            return replace(self, branch=replace(self.branch, **{name.split(".", 1)[1]: value}))
        return replace(self, **{name: value})


@dataclass(frozen=True)
class Series(_Part):
    """An element in the signal path: ``r || c``, then ``l`` in series; each optional.

    Parameters
    ----------
    r : float, optional
        Resistance [ohm].
    c : float, optional
        Capacitance [F] across ``r`` (alone: a series capacitor).
    l : float, optional
        Inductance [H] in series after ``r || c``.
    adjust : Adjust or tuple of Adjust, optional
        The adjustable field; several as a tuple (the first stays ``adjust``, the rest go
        to ``more_adjust``).
    """

    r: float | None = None
    c: float | None = None
    l: float | None = None
    adjust: Adjust | None = None
    label: str = ""
    more_adjust: tuple = ()
    kind = "series"
    _adjustable = ("r", "c", "l")

    def __post_init__(self):
        for n in ("r", "c", "l"):
            _positive(self.kind, n, getattr(self, n))
        if self.r is None and self.c is None and self.l is None:
            raise InputError("series: give at least one of r, c, l")
        self._check_adjust()


@dataclass(frozen=True)
class Branch:
    """A series R-C branch inside a shunt part (a snubber / damping network).

    Parameters
    ----------
    r : float
        Resistance [ohm].
    c : float
        Capacitance [F].
    """

    r: float
    c: float

    def __post_init__(self):
        _positive("branch", "r", self.r, optional=False)
        _positive("branch", "c", self.c, optional=False)


@dataclass(frozen=True)
class Shunt(_Part):
    """To ground at this point: ``r || c || l || (branch.r + branch.c)``; each optional.

    Parameters
    ----------
    r : float, optional
        Resistance to ground [ohm].
    c : float, optional
        Capacitance to ground [F].
    l : float, optional
        Inductance to ground [H].
    branch : Branch, optional
        Series R-C branch to ground.
    adjust : Adjust, optional
    """

    r: float | None = None
    c: float | None = None
    l: float | None = None
    branch: Branch | None = None
    adjust: Adjust | None = None
    label: str = ""
    more_adjust: tuple = ()
    kind = "shunt"
    _adjustable = ("r", "c", "l", "branch.r", "branch.c")

    def __post_init__(self):
        for n in ("r", "c", "l"):
            _positive(self.kind, n, getattr(self, n))
        if self.branch is not None and not isinstance(self.branch, Branch):
            raise InputError(f"shunt: branch must be a Branch, got {shown(self.branch)}")
        if all(getattr(self, n) is None for n in ("r", "c", "l", "branch")):
            raise InputError("shunt: give at least one of r, c, l, branch")
        self._check_adjust()


@dataclass(frozen=True)
class Line(_Part):
    """A uniform cable given by its per-metre values (telegrapher's equations).

    Parameters
    ----------
    length : float
        Length [m].
    l : float
        Series inductance per metre [H/m].
    c : float
        Shunt capacitance per metre [F/m].
    r : float
        Series resistance per metre [ohm/m] (a divider-probe cable's resistive
        centre conductor is hundreds of ohm per metre).
    g : float
        Shunt conductance per metre [S/m].
    """

    length: float
    l: float
    c: float
    r: float = 0.0
    g: float = 0.0
    label: str = ""
    kind = "line"

    def __post_init__(self):
        _positive(self.kind, "length", self.length, optional=False)
        _positive(self.kind, "l", self.l, optional=False)
        _positive(self.kind, "c", self.c, optional=False)
        _positive(self.kind, "r", self.r, allow_zero=True, optional=False)
        _positive(self.kind, "g", self.g, allow_zero=True, optional=False)

    @property
    def impedance(self) -> float:
        """Lossless characteristic impedance ``sqrt(l/c)`` [ohm]."""
        return math.sqrt(self.l / self.c)

    @property
    def delay(self) -> float:
        """One-way delay ``length*sqrt(l*c)`` [s]."""
        return self.length * math.sqrt(self.l * self.c)


@dataclass(frozen=True)
class Lead(_Part):
    """A ground (or tip) lead: a straight wire in series, inductance from Grover's formula.

    The lead's inductance belongs to the loop that carries the tip current; in a
    single-ended model it sits in series with the signal path.

    Parameters
    ----------
    length : float
        Wire length [m].
    radius : float
        Wire radius [m].
    r : float
        Series resistance [ohm] (0 by default).
    """

    length: float
    radius: float
    r: float = 0.0
    label: str = ""
    kind = "lead"

    def __post_init__(self):
        _positive(self.kind, "length", self.length, optional=False)
        _positive(self.kind, "radius", self.radius, optional=False)
        _positive(self.kind, "r", self.r, allow_zero=True, optional=False)
        if self.length < 10 * self.radius:
            raise InputError(
                f"lead: length must be at least 10 times the radius for the straight-wire "
                f"formula, got length={shown(self.length)} m, radius={shown(self.radius)} m"
            )

    @property
    def inductance(self) -> float:
        """Inductance [H] by Grover's straight-wire formula."""
        return grover_inductance(self.length, self.radius)


def _check_front_end(part):
    _positive(part.kind, "bandwidth", part.bandwidth)
    if not isinstance(part.response, str) or part.response not in RESPONSES:
        raise InputError(
            f"{part.kind}: response must be one of {', '.join(RESPONSES)}, got {shown(part.response)}"
        )


@dataclass(frozen=True)
class Input(_Part):
    """The instrument input: ``r || c`` to ground; the output is read here.

    Parameters
    ----------
    r : float
        Input resistance [ohm] (1e6 for a high-impedance input, 50 for a terminated one).
    c : float, optional
        Input capacitance [F].
    bandwidth : float, optional
        -3 dB bandwidth of the buffered front end [Hz]; modelled after the node, so it
        does not load it.
    response : {"single-pole", "two-pole", "bessel"}
        Shape of the front end: one real pole; two equal real poles (critically
        damped); or a second-order Bessel section (damping sqrt(3)/2, flattest delay).
    adjust : Adjust, optional
    """

    r: float
    c: float | None = None
    bandwidth: float | None = None
    response: str = "single-pole"
    adjust: Adjust | None = None
    label: str = ""
    more_adjust: tuple = ()
    kind = "input"
    _adjustable = ("r", "c")

    def __post_init__(self):
        _positive(self.kind, "r", self.r, optional=False)
        _positive(self.kind, "c", self.c)
        _check_front_end(self)
        self._check_adjust()


@dataclass(frozen=True)
class Buffer(_Part):
    """An active probe's buffer: loads the node with ``r || c``, drives the rest of the chain.

    Modelled as a voltage-controlled voltage source of ``gain``, an optional front-end
    filter (``bandwidth``, ``response`` as for :class:`Input`) and an output resistance
    ``r_out`` in series with what follows.

    Parameters
    ----------
    r : float
        Input resistance [ohm].
    gain : float
        Voltage gain [V/V] (positive).
    c : float, optional
        Input capacitance [F].
    bandwidth : float, optional
        -3 dB bandwidth of the buffer [Hz].
    response : str
        Shape of the buffer's response (see :data:`RESPONSES`).
    r_out : float
        Output resistance [ohm] (0: ideal; 50 for a back-terminated driver).
    """

    r: float
    gain: float = 1.0
    c: float | None = None
    bandwidth: float | None = None
    response: str = "single-pole"
    r_out: float = 0.0
    label: str = ""
    kind = "buffer"

    def __post_init__(self):
        _positive(self.kind, "r", self.r, optional=False)
        _positive(self.kind, "gain", self.gain, optional=False)
        _positive(self.kind, "c", self.c)
        _positive(self.kind, "r_out", self.r_out, allow_zero=True, optional=False)
        _check_front_end(self)


_PART_TYPES = (Series, Shunt, Line, Lead, Input, Buffer)


@dataclass(frozen=True)
class Chain:
    """A whole chain: source, parts in order, the instrument input last.

    Parameters
    ----------
    source : Source
    parts : tuple
        Parts from the source to the instrument; exactly one :class:`Input`, the last.
    name : str
        Free text.
    origin : str
        Where the chain came from (file name), used in messages.
    tolerances : tuple
        ``(part number, field, Tolerance)`` for every value the spec gives a tolerance
        (part number 0: the source); see :mod:`taumatch.chain.tolerance`.
    """

    source: Source
    parts: tuple = field(default_factory=tuple)
    name: str = ""
    origin: str = "chain"
    tolerances: tuple = ()

    def __post_init__(self):
        object.__setattr__(self, "parts", tuple(self.parts))
        if not isinstance(self.source, Source):
            raise InputError(f"{self.origin}: source must be a Source, got {shown(self.source)}")
        for i, p in enumerate(self.parts, 1):
            if not isinstance(p, _PART_TYPES):
                raise InputError(f"{self.origin}: part {i} is not a chain part: {shown(p)}")
        inputs = [i for i, p in enumerate(self.parts, 1) if isinstance(p, Input)]
        if not inputs:
            raise InputError(f"{self.origin}: the chain has no input part; add [[part]] kind = \"input\"")
        if len(inputs) > 1:
            raise InputError(f"{self.origin}: part {inputs[1]} (input): only one input part is allowed")
        if inputs[0] != len(self.parts):
            raise InputError(
                f"{self.origin}: part {inputs[0]} (input): the input must be the last part"
            )

    @property
    def input(self) -> Input:
        """The instrument input part."""
        return self.parts[-1]

    @property
    def adjustments(self) -> tuple:
        """``(part number, part, Adjust)`` of every adjustable field, in part order."""
        return tuple((i, p, a) for i, p in enumerate(self.parts, 1)
                     if isinstance(p, _Part) for a in p.adjust_marks())

    @property
    def adjustable(self):
        """``(part number, part, Adjust)`` of the trimmer (part numbers from 1), or None: the
        first mark that names a plain capacitance ``c`` (the low-frequency trimmer), else the
        first mark."""
        marks = self.adjustments
        return next((m for m in marks if m[2].field == "c"), marks[0] if marks else None)

    def with_value(self, number: int, name: str, value: float) -> Chain:
        """A new chain with field ``name`` of part ``number`` (from 1) set to ``value`` [SI]."""
        parts = list(self.parts)
        parts[number - 1] = parts[number - 1].with_value(name, value)
        return replace(self, parts=tuple(parts))

    def has_inductive_lead(self) -> bool:
        """True when a lead, or a series/shunt inductance, is in the chain."""
        return any(isinstance(p, Lead) or (isinstance(p, Series) and p.l) for p in self.parts)

    def is_high_voltage(self, waveform: str = "step") -> bool:
        """True when the source exceeds the high-voltage thresholds (see :class:`Source`)."""
        return self.source.is_high_voltage(waveform)
