"""How many lumped sections a line needs: the automatic section-count rule.

Rule (documented in docs/network.md):

1. *Band.*  The ladder is held to the exact line up to ``f_max``: given, or
   ``BANDWIDTH_FACTOR`` times the exact response's -3 dB bandwidth
   (:func:`taumatch.network.band.find_bandwidth` over :func:`taumatch.network.band.sweep_range`).
2. *Error.*  For a section count ``N`` (the same for every line) the ladder response
   (exactly the lumped network: ABCD power of the pi section) is compared with the exact one
   at ``CHECK_POINTS`` logarithmically spaced and ``CHECK_POINTS`` linearly spaced
   frequencies up to ``f_max``: ``err = max |H_N - H| / max(|H|, 1e-9 max|H|)``.
3. *Search.*  ``N = 1, 2, 4, ...`` until ``err <= tol`` (0.1 % by default), then bisection
   between the last failing and the first passing count; the result is the smallest passing
   count found, and ``N - 1`` is known to fail (unless ``N = 1``).
4. *Limit.*  When even ``max_sections`` (default :data:`MAX_SECTIONS`) fails, that count is
   used and ``f_max`` is lowered (bisection on ``log f``) to the band over which it holds
   ``tol``; the choice says so (``limited``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError, InputError

__all__ = ["BANDWIDTH_FACTOR", "CHECK_POINTS", "MAX_SECTIONS", "SectionChoice",
           "check_freqs", "choose_sections"]

#: The ladder is held to the exact line up to this many times the -3 dB bandwidth.
BANDWIDTH_FACTOR = 3.0
#: Most pi sections per line the automatic rule gives (the pole path grows as n^3).
MAX_SECTIONS = 200
CHECK_POINTS = 200


@dataclass(frozen=True)
class SectionChoice:
    """Outcome of the section-count search.

    Attributes
    ----------
    sections : int
        Lumped pi sections per line.
    f_max : float
        Upper end of the band the promise holds over [Hz].
    f_bw : float or None
        Bandwidth estimate the default ``f_max`` came from [Hz] (None when ``f_max`` was given).
    error : float
        Worst relative complex error of the ladder against the exact lines up to ``f_max``.
    error_previous : float or None
        The same for ``sections - 1`` (None when ``sections == 1`` or ``limited``).
    tol : float
        The tolerance asked for.
    limited : bool
        True when ``max_sections`` was not enough and ``f_max`` was lowered to the band the
        ladder holds ``tol`` over.
    """

    sections: int
    f_max: float
    f_bw: float | None
    error: float
    error_previous: float | None
    tol: float
    limited: bool = False

    def to_dict(self) -> dict:
        return {
            "sections": self.sections,
            "f_max_hz": self.f_max,
            "f_bw_hz": self.f_bw,
            "error": self.error,
            "error_previous": self.error_previous,
            "tol": self.tol,
            "limited": self.limited,
        }


def check_freqs(f_max: float) -> np.ndarray:
    """The frequencies [Hz] at which a ladder is held to the tolerance, up to ``f_max``."""
    lo = f_max * 1e-6
    return np.unique(
        np.concatenate(
            [np.logspace(np.log10(lo), np.log10(f_max), CHECK_POINTS),
             np.linspace(f_max / CHECK_POINTS, f_max, CHECK_POINTS)]
        )
    )


def ladder_error(h_exact, h_ladder):
    """Worst relative complex error of a ladder response against the exact one."""
    ref = np.maximum(np.abs(h_exact), 1e-9 * np.max(np.abs(h_exact)))
    err = np.abs(h_ladder - h_exact) / ref
    return float(np.max(err)) if np.all(np.isfinite(err)) else float("inf")


def choose_sections(response, *, f_max=None, tol=1e-3, max_sections=MAX_SECTIONS,
                    sweep=None) -> SectionChoice:
    """Smallest common pi-section count meeting ``tol`` up to ``f_max`` (see module doc).

    Parameters
    ----------
    response : callable
        ``response(freqs, sections)``: the response [complex] at ``freqs`` [Hz] with every
        line exact (``sections=None``) or as a ladder of ``sections`` pi sections.
    f_max : float, optional
        Band edge [Hz]; default ``BANDWIDTH_FACTOR`` times the exact response's bandwidth,
        searched over ``sweep``.
    tol : float
        Relative complex error allowed (default 1e-3, i.e. 0.1 %).
    max_sections : int
        Most sections allowed (see rule 4).
    sweep : (float, float), optional
        Frequency range [Hz] for the bandwidth search (required when ``f_max`` is None).
    """
    if not (isinstance(tol, (int, float)) and 0 < tol < 1):
        raise InputError(f"tol: must be a number in (0, 1), got {tol!r}")
    if isinstance(max_sections, bool) or not isinstance(max_sections, int) or max_sections < 1:
        raise InputError(f"max_sections: must be a whole number >= 1, got {max_sections!r}")
    f_bw = None
    if f_max is None:
        from .band import find_bandwidth

        if sweep is None:
            raise InputError("choose_sections: give f_max or the sweep to find the bandwidth in")
        bw = find_bandwidth(lambda f: response(f, None), *sweep)
        f_bw = bw.upper if math.isfinite(bw.upper) else sweep[1] / 1e3
        f_max = BANDWIDTH_FACTOR * f_bw
    else:
        try:
            f_max = float(f_max)
        except (TypeError, ValueError):
            raise InputError(f"f_max: must be a frequency in Hz, got {f_max!r}") from None
        if not (np.isfinite(f_max) and f_max > 0):
            raise InputError(f"f_max: must be a positive finite frequency in Hz, got {f_max!r}")
    errors = {}

    def err(n, band=f_max):
        key = (n, band)
        if key not in errors:
            freqs = check_freqs(band)
            errors[key] = ladder_error(response(freqs, None), response(freqs, n))
        return errors[key]

    n = 1
    while err(n) > tol:
        if n >= max_sections:
            return _limited(err, max_sections, f_max, f_bw, tol)
        n = min(2 * n, max_sections)
    lo, hi = n // 2, n  # lo fails (or is 0), hi passes
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if err(mid) <= tol:
            hi = mid
        else:
            lo = mid
    prev = err(hi - 1) if hi > 1 else None
    return SectionChoice(hi, f_max, f_bw, err(hi), prev, tol)


def _limited(err, n, f_max, f_bw, tol) -> SectionChoice:
    """``n`` sections, and the band below ``f_max`` over which they hold ``tol``."""
    lo, hi = math.log(f_max / 1e4), math.log(f_max)
    if err(n, math.exp(lo)) > tol:
        raise ComputationError(
            f"{n} line sections hold {tol:.3g} relative error not even up to "
            f"{math.exp(lo):.4g} Hz; the lines are too long for a lumped model here"
        )
    for _ in range(20):
        mid = 0.5 * (lo + hi)
        if err(n, math.exp(mid)) <= tol:
            lo = mid
        else:
            hi = mid
    band = math.exp(lo)
    return SectionChoice(n, band, f_bw, err(n, band), None, tol, limited=True)
