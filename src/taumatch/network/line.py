"""Transmission-line mathematics: the exact two-port and its lumped pi-section ladder.

A two-conductor line (return on ground) of length ``ell`` with per-metre series impedance
``z = r + j w l`` and shunt admittance ``y = g + j w c`` has (telegrapher's equations; any
transmission-line text, e.g. Pozar, "Microwave Engineering")::

    theta = ell * sqrt(z y),        Z0 = sqrt(z / y) = z ell / theta
    [V1]   [cosh theta       Z0 sinh theta] [V2]
    [I1] = [sinh theta / Z0  cosh theta   ] [I2]

with ``I1`` flowing into the line at port 1 and ``I2`` out of it at port 2.  Its
Y-parameters are ``Y11 = Y22 = 1/(Z0 tanh theta)`` and ``Y12 = Y21 = -1/(Z0 sinh theta)``.

Numerically stable forms used here:

* ``Z0 sinh theta = z ell * sinhc(theta)`` and ``sinh theta / Z0 = y ell * sinhc(theta)``
  with ``sinhc(x) = sinh(x)/x`` (series near 0), so ``w -> 0`` and lossless lines
  (``r = g = 0``) need no special case;
* for ``Re theta >= 20`` the Y-parameters are used, written with ``sech`` and
  ``tanhc(x) = tanh(x)/x`` from ``exp(-theta)``, so a long lossy line never overflows.

The MNA stamp (:mod:`taumatch.network.mna`, rows from :func:`line_rows`) has the two port
currents as unknowns and uses the chain equations, which stay finite even where the
Y-parameters do not exist (a lossless line at DC is a plain wire); beyond ``Re theta = 20``
it switches to the Y-parameter equations, where the chain form would lose port 1.
"""

from __future__ import annotations

import numpy as np

from .elements import Line

__all__ = [
    "line_rows",
    "line_theta",
    "line_twoport",
    "line_y_parameters",
    "line_z0",
]

_SMALL = 1e-3  # below this |theta| the Taylor series are exact to double precision
_LARGE = 20.0  # above this Re(theta) use the cosh-normalised form


def _zy(line: Line, omega):
    w = np.asarray(omega, dtype=float)
    z = line.r + 1j * w * line.l
    y = line.g + 1j * w * line.c
    return z, y


def line_theta(line: Line, omega) -> np.ndarray:
    """Electrical length ``theta = ell * sqrt(z y)`` (principal root, Re >= 0), dimensionless."""
    z, y = _zy(line, omega)
    return line.length * np.sqrt(z * y)


def line_z0(line: Line, omega) -> np.ndarray:
    """Characteristic impedance ``Z0 = sqrt(z / y)`` [ohm] on the branch consistent with theta."""
    z, y = _zy(line, omega)
    theta = line.length * np.sqrt(z * y)
    with np.errstate(divide="ignore", invalid="ignore"):
        z0 = np.where(theta != 0, z * line.length / np.where(theta != 0, theta, 1), np.sqrt(z / y))
    return z0


def _sinhc(x):
    x = np.asarray(x, dtype=complex)
    small = np.abs(x) < _SMALL
    xs = np.where(small, 1.0, x)
    x2 = x * x
    return np.where(small, 1 + x2 / 6 + x2 * x2 / 120, np.sinh(xs) / xs)


def _tanhc(x):
    """``tanh(x)/x`` for Re x >= 0, from exp(-2x) (no overflow)."""
    x = np.asarray(x, dtype=complex)
    small = np.abs(x) < _SMALL
    xs = np.where(small, 1.0, x)
    e2 = np.exp(-2 * xs)
    x2 = x * x
    return np.where(small, 1 - x2 / 3 + 2 * x2 * x2 / 15, (1 - e2) / (1 + e2) / xs)


