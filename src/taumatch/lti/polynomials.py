"""Polynomial roots and products done with care for probe chains.

Probe chains mix nanosecond and millisecond time constants, so every routine here
scales the variable before it builds or factors a polynomial, takes roots at the
origin out exactly, and treats a cluster of roots that is indistinguishable from a
multiple root at working precision as that multiple root (the backward-error test of
:func:`merge_clusters`).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["Cluster", "characteristic_scale", "evaluate_zpk", "merge_clusters", "poly_from_roots", "roots"]

#: Backward-error bound for merging a cluster of roots into one multiple root: the
#: merge may change the monic local factor prod(x - r_i) (x scaled by the cluster's
#: magnitude) by no more than this in any coefficient.  A double root split by an
#: eigenvalue solver differs by ~1e-16, two roots 1e-6 apart (relative) by 2.5e-13.
MERGE_TOL = 2e-14


def characteristic_scale(*arrays) -> float:
    """Geometric mean of the non-zero magnitudes in ``arrays`` (1.0 when there are none)."""
    mags = [np.abs(np.asarray(a, dtype=complex)) for a in arrays if np.size(a)]
    if not mags:
        return 1.0
    m = np.concatenate(mags)
    m = m[m > 0]
    if m.size == 0:
        return 1.0
    return float(np.exp(np.mean(np.log(m))))


def poly_from_roots(r, scale: float = 1.0) -> np.ndarray:
    """Coefficients (highest power first) of prod(x - r_i/scale); real when r is conjugate-symmetric."""
    r = np.asarray(r, dtype=complex) / scale
    c = np.array([1.0 + 0j])
    for ri in r:
        c = np.convolve(c, [1.0, -ri])
    if np.all(np.abs(c.imag) <= 1e-12 * np.maximum(np.abs(c.real), 1e-300)) or _is_conj_symmetric(r):
        return c.real.copy()
    return c


def evaluate_zpk(s, gain, zeros, poles, w0: float = 1.0, renormalise: bool = False):
    """gain·Π((s − z)/w0)/Π((s − p)/w0) at complex s, zero-pole pairs first.

    With ``renormalise`` the running product is held as a mantissa and a power of two, so no
    intermediate overflows or underflows (slower; for the points where the plain product
    did)."""
    out = np.full(s.shape, gain, dtype=complex)
    expo = np.zeros(s.shape, dtype=np.int64)
    n = min(zeros.size, poles.size)
    factors = ([((s - zeros[i]) / (s - poles[i]) for i in range(n)),
                ((s - zk) / w0 for zk in zeros[n:]), (w0 / (s - pk) for pk in poles[n:])])
    k = 0
    for group in factors:
        for f in group:
            out *= f
            k += 1
            if renormalise and k % 4 == 0:
                _, e = np.frexp(np.abs(out))
                out *= np.ldexp(1.0, -e)
                expo += e
    if renormalise:
        out = np.ldexp(out.real, expo) + 1j * np.ldexp(out.imag, expo)
    return out


def _is_conj_symmetric(r, rtol: float = 1e-9) -> bool:
    r = np.asarray(r, dtype=complex)
    upper = np.sort_complex(r[r.imag > 0])
    lower = np.sort_complex(np.conj(r[r.imag < 0]))
    if upper.size != lower.size:
        return False
    return bool(np.all(np.abs(upper - lower) <= rtol * np.maximum(np.abs(upper), 1e-300)))


def roots(coeffs) -> np.ndarray:
    """Roots of a real polynomial (highest power first), scaled and with clusters merged.

    Roots at the origin are taken out exactly; the rest come from the eigenvalues of the
    balanced companion matrix of the scaled polynomial.  A group of roots that is a
    multiple root at working precision is returned as that root repeated.
    """
    c = np.atleast_1d(np.asarray(coeffs, dtype=float))
    nz = np.flatnonzero(c)
    if nz.size == 0:
        return np.zeros(0, dtype=complex)
    c = c[nz[0]: nz[-1] + 1]
    n_origin = int(np.size(coeffs) - 1 - nz[-1])  # trailing zero coefficients: roots at 0
    deg = c.size - 1
    if deg == 0:
        return np.zeros(n_origin, dtype=complex)
    # scale x = w * y so that the constant and leading coefficients have equal magnitude
    # (in logarithms: neither the ratio nor the powers may overflow)
    log_w = (math.log(abs(c[-1])) - math.log(abs(c[0]))) / deg
    w = math.exp(log_w)
    k = np.arange(deg, -1, -1)
    with np.errstate(divide="ignore", over="ignore", under="ignore", invalid="ignore"):
        logs = np.log(np.abs(c)) + k * log_w
        cs = np.sign(c) * np.exp(logs - logs[0])  # cs[0] = ±1
        cs = cs * np.sign(c[0])
    if not (np.all(np.isfinite(cs)) and 0 < w < math.inf):
        from ..errors import ComputationError

        raise ComputationError("polynomial roots: its coefficients span beyond the float range "
                               "even after scaling")
    if deg == 1:
        found = np.array([-cs[1]], dtype=complex)
    elif deg == 2:
        found = _quadratic(1.0, cs[1], cs[2])
    else:
        comp = np.zeros((deg, deg))
        comp[0, :] = -cs[1:]
        comp[1:, :-1] = np.eye(deg - 1)
        found = np.linalg.eigvals(comp).astype(complex)
    found = _symmetrize(found)
    merged = []
    for cl in merge_clusters(found):
        if cl.multiplicity == 1 and deg > 2:
            center = _polish(cs, np.array([cl.center]))[0]
        else:
            center = cl.center
        merged.extend([center] * cl.multiplicity)
    merged = _symmetrize(np.array(merged, dtype=complex)) * w
    out = np.concatenate([merged, np.zeros(n_origin, dtype=complex)])
    return out


def _quadratic(a: float, b: float, c: float) -> np.ndarray:
    """Both roots of a x^2 + b x + c without cancellation."""
    disc = b * b - 4 * a * c
    if disc >= 0:
        q = -0.5 * (b + math.copysign(math.sqrt(disc), b if b != 0 else 1.0))
        r1 = q / a
        r2 = c / q if q != 0 else -b / a - r1
        return np.array([r1, r2], dtype=complex)
    re = -b / (2 * a)
    im = math.sqrt(-disc) / (2 * a)
    return np.array([re + 1j * im, re - 1j * im])


def _polish(cs, r, steps: int = 2) -> np.ndarray:
    """A few Newton steps on isolated roots (left alone where the derivative is tiny)."""
    dcs = np.polyder(cs)
    r = r.copy()
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        for _ in range(steps):  # a high degree may overflow polyval far out: no step there
            f = np.polyval(cs, r)
            d = np.polyval(dcs, r)
            ok = (np.abs(d) > 0) & np.isfinite(f) & np.isfinite(d)
            step = np.where(ok, f / np.where(ok, d, 1.0), 0.0)
            small = np.isfinite(step) & (np.abs(step) < 1e-3 * np.maximum(np.abs(r), 1e-300))
            r = np.where(ok & small, r - step, r)
    return r


def _symmetrize(r) -> np.ndarray:
    """Make a nearly conjugate-symmetric set exactly so; snap tiny imaginary parts to zero."""
    r = np.asarray(r, dtype=complex) + 0.0  # copy, and -0.0 becomes 0.0
    r = np.where(r.real == 0, 0.0 + 1j * r.imag, r) if r.size else r
    r = np.where(r.imag == 0, r.real + 0j, r) if r.size else r
    mag = np.maximum(np.abs(r), 1e-300)
    r[np.abs(r.imag) <= 1e-14 * mag] = r[np.abs(r.imag) <= 1e-14 * mag].real
    up = np.flatnonzero(r.imag > 0)
    lo = list(np.flatnonzero(r.imag < 0))
    for i in up:
        if not lo:
            break
        j = min(lo, key=lambda jj: abs(r[jj] - np.conj(r[i])))
        if abs(r[j] - np.conj(r[i])) <= 1e-6 * abs(r[i]):
            avg = 0.5 * (r[i] + np.conj(r[j]))
            r[i], r[j] = avg, np.conj(avg)
            lo.remove(j)
    return r


class Cluster:
    """A group of roots treated as one root of the given multiplicity."""

    __slots__ = ("center", "members", "merged", "multiplicity")

    def __init__(self, center, members, merged: bool):
        self.center = complex(center)
        self.members = np.asarray(members, dtype=complex)
        self.multiplicity = int(self.members.size)
        self.merged = bool(merged)

    @property
    def spread(self) -> float:
        """Largest distance of a member from the centre, relative to the centre's magnitude."""
        if self.multiplicity < 2:
            return 0.0
        return float(np.max(np.abs(self.members - self.center)) / max(abs(self.center), 1e-300))

    def __repr__(self):  # pragma: no cover - debugging aid
        return f"Cluster({self.center}, m={self.multiplicity}, merged={self.merged})"


