"""Before and after a trim: did the change go the way the first diagnosis said, and how far?

The first capture's diagnosis predicts a change of shunt capacitance ``p`` (its trim).  The
second capture's diagnosis says what is still needed, ``r``.  Whatever was turned, in
either arm, moved the divider by the shunt-arm equivalent ``p − r``; the fraction of the
prediction that was carried out is ``(p − r)/p = 1 − r/p``.  The two captures are
independent measurements, so their standard errors add in quadrature (own derivation;
first-order propagation of uncorrelated errors, e.g. Taylor, "An Introduction to Error
Analysis", ch. 3).  Both diagnoses must assume the same arm resistances for the figure to
mean anything; the comparison says so when they differ.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..units import format_uncertain

__all__ = ["Comparison", "ComparisonCurves", "compare"]

#: a difference counts as measured when it exceeds this many standard errors
SIGNIFICANT = 2.0


@dataclass(frozen=True)
class Comparison:
    """Two diagnoses side by side (SI units; gain errors as fractions)."""

    before: object           # Diagnosis
    after: object            # Diagnosis
    names: tuple             # (before, after) labels, e.g. the file names
    outcome: str             # one of OUTCOMES
    applied: float | None    # shunt-arm equivalent change made (F)
    applied_stderr: float | None
    fraction: float | None   # applied / predicted
    fraction_stderr: float | None
    notes: tuple = ()

    def to_dict(self) -> dict:
        b, a = self.before.to_dict(), self.after.to_dict()

        def side(d, name):
            e, arms = d.get("hf_dc_error") or {}, d.get("arm_trims") or {}
            shunt, tip = arms.get("shunt") or {}, arms.get("tip") or {}
            return {"file": name, "verdict": d.get("verdict"), "gain_error": e.get("value"),
                    "gain_error_stderr": e.get("stderr"), "shunt_change": shunt.get("change"),
                    "shunt_change_stderr": shunt.get("change_stderr"),
                    "tip_change": tip.get("change"),
                    "tip_change_stderr": tip.get("change_stderr")}

        return {"before": side(b, self.names[0]), "after": side(a, self.names[1]),
                "outcome": self.outcome, "predicted_change": _trim(b)[0],
                "predicted_change_stderr": _trim(b)[1], "applied_change": self.applied,
                "applied_change_stderr": self.applied_stderr, "fraction_of_prediction":
                self.fraction, "fraction_of_prediction_stderr": self.fraction_stderr,
                "notes": list(self.notes)}

    def summary(self) -> str:
        d = self.to_dict()
        rows = [("", "before", "after")]
        for key, label in (("verdict", "verdict"), ("gain_error", "gain error"),
                           ("shunt_change", "trim at the shunt arm"),
                           ("tip_change", "trim at the tip arm")):
            cells = []
            for s in (d["before"], d["after"]):
                v, err = s[key], s.get(f"{key}_stderr")
                if key == "verdict":
                    cells.append(str(v))
                elif v is None:
                    cells.append("—")
                elif key == "gain_error":
                    cells.append(f"{100 * v:+.2f} % ± {100 * (err or 0):.2f} %")
                else:
                    cells.append(("+" if v > 0 else "−") + format_uncertain(abs(v), err or 0, "F"))
            rows.append((label, *cells))
        rows.append(("file", d["before"]["file"], d["after"]["file"]))
        w0 = max(len(r[0]) for r in rows)
        w1 = max(len(r[1]) for r in rows)
        lines = [f"{r[0]:{w0}s}  {r[1]:{w1}s}  {r[2]}" for r in rows]
        lines.append("")
        lines.append(f"change: {self.describe()}")
        lines += [f"note: {n}" for n in self.notes]
        return "\n".join(lines)

    def describe(self) -> str:
        """The outcome in words, with the figures behind it."""
        p, sp = _trim(self.before.to_dict())
        made = (f"the change made equals {_signed(self.applied, self.applied_stderr)} at the "
                f"shunt arm against {_signed(p, sp)} predicted")
        frac = (f"{100 * self.fraction:.0f} % ± {100 * self.fraction_stderr:.0f} % of the "
                f"predicted amount" if self.fraction is not None else "")
        return {
            "no prediction": "the first capture was already compensated (within the acceptance band or "
                             "its uncertainty), so no change was predicted; " + made,
            "no measurable change": "no measurable change between the captures; " + made,
            "wrong way": "the change went the WRONG way; " + made,
            "too far": f"the change went the predicted way but too far: {frac}; " + made,
            "short": f"the change went the predicted way, not far enough yet: {frac}; " + made,
            "as predicted": f"the change went the predicted way: {frac}; " + made,
        }[self.outcome]

    @property
    def curves(self) -> ComparisonCurves:
        """What the picture draws: both averaged periods from the rising edge and the first
        diagnosis's prediction after its trim, the first one's leading-corner window."""
        import numpy as np

        from ..diagnosis_curves import corner_window

        out = []
        for d, name, role in ((self.before, self.names[0], "before"),
                              (self.after, self.names[1], "after")):
            ap = d.metrics.averaged
            out.append((np.asarray(ap.t), np.asarray(ap.v),
                        f"{name}: {100 * d.hf_dc_error.value:+.2f} %", role))
        pred = self.before.prediction() if self.before.trim is not None else {}
        if pred.get("times") is not None:
            out.append((np.asarray(pred["times"]), np.asarray(pred["square_after"]),
                        f"{self.names[0]}: predicted after its trim", "predicted"))
        lo, hi = corner_window(self.before, out[0][0])
        frac = (f" ({100 * self.fraction:.0f} % ± {100 * self.fraction_stderr:.0f} % of the "
                "prediction)" if self.fraction is not None else "")
        title = f"before and after: {_SHORT.get(self.outcome, self.outcome)}{frac}"
        return ComparisonCurves(tuple(out), (lo, hi), max(lo, hi / 50), title)

    def plot(self, ax=None):
        """Both averaged periods (from the rising edge) and the first diagnosis's prediction
        after its trim, with the leading corner up close beside them; returns
        ``(fig, axes)`` (``(fig, ax)`` when ``ax`` is given: the periods only)."""
        from ..plot.workbench import plot_comparison

        return plot_comparison(self.curves, ax=ax)


@dataclass(frozen=True, eq=False)
class ComparisonCurves:
    """The curves of a comparison's picture: ``curves`` as ``(t, v, label, role)`` with
    times in s from the rising edge, volts, and role "before", "after" or "predicted";
    the leading corner's window ``corner`` (s), the time ``plateau_from`` (s) after which
    the corner's curves set its vertical scale, and the title."""

    curves: tuple
    corner: tuple
    plateau_from: float
    title: str


