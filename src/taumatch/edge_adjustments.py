"""The adjustments of a fast-edge diagnosis: value now, target, direction, and their errors.

* :class:`Adjustment` — one field the spec marks ``adjust``: its value now (fitted, or
  from the 1 kHz capture for the low-frequency trimmer), the value that flattens the step,
  which way to move it, standard errors, and the *budget*: how far each assumed value
  (held at the spec's figure) moves the target when it is off by its standard uncertainty
  (:func:`assumed_spreads`).
* :func:`propagate` — standard errors and budget by first-order propagation.  The fit's
  covariance ``C`` of the fitted fields gives the targets' error through their sensitivity
  ``D = d target / d fitted`` (:func:`taumatch.analysis.flatten.sensitivity`); the change
  ``target - now`` also carries the error of *now*.  An assumed value ``h`` moves the fit
  (``d fitted / d h = -(JᵀJ)⁺ Jᵀ J_h`` from the fit's Jacobians) and the flattening
  directly; both paths are summed.
* :func:`low_frequency` — the low-frequency balance from a 1 kHz capture: the gain error
  ``e`` it measures (:func:`taumatch.diagnosis.diagnose`) sets the trimmer's value now in the
  chain as found (two-arm view, R1 C1 against R2 C2 with every capacitance to ground after
  the tip arm, :class:`taumatch.chain.two_arm.TwoArm`), and the target makes ``e = 0``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import ComputationError, TaumatchError
from .units import format_quantity

__all__ = ["ASSUMED_SPREAD", "Adjustment", "LowFrequency", "assumed_spreads", "low_frequency",
           "propagate",
           "settle", "with_fit_errors"]

#: Tolerance (relative half-width) of a held time or frequency (a pulser's edge, a front
#: end's bandwidth, a cable's delay) without one in the spec (common practice, no source: a
#: datasheet is seldom better than 10 % there).
ASSUMED_SPREAD = 0.10
#: A change smaller than this many of its standard errors is no direction.
DIRECTION_SIGMAS = 2.0


@dataclass(frozen=True)
class Adjustment:
    """One adjustable field and what to do with it (SI units).

    ``target`` is None when the capture cannot say (``note`` gives the reason); ``budget``
    lists ``(what was assumed, shift of the target, shift of the change)`` for an assumed
    value off by its standard uncertainty.
    """

    field: object
    now: float
    now_stderr: float | None
    target: float | None
    stderr: float | None
    change_stderr: float | None
    budget: tuple = ()
    note: str = ""
    at_limit: bool = False
    low_frequency: bool = False

    @property
    def change(self) -> float | None:
        return None if self.target is None else self.target - self.now

    @property
    def uncertainty(self) -> float | None:
        """Root sum of squares of the change's standard error and its budget."""
        if self.change_stderr is None:
            return None
        return math.sqrt(self.change_stderr**2 + sum(b[2] ** 2 for b in self.budget))

    @property
    def direction(self) -> str | None:
        """``"increase"``, ``"decrease"``, or ``"leave"`` when the change is within
        ``DIRECTION_SIGMAS`` of its uncertainty; None without a target."""
        if self.target is None:
            return None
        u = self.uncertainty or 0.0
        if abs(self.change) <= DIRECTION_SIGMAS * u:
            return "leave"
        return "increase" if self.change > 0 else "decrease"

    @property
    def in_range(self) -> bool | None:
        f = self.field
        if self.target is None or (f.minimum is None and f.maximum is None):
            return None
        return bool((f.minimum is None or self.target >= f.minimum)
                    and (f.maximum is None or self.target <= f.maximum))

    def to_dict(self) -> dict:
        f = self.field
        return {"part": f.part, "field": f.name, "kind": f.kind, "label": f.label,
                "unit": f.unit, "now": self.now, "now_stderr": self.now_stderr,
                "target": self.target, "stderr": self.stderr, "change": self.change,
                "change_stderr": self.change_stderr, "uncertainty": self.uncertainty,
                "direction": self.direction, "in_range": self.in_range,
                "at_limit": self.at_limit, "low_frequency": self.low_frequency,
                "budget": [{"assumed": w, "target_shift": a, "change_shift": b}
                           for w, a, b in self.budget],
                **({"note": self.note} if self.note else {})}

    def line(self) -> str:
        """One line of text: now, target, direction, uncertainty."""
        f, q = self.field, format_quantity
        head = f"{f.describe()}{' (low-frequency trimmer)' if self.low_frequency else ''}"
        now = q(self.now, f.unit) + (f" ± {q(self.now_stderr, f.unit)}" if self.now_stderr else "")
        if self.target is None:
            return f"{head}: now {now}; no target: {self.note}"
        change = f"{q(abs(self.change), f.unit)} ± {q(self.uncertainty or 0.0, f.unit)}"
        verb = {"increase": f"raise it by {change}", "decrease": f"lower it by {change}",
                "leave": f"leave it: the change, {'+' if self.change >= 0 else '-'}{change}, "
                         "is within its uncertainty"}[self.direction]
        text = (f"{head}: now {now} → set {q(self.target, f.unit)} ± "
                f"{q(self.stderr or 0.0, f.unit)}: {verb}")
        if self.at_limit:
            text += " (at the end of its range)"
        elif self.in_range is False:
            text += " (OUTSIDE its range)"
        return text


