"""The compensation verdict and the trim record: one vocabulary and one JSON schema.

A divider is *over-compensated* when its high-frequency gain is above its DC gain (a
peaked leading corner), *under-compensated* when below (a rounded corner); these are the
trade's words (compensated attenuator: Millman & Taub; Boylestad).  The quantity compared
is the **high/low-frequency gain error** ``hf_dc_error = H(hf) / H(0) - 1`` (positive:
over-compensated), the one name the package uses for it.

* :func:`compensation_state` — the verdict for an error and an acceptance band; every command
  that says "over-compensated" says it through this function.
* :class:`Trim` — the change of one adjustable quantity (a trimmer, or an arm's whole
  capacitance) that makes high- and low-frequency gain equal.  The trim of a chain
  (:func:`taumatch.analysis.trim.trim`), the two-arm closed form
  (:meth:`taumatch.chain.two_arm.TwoArm.trim`) and a fit all give this record;
  :meth:`Trim.to_dict` is its JSON, described key by key in :data:`TRIM_SCHEMA`.

Examples
--------
>>> compensation_state(0.05, 0.01)
'over-compensated'
>>> compensation_state(-0.004, 0.01)
'compensated'
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..units import format_quantity

__all__ = [
    "ARMS",
    "COMPENSATED",
    "DEFAULT_ACCEPT",
    "OVER",
    "STATES",
    "TRIM_SCHEMA",
    "UNDER",
    "Trim",
    "check_trim_dict",
    "compensation_state",
]

COMPENSATED = "compensated"
OVER = "over-compensated"
UNDER = "under-compensated"
STATES = (COMPENSATED, OVER, UNDER)
#: The two arms of a divider: the tip arm meets the circuit, the shunt arm is everything
#: from the divider's output node to ground (DESIGN.md's words).
ARMS = ("tip", "shunt")
#: Gain error counted as compensated when nobody says otherwise (fraction, ±1 %; common
#: practice, no source: a trimmer turned by eye on a square wave gets about this close).
DEFAULT_ACCEPT = 0.01

_UNITS = {"r": "Ω", "c": "F", "l": "H"}
_CORNER = {OVER: " (peaked corner)", UNDER: " (rounded corner)"}


def _check_accept(accept) -> float:
    try:
        band = float(accept)
    except (TypeError, ValueError):
        raise InputError(f"accept: expected a fraction such as 0.01, got {accept!r}") from None
    if not (math.isfinite(band) and 0 <= band < 1):
        raise InputError(f"accept: must be a fraction from 0 up to (not including) 1, "
                         f"e.g. 0.01 for ±1 %, got {accept!r}")
    return band


def compensation_state(hf_dc_error: float, accept: float = DEFAULT_ACCEPT) -> str:
    """``"compensated"`` when ``|hf_dc_error| <= accept``, else over- or under-compensated.

    Parameters
    ----------
    hf_dc_error : float
        High/low-frequency gain error ``H(hf)/H(0) - 1`` (fraction; positive: HF above DC).
    accept : float
        Gain error accepted as compensated (fraction, 0.01 = ±1 %).

    Raises
    ------
    InputError
        For an acceptance band outside [0, 1) or an error that is not a finite number.
    """
    tol = _check_accept(accept)
    e = float(hf_dc_error)
    if not math.isfinite(e):
        raise InputError(f"hf_dc_error: must be a finite number, got {hf_dc_error!r}")
    if abs(e) <= tol:
        return COMPENSATED
    return OVER if e > 0 else UNDER


@dataclass(frozen=True)
class Trim:
    """The change of one adjustable quantity that makes high- and low-frequency gain equal.

    Attributes
    ----------
    arm : {"tip", "shunt"} or None
        The arm the quantity belongs to (None: neither, e.g. a resistance elsewhere).
    field : str
        What changes: ``"c"`` (the arm's or part's capacitance), ``"r"``, ``"branch.c"`` ...
    present, required : float
        Its value now and the value that compensates (SI units of the field).
    hf_dc_error : float
        High/low-frequency gain error at the present value (fraction).
    accept : float
        Gain error accepted as compensated, for :attr:`state` (fraction).
    part : int, optional
        Chain part number (from 1) of the trimmer; None when the quantity is an arm's whole
        capacitance (a fixed capacitor added or removed, a longer or shorter cable).
    kind : str, optional
        The part's kind (``"shunt"``, ``"series"``, ...).
    minimum, maximum : float, optional
        The trimmer's range.
    reachable : bool
        False when no positive value compensates (``required`` is then an estimate,
        possibly negative).
    required_stderr, change_stderr, hf_dc_error_stderr : float, optional
        Standard errors where the figures come from a fit (None: computed exactly).
    nominal : float, optional
        The value the chain spec gives, where ``present`` was estimated otherwise (a fit).
    frequency : float, optional
        Comparison frequency [Hz] of a network trim (None: the closed-form limit s → ∞).
    dc_gain : float, optional
        DC gain of the divider [V/V].
    method : str
        How ``required`` was found, in words.
    other_arm : Trim, optional
        When the trimmer cannot do it: the change at the other arm that compensates with
        the trimmer at :attr:`trimmer_at`.
    trimmer_at : float, optional
        The trimmer setting :attr:`other_arm` assumes.
    """

    arm: str | None
    field: str
    present: float
    required: float
    hf_dc_error: float
    accept: float = DEFAULT_ACCEPT
    part: int | None = None
    kind: str | None = None
    minimum: float | None = None
    maximum: float | None = None
    reachable: bool = True
    required_stderr: float | None = None
    change_stderr: float | None = None
    hf_dc_error_stderr: float | None = None
    nominal: float | None = None
    frequency: float | None = None
    dc_gain: float | None = None
    method: str = ""
    other_arm: Trim | None = None
    trimmer_at: float | None = None

    def __post_init__(self):
        if self.arm is not None and self.arm not in ARMS:
            raise InputError(f"arm: must be one of {', '.join(ARMS)} or None, got {self.arm!r}")
        object.__setattr__(self, "accept", _check_accept(self.accept))
        for name in ("present", "required", "hf_dc_error"):
            v = float(getattr(self, name))
            if not math.isfinite(v):
                raise InputError(f"{name}: must be a finite number, got {getattr(self, name)!r}")
            object.__setattr__(self, name, v)

    @property
    def change(self) -> float:
        """``required - present`` (SI)."""
        return self.required - self.present

    @property
    def state(self) -> str:
        """The verdict at the present value (:func:`compensation_state`)."""
        return compensation_state(self.hf_dc_error, self.accept)

    @property
    def in_range(self) -> bool | None:
        """Whether ``required`` lies in the trimmer's range (None: no range given)."""
        if not self.reachable or self.required <= 0:
            return False
        if self.minimum is None and self.maximum is None:
            return None
        lo = self.minimum if self.minimum is not None else 0.0
        hi = self.maximum if self.maximum is not None else math.inf
        return bool(lo <= self.required <= hi)

    # ------------------------------------------------------------------ outputs
    def to_dict(self) -> dict:
        """The JSON of a trim (keys and meaning in :data:`TRIM_SCHEMA`)."""
        return {
            "state": self.state,
            "hf_dc_error": self.hf_dc_error,
            "hf_dc_error_stderr": self.hf_dc_error_stderr,
            "accept": self.accept,
            "arm": self.arm,
            "part": self.part,
            "kind": self.kind,
            "field": self.field,
            "present": self.present,
            "nominal": self.nominal,
            "required": self.required,
            "required_stderr": self.required_stderr,
            "change": self.change,
            "change_stderr": self.change_stderr,
            "min": self.minimum,
            "max": self.maximum,
            "in_range": self.in_range,
            "reachable": self.reachable,
            "frequency": self.frequency,
            "dc_gain": self.dc_gain,
            "method": self.method,
            "other_arm": None if self.other_arm is None else self.other_arm.to_dict(),
            "trimmer_at": self.trimmer_at,
        }

    def _fq(self, value) -> str:
        return format_quantity(value, _UNITS.get(self.field.split(".")[-1], ""))

    def _pm(self, stderr) -> str:
        return "" if stderr is None else f" ± {self._fq(stderr)}"

    def _what(self) -> str:
        if self.part is not None:
            return f"part {self.part} ({self.kind}) {self.field}"
        return f"{self.arm} arm {'capacitance' if self.field == 'c' else self.field}"

    def verdict_line(self) -> str:
        """``now over-compensated (peaked corner): HF gain +4.97 % against DC ...``."""
        err = f"{self.hf_dc_error:+.2%}"
        if self.hf_dc_error_stderr is not None:
            err += f" ± {self.hf_dc_error_stderr:.2%}"
        where = ("" if self.frequency is None
                 else f" at {format_quantity(self.frequency, 'Hz')}")
        return (f"now {self.state}{_CORNER.get(self.state, '')}: HF gain {err} against "
                f"DC{where} (accepted within ±{100 * self.accept:g} %)")

    def change_line(self) -> str:
        """``part 3 (shunt) c: present 12 pF, required 17.5 pF, change +5.5 pF``."""
        if abs(self.change) <= 1e-9 * abs(self.present):
            change = "no change"
        else:
            change = (f"change {'+' if self.change >= 0 else '-'}{self._fq(abs(self.change))}"
                      f"{self._pm(self.change_stderr)}")
        nominal = "" if self.nominal is None else f" (spec says {self._fq(self.nominal)})"
        return (f"{self._what()}: present {self._fq(self.present)}{nominal}, required "
                f"{self._fq(self.required)}{self._pm(self.required_stderr)}, {change}")

    def summary(self) -> str:
        lines = [self.verdict_line(), self.change_line()]
        if not self.reachable or self.required <= 0:
            lines.append(f"  no positive value does it: it would need about "
                         f"{self._fq(self.required)} (the rest of its arm already holds more "
                         "than the whole target)")
        elif self.in_range is False:
            hi = self._fq(self.maximum) if self.maximum is not None else "no limit"
            lines.append(f"  outside the trimmer range {self._fq(self.minimum or 0.0)} to {hi}")
        elif self.in_range is None and self.part is not None:
            lines.append("  (no trimmer range given)")
        if self.other_arm is not None:
            o = self.other_arm
            at = f" with the trimmer at {self._fq(self.trimmer_at)}" if self.trimmer_at else ""
            verb = "add" if o.change > 0 else "remove"
            amount = format_quantity(abs(o.change), "F")
            if o.part is not None:
                lines.append(f"  or change a fixed part{at}: {o.arm} arm, part {o.part} "
                             f"{o.field}: {verb} {amount} ({o._fq(o.present)} -> "
                             f"{format_quantity(o.required, 'F')})")
            else:
                lines.append(f"  or change a fixed part{at}: {verb} {amount} of capacitance "
                             f"at the {o.arm} arm (a fixed capacitor, or a shorter or longer "
                             "cable)")
        elif self.in_range is False or not self.reachable:
            lines.append("  change a fixed part")
        return "\n".join(lines)

    def applied_summary(self) -> str:
        """What the trim did, for a result computed after it."""
        return (f"trimmed: {self._what()} set from {self._fq(self.present)} to "
                f"{self._fq(self.required)}; before the trim the chain was {self.state} "
                f"(HF gain {self.hf_dc_error:+.2%} against DC), now compensated")