_SHORT = {"as predicted": "went as predicted", "short": "not far enough yet",
          "too far": "went too far", "wrong way": "went the wrong way",
          "no measurable change": "no measurable change",
          "no prediction": "no change was predicted"}


OUTCOMES = ("no prediction", "no measurable change", "wrong way", "too far", "short",
            "as predicted")


def _signed(v, err) -> str:
    return ("+" if v >= 0 else "−") + format_uncertain(abs(v), err, "F")


#: Terms of a diagnosis's budget that are each capture's own (independent between two
#: captures); the held and assumed values are the same for both and move both alike.
_OWN_TERMS = ("noise", "codes", "edge_instant", "edge_shape")


def _trim(d: dict):
    """The shunt-arm change and its standard uncertainty from the capture's own terms (the
    two diagnoses share their assumed values, whose effect cancels in a difference)."""
    tr = (d.get("arm_trims") or {}).get("shunt") or {}
    budget = ((d.get("uncertainty") or {}).get("budgets") or {}).get("shunt_change")
    if budget is None:
        return tr.get("change"), tr.get("change_stderr") or 0.0
    own = math.sqrt(sum(t["standard_uncertainty"] ** 2 for t in budget["terms"]
                        if t["name"] in _OWN_TERMS))
    return tr.get("change"), own


def compare(before, after, names=("before", "after")) -> Comparison:
    """Compare two diagnoses of the same divider, taken before and after a turn of its trim.

    Parameters
    ----------
    before, after : Diagnosis
        The diagnoses (:func:`taumatch.diagnose`) of the two captures.
    names : (str, str)
        Labels of the two captures (file names).

    Raises
    ------
    InputError
        When a diagnosis gives no trim (it was refused and not forced).
    """
    db, da = before.to_dict(), after.to_dict()
    p, sp = _trim(db)
    r, sr = _trim(da)
    if p is None or r is None:
        which = names[0] if p is None else names[1]
        raise InputError(f"{which}: its diagnosis gives no trim to compare")
    notes = []
    rb, ra = db.get("resistances") or {}, da.get("resistances") or {}
    if rb and ra and any(not math.isclose(rb[k], ra[k], rel_tol=1e-9) for k in rb if k in ra):
        notes.append("the two diagnoses assume different arm resistances; the change in trim "
                     "mixes that difference with the turn of the trimmer")
    for tag, d in zip(names, (db, da)):
        if d.get("refused"):
            notes.append(f"{tag} was forced past a refusal: {d['refused']}")
    applied = p - r
    s_applied = math.hypot(sp, sr)
    fraction = fraction_err = None
    if db.get("verdict") == "compensated" or abs(p) <= SIGNIFICANT * sp:
        outcome = "no prediction"
    elif abs(applied) <= SIGNIFICANT * s_applied:
        outcome = "no measurable change"
    elif applied * p < 0:
        outcome = "wrong way"
    else:
        fraction = 1.0 - r / p
        fraction_err = math.hypot(sr, r * sp / p) / abs(p)
        if fraction > 1 + SIGNIFICANT * fraction_err:
            outcome = "too far"
        elif fraction < 1 - SIGNIFICANT * fraction_err and abs(r) > SIGNIFICANT * sr:
            outcome = "short"
        else:
            outcome = "as predicted"
    return Comparison(before, after, tuple(names), outcome, applied, s_applied, fraction,
                      fraction_err, tuple(notes))
