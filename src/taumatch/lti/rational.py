"""``Rational``: a real rational transfer function H(s) held in zero-pole-gain form.

H(s) = gain · Π((s − zᵢ)/w0) / Π((s − pᵢ)/w0), with the frequency scale w0 = 1 rad/s
unless the ratio of leading coefficients would not fit a float (a ladder of tens of
GHz poles): then ``gain`` is taken relative to a scale of the system's own.  Zeros and
poles are the primary data: they are taken exactly from factors where the user gave
factors, and polynomial coefficients are only a view.  Exact pole-zero cancellations are removed on construction and
counted; near ones are kept (they carry real, small residues).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from ..errors import InputError
from . import polynomials as _poly

__all__ = ["Rational"]

#: Relative distance under which a zero and a pole are one and the same and cancel.
CANCEL_TOL = 1e-12


def _as_roots(values, what: str) -> np.ndarray:
    try:
        arr = np.atleast_1d(np.asarray(values, dtype=complex)).ravel()
    except (TypeError, ValueError) as exc:
        raise InputError(f"{what}: expected numbers, got {values!r}") from exc
    if not np.all(np.isfinite(arr)):
        raise InputError(f"{what}: every value must be finite, got {arr.tolist()}")
    if not _poly._is_conj_symmetric(arr, rtol=1e-6):
        raise InputError(
            f"{what}: complex values must come in conjugate pairs for a real system, "
            f"got {arr.tolist()}"
        )
    return _poly._symmetrize(arr)


def _cancel(zeros: np.ndarray, poles: np.ndarray, tol: float):
    zeros = list(zeros)
    kept_poles = []
    cancelled = 0
    for p in poles:
        scale = max(abs(p), 1e-300)
        best = None
        for k, z in enumerate(zeros):
            d = abs(z - p)
            if (d <= tol * scale or (p == 0 and z == 0)) and (best is None or d < best[1]):
                best = (k, d)
        if best is None:
            kept_poles.append(p)
        else:
            zeros.pop(best[0])
            cancelled += 1
    return np.array(zeros, dtype=complex), np.array(kept_poles, dtype=complex), cancelled


@dataclass(frozen=True, eq=False)
class Rational:
    """A real rational function of s in zero-pole-gain form.

    Parameters
    ----------
    zeros, poles : array_like of complex
        Roots of numerator and denominator in rad/s (conjugate pairs complete).
    gain : float
        H(s) = gain · Π((s − z)/w0)/Π((s − p)/w0); with w0 = 1 the ratio of the leading
        coefficients.
    cancelled : int
        Number of exactly coincident pole-zero pairs removed on construction.
    w0 : float
        Frequency scale (rad/s) the gain refers to; 1 by default.
    expression : Expression, optional
        The parsed text this function was built from (:meth:`from_expr`); its hand checks
        then compare H with the text as typed.  Arithmetic on H drops it.

    Examples
    --------
    >>> H = Rational.from_zpk([], [-1.0], 1.0)
    >>> H.dc_gain, H.hf_gain
    (1.0, 0.0)
    >>> round(float(H.step([1.0])[0]), 6)
    0.632121
    """

    zeros: np.ndarray
    poles: np.ndarray
    gain: float
    cancelled: int = field(default=0)
    w0: float = 1.0
    expression: object = field(default=None, repr=False)

    def __post_init__(self):
        z = _as_roots(self.zeros, "zeros")
        p = _as_roots(self.poles, "poles")
        try:
            g = float(np.real_if_close(self.gain))
        except (TypeError, ValueError) as exc:
            raise InputError(f"gain: expected a real number, got {self.gain!r}") from exc
        if not math.isfinite(g):
            raise InputError(f"gain: must be finite, got {self.gain!r}")
        w0 = float(self.w0)
        if not (math.isfinite(w0) and w0 > 0):
            raise InputError(f"w0: the frequency scale must be positive, got {self.w0!r}")
        object.__setattr__(self, "w0", w0)
        if g == 0.0:
            z = np.zeros(0, dtype=complex)
            p = np.zeros(0, dtype=complex)
        z, p, n = _cancel(z, p, CANCEL_TOL)
        z.setflags(write=False)
        p.setflags(write=False)
        object.__setattr__(self, "zeros", z)
        object.__setattr__(self, "poles", p)
        object.__setattr__(self, "gain", g)
        object.__setattr__(self, "cancelled", int(self.cancelled) + n)

    # ------------------------------------------------------------------ constructors
    @classmethod
    def from_zpk(cls, zeros, poles, gain) -> Rational:
        """H(s) = gain · Π(s − zeros)/Π(s − poles); zeros and poles in rad/s."""
        return cls(zeros, poles, gain)

    @classmethod
    def from_zpk_scaled(cls, zeros, poles, gain, w0) -> Rational:
        """H(s) = gain · Π((s − zeros)/w0)/Π((s − poles)/w0): for systems whose leading-coefficient
        ratio overflows a float (many poles at GHz); w0 in rad/s."""
        return cls(zeros, poles, gain, 0, w0)

    @property
    def leading_gain(self) -> float:
        """Ratio of the leading coefficients (may be ±inf when it does not fit a float)."""
        return self.gain_at(1.0)

    def gain_at(self, w: float) -> float:
        """The gain relative to the frequency scale w (rad/s): H = g·Π((s−z)/w)/Π((s−p)/w)."""
        if self.gain == 0:
            return 0.0
        n = self.zeros.size - self.poles.size
        if n == 0 or w == self.w0:
            return self.gain
        with np.errstate(over="ignore"):
            val = math.log(abs(self.gain)) + n * (math.log(w) - math.log(self.w0))
            mag = math.exp(val) if val < 709 else math.inf
        return math.copysign(mag, self.gain)

    @classmethod
    def from_coeffs(cls, num, den) -> Rational:
        """From real polynomial coefficients, highest power first (numpy order).

        Roots are found on the scaled polynomial; a cluster indistinguishable from a
        multiple root at working precision is taken as that multiple root.
        """
        num = np.atleast_1d(np.asarray(num, dtype=float))
        den = np.atleast_1d(np.asarray(den, dtype=float))
        if not (np.all(np.isfinite(num)) and np.all(np.isfinite(den))):
            raise InputError("coefficients must be finite numbers")
        if not np.any(den):
            raise InputError("denominator is zero: a transfer function needs a non-zero denominator")
        if not np.any(num):
            return cls([], [], 0.0)
        lead_n = num[np.flatnonzero(num)[0]]
        lead_d = den[np.flatnonzero(den)[0]]
        return cls(_poly.roots(num), _poly.roots(den), lead_n / lead_d)

    @classmethod
    def from_expr(cls, text: str) -> Rational:
        """Parse an expression in s, e.g. ``"(s+2)/((s+1)^2*(s+3))"`` (see :mod:`.expr`).

        The polynomials are built by exact arithmetic on the numbers as typed, so a term is
        never lost beside a larger one at any physical scale; the result keeps the parsed
        text in :attr:`expression` for its hand checks.
        """
        from .expr import parse

        return parse(text)

    @classmethod
    def from_sympy(cls, expr, s=None) -> Rational:
        """From an exact sympy rational function of ``s`` (roots found exactly where possible)."""
        from .symbolic import to_rational

        return to_rational(expr, s)

    def normalized(self, w: float | None = None) -> Rational:
        """H(w·x) as a function of the dimensionless x = s/w (w in rad/s).

        Default w: :attr:`scale`.  Its poles and zeros are those of H divided by w; its impulse
        response at τ = w·t is h(t)/w, its step response at τ is y(t).  Used where a quantity
        in physical units does not fit a float (a pole of order 64 at 1e9 rad/s).
        """
        w = self.scale if w is None else float(w)
        if not (math.isfinite(w) and w > 0):
            raise InputError(f"w: the frequency scale must be positive, got {w!r}")
        g = self.gain_at(w)
        if not (math.isfinite(g) and (g != 0 or self.gain == 0)):
            from ..errors import ComputationError

            raise ComputationError(f"the gain of H(w*x) at w = {w:.4g} rad/s is beyond the float range")
        return Rational(self.zeros / w, self.poles / w, g, self.cancelled, 1.0)

    @classmethod
    def constant(cls, value: float) -> Rational:
        """The constant function H(s) = value."""
        return cls([], [], value)

    # ------------------------------------------------------------------ views
    @property
    def order(self) -> int:
        """Number of poles."""
        return int(self.poles.size)

    @cached_property
    def scale(self) -> float:
        """Characteristic frequency (rad/s) used to scale polynomials: geometric mean of |roots|."""
        return _poly.characteristic_scale(self.zeros, self.poles)

    def coeffs(self, scale: float | None = None):
        """Numerator and denominator coefficients, highest power first, denominator monic.

        Parameters
        ----------
        scale : float, optional
            If given, coefficients of the polynomials in x = s/scale instead of s.
        """
        w = 1.0 if scale is None else float(scale)
        with np.errstate(over="ignore", invalid="ignore"):
            num = self.gain_at(w) * _poly.poly_from_roots(self.zeros, w)
        den = _poly.poly_from_roots(self.poles, w)
        return np.real_if_close(num), np.real_if_close(den)

    def zpk(self):
        """``(zeros, poles, gain)`` with the gain as the leading-coefficient ratio."""
        return self.zeros.copy(), self.poles.copy(), self.leading_gain

    def __call__(self, s):
        """Evaluate H at complex frequencies s (rad/s); works on arrays."""
        s = np.asarray(s, dtype=complex)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
            args = (self.gain, self.zeros, self.poles, self.w0)
            out = _poly.evaluate_zpk(s, *args)
            redo = ~np.isfinite(out) | (out == 0)
            if np.any(redo) and self.gain != 0:  # overflow or underflow on the way: redo those
                out[redo] = _poly.evaluate_zpk(s[redo], *args, renormalise=True)
        return out

    def freqresp(self, frequency):
        """H(j·2π·f) for frequencies f in Hz."""
        return self(2j * np.pi * np.asarray(frequency, dtype=float))

    @property
    def is_proper(self) -> bool:
        """True when the numerator degree does not exceed the denominator degree."""
        return self.zeros.size <= self.poles.size

    @property
    def is_strictly_proper(self) -> bool:
        return self.zeros.size < self.poles.size

    @property
    def is_stable(self) -> bool:
        """True when every pole lies strictly in the left half plane."""
        return bool(np.all(self.poles.real < 0))

    @property
    def dc_gain(self) -> float:
        """H(0); ±inf for a pole at the origin."""
        if self.gain == 0:
            return 0.0
        n_zero_z = int(np.sum(self.zeros == 0))
        n_zero_p = int(np.sum(self.poles == 0))
        if n_zero_z > n_zero_p:
            return 0.0
        if n_zero_p > n_zero_z:
            return math.copysign(math.inf, self._sign_near_zero())
        return float(np.real(self(np.array(0.0))))

    def _sign_near_zero(self) -> float:
        z = self.zeros[self.zeros != 0]
        p = self.poles[self.poles != 0]
        v = self.gain * np.prod(-z) / np.prod(-p)
        return float(np.sign(v.real)) or 1.0

    @property
    def hf_gain(self) -> float:
        """lim H(s) as s → ∞: 0 if strictly proper, the gain if biproper, ±inf if improper."""
        if self.gain == 0 or self.zeros.size < self.poles.size:
            return 0.0
        if self.zeros.size == self.poles.size:
            return self.gain
        return math.copysign(math.inf, self.gain)

    # ------------------------------------------------------------------ arithmetic
    def _coerce(self, other) -> Rational:
        if isinstance(other, Rational):
            return other
        if isinstance(other, (int, float, np.floating, np.integer)):
            return Rational.constant(float(other))
        return NotImplemented

    def __mul__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return Rational(
            np.concatenate([self.zeros, other.zeros]),
            np.concatenate([self.poles, other.poles]),
            self.gain * other.gain_at(self.w0),
            self.cancelled + other.cancelled,
            self.w0,
        )

    __rmul__ = __mul__

    def __truediv__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        if other.gain == 0:
            raise InputError("division by a zero transfer function")
        return Rational(
            np.concatenate([self.zeros, other.poles]),
            np.concatenate([self.poles, other.zeros]),
            self.gain / other.gain_at(self.w0),
            self.cancelled + other.cancelled,
            self.w0,
        )

    def __rtruediv__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return other / self

    def __neg__(self):
        return Rational(self.zeros, self.poles, -self.gain, self.cancelled, self.w0)

    def __add__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        if other.gain == 0:
            return self
        if self.gain == 0:
            return other
        common, rest_a, rest_b = _common_denominator(self.poles, other.poles)
        # both numerators over the common denominator, as polynomials in x = s/w
        w = _poly.characteristic_scale(self.zeros, self.poles, other.zeros, other.poles)
        parts = []
        for h, rest in ((self, rest_a), (other, rest_b)):
            roots = np.concatenate([h.zeros, rest])
            g = h.gain_at(w)
            # the coefficients of prod(x + |r|/w) bound the rounding of each coefficient
            parts.append((g * _poly.poly_from_roots(roots, w),
                          abs(g) * _poly.poly_from_roots(-np.abs(roots), w).real))
        (na, ba), (nb, bb) = parts
        num = np.polyadd(na, nb)
        bound = np.polyadd(ba, bb)
        # a coefficient is zero when it is below the rounding of its own terms (never for being
        # small beside another coefficient: that would drop terms of a widely spread system)
        tol = 8 * (num.size + 1) * np.finfo(float).eps * bound
        num = np.where(np.abs(num) > tol, num, 0.0)
        keep = np.flatnonzero(num)
        if keep.size == 0:
            return Rational.constant(0.0)
        num = num[keep[0]:]
        new_zeros = _poly.roots(num.real) * w
        return Rational(new_zeros, common, float(num[0].real), self.cancelled + other.cancelled, w)

    __radd__ = __add__

    def __sub__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return self + (-other)

    def __rsub__(self, other):
        return (-self) + other

    def feedback(self, other=1.0, sign: int = -1) -> Rational:
        """Closed loop H/(1 − sign·H·G): negative feedback by default."""
        other = self._coerce(other)
        loop = self * other
        return self / (Rational.constant(1.0) - sign * loop)

    # ------------------------------------------------------------------ analysis
    @cached_property
    def _pf_default(self):
        from .partial_fractions import partial_fractions

        return partial_fractions(self)

    @cached_property
    def step_fractions(self):
        """Partial fractions of H(s)/s (the step response), computed once per value."""
        return (self * Rational([], [0.0], 1.0)).partial_fractions()

    def partial_fractions(self, merge_tol: float | None = None):
        """The partial-fraction expansion (see :class:`.PartialFractions`)."""
        if merge_tol is None:
            return self._pf_default
        from .partial_fractions import partial_fractions

        return partial_fractions(self, merge_tol=merge_tol)

    def impulse(self, t):
        """Regular part of the impulse response at times t (s); δ terms: ``partial_fractions().direct``."""
        from .responses import impulse

        return impulse(self, t)

    def step(self, t):
        """Unit-step response at times t (s), closed form."""
        from .responses import step

        return step(self, t)

    def ramp(self, t):
        """Unit-ramp response at times t (s), closed form."""
        from .responses import ramp

        return ramp(self, t)

    def sine(self, t, frequency: float, phase: float = 0.0):
        """Full response (transient included) to sin(2π·f·t + phase)·u(t); f in Hz, phase in rad."""
        from .responses import sine

        return sine(self, t, frequency, phase)

    def square(self, t, period: float, duty: float = 0.5, low: float = 0.0, high: float = 1.0):
        """Periodic steady state for a square wave that rises at t = 0 (mod period), closed form."""
        from .responses import square

        return square(self, t, period, duty, low, high)

    def checks(self, merge_tol: float | None = None):
        """The hand checks of the trade, computed (see :mod:`.checks`)."""
        from .checks import checks

        return checks(self, merge_tol=merge_tol)

    def formula(self, input: str = "step", digits: int = 6, latex: bool = False) -> str:
        """The time function as text (or LaTeX)."""
        from .formula import formula

        return formula(self, input=input, digits=digits, latex=latex)

    def to_dict(self) -> dict:
        num, den = self.coeffs()
        return {
            "zeros": self.zeros,
            "poles": self.poles,
            "gain": self.leading_gain,
            "gain_scaled": self.gain,
            "frequency_scale": self.w0,
            "numerator": np.atleast_1d(num),
            "denominator": np.atleast_1d(den),
        }

    def __repr__(self):
        extra = f", w0={self.w0!r}" if self.w0 != 1.0 else ""
        return (f"Rational(zeros={self.zeros.tolist()}, poles={self.poles.tolist()}, "
                f"gain={self.gain!r}{extra})")


def _common_denominator(pa: np.ndarray, pb: np.ndarray):
    """Least common multiple of two pole multisets; returns (common, factor_for_a, factor_for_b)."""
    b_left = list(pb)
    shared = []
    only_a = []
    for p in pa:
        match = next((k for k, q in enumerate(b_left) if abs(q - p) <= CANCEL_TOL * max(abs(p), 1e-300)
                      or (p == 0 and q == 0)), None)
        if match is None:
            only_a.append(p)
        else:
            shared.append(p)
            b_left.pop(match)
    only_b = b_left
    common = np.array(shared + only_a + only_b, dtype=complex)
    return common, np.array(only_b, dtype=complex), np.array(only_a, dtype=complex)
