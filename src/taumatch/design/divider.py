"""Design a compensated two-arm divider from a target ratio and the instrument it feeds.

Tip arm: a string of equal preferred-value resistors with a compensation capacitance
across it (:mod:`.resistors`, :mod:`.capacitors`).  Shunt arm: the instrument input
``Ri ∥ Ci``, the cable capacitance, an optional shunt resistor (one part or a two-part
combination) that brings the shunt resistance down to ``R1/(ratio − 1)``, and an optional
fixed capacitor.  A trimmer in one arm (``arm="shunt"`` or ``"tip"``) compensates; its
range is sized from the worst-case corners of every tolerance (:mod:`.tolerance` for the
Monte Carlo view).  The compensation is the two-arm model's
(:class:`taumatch.chain.two_arm.TwoArm`), with the column's earth capacitance where there is
one (:mod:`.column`: the tip capacitance is then at least the grading capacitance of
:mod:`.grading`).  With a voltage the string is sized by :mod:`.rating` and the cautions of
:mod:`taumatch.safety` are attached.  :meth:`DividerDesign.to_chain` writes the design as a
chain (:mod:`.as_chain`), which every chain analysis reads.

Examples
--------
>>> d = design_divider(10, instrument="1M||15p", cable_capacitance=90e-12)
>>> abs(d.ratio_error) < 0.001, d.trimmer.arm
(True, 'shunt')
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..chain.compensation import ARMS
from ..chain.two_arm import TwoArm
from ..errors import InputError
from ..units import format_quantity
from . import eseries
from .capacitors import choose_capacitors
from .column import Column, ColumnFigures, column_figures
from .instrument import Instrument
from .ranges import MAX_RESISTORS, check
from .rating import Rating, VoltageStress, string_count, voltage_stress
from .resistors import ResistorChoice, choose_resistors
from .tolerance import Tolerances, corners

__all__ = [
    "DEFAULT_MIN_TIP_C",
    "DEFAULT_TRIMMER_MAXIMUM",
    "DEFAULT_TRIMMER_MINIMUM",
    "DividerCurves",
    "DividerDesign",
    "TrimmerRange",
    "design_divider",
]

DEFAULT_MIN_TIP_C = 5e-12
"""F: smallest tip-arm capacitance chosen, so that a resistor's own ~0.2–0.5 pF and board
strays stay a small part of it (common practice, no source)."""
DEFAULT_TRIMMER_MINIMUM = 2e-12
"""F: lowest capacitance a small trimmer reaches (common practice, no source)."""
DEFAULT_TRIMMER_MAXIMUM = 500e-12
"""F: above this a warning says the range is beyond common trimmer capacitors (common
practice, no source)."""


@dataclass(frozen=True)
class TrimmerRange:
    """The trimmer a design needs [F]: its arm, the range every tolerance corner needs and
    the setting that trims nominal parts."""

    arm: str
    minimum: float
    maximum: float
    nominal: float

    def to_dict(self) -> dict:
        return {"arm": self.arm, "min": self.minimum, "max": self.maximum,
                "nominal": self.nominal}


@dataclass(frozen=True, eq=False)
class DividerCurves:
    """The response curves a design's picture shows: gain relative to the target (complex,
    ``H·ratio``) at ``f`` [Hz], trimmed (nominal parts), untrimmed at the worst tolerance
    corner, and for a column of several sections its lumped ladder."""

    f: np.ndarray
    trimmed: np.ndarray
    untrimmed_worst: np.ndarray
    ladder: np.ndarray | None
    target_ratio: float
    arm: str
    sections: int
    column: bool

    @property
    def view(self) -> tuple:
        """The frequencies (Hz) where the response changes, what the picture shows: a decade
        either side of where the untrimmed curve makes its step (2 % to 98 % of it, in dB)
        and of where the ladder departs from flat by more than 0.1 dB; the whole sweep when
        nothing changes."""
        f = self.f
        worst = 20 * np.log10(np.abs(self.untrimmed_worst))
        marks = []
        step = worst[-1] - worst[0]
        if abs(step) > 1e-3:
            done = (worst - worst[0]) / step
            marks += [f[np.argmax(done >= 0.02)], f[np.argmax(done >= 0.98)]]
        if self.ladder is not None:
            ladder = np.abs(20 * np.log10(np.abs(self.ladder)))
            if np.any(ladder > 0.1):
                marks.append(f[np.argmax(ladder > 0.1)])
        if not marks:
            return float(f[0]), float(f[-1])
        return float(max(f[0], min(marks) / 10)), float(min(f[-1], max(marks) * 10))


@dataclass(frozen=True, eq=False)
class DividerDesign:
    """A designed divider: parts, trimmer, ratio, ratings and cautions (SI units throughout).

    Build it with :func:`design_divider`.  ``c1``/``c2`` are each arm's total capacitance with
    the trimmer at its nominal setting.

    Attributes
    ----------
    target_ratio : float
    resistors : ResistorChoice
        The tip arm's resistor string and the shunt resistor(s) across the instrument
        (also as :attr:`tip_resistors`, :attr:`shunt_resistors`, :attr:`r1`, :attr:`r2`).
    tip_capacitors : tuple of float
        The tip arm's capacitors (one per section, in series).
    instrument : Instrument
    cable_c : float
        The cable's capacitance across the shunt arm [F].
    shunt_capacitors : tuple of float
        The fixed capacitor(s) across the shunt arm [F].
    trimmer : TrimmerRange
    ratio_error_worst : float
        Largest DC ratio error with every part at a tolerance limit (fraction).
    worst_corner : TwoArm
        The tolerance corner that spoils the compensation most, trimmer at nominal.
    tolerances : Tolerances
    sections : int
        Sections of the tip arm (1 for a single arm).
    column : ColumnFigures or None
        With earth capacitance: the column's figures.
    rating, stress : Rating, VoltageStress or None
        With a voltage: what was asked and what each part carries.
    """

    target_ratio: float
    resistors: ResistorChoice
    tip_capacitors: tuple
    instrument: Instrument
    cable_c: float
    shunt_capacitors: tuple
    trimmer: TrimmerRange
    ratio_error_worst: float
    worst_corner: TwoArm
    tolerances: Tolerances
    sections: int = 1
    series: str = "E96"
    capacitor_series: str = "E12"
    column: ColumnFigures | None = None
    rating: Rating | None = None
    stress: VoltageStress | None = None
    warnings: tuple = ()
    cautions: tuple = ()

    def __post_init__(self):
        if self.trimmer.arm not in ARMS:
            raise InputError(f"arm: must be one of {', '.join(ARMS)}, got {self.trimmer.arm!r}")
        check("ratio", self.target_ratio)
        if self.resistors.instrument_r != self.instrument.r:
            raise InputError("resistors: chosen for another instrument resistance "
                             f"({self.resistors.instrument_r!r} ohm, not {self.instrument.r!r})")

    # ------------------------------------------------------------ derived values
    @property
    def tip_resistors(self) -> tuple:
        """The tip arm's string [ohm]."""
        return self.resistors.tip_resistors

    @property
    def shunt_resistors(self) -> tuple:
        """The resistor(s) across the instrument [ohm], joined as :attr:`shunt_resistors_kind`."""
        return self.resistors.shunt_resistors

    @property
    def shunt_resistors_kind(self) -> str:
        return self.resistors.shunt_resistors_kind

    @property
    def shunt_resistor(self) -> float | None:
        """Resistance of the shunt resistor(s) across the instrument [ohm] (None: none)."""
        return self.resistors.shunt_resistor

    @property
    def r1(self) -> float:
        """Tip arm resistance [ohm]."""
        return self.resistors.r1

    @property
    def r2(self) -> float:
        """Shunt arm resistance (shunt resistor ∥ instrument) [ohm]."""
        return self.resistors.r2

    @property
    def c1_fixed(self) -> float:
        """Fixed tip capacitance (capacitors in series) [F]."""
        return 1.0 / sum(1.0 / c for c in self.tip_capacitors) if self.tip_capacitors else 0.0

    @property
    def c2_fixed(self) -> float:
        """Fixed shunt capacitance: instrument + cable + fixed capacitors [F]."""
        return self.instrument.c + self.cable_c + float(sum(self.shunt_capacitors))

    @property
    def c1(self) -> float:
        return self.c1_fixed + (self.trimmer.nominal if self.trimmer.arm == "tip" else 0.0)

    @property
    def c2(self) -> float:
        return self.c2_fixed + (self.trimmer.nominal if self.trimmer.arm == "shunt" else 0.0)

    @property
    def earth_c(self) -> float:
        """The column's earth capacitance [F] (0 without one)."""
        return 0.0 if self.column is None else self.column.column.earth_capacitance

    @property
    def arms(self) -> TwoArm:
        """The trimmed design (nominal parts, trimmer at nominal) as a two-arm divider."""
        return TwoArm(self.r1, self.c1, self.r2, self.c2, self.earth_c)

    @property
    def ratio(self) -> float:
        """Nominal DC ratio ``(R1 + R2)/R2``."""
        return (self.r1 + self.r2) / self.r2

    @property
    def ratio_error(self) -> float:
        """Nominal ratio error ``ratio/target − 1`` from preferred-value rounding."""
        return self.ratio / self.target_ratio - 1.0

    @property
    def input_resistance(self) -> float:
        """``R1 + R2`` [ohm]."""
        return self.r1 + self.r2

    @property
    def input_capacitance(self) -> float:
        """``C1 C2/(C1 + C2)`` [F] (lumped)."""
        return self.arms.input_capacitance

    def response(self, f, trimmed: bool = True):
        """Complex gain relative to the target (``H·ratio``) at frequencies ``f`` [Hz].

        ``trimmed=False``: the trimmer at its nominal setting with every part at the
        tolerance corner that spoils the compensation most.
        """
        arms = self.arms if trimmed else self.worst_corner
        return arms.freqresp(f) * self.target_ratio

    def curves(self, f=None) -> DividerCurves:
        """The curves :meth:`plot` draws, at ``f`` [Hz] (default: from 1/100 of the slowest to
        1000 times the fastest of the arms' and the column's time constants)."""
        if f is None:
            tau = [t for t in (self.r1 * self.c1, self.r2 * self.c2, self.r1 * self.earth_c)
                   if t > 0]
            lo = 1.0 / (2 * np.pi * max(tau)) / 100
            hi = 1.0 / (2 * np.pi * min(tau)) * 1e3
            f = np.logspace(np.log10(lo), np.log10(hi), 400)
        f = np.asarray(f, dtype=float)
        ladder = None
        if self.column is not None and self.sections > 1:
            from .ladder import ladder_response

            ladder = ladder_response(f, self.r1, self.c1, self.r2, self.c2, self.earth_c,
                                     self.sections) * self.target_ratio
        return DividerCurves(f, self.response(f), self.response(f, trimmed=False), ladder,
                             self.target_ratio, self.trimmer.arm, self.sections,
                             self.column is not None)

    def per_resistor(self) -> dict | None:
        """Voltage [V] and power [W] of the most stressed tip resistor, or None."""
        if self.stress is None:
            return None
        return {"voltage": self.stress.resistor_voltage, "power": self.stress.resistor_power}

    def to_chain(self):
        """The design as a :class:`taumatch.chain.Chain` (see :mod:`.as_chain`)."""
        from .as_chain import design_chain

        return design_chain(self)

    # ------------------------------------------------------------ outputs
    def to_dict(self) -> dict:
        return {
            "target_ratio": self.target_ratio,
            "ratio": self.ratio, "ratio_error": self.ratio_error,
            "ratio_error_worst": self.ratio_error_worst,
            "input_resistance": self.input_resistance,
            "input_capacitance": self.input_capacitance,
            "tip": {"resistors": list(self.tip_resistors), "resistance": self.r1,
                    "capacitors": list(self.tip_capacitors), "capacitance": self.c1},
            "shunt": {"resistors": list(self.shunt_resistors),
                      "resistors_kind": self.shunt_resistors_kind,
                      "resistance": self.r2, "capacitors": list(self.shunt_capacitors),
                      "capacitance": self.c2, "instrument_resistance": self.instrument.r,
                      "instrument_capacitance": self.instrument.c,
                      "cable_capacitance": self.cable_c},
            "sections": self.sections,
            "trimmer": self.trimmer.to_dict(),
            "hf_dc_error_worst": self.worst_corner.hf_dc_error,
            "worst_corner": self.worst_corner.to_dict(),
            "yield": None,
            "series": self.series, "capacitor_series": self.capacitor_series,
            "tolerances": self.tolerances.to_dict(),
            "voltage": None if self.stress is None else {
                **self.stress.to_dict(), "kind": self.rating.kind, "margin": self.rating.margin},
            "column": None if self.column is None else self.column.to_dict(),
            "warnings": list(self.warnings), "cautions": list(self.cautions),
        }

    def summary(self) -> str:
        q = format_quantity
        lines = [(f"Divider {self.target_ratio:g}:1, input {q(self.input_resistance, 'Ω')} ∥ "
                  f"{q(self.input_capacitance, 'F')}"),
                 (f"  tip arm:   {len(self.tip_resistors)} x {q(self.tip_resistors[0], 'Ω')}"
                  f" = {q(self.r1, 'Ω')}, C1 = {q(self.c1, 'F')}")
                 + (f" ({len(self.tip_capacitors)} x {q(self.tip_capacitors[0], 'F')} in series)"
                    if len(self.tip_capacitors) > 1 else "")]
        sh = ("none" if not self.shunt_resistors else
              (" ∥ " if self.shunt_resistors_kind == "parallel" else " + ").join(
                  q(p, "Ω") for p in self.shunt_resistors))
        lines.append(f"  shunt arm: shunt resistor ({sh}) ∥ instrument "
                     f"{q(self.instrument.r, 'Ω')} = {q(self.r2, 'Ω')}; C2 = {q(self.c2, 'F')} "
                     f"(instrument {q(self.instrument.c, 'F')}, cable {q(self.cable_c, 'F')}, "
                     f"fixed {q(sum(self.shunt_capacitors), 'F')})")
        t = self.trimmer
        lines.append(f"  trimmer ({t.arm} arm): needs {q(t.minimum, 'F')} to "
                     f"{q(t.maximum, 'F')}, nominal {q(t.nominal, 'F')}")
        lines.append(f"  ratio {self.ratio:.6g} (error {self.ratio_error:+.3%} nominal, "
                     f"±{self.ratio_error_worst:.3%} with every part at its limit); "
                     f"untrimmed at the worst corner the HF gain is "
                     f"{self.worst_corner.hf_dc_error:+.2%} against DC")
        if self.stress is not None:
            lines.append(self.stress.summary())
        if self.column is not None:
            lines.append(self.column.summary())
        lines += [f"  warning: {w}" for w in self.warnings]
        lines += [f"  CAUTION: {c}" for c in self.cautions]
        return "\n".join(lines)

    def plot(self, ax=None):
        from ..plot.design import plot_divider_response

        return plot_divider_response(self.curves(), ax=ax)


