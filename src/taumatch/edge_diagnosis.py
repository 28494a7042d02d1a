"""Fast-edge diagnosis: fit a chain's fast part to a fast-edge capture and say how to set
every adjustment.

**Which captures.**  With a chain spec, a capture is a *fast edge* (this module) rather than
a 1 kHz square (:mod:`taumatch.diagnosis`) when its record holds no full period of a square
wave (a single step, or a step and its return), or when its period is shorter than
``FAST_PERIOD`` times the divider's time constant ``(R1 ∥ R2)(C1 + C2)`` (the two-arm view
of the chain): then the square shows hardly any of the divider's settling, and never the DC
gain (a period near the time constant is the 1 kHz diagnosis's, which fits the periodic
steady state).  It must also resolve the edge: the 10–90 % transition
spans at least ``MIN_EDGE_SAMPLES`` sample intervals and the record runs at least
``MIN_RECORD_EDGES`` transition durations past its 50 % instant.

**What is fitted.**  The chain's displayed step (the exact response, cables by the
telegrapher's equations, through the numerical inverse Laplace transform with its stated
error) to the samples from ``PRE_CONSTANTS`` edge time constants before the edge to
``FIT_CONSTANTS`` after it (or the next transition, or the record's end), with the spec's
high-frequency adjustments and the parasitics a fast edge can show
(:func:`taumatch.fit.chain_fields.candidates`) free, less what the capture cannot resolve
(:mod:`taumatch.fit.chain_fit`: held and said so).  The low-frequency trimmer and the
divider's DC balance are invisible in a record far shorter than the divider's time constant
(they set the level, which the free amplitude takes): without ``slow`` the trimmer is held
and has no target; with a 1 kHz capture of the same probe (``slow``) its value now follows
from the gain error that capture shows, and its target makes that error zero
(:mod:`taumatch.edge_adjustments`), so the answer is one chain.

**Targets.**  The high-frequency adjustments' targets minimise the step's aberration over
the flat window (:mod:`taumatch.analysis.flatten`), the trimmer's makes the two-arm gain
error zero with them in place, and the flattening is repeated with the trimmer at its target.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .errors import ComputationError, InputError, TaumatchError
from .units import format_quantity

__all__ = ["FAST_PERIOD", "FIT_CONSTANTS", "MIN_EDGE_SAMPLES", "MIN_RECORD_EDGES", "PRE_CONSTANTS",
           "EdgeDiagnosis", "diagnose_edge", "is_fast_edge"]

#: A periodic capture is a fast edge below this fraction of the divider's time constant.
FAST_PERIOD = 0.1
#: The 10–90 % transition spans at least this many sample intervals.
MIN_EDGE_SAMPLES = 3.0
#: The record runs at least this many transition durations past the 50 % instant.
MIN_RECORD_EDGES = 20.0
#: Edge time constants of baseline fitted before the 10 % instant.
PRE_CONSTANTS = 20.0
#: Edge time constants fitted after the 50 % instant (twice the flat window).
FIT_CONSTANTS = 200.0
LN9 = math.log(9.0)


def is_fast_edge(metrics, chain) -> bool:
    """Whether a capture with pulse ``metrics`` through ``chain`` is a fast edge (see the
    module text)."""
    if metrics.periods_averaged == 0:
        return True
    from .chain.two_arm import TwoArm

    try:
        tau = float(TwoArm.from_chain(chain).tau)
    except TaumatchError:
        return False
    return bool(math.isfinite(metrics.period) and metrics.period < FAST_PERIOD * tau)


@dataclass(frozen=True, eq=False)
class EdgeDiagnosis:
    """What :func:`diagnose_edge` found (SI units; aberrations as fractions)."""

    spec: object
    found: object
    adjusted: object
    fit: object
    adjustments: tuple
    metrics: object
    window: tuple
    edge_constant: float
    before: dict
    after: dict
    low_frequency: object = None
    notes: tuple = ()
    warnings: tuple = ()
    refused: str | None = None
    samples: dict = field(default_factory=dict, repr=False)

    def parasitics(self) -> list:
        """``(field, value, stderr, spec value)`` of every fitted parasitic."""
        out = []
        for f in self.fit.free:
            if f.role != "adjust":
                out.append((f, self.fit.values[f.key], self.fit.stderr[f.key], f.get(self.spec)))
        return out

    def to_dict(self) -> dict:
        fit = self.fit
        return {
            "kind": "fast edge",
            "adjustments": [a.to_dict() for a in self.adjustments],
            "aberrations": {"before": self.before, "after": self.after},
            "window": {"t90": self.window[0], "start": self.window[1], "end": self.window[2],
                       "time_constant": self.edge_constant},
            "parasitics": [{**f.to_dict(), "value": v, "stderr": s, "spec": sp}
                           for f, v, s, sp in self.parasitics()],
            "held": [h.to_dict() for h in fit.holds],
            "not_separable": [[f.key for f in g] for g in fit.groups],
            "low_frequency": (self.low_frequency.to_dict() if self.low_frequency else None),
            "fit": {"amplitude": fit.amplitude, "offset": fit.offset, "t0": fit.t0,
                    "nuisance_stderr": fit.nuisance_stderr, "residual_rms": fit.residual_rms,
                    "noise_rms": fit.noise_rms, "points": fit.points,
                    "reduced_chi_square": fit.redchi, "evaluations": fit.nfev,
                    "inversion_error": fit.inversion_error},
            "metrics": self.metrics.to_dict(),
            "notes": list(self.notes), "warnings": list(self.warnings),
            **({"refused": self.refused} if self.refused else {}),
        }

    def summary(self) -> str:
        q = format_quantity
        fit = self.fit
        lines = []
        if self.refused:
            lines.append(f"!! WARNING: forced past a refusal: {self.refused}")
        w90, w0, w1 = self.window
        lines.append(f"fast-edge diagnosis: flat from {q(w0, 's')} to {q(w1, 's')} after the "
                     f"source step, no overshoot from the 90 % instant {q(w90, 's')} on "
                     f"(τ = 10-90 % / ln 9 = {q(self.edge_constant, 's')})")
        lines.append("adjustments:")
        for a in self.adjustments:
            lines.append(f"  {a.line()}")
            big = [b for b in sorted(a.budget, key=lambda b: -b[2])
                   if b[2] >= 0.1 * (a.uncertainty or 0.0)][:3]
            if a.target is not None and big:
                lines.append("    of which assumed: "
                             + "; ".join(f"{w} → {q(c, a.field.unit)}" for w, _, c in big))
        if not self.adjustments:
            lines.append("  (none: the spec marks no field adjust)")
        for g in fit.groups:
            lines.append("not separable: " + ", ".join(f.describe() for f in g)
                         + " act alike on this capture; the first carries their combination")
        if self.parasitics():
            lines.append("fitted parasitics:")
            for f, v, s, sp in self.parasitics():
                lines.append(f"  {f.describe():40s} {q(v, f.unit):>10s} ± {q(s, f.unit)} "
                             f"(spec {q(sp, f.unit)})")
        for h in fit.holds:
            if h.field.role != "adjust":
                lines.append(f"held: {h.field.describe()} at {q(h.value, h.field.unit)}: {h.reason}")
        if self.low_frequency is not None:
            lf = self.low_frequency
            lines.append(f"1 kHz capture: {lf.verdict}, gain error {100 * lf.error:+.2f} % ± "
                         f"{100 * (lf.error_stderr or 0):.2f} %")
        for key, d in (("as found", self.before), ("after the adjustments", self.after)):
            lines.append(f"step {key}: flat within ±{100 * d['peak']:.2f} % (rms "
                         f"{100 * d['rms']:.2f} %) over the window; overshoot "
                         f"{100 * d['overshoot']:.2f} %, undershoot {100 * d['undershoot']:.2f} %, "
                         f"10-90 % {q(d['rise_time'], 's')}")
        lines.append(f"fit: residual {q(fit.residual_rms, 'V')} rms against noise "
                     f"{q(fit.noise_rms, 'V')} rms, {fit.points} points, {fit.nfev} evaluations; "
                     f"inversion error {fit.inversion_error:.1g} of the step")
        lines += [f"note: {n}" for n in self.notes]
        lines += [f"warning: {w}" for w in self.warnings]
        return "\n".join(lines)

    @cached_property
    def curves(self) -> EdgeCurves:
        """What the picture draws: the capture, the fitted chain and the step after the
        adjustments against the time after the source step, the window, and the view of the
        top of the step near the edge (where the adjustments act)."""
        c = self.samples
        t = c["t"] - self.fit.t0
        w90, w0, w1 = self.window
        near = (t >= w90 - 5 * self.edge_constant) & (t <= w0 + 0.3 * (w1 - w0))
        flat = (t >= w0) & (t <= w1)
        levels = [float(np.median(y[flat])) for y in (c["fitted"], c["after"])]
        pad = 0.08 * max(abs(x) for x in levels)
        title = (f"fast edge: flat within ±{100 * self.before['peak']:.2f} % as found, "
                 f"±{100 * self.after['peak']:.2f} % after the adjustments")
        return EdgeCurves(t, c["v"], c["fitted"], c["after"], self.window,
                          (float(t[near][0]), float(t[near][-1])),
                          (min(levels) - pad, max(levels) + pad), title)

    def plot(self, ax=None):
        """Capture, fit and the predicted step after the adjustments, and the top of the
        step near the edge magnified; returns ``(fig, (top, zoom))``."""
        from .plot.edge import plot_edge

        return plot_edge(self.curves, ax=ax)


@dataclass(frozen=True, eq=False)
class EdgeCurves:
    """The curves of a fast-edge diagnosis's picture: times ``t`` after the source step [s],
    the capture ``v``, the fitted chain ``fitted`` and the step predicted after the
    adjustments ``after`` [V]; ``window`` (the 90 % instant, the flat window's start and
    end, s); the magnified view of the top of the step: ``zoom`` (s) and ``zoom_levels``
    (V); the title."""

    t: np.ndarray
    v: np.ndarray
    fitted: np.ndarray
    after: np.ndarray
    window: tuple
    zoom: tuple
    zoom_levels: tuple
    title: str


def _step_figures(model, chain, window) -> dict:
    """IEEE 181 figures of ``chain``'s displayed step: state levels by the histogram mode of
    the step up to the window's end; overshoot, undershoot, 10–90 % duration; the peak and
    RMS departure from the upper state over the flat window (fractions of the amplitude)."""
    from .pulse.levels import state_levels
    from .pulse.transitions import first_transition, measure_transitions

    st = model.step(chain)
    keep = st.t <= window[2]
    t, y = st.t[keep], st.y[keep]
    lv = state_levels(y, "mode")
    center = first_transition((y - lv.low) / lv.amplitude, 0)
    (tr,) = measure_transitions(t, y, lv, [center], ["rising"])
    inside = (t >= window[1]) & (t <= window[2])
    dev = (y[inside] - lv.high) / lv.amplitude
    return {"level": lv.high, "rise_time": tr.duration, "overshoot": tr.overshoot,
            "undershoot": tr.undershoot, "preshoot": tr.preshoot,
            "peak": float(np.max(np.abs(dev))), "rms": float(np.sqrt(np.mean(dev**2)))}


def _transition(m):
    """The capture's first transition (rising or falling)."""
    tr = [x for x in (m.rising, m.falling) if x is not None]
    if not tr:
        raise InputError("the capture holds no complete transition")
    return min(tr, key=lambda x: x.middle)


