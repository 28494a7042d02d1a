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
* for ``Re theta >= 20`` the chain equations are divided by ``cosh theta`` and written with
  ``sech`` and ``tanh`` from ``exp(-theta)``, so a long lossy line never overflows.

The MNA stamp (:mod:`taumatch.network.mna`) uses these chain equations with the two port
currents as unknowns, which stays finite even where the Y-parameters do not exist (a
lossless line at DC is a plain wire).
"""

from __future__ import annotations

import numpy as np

from .elements import Line

__all__ = [
    "chain_coefficients",
    "ladder_chain_coefficients",
    "line_theta",
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


def chain_coefficients(line: Line, omega):
    """Scaled chain (ABCD) coefficients of the exact line at angular frequencies ``omega`` [rad/s].

    Returns
    -------
    alpha, a, b, c, d : complex ndarrays
        The line obeys ``alpha*V1 = a*V2 + b*I2`` and ``alpha*I1 = c*V2 + d*I2``;
        ``alpha = 1`` and ``(a, b, c, d)`` the ABCD matrix where ``Re theta < 20``,
        otherwise everything divided by ``cosh theta`` (``alpha = sech theta``).
    """
    z, y = _zy(line, omega)
    ell = line.length
    theta = ell * np.sqrt(z * y)
    big = theta.real >= _LARGE
    tb = np.where(big, theta, 0)  # evaluated only where safe
    ts = np.where(big, 0, theta)
    # ordinary form
    ch = np.cosh(ts)
    sc = _sinhc(ts)
    a_o, b_o, c_o = ch, z * ell * sc, y * ell * sc
    # cosh-normalised form
    e1 = np.exp(-tb)
    e2 = e1 * e1
    sech = 2 * e1 / (1 + e2)
    tc = _tanhc(np.where(big, tb, 1.0))
    b_n, c_n = z * ell * tc, y * ell * tc
    alpha = np.where(big, sech, 1.0 + 0j)
    a = np.where(big, 1.0 + 0j, a_o)
    b = np.where(big, b_n, b_o)
    c = np.where(big, c_n, c_o)
    return alpha, a, b, c, a


def ladder_chain_coefficients(line: Line, omega, sections: int):
    """Chain coefficients (as :func:`chain_coefficients`) of ``sections`` lumped pi sections.

    Each section of length ``delta = length/sections`` has series ``(r + j w l) delta`` and
    ``(g + j w c) delta / 2`` shunt at each end; the ladder is the matrix power of one
    section's ABCD matrix, exactly the network :func:`taumatch.network.mna.build` stamps.
    """
    z, y = _zy(line, omega)
    delta = line.length / sections
    zs = z * delta
    ys = y * delta
    m = np.empty(np.shape(zs) + (2, 2), dtype=complex)
    m[..., 0, 0] = 1 + zs * ys / 2
    m[..., 0, 1] = zs
    m[..., 1, 0] = ys * (1 + zs * ys / 4)
    m[..., 1, 1] = 1 + zs * ys / 2
    p = np.linalg.matrix_power(m, int(sections))
    scale = np.maximum(1.0, np.abs(p[..., 0, 0]))
    return 1.0 / scale + 0j, p[..., 0, 0] / scale, p[..., 0, 1] / scale, p[..., 1, 0] / scale, (
        p[..., 1, 1] / scale
    )


def line_y_parameters(line: Line, freqs):
    """Exact Y-parameters ``(Y11, Y12)`` [S] of the line at ``freqs`` [Hz] (``Y22 = Y11``,
    ``Y21 = Y12``).

    ``Y11 = 1/(Z0 tanh theta)``, ``Y12 = -1/(Z0 sinh theta)``, evaluated as
    ``d/b`` and ``-alpha**2 / (alpha*b)`` from :func:`chain_coefficients` (reciprocal line:
    ``AD - BC = 1``).  Infinite where the line is a short (lossless at DC).
    """
    omega = 2 * np.pi * np.asarray(freqs, dtype=float)
    alpha, _, b, _, d = chain_coefficients(line, omega)
    with np.errstate(divide="ignore", invalid="ignore"):
        y11 = d / b
        y12 = -alpha / b
    return y11, y12
