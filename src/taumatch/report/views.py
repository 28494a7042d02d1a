"""Reports of each kind of result, built from what the result gives: ``to_dict()`` for the
numbers, ``summary()`` for the command's own words, ``plot()`` for the pictures.

Keys a result does not carry are left out, not invented; anything the tables below do
not name is still in the folded JSON at the end of the page.
"""

from __future__ import annotations

from pathlib import Path

from ..units import format_quantity as q
from ..units import format_uncertain
from .document import Figure, Headline, Notes, Report, Section, Table, Text, figure_png

__all__ = ["budget_table", "chain_report", "diagnosis_report", "divider_report", "plus_minus"]

# units of a diagnosis estimate, by the end of its name (to_dict gives bare SI numbers)
_ESTIMATE_UNITS = (("capacitance", "F"), ("inductance", "H"), ("resistance", "Ω"),
                   ("amplitude", "V"), ("offset", "V"), ("delay", "s"), ("time", "s"),
                   ("time_constant", "s"))


def plus_minus(value, stderr, unit: str) -> str:
    """``'8.502 ± 0.041 pF'`` (one prefix for both); the ± part is left out when the error is
    unknown."""
    if value is None:
        return "—"
    return q(value, unit) if stderr is None else format_uncertain(value, stderr, unit)


def _percent(value, stderr=None, sign=True) -> str:
    if value is None:
        return "—"
    text = f"{100 * value:+.2f} %" if sign else f"{100 * value:.3g} %"
    return text if stderr is None else f"{text} ± {100 * stderr:.2f} %"


def _words(key: str) -> str:
    return key.replace("_", " ")


def _figure(result, caption: str, alt: str) -> list:
    """The result's own picture, or nothing when it draws none."""
    if not hasattr(result, "plot"):
        return []
    fig, _ = result.plot()
    return [Figure(figure_png(fig), caption, alt)]


def budget_table(budget, caption: str = "") -> Table | None:
    """A result's uncertainty or tolerance budget, whatever its shape: a list of records
    (one row each) or a mapping of term to contribution."""
    if not budget:
        return None
    if isinstance(budget, dict):
        rows = tuple((_words(str(k)), _cell(v)) for k, v in budget.items())
        return Table(("term", "contribution"), rows, caption)
    keys = []
    for item in budget:
        for k in item:
            if k not in keys:
                keys.append(k)
    rows = tuple(tuple(_cell(item.get(k)) for k in keys) for item in budget)
    return Table(tuple(_words(k) for k in keys), rows, caption)


def _cell(v) -> str:
    if isinstance(v, float):
        return f"{v:.4g}"
    if isinstance(v, dict):
        return ", ".join(f"{_words(str(k))} {_cell(x)}" for k, x in v.items())
    return "—" if v is None else str(v)


def _notes(heading: str, kind: str, items) -> list:
    items = tuple(str(i) for i in items or ())
    return [Section(heading, (Notes(kind, items),))] if items else []


# --- diagnosis ----------------------------------------------------------------------------

