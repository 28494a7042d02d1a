"""High-voltage resistor columns: string sizing, stray capacitance, grading and response.

A tall resistor column of total resistance ``R`` has a capacitance ``Ce`` to earth spread
along its length.  Into a small bottom arm it behaves like a uniform RC line:

* transfer function (normalised to its dc value) ``H(s) = √(sRCe) / sinh √(sRCe)``;
* unit step ``g(t) = 1 + 2 Σ_{k≥1} (−1)^k exp(−k²π² t/(R Ce))``;
* response time ``T = ∫(1 − g) dt = R·Ce/6`` and 10–90 % rise ≈ 0.237·R·Ce

(Kuffel, Zaengl & Kuffel, "High Voltage Engineering: Fundamentals", from memory; the
results are re-derived and checked numerically in the tests).  A series (grading)
capacitance ``Cs`` across the column makes the high-frequency voltage distribution
``v(x)/V = sinh(αx)/sinh α`` with ``α = √(Ce/Cs)`` and ``x`` measured from the earthed
end, so a flat response needs ``Cs ≫ Ce``.

Everything here is SI: ohm, farad, volt, watt, joule, second.

Examples
--------
>>> round(response_time_ungraded(100e6, 10e-12) * 1e6, 1)
166.7
>>> round(float(grading_distribution(0.5, 1.0)), 3)
0.443
>>> dissipation(10e3, 100e6)
1.0
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import InputError

__all__ = [
    "DEFAULT_VOLTAGE_MARGIN",
    "EPS0",
    "column_capacitance_geometry",
    "column_response",
    "dissipation",
    "divider_column_response",
    "grading_capacitance",
    "grading_distribution",
    "hf_capacitance_ratio",
    "ladder_rational",
    "ladder_response",
    "ladder_step",
    "midpoint_error",
    "response_time",
    "response_time_ungraded",
    "rise_time_ungraded",
    "step_series",
    "stored_energy",
    "string_count",
]

EPS0 = 8.8541878128e-12
"""Vacuum permittivity, F/m (CODATA 2018)."""

DEFAULT_VOLTAGE_MARGIN = 0.5
"""Each resistor works at no more than this fraction of its limiting voltage (and of its
power rating).  Common practice, no source: half the rating leaves room for one shorted
element, transients and the uneven sharing of a real column."""


def _pos(value, field):
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(f"{field}: expected a number, got {value!r}")
    if not (math.isfinite(v) and v > 0):
        raise InputError(f"{field}: must be positive and finite, got {value!r}")
    return v


def _nonneg(value, field):
    v = float(value)
    if not (math.isfinite(v) and v >= 0):
        raise InputError(f"{field}: must be zero or positive, got {value!r}")
    return v


# ---------------------------------------------------------------- ratings
def string_count(voltage: float, limiting_voltage: float, margin: float = DEFAULT_VOLTAGE_MARGIN,
                 resistance: float | None = None, power_rating: float | None = None) -> int:
    """Number of equal resistors a string needs to share ``voltage``.

    Parameters
    ----------
    voltage : float
        Peak working voltage across the string, V.
    limiting_voltage : float
        Each resistor's limiting element voltage, V.
    margin : float
        Fraction (0, 1] of the limiting voltage and power rating each element may use.
    resistance : float, optional
        Total string resistance, ohm (needed with ``power_rating``).
    power_rating : float, optional
        Each resistor's rated power, W.  Dissipation is taken as ``V²/R`` with the peak
        voltage (the dc worst case).

    Returns
    -------
    int
        At least 1.
    """
    voltage = _pos(voltage, "voltage")
    limiting_voltage = _pos(limiting_voltage, "limiting_voltage")
    margin = float(margin)
    if not 0 < margin <= 1:
        raise InputError(f"margin: must be in (0, 1], got {margin!r}")
    n = math.ceil(voltage / (limiting_voltage * margin) * (1 - 1e-12))
    if power_rating is not None:
        if resistance is None:
            raise InputError("resistance: needed together with power_rating")
        total = dissipation(voltage, resistance)
        # n equal elements each dissipate total/n.
        n = max(n, math.ceil(total / (_pos(power_rating, "power_rating") * margin) * (1 - 1e-12)))
    return max(int(n), 1)


def dissipation(voltage: float, resistance: float) -> float:
    """Power ``V²/R`` in W for ``voltage`` (V, dc or rms) across ``resistance`` (ohm)."""
    return float(voltage) ** 2 / _pos(resistance, "resistance")


def stored_energy(capacitance: float, voltage: float) -> float:
    """Energy ``½CV²`` in J held by ``capacitance`` (F) charged to ``voltage`` (V)."""
    return 0.5 * _nonneg(capacitance, "capacitance") * float(voltage) ** 2


# ---------------------------------------------------------------- distributed column
def _z_over_sinh(z):
    """z / sinh z for complex z with Re z >= 0, without overflow."""
    z = np.asarray(z, dtype=complex)
    out = np.ones_like(z)
    small = np.abs(z) < 1.0
    nz = small & (z != 0)
    out[nz] = z[nz] / np.sinh(z[nz])
    big = ~small
    zb = z[big]
    out[big] = 2.0 * zb * np.exp(-zb) / (-np.expm1(-2.0 * zb))
    return out


def column_response(s, resistance: float, earth_capacitance: float):
    """Normalised response of an ungraded column, ``√(sRCe)/sinh √(sRCe)``.

    Parameters
    ----------
    s : complex or array
        Laplace variable, rad/s (``2j*pi*f`` on the frequency axis).
    resistance : float
        Total column resistance R, ohm.
    earth_capacitance : float
        Total capacitance to earth Ce, F, spread uniformly.
    """
    x = np.asarray(s, dtype=complex) * _pos(resistance, "resistance") * _nonneg(
        earth_capacitance, "earth_capacitance")
    return _z_over_sinh(np.sqrt(x))


def divider_column_response(s, r1: float, c1: float, r2: float, c2: float,
                            earth_capacitance: float):
    """Exact transfer of a uniform RC column (R1 ∥ C1 spread evenly) into a bottom arm R2 ∥ C2.

    The column is a uniform line with series impedance ``z = R1/(1 + s R1 C1)`` and shunt
    admittance ``y = s Ce`` (totals over its length); with ``γ = √(z y)`` its ABCD matrix
    is ``[[cosh γ, z sinh γ / γ], [y sinh γ / γ, cosh γ]]``, so
    ``H = 1 / (cosh γ + (z/Z2) sinh γ / γ)`` with ``Z2 = R2/(1 + s R2 C2)``.

    Parameters
    ----------
    s : complex or array
        Laplace variable, rad/s.
    r1, c1 : float
        Column resistance (ohm) and its total series (grading) capacitance (F, may be 0).
    r2, c2 : float
        Bottom arm resistance (ohm) and capacitance (F).
    earth_capacitance : float
        Total capacitance from the column to earth, F (0 gives the lumped divider).
    """
    s = np.asarray(s, dtype=complex)
    z = r1 / (1.0 + s * r1 * c1)
    ratio = z * (1.0 + s * r2 * c2) / r2
    g = np.sqrt(z * s * earth_capacitance)
    out = np.empty(np.broadcast(s, g).shape, dtype=complex)
    g = np.broadcast_to(g, out.shape)
    ratio = np.broadcast_to(ratio, out.shape)
    small = np.abs(g) < 1.0
    gs = g[small]
    with np.errstate(invalid="ignore", divide="ignore"):
        shc = np.where(gs == 0, 1.0, np.sinh(gs) / np.where(gs == 0, 1.0, gs))
    out[small] = 1.0 / (np.cosh(gs) + ratio[small] * shc)
    gb, rb = g[~small], ratio[~small]
    e2 = np.exp(-2.0 * gb)
    out[~small] = 2.0 * np.exp(-gb) / ((1.0 + e2) + rb * (-np.expm1(-2.0 * gb)) / gb)
    return out


def hf_capacitance_ratio(dc_ratio: float, c1: float, earth_capacitance: float) -> float:
    """Bottom-to-top capacitance C2/C1 that makes a graded column's hf gain equal its dc gain.

    At high frequency the column is a ladder of C1 (series) and Ce (to earth), whose gain
    into C2 is ``1/(cosh α + (C2/C1) sinh α/α)`` with ``α = √(Ce/C1)``.  Setting it equal
    to ``1/dc_ratio`` gives ``C2/C1 = (dc_ratio − cosh α)·α/sinh α``; with ``Ce = 0`` this
    is the lumped ``R1/R2 = dc_ratio − 1``.

    Parameters
    ----------
    dc_ratio : float
        (R1 + R2)/R2, dimensionless.
    c1 : float
        Total series capacitance of the column, F.
    earth_capacitance : float
        Total capacitance to earth, F.
    """
    a2 = np.asarray(earth_capacitance, dtype=float) / np.asarray(c1, dtype=float)
    a = np.sqrt(a2)
    with np.errstate(invalid="ignore", divide="ignore"):
        ash = np.where(a > 1e-4, a / np.sinh(np.where(a > 1e-4, a, 1.0)), 1.0 - a2 / 6.0)
    ch = np.cosh(a)
    return (np.asarray(dc_ratio, dtype=float) - ch) * ash


# ---------------------------------------------------------------- lumped ladder
def _check_sections(sections):
    n = int(sections)
    if n < 1 or n != sections:
        raise InputError(f"sections: must be a whole number >= 1, got {sections!r}")
    return n


def ladder_response(s, r1: float, c1: float, r2: float, c2: float, earth_capacitance: float,
                    sections: int):
    """Transfer of the N-section lumped ladder model of the column into R2 ∥ C2.

    Each section is ``R1/N`` in parallel with ``N·C1``; the earth capacitance ``Ce/N`` of a
    section sits at each junction, half of it at the two ends (the half at the driven top
    end has no effect).  Evaluated by cascading ABCD matrices at each ``s`` (rad/s).
    """
    n = _check_sections(sections)
    s = np.asarray(s, dtype=complex)
    zs = (r1 / n) / (1.0 + s * r1 * c1)
    y_node = s * earth_capacitance / n
    v = np.ones_like(s)
    i = v * (s * earth_capacitance / (2 * n) + (1.0 + s * r2 * c2) / r2)
    for k in range(n):
        v = v + zs * i
        if k < n - 1:
            i = i + y_node * v
    return 1.0 / v


def _ladder_mna(r1, c1, r2, c2, earth_capacitance, n):
    """Node matrices G, C and source vectors for the ladder: (G + sC) v = (bg + s bc) u."""
    g0, cs = n / r1, n * c1
    ce = earth_capacitance / n
    G = np.zeros((n, n))
    C = np.zeros((n, n))
    for k in range(n):              # element between node k-1 and node k (node -1 = source)
        G[k, k] += g0
        C[k, k] += cs
        if k > 0:
            G[k - 1, k - 1] += g0
            C[k - 1, k - 1] += cs
            G[k, k - 1] = G[k - 1, k] = -g0
            C[k, k - 1] = C[k - 1, k] = -cs
    for k in range(n - 1):
        C[k, k] += ce
    C[n - 1, n - 1] += ce / 2 + c2
    G[n - 1, n - 1] += 1.0 / r2
    bg = np.zeros(n)
    bc = np.zeros(n)
    bg[0], bc[0] = g0, cs
    return G, C, bg, bc


def ladder_step(t, r1: float, c1: float, r2: float, c2: float, earth_capacitance: float,
                sections: int):
    """Unit-step response of the N-section ladder, by its modes (symmetric eigenproblem).

    Parameters
    ----------
    t : float or array
        Time after the step, s.
    r1, c1, r2, c2, earth_capacitance, sections
        As in :func:`ladder_response`.

    Returns
    -------
    ndarray
        Output voltage for a 1 V step (not normalised; the final value is R2/(R1+R2)).
    """
    from scipy.linalg import eigh

    n = _check_sections(sections)
    G, C, bg, bc = _ladder_mna(r1, c1, r2, c2, earth_capacitance, n)
    v_inf = np.linalg.solve(G, bg)
    v0 = np.linalg.solve(C, bc)           # charge sharing at the instant of the step
    lam, phi = eigh(G, C)                 # phi.T @ C @ phi = I
    coef = phi.T @ (C @ (v0 - v_inf))
    t = np.asarray(t, dtype=float)
    modes = np.exp(-np.multiply.outer(t, lam))  # (..., n)
    return v_inf[-1] + modes @ (phi[-1, :] * coef)


def ladder_rational(r1: float, c1: float, r2: float, c2: float, earth_capacitance: float,
                    sections: int):
    """The ladder's transfer function as a :class:`taumatch.lti.Rational`.

    Poles from the symmetric eigenproblem of the node equations, zeros from the finite
    generalized eigenvalues of the system matrix ``[[G + sC, b(s)], [c, 0]]`` (no
    polynomial roots), gain matched at one frequency.
    """
    from scipy.linalg import eig, eigh

    from ..lti import Rational

    n = _check_sections(sections)
    G, C, bg, bc = _ladder_mna(r1, c1, r2, c2, earth_capacitance, n)
    poles = -eigh(G, C, eigvals_only=True)
    A = np.zeros((n + 1, n + 1))
    B = np.zeros((n + 1, n + 1))
    A[:n, :n], B[:n, :n] = G, C
    A[:n, n], B[:n, n] = bg, bc
    A[n, n - 1] = 1.0
    w = eig(A, -B, right=False)
    zeros = w[np.isfinite(w) & (np.abs(w) < 1e6 * np.max(np.abs(poles)))]
    zeros = np.real_if_close(zeros, tol=1e6)
    s0 = 1j * np.median(np.abs(poles))
    h0 = ladder_response(s0, r1, c1, r2, c2, earth_capacitance, n)
    shape = np.prod(s0 - zeros) / np.prod(s0 - poles)
    gain = float(np.real(h0 / shape))
    return Rational.from_zpk(np.asarray(zeros, dtype=complex), poles.astype(complex), gain)


# ---------------------------------------------------------------- step and timing
def step_series(t, resistance: float, earth_capacitance: float):
    """Normalised unit step of the ungraded column, ``1 + 2 Σ (−1)^k exp(−k²π² t/(R Ce))``.

    For small ``τ = t/(R Ce)`` the equal dual form ``(2/√(πτ)) Σ_{n≥0} exp(−(n + ½)²/τ)``
    (Poisson summation, own derivation) is used, so both ends converge in a few terms.

    Parameters
    ----------
    t : float or array
        Time after the step, s (negative times give 0).
    resistance, earth_capacitance : float
        Column totals R (ohm) and Ce (F).
    """
    rc = _pos(resistance, "resistance") * _pos(earth_capacitance, "earth_capacitance")
    tau = np.asarray(t, dtype=float) / rc
    out = np.zeros_like(tau)
    late = tau >= 0.25
    if np.any(late):
        k = np.arange(1, 30)
        ta = tau[late][..., None]
        out[late] = 1.0 + 2.0 * np.sum((-1.0) ** k * np.exp(-(k * np.pi) ** 2 * ta), axis=-1)
    early = (tau > 0) & ~late
    if np.any(early):
        m = np.arange(0, 30) + 0.5
        te = tau[early][..., None]
        out[early] = 2.0 / np.sqrt(np.pi * te[..., 0]) * np.sum(np.exp(-m ** 2 / te), axis=-1)
    return out


def response_time_ungraded(resistance: float, earth_capacitance: float) -> float:
    """``T = R·Ce/6``, s: the area between the ideal and the actual normalised step."""
    return _pos(resistance, "resistance") * _nonneg(earth_capacitance, "earth_capacitance") / 6.0


def rise_time_ungraded(resistance: float, earth_capacitance: float) -> float:
    """10–90 % transition duration of the ungraded column's step, s (≈ 0.237·R·Ce)."""
    from scipy.optimize import brentq

    rc = _pos(resistance, "resistance") * _pos(earth_capacitance, "earth_capacitance")
    def crossing(level):
        return brentq(lambda x: float(step_series(x * rc, 1.0, rc)[()]) - level, 1e-4, 10.0,
                      xtol=1e-14)

    return (crossing(0.9) - crossing(0.1)) * rc


