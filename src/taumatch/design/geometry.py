"""A column's capacitance to earth estimated from its geometry (thin-wire method of moments).

A rough estimate: the whole column is taken as one conductor at one potential over an
earthed plane (a real column's potential rises from the bottom, so its effective ``Ce`` is
of the same order but not equal); prefer a measured value where it matters.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from .ranges import positive

__all__ = ["EPS0", "column_capacitance_geometry"]

EPS0 = 8.8541878128e-12
"""Vacuum permittivity, F/m (CODATA 2018)."""


def column_capacitance_geometry(height: float, diameter: float, base_height: float | None = None,
                                segments: int = 200) -> float:
    """Capacitance to earth [F] of a vertical cylinder above an earthed plane.

    Computed by the thin-wire method of moments (own implementation): uniform line charge on
    each of ``segments`` axial pieces, potential matched on the surface, image charges below
    the plane.

    Parameters
    ----------
    height : float
        Length of the cylinder [m].
    diameter : float
        Its diameter [m] (thin-wire model: ``height`` ≫ ``diameter``).
    base_height : float, optional
        Gap between the plane and the cylinder's lower end [m]; ``None`` means the diameter;
        ``math.inf`` gives the isolated cylinder (no plane).
    segments : int
        Number of axial pieces (10 to 2000).
    """
    h = positive(height, "height")
    a = positive(diameter, "diameter") / 2.0
    if h < 4 * a:
        raise InputError(f"height: thin-wire model needs height >= 2 diameters, got {height!r}")
    if base_height is None:
        g = 2 * a
    elif base_height == math.inf:
        g = math.inf
    else:
        g = float(base_height)
        if not (math.isfinite(g) and g >= 0):
            raise InputError(f"base_height: must be zero or positive, got {base_height!r}")
    m = int(segments)
    if not 10 <= m <= 2000:
        raise InputError(f"segments: must be from 10 to 2000, got {segments!r}")
    # Cosine-spaced edges put short pieces near the ends, where the charge crowds.
    edges = h * (1 - np.cos(np.linspace(0.0, np.pi, m + 1))) / 2
    z1, z2 = edges[:-1], edges[1:]
    zc = (z1 + z2) / 2

    def pot(lo, hi):
        return (np.arcsinh((hi[None, :] - zc[:, None]) / a)
                - np.arcsinh((lo[None, :] - zc[:, None]) / a)) / (4 * np.pi * EPS0)

    P = pot(z1, z2)
    if math.isfinite(g):
        # Image of the piece [g+z1, g+z2] is [-g-z2, -g-z1], charge reversed; measured from
        # the real cylinder's frame (its lower end at 0): [-2g-z2, -2g-z1].
        P = P - pot(-2 * g - z2, -2 * g - z1)
    lam = np.linalg.solve(P, np.ones(m))
    return float(np.sum(lam * (z2 - z1)))
