"""Diagnosis of a divider from a captured square wave: verdict, trim and predicted response.

The capture is measured (IEEE Std 181 metrics, coherent averaging), the two-arm divider
model is fitted to the averaged period (:mod:`taumatch.fit`), and the result says

* whether the divider is over-compensated (high-frequency gain above DC gain, peaked
  leading corner), under-compensated (below, rounded corner) or compensated, with the
  gain error and its standard uncertainty — compensated within the acceptance band, or
  within the capture's own resolution when its noise or codes cannot show that band
  (:mod:`taumatch.resolution`); the verdict is the package's one
  :func:`~taumatch.chain.compensation.compensation_state`;
* the change of shunt (bottom-arm) capacitance that compensates, R1·C1/R2 − C2, the
  equivalent change at the tip and, with a chain spec's trimmer, its setting — each the
  package's one trim record (:mod:`taumatch.trimming`) on the two-arm model
  (:class:`~taumatch.chain.two_arm.TwoArm`);
* the uncertainty of each figure, term by term: the noise, the codes, and every value the
  diagnosis held or assumed with its tolerance (:mod:`taumatch.budget`);
* the step and square-wave response after the trim, in closed form;
* the usual cautions when the source is at a hazardous voltage (:mod:`taumatch.safety`);
* when no divider was named and the capture shows none, that it was taken at 1X
  (:mod:`taumatch.no_divider`), with the figures that say so, and no trim.

A trim is never given silently from a clipped, edgeless, badly fitted or unphysically
fitted capture: the diagnosis refuses with the reason, or, when forced, carries a loud
warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .assumptions import (
    check_overrides,
    diagnosis_inputs,
    held_shunt_tolerance,
    parse_tol_options,
    plausibility_notes,
)
from .budget import CONFIDENCE, COVERAGE_FACTOR, diagnosis_budgets
from .chain.compensation import DEFAULT_ACCEPT, Trim, compensation_state
from .chain_facts import ChainFacts
from .errors import ComputationError, InputError
from .fit import DEFAULT_SHUNT_C, DividerFit, Estimate, fit_divider
from .no_divider import DividerDoubt, divider_doubt
from .resolution import Resolution, gain_resolution
from .trimming import arm_trims, trimmer_trim
from .units import format_quantity

__all__ = ["BAD_FIT_RATIO", "DEFAULT_SHUNT_R", "DEFAULT_TIP_R", "MISFIT_FLOOR", "NO_DIVIDER",
           "Diagnosis", "diagnose"]

DEFAULT_TIP_R = 9e6   # ohm: a 10:1 divider probe ...
DEFAULT_SHUNT_R = 1e6  # ohm: ... on a 1 MΩ instrument input (common practice, no source)
#: residual RMS above this multiple of the noise (with the codes' offset) marks a fit that
#: does not describe the data ...
BAD_FIT_RATIO = 2.0
#: ... when it is also above this fraction of the swing: a smaller misfit cannot move the
#: gain error by as much as the default 1 % acceptance band (it widens the error bar instead,
#: through the reduced χ²)
MISFIT_FLOOR = 0.003
#: The verdict when the capture shows no divider (see :mod:`taumatch.no_divider`).
NO_DIVIDER = "no divider"
#: A band this wide (a capture whose codes hide any gain error below ±99 %) is held here
#: for the verdict and the trim records, which take a fraction below one.
MAX_BAND = 0.99


@dataclass(frozen=True)
class Diagnosis:
    """The answer of :func:`diagnose`; SI units throughout.

    ``verdict`` is "over-compensated", "under-compensated", "compensated" or, when no
    divider was named and the capture shows none, "no divider" (then ``trim`` is None and
    ``divider_doubt`` holds the figures; a doubt also stands beside a 10:1 verdict when the
    swing is too large for the assumed divider).  ``trim`` is the adjustment to make: the
    chain's trimmer when the spec marks one, else the shunt arm's capacitance;
    ``arm_trims`` holds both arms' (``"shunt"``, ``"tip"``).  ``assumed_divider`` is True
    when the resistances were assumed, not given.  ``band`` is the gain error counted as
    compensated: ``accept``, or the capture's resolution when that is larger.
    ``budgets`` holds each figure's uncertainty budget, ``inputs`` the held and assumed
    values with their tolerances, ``cautions`` the high-voltage cautions (empty below the
    threshold).
    """

    verdict: str
    accept: float
    fit: DividerFit
    metrics: object
    trim: Trim | None
    warnings: tuple
    assumptions: tuple
    refused: str | None = None
    chain: ChainFacts | None = field(default=None)
    resolution: Resolution | None = None
    divider_doubt: DividerDoubt | None = None
    assumed_divider: bool = False
    budgets: dict = field(default_factory=dict)
    inputs: tuple = ()
    arm_trims: dict = field(default_factory=dict)
    cautions: tuple = ()

    @property
    def hf_dc_error(self) -> Estimate:
        """The gain error with its combined standard uncertainty (noise, codes and what
        was assumed; :attr:`budgets`)."""
        e = self.fit.derived["hf_dc_error"]
        b = self.budgets.get("hf_dc_error")
        return Estimate(e.value, b.stderr if b is not None else e.stderr, "", e.determined)

    @property
    def band(self) -> float:
        """Gain error counted as compensated (fraction): ``accept`` or the resolution."""
        r = self.resolution.gain_error if self.resolution is not None else 0.0
        return max(self.accept, r)

    @property
    def resolution_limited(self) -> bool:
        """True when the capture cannot show the acceptance band asked for."""
        return self.resolution is not None and self.resolution.gain_error > self.accept

    def _estimates_dict(self) -> dict:
        out = {}
        for k, v in self.fit.estimates.items():
            d = {"value": v.value if v.resolved else None, "stderr": v.stderr,
                 "determined": v.determined, "held": v.held}
            if not v.resolved:
                d.update(upper_bound=v.bound, resolved=False)
            if v.note:
                d["note"] = v.note
            out[k] = d
        return out

    def uncertainty_dict(self) -> dict:
        """The budget as JSON: what was assumed, and each figure's terms."""
        return {"coverage_factor": COVERAGE_FACTOR, "confidence": CONFIDENCE,
                "assumed": [a.to_dict() for a in self.inputs],
                "budgets": {k: b.to_dict() for k, b in self.budgets.items()}}

    def to_dict(self) -> dict:
        f = self.fit
        e = self.hf_dc_error
        out = {
            "verdict": self.verdict,
            "accept": self.accept,
            "band": self.band,
            "resolution_limited": self.resolution_limited,
            "hf_dc_error": {"value": e.value, "stderr": e.stderr,
                            "fit_stderr": f.derived["hf_dc_error"].stderr,
                            "resolution": (self.resolution.gain_error
                                           if self.resolution is not None else None)},
            "resolution": self.resolution.to_dict() if self.resolution is not None else None,
            "divider": (self.divider_doubt.to_dict() if self.divider_doubt is not None
                        else {"status": "assumed" if self.assumed_divider else "given"}),
            "estimates": self._estimates_dict(),
            "resistances": {"tip": f.r1, "shunt": f.r2},
            "trim": self.trim.to_dict() if self.trim is not None else None,
            "arm_trims": {k: t.to_dict() for k, t in self.arm_trims.items()},
            "uncertainty": self.uncertainty_dict() if self.budgets else None,
            "metrics": self.metrics.to_dict() if self.metrics is not None else None,
            "fit": {"residual_rms": f.residual_rms, "noise_rms": f.noise_rms,
                    "points": f.points, "reduced_chi_square": f.redchi},
            "correlations": f.correlations,
            "assumptions": list(self.assumptions),
            "warnings": list(self.warnings),
            "cautions": list(self.cautions),
            "prediction": self.prediction() if self.trim is not None else None,
        }
        if self.refused:
            out["refused"] = self.refused
        return out

    def summary(self) -> str:
        """Verdict, trims, estimates, the step after the trim, the budget and the notes."""
        from .diagnosis_text import summary_lines

        return "\n".join(summary_lines(self))

    def prediction(self) -> dict:
        """See :attr:`_prediction` (computed once per diagnosis)."""
        return self._prediction

    @cached_property
    def _prediction(self) -> dict:
        """The step after the trim, from the fitted chain in closed form.

        Returns the 10–90 % rise time (s, :func:`taumatch.analysis.bandwidth.rise_time`;
        None with ``rise_time_bound`` instead when the source edge is not resolved: then the
        rise time is at most the one with the edge at its bound), the overshoot (% of the
        final value) and the largest departure of the step from its final value five
        source-edge times after the edge (% of the final value), before and after the
        trim, plus the predicted square-wave period on a coarse grid (``times`` in s from
        the rising edge, ``before``, ``after`` in V).
        """
        from .analysis.bandwidth import rise_time

        edge_est = self.fit.estimates["edge_time"]
        out = {}
        for key, trimmed in (("before", False), ("after", True)):
            H = self.fit.transfer(trimmed=trimmed)
            final = H.dc_gain
            edge = max(edge_est.value, 1e-12)
            tau = self.fit.estimates["time_constant"].value
            t = np.concatenate([np.linspace(0, 20 * edge, 4001)[1:],
                                np.geomspace(20 * edge, max(5 * tau, 40 * edge), 2000)])
            y = H.step(t) / final
            late = t > 5 * edge
            entry = {"rise_time": float(rise_time(H).rise_time),
                     "overshoot": float(100 * max(y.max() - 1, 0)),
                     "flatness": float(100 * np.max(np.abs(y[late] - 1))) if late.any() else None}
            if not edge_est.resolved:
                slow = self.fit.transfer(trimmed=trimmed, edge_time=edge_est.bound)
                entry.update(rise_time=None, rise_time_bound=float(rise_time(slow).rise_time))
            out[key] = entry
        tt = np.linspace(self.fit.t[0], self.fit.t[-1], 400)
        out["times"] = tt
        out["square_before"] = self.fit.model(tt, trimmed=False)
        out["square_after"] = self.fit.model(tt, trimmed=True)
        return out

    @cached_property
    def curves(self):
        """What the picture draws (:class:`~taumatch.diagnosis_curves.DiagnosisCurves`)."""
        from .diagnosis_curves import diagnosis_curves

        return diagnosis_curves(self)

    def plot(self, ax=None):
        """Capture, fit and predicted trimmed response; returns ``(fig, axes)``.

        ``ax``: none (a new figure of five panels), or a sequence of two axes (the period
        and the residual) or five (with the corner, gain and phase)."""
        from .plot.diagnosis import plot_diagnosis

        return plot_diagnosis(self.curves, ax=ax)


