"""Diagnosis of a divider from a captured square wave: verdict, trim and predicted response.

The capture is measured (IEEE Std 181 metrics, coherent averaging), the two-arm divider
model is fitted to the averaged period (:mod:`taumatch.fit`), and the result says

* whether the divider is over-compensated (high-frequency gain above DC gain, peaked
  leading corner), under-compensated (below, rounded corner) or compensated, with the
  gain error and its standard error — compensated within the tolerance, or within the
  capture's own resolution when its noise or codes cannot show the tolerance
  (:mod:`taumatch.resolution`);
* the change of shunt (bottom-arm) capacitance that compensates, R1·C1/R2 − C2, and the
  equivalent change at the tip, each with its standard error;
* the step and square-wave response after the trim, in closed form;
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
from .chain_facts import ChainFacts
from .errors import ComputationError, InputError
from .fit import DEFAULT_SHUNT_C, DividerFit, Estimate, fit_divider
from .no_divider import DividerDoubt, divider_doubt
from .resolution import Resolution, gain_resolution
from .units import format_quantity

__all__ = ["BAD_FIT_RATIO", "DEFAULT_INPUT_R", "DEFAULT_TIP_R", "MISFIT_FLOOR", "NO_DIVIDER",
           "Diagnosis", "diagnose"]

DEFAULT_TIP_R = 9e6   # ohm: a 10:1 divider probe ...
DEFAULT_INPUT_R = 1e6  # ohm: ... on a 1 MΩ instrument input (common practice, no source)
#: residual RMS above this multiple of the noise (with the codes' offset) marks a fit that
#: does not describe the data ...
BAD_FIT_RATIO = 2.0
#: ... when it is also above this fraction of the swing: a smaller misfit cannot move the
#: gain error by as much as the default 1 % tolerance (it widens the error bar instead,
#: through the reduced χ²)
MISFIT_FLOOR = 0.003
#: The verdict when the capture shows no divider (see :mod:`taumatch.no_divider`).
NO_DIVIDER = "no divider"


@dataclass(frozen=True)
class Diagnosis:
    """The answer of :func:`diagnose`; SI units throughout.

    ``verdict`` is "over-compensated", "under-compensated", "compensated" or, when no
    divider was named and the capture shows none, "no divider" (then ``trim`` is empty and
    ``divider_doubt`` holds the figures; a doubt also stands beside a 10:1 verdict when the
    swing is too large for the assumed divider).  ``assumed_divider`` is True when the
    resistances were assumed, not given.  ``band`` is the gain error counted as
    compensated: the tolerance, or the capture's resolution when that is larger.
    """

    verdict: str
    tolerance: float
    fit: DividerFit
    metrics: object
    trim: dict
    warnings: tuple
    assumptions: tuple
    refused: str | None = None
    chain: ChainFacts | None = field(default=None)
    resolution: Resolution | None = None
    divider_doubt: DividerDoubt | None = None
    assumed_divider: bool = False
    budgets: dict = field(default_factory=dict)
    inputs: tuple = ()

    @property
    def hf_dc_error(self) -> Estimate:
        """The gain error with its combined standard uncertainty (noise, codes and what
        was assumed; :attr:`budgets`)."""
        e = self.fit.derived["hf_dc_error"]
        b = self.budgets.get("hf_dc_error")
        return Estimate(e.value, b.stderr if b is not None else e.stderr, "", e.determined)

    @property
    def band(self) -> float:
        """Gain error counted as compensated (fraction): tolerance or resolution."""
        r = self.resolution.gain_error if self.resolution is not None else 0.0
        return max(self.tolerance, r)

    @property
    def resolution_limited(self) -> bool:
        """True when the capture cannot show the tolerance asked for."""
        return self.resolution is not None and self.resolution.gain_error > self.tolerance

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
            "tolerance": self.tolerance,
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
            "trim": self.trim,
            "uncertainty": self.uncertainty_dict() if self.budgets else None,
            "metrics": self.metrics.to_dict() if self.metrics is not None else None,
            "fit": {"residual_rms": f.residual_rms, "noise_rms": f.noise_rms,
                    "points": f.points, "reduced_chi_square": f.redchi},
            "correlations": f.correlations,
            "assumptions": list(self.assumptions),
            "warnings": list(self.warnings),
            "prediction": self.prediction() if self.verdict != NO_DIVIDER else None,
        }
        if self.refused:
            out["refused"] = self.refused
        return out

    def _verdict_line(self) -> str:
        e = self.hf_dc_error
        figure = (f"high/low-frequency gain error {100 * e.value:+.2f} % "
                  f"± {100 * (e.stderr or 0):.2f} %")
        if self.verdict == NO_DIVIDER:
            head, *why = self.divider_doubt.lines()
            return "\n".join([f"verdict: {head}"] + [f"  {w}" for w in why])
        if self.resolution_limited:
            r = self.resolution
            band = f"±{100 * r.gain_error:.2g} %, the resolution of this capture"
            why = f"tolerance ±{100 * self.tolerance:g} % asked, but {r.describe()}"
            if self.verdict == "compensated":
                return f"verdict: compensated within {band} ({figure}; {why})"
            return f"verdict: {self.verdict} ({figure}, beyond {band}; {why})"
        return f"verdict: {self.verdict} ({figure}, tolerance ±{100 * self.tolerance:g} %)"

    def _estimate_lines(self) -> list:
        q = format_quantity
        f = self.fit
        lines = ["estimates:"]
        for k, v in f.estimates.items():
            unit = v.unit
            if not v.resolved:
                lines.append(f"  {k.replace('_', ' '):18s} {'≤ ' + q(v.bound, unit):>12s} "
                             f"(not resolved by the {q(f.sample_interval, 's')} sampling)")
                continue
            err = "held" if v.held else (f"± {q(v.stderr, unit)}" if v.stderr is not None else "")
            flag = "" if v.determined else "  (not determined by the data)"
            if v.note == "consistent with zero":
                flag += "  (consistent with zero)"
            lines.append(f"  {k.replace('_', ' '):18s} {q(v.value, unit):>12s} {err}{flag}")
        lines.append(f"  with tip R {q(f.r1, 'Ω')}, shunt R {q(f.r2, 'Ω')}")
        return lines

    def _budget_lines(self) -> list:
        if not self.budgets:
            return []
        lines = [("uncertainty (standard uncertainties, ± one u; 95 % intervals are ± 2u; "
                  "shares of the variance):")]
        lines += [f"  {b.line()}" for b in self.budgets.values()]
        lines += [f"  assumed: {a.describe()}" for a in self.inputs]
        return lines

    def _trim_lines(self) -> list:
        q = format_quantity
        f = self.fit
        tr = self.trim
        lines = []
        if tr.get("shunt_change") is not None:
            for arm, c, key in (("shunt", f.c2, "shunt"), ("tip", f.c1, "tip")):
                b = self.budgets.get(f"{key}_change")
                ch = tr[f"{key}_change"]
                sign = "add" if ch > 0 else "remove"
                lo, hi = b.interval if b is not None else (ch, ch)
                head = "trim at the shunt arm:" if arm == "shunt" else "  or at the tip arm: "
                cname = "C2" if arm == "shunt" else "C1"
                u = q(tr[key + "_change_stderr"] or 0, "F")
                lines.append(f"{head} {sign} {q(abs(ch), 'F')} ± {u} ({cname} → {q(c + ch, 'F')};"
                             f" change 95 %: {_signed(lo)} to {_signed(hi)})")
        if tr.get("part") is not None:
            rng = "inside" if tr.get("in_range") else "OUTSIDE"
            lines.append(f"  trimmer (part {tr['part']}, {tr['field']}): now about "
                         f"{q(tr['present'], 'F')} (spec says {q(tr['present_in_spec'], 'F')}) → "
                         f"set {q(tr['required'], 'F')} ± {q(tr['required_stderr'] or 0, 'F')}, "
                         f"{rng} its range")
        return lines

    def summary(self) -> str:
        q = format_quantity
        f = self.fit
        lines = []
        if self.refused:
            lines.append(f"!! WARNING: forced past a refusal: {self.refused}")
        lines.append(self._verdict_line())
        if self.divider_doubt is not None and not self.divider_doubt.flat:
            lines.extend(f"  {w}" for w in self.divider_doubt.lines())
        lines.extend(self._trim_lines())
        if self.verdict == NO_DIVIDER:
            m = self.metrics
            rise = m.rising.duration if m.rising is not None else float("nan")
            lines.append(f"measured: swing {q(m.amplitude, 'V')}, period {q(m.period, 's')}, "
                         f"rising edge 10-90 % {q(rise, 's')}")
        else:
            lines.extend(self._estimate_lines())
            pr = self.prediction()
            b, a = pr["before"], pr["after"]
            rise = (f"rise time {q(a['rise_time'], 's')}" if a["rise_time"] is not None else
                    f"rise time ≤ {q(a['rise_time_bound'], 's')} (the source edge is not "
                    "resolved, so neither is the rise time)")
            lines.append(f"step after the trim: flat within {a['flatness']:.2g} % from five edge "
                         f"times on (now {b['flatness']:.3g} %), overshoot {a['overshoot']:.2f} %, "
                         f"{rise}")
            lines.extend(self._budget_lines())
        lines.append(f"fit: residual {q(f.residual_rms, 'V')} rms against noise "
                     f"{q(f.noise_rms, 'V')} rms, {f.points} points")
        for a in self.assumptions:
            lines.append(f"note: {a}")
        for w in self.warnings:
            lines.append(f"warning: {w}")
        return "\n".join(lines)

    def prediction(self) -> dict:
        """See :attr:`_prediction` (computed once per diagnosis)."""
        return self._prediction

    @cached_property
    def _prediction(self) -> dict:
        """The step after the trim, from the fitted chain in closed form.

        Returns the 10–90 % rise time (s; None with ``rise_time_bound`` instead when the
        source edge is not resolved: then the rise time after the trim is at most the one
        with the edge at its bound), the overshoot (% of the final value) and the largest
        departure of the step from its final value five source-edge times after the edge
        (% of the final value), before and after the trim, plus the predicted square-wave
        period on a coarse grid (``times`` in s from the rising edge, ``before``, ``after`` in V).
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
            rise = float(rise_time(H).rise_time)
            entry = {"rise_time": rise, "overshoot": float(100 * max(y.max() - 1, 0)),
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

    def plot(self, axes=None):
        """Capture, fit and predicted trimmed response; returns ``(fig, axes)``."""
        from .plot.diagnosis import plot_diagnosis

        return plot_diagnosis(self, axes=axes)




def _signed(c: float) -> str:
    return ("+" if c >= 0 else "−") + format_quantity(abs(c), "F")


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


def _trimmer(chain: ChainFacts, fit: DividerFit, budgets: dict, warnings: list) -> dict:
    """The trimmer's setting from the fitted arms and the chain's fixed parts."""
    sc, tc = fit.derived["shunt_change"], fit.derived["tip_change"]
    shunt_arm = chain.adjust_arm == "shunt"
    change = sc.value if shunt_arm else tc.value
    # the trimmer's value now, as the fit sees it: the fitted arm less its fixed parts
    if shunt_arm and not fit.estimates["shunt_capacitance"].held:
        present = fit.c2 - chain.fixed_c
    elif not shunt_arm:
        present = fit.c1
    else:
        present = chain.adjust_present
    required = present + change
    b = budgets["trimmer_required"]
    lo = chain.adjust_min if chain.adjust_min is not None else 0.0
    hi = chain.adjust_max if chain.adjust_max is not None else math.inf
    in_range = bool(lo <= required <= hi and required > 0)
    if not in_range:
        warnings.append(f"the trimmer (part {chain.adjust_part}) cannot reach "
                        f"{format_quantity(required, 'F')}: change a fixed capacitor too")
    return {"part": chain.adjust_part, "field": chain.adjust_field, "arm": chain.adjust_arm,
            "present": present, "present_in_spec": chain.adjust_present,
            "required": required, "required_stderr": b.stderr,
            "change": change, "change_stderr": budgets[f"{chain.adjust_arm}_change"].stderr,
            "in_range": in_range}


def _dither(m) -> float:
    """Noise (V rms) that dithers the codes for the average: the smaller of the raw
    record's sample-to-sample noise (zero when most samples repeat the one before) and
    the scatter of one sample from period to period (small when the sampling is locked to
    the signal, so every period lands on the same codes)."""
    ap = m.averaged
    across = ap.noise_rms_after * math.sqrt(ap.n_periods) if ap.n_periods >= 2 else (
        ap.noise_rms_before)
    return float(min(m.dither, across)) if np.isfinite(across) else float(m.dither)


def diagnose(data, channel: str | None = None, *, tip_r: float | None = None,
             input_r: float | None = None, shunt_c: float | None = None,
             tolerance: float = 0.01, chain: ChainFacts | None = None,
             force: bool = False, tolerances=None) -> Diagnosis:
    """Diagnose the compensation of a divider from a square-wave capture.

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        The capture (time in s, samples in V).
    channel : str, optional
        Channel of the capture.
    tip_r, input_r : float, optional
        Tip-arm and shunt-arm resistance (ohm); from ``chain`` or 9 MΩ and 1 MΩ (then a
        capture that shows no divider is read as taken at 1X).
    shunt_c : float, optional
        Nominal shunt capacitance (F), held when the capture cannot fix it.
    tolerance : float
        Gain error counted as compensated (fraction, 0.01 = ±1 %); widened to the
        capture's resolution, and said so, when the capture cannot show it.
    chain : ChainFacts, optional
        Facts from a chain spec (resistances, nominal capacitance, the trimmer).
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
        Bad options, or a capture without a usable step.
    ComputationError
        When the diagnosis refuses (clipped, edgeless, badly or unphysically fitted
        capture) and ``force`` is not set, or the fit does not converge.
    """
    from .pulse import measure

    if not (0 < tolerance < 1):
        raise InputError(f"tolerance must lie between 0 and 100 %, got {tolerance!r}")
    overrides = parse_tol_options(tolerances)
    assumptions = []
    r1 = tip_r if tip_r is not None else (chain.tip_r if chain else None)
    r2 = input_r if input_r is not None else (chain.shunt_r if chain else None)
    r_given = {"tip_r": "option" if tip_r is not None else ("chain" if chain else "assumed"),
               "shunt_r": "option" if input_r is not None else ("chain" if chain else "assumed")}
    assumed = r1 is None or r2 is None
    if assumed:
        assumptions.append("no chain given: a 10:1 probe (tip 9 MΩ) on a 1 MΩ input assumed")
    r1 = DEFAULT_TIP_R if r1 is None else r1
    r2 = DEFAULT_INPUT_R if r2 is None else r2
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
        raise ComputationError("no trim: " + "; ".join(pre) + " (use --force to override)")
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
    eb = budgets["hf_dc_error"]
    u_e = eb.stderr
    # the resolution's own share: everything but the codes (counted there separately)
    rest = [t for t in eb.terms if t.key != "codes"]
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
                               + " (use --force to override)")
    refused = "; ".join(problems) if problems else None
    if refused:
        warnings.insert(0, "FORCED: " + refused + " — the trim below may be wrong")
    band = max(tolerance, res.gain_error)
    if abs(e.value) <= band:
        verdict = "compensated"
    elif e.value > 0:
        verdict = "over-compensated"
    else:
        verdict = "under-compensated"
    reason = "the resolution of this capture" if band > tolerance else "the tolerance"
    doubt = (divider_doubt(m.amplitude, (r1 + r2) / r2, e.value, u_e, band, reason)
             if assumed else None)
    if (res.gain_error <= tolerance and not (doubt and doubt.flat)
            and abs(abs(e.value) - tolerance) < 2 * u_e):
        warnings.append(f"the gain error lies within two standard uncertainties of the tolerance "
                        f"(±{100 * tolerance:g} %): the verdict is marginal")
    if doubt is not None and doubt.flat and not refused:
        # the 10:1 reading's notes (held shunt capacitance, ...) do not apply
        return Diagnosis(verdict=NO_DIVIDER, tolerance=tolerance, fit=fit, metrics=m, trim={},
                         warnings=tuple(warnings), assumptions=(),
                         chain=chain, resolution=res, divider_doubt=doubt, assumed_divider=True,
                         budgets={"hf_dc_error": eb})
    sc, tc = fit.derived["shunt_change"], fit.derived["tip_change"]
    trim = {"shunt_change": sc.value, "shunt_change_stderr": budgets["shunt_change"].stderr,
            "tip_change": tc.value, "tip_change_stderr": budgets["tip_change"].stderr,
            "shunt_required": fit.c2 + sc.value, "tip_required": fit.c1 + tc.value}
    if chain is not None and chain.adjust_part is not None:
        trim.update(_trimmer(chain, fit, budgets, warnings))
    return Diagnosis(verdict=verdict, tolerance=tolerance, fit=fit, metrics=m, trim=trim,
                     warnings=tuple(warnings), assumptions=tuple(assumptions), refused=refused,
                     chain=chain, resolution=res, divider_doubt=doubt, assumed_divider=assumed,
                     budgets=budgets, inputs=tuple(inputs))