_NUM = (int, float)
_OPT_NUM = (int, float, type(None))
_OPT_STR = (str, type(None))
#: The JSON of a trim, key by key: ``key -> (accepted JSON types, meaning)``; the same keys
#: wherever a trim appears (``taumatch trim --json``, a prediction's ``"trim"``, a
#: diagnosis).  SI units throughout; null where a figure does not apply.
TRIM_SCHEMA = {
    "state": ((str,), "compensated, over-compensated or under-compensated at the present value"),
    "hf_dc_error": (_NUM, "high/low-frequency gain error H(hf)/H(0) - 1 at the present value"),
    "hf_dc_error_stderr": (_OPT_NUM, "its standard error (null: computed, not fitted)"),
    "accept": (_NUM, "gain error accepted as compensated (the acceptance band)"),
    "arm": (_OPT_STR, "tip or shunt (null: neither)"),
    "part": ((int, type(None)), "chain part number from 1 (null: the arm's whole capacitance)"),
    "kind": (_OPT_STR, "the part's kind"),
    "field": ((str,), "the field that changes (c, r, branch.c, ...)"),
    "present": (_NUM, "its value now"),
    "nominal": (_OPT_NUM, "the value the chain spec gives, when present was estimated"),
    "required": (_NUM, "the value that compensates (an estimate when not reachable)"),
    "required_stderr": (_OPT_NUM, "its standard error"),
    "change": (_NUM, "required - present"),
    "change_stderr": (_OPT_NUM, "its standard error"),
    "min": (_OPT_NUM, "the trimmer's lower limit"),
    "max": (_OPT_NUM, "the trimmer's upper limit"),
    "in_range": ((bool, type(None)), "required within min..max (null: no range given)"),
    "reachable": ((bool,), "false when no positive value compensates"),
    "frequency": (_OPT_NUM, "comparison frequency in Hz (null: the limit s -> infinity)"),
    "dc_gain": (_OPT_NUM, "DC gain of the divider"),
    "method": ((str,), "how required was found"),
    "other_arm": ((dict, type(None)), "a trim of the same schema at the other arm, or null"),
    "trimmer_at": (_OPT_NUM, "the trimmer setting other_arm assumes"),
}


def check_trim_dict(data: dict, where: str = "trim") -> None:
    """Raise :class:`InputError` unless ``data`` has exactly the keys and JSON types of
    :data:`TRIM_SCHEMA` (``other_arm`` checked the same way)."""
    if not isinstance(data, dict):
        raise InputError(f"{where}: expected an object, got {type(data).__name__}")
    missing = sorted(set(TRIM_SCHEMA) - set(data))
    extra = sorted(set(data) - set(TRIM_SCHEMA))
    if missing or extra:
        raise InputError(f"{where}: keys differ from the trim schema (missing {missing}, "
                         f"unknown {extra})")
    for key, (types, _) in TRIM_SCHEMA.items():
        value = data[key]
        ok = isinstance(value, types) and not (isinstance(value, bool) and bool not in types)
        if not ok:
            raise InputError(f"{where}: {key} must be of type "
                             f"{' or '.join(t.__name__ for t in types)}, got {value!r}")
    if data["state"] not in STATES:
        raise InputError(f"{where}: state must be one of {', '.join(STATES)}, got {data['state']!r}")
    if data["other_arm"] is not None:
        check_trim_dict(data["other_arm"], f"{where}.other_arm")
