"""Fitting a chain's fields to a fast-edge capture with lmfit, on the exact chain model.

The capture ``v(t)`` is modelled as ``offset + amplitude · g(t − t0)``, where ``g`` is the
chain's displayed unit step (:class:`taumatch.fit.step_model.StepModel`: the exact response,
cables by the telegrapher's equations, through the numerical inverse Laplace transform).
Free: the chain fields given (adjustments and parasitics, :mod:`taumatch.fit.chain_fields`),
the amplitude, the offset and the edge's instant ``t0``.  Residuals are weighted by the
capture's noise.

Parameters are fitted in relative units (the logarithm of a value; a resistance that may be
zero in units of its size), so that the Jacobian's columns compare.  What the capture cannot
fix is found from that Jacobian, before the fit (at the spec's values) and again at the
solution: its singular value decomposition gives the combinations of fields the capture
fixes to worse than ``LIMIT`` (relative, one standard error, the noise scaled by the reduced
χ² when that exceeds 1).  A field that takes part in such a combination (a component of at
least ``PART``) is

* held at the spec's value when it is a parasitic (the one weighing most first; then the
  analysis is repeated), with the reason;
* when only adjustments take part: *not separable* if two or more do (the capture shows
  only their combination; all but the first are held, and the first carries the
  combination), or *not determined* if one does (held).

A field is also held when its own standard error exceeds ``LIMIT`` of its size.  Holding a
field at a point is removing its column, so the analysis needs no new evaluations; the fit
is repeated after a hold found at the solution.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from ..errors import ComputationError
from .chain_fields import ADJUST, ChainField

__all__ = ["LIMIT", "PART", "ChainFit", "Hold", "fit_chain_step"]

#: Relative standard error beyond which a field (or a combination) counts as not resolved.
LIMIT = 0.25
#: Component of a weak direction that makes a field take part in it.
PART = 0.3
#: Relative step of the finite-difference Jacobian (in the fitted units).
STEP = 1e-4
#: Fits at most (the first, and refits after holds found at the solution).
MAX_FITS = 4


@dataclass(frozen=True)
class Hold:
    """A field held at its spec value, and why."""

    field: ChainField
    value: float
    reason: str
    group: tuple = ()

    def to_dict(self) -> dict:
        return {**self.field.to_dict(), "value": self.value, "reason": self.reason,
                **({"not_separable_from": [g.key for g in self.group]} if self.group else {})}


@dataclass(frozen=True, eq=False)
class ChainFit:
    """Result of :func:`fit_chain_step` (SI units).

    Attributes
    ----------
    chain : Chain
        The chain as found (every free field at its fitted value).
    free : tuple of ChainField
        The fitted fields; ``values`` and ``stderr`` by their keys.
    holds : tuple of Hold
        Candidates held, with the reason (not resolved, not separable, not determined).
    groups : tuple of tuple of ChainField
        Adjustments the capture cannot tell apart (the first of each was fitted).
    amplitude, offset, t0 : float
        Source step [V] as the instrument sees it per unit of the chain's gain, the baseline
        [V] and the instant [s] of the source's step on the capture's time axis; with
        ``nuisance_stderr``.
    cov : ndarray
        Covariance of the fitted parameters in fitted units (free fields, then amplitude,
        offset, t0), noise scaled by max(1, reduced χ²).
    jac : ndarray
        Weighted Jacobian at the solution in the same units.
    jac_assumed : ndarray
        Weighted Jacobian of the fields in ``assumed`` (those given, then every candidate
        held), per relative change of each.
    nfev : int
        Evaluations of the chain's step, the analysis and the error check included.
    units : dict
        The size [SI] one fitted unit of each free field stands for (its value for a
        field fitted in its logarithm).
    """

    chain: object
    free: tuple
    values: dict
    stderr: dict
    holds: tuple
    groups: tuple
    amplitude: float
    offset: float
    t0: float
    nuisance_stderr: dict
    cov: np.ndarray
    jac: np.ndarray
    jac_assumed: np.ndarray
    assumed: tuple
    residual_rms: float
    noise_rms: float
    points: int
    nfev: int
    redchi: float
    inversion_error: float
    units: dict
    t: np.ndarray = field(repr=False)
    v: np.ndarray = field(repr=False)
    fitted: np.ndarray = field(repr=False)

    def unit_size(self, f: ChainField) -> float:
        """The size [SI] one fitted unit of free field ``f`` stands for at the solution."""
        return self.units[f.key]


class _Problem:
    """The residual of the capture against the chain.

    Amplitude and offset enter linearly: for given chain values and ``t0`` they are the
    least-squares solution (variable projection), so the search runs over the chain's
    fields and ``t0`` only."""

    def __init__(self, t, v, noise, chain, model, t00, dt):
        self.t, self.v, self.noise = t, v, noise
        self.base = chain
        self.model = model
        self.t00, self.dt = t00, dt
        self._ones = np.ones_like(t)

    @staticmethod
    def to_value(f: ChainField, x: float, start: float) -> float:
        return start * math.exp(x) if not f.floor else x * max(start, f.floor)

    @staticmethod
    def to_x(f: ChainField, value: float, start: float) -> float:
        return math.log(value / start) if not f.floor else value / max(start, f.floor)

    def chain_at(self, fields, xs, starts):
        ch = self.base
        for f, x, s in zip(fields, xs, starts):
            ch = f.set(ch, self.to_value(f, x, s))
        return ch

    def t0(self, dt0: float) -> float:
        return self.t00 + dt0 * self.dt

    def solve(self, chain, dt0):
        """``(residual, amplitude, offset, curve)`` at the best amplitude and offset."""
        curve = self.model.curve(chain)
        g = curve(self.t - self.t0(dt0))
        a, b = np.linalg.lstsq(np.column_stack([g, self._ones]), self.v, rcond=None)[0]
        return (a * g + b - self.v) / self.noise, float(a), float(b), curve

    def residual(self, chain, dt0, a, b):
        """Weighted residual at a given amplitude and offset."""
        g = self.model.curve(chain)(self.t - self.t0(dt0))
        return (a * g + b - self.v) / self.noise


def _weak(jac, fields, s2):
    """The first thing the capture cannot fix (see the module text), as
    ``(kind, [indices], reason)`` with ``kind`` in {"hold", "group", "alone"}; or None."""
    n_phys = len(fields)
    if n_phys == 0:
        return None
    # the right singular vectors and values of the Jacobian, from its normal matrix (small)
    lam, vec = np.linalg.eigh(jac.T @ jac)
    with np.errstate(divide="ignore", invalid="ignore"):
        spread = np.sqrt(s2 / np.clip(lam, 0.0, None))
    for k in np.argsort(lam):
        if not spread[k] > LIMIT:
            break
        comp = np.abs(vec[:n_phys, k])
        take = [i for i in np.argsort(-comp) if comp[i] >= PART]
        if not take:
            continue
        return _decide(take, fields, spread[k], comp)
    cov = np.linalg.pinv(jac.T @ jac) * s2
    se = np.sqrt(np.clip(np.diag(cov)[:n_phys], 0, None))
    worst = int(np.argmax(se))
    if se[worst] > LIMIT:
        return _decide([worst], fields, se[worst], None)
    return None


def _decide(take, fields, spread, comp):
    paras = [i for i in take if fields[i].role != ADJUST]
    adjs = [i for i in take if fields[i].role == ADJUST]
    if paras:
        i = paras[0]
        why = (f"not resolved by this capture (±{100 * spread:.3g} % at best"
               + (f", together with {', '.join(fields[j].describe() for j in take if j != i)}"
                  if len(take) > 1 else "") + ")")
        return "hold", [i], why
    if len(adjs) >= 2:
        adjs = sorted(adjs, key=lambda i: (fields[i].part, fields[i].name))
        return "group", adjs, (f"acts alike with {fields[adjs[0]].describe()} on this capture "
                               f"(±{100 * spread:.3g} % apart at best): only their combination "
                               f"is resolved, and {fields[adjs[0]].describe()} carries it")
    return "alone", adjs, f"not determined by this capture (±{100 * spread:.3g} %)"


def fit_chain_step(t, v, chain, fields, *, noise: float, model, t0: float, dt: float,
                   t0_range: float, assumed=()) -> ChainFit:
    """Fit ``fields`` of ``chain`` (and amplitude, offset, ``t0``) to a fast edge.

    Parameters
    ----------
    t, v : ndarray
        The samples to fit: times [s] and values [V].
    chain : Chain
        The chain as the spec gives it (start values; everything not fitted is held).
    fields : sequence of ChainField
        Candidates to fit (adjustments and parasitics).
    noise : float
        Noise RMS of one sample [V].
    model : StepModel
        The step evaluator (its window must cover ``t - t0`` up to ``t_end``).
    t0 : float
        Start value of the source step's instant [s] (amplitude and offset are solved for
        at every step of the search).
    dt : float
        The capture's sample interval [s].
    t0_range : float
        How far ``t0`` may move from its start [s].
    assumed : sequence of ChainField
        Held values whose effect the caller wants (``jac_assumed``), for a budget.

    Raises
    ------
    ComputationError
        When the fit does not converge.
    """
    import lmfit

    t = np.asarray(t, dtype=float)
    v = np.asarray(v, dtype=float)
    prob = _Problem(t, v, noise, chain, model, t0, dt)
    fields = list(fields)
    starts = {f.key: f.get(chain) for f in fields}
    holds, groups = [], []
    xs = {f.key: prob.to_x(f, starts[f.key], starts[f.key]) for f in fields}
    state = {"dt0": 0.0}
    lim = t0_range / dt

    def full_chain(keep):
        return prob.chain_at(keep, [xs[f.key] for f in keep], [starts[f.key] for f in keep])

    def jacobian(keep, extra=()):
        """Weighted Jacobian: fields, then amplitude (relative), offset (per amplitude) and
        t0 (per sample interval); the extra fields' columns apart (per relative change)."""
        ch = full_chain(keep)
        r0, a, b, curve = prob.solve(ch, state["dt0"])
        cols = []
        for f in list(keep) + list(extra):
            if f in keep:
                moved = f.set(ch, prob.to_value(f, xs[f.key] + STEP, starts[f.key]))
            else:  # an assumed field: relative step about its present value
                val = f.get(ch)
                moved = f.set(ch, val * (1 + STEP) if val else STEP * max(f.floor, 1.0))
            cols.append((prob.residual(moved, state["dt0"], a, b) - r0) / STEP)
        tt = t - prob.t0(state["dt0"])
        main = np.column_stack(cols[:len(keep)] + [a * curve(tt) / noise,
                                                   np.full(t.size, abs(a) / noise),
                                                   -a * curve.slope(tt) * dt / noise])
        side = np.column_stack(cols[len(keep):]) if extra else np.zeros((t.size, 0))
        return main, side, r0, a, b

    def settle_holds(keep, jac, s2):
        changed = False
        while True:
            found = _weak(jac, keep, s2)
            if found is None:
                return keep, jac, changed
            kind, idx, why = found
            members = tuple(keep[i] for i in idx) if kind == "group" else ()
            if members:
                groups.append(members)
            drop = idx[1:] if kind == "group" else idx
            for i in drop:
                holds.append(Hold(keep[i], starts[keep[i].key], why, members))
                xs[keep[i].key] = prob.to_x(keep[i], starts[keep[i].key], starts[keep[i].key])
            cols = [c for c in range(jac.shape[1]) if c not in drop]
            keep = [f for i, f in enumerate(keep) if i not in drop]
            jac = jac[:, cols]
            changed = True

    keep = list(fields)
    jac = jacobian(keep)[0]
    keep, jac, _ = settle_holds(keep, jac, 1.0)
    for _ in range(MAX_FITS):
        params = lmfit.Parameters()
        for i, f in enumerate(keep):
            lo, hi = f.bounds(chain)
            s = starts[f.key]
            plo = prob.to_x(f, lo, s) if (lo > 0 or f.floor) else -math.inf
            phi = prob.to_x(f, hi, s) if math.isfinite(hi) else math.inf
            params.add(f"f{i}", value=min(max(xs[f.key], plo), phi), min=plo, max=phi)
        params.add("dt0", value=state["dt0"], min=-lim, max=lim)

        def residual(p, keep=keep):
            vals = p.valuesdict()
            ch = prob.chain_at(keep, [vals[f"f{i}"] for i in range(len(keep))],
                               [starts[f.key] for f in keep])
            return prob.solve(ch, vals["dt0"])[0]

        try:
            with warnings.catch_warnings():
                warnings.filterwarnings("ignore", category=RuntimeWarning)
                res = lmfit.minimize(residual, params, method="least_squares", max_nfev=400,
                                     ftol=1e-5, xtol=1e-6, x_scale="jac")
        except (ValueError, ArithmeticError, np.linalg.LinAlgError) as exc:
            raise ComputationError(f"the fit failed: {exc}") from exc
        if not res.success:
            raise ComputationError(f"the fit did not converge: {res.message}")
        for i, f in enumerate(keep):
            xs[f.key] = float(res.params[f"f{i}"].value)
        state["dt0"] = float(res.params["dt0"].value)
        jac, _, r, _, _ = jacobian(keep)
        s2 = max(float(np.sum(r**2)) / max(t.size - jac.shape[1], 1), 1.0)
        keep, jac, changed = settle_holds(keep, jac, s2)
        if not changed:
            break
    assumed = tuple(assumed) + tuple(h.field for h in holds)
    jac, jac_h, r, a, b = jacobian(keep, assumed)
    dof = max(t.size - jac.shape[1], 1)
    redchi = float(np.sum(r**2)) / dof
    cov = np.linalg.pinv(jac.T @ jac) * max(redchi, 1.0)
    se = np.sqrt(np.clip(np.diag(cov), 0, None))
    found = full_chain(keep)
    values = {f.key: f.get(found) for f in keep}
    stderr, units = {}, {}
    for i, f in enumerate(keep):
        units[f.key] = values[f.key] if not f.floor else max(starts[f.key], f.floor)
        stderr[f.key] = float(se[i] * units[f.key])
    for h in holds:
        values[h.field.key] = h.value
    k = len(keep)
    model_v = r * noise + v
    diff, ref = model.check(found)
    return ChainFit(
        chain=found, free=tuple(keep), values=values, stderr=stderr, holds=tuple(holds),
        groups=tuple(groups), amplitude=a, offset=b, t0=prob.t0(state["dt0"]),
        nuisance_stderr={"amplitude": float(se[k] * abs(a)), "offset": float(se[k + 1] * abs(a)),
                         "t0": float(se[k + 2] * dt)},
        cov=cov, jac=jac, jac_assumed=jac_h, assumed=assumed, units=units,
        residual_rms=float(np.sqrt(np.mean((r * noise) ** 2))), noise_rms=float(noise),
        points=int(t.size), nfev=model.evaluations, redchi=redchi,
        inversion_error=float(diff + ref.error), t=t, v=v, fitted=model_v,
    )
