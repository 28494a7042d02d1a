"""The two-arm divider: tip arm R1 ∥ C1 over shunt arm R2 ∥ C2, with the column's earth
capacitance where it applies.

The one closed-form model of a compensated divider in the package (fit, diagnosis,
correction and design all ask it).  Textbook compensated attenuator (Millman & Taub;
Boylestad; ``shared/CHECKS.md``)::

    H(s) = Z2 / (Z1 + Z2),  Z = R / (1 + s R C)
         = [R2/(R1+R2)] · (1 + s R1 C1) / (1 + s (R1‖R2)(C1+C2))

so the response is flat when ``R1 C1 = R2 C2``; a step jumps to ``C1/(C1+C2)`` and settles
at ``R2/(R1+R2)`` with ``τ = (R1‖R2)(C1+C2)``.

With a capacitance ``Ce`` to earth spread along the tip arm (a high-voltage column) the
arm is a uniform RC line of series impedance ``z = R1/(1 + s R1 C1)`` and shunt admittance
``y = s Ce`` (totals), ``γ = √(z y)``; its ABCD matrix gives
``H = 1 / (cosh γ + (z/Z2) sinh γ / γ)``.  At high frequency ``γ → α = √(Ce/C1)``, so the
compensation condition becomes ``C2/C1 = (R1/R2 + 1 − cosh α)·α/sinh α`` (own derivation;
``Ce = 0`` gives ``R1/R2`` back).  The line has series *capacitance* along it, which
:class:`taumatch.network.Line` (series ``r + s l``) cannot express, so this column stays in
closed form here; its lumped N-section ladder is built as a network by
:mod:`taumatch.design.ladder`.

Every quantity is numpy-vectorised over the arm values (the Monte Carlo draws whole arrays
of dividers at once); scalars in give floats out.

Examples
--------
>>> d = TwoArm(r1=9e6, c1=10e-12, r2=1e6, c2=110e-12)
>>> round(d.hf_gain, 4), round(d.dc_gain, 4), round(d.tau * 1e6, 1)
(0.0833, 0.1, 108.0)
>>> round(d.required("tip") * 1e12, 2)
12.22
>>> d.trim("tip").state
'under-compensated'
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..errors import InputError
from .compensation import ARMS, DEFAULT_ACCEPT, Trim

__all__ = [
    "EXPRESSIONS",
    "Trimmer",
    "TwoArm",
    "find_trimmer",
    "hf_capacitance_ratio",
]

#: The lumped formulas as lmfit parameter expressions in ``r1, c1, r2, c2`` (any consistent
#: units: each is homogeneous).  Checked against :class:`TwoArm` and against sympy's limit
#: of the impedance ratio in the tests, so a fit that uses these strings uses this model.
EXPRESSIONS = {
    "hf_dc_error": "(r1*c1 - r2*c2)/(r2*(c1 + c2))",
    "shunt_change": "r1*c1/r2 - c2",
    "tip_change": "r2*c2/r1 - c1",
}

_FIELDS = ("r1", "c1", "r2", "c2", "ce")
#: A series resistance after the tip arm is taken as a short only below this fraction of
#: the shunt arm's resistance (it would move the DC gain by about as much).
SERIES_R_LIMIT = 1e-3
_TIP_ITERATIONS = 60


def _out(x):
    x = np.asarray(x)
    return float(x) if x.ndim == 0 else x


def hf_capacitance_ratio(dc_ratio, c1, earth_capacitance):
    """Shunt-to-tip capacitance ratio ``C2/C1`` that makes a graded column's HF gain equal
    its DC gain (vectorised).

    At high frequency the column is a ladder of ``C1`` (series) and ``Ce`` (to earth), whose
    gain into ``C2`` is ``1/(cosh α + (C2/C1) sinh α/α)`` with ``α = √(Ce/C1)``.  Setting it
    equal to ``1/dc_ratio`` gives ``C2/C1 = (dc_ratio − cosh α)·α/sinh α``; with ``Ce = 0``
    this is the lumped ``R1/R2 = dc_ratio − 1``.

    Parameters
    ----------
    dc_ratio : array_like
        ``(R1 + R2)/R2``, dimensionless.
    c1 : array_like
        Total series capacitance of the column [F].
    earth_capacitance : array_like
        Total capacitance to earth [F].
    """
    a2 = np.asarray(earth_capacitance, dtype=float) / np.asarray(c1, dtype=float)
    a = np.sqrt(a2)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        ash = np.where(a > 1e-4, a / np.sinh(np.where(a > 1e-4, a, 1.0)), 1.0 - a2 / 6.0)
        return _out((np.asarray(dc_ratio, dtype=float) - np.cosh(a)) * ash)


@dataclass(frozen=True, eq=False)
class TwoArm:
    """A two-arm divider, optionally with the tip arm spread as a column over earth.

    Parameters
    ----------
    r1, c1 : float or array_like
        Tip-arm resistance [ohm] and its capacitance [F] (0: none; for a column, the total
        series capacitance of its grading capacitors).
    r2, c2 : float or array_like
        Shunt-arm resistance [ohm] and capacitance [F]: everything from the output node to
        ground (instrument input, cable, shunt resistor and capacitors, trimmer).
    ce : float or array_like
        Capacitance from the tip arm to earth, spread uniformly along it [F] (0: a lumped
        divider).
    """

    r1: object
    c1: object
    r2: object
    c2: object
    ce: object = 0.0

    def __post_init__(self):
        for name in _FIELDS:
            raw = getattr(self, name)
            try:
                v = np.asarray(raw, dtype=float)
            except (TypeError, ValueError):
                raise InputError(f"{name}: expected a number, got {raw!r}") from None
            positive = name in ("r1", "r2")
            bad = ~np.isfinite(v) | ((v <= 0) if positive else (v < 0))
            if np.any(bad):
                first = v[bad].flat[0] if v.ndim else v
                want = "positive" if positive else "zero or positive"
                raise InputError(f"{name}: must be finite and {want}, got {float(first)!r}")
            object.__setattr__(self, name, float(v) if v.ndim == 0 else v)

    # ------------------------------------------------------------------ construction
    def with_values(self, **values) -> TwoArm:
        """A copy with some of ``r1, c1, r2, c2, ce`` replaced."""
        return replace(self, **values)

    @classmethod
    def from_chain(cls, chain) -> TwoArm:
        """The two-arm reduction of a :class:`~taumatch.chain.parts.Chain`.

        The tip arm is :func:`taumatch.chain.topology.tip_arm` (the series part with the
        largest resistance).  The shunt arm is every conductance and capacitance to ground
        after it: shunt and input parts (an R-C branch counts by its capacitance), each
        cable's total capacitance and conductance, a buffer's input (which isolates what
        follows).  This is the view at the divider's time constant: inductances and the
        cables' and other series resistances are taken as shorts.

        Raises
        ------
        InputError
            When there is no tip arm or no resistance to ground after it, or the chain is
            not a two-arm divider (a second series capacitance after the tip arm, such as a
            column of several sections; an inductance to ground; series resistance after
            the tip arm of more than ``SERIES_R_LIMIT`` of the shunt arm's).
        """
        from .parts import Buffer, Input, Lead, Line, Series, Shunt
        from .topology import tip_arm

        tip = tip_arm(chain)
        if tip is None:
            raise InputError(f"{chain.origin}: no series part with a resistance: no tip arm "
                             "to reduce the chain to")
        g = c = series_r = 0.0
        for k, p in enumerate(chain.parts[tip:], tip + 1):
            where = f"{chain.origin}: part {k} ({p.kind})"
            if isinstance(p, (Shunt, Input, Buffer)):
                if getattr(p, "l", None):
                    raise InputError(f"{where}: an inductance to ground after the tip arm: not "
                                     "a two-arm divider (no DC gain)")
                g += 1.0 / p.r if p.r else 0.0
                c += p.c or 0.0
                if isinstance(p, Shunt) and p.branch is not None:
                    c += p.branch.c
                if isinstance(p, Buffer):
                    break
            elif isinstance(p, Line):
                c += p.c * p.length
                g += p.g * p.length
                series_r += p.r * p.length
            elif isinstance(p, Series):
                if p.c is not None:
                    raise InputError(f"{where}: a second series capacitance after the tip arm "
                                     f"(part {tip}): not a two-arm divider")
                series_r += p.r or 0.0
            elif isinstance(p, Lead):
                series_r += p.r
        if not g > 0:
            raise InputError(f"{chain.origin}: the shunt arm (after part {tip}) has no "
                             "resistance to ground")
        r2 = 1.0 / g
        if series_r > SERIES_R_LIMIT * r2:
            raise InputError(f"{chain.origin}: {series_r:.4g} ohm in series after the tip arm "
                             f"(part {tip}) is more than {SERIES_R_LIMIT:g} of the shunt arm's "
                             f"{r2:.4g} ohm: not a two-arm divider")
        return cls(chain.parts[tip - 1].r, chain.parts[tip - 1].c or 0.0, r2, c)

    # ------------------------------------------------------------------ gains
    @property
    def ratio(self):
        """DC attenuation ``(R1 + R2)/R2``."""
        return _out((self.r1 + self.r2) / np.asarray(self.r2))

    @property
    def dc_gain(self):
        """``H(0) = R2/(R1 + R2)`` [V/V]."""
        return _out(self.r2 / (np.asarray(self.r1) + self.r2))

    @property
    def has_column(self) -> bool:
        return bool(np.any(np.asarray(self.ce) > 0))

    @property
    def hf_gain(self):
        """``H(s → ∞)`` [V/V], also the step's jump ``v(0+)``: ``C1/(C1 + C2)``, or for a
        column ``1/(cosh α + (C2/C1) sinh α/α)``; a divider without capacitance is flat
        (``H(0)``), a column without series capacitance passes nothing (0)."""
        c1, c2, ce = (np.asarray(v, dtype=float) for v in (self.c1, self.c2, self.ce))
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            lumped = np.where(c1 + c2 > 0, c1 / np.where(c1 + c2 > 0, c1 + c2, 1.0),
                              np.asarray(self.dc_gain))
            if not self.has_column:
                return _out(lumped)
            a2 = np.where(c1 > 0, ce / np.where(c1 > 0, c1, 1.0), np.inf)
            a = np.sqrt(a2)
            shc = np.where(a > 1e-4, np.sinh(a) / np.where(a > 1e-4, a, 1.0), 1.0 + a2 / 6)
            ratio = np.where(c1 > 0, c2 / np.where(c1 > 0, c1, 1.0), 0.0)
            column = np.where(np.isfinite(a) & (a < 700), 1.0 / (np.cosh(a) + ratio * shc), 0.0)
            return _out(np.where(ce > 0, column, lumped))

    @property
    def hf_dc_error(self):
        """High/low-frequency gain error ``H(∞)/H(0) − 1`` (positive: over-compensated).
        Lumped: ``(R1 C1 − R2 C2)/(R2 (C1 + C2))`` (0 for a divider without capacitance)."""
        r1, r2 = np.asarray(self.r1), np.asarray(self.r2)
        c1, c2 = np.asarray(self.c1), np.asarray(self.c2)
        with np.errstate(invalid="ignore", divide="ignore"):
            lumped = np.where(c1 + c2 > 0, (r1 * c1 - r2 * c2)
                              / (r2 * np.where(c1 + c2 > 0, c1 + c2, 1.0)), 0.0)
        if not self.has_column:
            return _out(lumped)
        return _out(np.where(np.asarray(self.ce) > 0, self.hf_gain * self.ratio - 1.0, lumped))

    # ------------------------------------------------------------------ loading and time
    @property
    def input_resistance(self):
        """``R1 + R2`` [ohm]: what the circuit sees at DC."""
        return _out(np.asarray(self.r1) + self.r2)

    @property
    def input_capacitance(self):
        """``C1 C2/(C1 + C2)`` [F]: what the circuit sees at high frequency (lumped; the
        column's earth capacitance is not included)."""
        c1, c2 = np.asarray(self.c1), np.asarray(self.c2)
        with np.errstate(invalid="ignore", divide="ignore"):
            return _out(np.where(c1 + c2 > 0, c1 * c2 / np.where(c1 + c2 > 0, c1 + c2, 1.0), 0.0))

    @property
    def tau_tip(self):
        """``R1 C1`` [s]."""
        return _out(np.asarray(self.r1) * self.c1)

    @property
    def tau_shunt(self):
        """``R2 C2`` [s]."""
        return _out(np.asarray(self.r2) * self.c2)

    @property
    def tau(self):
        """The lumped step's time constant ``(R1‖R2)(C1 + C2)`` [s]."""
        r1, r2 = np.asarray(self.r1), np.asarray(self.r2)
        return _out(r1 * r2 / (r1 + r2) * (np.asarray(self.c1) + self.c2))

    @property
    def response_time(self):
        """``T = −d/ds [H(s)/H(0)]`` at 0 [s]: the area between the unit step and the
        normalised step response; 0 when compensated (lumped), negative when over-compensated.
        ``[R1 R2 Ce/2 + R1² Ce/6 − R1 (R1 C1 − R2 C2)] / (R1 + R2)`` (own derivation from the
        series of ``H`` at 0; lumped it is ``τ − R1 C1``, the ungraded column into a small
        shunt arm ``R1 Ce/6``)."""
        r1, c1, r2, c2, ce = (np.asarray(getattr(self, n)) for n in _FIELDS)
        return _out((r1 * r2 * ce / 2 + r1 * r1 * ce / 6 - r1 * (r1 * c1 - r2 * c2)) / (r1 + r2))

    # ------------------------------------------------------------------ trims
    def _check_arm(self, arm: str) -> None:
        if arm not in ARMS:
            raise InputError(f"arm: must be one of {', '.join(ARMS)}, got {arm!r}")

    @property
    def shunt_change(self):
        """Change of shunt-arm capacitance that compensates [F]: ``R1 C1/R2 − C2`` (lumped),
        ``C1·hf_capacitance_ratio − C2`` (column; nan without series capacitance)."""
        r1, c1, r2, c2 = (np.asarray(getattr(self, n)) for n in _FIELDS[:4])
        with np.errstate(invalid="ignore", divide="ignore"):
            lumped = r1 * c1 / r2 - c2
            if not self.has_column:
                return _out(lumped)
            column = np.where(c1 > 0, hf_capacitance_ratio(self.ratio, c1, self.ce) * c1 - c2,
                              np.nan)
        return _out(np.where(np.asarray(self.ce) > 0, column, lumped))

    @property
    def tip_change(self):
        """Change of tip-arm capacitance that compensates [F]: ``R2 C2/R1 − C1`` (lumped); for
        a column the fixed point of ``C1 = C2/hf_capacitance_ratio(C1)`` (nan where it does
        not converge)."""
        r1, c1, r2, c2 = (np.asarray(getattr(self, n)) for n in _FIELDS[:4])
        lumped = r2 * c2 / r1 - c1
        if not self.has_column:
            return _out(lumped)
        dc, ce = np.asarray(self.ratio), np.asarray(self.ce)
        x = np.maximum(r2 * c2 / r1, 1e-300)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            for _ in range(_TIP_ITERATIONS):
                last = x
                x = c2 / np.asarray(hf_capacitance_ratio(dc, x, ce))
            ok = np.isfinite(x) & (x > 0) & (np.abs(x - last) <= 1e-12 * np.abs(x))
            column = np.where(ok, x - c1, np.nan)
        return _out(np.where(ce > 0, column, lumped))

    def change(self, arm: str):
        """Change of the ``arm``'s capacitance (``"tip"`` or ``"shunt"``) that compensates [F]."""
        self._check_arm(arm)
        return self.tip_change if arm == "tip" else self.shunt_change

    def required(self, arm: str):
        """The ``arm``'s capacitance that compensates [F] (``c1`` or ``c2`` plus the change)."""
        self._check_arm(arm)
        return _out((self.c1 if arm == "tip" else self.c2) + np.asarray(self.change(arm)))

    def trimmed(self, arm: str) -> TwoArm:
        """The divider with the ``arm``'s capacitance at its required value."""
        value = self.required(arm)
        return self.with_values(**({"c1": value} if arm == "tip" else {"c2": value}))

    def trim(self, arm: str, accept: float = DEFAULT_ACCEPT, *, part: int | None = None,
             kind: str | None = None, present: float | None = None,
             minimum: float | None = None, maximum: float | None = None) -> Trim:
        """The trim of the ``arm``'s capacitance as a :class:`~taumatch.chain.compensation.Trim`
        (scalar dividers only).

        Parameters
        ----------
        arm : {"tip", "shunt"}
        tolerance : float
            Gain error counted as compensated (fraction).
        part, kind : optional
            The chain part that holds the trimmer, when the change is a trimmer's.
        present : float, optional
            The trimmer's value now [F] (default: the arm's whole capacitance); its required
            value is ``present + change``.
        minimum, maximum : float, optional
            The trimmer's range [F].
        """
        self._scalar("trim")
        change = float(self.change(arm))
        now = float(self.c1 if arm == "tip" else self.c2) if present is None else float(present)
        required = now + change
        return Trim(arm=arm, field="c", present=now, required=required,
                    hf_dc_error=float(self.hf_dc_error), accept=accept, part=part, kind=kind,
                    minimum=minimum, maximum=maximum, reachable=bool(required > 0),
                    dc_gain=float(self.dc_gain),
                    method=("two-arm closed form, graded column" if self.has_column
                            else "two-arm closed form, R1 C1 = R2 C2"))

    # ------------------------------------------------------------------ responses
    def _scalar(self, what: str) -> None:
        if any(np.ndim(getattr(self, n)) for n in _FIELDS):
            raise InputError(f"{what}: needs one divider, not arrays of values")

    def response(self, s):
        """Exact ``H(s)`` at complex ``s`` [rad/s] (the column by its line equation)."""
        self._scalar("response")
        s = np.asarray(s, dtype=complex)
        r1, c1, r2, c2, ce = (getattr(self, n) for n in _FIELDS)
        z = r1 / (1.0 + s * r1 * c1)
        ratio = z * (1.0 + s * r2 * c2) / r2
        g = np.sqrt(z * s * ce)
        out = np.empty(np.broadcast(s, g).shape, dtype=complex)
        g = np.broadcast_to(g, out.shape)
        ratio = np.broadcast_to(ratio, out.shape)
        small = np.abs(g) < 1.0
        gs = g[small]
        with np.errstate(invalid="ignore", divide="ignore"):
            shc = np.where(gs == 0, 1.0, np.sinh(gs) / np.where(gs == 0, 1.0, gs))
        out[small] = 1.0 / (np.cosh(gs) + ratio[small] * shc)
        gb, rb = g[~small], ratio[~small]
        e2 = np.exp(-2.0 * gb)
        out[~small] = 2.0 * np.exp(-gb) / ((1.0 + e2) + rb * (-np.expm1(-2.0 * gb)) / gb)
        return out

    def freqresp(self, frequency):
        """``H(j 2π f)`` at frequencies [Hz]."""
        return self.response(2j * np.pi * np.asarray(frequency, dtype=float))

    def rational(self):
        """The lumped divider as a :class:`taumatch.lti.Rational` (one zero at ``−1/(R1 C1)``,
        one pole at ``−1/τ``; they cancel when compensated).

        Raises
        ------
        InputError
            For arrays of values, or a column (a distributed line has no rational function;
            :mod:`taumatch.design.ladder` gives its N-section ladder).
        """
        from ..lti import Rational

        self._scalar("rational")
        if self.ce > 0:
            raise InputError("ce: a column with earth capacitance is distributed and has no "
                             "rational transfer function; use its N-section ladder")
        if self.c1 + self.c2 == 0:
            return Rational.constant(self.dc_gain)
        if self.c1 == 0:
            return Rational.from_zpk([], [-1.0 / self.tau], self.dc_gain / self.tau)
        return Rational.from_zpk([-1.0 / self.tau_tip], [-1.0 / self.tau], self.hf_gain)

    def step(self, t):
        """Unit-step response of the lumped divider at times ``t`` [s] (0 before the step):
        ``v(∞) + (v(0+) − v(∞)) exp(−t/τ)``."""
        self._scalar("step")
        if self.ce > 0:
            raise InputError("ce: the column's step has no closed form here; use its ladder")
        t = np.asarray(t, dtype=float)
        dc, jump, tau = self.dc_gain, self.hf_gain, self.tau
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            decay = np.exp(-t / tau) if tau > 0 else np.zeros_like(t)
        return np.where(t >= 0, dc + (jump - dc) * decay, 0.0)

    def to_dict(self) -> dict:
        self._scalar("to_dict")
        return {"r1": self.r1, "c1": self.c1, "r2": self.r2, "c2": self.c2, "ce": self.ce,
                "dc_gain": self.dc_gain, "hf_gain": self.hf_gain,
                "hf_dc_error": self.hf_dc_error, "tau": self.tau,
                "response_time": self.response_time,
                "shunt_change": self.shunt_change, "tip_change": self.tip_change}


@dataclass(frozen=True)
class Trimmer:
    """The trimmer of a chain as the two-arm view sees it.

    Attributes
    ----------
    part : int
        Part number (from 1).
    kind : str
        The part's kind.
    field : str
        ``"c"`` or ``"branch.c"``.
    arm : {"tip", "shunt"}
    present : float
        Its value now [F].
    minimum, maximum : float or None
        Its range [F].
    """

    part: int
    kind: str
    field: str
    arm: str
    present: float
    minimum: float | None = None
    maximum: float | None = None


def find_trimmer(chain) -> Trimmer | None:
    """The chain's trimmer (its ``adjust``) placed in an arm, or None without one.

    Raises
    ------
    InputError
        When the adjustable field is not a capacitance, or the part is in neither arm.
    """
    from .topology import arm_of

    adj = chain.adjustable
    if adj is None:
        return None
    number, part, a = adj
    where = f"{chain.origin}: part {number} ({part.kind})"
    if a.field not in ("c", "branch.c"):
        raise InputError(f"{where}: the two-arm trim moves a capacitance; adjust = {a.field!r} "
                         "is not one")
    arm = arm_of(chain, number)
    if arm is None:
        raise InputError(f"{where}: the trimmer must sit in the tip arm or the shunt arm")
    return Trimmer(number, part.kind, a.field, arm, float(part.value_of(a.field)), a.min, a.max)
