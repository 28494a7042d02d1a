"""How many lumped sections a line needs: the automatic section-count rule.

Rule (documented in docs/network.md):

1. *Frequency range.*  The network is first lumped with one section per line; the
   magnitudes of its finite poles and zeros, and ``1/delay``, ``r/l`` and ``g/c`` of every
   line, give characteristic angular frequencies.  The exact response is sampled on a
   logarithmic grid from 1e-3 times the smallest to 1e3 times the largest of them (in Hz,
   ``/(2 pi)``).
2. *Bandwidth.*  ``f_bw`` is the highest grid frequency at which the exact ``|H|`` is still
   at least ``max|H| / sqrt(2)``.  Unless given, ``f_max = BANDWIDTH_FACTOR * f_bw``.
3. *Error.*  For a section count ``N`` (the same for every line) the ladder response
   (exactly the lumped network: ABCD power of the pi section) is compared with the exact one
   at ``CHECK_POINTS`` logarithmically spaced and ``CHECK_POINTS`` linearly spaced
   frequencies up to ``f_max``: ``err = max |H_N - H| / max(|H|, 1e-9 max|H|)``.
4. *Search.*  ``N = 1, 2, 4, ...`` until ``err <= tol`` (0.1 % by default), then bisection
   between the last failing and the first passing count; the result is the smallest passing
   count found, and ``N - 1`` is known to fail (unless ``N = 1``).  More than ``N_MAX``
   sections raises :class:`~taumatch.errors.ComputationError`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError, InputError

__all__ = ["BANDWIDTH_FACTOR", "CHECK_POINTS", "N_MAX", "SectionChoice", "choose_sections"]

BANDWIDTH_FACTOR = 3.0
N_MAX = 4096
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
        The same for ``sections - 1`` (None when ``sections == 1``).
    tol : float
        The tolerance asked for.
    """

    sections: int
    f_max: float
    f_bw: float | None
    error: float
    error_previous: float | None
    tol: float

    def to_dict(self) -> dict:
        return {
            "sections": self.sections,
            "f_max_hz": self.f_max,
            "f_bw_hz": self.f_bw,
            "error": self.error,
            "error_previous": self.error_previous,
            "tol": self.tol,
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


def _range(net, source, output):
    from .mna import build, dense, source_vector
    from .pencil import descriptor_zpk

    lines = net.lines()
    omegas = []
    for ln in lines:
        omegas.append(1 / ln.delay)
        if ln.r:
            omegas.append(ln.r / ln.l)
        if ln.g:
            omegas.append(ln.g / ln.c)
    st = build(net.elements, sections={ln.name: 1 for ln in lines})
    e, a = dense(st, st.c), -dense(st, st.g)
    b = source_vector(st, source).reshape(-1, 1)
    c = net._output_row(st, output).reshape(1, -1)
    zpk = descriptor_zpk(e, a, b, c, np.zeros((1, 1)))
    for r in np.concatenate([zpk.poles, zpk.zeros]):
        if abs(r) > 0:
            omegas.append(abs(r))
    omegas = np.array(omegas)
    return omegas.min() / (2 * np.pi) * 1e-3, omegas.max() / (2 * np.pi) * 1e3


def _error(h_exact, h_ladder):
    ref = np.maximum(np.abs(h_exact), 1e-9 * np.max(np.abs(h_exact)))
    err = np.abs(h_ladder - h_exact) / ref
    return float(np.max(err)) if np.all(np.isfinite(err)) else float("inf")


def choose_sections(net, source, output, *, f_max=None, tol=1e-3) -> SectionChoice:
    """Smallest common pi-section count meeting ``tol`` up to ``f_max`` (see module doc).

    Parameters
    ----------
    net : Network
    source : str
        Name of the source element (the input).
    output : str or (str, str)
        Output node or node pair.
    f_max : float, optional
        Band edge [Hz]; default ``BANDWIDTH_FACTOR`` times the exact response's bandwidth.
    tol : float
        Relative complex error allowed (default 1e-3, i.e. 0.1 %).
    """
    if not (isinstance(tol, (int, float)) and 0 < tol < 1):
        raise InputError(f"tol: must be a number in (0, 1), got {tol!r}")
    f_bw = None
    if f_max is None:
        f_lo, f_hi = _range(net, source, output)
        grid = np.logspace(np.log10(f_lo), np.log10(f_hi), 600)
        mag = np.abs(net.response(grid, source, output))
        peak = np.max(mag)
        if not peak > 0:
            raise ComputationError(f"the response from {source} to {output} is zero")
        above = np.nonzero(mag >= peak / np.sqrt(2))[0]
        f_bw = float(grid[above[-1]])
        f_max = BANDWIDTH_FACTOR * f_bw
    else:
        try:
            f_max = float(f_max)
        except (TypeError, ValueError):
            raise InputError(f"f_max: must be a frequency in Hz, got {f_max!r}") from None
        if not (np.isfinite(f_max) and f_max > 0):
            raise InputError(f"f_max: must be a positive finite frequency in Hz, got {f_max!r}")
    freqs = check_freqs(f_max)
    h = net.response(freqs, source, output)
    errors = {}

    def err(n):
        if n not in errors:
            errors[n] = _error(h, net.response(freqs, source, output, line_sections=n))
        return errors[n]

    n = 1
    while err(n) > tol:
        if n >= N_MAX:
            raise ComputationError(
                f"more than {N_MAX} line sections needed for {tol:.3g} relative error up to "
                f"{f_max:.4g} Hz (error {err(n):.3g} at {n}); give a lower f_max"
            )
        n = min(2 * n, N_MAX)
    lo, hi = n // 2, n  # lo fails (or is 0), hi passes
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if err(mid) <= tol:
            hi = mid
        else:
            lo = mid
    prev = err(hi - 1) if hi > 1 else None
    return SectionChoice(hi, f_max, f_bw, err(hi), prev, tol)
