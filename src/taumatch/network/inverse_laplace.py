"""Step responses from an exact transfer function: a numerical inverse Laplace transform.

Method: the Fourier series on a damped contour (Dubner & Abate, J. ACM 15, 115, 1968;
Crump, J. ACM 23, 89, 1976), summed by FFT.  For ``F(s)`` with inverse ``f(t)`` and
``g(t) = exp(-gamma t) f(t)`` extended with period ``2T``::

    f(t) ~ exp(gamma t) / T * [F(gamma) / 2 + Re sum_{k=1}^{N-1} F(gamma + i k pi / T) exp(i k pi t / T)]

for ``0 < t < 2T``.  Before the series, the step's behaviour at ``t = 0`` is taken out in
closed form: with ``H(s) ~ h0 + c1/(s + b) + c2/(s + b)^2`` for large ``s`` (``h0`` the jump,
the initial-value theorem; the coefficients read along the real axis, :func:`asymptote`), the
unit step is ``h0 + c1 (1 - e^-bt)/b + c2 (1 - e^-bt (1 + b t))/b^2`` plus the inverse of
``(H(s) - h0 - c1/(s+b) - c2/(s+b)^2) / s``, whose terms fall as ``1/k^4`` instead of
``1/k`` (a jump) or ``1/k^2`` (a corner), so the series converges fast.

Errors (both stated with the result):

* *aliasing*: the series gives ``f(t) + sum_{n>=1} exp(-2 n gamma T) f(t + 2 n T)``; with
  ``exp(-2 gamma T) = ALIAS`` it is at most ``ALIAS / (1 - ALIAS)`` times ``max |f|``
  (a stable step response is bounded by its own maximum);
* *truncation*: estimated as the largest difference between the sums of ``N`` and ``N/2``
  terms over the window (the same samples, cut), which is the error of the ``N/2`` sum to
  first order and, since the terms decay, overstates that of the ``N`` sum returned.
  ``N`` doubles from ``N_START`` until the estimate is below ``tol`` times the largest
  ``|f|``, or ``N`` reaches ``n_max``, or -- once the series reaches eight times the
  response's band -- two doublings have not shrunk it below 0.6 of what it was (a jump in
  the response, such as a lossless line's reflection without a band limit: then the
  estimate is what is stated, and ``converged`` is False).

The window is ``[0, t_end]`` with ``T = 2 t_end``, so ``exp(gamma t) <= ALIAS^-1/4`` on it.
Sample spacing ``T / (2 N)`` (the series evaluated by FFT on a grid twice as fine as its
highest frequency: band-limited interpolation).  ``smooth`` (a time in s) multiplies the terms by
``exp(-(omega_k smooth)^2 / 2)``: a Gaussian blur of standard deviation ``smooth``, for long
windows whose fast detail is not wanted (the result is then the step of ``H`` times that
blur; the truncation estimate still holds for it).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError

__all__ = ["ALIAS", "N_START", "SampledStep", "asymptote", "step_response"]

#: ``exp(-2 gamma T)``: the weight of the first alias.
ALIAS = 1e-9
#: Terms the doubling starts from.
N_START = 512


@dataclass(frozen=True)
class SampledStep:
    """A step response on a grid, with its error.

    Attributes
    ----------
    t, y : ndarray
        Times [s] from 0 to ``t_end`` and the response there.
    jump : float
        ``y(0+)``, the initial value (taken out before the series).
    terms : int
        Terms of the series used.
    truncation_error : float
        Estimate of the largest truncation error on the window (same unit as ``y``).
    alias_error : float
        Bound of the aliasing error on the window.
    converged : bool
        Whether the truncation estimate reached ``tol`` times ``max |y|``.
    smooth : float
        Standard deviation of the Gaussian blur applied [s] (0: none).
    """

    t: np.ndarray
    y: np.ndarray
    jump: float
    terms: int
    truncation_error: float
    alias_error: float
    converged: bool
    smooth: float = 0.0

    @property
    def error(self) -> float:
        """Truncation estimate plus aliasing bound."""
        return self.truncation_error + self.alias_error


def asymptote(transfer, scale: float) -> tuple[float, float, float]:
    """``(h0, c1, c2)`` with ``H(s) ~ h0 + c1/(s + b) + c2/(s + b)^2`` as ``s -> +inf``
    along the real axis (``b = scale`` [rad/s]): the expansion in ``u = b/(s + b)`` to third
    order is fitted at ``u = 1e-3, 2e-3, 4e-3, 8e-3`` and must predict ``H`` at ``u = 5e-4``
    to 1e-6 of its size; zeros where it does not (no expansion there: a delay, a resonance
    beyond the points)."""
    u = np.array([8e-3, 4e-3, 2e-3, 1e-3, 5e-4])
    s = scale / u - scale
    h = np.asarray(transfer(s.astype(complex)), dtype=complex).real
    if not np.all(np.isfinite(h)):
        return 0.0, 0.0, 0.0
    v = np.vander(u[:4], 4, increasing=True)
    a = np.linalg.solve(v, h[:4])
    pred = float(np.polyval(a[::-1], u[4]))
    if abs(pred - h[4]) > 1e-6 * max(float(np.max(np.abs(h))), 1e-300):
        return 0.0, 0.0, 0.0
    return float(a[0]), float(a[1] * scale), float(a[2] * scale * scale)


def _closed_part(t, h0, c1, c2, b):
    """The step of ``h0 + c1/(s+b) + c2/(s+b)^2`` at ``t`` [s]."""
    e = np.exp(-b * t)
    return h0 + c1 * (-np.expm1(-b * t)) / b + c2 * (1 - e * (1 + b * t)) / (b * b)


def _sums(coef, n, gamma, big_t, t_end, length=None):
    """The series of the first ``n`` coefficients on a grid up to ``t_end`` (``length``
    points per period ``2T``; default ``4 n``, spacing ``T / (2 n)``)."""
    length = length or 4 * n
    # Re sum_k c_k w^(k j) (w = exp(2 pi i / length)) is a real inverse transform of the
    # spectrum X_0 = c_0, X_k = c_k / 2 (its Hermitian extension): half the work of the
    # complex transform whose real part it is
    x = coef[:n] / 2
    x[0] = coef[0]
    s = np.fft.irfft(x, n=length) * length
    dt = 2 * big_t / length
    m = math.floor(t_end / dt + 1e-9) + 1
    t = np.arange(m) * dt
    with np.errstate(over="ignore"):
        y = np.exp(gamma * t) / big_t * s[:m]
    return t, y


def step_response(transfer, t_end: float, *, scale: float | None = None, tol: float = 1e-6,
                  n_max: int = 1 << 16, smooth: float = 0.0,
                  band: float | None = None) -> SampledStep:
    """Unit-step response of ``transfer`` (a function of complex ``s`` [rad/s], vectorised)
    on ``[0, t_end]`` [s]; see the module text.

    Parameters
    ----------
    transfer : callable
        ``H(s)`` for an array of complex ``s`` [rad/s].
    t_end : float
        End of the window [s].
    scale : float, optional
        A characteristic angular frequency of ``H`` [rad/s] (default ``10 / t_end``): where
        the asymptote is read (:func:`asymptote`) and the rate ``b`` of its closed form.
    tol : float
        Truncation target relative to ``max |y|``.
    n_max : int
        Most terms.
    smooth : float
        Gaussian blur [s] (0: none).
    band : float, optional
        Highest frequency [Hz] where ``H`` has features (its bandwidth or resonance): the
        doubling is only judged stalled once the series reaches eight times it.

    Examples
    --------
    >>> r = step_response(lambda s: 1 / (1 + s * 1e-8), 1e-7)   # RC = 10 ns
    >>> i = int(np.argmin(abs(r.t - 1e-8)))
    >>> bool(abs(r.y[i] - (1 - math.exp(-r.t[i] / 1e-8))) < 1e-6)
    True
    """
    if not (math.isfinite(t_end) and t_end > 0):
        raise ComputationError(f"step window must be a positive time, got {t_end!r} s")
    big_t = 2.0 * t_end
    b = float(scale) if scale else 10.0 / t_end
    h0, c1, c2 = asymptote(transfer, b)
    gamma = -math.log(ALIAS) / (2 * big_t)
    n = N_START
    coef = np.zeros(0, dtype=complex)
    history = []
    while True:
        k = np.arange(coef.size, n)
        s = gamma + 1j * k * math.pi / big_t
        with np.errstate(divide="ignore", invalid="ignore"):
            f = (np.asarray(transfer(s), dtype=complex) - h0 - c1 / (s + b)
                 - c2 / (s + b) ** 2) / s
        if smooth:
            f = f * np.exp(-0.5 * (k * math.pi / big_t * smooth) ** 2)
        if k.size and k[0] == 0:
            f[0] = f[0] / 2
        if not np.all(np.isfinite(f)):
            raise ComputationError("the transfer function is not finite on the inversion contour")
        coef = np.concatenate([coef, f])
        t, y = _sums(coef, n, gamma, big_t, t_end)
        _, y_half = _sums(coef, n // 2, gamma, big_t, t_end, length=4 * n)
        trunc = float(np.max(np.abs(y - y_half)))
        y = y + _closed_part(t, h0, c1, c2, b)
        converged = trunc <= tol * max(float(np.max(np.abs(y))), 1e-300)
        history.append(trunc)
        covered = band is None or n * math.pi / big_t >= 2 * math.pi * 8 * band
        stalled = covered and len(history) >= 3 and history[-1] > 0.6 * history[-3]
        if converged or n >= n_max or stalled:
            break  # stalled: a jump the series cannot resolve (a lossless line's reflection)
        n *= 2
    alias = ALIAS / (1 - ALIAS) * float(np.max(np.abs(y)))
    return SampledStep(t, y, float(h0), n, trunc, alias, bool(converged), float(smooth))