def assumed_spreads(chain, fields) -> list:
    """``(relative standard uncertainty, words)`` of each held value in ``fields``: from the
    spec's tolerance of that value when it gives one, else the package's defaults of common
    practice (:data:`taumatch.chain.tolerance.DEFAULTS`: resistances, capacitances,
    inductances), else ``ASSUMED_SPREAD``; a tolerance is a rectangular half-width, its
    standard uncertainty the half-width over √3 (:mod:`taumatch.chain.tolerance`).  A value of
    zero has no relative spread (0, and no budget line)."""
    from .chain.tolerance import DEFAULTS, Tolerance

    given = {(k, name): t for k, name, t in getattr(chain, "tolerances", ())}
    base = {"Ω": "ohm", "F": "F", "H": "H"}
    out = []
    for f in fields:
        value = abs(f.get(chain))
        key = "resistance" if f.part == 0 and f.name == "resistance" else f.name
        t = given.get((f.part, key))
        where = "the spec's tolerance"
        if t is None:
            t = DEFAULTS.get(base.get(f.unit.split("/")[0]), Tolerance(ASSUMED_SPREAD))
            where = "common practice"
        if not value:
            out.append((0.0, ""))
            continue
        rel = t.half_width(value) / value / math.sqrt(3.0)
        out.append((rel, f"{t.describe(f.unit)} ({where})"))
    return out


def propagate(fit, sens, now_sens, sens_h, now_sens_h, spreads):
    """``(target_se, change_se, budget)`` of targets with sensitivities ``sens`` (rows:
    targets; columns: the fit's free fields, SI per fitted unit) whose values now have
    sensitivities ``now_sens``; ``sens_h``, ``now_sens_h`` are the direct sensitivities to
    the fit's assumed fields (SI per unit of relative change), ``spreads`` their relative
    standard uncertainties with words (:func:`assumed_spreads`).  ``budget`` is a list per
    target of ``(describe, target shift, change shift)``, each shift one standard
    uncertainty.
    """
    k = len(fit.free)
    cov = fit.cov[:k, :k]
    target_se = np.sqrt(np.clip(np.einsum("ij,jk,ik->i", sens, cov, sens), 0, None))
    dc = sens - now_sens
    change_se = np.sqrt(np.clip(np.einsum("ij,jk,ik->i", dc, cov, dc), 0, None))
    budget = [[] for _ in range(sens.shape[0])]
    if fit.assumed:
        jac, jh = fit.jac, fit.jac_assumed
        moved = -np.linalg.pinv(jac.T @ jac) @ (jac.T @ jh)  # fitted units per relative h
        total = sens @ moved[:k] + sens_h
        total_now = now_sens @ moved[:k] + now_sens_h
        for j, (h, (s, words)) in enumerate(zip(fit.assumed, spreads)):
            if not s:
                continue
            for i in range(sens.shape[0]):
                a, b = total[i, j] * s, (total[i, j] - total_now[i, j]) * s
                budget[i].append((f"{h.describe()} {words}", float(abs(a)), float(abs(b))))
    return target_se, change_se, budget