def diagnosis_report(d, *, title: str, inputs=(), notes=(), cautions=()) -> Report:
    """The report of a divider diagnosis (:func:`taumatch.diagnose`).

    Parameters
    ----------
    d : Diagnosis
        The result.
    title : str
        The page title (usually names the capture).
    inputs : sequence of (str, str)
        What went in, as the user wrote it.
    notes : sequence of str
        Notes of the reader on the capture (a rebuilt time base, a picked channel).
    cautions : sequence of str
        High-voltage cautions that apply.
    """
    data = d.to_dict()
    e = data.get("hf_dc_error") or {}
    verdict = data.get("verdict", "")
    band = data.get("band", data.get("accept"))
    text = (f"{verdict}: high/low-frequency gain error {_percent(e.get('value'), e.get('stderr'))}"
            + (f" (compensated within ±{100 * band:.2g} %" if band else "")
            + (", the capture's resolution" if data.get("resolution_limited") else "")
            + (")" if band else ""))
    tone = ("fail" if data.get("refused") else "good" if verdict == "compensated" else
            "plain" if verdict == "no divider" else "change")
    sections = []
    divider = data.get("divider") or {}
    if divider.get("reading"):
        sections.append(Section("The divider", (Notes("warning", (
            f"{divider.get('status', '')}: {divider['reading']}",)),)))
    if data.get("refused"):
        sections.append(Section("Refused, then forced", (Notes("caution", (
            f"The diagnosis refused this capture and was forced past it: {data['refused']}",)),)))
    trim = _trim_table(data.get("arm_trims") or {}, data.get("trim") or {})
    if trim is not None:
        sections.append(Section("Trim", (trim,)))
    sections.append(Section("Fitted divider", (_estimates_table(data),)))
    unc = data.get("uncertainty") or {}
    budgets = unc.get("budgets") or {}
    tables = []
    for key, what in (("hf_dc_error", "the gain error"), ("shunt_change", "the shunt-arm trim"),
                      ("trimmer_required", "the trimmer's setting")):
        if key in budgets:
            t = budget_table([{k: term[k] for k in ("label", "standard_uncertainty", "share")}
                              for term in budgets[key]["terms"]],
                             f"what each term adds to the uncertainty of {what}")
            tables.append(t)
    held = budget_table([{k: a[k] for k in ("label", "value", "tolerance", "origin")}
                         for a in unc.get("assumed") or ()],
                        "the values held or assumed, each with its tolerance (a ± half-width)")
    tables += [held] if held is not None else []
    if tables:
        sections.append(Section("Uncertainty budget", tuple(tables)))
    pred = _prediction_table(data.get("prediction") or {})
    if pred is not None:
        sections.append(Section("Step before and after the trim (predicted)", (pred,)))
    sections.append(Section("Checks", (_checks_table(data),)))
    cap = _capture_table(data.get("metrics") or {})
    if cap is not None:
        sections.append(Section("Capture", (cap,)))
    sections += _notes("Warnings", "warning", data.get("warnings"))
    sections += _notes("Assumptions and notes", "note", [*(data.get("assumptions") or ()), *notes])
    sections += _notes("High-voltage cautions", "caution", cautions)
    pics = _figure(d, "One averaged period: the capture, the fitted divider (dashed) and the "
                      "period predicted after the trim, with the residual below; beside it the "
                      "leading corner up close; under both, the fitted probe's gain and phase "
                      "against frequency, as found and as trimmed.",
                   "averaged period with fit and prediction")
    metrics = getattr(d, "metrics", None)
    if metrics is not None:
        pics += _figure(metrics, "Pulse measurements on the averaged period: state levels, "
                                 "10/50/90 % reference levels and crossings.",
                        "pulse measurements")
    if pics:
        sections.append(Section("Pictures", tuple(pics)))
    return Report(title, tuple(inputs), Headline(text, tone), tuple(sections), raw=data)


def _trim_table(arms: dict, tr: dict) -> Table | None:
    """The arms' trims and the trimmer's (the package's trim schema, chain/compensation.py)."""
    rows = []
    for arm, label in (("shunt", "shunt arm (C2)"), ("tip", "tip arm (C1)")):
        a = arms.get(arm) or {}
        v = a.get("change")
        if v is None:
            continue
        rows.append((label, "add" if v > 0 else "remove",
                     plus_minus(abs(v), a.get("change_stderr"), "F"),
                     q(a["required"], "F") if a.get("required") is not None else "—"))
    if tr.get("part") is not None and tr.get("required") is not None:
        where = "inside" if tr.get("in_range") else "OUTSIDE"
        rows.append((f"trimmer (part {tr['part']}, {tr.get('field', '')})",
                     f"set (now about {q(tr.get('present'), 'F')})",
                     plus_minus(tr["required"], tr.get("required_stderr"), "F"),
                     f"{where} its range"))
    if not rows:
        return None
    return Table(("where", "turn", "by", "to"), tuple(rows),
                 "either change makes high- and low-frequency gain equal; ± one standard "
                 "uncertainty (noise and what was assumed)")