def response_time(h, time_scale: float) -> float:
    """Response time ``T = −d/ds [H(s)/H(0)]`` at s = 0, s, of any response callable ``h(s)``.

    ``T`` equals the area between the unit step and the normalised step response (final
    value theorem); it is 0 for a perfectly compensated divider and negative for an
    over-compensated one.

    Parameters
    ----------
    h : callable
        ``h(s)`` for complex ``s`` in rad/s.
    time_scale : float
        A time of the order of the response's longest time constant, s.
    """
    w = 1e-5 / _pos(time_scale, "time_scale")
    h0 = complex(np.asarray(h(np.array([1e-3 * w * 1j])))[0])
    hw = complex(np.asarray(h(np.array([w * 1j])))[0])
    return -((hw / h0.real).imag) / w


# ---------------------------------------------------------------- grading
def grading_distribution(x, ce_over_cs: float):
    """Fraction of the applied voltage at position ``x`` (0 = earthed end, 1 = top).

    ``v(x)/V = sinh(αx)/sinh α`` with ``α = √(Ce/Cs)`` (high-frequency limit of a graded
    column; own derivation from the capacitive ladder's line equation).
    """
    ratio = _nonneg(ce_over_cs, "ce_over_cs")
    x = np.asarray(x, dtype=float)
    if ratio == 0:
        return x.copy()
    a = math.sqrt(ratio)
    return np.sinh(a * x) / math.sinh(a)


