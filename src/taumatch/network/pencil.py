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
3. *Roots at the origin and cancellation.*  A root is set to exactly 0 only on the evidence
   of the direct solve at ``s = 0``, never for being small: roots below
   :data:`ORIGIN_CANDIDATE` times the largest are candidates; the zeros among them are 0
   when ``H(0) = C (-A)^-1 B + D`` vanishes within its own rounding (``|H(0)|`` at most
   :data:`ROUNDING` times the number of terms times the sum of the terms' magnitudes), the
   poles when ``A`` is singular (no finite ``H(0)``).  A small root that is really there (a
   1 Hz pole beside a 10 GHz one, whatever the scale ``w0`` of the pencil) is kept; a fixed
   threshold on the magnitude cannot tell the two apart, because a graded pencil yields
   small eigenvalues to full relative accuracy.  A zero within ``cancel_rtol`` (relative) of
   a pole marks an uncontrollable or unobservable mode, or an exact pole-zero cancellation
   such as a compensated divider; both are removed and the pair is recorded.
4. *Verification.*  Every nearest pole-zero pair closer than ``CANDIDATE_RTOL`` is tried the
   other way (cancelled or kept, closest first), and the two largest real poles and zeros
   without a partner are tried for removal (an infinite eigenvalue the threshold took for
   finite, or the partner of one it did not).  A change is kept when the zero-pole-gain form
   then matches the direct solve ``C (sE - A)^-1 B + D`` at the test points (a sweep along
   j*w and one next to each candidate pole) at least twice as well, or, for a cancellation,
   as well.  The mismatch at a point is relative to the largest of ``|H|`` there,
   :data:`MISFIT_FLOOR` times the largest ``|H|`` (an absolute accuracy: where the response
   is many decades below its peak, what it is there matters to nothing built on it, and the
   roots that shape it there may be too ill-conditioned to get right), and the rounding of
   the direct solve's last sum (:data:`ROUNDING` times the terms' magnitudes: a point where
   ``H`` is the small difference of larger terms says nothing finer).  Up to three passes;
   the remaining worst relative mismatch is ``check_error``.
5. *Gain* from matching ``H(s0) = C (s0 E - A)^-1 B + D`` at a real ``s0`` chosen far (in
   ratio) from every pole and zero, with the products evaluated as sums of logarithms.
6. *Scale of the result.*  The gain is expressed relative to the largest root ``w``:
   ``H = k prod((s-z)/w) / prod((s-p)/w)``, so that no factor exceeds 1 in size and hundreds
   of poles neither overflow nor underflow when the products are formed in order (the
   leading-coefficient ratio of a ladder of many sections is far beyond the float range).
   Where ``log |k|`` would fall below :data:`MIN_LOG_GAIN`, ``w`` is lowered just enough.
