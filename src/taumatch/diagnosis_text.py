"""The text summary of a diagnosis: verdict, trims, estimates, the step after the trim, the
uncertainty budget, cautions, notes and warnings — each line from what the
:class:`~taumatch.diagnosis.Diagnosis` carries, nothing computed here."""

from __future__ import annotations

from .units import format_quantity

__all__ = ["summary_lines"]

#: The figures whose budgets the text shows (the JSON has them all).
SHOWN = ("hf_dc_error", "shunt_change", "tip_change", "trimmer_required")


def _signed(c: float) -> str:
    return ("+" if c >= 0 else "−") + format_quantity(abs(c), "F")


def verdict_line(d) -> str:
    e = d.hf_dc_error
    figure = (f"high/low-frequency gain error {100 * e.value:+.2f} % "
              f"± {100 * (e.stderr or 0):.2f} %")
    if d.divider_doubt is not None and d.divider_doubt.flat and d.trim is None:
        head, *why = d.divider_doubt.lines()
        return "\n".join([f"verdict: {head}"] + [f"  {w}" for w in why])
    if d.resolution_limited:
        r = d.resolution
        band = f"±{100 * r.gain_error:.2g} %, the resolution of this capture"
        why = f"acceptance ±{100 * d.accept:g} % asked, but {r.describe()}"
        if d.verdict == "compensated":
            return f"verdict: compensated within {band} ({figure}; {why})"
        return f"verdict: {d.verdict} ({figure}, beyond {band}; {why})"
    return f"verdict: {d.verdict} ({figure}, accepted within ±{100 * d.accept:g} %)"


def trim_lines(d) -> list:
    q = format_quantity
    lines = []
    heads = {"shunt": ("trim at the shunt arm:", "C2"), "tip": ("  or at the tip arm: ", "C1")}
    for arm, t in d.arm_trims.items():
        head, cname = heads[arm]
        sign = "add" if t.change > 0 else "remove"
        lo, hi = d.budgets[f"{arm}_change"].interval
        lines.append(f"{head} {sign} {q(abs(t.change), 'F')} ± {q(t.change_stderr or 0, 'F')} "
                     f"({cname} → {q(t.required, 'F')}; change 95 %: {_signed(lo)} to "
                     f"{_signed(hi)})")
    t = d.trim
    if t is not None and t.part is not None:
        rng = {True: "inside its range", False: "OUTSIDE its range",
               None: "no range given"}[t.in_range]
        lines.append(f"  trimmer (part {t.part}, {t.field}): now about {q(t.present, 'F')} "
                     f"(spec says {q(t.nominal, 'F')}) → set {q(t.required, 'F')} ± "
                     f"{q(t.required_stderr or 0, 'F')}, {rng}")
        if t.other_arm is not None:
            o = t.other_arm
            verb = "add" if o.change > 0 else "remove"
            lines.append(f"  or, with the trimmer at {q(t.trimmer_at, 'F')}: {verb} "
                         f"{q(abs(o.change), 'F')} at the {o.arm} arm (a fixed capacitor, or a "
                         "shorter or longer cable)")
    return lines


def estimate_lines(d) -> list:
    q = format_quantity
    f = d.fit
    lines = ["estimates:"]
    for k, v in f.estimates.items():
        name = k.replace("_", " ")
        if not v.resolved:
            lines.append(f"  {name:18s} {'≤ ' + q(v.bound, v.unit):>12s} (not resolved by the "
                         f"{q(f.sample_interval, 's')} sampling)")
            continue
        err = "held" if v.held else (f"± {q(v.stderr, v.unit)}" if v.stderr is not None else "")
        flag = "" if v.determined else "  (not determined by the data)"
        if v.note == "consistent with zero":
            flag += "  (consistent with zero)"
        lines.append(f"  {name:18s} {q(v.value, v.unit):>12s} {err}{flag}")
    lines.append(f"  with tip R {q(f.r1, 'Ω')}, shunt R {q(f.r2, 'Ω')}")
    return lines


def step_line(d) -> str:
    q = format_quantity
    pr = d.prediction()
    b, a = pr["before"], pr["after"]
    rise = (f"rise time {q(a['rise_time'], 's')}" if a["rise_time"] is not None else
            f"rise time ≤ {q(a['rise_time_bound'], 's')} (the source edge is not resolved, so "
            "neither is the rise time)")
    return (f"step after the trim: flat within {a['flatness']:.2g} % from five edge times on "
            f"(now {b['flatness']:.3g} %), overshoot {a['overshoot']:.2f} %, {rise}")


def budget_lines(d) -> list:
    lines = [("uncertainty (standard uncertainties, ± one u; 95 % intervals are ± 2u; shares "
              "of the variance):")]
    lines += [f"  {d.budgets[k].line()}" for k in SHOWN if k in d.budgets]
    lines += [f"  assumed: {a.describe()}" for a in d.inputs]
    return lines


def summary_lines(d) -> list:
    """The lines of :meth:`Diagnosis.summary`."""
    q = format_quantity
    f = d.fit
    lines = []
    if d.refused:
        lines.append(f"!! WARNING: forced past a refusal: {d.refused}")
    lines.append(verdict_line(d))
    if d.divider_doubt is not None and not d.divider_doubt.flat:
        lines.extend(f"  {w}" for w in d.divider_doubt.lines())
    if d.trim is None:
        m = d.metrics
        rise = m.rising.duration if m.rising is not None else float("nan")
        lines.append(f"measured: swing {q(m.amplitude, 'V')}, period {q(m.period, 's')}, "
                     f"rising edge 10-90 % {q(rise, 's')}")
    else:
        lines += trim_lines(d) + estimate_lines(d) + [step_line(d)] + budget_lines(d)
    lines.append(f"fit: residual {q(f.residual_rms, 'V')} rms against noise "
                 f"{q(f.noise_rms, 'V')} rms, {f.points} points")
    lines += [f"note: {a}" for a in d.assumptions]
    lines += [f"warning: {w}" for w in d.warnings]
    lines += [f"caution: {c}" for c in d.cautions]
    return lines