def midpoint_error(ce_over_cs: float) -> float:
    """Relative shortfall of the midpoint voltage, ``1 − v(½)/(V/2)``."""
    return 1.0 - 2.0 * float(grading_distribution(0.5, ce_over_cs))


def grading_capacitance(earth_capacitance: float, limit: float = 0.01) -> float:
    """Smallest total series capacitance Cs (F) with midpoint error at most ``limit``.

    Parameters
    ----------
    earth_capacitance : float
        Total capacitance of the column to earth, F.
    limit : float
        Allowed relative shortfall of the midpoint voltage (0.01 = 1 %).
    """
    from scipy.optimize import brentq

    ce = _pos(earth_capacitance, "earth_capacitance")
    limit = float(limit)
    if not 0 < limit < 1:
        raise InputError(f"limit: must be between 0 and 1 (a fraction), got {limit!r}")
    ratio = brentq(lambda r: midpoint_error(r) - limit, 1e-12, 1e4, xtol=1e-15, rtol=1e-12)
    return ce / ratio


# ---------------------------------------------------------------- geometry
def column_capacitance_geometry(height: float, diameter: float, base_height: float | None = None,
                                segments: int = 200) -> float:
    """Capacitance to earth of a vertical cylinder above an earthed plane, F.

    A rough estimate of a column's ``Ce``: the whole cylinder is taken at one potential
    (a real column's potential rises from the bottom, so its effective ``Ce`` is of the
    same order but not equal; prefer a measured value).  Computed by the thin-wire
    method of moments (own implementation): uniform line charge on each of ``segments``
    axial pieces, potential matched on the surface, image charges below the plane.

    Parameters
    ----------
    height : float
        Length of the cylinder, m.
    diameter : float
        Its diameter, m (thin-wire model: ``height`` ≫ ``diameter``).
    base_height : float, optional
        Gap between the plane and the cylinder's lower end, m; ``None`` means the
        diameter; ``math.inf`` gives the isolated cylinder (no plane).
    segments : int
        Number of axial pieces.
    """
    h = _pos(height, "height")
    a = _pos(diameter, "diameter") / 2.0
    if h < 4 * a:
        raise InputError(f"height: thin-wire model needs height >= 2 diameters, got {height!r}")
    if base_height is None:
        g = 2 * a
    elif base_height == math.inf:
        g = math.inf
    else:
        g = _nonneg(base_height, "base_height")
    m = int(segments)
    if m < 10:
        raise InputError(f"segments: must be at least 10, got {segments!r}")
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
