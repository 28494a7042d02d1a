"""What a divider fit returns: estimates with their standard errors, and the fitted chain."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .models import chain_rational, square_model

__all__ = ["DividerFit", "Estimate"]


#: Fitted quantities for which "consistent with zero" is worth saying (physical ones).
_ZERO_NOTED = {"c1", "c2", "lead_l", "lead_r"}


@dataclass(frozen=True)
class Estimate:
    """A fitted or derived value with its standard error (None when not available).

    ``determined`` is True when the data fix the value to within its standard error (a
    value consistent with zero is determined: it is small, and the error bar says how
    small).  ``bound`` is set when the data only bound the quantity from above (an edge
    the sampling does not resolve): then ``value`` is what the model used, not a
    measurement, and carries no standard error.
    """

    value: float
    stderr: float | None
    unit: str
    determined: bool = True
    held: bool = False
    note: str = ""
    bound: float | None = None

    @property
    def resolved(self) -> bool:
        """False when the quantity is only bounded from above."""
        return self.bound is None

    def text(self) -> str:
        """``'8.537 ± 0.035 pF'``; ``'110 pF (held)'``; ``'at most 12 ns (not resolved)'``."""
        from ..units import format_quantity, format_uncertain

        if not self.resolved:
            return f"at most {format_quantity(self.bound, self.unit)} (not resolved)"
        if self.held or self.stderr is None:
            return format_quantity(self.value, self.unit) + (" (held)" if self.held else "")
        return format_uncertain(self.value, self.stderr, self.unit)

    def to_dict(self) -> dict:
        out = {"value": self.value if self.resolved else None, "stderr": self.stderr,
               "unit": self.unit, "determined": self.determined, "held": self.held,
               "note": self.note}
        if not self.resolved:
            out.update(upper_bound=self.bound, resolved=False, model_value=self.value)
        return out


def estimates_from(params, scales: dict, inflate: float, lead: bool) -> tuple:
    """The estimates and the derived quantities (gain error, trims) of fitted lmfit
    ``params``, in SI units (``scales``: the SI value of one unit of each parameter),
    standard errors widened by ``inflate``."""

    def est(name, scale, unit):
        par = params[name]
        se = (None if par.stderr is None or not np.isfinite(par.stderr)
              else float(par.stderr) * scale * inflate)
        held = not par.vary and par.expr is None
        value = float(par.value) * scale
        note = ("consistent with zero" if name in _ZERO_NOTED and se is not None and not held
                and abs(value) <= 2 * se else "")
        return Estimate(value, None if held else se, unit, held or se is not None, held, note)

    estimates = {
        "tip_capacitance": est("c1", scales["c1"], "F"),
        "shunt_capacitance": est("c2", scales["c2"], "F"),
        "amplitude": est("amp", scales["amp"], "V"),
        "offset": est("offset", scales["offset"], "V"),
        "delay": est("delay", scales["delay"], "s"),
        "edge_time": est("edge", scales["edge"], "s"),
    }
    if lead:
        estimates["lead_inductance"] = est("lead_l", scales["lead_l"], "H")
        estimates["lead_resistance"] = est("lead_r", scales["lead_r"], "Ω")
    derived = {
        "hf_dc_error": est("hf_dc_error", 1.0, ""),
        "shunt_change": est("shunt_change", scales["c1"], "F"),
        "tip_change": est("tip_change", scales["c1"], "F"),
    }
    return estimates, derived


@dataclass(frozen=True)
class DividerFit:
    """Result of :func:`fit_divider`; times in s, capacitances in F, voltages in V.

    ``degenerate`` says why the fitted parameters are no physical divider (a time constant
    of many periods, a tip capacitance far from any probe's, contradicting error bars) when
    no physical reading fits about as well; None otherwise.  ``sensitivity`` holds, for
    the fitted tip and shunt capacitance and amplitude, how far each would move per unit
    change of each held parameter (``r1``, ``r2``, ``c2``, ``edge``, ``lead_l``, ``lead_r``;
    SI per SI), from :func:`taumatch.fit.sensitivity.held_sensitivities`; ``held_ends``
    holds, for a held shunt capacitance, ``((c2, c1), (c2, c1))``: the tip capacitance
    refitted with C2 held at each end of its tolerance (F); ``edge_free`` the tip and
    shunt capacitance fitted again without the samples near the edges (the model's
    first-order source edge then has no say in the jump), or None.
    """

    r1: float
    r2: float
    period: float
    duty: float
    estimates: dict
    derived: dict
    correlations: dict
    residual_rms: float
    noise_rms: float
    points: int
    redchi: float
    nfev: int
    notes: tuple = ()
    degenerate: str | None = None
    sensitivity: dict = field(default_factory=dict)
    held_ends: dict = field(default_factory=dict)
    edge_free: dict | None = None
    sample_interval: float | None = None
    t: np.ndarray = field(default=None, repr=False)
    v: np.ndarray = field(default=None, repr=False)

    @property
    def c1(self) -> float:
        return self.estimates["tip_capacitance"].value

    @property
    def c2(self) -> float:
        return self.estimates["shunt_capacitance"].value

    @property
    def arms(self):
        """The fitted divider as the package's two-arm model."""
        from ..chain.two_arm import TwoArm

        return TwoArm(self.r1, self.c1, self.r2, self.c2)

    def transfer(self, trimmed: bool = False, edge: bool = True,
                 edge_time: float | None = None):
        """The fitted chain as a Rational; ``trimmed`` makes R1·C1 = R2·C2 at the shunt arm;
        ``edge_time`` (s) replaces the fitted source edge."""
        c2 = self.arms.required("shunt") if trimmed else self.c2
        e = self.estimates
        edge_s = (e["edge_time"].value if edge_time is None else edge_time) if edge else 0.0
        lead = ((e["lead_inductance"].value, e["lead_resistance"].value)
                if "lead_inductance" in e else None)
        return chain_rational(self.r1, self.c1, self.r2, c2, edge_s, lead)

    def model(self, t, trimmed: bool = False) -> np.ndarray:
        """The fitted (or trimmed) periodic response at times t (s)."""
        e = self.estimates
        return square_model(t, self.transfer(trimmed), self.period, self.duty,
                            e["amplitude"].value, e["offset"].value, e["delay"].value)

    def summary(self) -> str:
        """The fitted divider, its gain error, the other estimates and the fit's quality."""
        from ..units import format_quantity as q

        e = self.derived["hf_dc_error"]
        err = (f"{100 * e.value:+.2f} %" if e.stderr is None
               else f"{100 * e.value:+.2f} % ± {100 * e.stderr:.2f} %")
        c1, c2 = (self.estimates[k].text() for k in ("tip_capacitance", "shunt_capacitance"))
        lines = [f"fitted divider: tip {q(self.r1, 'Ω')} ∥ {c1}, shunt {q(self.r2, 'Ω')} ∥ {c2}",
                 f"gain error (HF against DC): {err}"]
        for key in ("amplitude", "offset", "edge_time", "lead_inductance", "lead_resistance"):
            if key in self.estimates:
                lines.append(f"  {key.replace('_', ' ')}: {self.estimates[key].text()}")
        lines.append(f"fit: residual {q(self.residual_rms, 'V')} rms against noise "
                     f"{q(self.noise_rms, 'V')} rms, {self.points} points, reduced χ² "
                     f"{self.redchi:.3g}")
        if self.degenerate:
            lines.append(f"no physical divider: {self.degenerate}")
        lines += [f"note: {n}" for n in self.notes]
        return "\n".join(lines)

    @property
    def curves(self) -> tuple:
        """``(t, v, fitted)``: the averaged period fitted, from the rising edge [s, V, V]."""
        t = np.asarray(self.t, dtype=float)
        return t, np.asarray(self.v, dtype=float), self.model(t)

    def plot(self, ax=None):
        """The averaged period and the fitted divider on it; returns ``(fig, ax)``."""
        from ..plot.response import plot_time_response

        t, v, fitted = self.curves
        fig, ax = plot_time_response(t, v, ax=ax, label="capture (averaged period)",
                                     ylabel="voltage")
        plot_time_response(t, fitted, ax=ax, label="fitted divider", ylabel="voltage",
                           title="divider fitted to the averaged period")
        return fig, ax

    def to_dict(self) -> dict:
        return {
            "estimates": {k: v.to_dict() for k, v in self.estimates.items()},
            "derived": {k: v.to_dict() for k, v in self.derived.items()},
            "correlations": self.correlations,
            "fit": {"residual_rms": self.residual_rms, "noise_rms": self.noise_rms,
                    "points": self.points, "reduced_chi_square": self.redchi,
                    "evaluations": self.nfev},
            "resistances": {"tip": self.r1, "shunt": self.r2},
            "notes": list(self.notes),
            **({"degenerate": self.degenerate} if self.degenerate else {}),
        }