def _abcd_rows(a, b, c, d):
    """Rows ``V1 - A V2 - B I2 = 0``, ``I1 - C V2 - D I2 = 0`` over ``(V1, V2, I1, I2)``."""
    rows = np.zeros(np.shape(a) + (2, 4), dtype=complex)
    rows[..., 0, 0] = 1
    rows[..., 0, 1] = -a
    rows[..., 0, 3] = -b
    rows[..., 1, 1] = -c
    rows[..., 1, 2] = 1
    rows[..., 1, 3] = -d
    return rows


def _y_rows(y11, y12, y22):
    """Rows ``I1 = Y11 V1 + Y12 V2`` and ``-I2 = Y12 V1 + Y22 V2`` over ``(V1, V2, I1, I2)``."""
    rows = np.zeros(np.shape(y11) + (2, 4), dtype=complex)
    rows[..., 0, 0] = -y11
    rows[..., 0, 1] = -y12
    rows[..., 0, 2] = 1
    rows[..., 1, 0] = -y12
    rows[..., 1, 1] = -y22
    rows[..., 1, 3] = -1
    return rows


def _scaled_power(m, n):
    """``m**n`` for stacked 2x2 matrices as ``(p, logscale)`` with ``m**n = exp(logscale) p``
    and ``max|p| = 1``: binary powering with renormalisation, so that a ladder driven far above
    its cut-off (exponential growth) never overflows."""
    res = np.broadcast_to(np.eye(2, dtype=complex), m.shape).copy()
    lres = np.zeros(m.shape[:-2])
    base = m.copy()
    lbase = np.zeros(m.shape[:-2])
    while n:
        if n & 1:
            res = res @ base
            lres = lres + lbase
            k = np.max(np.abs(res), axis=(-2, -1))
            res = res / k[..., None, None]
            lres = lres + np.log(k)
        n >>= 1
        if n:
            base = base @ base
            lbase = 2 * lbase
            k = np.max(np.abs(base), axis=(-2, -1))
            base = base / k[..., None, None]
            lbase = lbase + np.log(k)
    return res, lres


def _ladder_power(z, y, ell, sections):
    """The ABCD matrix of ``sections`` pi sections of a line of length ``ell`` with per-metre
    ``z`` and ``y``, as ``(matrix, logscale)`` (see :func:`_scaled_power`)."""
    delta = ell / sections
    zs, ys = z * delta, y * delta
    m = np.empty(np.shape(zs) + (2, 2), dtype=complex)
    m[..., 0, 0] = 1 + zs * ys / 2
    m[..., 0, 1] = zs
    m[..., 1, 0] = ys * (1 + zs * ys / 4)
    m[..., 1, 1] = 1 + zs * ys / 2
    return _scaled_power(m, int(sections))


def line_rows(line: Line, omega, sections=None) -> np.ndarray:
    """The two equations a line adds to the MNA system, at angular frequencies ``omega`` [rad/s].

    Unknowns ``(V1, V2, I1, I2)``: port voltages [V], ``I1`` into the line at port 1 and ``I2``
    out of it at port 2 [A].  Returns a complex array of shape ``(len(omega), 2, 4)``.

    The exact line (``sections=None``) uses the chain (ABCD) form where ``Re theta < 20``
    (finite everywhere, also at DC and at lossless quarter-wave points) and the Y-parameter
    form ``Y11 = 1/(z l tanhc theta)``, ``Y12 = -sech(theta) Y11`` beyond (no overflow).
    With ``sections=N`` the same for the ABCD power of ``N`` lumped pi sections (Y form once
    ``|A| > 1e6``).
    """
    omega = np.atleast_1d(np.asarray(omega, dtype=float))
    z, y = _zy(line, omega)
    ell = line.length
    if sections is not None:
        p, logscale = _ladder_power(z, y, ell, sections)
        la = logscale + np.log(np.maximum(np.abs(p[..., 0, 0]), 1e-300))
        big = la > np.log(1e6)
        unscale = np.exp(np.where(big, 0.0, logscale))[..., None, None]
        pu = np.where(big[..., None, None], p, p * unscale)
        a, b, c, d = pu[..., 0, 0], pu[..., 0, 1], pu[..., 1, 0], pu[..., 1, 1]
        out = _abcd_rows(a, b, c, d)
        if np.any(big):
            bb = np.where(big, b, 1.0)
            # true B = exp(logscale) * b: Y11 = D/B and Y22 = A/B are scale free, Y12 = -1/B
            inv_b = np.exp(-np.where(big, logscale, 0.0)) / bb
            out[big] = _y_rows(d / bb, -inv_b, a / bb)[big]
        return out
    theta = ell * np.sqrt(z * y)
    big = theta.real >= _LARGE
    ts = np.where(big, 0, theta)
    sc = _sinhc(ts)
    out = _abcd_rows(np.cosh(ts), z * ell * sc, y * ell * sc, np.cosh(ts))
    if np.any(big):
        tb = np.where(big, theta, 1.0)
        e1 = np.exp(-tb)
        y11 = 1 / (z * ell * _tanhc(tb))
        sech = 2 * e1 / (1 + e1 * e1)
        out[big] = _y_rows(y11, -sech * y11, y11)[big]
    return out