def _pre_refusals(m) -> list:
    """Reasons a capture cannot be fitted at all: clipped, or no full period."""
    out = [r.describe(m.period if m.periods_averaged else None) for r in m.rails]
    if m.averaged is None or m.periods_averaged < 1:
        out.append(f"the capture holds no full period of the square wave ({m.edges} edge(s) "
                   "found; a diagnosis needs two rising edges with a falling one between): "
                   "record at least two periods")
    return out


def _fit_problems(fit: DividerFit, res: Resolution, swing: float, u_e: float | None) -> list:
    """Reasons a fit cannot carry a trim: gain error undetermined (``u_e``: its standard
    uncertainty but for the codes' share, which the resolution states instead), no physical
    divider, a model that does not describe the capture."""
    out = []
    e = fit.derived["hf_dc_error"]
    if u_e is None or not np.isfinite(u_e) or u_e > max(0.1, abs(e.value)):
        se = "unknown" if u_e is None else f"±{100 * u_e:.3g} %"
        out.append(f"the capture does not determine the gain error ({se}); a square wave "
                   "much faster than the divider's time constant hides the DC gain — use a "
                   "period of at least a few time constants")
    if fit.degenerate:
        out.append(f"the only fit that describes the capture is no physical divider "
                   f"({fit.degenerate}); the gain error and trim it gives mean nothing")
    budget = math.hypot(fit.noise_rms, res.offset_rms)
    if fit.residual_rms > BAD_FIT_RATIO * budget and fit.residual_rms > MISFIT_FLOOR * swing:
        codes = (f" and the codes' offset {format_quantity(res.offset_rms, 'V')} rms"
                 if res.offset_rms > 0.1 * fit.noise_rms else "")
        out.append(f"the divider model does not describe the capture (residual "
                   f"{format_quantity(fit.residual_rms, 'V')} rms against noise "
                   f"{format_quantity(fit.noise_rms, 'V')} rms{codes})")
    return out