def _estimates_table(data: dict) -> Table:
    rows = []
    for name, est in (data.get("estimates") or {}).items():
        unit = est.get("unit") or next((u for end, u in reversed(_ESTIMATE_UNITS)
                                        if name.endswith(end)), "")
        if est.get("held"):
            status = "held (not fitted)"
        elif est.get("determined") is False:
            status = "not determined by the data"
        else:
            status = "fitted" if est.get("stderr") is not None else "derived"
        rows.append((_words(name), plus_minus(est.get("value"), est.get("stderr"), unit), status,
                     est.get("note", "")))
    res = data.get("resistances") or {}
    for arm in ("tip", "shunt"):
        if res.get(arm) is not None:
            rows.append((f"{arm} resistance", q(res[arm], "Ω"), "given or assumed", ""))
    return Table(("quantity", "value ± standard error", "how", "note"), tuple(rows))


def _prediction_table(pr: dict) -> Table | None:
    b, a = pr.get("before"), pr.get("after")
    if not b or not a:
        return None

    def flat(x):
        return "—" if x is None else f"{x:.3g} %"

    def rise(x):
        if x.get("rise_time") is None and x.get("rise_time_bound") is not None:
            return "≤ " + q(x["rise_time_bound"], "s") + " (edge not resolved)"
        return q(x.get("rise_time"), "s")

    rows = [("10–90 % rise time", rise(b), rise(a)),
            ("overshoot", f"{b.get('overshoot', 0):.2f} %", f"{a.get('overshoot', 0):.2f} %"),
            ("largest departure from flat after five edge times", flat(b.get("flatness")),
             flat(a.get("flatness")))]
    return Table(("figure", "as found", "after the trim"), tuple(rows))


def _checks_table(data: dict) -> Table:
    rows = []
    fit = data.get("fit") or {}
    if fit.get("residual_rms") is not None and fit.get("noise_rms"):
        ratio = fit["residual_rms"] / fit["noise_rms"]
        value = (f"{q(fit['residual_rms'], 'V')} rms against {q(fit['noise_rms'], 'V')} rms "
                 f"({ratio:.2f}×)")
        rows.append(("fit residual against the noise", value,
                     "passed" if ratio <= 2 else "FAILED"))
    if fit.get("reduced_chi_square") is not None:
        rows.append(("reduced chi-square", f"{fit['reduced_chi_square']:.3g}",
                     f"on {fit.get('points', '?')} points"))
    res = data.get("resolution") or {}
    if res.get("gain_error") is not None:
        rows.append(("smallest gain error the capture can show",
                     f"±{100 * res['gain_error']:.2g} % (limited by {res.get('limited_by', '?')})",
                     "limits the verdict" if data.get("resolution_limited") else "passed"))
    m = data.get("metrics") or {}
    if "clipped" in m:
        rows.append(("capture clipped", "yes" if m["clipped"] else "no",
                     "FAILED" if m["clipped"] else "passed"))
    if m.get("periods_averaged") is not None:
        rows.append(("full periods averaged", str(m["periods_averaged"]),
                     "passed" if m["periods_averaged"] >= 1 else "FAILED"))
    for c in data.get("checks") or ():
        if isinstance(c, dict):
            rows.append((_words(str(c.get("name", ""))), _cell(c.get("value", c.get("detail"))),
                         "passed" if c.get("ok", c.get("passed")) else "FAILED"))
    return Table(("check", "value", "outcome"), tuple(rows))