def line_y_parameters(line: Line, freqs):
    """Exact Y-parameters ``(Y11, Y12)`` [S] of the line at ``freqs`` [Hz] (``Y22 = Y11``,
    ``Y21 = Y12``).

    ``Y11 = 1/(Z0 tanh theta) = 1/(z l tanhc theta)`` and
    ``Y12 = -1/(Z0 sinh theta) = -1/(z l sinhc theta)``; ``inf`` where the line is a short
    (lossless at DC), 0 where ``tanh`` or ``sinh`` is infinite.
    """
    omega = 2 * np.pi * np.asarray(freqs, dtype=float)
    z, y = _zy(line, omega)
    theta = line.length * np.sqrt(z * y)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        y11 = 1 / (z * line.length * _tanhc(theta))
        y12 = -1 / (z * line.length * _sinhc(theta))
    return y11, y12


def line_twoport(line: Line, s, sections=None):
    """The line as a symmetric two-port at complex frequencies ``s`` [rad/s], normalised.

    Returns ``(p, q, inv_a)`` with ``p = B/A``, ``q = C/A`` and ``inv_a = 1/A`` of the chain
    (ABCD) matrix (``A = D``): for the exact line ``p = Z0 tanh theta = z l tanhc theta``,
    ``q = tanh theta / Z0 = y l tanhc theta`` and ``inv_a = sech theta``, all bounded for any
    ``Re theta >= 0``; with ``sections=N`` the same ratios of the ladder's ABCD power.  A load
    ``Z`` at port 2 is seen at port 1 as ``(Z + p) / (q Z + 1)``, and ``V2 / V1 =
    inv_a Z / (Z + p)``.  ``z = r + s l``, ``y = g + s c`` per metre.
    """
    s = np.atleast_1d(np.asarray(s, dtype=complex))
    z = line.r + s * line.l
    y = line.g + s * line.c
    ell = line.length
    if sections is not None:
        pw, logscale = _ladder_power(z, y, ell, sections)
        a = pw[..., 0, 0]
        with np.errstate(under="ignore"):
            inv_a = np.exp(-logscale) / a
        return pw[..., 0, 1] / a, pw[..., 1, 0] / a, inv_a
    theta = ell * np.sqrt(z * y)
    theta = np.where(theta.real < 0, -theta, theta)
    with np.errstate(under="ignore", invalid="ignore", divide="ignore"):
        e1 = np.exp(-theta)
        e2 = e1 * e1
        tc = (1 - e2) / (1 + e2) / theta  # tanh(theta)/theta, no overflow for Re >= 0
    small = np.abs(theta) < _SMALL
    if np.any(small):
        x2 = theta[small] ** 2
        tc[small] = 1 - x2 / 3 + 2 * x2 * x2 / 15
    return z * ell * tc, y * ell * tc, 2 * e1 / (1 + e2)