def _dither(m) -> float:
    """Noise (V rms) that dithers the codes for the average: the smaller of the raw
    record's sample-to-sample noise (zero when most samples repeat the one before) and
    the scatter of one sample from period to period (small when the sampling is locked to
    the signal, so every period lands on the same codes)."""
    ap = m.averaged
    across = ap.noise_rms_after * math.sqrt(ap.n_periods) if ap.n_periods >= 2 else (
        ap.noise_rms_before)
    return float(min(m.dither, across)) if np.isfinite(across) else float(m.dither)


def _cautions(fit, m, chain, doubt) -> tuple:
    """The usual cautions when the source swings to a hazardous voltage: the fitted source
    step (the displayed swing over the divider's DC gain; the displayed swing itself when
    the capture shows no divider), or the chain spec's source amplitude if larger."""
    from .safety import cautions

    if doubt is not None and doubt.flat:
        peak = abs(m.amplitude)
    else:
        peak = abs(fit.estimates["amplitude"].value)
    if chain is not None and chain.source_amplitude is not None:
        peak = max(peak, chain.source_amplitude)
    period = m.period if m.period else None
    return tuple(cautions(peak, "ac", frequency=1.0 / period if period else None,
                          trimmer_at_high_voltage=chain is not None
                          and chain.adjust_arm == "tip"))


