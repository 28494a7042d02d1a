"""How the fitted parameters move when a held parameter is wrong: the linearised refit.

A fit holds some quantities at assumed values (the arm resistances, a shunt capacitance
the capture cannot fix, an unresolved source edge, a ground lead beyond the sampling).
Had a held value φ been different, the free parameters θ would have settled elsewhere.
At the optimum the weighted residual r(θ, φ) satisfies the normal equations
Jθᵀ r = 0; differentiating them (and dropping the second-derivative term, as
Gauss–Newton does) gives the implicit-function result

    dθ/dφ = −(Jθᵀ Jθ)⁻¹ Jθᵀ Jφ

(any nonlinear least-squares text, e.g. Seber & Wild, "Nonlinear Regression", on the
sensitivity of estimates to fixed parameters — from memory).  It is one Gauss–Newton
step of the refit with φ moved, so it costs one Jacobian (two residual evaluations per
parameter) instead of a refit per held quantity; the tests check it against real refits.
"""

from __future__ import annotations

import numpy as np

__all__ = ["held_sensitivities"]


def _column(residual, values: dict, name: str, rel: float) -> np.ndarray:
    """Central-difference derivative of the residual vector with respect to ``name``."""
    x = float(values[name])
    h = rel * abs(x) if x != 0 else rel
    up = dict(values, **{name: x + h})
    down = dict(values, **{name: x - h})
    return (np.asarray(residual(up)) - np.asarray(residual(down))) / (2.0 * h)


def held_sensitivities(residual, values: dict, free, held, rel: float = 1e-5) -> dict:
    """dθ/dφ of each free parameter θ with respect to each held parameter φ.

    Parameters
    ----------
    residual : callable
        ``residual(values) -> ndarray``: the weighted residual vector for a dict of
        parameter values (the same units as ``values``).
    values : dict
        Parameter values at the optimum.
    free, held : sequence of str
        Names of the fitted and of the held parameters.
    rel : float
        Relative finite-difference step.

    Returns
    -------
    dict
        ``{theta: {phi: dtheta/dphi}}`` in the units of ``values``.

    Examples
    --------
    A straight line y = a + b·x fitted with the slope b held: moving b by δ moves the
    fitted intercept by −mean(x)·δ.

    >>> x = np.linspace(0.0, 2.0, 5)
    >>> y = 1.0 + 3.0 * x
    >>> res = lambda v: v["a"] + v["b"] * x - y
    >>> s = held_sensitivities(res, {"a": 1.0, "b": 3.0}, ["a"], ["b"])
    >>> round(s["a"]["b"], 6)
    -1.0
    """
    free, held = list(free), list(held)
    out = {name: {} for name in free}
    if not free or not held:
        return out
    jt = np.column_stack([_column(residual, values, n, rel) for n in free])
    jp = np.column_stack([_column(residual, values, n, rel) for n in held])
    d, *_ = np.linalg.lstsq(jt, -jp, rcond=None)
    for i, a in enumerate(free):
        for j, b in enumerate(held):
            out[a][b] = float(d[i, j])
    return out