def settle(model, fit, found, spec, lf, lf_balance, window):
    """``(adjustments, adjusted chain)``: targets of the fitted high-frequency adjustments
    (:func:`taumatch.analysis.flatten.flatten`) and, with the 1 kHz balance, of the
    low-frequency trimmer (two-arm gain error 0 with the others at their targets; the two
    repeated until the trimmer's target moves by under 0.1 %), with errors and budget."""
    from .analysis.flatten import flatten, sensitivity
    from .chain.topology import arm_of
    from .fit.chain_fields import ADJUST

    hf = [f for f in fit.free if f.role == ADJUST and (lf is None or f.key != lf.key)]
    flat = flatten(model, found, hf, window)
    lf_sets = lf is not None and lf_balance is not None
    if lf_sets:
        arm = arm_of(spec, lf.part)
        target = None
        for _ in range(4):
            new = _arm_value(flat.chain, lf.part, arm, 0.0)
            done = target is not None and abs(new - target) <= 1e-3 * abs(new)
            target = new
            flat = flatten(model, flat.chain.with_value(lf.part, "c", target), hf, window)
            if done:
                break
    free, assumed = list(fit.free), list(fit.assumed)
    units = [fit.unit_size(f) for f in free]
    h_units = [max(abs(h.get(found)), h.floor) or 1.0 for h in assumed]
    sens = sensitivity(model, flat, free, units)
    sens_h = sensitivity(model, flat, assumed, h_units)
    now_sens = np.zeros_like(sens)
    for i, f in enumerate(hf):
        now_sens[i, free.index(f)] = units[free.index(f)]
    rows = [sens, now_sens, sens_h, np.zeros_like(sens_h)]
    if lf_sets:
        trimmer = _Trimmer(fit, lf, arm, lf_balance, hf, flat.targets)
        lf_now, lf_target = trimmer.values(fit.chain, flat.targets)
        rows = [np.vstack([r, x]) for r, x in zip(rows, trimmer.rows(
            free, units, sens, assumed, h_units, sens_h))]
    t_se, c_se, budget = propagate(fit, *rows, assumed_spreads(spec, assumed))
    out = []
    for i, f in enumerate(hf):
        group = next((g for g in fit.groups if g[0].key == f.key), None)
        note = ("carries the combination of " + ", ".join(x.describe() for x in group)
                + ": the others are held at the spec's values" if group else "")
        out.append(Adjustment(f, fit.values[f.key], fit.stderr[f.key], flat.targets[f.key],
                              float(t_se[i]), float(c_se[i]), tuple(budget[i]), note,
                              f.key in flat.at_limit))
    out += [Adjustment(h.field, h.value, None, None, None, None, (), h.reason,
                       low_frequency=lf is not None and h.field.key == lf.key)
            for h in fit.holds if h.field.role == ADJUST
            and (not lf_sets or h.field.key != lf.key)]
    adjusted = flat.chain
    if lf is not None and not lf_sets and lf.key in fit.stderr:
        out.append(Adjustment(lf, fit.values[lf.key], fit.stderr[lf.key], None, None, None, (),
                              "its value now as the fast edge shows it; the low-frequency "
                              "balance needs a 1 kHz capture of the same probe",
                              low_frequency=True))
    elif lf_sets:
        i = len(hf)
        e_now, e_target = trimmer.error_parts(flat.targets)
        fitted = lf.key in fit.stderr
        out.append(Adjustment(
            lf, lf_now, fit.stderr[lf.key] if fitted else lf_balance.now_stderr, lf_target,
            float(math.hypot(t_se[i], e_target)), float(math.hypot(c_se[i], e_target - e_now)),
            tuple(budget[i]),
            ("now as the fast edge shows it" if fitted else "now from the 1 kHz capture's "
             "gain error") + "; target: that gain error made zero, with the others at "
            "their targets", low_frequency=True))
        adjusted = flat.chain.with_value(lf.part, "c", lf_target)
    out.sort(key=lambda a: (a.field.part, a.field.name))
    return out, adjusted


class _Trimmer:
    """The low-frequency trimmer's value now and target as functions of the fitted chain
    (closed-form two-arm values), for its sensitivities by finite differences.

    From the raw fitted chain: the part the 1 kHz balance sets (the tip arm when the fast
    edge resolved the trimmer, else the trimmer) takes the value that gives the 1 kHz gain
    error; the high-frequency adjustments go to their targets; the target makes the gain
    error zero."""

    STEP = 1e-4

    def __init__(self, fit, lf, arm, balance, hf, targets):
        from .chain.topology import arm_of

        self.fit, self.lf, self.arm, self.balance, self.hf = fit, lf, arm, balance, hf
        self.balance_arm = arm_of(fit.chain, balance.part)
        self.base = dict(targets)

    def values(self, raw, targets, error=None):
        """``(now, target)`` of the trimmer from the raw fitted chain ``raw``."""
        e = self.balance.error if error is None else error
        ch = raw.with_value(self.balance.part, "c",
                            _arm_value(raw, self.balance.part, self.balance_arm, e))
        now = ch.parts[self.lf.part - 1].c
        for f in self.hf:
            ch = f.set(ch, targets[f.key])
        return now, _arm_value(ch, self.lf.part, self.arm, 0.0)

    def rows(self, free, units, sens, assumed, h_units, sens_h):
        """Target and now rows against the fitted fields (SI per fitted unit) and the
        assumed fields (per relative change); the high-frequency targets move with them by
        their own sensitivities."""
        raw = self.fit.chain
        now0, t0 = self.values(raw, self.base)

        def row(fields, us, cols):
            t_row, n_row = [], []
            for j, (f, u) in enumerate(zip(fields, us)):
                moved = f.set(raw, f.get(raw) + self.STEP * u)
                targets = {g.key: self.base[g.key] + cols[i, j] * self.STEP
                           for i, g in enumerate(self.hf)}
                now, tgt = self.values(moved, targets)
                t_row.append((tgt - t0) / self.STEP)
                n_row.append((now - now0) / self.STEP)
            return np.array([t_row]).reshape(1, -1), np.array([n_row]).reshape(1, -1)

        st, sn = row(free, units, sens)
        ht, hn = row(assumed, h_units, sens_h)
        return st, sn, ht, hn

    def error_parts(self, targets):
        """Standard errors of the value now and of the target from the 1 kHz gain error's."""
        se = self.balance.error_stderr or 0.0
        n0, t0 = self.values(self.fit.chain, targets)
        n1, t1 = self.values(self.fit.chain, targets, self.balance.error + 1e-4)
        return abs(n1 - n0) / 1e-4 * se, abs(t1 - t0) / 1e-4 * se


