"""What a divider fit returns: estimates with their standard errors, and the fitted chain."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .models import divider_rational, edge_rational, ring_rational, series_c, square_model

__all__ = ["DividerFit", "Estimate"]


@dataclass(frozen=True)
class Estimate:
    """A fitted or derived value with its standard error (None when not available)."""

    value: float
    stderr: float | None
    unit: str
    determined: bool = True
    held: bool = False
    note: str = ""

    def to_dict(self) -> dict:
        return {"value": self.value, "stderr": self.stderr, "unit": self.unit,
                "determined": self.determined, "held": self.held, "note": self.note}


@dataclass(frozen=True)
class DividerFit:
    """Result of :func:`fit_divider`; times in s, capacitances in F, voltages in V.

    ``degenerate`` says why the fitted parameters are no physical divider (a time constant
    of many periods, a tip capacitance far from any probe's, contradicting error bars) when
    no physical reading fits about as well; None otherwise.
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
    t: np.ndarray = field(default=None, repr=False)
    v: np.ndarray = field(default=None, repr=False)

    @property
    def c1(self) -> float:
        return self.estimates["tip_capacitance"].value

    @property
    def c2(self) -> float:
        return self.estimates["shunt_capacitance"].value

    def transfer(self, trimmed: bool = False, edge: bool = True):
        """The fitted chain as a Rational; ``trimmed`` makes R1·C1 = R2·C2 at the shunt arm."""
        c2 = self.r1 * self.c1 / self.r2 if trimmed else self.c2
        H = divider_rational(self.r1, self.c1, self.r2, c2)
        if edge:
            H = H * edge_rational(self.estimates["edge_time"].value)
        if "lead_inductance" in self.estimates:
            H = H * ring_rational(self.estimates["lead_inductance"].value,
                                  self.estimates["lead_resistance"].value, series_c(self.c1, c2))
        return H

    def model(self, t, trimmed: bool = False) -> np.ndarray:
        """The fitted (or trimmed) periodic response at times t (s)."""
        e = self.estimates
        return square_model(t, self.transfer(trimmed), self.period, self.duty,
                            e["amplitude"].value, e["offset"].value, e["delay"].value)

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