def _refusals(m, tr, dt, t_last) -> list:
    out = [r.describe(None) for r in m.rails]
    if not tr.duration >= MIN_EDGE_SAMPLES * dt:
        out.append(f"the edge (10-90 % {format_quantity(tr.duration, 's')}) spans under "
                   f"{MIN_EDGE_SAMPLES:g} sample intervals of {format_quantity(dt, 's')}: the "
                   "chain's fast part is not resolved; sample faster")
    if t_last - tr.middle < MIN_RECORD_EDGES * tr.duration:
        out.append(f"the record ends {format_quantity(t_last - tr.middle, 's')} after the edge, "
                   f"under {MIN_RECORD_EDGES:g} edge durations: lengthen the record")
    return out


def _slow_balance(slow, slow_channel, chain):
    """``(error, stderr, verdict, source)``: the gain error the 1 kHz capture ``slow`` shows,
    by the 1 kHz diagnosis with the chain's resistances."""
    from dataclasses import replace

    from .chain_facts import facts_from_chain
    from .diagnosis import diagnose

    plain = replace(chain, parts=tuple(replace(p, adjust=None, more_adjust=())
                                       if hasattr(p, "more_adjust") else p for p in chain.parts))
    try:
        d = diagnose(slow, slow_channel, chain=facts_from_chain(plain))
    except TaumatchError as exc:
        raise type(exc)(f"the 1 kHz capture (slow=): {exc}") from None
    e = d.hf_dc_error
    return e.value, e.stderr, d.verdict, getattr(slow, "source", None)