@dataclass(frozen=True)
class LowFrequency:
    """The low-frequency balance from a 1 kHz capture (SI; ``error`` a fraction).

    ``now`` is the value of ``c`` of ``part`` (the trimmer, or the tip arm) that gives the
    chain as found that gain error; ``error_part`` the standard error it has from the gain
    error's alone, ``now_stderr`` the whole (the fitted capacitances' errors too, once
    :func:`with_fit_errors` has added them).
    """

    error: float
    error_stderr: float | None
    part: int
    field: str
    arm: str
    now: float
    error_part: float | None
    verdict: str
    source: str | None
    now_stderr: float | None = None

    def to_dict(self) -> dict:
        return {"hf_dc_error": self.error, "hf_dc_error_stderr": self.error_stderr,
                "part": self.part, "field": self.field, "arm": self.arm, "now": self.now,
                "now_stderr": self.now_stderr, "verdict": self.verdict, "capture": self.source}


def with_fit_errors(lf: LowFrequency, fit, found) -> LowFrequency:
    """``lf`` with ``now_stderr`` from the gain error's and the fit's covariance."""
    from dataclasses import replace

    free = list(fit.free)
    k = len(free)
    row = np.zeros(k)
    n0 = _arm_value(found, lf.part, lf.arm, lf.error)
    for j, f in enumerate(free):
        if (f.part, f.name) != (lf.part, "c"):
            u = fit.unit_size(f)
            moved = f.set(found, f.get(found) + 1e-4 * u)
            row[j] = (_arm_value(moved, lf.part, lf.arm, lf.error) - n0) / 1e-4
    var = float(row @ fit.cov[:k, :k] @ row) + (lf.error_part or 0.0) ** 2
    return replace(lf, now_stderr=math.sqrt(max(var, 0.0)))


def _arm_value(chain, part, arm, error):
    """Value of the arm part's ``c`` that makes the chain's two-arm gain error ``error``."""
    from .chain.two_arm import TwoArm

    d = TwoArm.from_chain(chain)
    r1, c1, r2, c2 = (float(x) for x in (d.r1, d.c1, d.r2, d.c2))
    if arm == "shunt":
        need = c1 * (r1 - error * r2) / (r2 * (1 + error)) - c2
    else:
        den = r1 - error * r2
        need = (r2 * c2 * (1 + error) / den if den > 0 else math.inf) - c1
    return chain.parts[part - 1].c + need


def low_frequency(chain, part: int, error: float, stderr, verdict: str, source=None):
    """The value of ``c`` of ``part`` (the trimmer, or the tip arm) that the 1 kHz gain error
    ``error`` (± ``stderr``) says the chain has now (see the module text)."""
    from .chain.topology import arm_of

    arm = arm_of(chain, part)
    if arm is None:
        raise ComputationError(f"part {part} sits in neither arm of the divider: the 1 kHz "
                               "balance cannot be placed on it")
    try:
        now = _arm_value(chain, part, arm, error)
        step = max(stderr or 0.0, 1e-4)
        slope = (_arm_value(chain, part, arm, error + step) - now) / step
    except TaumatchError as exc:
        raise ComputationError(f"the 1 kHz balance needs a chain that reduces to a two-arm "
                               f"divider: {exc}") from None
    if not (math.isfinite(now) and now > 0):
        raise ComputationError(
            f"the 1 kHz capture's gain error {100 * error:+.3g} % needs part {part} at "
            f"{format_quantity(now, 'F')} given the rest of the chain: no capacitor is like "
            "that; check the spec's capacitances")
    se = abs(slope) * stderr if stderr is not None else None
    return LowFrequency(error, stderr, part, "c", arm, float(now), se, verdict, source, se)