# ---------------------------------------------------------------- design procedure
def design_divider(ratio: float, input_resistance: float | None = None,
                   instrument="1M||14p", cable_capacitance: float = 0.0, *,
                   arm: str = "shunt", series: str = "E96", capacitor_series: str = "E12",
                   tolerances: Tolerances | None = None, rating: Rating | None = None,
                   column: Column | None = None, tip_capacitance: float | None = None,
                   min_tip_capacitance: float = DEFAULT_MIN_TIP_C,
                   trimmer_minimum: float = DEFAULT_TRIMMER_MINIMUM) -> DividerDesign:
    """Design both arms of a compensated divider.

    Parameters
    ----------
    ratio : float
        Target attenuation ``(R1 + R2)/R2``, e.g. 100 for 100:1.
    input_resistance : float, optional
        Wanted DC input resistance ``R1 + R2`` [ohm]; default ``ratio × instrument R``
        (no shunt resistor).
    instrument : Instrument, str or (float, float)
        Instrument input, e.g. ``"1M||14p"`` [ohm, F].
    cable_capacitance : float
        Cable capacitance across the shunt arm [F] (lumped).
    arm : {"shunt", "tip"}
        Arm that holds the trimmer.
    series, capacitor_series : str
        Preferred-number series for resistors and for fixed capacitors.
    tolerances : Tolerances, optional
        The parts' tolerances (default :class:`Tolerances()`).
    rating : Rating, optional
        The peak working voltage and the resistors' ratings: sizes the string, reports what
        each part carries and attaches the cautions.
    column : Column, optional
        The tip arm as a high-voltage column with earth capacitance and sections.
    tip_capacitance : float, optional
        Use this tip capacitance [F] instead of choosing one.
    min_tip_capacitance, trimmer_minimum : float
        [F]; see :data:`DEFAULT_MIN_TIP_C`, :data:`DEFAULT_TRIMMER_MINIMUM`.

    Raises
    ------
    InputError
        For a value outside its range (:mod:`.ranges`) or an impossible request (a shunt arm
        above the instrument's resistance, a string of more than
        :data:`~taumatch.design.ranges.MAX_RESISTORS` resistors).
    """
    ratio = check("ratio", ratio)
    inst = Instrument.parse(instrument)
    cable = check("cable_capacitance", cable_capacitance)
    if arm not in ARMS:
        raise InputError(f"arm: must be one of {', '.join(ARMS)}, got {arm!r}")
    series = eseries.check_series(series)
    capacitor_series = eseries.check_series(capacitor_series)
    tolerances = Tolerances() if tolerances is None else tolerances
    if tip_capacitance is not None:
        tip_capacitance = check("tip_capacitance", tip_capacitance)
    min_tip_capacitance = check("min_tip_capacitance", min_tip_capacitance)
    trimmer_minimum = check("trimmer_minimum", trimmer_minimum)
    rin = ratio * inst.r if input_resistance is None else check("input_resistance",
                                                                input_resistance)
    if rin / ratio > inst.r * (1 + 1e-9):
        raise InputError(f"input_resistance: {format_quantity(rin, 'Ω')} at {ratio:g}:1 needs a "
                         f"shunt arm of {format_quantity(rin / ratio, 'Ω')}, above the "
                         f"instrument's {format_quantity(inst.r, 'Ω')}; at most "
                         f"{format_quantity(ratio * inst.r, 'Ω')} is possible")
    ce = 0.0 if column is None else column.earth_capacitance
    n_sec = 1 if column is None else column.sections
    if arm == "tip" and ce > 0:
        raise InputError("arm: a trimmer across a column with earth capacitance is not "
                         "modelled; use arm='shunt'")
    warnings: list[str] = []
    if column is not None and column.geometry is not None:
        warnings.append(f"earth capacitance {format_quantity(ce, 'F')} estimated from the "
                        "column's geometry (cylinder at one potential over an earthed plane); a "
                        "rough figure, measure it where it matters")
    count = _string_count(ratio, rin, n_sec, rating, warnings)
    res = choose_resistors(ratio, count, inst.r, series, tolerances.resistors, rin)
    r1, r2 = res.r1, res.r2
    tol = tolerances.by_quantity()

    # --- capacitances: worst-case corners of everything toleranced
    k = corners(tol)
    rsh = res.shunt_resistor
    r1c = r1 * k["r1"]
    r2c = (inst.r * k["ri"] if rsh is None else
           rsh * k["rsh"] * inst.r * k["ri"] / (rsh * k["rsh"] + inst.r * k["ri"]))
    corner = TwoArm(r1c, 0.0, r2c, inst.c * k["ci"] + cable * k["cable"], ce * k["ce"])
    if ce > 0:
        from .grading import grading_capacitance

        min_tip_capacitance = max(min_tip_capacitance,
                                  grading_capacitance(ce, column.grading_limit))
    caps = choose_capacitors(arm, corner, k["c1"], k["cb"], tol, n_sec, series=capacitor_series,
                             minimum=min_tip_capacitance, trimmer_minimum=trimmer_minimum,
                             tip_capacitance=tip_capacitance)
    t = caps.trims
    if t.min() < 0:
        warnings.append(f"the worst case needs a negative trimmer ({format_quantity(t.min(), 'F')})"
                        "; the fixed capacitance is too large for these tolerances")
    if t.max() > DEFAULT_TRIMMER_MAXIMUM:
        warnings.append(f"the trimmer must reach {format_quantity(t.max(), 'F')}, beyond common "
                        "trimmer capacitors; pad it with selected fixed capacitors or use "
                        "tighter capacitor tolerances")
    c1f = caps.c1_fixed
    c2f = inst.c + cable + float(sum(caps.shunt_capacitors))
    t_nom = float(TwoArm(r1, c1f, r2, c2f, ce).change(arm))
    # the corner that spoils the compensation most with the trimmer left at t_nom
    cb = float(sum(caps.shunt_capacitors))
    at_nominal = corner.with_values(c1=c1f * k["c1"] + (t_nom if arm == "tip" else 0.0),
                                    c2=corner.c2 + cb * k["cb"]
                                    + (t_nom if arm == "shunt" else 0.0))
    w = int(np.argmax(np.abs(at_nominal.hf_dc_error)))
    worst = TwoArm(*(float(np.asarray(getattr(at_nominal, n))[w])
                     for n in ("r1", "c1", "r2", "c2", "ce")))
    trimmer = TrimmerRange(arm, float(t.min()), float(t.max()), t_nom)
    arms = TwoArm(r1, c1f + (t_nom if arm == "tip" else 0.0), r2,
                  c2f + (t_nom if arm == "shunt" else 0.0), ce)
    figures = column_figures(arms, column, c1f, t_nom) if ce > 0 else None
    stress, caut = (None, ())
    if rating is not None:
        stress, caut = voltage_stress(arms, rating, res.tip_resistors, caps.tip_capacitors,
                                      arm, warnings)
    return DividerDesign(
        target_ratio=ratio, resistors=res, tip_capacitors=caps.tip_capacitors, instrument=inst,
        cable_c=cable,
        shunt_capacitors=caps.shunt_capacitors, trimmer=trimmer,
        ratio_error_worst=float(np.max(np.abs(corner.ratio / ratio - 1.0))),
        worst_corner=worst, tolerances=tolerances, sections=n_sec, series=series,
        capacitor_series=capacitor_series, column=figures, rating=rating, stress=stress,
        warnings=tuple(warnings), cautions=tuple(caut))


def _string_count(ratio, rin, sections, rating, warnings) -> int:
    """Resistors in the tip string: a multiple of the sections, enough for the rating."""
    n = sections
    if rating is not None:
        if rating.limiting_voltage is None:
            warnings.append(f"limiting voltage per resistor not given; assumed "
                            f"{format_quantity(rating.limiting, 'V')} (check the part's data "
                            "sheet)")
        v_tip = rating.voltage * (ratio - 1.0) / ratio
        n = max(n, string_count(v_tip, rating.limiting, rating.margin, rin - rin / ratio,
                                rating.power_rating))
        n = sections * math.ceil(n / sections)
    if n > MAX_RESISTORS:
        raise InputError(f"voltage: the tip string would need {n} resistors, more than "
                         f"{MAX_RESISTORS}; use resistors with a higher limiting voltage or "
                         "power rating, or a larger margin")
    return n