def _disagreement(fit, found, lf) -> list:
    """A warning when the fast edge's own value of the part the 1 kHz balance sets differs
    from that balance's by more than three combined standard errors."""
    key = f"part{lf.part}.c"
    free = {f.key: f for f in fit.free}
    if key not in free:
        return []
    fast, se = fit.values[key], fit.stderr[key]
    both = math.hypot(se, lf.now_stderr or 0.0)
    if abs(fast - lf.now) <= 3 * both:
        return []
    q = format_quantity
    return [(f"the fast edge puts {free[key].describe()} at {q(fast, 'F')} ± {q(se, 'F')}, "
             f"the 1 kHz capture's balance at {q(lf.now, 'F')} ± "
             f"{q(lf.now_stderr or 0, 'F')}: they disagree; the 1 kHz value is used (it is what "
             "the trimmer is set against), so check the spec's resistances, the input "
             "capacitance and the tip capacitance")]


def diagnose_edge(data, chain, channel: str | None = None, *, slow=None,
                  slow_channel: str | None = None, force: bool = False) -> EdgeDiagnosis:
    """Diagnose a chain's fast part from a fast-edge capture (see the module text).

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        The fast-edge capture (time in s, samples in V).
    chain : Chain
        The chain it was taken through; its ``adjust`` marks are what to set.
    channel : str, optional
    slow : Capture or (array_like, array_like), optional
        A 1 kHz square-wave capture of the same probe, for the low-frequency balance.
    slow_channel : str, optional
    force : bool
        Give the answer even from a capture the diagnosis refuses (with a warning).

    Raises
    ------
    InputError
        A capture without a step.
    ComputationError
        When the diagnosis refuses (clipped, unresolved edge, short record, a chain that does
        not describe the capture, nothing the capture can set) and ``force`` is not set, or
        the fit does not converge.
    """
    from .analysis.flatten import WINDOW_CONSTANTS, WINDOW_START
    from .chain.topology import tip_arm
    from .edge_adjustments import low_frequency, settle, with_fit_errors
    from .fit.chain_fields import ADJUST, candidates, low_frequency_trimmer
    from .fit.chain_fit import fit_chain_step
    from .pulse import measure
    from .pulse.averaging import as_arrays

    m = measure(data, channel)
    t_all, v_all, _ = as_arrays(data, channel)
    t_all, v_all = np.asarray(t_all, dtype=float), np.asarray(v_all, dtype=float)
    dt = float((t_all[-1] - t_all[0]) / (t_all.size - 1))
    tr = _transition(m)
    notes, warnings = [], [w for w in m.warnings if "period" not in w and "settled" not in w]
    problems = _refusals(m, tr, dt, float(t_all[-1]))
    _refuse(problems, force)
    tau = tr.duration / LN9
    later = [x.start for x in (m.rising, m.falling) if x is not None and x.middle > tr.middle]
    t_stop = min(float(t_all[-1]), tr.middle + FIT_CONSTANTS * tau,
                 min(later) if later else math.inf)
    t_start = max(float(t_all[0]), tr.start - PRE_CONSTANTS * tau)
    sel = (t_all >= t_start) & (t_all <= t_stop)
    t, v = t_all[sel], v_all[sel]
    noise = max(m.noise_rms, m.code / math.sqrt(12.0), 1e-9 * m.amplitude)

    lf = low_frequency_trimmer(chain)
    adjust, para = candidates(chain)
    slow_e = _slow_balance(slow, slow_channel, chain) if slow is not None else None
    model, t0, t0_range = _start(chain, tr, tau, t_start, t_stop, dt)
    fit = fit_chain_step(t, v, chain, adjust + para, noise=noise, model=model, t0=t0,
                         dt=dt, t0_range=t0_range, assumed=_assumed_fields(chain))
    found, lf_balance = fit.chain, None
    if slow_e is not None:  # the 1 kHz balance placed on the tip arm (or the trimmer)
        lf_seen = lf is not None and lf.key in fit.stderr
        part = lf.part if lf is not None and not lf_seen else tip_arm(chain)
        lf_balance = with_fit_errors(low_frequency(found, part, *slow_e), fit, found)
        found = found.with_value(part, "c", lf_balance.now)
        warnings += _disagreement(fit, found, lf_balance)
    elif lf is not None:
        notes.append(f"{lf.describe()} is the low-frequency trimmer: a fast edge cannot show "
                     "the low-frequency balance, so it has no target here; give a 1 kHz "
                     "capture (slow=)")
    problems += _misfit(fit, tr, tau, noise, m.amplitude)
    if not any(f.role == ADJUST and (lf is None or f.key != lf.key) for f in fit.free) \
            and lf_balance is None:
        problems.append(_nothing_to_set(fit, lf, m))
    _refuse(problems, force)
    if fit.inversion_error * abs(fit.amplitude) > 0.1 * noise:
        warnings.append(f"the inverse transform's error ({fit.inversion_error:.2g} of the step) "
                        "is not small against the noise")
    t50 = tr.middle - fit.t0
    window = (tr.end - fit.t0, t50 + WINDOW_START * tau,
              min(t50 + WINDOW_CONSTANTS * tau, t_stop - fit.t0))
    if window[2] < t50 + WINDOW_CONSTANTS * tau:
        notes.append(f"the flat window is cut at the record's end: {(window[2] - t50) / tau:.0f} "
                     f"time constants after the 50 % instant, not {WINDOW_CONSTANTS}")
    adjustments, adjusted = settle(model, fit, found, chain, lf, lf_balance, window)
    samples = {"t": t, "v": v, "fitted": fit.fitted,
               "after": fit.offset + fit.amplitude * model.at(adjusted, t - fit.t0)}
    return EdgeDiagnosis(
        spec=chain, found=found, adjusted=adjusted, fit=fit, adjustments=tuple(adjustments),
        metrics=m, window=window, edge_constant=tau,
        before=_step_figures(model, found, window), after=_step_figures(model, adjusted, window),
        low_frequency=lf_balance, notes=tuple(notes), warnings=tuple(warnings),
        refused="; ".join(problems) if problems else None, samples=samples)