def _backward_error(members, center) -> float:
    """Largest coefficient change of the local factor when all members move to the centre."""
    scale = max(abs(center), float(np.max(np.abs(members))), 1e-300)
    exact = poly_from_roots(members - center, scale)  # prod(y - d_i), d_i = (r_i - c)/scale
    exact = np.asarray(exact, dtype=complex)
    return float(np.max(np.abs(exact[1:])))  # merged factor is y^m: all lower coefficients 0


def merge_clusters(r, tol: float = MERGE_TOL) -> list[Cluster]:
    """Group roots into clusters: exact repeats, and groups that pass the backward-error test.

    Parameters
    ----------
    r : array_like of complex
        The roots (poles or zeros).
    tol : float
        Backward-error bound (see :data:`MERGE_TOL`).

    Returns
    -------
    list of Cluster
        Each distinct root (or merged group) once, with its multiplicity.
    """
    r = np.asarray(r, dtype=complex)
    if r.size == 0:
        return []
    # exact repeats first
    uniq, inverse = np.unique(r, return_inverse=True)
    groups = [list(np.flatnonzero(inverse == k)) for k in range(uniq.size)]
    centers = list(uniq)
    # candidate neighbours (vectorised): only pairs closer than the coarsest radius
    if uniq.size > 1:
        dist = np.abs(uniq[:, None] - uniq[None, :])
        scale = np.maximum(np.abs(uniq)[:, None], np.abs(uniq)[None, :])
        scale = np.maximum(scale, 1e-300)
        near = np.argwhere(np.triu(dist <= 1e-3 * scale, k=1))
    else:
        near = np.zeros((0, 2), dtype=int)
    if near.size:
        alive = [True] * len(groups)
        # each root's candidate neighbours, in the order of the pairs (one pass: a ladder of
        # hundreds of close poles has tens of thousands of pairs)
        neighbours: dict = {}
        for i, j in near.tolist():
            neighbours.setdefault(i, []).append(j)
            neighbours.setdefault(j, []).append(i)
        for radius in (1e-3, 1e-5, 1e-7, 1e-9):
            for a in sorted(neighbours):
                if not alive[a]:
                    continue
                comp = [a]
                for b in neighbours[a]:
                    if not alive[b] or b in comp:
                        continue
                    sc = max(abs(centers[a]), abs(centers[b]), 1e-300)
                    if abs(centers[a] - centers[b]) <= radius * sc:
                        comp.append(b)
                if len(comp) < 2:
                    continue
                members = np.concatenate([r[groups[c]] for c in comp])
                center = members.mean()
                if (members.imag != 0).any() and abs(center.imag) < 1e-12 * abs(center):
                    center = complex(center.real, 0.0)
                if _backward_error(members, center) <= tol:
                    groups[a] = [i for c in comp for i in groups[c]]
                    centers[a] = center
                    for c in comp[1:]:
                        alive[c] = False
                        groups[c] = []
    clusters: list[Cluster] = []
    for g, c in zip(groups, centers):
        if not g:
            continue
        members = r[g]
        merged = bool(np.any(members != members[0]))
        clusters.append(Cluster(c if merged else members[0], members, merged))
    return clusters