def _capture_table(m: dict) -> Table | None:
    if not m:
        return None
    rows = []
    for key, label, unit in (("source", "file", None), ("channel", "channel", None),
                             ("amplitude", "amplitude", "V"), ("period", "period", "s"),
                             ("rise_time", "10–90 % rise time", "s"),
                             ("sample_interval", "sample interval", "s"),
                             ("noise_rms", "noise", "V")):
        v = m.get(key)
        if v is None:
            continue
        rows.append((label, Path(v).name if key == "source" else (q(v, unit) if unit else str(v))))
    if m.get("overshoot") is not None:
        rows.append(("overshoot", f"{m['overshoot']:.2f} %"))
    if m.get("snr_db") is not None:
        rows.append(("signal to noise", f"{m['snr_db']:.1f} dB"))
    return Table(("figure", "value"), tuple(rows), "IEEE Std 181 measurements on the capture")


# --- chain figures (bandwidth) ------------------------------------------------------------

def chain_report(figures, *, title: str, inputs=(), cautions=()) -> Report:
    """The report of a chain analysis (:func:`taumatch.chain_figures`, ``taumatch bandwidth``)."""
    data = figures.to_dict()
    bw, tr = data.get("bandwidth"), data.get("rise_time")
    head = ", ".join(x for x in (f"bandwidth {q(bw, 'Hz')}" if bw else "",
                                 f"rise time {q(tr, 's')}" if tr else "") if x)
    rows = []
    for key, label, unit in (("bandwidth", "bandwidth (−3 dB)", "Hz"),
                             ("lower_bandwidth", "lower −3 dB point", "Hz"),
                             ("dc_gain", "DC gain", ""), ("rise_time", "rise time (10–90 %)", "s"),
                             ("displayed_rise_time", "rise time with the source edge", "s"),
                             ("rss_rise_time", "root-sum-of-squares estimate", "s")):
        if data.get(key) is not None:
            rows.append((label, q(data[key], unit)))
    if data.get("peaking_db") is not None:
        rows.append(("peaking", f"{data['peaking_db']:+.2f} dB"
                     + (f" at {q(data['peak_frequency'], 'Hz')}"
                        if data.get("peak_frequency") else "")))
    if data.get("overshoot") is not None:
        rows.append(("step overshoot", f"{100 * data['overshoot']:.1f} %"))
    if data.get("settling_time") is not None:
        rows.append(("settles within 2 %", q(data["settling_time"], "s")))
    if data.get("rss_error") is not None:
        rows.append(("estimate against the exact figure", _percent(data["rss_error"])))
    load = data.get("loading") or {}
    if load.get("r") is not None and load.get("c") is not None:
        rows.append(("seen by the circuit", f"{q(load['r'], 'Ω')} ∥ {q(load['c'], 'F')}"))
    ring = data.get("ringing") or {}
    if ring.get("frequency") is not None:
        value = f"{q(ring['frequency'], 'Hz')}, damping {ring.get('damping', float('nan')):.3g}"
        rows.append(("ground-lead ringing", value))
    sections = [Section("Figures", (Table(("figure", "value"), tuple(rows)),))]
    if data.get("warning"):
        sections.insert(0, Section("Read this first", (Notes("warning", (data["warning"],)),)))
    budget = budget_table([{"part": t.get("part"), "rise time": q(t.get("rise_time"), "s")}
                           for t in data.get("rss_terms") or ()],
                          "rise time of each part on its own; their root sum of squares is the "
                          "estimate above")
    if budget is not None:
        sections.append(Section("Rise-time budget", (budget,)))
    sections.append(Section("Summary", (Text(figures.summary()),)))
    sections += _notes("Warnings", "warning", data.get("warnings"))
    sections += _notes("High-voltage cautions", "caution", cautions)
    pics = _figure(figures, "Gain against frequency with the −3 dB point, the step response "
                            "and the impedance the circuit sees.", "chain response")
    if pics:
        sections.append(Section("Pictures", tuple(pics)))
    tone = "change" if data.get("warning") else "plain"
    return Report(title, tuple(inputs), Headline(head or "chain figures", tone),
                  tuple(sections), raw=data)


# --- divider design -----------------------------------------------------------------------