def _refuse(problems, force):
    if problems and not force:
        raise ComputationError("no fast-edge diagnosis: " + "; ".join(problems)
                               + " (use force=True to override)")


def _start(chain, tr, tau, t_start, t_stop, dt):
    """``(model, t0, t0_range)``: the step evaluator over the fit's span and the source
    step's instant that puts the spec's 50 % crossing on the capture's."""
    from .fit.step_model import StepModel

    margin = max(20 * tau, 0.05 * (t_stop - t_start))
    probe = StepModel(t_stop - t_start + 2 * margin, dt, 1.0 / tau)
    st = probe.step(chain)
    g_end = float(st.y[min(np.searchsorted(st.t, t_stop - t_start), st.t.size - 1)])
    if not g_end > 0:
        raise ComputationError("the chain's step has no level within the record's span")
    g = st.y / g_end
    k = int(np.argmax(g >= 0.5))
    t50 = 0.0 if k == 0 or g[k] == g[k - 1] else float(
        st.t[k - 1] + (0.5 - g[k - 1]) * (st.t[k] - st.t[k - 1]) / (g[k] - g[k - 1]))
    t0 = tr.middle - t50
    return StepModel(t_stop - (t0 - margin / 2) + margin, dt, 1.0 / tau), t0, margin / 2


