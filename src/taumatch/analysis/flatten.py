"""The values of a chain's high-frequency adjustments that flatten its displayed step.

*Flat* means least aberration after the transition, by the terms of IEEE Std 181-2011: the
step's departure from its upper state level in the post-transition region, which starts at
the 90 % reference instant.  The window ``(t90, t_settled, t_end)`` runs from the 90 %
instant of the capture's edge to ``WINDOW_CONSTANTS`` time constants after its 50 % instant
(the time constant is the capture's 10–90 % transition duration over ln 9, the first-order
equivalent, ``shared/CHECKS.md``).  Up to ``t_settled``, ``WINDOW_START`` time constants
after the 50 % instant, only the departure *above* the level counts (the overshoot: the
edge is still rising there, which is no aberration; a first-order edge is within 0.4 % of
its level five time constants after its 50 % instant, own derivation: ``0.5 e^-5``); after
it, the departure either way.  The level is the mean of the step over ``[t_settled, t_end]``.
The measure is the root mean square of that departure (in units of the level), the level left free: the
high-frequency adjustments set the step's shape, the low-frequency trimmer its level against
the DC gain (:func:`taumatch.chain.two_arm.TwoArm.change`).  The root mean square, not the
peak, is minimised, so that the minimum is smooth and its sensitivity to the fitted chain is
a linear solve (:func:`sensitivity`); the peak departure and the overshoot, undershoot and
preshoot are reported beside it (:mod:`taumatch.pulse`).

The search (scipy's bounded least squares) runs in the logarithm of each value (a resistance
that may be zero in units of its size), within the adjustment's range from the spec and a
factor of 20 of its present value; a target on a bound says so (``at_limit``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import ComputationError

__all__ = ["WINDOW_CONSTANTS", "WINDOW_START", "Flattening", "aberration", "flatten",
           "sensitivity"]

#: Time constants of the edge (10–90 % over ln 9) from the 50 % instant to the flat window's
#: start and end.
WINDOW_START = 5
WINDOW_CONSTANTS = 100
#: Relative step of the finite differences.
STEP = 1e-4


@dataclass(frozen=True)
class Flattening:
    """Targets of the adjustments and what the flat window saw.

    Attributes
    ----------
    chain : Chain
        The chain with every adjustment at its target.
    targets : dict
        Field key -> target [SI].
    at_limit : tuple of str
        Keys of targets on a bound of their range.
    rms_before, rms_after : float
        RMS departure from the level over the window, fraction of the level.
    """

    chain: object
    fields: tuple
    targets: dict
    at_limit: tuple
    rms_before: float
    rms_after: float
    window: tuple
    evaluations: int


def _unit(f, value):
    """SI size of one search unit of ``f`` at ``value``."""
    return max(value, f.floor) if f.floor else value


def aberration(model, chain, window) -> np.ndarray:
    """Departure of ``chain``'s displayed step from its level over ``window = (t90,
    t_settled, t_end)`` [s] (see the module text), in units of the level, at the model's grid
    points inside the window."""
    st = model.step(chain)
    late = (st.t >= window[1]) & (st.t <= window[2])
    early = (st.t >= window[0]) & (st.t < window[1])
    level = float(np.mean(st.y[late]))
    if not level:
        raise ComputationError("the predicted step has no level in the flat window")
    return np.concatenate([np.maximum(st.y[early] - level, 0.0), st.y[late] - level]) / level


def flatten(model, chain, fields, window) -> Flattening:
    """The values of ``fields`` (adjustments of ``chain``) that flatten its step over
    ``window`` [s] (see the module text).

    Parameters
    ----------
    model : StepModel
        The step evaluator; its window must reach ``window[1]``.
    chain : Chain
        The chain as found.
    fields : sequence of ChainField
        The adjustments to set.
    window : (float, float, float)
        The flat window ``(t90, t_settled, t_end)`` [s] after the source's step.
    """
    from scipy.optimize import least_squares

    fields = tuple(fields)
    n0 = model.evaluations
    before = aberration(model, chain, window)
    if not fields:
        return Flattening(chain, fields, {}, (), _rms(before), _rms(before), tuple(window),
                          model.evaluations - n0)
    starts = [f.get(chain) for f in fields]
    units = [_unit(f, s) for f, s in zip(fields, starts)]
    lo, hi = [], []
    for f, s, u in zip(fields, starts, units):
        a, b = f.bounds(chain)
        lo.append(math.log(a / s) if not f.floor and a > 0 else (-math.inf if not f.floor else a / u))
        hi.append(math.log(b / s) if not f.floor else b / u)
    x0 = [0.0 if not f.floor else s / u for f, s, u in zip(fields, starts, units)]
    x0 = np.clip(x0, np.array(lo) + 1e-9, np.array(hi) - 1e-9)

    def chain_at(x):
        ch = chain
        for f, xi, s, u in zip(fields, x, starts, units):
            ch = f.set(ch, s * math.exp(xi) if not f.floor else xi * u)
        return ch

    sol = least_squares(lambda x: aberration(model, chain_at(x), window), x0, bounds=(lo, hi),
                        diff_step=1e-3, ftol=1e-10, xtol=1e-8, max_nfev=200)
    found = chain_at(sol.x)
    targets = {f.key: f.get(found) for f in fields}
    at_limit = tuple(f.key for f, x, a, b in zip(fields, sol.x, lo, hi)
                     if min(abs(x - a), abs(b - x)) < 1e-6)
    after = aberration(model, found, window)
    return Flattening(found, fields, targets, at_limit, _rms(before), _rms(after),
                      tuple(window), model.evaluations - n0)


def _rms(r) -> float:
    return float(np.sqrt(np.mean(r**2)))


def sensitivity(model, flat: Flattening, others, units) -> np.ndarray:
    """How the targets move with other fields of the chain: ``d target_i / d u_j`` [SI of
    the target per unit of ``u_j``], one row per target, one column per field in ``others``,
    where ``units[j]`` is the SI size of one unit of ``others[j]``.

    By the implicit-function theorem at the minimum of ``|r(a, u)|^2``:
    ``da/du = -(G_aᵀ G_a)⁻¹ G_aᵀ G_u`` with ``G`` the Jacobians of the aberration vector
    (Gauss-Newton: the residual at the minimum is small against its Jacobian's effect).
    """
    ch = flat.chain
    r0 = aberration(model, ch, flat.window)
    free = [f for f in flat.fields if f.key not in flat.at_limit]
    ga = []
    for f in free:
        v = flat.targets[f.key]
        ga.append((aberration(model, f.set(ch, v * (1 + STEP)), flat.window) - r0) / STEP)
    gu = []
    for f, u in zip(others, units):
        v = f.get(ch)
        gu.append((aberration(model, f.set(ch, v + STEP * u), flat.window) - r0) / STEP)
    out = np.zeros((len(flat.fields), len(others)))
    if not free or not gu:
        return out
    ga, gu = np.column_stack(ga), np.column_stack(gu)
    d = -np.linalg.lstsq(ga, gu, rcond=None)[0]  # d ln(target) per unit of u
    for i, f in enumerate(free):
        out[flat.fields.index(f)] = d[i] * flat.targets[f.key]
    return out
