"""Poles, zeros and gain of a descriptor system ``E x' = A x + B u, y = C x + D u``.

Method (no polynomial is ever formed):

1. *Scaling.*  ``s = w0 * sigma`` with ``w0 = ||A|| / ||E||`` (Frobenius norms), then
   two-sided diagonal scaling by powers of two of the Rosenbrock pencil
   ``[[A, B], [C, D]] - sigma [[w0 E, 0], [0, 0]]`` (Sinkhorn iteration on the squared
   magnitudes, so that rows and columns have comparable norms).  Powers of two are exact, so
   scaling changes no eigenvalue; it lets the QZ algorithm resolve nanosecond and second time
   constants in one pencil.  ``w0`` is re-estimated once after the first scaling.
2. *Poles* are the finite generalised eigenvalues of the scaled ``(A, E)`` block, *zeros*
   the finite generalised eigenvalues of the scaled Rosenbrock pencil (``scipy.linalg.eig``
   with both matrices, i.e. LAPACK QZ, homogeneous ``(alpha, beta)`` pairs).  An eigenvalue
   is infinite when ``|beta| <= INFINITE_TOL * |alpha|`` in the scaled pencil.
3. *Cancellation.*  A zero within ``cancel_rtol`` (relative) of a pole marks an
   uncontrollable or unobservable mode, or an exact pole-zero cancellation such as a
   compensated divider; both are removed and the pair is recorded.
4. *Gain* (``gain``, possibly beyond float range for many poles, in which case it is
   ``inf`` and only ``scaled_gain`` is usable) from matching ``H(s0) = C (s0 E - A)^-1 B + D`` at a real ``s0`` chosen far (in
   ratio) from every pole and zero, with the products evaluated as sums of logarithms.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.linalg

from ..errors import ComputationError

__all__ = ["INFINITE_TOL", "ZPK", "descriptor_zpk"]

INFINITE_TOL = 1e-11


@dataclass(frozen=True)
class ZPK:
    """Zeros [rad/s], poles [rad/s] and gain of ``H(s) = gain prod(s - z) / prod(s - p)``."""

    zeros: np.ndarray
    poles: np.ndarray
    gain: float
    cancelled: tuple  # ((pole, zero), ...) removed as a common factor
    infinite_poles: int  # infinite generalised eigenvalues of (A, E)
    w0: float  # frequency scale used [rad/s]
    scaled_gain: float = float("nan")  # H = scaled_gain prod((s-z)/w0) / prod((s-p)/w0)


def _fro(m):
    return float(np.sqrt(np.sum(np.abs(m) ** 2)))


def _balance(p, q, iters=12):
    """Power-of-two row/column scalings making ``|p|^2 + |q|^2`` roughly doubly stochastic."""
    mag = np.abs(p) ** 2 + np.abs(q) ** 2
    n, m = mag.shape
    lr = np.zeros(n)
    lc = np.zeros(m)
    for _ in range(iters):
        w = mag * np.exp2(2 * lr)[:, None] * np.exp2(2 * lc)[None, :]
        rs = w.sum(axis=1)
        lr -= np.where(rs > 0, 0.5 * np.log2(np.where(rs > 0, rs, 1)), 0)
        w = mag * np.exp2(2 * lr)[:, None] * np.exp2(2 * lc)[None, :]
        cs = w.sum(axis=0)
        lc -= np.where(cs > 0, 0.5 * np.log2(np.where(cs > 0, cs, 1)), 0)
    return np.exp2(np.round(lr)), np.exp2(np.round(lc))


def _scaled(E, A, B, C, D):
    n = A.shape[0]
    big_a = np.block([[A, B], [C, D]])
    big_e = np.zeros_like(big_a)
    big_e[:n, :n] = E
    w0 = 1.0
    dl = np.ones(n + 1)
    dr = np.ones(n + 1)
    for _ in range(2):
        sa = dl[:, None] * big_a * dr[None, :]
        se = dl[:, None] * big_e * dr[None, :] * w0
        ne = _fro(se[:n, :n])
        w0 *= _fro(sa[:n, :n]) / ne if ne > 0 else 1.0
        se = dl[:, None] * big_e * dr[None, :] * w0
        l2, r2 = _balance(sa, se)
        dl *= l2
        dr *= r2
    sa = dl[:, None] * big_a * dr[None, :]
    se = dl[:, None] * big_e * dr[None, :] * w0
    return sa, se, w0, float(dl[n] * dr[n])


def _finite_eigs(a, e):
    if a.shape[0] == 0:
        return np.zeros(0, complex), 0, 0
    w = scipy.linalg.eig(a, e, right=False, homogeneous_eigvals=True)
    alpha, beta = w[0], w[1]
    scale = max(_fro(a), _fro(e), 1e-300)
    both_zero = (np.abs(alpha) <= 1e-13 * scale) & (np.abs(beta) <= 1e-13 * scale)
    finite = (np.abs(beta) > INFINITE_TOL * np.abs(alpha)) & ~both_zero
    vals = alpha[finite] / beta[finite]
    return vals, int(np.sum(~finite & ~both_zero)), int(np.sum(both_zero))


def _conjugate_clean(vals, rtol=1e-9):
    """Make a root set exactly closed under conjugation (real ones exactly real)."""
    vals = np.asarray(vals, dtype=complex)
    mag = np.maximum(np.abs(vals), 1e-300)
    real = np.abs(vals.imag) <= rtol * mag
    out = list(vals[real].real.astype(complex))
    upper = list(vals[~real & (vals.imag > 0)])
    lower = list(vals[~real & (vals.imag < 0)])
    for u in upper:
        if lower:
            k = int(np.argmin([abs(u - np.conj(v)) for v in lower]))
            v = lower.pop(k)
            m = 0.5 * (u + np.conj(v))
        else:
            m = u
        out.extend([m, np.conj(m)])
    for v in lower:  # unmatched lower ones
        out.extend([v, np.conj(v)])
    return np.array(sorted(out, key=lambda x: (abs(x), x.imag)), dtype=complex)


def _cancel(zeros, poles, rtol):
    zeros = list(zeros)
    poles = list(poles)
    pairs = []
    changed = True
    while changed and zeros and poles:
        changed = False
        best = None
        for i, z in enumerate(zeros):
            for j, p in enumerate(poles):
                d = abs(z - p) / max(abs(z), abs(p), 1e-300)
                if d <= rtol and (best is None or d < best[0]):
                    best = (d, i, j)
        if best is not None:
            _, i, j = best
            pairs.append((complex(poles.pop(j)), complex(zeros.pop(i))))
            changed = True
    return np.array(zeros, complex), np.array(poles, complex), tuple(pairs)


def evaluate(E, A, B, C, D, s):
    """``H(s) = C (s E - A)^-1 B + D`` at complex ``s`` (scalar)."""
    x = np.linalg.solve(s * E - A, B)
    return complex((C @ x + D).ravel()[0])


def descriptor_zpk(E, A, B, C, D, *, cancel_rtol: float = 1e-8) -> ZPK:
    """Zero-pole-gain form of the SISO descriptor system ``(E, A, B, C, D)``.

    Parameters
    ----------
    E, A : (n, n) float arrays
    B : (n, 1), C : (1, n), D : (1, 1) float arrays
    cancel_rtol : float
        Relative distance below which a pole and a zero are treated as one common factor and
        removed (recorded in ``ZPK.cancelled``).

    Raises
    ------
    ComputationError
        When the pencil ``s E - A`` is singular (no unique solution at any frequency).
    """
    n = A.shape[0]
    B = np.asarray(B, float).reshape(n, 1)
    C = np.asarray(C, float).reshape(1, n)
    D = np.asarray(D, float).reshape(1, 1)
    sa, se, w0, io_scale = _scaled(E, A, B, C, D)
    poles, n_inf, n_sing = _finite_eigs(sa[:n, :n], se[:n, :n])
    if n_sing:
        raise ComputationError("network equations are singular (the pencil sE - A is singular)")
    zeros, _, z_sing = _finite_eigs(sa, se)
    poles = _conjugate_clean(poles * w0)
    zeros = zeros * w0
    # evaluate H at real points in the scaled variable, far from all roots
    ea, aa = se[:n, :n], sa[:n, :n]
    ba, ca, da = sa[:n, n:], sa[n:, :n], sa[n:, n:]
    roots = np.concatenate([poles / w0, zeros / w0]) if zeros.size else poles / w0
    cands = np.concatenate([np.logspace(-4, 4, 33), -np.logspace(-4, 4, 33)])

    def distance(x):
        if roots.size == 0:
            return 1.0
        return float(np.min(np.abs(x - roots) / np.maximum(np.abs(x), np.abs(roots))))

    order = sorted(cands, key=distance, reverse=True)
    if z_sing:  # Rosenbrock pencil singular: H is identically zero
        return ZPK(np.zeros(0, complex), np.zeros(0, complex), 0.0, (), n_inf, w0, 0.0)
    zeros = _conjugate_clean(zeros)
    zeros_c, poles_c, pairs = _cancel(zeros, poles, cancel_rtol)
    gains = []
    for x in order[:3]:
        try:
            h = evaluate(ea, aa, ba, ca, da, x) / io_scale  # H(s = w0 x)
        except np.linalg.LinAlgError:
            continue
        if h == 0:
            continue
        logk = np.log(complex(h)) + np.sum(np.log((x - poles_c / w0) + 0j)) - np.sum(
            np.log((x - zeros_c / w0) + 0j)
        )
        gains.append(logk)
    if not gains:
        raise ComputationError("could not evaluate the transfer function to fix its gain")
    scaled = float(np.exp(gains[0]).real)  # H = scaled * prod((s-z)/w0) / prod((s-p)/w0)
    log_gain = gains[0].real + (len(poles_c) - len(zeros_c)) * np.log(w0)
    with np.errstate(over="ignore"):
        gain = float(np.sign(scaled) * np.exp(log_gain))
    return ZPK(zeros_c, poles_c, gain, pairs, n_inf, w0, scaled)