#: Edge time constants around the 50 % instant whose residual is judged on its own (a
#: misfit of the edge's shape is short against the whole window, and would hide there).
EDGE_REGION = (-5.0, 30.0)


def _misfit(fit, tr, tau, noise, swing) -> list:
    """Reasons the chain does not describe the capture: the residual over the whole fit, or
    over the edge's own region, above ``BAD_FIT_RATIO`` times the noise and above
    ``MISFIT_FLOOR`` of the swing (the thresholds of the 1 kHz diagnosis)."""
    from .diagnosis import BAD_FIT_RATIO, MISFIT_FLOOR

    res = fit.fitted - fit.v
    edge = (fit.t >= tr.middle + EDGE_REGION[0] * tau) & (fit.t <= tr.middle + EDGE_REGION[1] * tau)
    for where, mask in (("", np.ones_like(edge)), (" around the edge", edge)):
        rms = float(np.sqrt(np.mean(res[mask] ** 2))) if mask.any() else 0.0
        if rms > BAD_FIT_RATIO * noise and rms > MISFIT_FLOOR * swing:
            return [(f"the chain does not describe the capture (residual{where} "
                     f"{format_quantity(rms, 'V')} rms against noise "
                     f"{format_quantity(noise, 'V')} rms): check the spec's parts and values")]
    return []


