"""Diagnosis of a divider from a captured square wave: verdict, trim and predicted response.

The capture is measured (IEEE Std 181 metrics, coherent averaging), the two-arm divider
model is fitted to the averaged period (:mod:`taumatch.fit`), and the result says

* whether the divider is over-compensated (high-frequency gain above DC gain, peaked
  leading corner), under-compensated (below, rounded corner) or compensated within a
  tolerance, with the gain error and its standard error;
* the change of shunt (bottom-arm) capacitance that compensates, R1·C1/R2 − C2, and the
  equivalent change at the tip, each with its standard error;
* the step and square-wave response after the trim, in closed form.

A trim is never given silently from a clipped, edgeless or badly fitted capture: the
diagnosis refuses with the reason, or, when forced, carries a loud warning.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .errors import ComputationError, InputError
from .fit import DividerFit, fit_divider
from .units import format_quantity

__all__ = ["DEFAULT_INPUT_R", "DEFAULT_TIP_R", "ChainFacts", "Diagnosis", "diagnose"]

DEFAULT_TIP_R = 9e6   # ohm: a 10:1 divider probe ...
DEFAULT_INPUT_R = 1e6  # ohm: ... on a 1 MΩ instrument input (common practice, no source)
#: residual RMS above this multiple of the noise marks a fit that does not describe the data
BAD_FIT_RATIO = 2.0


@dataclass(frozen=True)
class ChainFacts:
    """What a chain spec tells the diagnosis: resistances, nominal shunt C and the trimmer.

    Attributes
    ----------
    tip_r, shunt_r : float
        Tip-arm and shunt-arm resistance (ohm).
    shunt_c, tip_c : float or None
        Nominal total shunt and tip capacitance (F).
    adjust_part, adjust_field : int or None, str or None
        1-based part number and field of the trimmer, if the spec marks one.
    adjust_arm : {"shunt", "tip"} or None
        Which arm the trimmer sits in.
    adjust_present, adjust_min, adjust_max : float or None
        Present value and range of the trimmer (F).
    lead_l, lead_r : float
        Series inductance (H) between the source and the tip arm (ground lead, tip wiring) and
        the loop's resistance (ohm, the source's included).
    name : str
        The chain's name.
    """

    tip_r: float
    shunt_r: float
    shunt_c: float | None = None
    tip_c: float | None = None
    lead_l: float = 0.0
    lead_r: float = 0.0
    adjust_part: int | None = None
    adjust_field: str | None = None
    adjust_arm: str | None = None
    adjust_present: float | None = None
    adjust_min: float | None = None
    adjust_max: float | None = None
    name: str = ""


@dataclass(frozen=True)
class Diagnosis:
    """The answer of :func:`diagnose`; SI units throughout."""

    verdict: str
    tolerance: float
    fit: DividerFit
    metrics: object
    trim: dict
    warnings: tuple
    assumptions: tuple
    refused: str | None = None
    chain: ChainFacts | None = field(default=None)

    @property
    def hf_dc_error(self):
        return self.fit.derived["hf_dc_error"]

    def to_dict(self) -> dict:
        f = self.fit
        e = self.hf_dc_error
        est = {k: {"value": v.value, "stderr": v.stderr, "determined": v.determined,
                   "held": v.held, **({"note": v.note} if v.note else {})}
               for k, v in f.estimates.items()}
        out = {
            "verdict": self.verdict,
            "tolerance": self.tolerance,
            "hf_dc_error": {"value": e.value, "stderr": e.stderr},
            "estimates": est,
            "resistances": {"tip": f.r1, "shunt": f.r2},
            "trim": self.trim,
            "metrics": self.metrics.to_dict() if self.metrics is not None else None,
            "fit": {"residual_rms": f.residual_rms, "noise_rms": f.noise_rms,
                    "points": f.points, "reduced_chi_square": f.redchi},
            "correlations": f.correlations,
            "assumptions": list(self.assumptions),
            "warnings": list(self.warnings),
            "prediction": self.prediction(),
        }
        if self.refused:
            out["refused"] = self.refused
        return out

    def summary(self) -> str:
        q = format_quantity
        f = self.fit
        e = self.hf_dc_error
        lines = []
        if self.refused:
            lines.append(f"!! WARNING: forced past a refusal: {self.refused}")
        lines.append(f"verdict: {self.verdict} (high/low-frequency gain error "
                     f"{100 * e.value:+.2f} % ± {100 * (e.stderr or 0):.2f} %, tolerance "
                     f"±{100 * self.tolerance:g} %)")
        tr = self.trim
        if tr.get("shunt_change") is not None:
            sign = "add" if tr["shunt_change"] > 0 else "remove"
            lines.append(f"trim at the shunt arm: {sign} {q(abs(tr['shunt_change']), 'F')} "
                         f"± {q(tr['shunt_change_stderr'] or 0, 'F')} (C2 → "
                         f"{q(f.c2 + tr['shunt_change'], 'F')})")
            sign = "add" if tr["tip_change"] > 0 else "remove"
            lines.append(f"  or at the tip arm:  {sign} {q(abs(tr['tip_change']), 'F')} "
                         f"± {q(tr['tip_change_stderr'] or 0, 'F')} (C1 → "
                         f"{q(f.c1 + tr['tip_change'], 'F')})")
        if tr.get("part") is not None:
            rng = "inside" if tr.get("in_range") else "OUTSIDE"
            lines.append(f"  trimmer (part {tr['part']}, {tr['field']}): now about "
                         f"{q(tr['present'], 'F')} (spec says {q(tr['present_in_spec'], 'F')}) → "
                         f"set {q(tr['required'], 'F')} ± {q(tr['required_stderr'] or 0, 'F')}, "
                         f"{rng} its range")
        lines.append("estimates:")
        for k, v in f.estimates.items():
            unit = v.unit
            err = "held" if v.held else (f"± {q(v.stderr, unit)}" if v.stderr is not None else "")
            flag = "" if v.determined else "  (not determined by the data)"
            lines.append(f"  {k.replace('_', ' '):18s} {q(v.value, unit):>12s} {err}{flag}")
        lines.append(f"  with tip R {q(f.r1, 'Ω')}, shunt R {q(f.r2, 'Ω')}")
        pr = self.prediction()
        b, a = pr["before"], pr["after"]
        lines.append(f"step after the trim: flat within {a['flatness']:.2g} % from five edge times on "
                     f"(now {b['flatness']:.3g} %), overshoot {a['overshoot']:.2f} %, rise time "
                     f"{q(a['rise_time'], 's')}")
        lines.append(f"fit: residual {q(f.residual_rms, 'V')} rms against noise "
                     f"{q(f.noise_rms, 'V')} rms, {f.points} points")
        for a in self.assumptions:
            lines.append(f"note: {a}")
        for w in self.warnings:
            lines.append(f"warning: {w}")
        return "\n".join(lines)

    def predicted_step(self, t, trimmed: bool = True) -> np.ndarray:
        """Step response (V) for a step of the fitted amplitude, closed form."""
        H = self.fit.transfer(trimmed=trimmed)
        return self.fit.estimates["amplitude"].value * H.step(t)

    def prediction(self) -> dict:
        """See :attr:`_prediction` (computed once per diagnosis)."""
        return self._prediction

    @cached_property
    def _prediction(self) -> dict:
        """The step after the trim, from the fitted chain in closed form.

        Returns the 10–90 % rise time (s), the overshoot (% of the final value) and the
        largest departure of the step from its final value five source-edge times after the edge
        (% of the final value), before and after the trim, plus the predicted square-wave
        period on a coarse grid (``times`` in s from the rising edge, ``before``, ``after`` in V).
        """
        out = {}
        for key, trimmed in (("before", False), ("after", True)):
            H = self.fit.transfer(trimmed=trimmed)
            final = H.dc_gain
            edge = max(self.fit.estimates["edge_time"].value, 1e-12)
            tau = self.fit.estimates["time_constant"].value
            t = np.concatenate([np.linspace(0, 20 * edge, 4001)[1:],
                                np.geomspace(20 * edge, max(5 * tau, 40 * edge), 2000)])
            y = H.step(t) / final
            above = np.flatnonzero(y >= 0.9)
            t10 = t[np.flatnonzero(y >= 0.1)[0]] if np.any(y >= 0.1) else float("nan")
            t90 = t[above[0]] if above.size else float("nan")
            rise = t90 - t10
            late = t > 5 * edge
            out[key] = {"rise_time": float(rise), "overshoot": float(100 * max(y.max() - 1, 0)),
                        "flatness": float(100 * np.max(np.abs(y[late] - 1))) if late.any() else None}
        tt = np.linspace(self.fit.t[0], self.fit.t[-1], 400)
        out["times"] = tt
        out["square_before"] = self.fit.model(tt, trimmed=False)
        out["square_after"] = self.fit.model(tt, trimmed=True)
        return out

    def plot(self, axes=None):
        """Capture, fit and predicted trimmed response; returns ``(fig, axes)``."""
        from .plot.diagnosis import plot_diagnosis

        return plot_diagnosis(self, axes=axes)


def _refusals(m, fit: DividerFit | None) -> list:
    out = []
    if m.clipped:
        out.append("the capture is clipped (samples pile up on a rail): levels and jump are unknown")
    if m.averaged is None or m.periods_averaged < 1:
        out.append("the capture holds no full period of the square wave: no edge pair to fit")
    if fit is not None:
        e = fit.derived["hf_dc_error"]
        if e.stderr is None or not np.isfinite(e.stderr) or e.stderr > max(0.1, abs(e.value)):
            se = "unknown" if e.stderr is None else f"±{100 * e.stderr:.3g} %"
            out.append(f"the capture does not determine the gain error ({se}); a square wave "
                       "much faster than the divider's time constant hides the DC gain — use a "
                       "period of at least a few time constants")
    if fit is not None and fit.residual_rms > BAD_FIT_RATIO * fit.noise_rms:
        out.append(f"the divider model does not describe the capture (residual "
                   f"{format_quantity(fit.residual_rms, 'V')} rms against noise "
                   f"{format_quantity(fit.noise_rms, 'V')} rms)")
    return out


def diagnose(data, channel: str | None = None, *, tip_r: float | None = None,
             input_r: float | None = None, shunt_c: float | None = None,
             tolerance: float = 0.01, chain: ChainFacts | None = None,
             force: bool = False) -> Diagnosis:
    """Diagnose the compensation of a divider from a square-wave capture.

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        The capture (time in s, samples in V).
    channel : str, optional
        Channel of the capture.
    tip_r, input_r : float, optional
        Tip-arm and shunt-arm resistance (ohm); from ``chain`` or 9 MΩ and 1 MΩ.
    shunt_c : float, optional
        Nominal shunt capacitance (F), held when the capture cannot fix it.
    tolerance : float
        Gain error counted as compensated (fraction, 0.01 = ±1 %).
    chain : ChainFacts, optional
        Facts from a chain spec (resistances, nominal capacitance, the trimmer).
    force : bool
        Give the trim even when the capture or fit is not trustworthy (with a warning).

    Raises
    ------
    InputError
        Bad options, or a capture without a usable step.
    ComputationError
        When the diagnosis refuses (clipped, edgeless or badly fitted capture) and
        ``force`` is not set, or the fit does not converge.
    """
    from .pulse import measure

    if not (0 < tolerance < 1):
        raise InputError(f"tolerance must lie between 0 and 100 %, got {tolerance!r}")
    assumptions = []
    r1 = tip_r if tip_r is not None else (chain.tip_r if chain else None)
    r2 = input_r if input_r is not None else (chain.shunt_r if chain else None)
    if r1 is None or r2 is None:
        assumptions.append("no chain given: a 10:1 probe (tip 9 MΩ) on a 1 MΩ input assumed")
    r1 = DEFAULT_TIP_R if r1 is None else r1
    r2 = DEFAULT_INPUT_R if r2 is None else r2
    c2_nom = shunt_c if shunt_c is not None else (chain.shunt_c if chain else None)
    m = measure(data, channel)
    warnings = list(m.warnings)
    pre = _refusals(m, None)
    if pre and not force:
        raise ComputationError("no trim: " + "; ".join(pre) + " (use --force to override)")
    if m.averaged is None:
        raise ComputationError("no trim: the capture holds no full period to fit, even forced")
    ap = m.averaged
    lead = (chain.lead_l, chain.lead_r) if chain is not None and chain.lead_l > 0 else None
    fit = fit_divider(ap.t, ap.v, ap.period, ap.duty, noise_rms=ap.noise_rms_after, r1=r1, r2=r2,
                      shunt_nominal=c2_nom, lead=lead)
    assumptions.extend(fit.notes)
    if "tilt" in m.flags and fit.residual_rms <= BAD_FIT_RATIO * fit.noise_rms:
        # the sloping plateaus are the mis-compensation itself, and the fit explains them
        warnings = [w for w in warnings if "slope" not in w]
    problems = _refusals(m, fit)
    if problems and not force:
        raise ComputationError("no trim: " + "; ".join(problems) + " (use --force to override)")
    refused = "; ".join(problems) if problems else None
    if refused:
        warnings.insert(0, "FORCED: " + refused + " — the trim below may be wrong")
    e = fit.derived["hf_dc_error"]
    if abs(e.value) <= tolerance:
        verdict = "compensated"
    elif e.value > 0:
        verdict = "over-compensated"
    else:
        verdict = "under-compensated"
    if e.stderr is not None and abs(abs(e.value) - tolerance) < 2 * e.stderr:
        warnings.append(f"the gain error lies within two standard errors of the tolerance "
                        f"(±{100 * tolerance:g} %): the verdict is marginal")
    sc, tc = fit.derived["shunt_change"], fit.derived["tip_change"]
    trim = {"shunt_change": sc.value, "shunt_change_stderr": sc.stderr,
            "tip_change": tc.value, "tip_change_stderr": tc.stderr,
            "shunt_required": fit.c2 + sc.value, "tip_required": fit.c1 + tc.value}
    if chain is not None and chain.adjust_part is not None:
        shunt_arm = chain.adjust_arm == "shunt"
        change = sc.value if shunt_arm else tc.value
        stderr = sc.stderr if shunt_arm else tc.stderr
        # the trimmer's value now, as the fit sees it: the fitted arm less its fixed parts
        if shunt_arm and chain.shunt_c is not None and not fit.estimates["shunt_capacitance"].held:
            present = fit.c2 - (chain.shunt_c - chain.adjust_present)
        elif not shunt_arm and chain.tip_c is not None:
            present = fit.c1 - (chain.tip_c - chain.adjust_present)
        else:
            present = chain.adjust_present
        required = present + change
        other_est = fit.estimates["tip_capacitance" if shunt_arm else "shunt_capacitance"]
        ratio = (fit.r1 / fit.r2) if shunt_arm else (fit.r2 / fit.r1)
        if other_est.held:
            required_stderr = 0.0
            assumptions.append("the trimmer setting is conditional on the held "
                               f"{'tip' if shunt_arm else 'shunt'} capacitance")
        elif other_est.stderr is not None:
            required_stderr = ratio * other_est.stderr
        else:
            required_stderr = stderr
        lo = chain.adjust_min if chain.adjust_min is not None else 0.0
        hi = chain.adjust_max if chain.adjust_max is not None else math.inf
        in_range = bool(lo <= required <= hi and required > 0)
        trim.update({"part": chain.adjust_part, "field": chain.adjust_field,
                     "arm": chain.adjust_arm, "present": present,
                     "present_in_spec": chain.adjust_present,
                     "required": required, "required_stderr": required_stderr,
                     "change": change, "change_stderr": stderr,
                     "in_range": in_range})
        if not in_range:
            warnings.append(f"the trimmer (part {chain.adjust_part}) cannot reach "
                            f"{format_quantity(required, 'F')}: change a fixed capacitor too")
    return Diagnosis(verdict=verdict, tolerance=tolerance, fit=fit, metrics=m, trim=trim,
                     warnings=tuple(warnings), assumptions=tuple(assumptions), refused=refused,
                     chain=chain)