"""

from __future__ import annotations

import math

import numpy as np
import scipy.linalg

from ..errors import ComputationError

__all__ = ["INFINITE_TOL", "MIN_LOG_GAIN", "ORIGIN_CANDIDATE", "ROUNDING", "descriptor_zpk"]

#: An eigenvalue of the balanced pencil is infinite when ``|beta| <= INFINITE_TOL * |alpha|``:
#: a ratio in the pencil's own (balanced, power-of-two) scale, so it moves with the problem.
INFINITE_TOL = 1e-11
#: Roots below this fraction of the largest are candidates for lying at exactly ``s = 0``;
#: the direct solve at ``s = 0`` decides (step 3 of the module text).
ORIGIN_CANDIDATE = 1e-6
#: The zero-pole-gain form must match the direct solve to this fraction of the largest ``|H|``
#: over the test points (an absolute accuracy, the one the responses built on ``H`` need), or
#: to ``|H|`` itself where that is larger, or to the direct solve's own rounding where that is.
MISFIT_FLOOR = 1e-9
#: Rounding of a computed sum per term: a sum of ``m`` terms is zero within its rounding when
#: its size is at most ``ROUNDING * m`` times the sum of the terms' magnitudes (eight units of
#: the last place per term, for the solve's own error as well).
ROUNDING = 8 * float(np.finfo(float).eps)
#: Pole-zero pairs closer than this (relative) are candidates for cancellation.
CANDIDATE_RTOL = 1e-3
#: Natural logarithm below which the gain relative to the largest root would be too small for
#: a float's comfort (products of hundreds of factors); the scale is then lowered (see step 6).
MIN_LOG_GAIN = -550.0


def _units(zx, px, rtol):
    """Candidate cancellations: nearest zero-pole pairs (real with real, upper-half complex
    with upper-half complex, the conjugates implied), as (kind, iz, ip, distance)."""
    out = []
    used_z, used_p = set(), set()
    cand = []
    for iz, z in enumerate(zx):
        if z.imag < 0:
            continue
        for ip, p in enumerate(px):
            if p.imag < 0 or (z.imag == 0) != (p.imag == 0):
                continue
            scale = max(abs(z), abs(p))
            d = 0.0 if scale == 0 else abs(z - p) / scale
            if d <= rtol:
                cand.append((d, iz, ip))
    for d, iz, ip in sorted(cand):
        if iz in used_z or ip in used_p:
            continue
        used_z.add(iz)
        used_p.add(ip)
        out.append(("real" if px[ip].imag == 0 else "complex", iz, ip, d))
    return out


def _remove(zx, px, units):
    """Roots left after removing the given units (a complex unit also removes its conjugate;
    a ``pole``/``zero`` unit removes one lone root)."""
    zl, pl = list(zx), list(px)
    drop_z, drop_p = [], []
    for kind, iz, ip, _ in units:
        if iz is not None:
            drop_z.append(zx[iz])
        if ip is not None:
            drop_p.append(px[ip])
        if kind == "complex":
            drop_z.append(np.conj(zx[iz]))
            drop_p.append(np.conj(px[ip]))
    for v in drop_z:
        zl.pop(int(np.argmin([abs(x - v) for x in zl])))
    for v in drop_p:
        pl.pop(int(np.argmin([abs(x - v) for x in pl])))
    return np.array(zl, dtype=complex), np.array(pl, dtype=complex)


def _lone_units(zx, px, units, count=2):
    """The largest real poles and zeros not already in a pair: candidates for being infinite
    eigenvalues that the threshold classified as finite (or the partner of one it did not)."""
    in_pair_z = {u[1] for u in units}
    in_pair_p = {u[2] for u in units}
    out = []
    for kind, vals, used in (("pole", px, in_pair_p), ("zero", zx, in_pair_z)):
        idx = [i for i in np.argsort(-np.abs(vals)) if vals[i].imag == 0 and vals[i] != 0
               and i not in used][:count]
        for i in idx:
            out.append((kind, None, int(i), np.inf) if kind == "pole"
                       else (kind, int(i), None, np.inf))
    return out


def _test_points(zx, px, units):
    """Scaled points where the zero-pole-gain form is checked against the direct solve: a
    logarithmic sweep along j*w over the span of the roots, and next to every candidate pole
    (where keeping or cancelling it matters most)."""
    mags = np.abs(np.concatenate([zx, px]))
    mags = mags[mags > 0]
    lo, hi = (mags.min() / 10, mags.max() * 10) if mags.size else (1e-2, 1e2)
    pts = list(1j * np.logspace(np.log10(lo), np.log10(hi), 40))
    for kind, _, ip, _ in units:
        if ip is None:
            continue
        p = px[ip]
        if p == 0:
            pts.append(1j * lo)
        elif kind == "real":
            pts.append(1j * abs(p))
        else:
            pts.append(1j * p.imag + max(abs(p.real), 1e-6 * abs(p)))
    return np.array(pts, dtype=complex)


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


def _solve_at(ea, aa, ba, ca, da, x):
    """``C (x E - A)^-1 B + D`` at one complex point ``x`` of the scaled pencil: a sparse LU
    (network matrices have a few entries per row; a ladder's are banded).  Returns the value
    and the sum of the magnitudes of the terms it adds up (``sum |C_i v_i| + |D|``), the
    scale of its rounding error."""
    import scipy.sparse
    import scipy.sparse.linalg

    m = (complex(x) * ea - aa).tocsc()
    try:
        v = scipy.sparse.linalg.splu(m).solve(np.asarray(ba, dtype=complex))
    except RuntimeError:  # exactly singular at this point
        raise np.linalg.LinAlgError("singular") from None
    terms = np.asarray(ca, dtype=complex).ravel() * v.ravel()
    value = complex(np.sum(terms) + complex(np.asarray(da).ravel()[0]))
    return value, float(np.sum(np.abs(terms)) + abs(complex(np.asarray(da).ravel()[0])))


def descriptor_zpk(E, A, B, C, D, *, cancel_rtol: float = 1e-8):
    """Transfer function of the SISO descriptor system ``(E, A, B, C, D)`` and how it was found.

    Returns a :class:`~taumatch.network.transfer.TransferInfo` whose ``rational`` is the
    :class:`taumatch.lti.Rational` (zeros and poles in rad/s, gain relative to the scale of
    step 6 of the module text).

    Parameters
    ----------
    E, A : (n, n) float arrays
    B : (n, 1), C : (1, n), D : (1, 1) float arrays
    cancel_rtol : float
        Relative distance below which a pole and a zero are treated as one common factor and
        removed (recorded in ``TransferInfo.cancelled``).

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
    import scipy.sparse

    ea, aa = scipy.sparse.csc_matrix(se[:n, :n]), scipy.sparse.csc_matrix(sa[:n, :n])
    ba, ca, da = sa[:n, n:], sa[n:, :n], sa[n:, n:]
    roots = np.concatenate([poles / w0, zeros / w0]) if zeros.size else poles / w0
    cands = np.concatenate([np.logspace(-4, 4, 33), -np.logspace(-4, 4, 33)])

    def distance(x):
        if roots.size == 0:
            return 1.0
        return float(np.min(np.abs(x - roots) / np.maximum(np.abs(x), np.abs(roots))))

    order = sorted(cands, key=distance, reverse=True)
    if z_sing:  # Rosenbrock pencil singular: H is identically zero
        return _info([], [], 0.0, 1.0, (), n_inf, 0.0)
    zeros = _conjugate_clean(zeros)
    px, zx = poles / w0, zeros / w0
    terms = n + 1  # terms of the direct solve's last sum (C v + D), for its rounding

    def h_direct(x, with_scale=False):
        try:
            h, mag = _solve_at(ea, aa, ba, ca, da, x)
        except np.linalg.LinAlgError:
            return (None, None) if with_scale else None
        h, mag = h / io_scale, mag / abs(io_scale)  # H(s = w0 x)
        if not np.isfinite(h):
            h = None
        return (h, mag) if with_scale else h

    _snap_origin(zx, px, lambda: h_direct(0.0, with_scale=True), terms)

    gain_points = []
    for x in order:
        h = h_direct(x)
        if h is not None and h != 0:
            gain_points.append((x, h))
        if len(gain_points) == 2:
            break
    if not gain_points:
        raise ComputationError("could not evaluate the transfer function to fix its gain")
    units = _units(zx, px, CANDIDATE_RTOL)
    test = _test_points(zx, px, units)
    units = units + _lone_units(zx, px, units)
    h_test = [(x, *h_direct(x, with_scale=True)) for x in test]
    h_test = [(x, h, m) for x, h, m in h_test if h is not None]
    tx = np.array([x for x, _, _ in h_test], dtype=complex)
    th = np.array([h for _, h, _ in h_test], dtype=complex)
    # where H is the small difference of larger terms, its error is their rounding
    floor = ROUNDING * terms * np.array([m for _, _, m in h_test], dtype=float)

    def reduced(state):
        zk, pk = _remove(zx, px, [units[k] for k in state])
        x0, h0 = gain_points[0]
        logk = np.log(complex(h0)) + np.sum(np.log(x0 - pk + 0j)) - np.sum(np.log(x0 - zk + 0j))
        return zk, pk, logk

    def misfit(state):
        if not tx.size:
            return 0.0
        zk, pk, logk = reduced(state)
        with np.errstate(all="ignore"):
            lv = (logk + np.sum(np.log(tx[:, None] - zk[None, :] + 0j), axis=1)
                  - np.sum(np.log(tx[:, None] - pk[None, :] + 0j), axis=1))
            hz = np.exp(lv)
        ref = np.maximum(np.maximum(np.abs(th), floor), MISFIT_FLOOR * np.max(np.abs(th)))
        with np.errstate(all="ignore"):
            err = np.abs(hz - th) / ref
        return float(np.max(np.where(np.isfinite(err), err, np.inf)))

    # start from the cancellations within cancel_rtol, then let the direct solve decide
    state = {k for k, u in enumerate(units) if u[3] <= cancel_rtol}
    best = misfit(state)
    for _ in range(3):  # a few passes: one wrong choice can mask another
        changed = False
        for k in sorted(range(len(units)), key=lambda k: units[k][3]):
            trial = state ^ {k}
            m = misfit(trial)
            pair_added = k not in state and units[k][0] in ("real", "complex")
            if m < 0.5 * best or (pair_added and m <= 1.5 * max(best, 1e-12)):
                state, best, changed = trial, m, True
        if not changed or best < 1e-12:
            break
    zk, pk, logk = reduced(state)
    zeros_c, poles_c = zk * w0, pk * w0
    pairs = []
    dropped = []
    for k in sorted(state):
        kind, iz, ip, _ = units[k]
        if kind in ("pole", "zero"):
            dropped.append((kind, complex((px[ip] if kind == "pole" else zx[iz]) * w0)))
            continue
        pz = [(px[ip] * w0, zx[iz] * w0)]
        if kind == "complex":
            pz.append((np.conj(pz[0][0]), np.conj(pz[0][1])))
        pairs.extend((complex(a), complex(b)) for a, b in pz)
    pairs = tuple(pairs)
    # step 6: the gain relative to the largest root, so that every factor of the products is
    # at most 1 in size (H = k prod((s-z)/w) / prod((s-p)/w), logarithms throughout)
    roots = np.abs(np.concatenate([zeros_c, poles_c]))
    roots = roots[roots > 0]
    w = float(roots.max()) if roots.size else w0
    excess = len(poles_c) - len(zeros_c)
    log_k = logk.real + excess * (math.log(w0) - math.log(w))
    if excess > 0 and log_k < MIN_LOG_GAIN:  # too small for a float: lower the scale
        w *= math.exp((log_k - MIN_LOG_GAIN) / excess)
        log_k = MIN_LOG_GAIN
    sign = float(np.sign(np.exp(1j * logk.imag).real)) or 1.0
    return _info(zeros_c, poles_c, sign * math.exp(log_k), w, pairs, n_inf + len(dropped), best,
                 tuple(dropped))


def _snap_origin(zx, px, h_at_origin, terms):
    """Set to exactly 0, in place, the small roots the direct solve at ``s = 0`` says are
    there (step 3 of the module text).  ``h_at_origin()`` returns ``(H(0), sum of the terms'
    magnitudes)``, ``(None, None)`` when ``H(0)`` is not finite."""
    top = max(np.max(np.abs(px), initial=0.0), np.max(np.abs(zx), initial=0.0))
    cz = (zx != 0) & (np.abs(zx) <= ORIGIN_CANDIDATE * top)
    cp = (px != 0) & (np.abs(px) <= ORIGIN_CANDIDATE * top)
    if not (cz.any() or cp.any()):
        return
    h0, mag = h_at_origin()
    if h0 is None:  # A singular: a pole at the origin
        px[cp] = 0
    elif abs(h0) <= ROUNDING * terms * mag:  # H(0) vanishes within its rounding
        zx[cz] = 0


def _info(zeros, poles, gain, w, pairs, n_inf, check_error, dropped=()):
    from ..lti import Rational
    from .info import TransferInfo

    if not math.isfinite(gain):
        raise ComputationError(
            f"transfer function gain is beyond the float range ({len(poles)} poles, "
            f"{len(zeros)} zeros)"
        )
    h = Rational.from_zpk_scaled(np.asarray(zeros, complex), np.asarray(poles, complex), gain, w)
    return TransferInfo(h, pairs, n_inf, check_error, dropped=dropped)
