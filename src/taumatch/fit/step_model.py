"""A chain's displayed step at a capture's sample times, for fitting (exact response).

The step is the chain's exact response (:class:`taumatch.chain.cascade.Cascade`: cables by
the telegrapher's equations, the source edge and the instrument's front end included)
brought to the time domain by the numerical inverse Laplace transform of
:func:`taumatch.network.inverse_laplace.step_response`, with one change for fitting: the
number of terms is *fixed* (``tol = 0``, no stall test), so that the model is a smooth
function of the chain's values (an adaptive term count would jump between neighbouring
parameter sets and spoil the finite-difference Jacobian).  The count is chosen once, from
the record: a grid at least ``OVERSAMPLE`` times finer than the capture's sample interval
(``t_end / N``), at least the transform's own start of 512 terms, at most ``N_MAX``.  Each
evaluation states its error (truncation estimate from ``N`` against ``N/2`` terms, plus the
aliasing bound), and :meth:`StepModel.check` compares the fixed-``N`` step with the adaptive
transform at its own tolerance, which is the error the fit's model carries.

Between grid points the step is a cubic spline (the grid is twice as fine as the
samples; the spline's error on a band-limited step is far below a quantised capture's code).
Before ``t = 0`` the step is zero (the chain is causal and at rest).
"""

from __future__ import annotations

import math

import numpy as np

from ..chain.cascade import Cascade
from ..network.inverse_laplace import N_START, step_response

__all__ = ["N_MAX", "OVERSAMPLE", "StepCurve", "StepModel"]

#: Grid points per capture sample interval.
OVERSAMPLE = 2
#: Most terms of the series (a record of 16384 samples at four grid points each).
N_MAX = 1 << 16


class StepModel:
    """The displayed unit step of chains on ``[0, t_end]`` at a fixed number of terms.

    Parameters
    ----------
    t_end : float
        End of the window [s] after the source's step.
    dt : float
        The capture's sample interval [s].
    scale : float
        A characteristic angular frequency of the chains [rad/s]: where the transform reads
        the step's behaviour at ``t = 0`` (see :func:`~taumatch.network.inverse_laplace.asymptote`).
    """

    def __init__(self, t_end: float, dt: float, scale: float):
        self.t_end = float(t_end)
        need = OVERSAMPLE * self.t_end / float(dt)
        self.terms = int(min(max(N_START, 1 << max(0, math.ceil(math.log2(max(need, 1.0))))),
                             N_MAX))
        self.scale = float(scale)
        self.evaluations = 0

    def step(self, chain):
        """The :class:`~taumatch.network.inverse_laplace.SampledStep` of ``chain`` (its
        displayed step: source edge and front end included)."""
        c = Cascade(chain)
        self.evaluations += 1
        return step_response(lambda s: c.transfer(s, edge=True), self.t_end, scale=self.scale,
                             tol=0.0, n_max=self.terms, band=math.inf)

    def at(self, chain, t) -> np.ndarray:
        """The displayed unit step of ``chain`` at times ``t`` [s] after the source's step
        (zero before it)."""
        return self.curve(chain)(t)

    def curve(self, chain) -> StepCurve:
        """The displayed unit step of ``chain`` as a function of time (with its slope)."""
        return StepCurve(self.step(chain))

    def check(self, chain, tol: float = 1e-6):
        """``(error, adaptive)``: the largest difference [V/V] between this fixed-term step
        and the adaptive transform at ``tol`` on the same window, and the adaptive
        :class:`~taumatch.network.inverse_laplace.SampledStep` (whose own stated error adds
        to it)."""
        c = Cascade(chain)
        ref = step_response(lambda s: c.transfer(s, edge=True), self.t_end, scale=self.scale,
                            tol=tol)
        fixed = StepCurve(self.step(chain))
        diff = float(np.max(np.abs(fixed(ref.t) - ref.y)))
        return diff, ref


class StepCurve:
    """A sampled step as a function of time [s]: a cubic spline through its grid, zero
    before ``t = 0``; ``slope(t)`` its derivative [1/s]."""

    def __init__(self, step):
        from scipy.interpolate import CubicSpline

        self.step = step
        self._spline = CubicSpline(step.t, step.y)
        self._end = float(step.t[-1])

    def __call__(self, t) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        return np.where(t > 0, self._spline(np.clip(t, 0.0, self._end)), 0.0)

    def slope(self, t) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        return np.where(t > 0, self._spline(np.clip(t, 0.0, self._end), 1), 0.0)
