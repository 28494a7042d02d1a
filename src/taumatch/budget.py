"""The uncertainty budget of a diagnosis: what each source of doubt adds to its figures.

The gain error, the two trims and a trimmer's setting are functions of the fitted tip and
shunt capacitance and of values the fit was told or held (:mod:`taumatch.assumptions`).
Their uncertainty has three kinds of term, combined in quadrature as independent
contributions (JCGM 100:2008, the Guide to the expression of uncertainty in measurement,
5.1.2, the law of propagation of uncertainty — from memory):

* **noise** — the fit's own standard errors of C1 and C2 with their correlation (already
  widened for correlated residuals and a reduced χ² above one), through the gradient of
  the figure;
* **codes** — a gain error the converter's codes can hide (:mod:`taumatch.resolution`),
  taken as rectangular within ± that share;
* **edge instant** — an unresolved edge falls anywhere within its sample interval dt, and
  the jump is the plateau's exponential read at that instant: a shift δ scales the gain
  error by e^(δ/τ) (the textbook step, own derivation), so ± |e|·dt/(2τ), rectangular;
* **edge shape** — the model's source edge is first order, a real one is not, and the
  jump at the edge is read through it: the figure fitted again without the samples near
  the edges (``DividerFit.edge_free``) differs by some amount, taken as rectangular
  within ± that difference;
* **one term per held or assumed value** — the figure is evaluated with that value at
  each end of its tolerance, the fitted capacitances following it: through the slope of
  the refit, dC/dφ from :func:`taumatch.fit.sensitivity.held_sensitivities` (the arm
  resistances at ±2 %, an edge, a lead: one Jacobian for all of them, and the tests
  compare it with real refits), or, for a held shunt capacitance whose tolerance is wide
  (±50 % when nothing gives it), through refits at both ends of it
  (``DividerFit.held_ends``) with a quadratic between them, because the trim is then
  far from linear in it.  The figure's values at the two ends bound a rectangle whose
  standard uncertainty is its width/(2√3) (JCGM 100 4.3.7).

The stated interval is value − k·u₋ … value + k·u₊ with k = 2 ("about 95 %", JCGM 100
6.2–6.3), where u₋ and u₊ combine each rectangle's reach below and above the value
(reach/√3) with the noise and codes terms; for symmetric terms it is the usual ± k·u.
When a rectangular term dominates, 2/√3 of its reach covers all of it, so the interval is
then conservative; the coverage tests hold it to at least 95 %.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .chain.two_arm import TwoArm
from .units import format_quantity

__all__ = ["CONFIDENCE", "COVERAGE_FACTOR", "Budget", "Term", "diagnosis_budgets"]

COVERAGE_FACTOR = 2.0
CONFIDENCE = 0.95
_X = ("r1", "c1", "r2", "c2", "fixed", "trimmer")
#: fit parameter -> the variable of the arithmetic it is (r1, r2 and c2 enter both)
_FIT_TO_X = {"r1": "r1", "r2": "r2", "c2": "c2"}


@dataclass(frozen=True)
class Term:
    """One contribution to a figure's uncertainty.

    ``u`` is the standard uncertainty it adds (the figure's unit), ``sensitivity`` the
    figure's change per unit change of the input (None for noise and codes), ``detail``
    the input with its tolerance in words.
    """

    key: str
    label: str
    u: float
    sensitivity: float | None = None
    detail: str = ""
    u_low: float | None = None
    u_high: float | None = None

    @property
    def below(self) -> float:
        """Standard uncertainty of the term's reach below the value (u when symmetric)."""
        return self.u if self.u_low is None else self.u_low

    @property
    def above(self) -> float:
        return self.u if self.u_high is None else self.u_high

    def to_dict(self, total_var: float) -> dict:
        return {"name": self.key, "label": self.label, "standard_uncertainty": self.u,
                "share": (self.u**2 / total_var) if total_var > 0 else 0.0,
                "below": self.below, "above": self.above,
                "sensitivity": self.sensitivity, "detail": self.detail}


@dataclass(frozen=True)
class Budget:
    """The uncertainty of one figure of a diagnosis, term by term.

    Attributes
    ----------
    name : str
        ``hf_dc_error``, ``shunt_change``, ``tip_change``, ``shunt_required``,
        ``tip_required`` or ``trimmer_required``.
    label : str
    unit : str
        ``""`` (a fraction) or ``"F"``.
    value : float
    terms : tuple of Term
    k : float
        Coverage factor of the stated interval.
    """

    name: str
    label: str
    unit: str
    value: float
    terms: tuple
    k: float = COVERAGE_FACTOR

    @property
    def stderr(self) -> float:
        """Combined standard uncertainty."""
        return math.sqrt(sum(t.u**2 for t in self.terms))

    @property
    def expanded(self) -> float:
        """k·u, the half-width of the interval when it is symmetric."""
        return self.k * self.stderr

    @property
    def interval(self) -> tuple:
        """The stated interval (about 95 %): ``(low, high)``."""
        below = math.sqrt(sum(t.below**2 for t in self.terms))
        above = math.sqrt(sum(t.above**2 for t in self.terms))
        return self.value - self.k * below, self.value + self.k * above

    @property
    def dominant(self) -> Term | None:
        return max(self.terms, key=lambda t: t.u) if self.terms else None

    def share(self, term: Term) -> float:
        total = self.stderr**2
        return term.u**2 / total if total > 0 else 0.0

    def covers(self, truth: float) -> bool:
        """True when ``truth`` lies in the stated interval."""
        lo, hi = self.interval
        return bool(lo <= truth <= hi)

    def _fmt(self, x: float, signed: bool = False) -> str:
        sign = ("+" if x >= 0 else "−") if signed else ""
        x = abs(x) if signed else x
        return sign + (f"{100 * x:.3g} %" if self.unit == "" else format_quantity(x, self.unit))

    def line(self) -> str:
        """``shunt change ± 6.5 pF (95 %: +3 pF to +29 pF): shunt capacitance (held) 96 %,
        noise 3 %``."""
        parts = [f"{t.label} {_percent(self.share(t))}" for t in
                 sorted(self.terms, key=lambda t: -t.u) if self.share(t) >= 0.005]
        rest = sum(self.share(t) for t in self.terms if self.share(t) < 0.005)
        if rest >= 0.0005:
            parts.append(f"others {_percent(rest)}")
        lo, hi = self.interval
        return (f"{self.label} {self._fmt(self.value, True)} ± {self._fmt(self.stderr)} (95 %: "
                f"{self._fmt(lo, True)} to {self._fmt(hi, True)}): " + ", ".join(parts))

    def to_dict(self) -> dict:
        total = self.stderr**2
        dom = self.dominant
        return {"value": self.value, "unit": self.unit, "standard_uncertainty": self.stderr,
                "coverage_factor": self.k, "confidence": CONFIDENCE,
                "interval": list(self.interval),
                "dominant": dom.key if dom is not None else None,
                "terms": [t.to_dict(total) for t in self.terms]}


def _percent(share: float) -> str:
    p = 100 * share
    return f"{p:.0f} %" if p >= 10 else f"{p:.2g} %"


def _grad(f, x: dict) -> dict:
    """Central-difference partial derivatives of f at x."""
    out = {}
    for k in _X:
        h = 1e-6 * max(abs(x[k]), 1e-15)
        out[k] = (f(dict(x, **{k: x[k] + h})) - f(dict(x, **{k: x[k] - h}))) / (2 * h)
    return out


def _arms(x: dict) -> TwoArm:
    """The two-arm model at the arithmetic's variables (a capacitance moved below zero by a
    linear step is taken as zero)."""
    return TwoArm(x["r1"], max(x["c1"], 0.0), x["r2"], max(x["c2"], 0.0))


def _quantities(c2_held: bool, trimmer_arm: str | None) -> dict:
    """name -> (label, unit, f(x), codes multiplier(x)); the figures are the two-arm
    model's (:class:`~taumatch.chain.two_arm.TwoArm`)."""
    def sum_c(x):
        return x["c1"] + x["c2"]

    def tip_gain(x):  # the tip change per unit gain error at fixed τ: −(C1+C2)·R2/R1
        return -sum_c(x) * x["r2"] / x["r1"]

    q = {
        "hf_dc_error": ("gain error", "", lambda x: _arms(x).hf_dc_error, lambda x: 1.0),
        "shunt_change": ("shunt change", "F", lambda x: _arms(x).shunt_change, sum_c),
        "tip_change": ("tip change", "F", lambda x: _arms(x).tip_change, tip_gain),
        "shunt_required": ("shunt C required", "F", lambda x: _arms(x).required("shunt"),
                           sum_c),
        "tip_required": ("tip C required", "F", lambda x: _arms(x).required("tip"), tip_gain),
    }
    if trimmer_arm == "shunt":
        def required(x):
            present = x["trimmer"] if c2_held else x["c2"] - x["fixed"]
            return present + _arms(x).shunt_change
        q["trimmer_required"] = ("trimmer setting", "F", required, sum_c)
    elif trimmer_arm == "tip":
        q["trimmer_required"] = ("trimmer setting", "F", lambda x: _arms(x).required("tip"),
                                 tip_gain)
    return q


def _c1_following_c2(fit):
    """C1 as the refits found it for C2 held elsewhere: the quadratic through the nominal
    fit and the two refits at the ends of C2's tolerance (None without them)."""
    ends = fit.held_ends.get("c2")
    if not ends:
        return None
    xs = (ends[0][0], fit.c2, ends[1][0])
    ys = (ends[0][1], fit.c1, ends[1][1])

    def c1(c2):
        total = 0.0
        for i in range(3):
            w = 1.0
            for j in range(3):
                if j != i:
                    w *= (c2 - xs[j]) / (xs[i] - xs[j])
            total += w * ys[i]
        return total

    return c1


def _moved(x: dict, a, sign: float, sens: dict, c2_held: bool, c1_of_c2) -> dict:
    """The arithmetic's variables with input ``a`` at one end (sign ±1) of its tolerance."""
    y = dict(x)
    for param, coef in a.maps:
        delta = sign * coef * a.half_width
        if param in _FIT_TO_X:
            y[_FIT_TO_X[param]] += delta
        if param == "c2" and c2_held and c1_of_c2 is not None:
            y["c1"] += c1_of_c2(x["c2"] + delta) - x["c1"]
        else:
            y["c1"] += sens.get("tip_capacitance", {}).get(param, 0.0) * delta
            y["c2"] += sens.get("shunt_capacitance", {}).get(param, 0.0) * delta
    if a.direct is not None:
        y[a.direct] += sign * a.half_width
    return y


def diagnosis_budgets(fit, inputs, *, codes: float = 0.0, chain=None,
                      names=None) -> dict:
    """The budgets of a fitted divider's figures.

    Parameters
    ----------
    fit : taumatch.fit.DividerFit
    inputs : list of taumatch.assumptions.Assumed
        The held and assumed values with their tolerances.
    codes : float
        Gain error (fraction) the codes can hide, taken as a rectangular ± half-width.
    chain : ChainFacts, optional
        For the trimmer's setting (its arm, fixed capacitance and spec value).
    names : sequence of str, optional
        Only these figures.

    Returns
    -------
    dict
        ``{name: Budget}``.
    """
    est = fit.estimates
    c2_held = est["shunt_capacitance"].held
    arm = chain.adjust_arm if chain is not None else None
    x = {"r1": fit.r1, "c1": fit.c1, "r2": fit.r2, "c2": fit.c2,
         "fixed": (chain.fixed_c or 0.0) if arm else 0.0,
         "trimmer": chain.trimmer.present if arm else 0.0}
    u1 = est["tip_capacitance"].stderr or 0.0
    u2 = est["shunt_capacitance"].stderr or 0.0
    rho = fit.correlations.get("shunt_capacitance:tip_capacitance", 0.0) if u1 and u2 else 0.0
    sens = fit.sensitivity
    c1_of_c2 = _c1_following_c2(fit)
    root3 = math.sqrt(3.0)
    out = {}
    for name, (label, unit, f, codes_gain) in _quantities(c2_held, arm).items():
        if names is not None and name not in names:
            continue
        g = _grad(f, x)
        value = float(f(x))
        var = (g["c1"] * u1) ** 2 + (g["c2"] * u2) ** 2 + 2 * rho * g["c1"] * g["c2"] * u1 * u2
        terms = [Term("noise", "noise", math.sqrt(max(var, 0.0)),
                      detail="the fit's standard errors of C1 and C2, with their correlation")]
        if codes > 0:
            terms.append(Term("codes", "codes", abs(codes_gain(x)) * codes / root3,
                              detail=f"a gain error within ±{100 * codes:.2g} % can hide in the "
                                     "converter's codes"))
        edge = est["edge_time"]
        if not edge.resolved and fit.sample_interval:
            # the jump is the plateau's exponential read at the edge's instant, which an
            # unresolved edge places only within its sample interval: a shift δ scales the
            # departure from the DC gain by e^(δ/τ), so the gain error by about δ/τ
            tau = est["time_constant"].value
            half = abs(_arms(x).hf_dc_error) * (0.5 * fit.sample_interval / tau)
            terms.append(Term("edge_instant", "edge instant",
                              abs(codes_gain(x)) * half / root3,
                              detail="an unresolved edge falls anywhere within its sample "
                                     f"interval ({format_quantity(fit.sample_interval, 's')})"))
        if fit.edge_free is not None:
            moved = float(f(dict(x, c1=fit.edge_free["c1"], c2=fit.edge_free["c2"])))
            terms.append(Term("edge_shape", "edge shape", abs(moved - value) / root3,
                              detail="the figure fitted again without the samples near the "
                                     "edges (the model's source edge is first order), taken "
                                     "as rectangular within ± the difference"))
        for a in inputs:
            ends = [float(f(_moved(x, a, sign, sens, c2_held, c1_of_c2))) for sign in (-1, 1)]
            reach_low = max(value - min(ends), 0.0)
            reach_high = max(max(ends) - value, 0.0)
            slope = (ends[1] - ends[0]) / (2 * a.half_width) if a.half_width > 0 else 0.0
            terms.append(Term(a.key, a.label, (reach_low + reach_high) / (2 * root3), slope,
                              a.describe(), reach_low / root3, reach_high / root3))
        out[name] = Budget(name, label, unit, value, tuple(terms))
    return out