def diagnose(data, channel: str | None = None, *, tip_r: float | None = None,
             shunt_r: float | None = None, shunt_c: float | None = None,
             accept: float = DEFAULT_ACCEPT, chain: ChainFacts | None = None,
             force: bool = False, tolerances=None) -> Diagnosis:
    """Diagnose the compensation of a divider from a square-wave capture.

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        The capture (time in s, samples in V).
    channel : str, optional
        Channel of the capture.
    tip_r, shunt_r : float, optional
        Tip-arm resistance R1 and shunt-arm resistance R2 (ohm; R2 is usually the
        instrument input); from ``chain`` or 9 MΩ and 1 MΩ (then a capture that shows no
        divider is read as taken at 1X).
    shunt_c : float, optional
        Nominal shunt capacitance (F), held when the capture cannot fix it.
    accept : float
        Gain error accepted as compensated (fraction, 0.01 = ±1 %); widened to the
        capture's resolution, and said so, when the capture cannot show it.
    chain : ChainFacts, optional
        Facts from a chain spec (:func:`taumatch.chain_facts.facts_from_spec`: the two-arm
        divider, the trimmer, the lead loop, the tolerances, the source amplitude).
    force : bool
        Give the trim even when the capture or fit is not trustworthy (with a warning).
    tolerances : sequence of str, optional
        Tolerances of held and assumed values, ``"NAME=TOL"`` as ``--tol`` takes them
        (``"shunt-c=20%"``, ``"tip-r=50k"``; names in :mod:`taumatch.assumptions`); the
        others come from the chain spec or the defaults.  Every figure's uncertainty
        includes them (:attr:`Diagnosis.budgets`).

    Raises
    ------
    InputError
        Bad arguments, or a capture without a usable step.
    ComputationError
        When the diagnosis refuses (clipped, edgeless, badly or unphysically fitted
        capture) and ``force`` is not set, or the fit does not converge.
    """
    from .pulse import measure

    if not (0 < accept < 1):
        raise InputError(f"accept: the gain error accepted as compensated must lie between "
                         f"0 and 100 %, got {accept!r}")
    overrides = parse_tol_options(tolerances)
    assumptions = []
    r1 = tip_r if tip_r is not None else (chain.tip_r if chain else None)
    r2 = shunt_r if shunt_r is not None else (chain.shunt_r if chain else None)
    r_given = {"tip_r": "option" if tip_r is not None else ("chain" if chain else "assumed"),
               "shunt_r": "option" if shunt_r is not None else ("chain" if chain else "assumed")}
    assumed = r1 is None or r2 is None
    if assumed:
        assumptions.append("no chain given: a 10:1 probe (tip 9 MΩ) on a 1 MΩ input assumed")
    r1 = DEFAULT_TIP_R if r1 is None else r1
    r2 = DEFAULT_SHUNT_R if r2 is None else r2
    c2_nom = shunt_c if shunt_c is not None else (chain.shunt_c if chain else None)
    shunt_c_from = ("option" if shunt_c is not None else
                    "chain" if chain is not None and chain.shunt_c is not None else "default")
    implausible = plausibility_notes(r1, r2, c2_nom)
    assumptions.extend(implausible)
    m = measure(data, channel)
    warnings = [w for w in m.warnings if not w.startswith("clipped")]
    pre = _pre_refusals(m)
    if m.averaged is None:  # nothing to fit, forced or not
        raise ComputationError("no trim: " + "; ".join(pre))
    if pre and not force:
        raise ComputationError("no trim: " + "; ".join(pre) + " (use force=True to override)")
    ap = m.averaged
    lead = (chain.lead_l, chain.lead_r) if chain is not None and chain.lead_l > 0 else None
    c2_hold = DEFAULT_SHUNT_C if c2_nom is None else c2_nom
    try:
        fit = fit_divider(ap.t, ap.v, ap.period, ap.duty, noise_rms=ap.noise_rms_after, r1=r1,
                          r2=r2, shunt_nominal=c2_hold, lead=lead,
                          shunt_tolerance=held_shunt_tolerance(c2_hold, shunt_c_from, chain=chain,
                                                               overrides=overrides))
    except (ComputationError, InputError) as exc:
        if not implausible:
            raise
        raise type(exc)(f"{exc}; note: {'; '.join(implausible)}") from None
    assumptions.extend(fit.notes)
    e = fit.derived["hf_dc_error"]
    inputs = diagnosis_inputs(fit, chain=chain, overrides=overrides, r_given=r_given,
                              shunt_c_from=shunt_c_from)
    assumptions.extend(check_overrides(overrides, inputs))
    dither = _dither(m)
    codes = gain_resolution(m.code, dither, m.amplitude, None).quantisation
    budgets = diagnosis_budgets(fit, inputs, codes=codes if math.isfinite(codes) else 0.0,
                                chain=chain)
    u_e = budgets["hf_dc_error"].stderr
    # the resolution's own share: everything but the codes (counted there separately)
    rest = [t for t in budgets["hf_dc_error"].terms if t.key != "codes"]
    top = max(rest, key=lambda t: t.u)
    u_rest = math.sqrt(sum(t.u**2 for t in rest))
    res = gain_resolution(m.code, dither, m.amplitude, u_rest,
                          noise_from=("by the noise after averaging" if top.key == "noise"
                                      else f"mostly by the tolerance of the {top.label}"))
    if "tilt" in m.flags and fit.residual_rms <= BAD_FIT_RATIO * fit.noise_rms:
        # the sloping plateaus are the mis-compensation itself, and the fit explains them
        warnings = [w for w in warnings if "slope" not in w]
    problems = pre + _fit_problems(fit, res, m.amplitude, u_rest)
    if problems and not force:
        notes = "".join(f"; note: {n}" for n in implausible)
        raise ComputationError("no trim: " + "; ".join(problems) + notes
                               + " (use force=True to override)")
    refused = "; ".join(problems) if problems else None
    if refused:
        warnings.insert(0, "FORCED: " + refused + " — the trim below may be wrong")
    band = min(max(accept, res.gain_error), MAX_BAND)
    verdict = compensation_state(e.value, band)
    reason = "the resolution of this capture" if band > accept else "the acceptance band"
    doubt = (divider_doubt(m.amplitude, (r1 + r2) / r2, e.value, u_e, band, reason)
             if assumed else None)
    if (res.gain_error <= accept and not (doubt and doubt.flat)
            and abs(abs(e.value) - accept) < 2 * u_e):
        warnings.append(f"the gain error lies within two standard uncertainties of the "
                        f"acceptance band (±{100 * accept:g} %): the verdict is marginal")
    common = {"accept": accept, "fit": fit, "metrics": m, "chain": chain, "resolution": res,
              "divider_doubt": doubt, "cautions": _cautions(fit, m, chain, doubt)}
    if doubt is not None and doubt.flat and not refused:
        # the 10:1 reading's notes (held shunt capacitance, ...) do not apply
        return Diagnosis(verdict=NO_DIVIDER, trim=None, warnings=tuple(warnings),
                         assumptions=(), assumed_divider=True,
                         budgets={"hf_dc_error": budgets["hf_dc_error"]}, **common)
    arms = arm_trims(fit, budgets, band)
    trim = arms["shunt"]
    if chain is not None and chain.trimmer is not None:
        trim = trimmer_trim(fit, budgets, band, chain, warnings)
    return Diagnosis(verdict=verdict, trim=trim, warnings=tuple(warnings),
                     assumptions=tuple(assumptions), refused=refused, assumed_divider=assumed,
                     budgets=budgets, inputs=tuple(inputs), arm_trims=arms, **common)