def _nothing_to_set(fit, lf, m) -> str:
    """Why a fast edge without a 1 kHz capture has no answer: no high-frequency adjustment
    marked, or none resolved."""
    marked = [h.field.describe() for h in fit.holds
              if h.field.role == "adjust" and (lf is None or h.field.key != lf.key)]
    what = (f"resolves none of the high-frequency adjustments ({', '.join(marked)})" if marked
            else "has nothing to set: the spec marks no high-frequency adjustment")
    r = m.rising or m.falling
    return (f"the capture {what}; without a 1 kHz capture (slow=) there is no answer to "
            f"give (pulse metrics: 10-90 % {format_quantity(r.duration, 's')}, overshoot "
            f"{100 * r.overshoot:.2f} %)")


def _assumed_fields(chain):
    """Values held at the spec's figure whose error the budget states (besides the
    candidates the capture does not resolve): the source resistance, each cable's
    capacitance per metre, the input's bandwidth."""
    from .chain.parts import Input, Line
    from .fit.chain_fields import ChainField

    out = []
    if chain.source.resistance > 0:
        out.append(ChainField(0, "resistance", "assumed", "source"))
    for k, p in enumerate(chain.parts, 1):
        if isinstance(p, Line):
            out.append(ChainField(k, "c", "assumed", p.kind, p.label))
        if isinstance(p, Input) and p.bandwidth is not None:
            out.append(ChainField(k, "bandwidth", "assumed", p.kind, p.label))
    return out