def divider_report(design, monte_carlo=None, *, title: str, inputs=()) -> Report:
    """The report of a divider design (``taumatch divider``), with its Monte Carlo if run."""
    data = design.to_dict()
    top = data.get("tip") or data.get("top") or {}
    bottom = data.get("shunt") or data.get("bottom") or {}
    trim = data.get("trimmer") or {}
    head = (f"{data.get('target_ratio', 0):g}:1 divider, ratio {data.get('ratio', 0):.6g} "
            f"(error {_percent(data.get('ratio_error'))}), trimmer {q(trim.get('min'), 'F')} "
            f"to {q(trim.get('max'), 'F')} in the {trim.get('arm', '?')} arm")
    n_top = len(top.get("resistors") or ())
    rows = [("tip arm", (f"{n_top} resistors, {q(top.get('resistance'), 'Ω')} ∥ "
                         f"{q(top.get('capacitance'), 'F')}")),
            ("shunt arm", (f"{q(bottom.get('resistance'), 'Ω')} ∥ "
                            f"{q(bottom.get('capacitance'), 'F')}")),
            ("trimmer", (f"{q(trim.get('min'), 'F')} to {q(trim.get('max'), 'F')}, nominal "
                         f"{q(trim.get('nominal'), 'F')}")),
            ("input resistance", q(data.get("input_resistance"), "Ω"))]
    if data.get("ratio_error_worst") is not None:
        rows.append(("worst-case ratio error (tolerance corners)",
                     _percent(data["ratio_error_worst"])))
    volt = data.get("voltage")
    if isinstance(volt, dict):       # the ratings at the working voltage
        if volt.get("voltage") is not None:
            rows.append(("peak working voltage", q(volt["voltage"], "V")))
        per = volt.get("per_resistor") or {}
        if per.get("voltage") is not None:
            rows.append(("most stressed tip resistor",
                         f"{q(per['voltage'], 'V')}, {q(per.get('power'), 'W')}"))
        if volt.get("stored_energy") is not None:
            rows.append(("energy stored in the capacitors", q(volt["stored_energy"], "J")))
    elif volt:
        rows.append(("peak working voltage", q(volt, "V")))
    sections = [Section("Design", (Table(("part", "value"), tuple(rows)),))]
    tol = data.get("tolerances") or {}
    t = budget_table({k: (f"{100 * v:g} %" if isinstance(v, float) else v) for k, v in tol.items()},
                     "the tolerances the trimmer range and the worst case were drawn from")
    if t is not None:
        sections.append(Section("Tolerance budget", (t,)))
    pics = _figure(design, "Gain against frequency, trimmed and at the worst untrimmed "
                           "tolerance corner.", "divider response")
    if monte_carlo is not None:
        mc = monte_carlo.to_dict()
        y, se = mc.get("yield_of_trimmer"), mc.get("yield_standard_error")
        sections.append(Section("Monte Carlo", (Table(("figure", "value"), (
            ("draws", f"{mc.get('draws')} ({mc.get('distribution')}, seed {mc.get('seed')})"),
            ("yield of the trimmer range", _percent(y, se, sign=False)),
            ("trimmer range for the wanted yield",
             f"{q(mc['trimmer_for_yield']['min'], 'F')} to {q(mc['trimmer_for_yield']['max'], 'F')}"),
        )), Text(monte_carlo.summary()))))
        pics += _figure(monte_carlo, "The trimmer value each draw needs, with the trimmer's range.",
                        "Monte Carlo histogram")
    sections.append(Section("Summary", (Text(design.summary()),)))
    sections += _notes("Warnings", "warning", data.get("warnings"))
    sections += _notes("High-voltage cautions", "caution", data.get("cautions"))
    sections.append(Section("Pictures", tuple(pics)))
    raw = {**data, **({"monte_carlo": monte_carlo.to_dict()} if monte_carlo is not None else {})}
    return Report(title, tuple(inputs), Headline(head, "plain"), tuple(sections), raw=raw)
