"""Design a compensated two-arm divider from a target ratio and the instrument it feeds.

Top (tip) arm: a string of equal preferred-value resistors with a compensation
capacitance across it.  Bottom (shunt) arm: the instrument input ``Ri ∥ Ci``, the cable
capacitance, an optional shunt resistor (one part or a two-part combination) that brings
the bottom resistance down to ``R1/(ratio − 1)``, and an optional fixed capacitor.  A
trimmer in one arm (``arm="bottom"`` or ``"top"``) makes ``R1·C1 = R2·C2``; its range is
sized from the worst-case corners of every tolerance (see :mod:`.tolerance` for the
Monte Carlo view).

With a stray capacitance to earth along the top arm (high-voltage columns) the
compensation uses the graded-column condition of :func:`.hv.hf_capacitance_ratio` and
the top capacitance is at least the grading capacitance of :func:`.hv.grading_capacitance`.

Examples
--------
>>> d = design_divider(10, instrument="1M||15p", cable_capacitance=90e-12)
>>> abs(d.ratio_error) < 0.001, d.trimmer_arm
(True, 'bottom')
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..safety import cautions as safety_cautions
from ..units import format_quantity, parse_quantity
from . import eseries, hv
from .tolerance import corners, hf_gain_ratio, needed_trim

__all__ = [
    "DEFAULT_LIMITING_VOLTAGE",
    "DEFAULT_MIN_TOP_C",
    "DEFAULT_TRIMMER_MAXIMUM",
    "DEFAULT_TRIMMER_MINIMUM",
    "DividerDesign",
    "design_divider",
    "parse_instrument",
]

DEFAULT_LIMITING_VOLTAGE = 200.0
"""V, assumed per resistor when a voltage is given without one: a common figure for small
through-hole metal-film parts (common practice, no source); a warning says so."""
DEFAULT_MIN_TOP_C = 5e-12
"""F: smallest top-arm capacitance chosen, so that a resistor's own ~0.2–0.5 pF and board
strays stay a small part of it (common practice, no source)."""
DEFAULT_TRIMMER_MINIMUM = 2e-12
"""F: lowest capacitance a small trimmer reaches (common practice, no source)."""

DEFAULT_TRIMMER_MAXIMUM = 500e-12
"""F: above this a warning says the range is beyond common trimmer capacitors (common
practice, no source)."""

_SPLIT = re.compile(r"\s*(?:\|\||∥|//)\s*")


def parse_instrument(text) -> tuple[float, float]:
    """Read an instrument input written ``"1M||14p"`` (also ``∥`` or ``//``) as (ohm, F)."""
    if isinstance(text, (tuple, list)) and len(text) == 2:
        r, c = (parse_quantity(v, field="instrument") for v in text)
    else:
        parts = _SPLIT.split(str(text).strip())
        if len(parts) != 2:
            raise InputError(f"instrument: expected R||C such as '1M||14p', got {text!r}")
        r = parse_quantity(parts[0], "ohm", field="instrument resistance")
        c = parse_quantity(parts[1], "F", field="instrument capacitance")
    if not r > 0:
        raise InputError(f"instrument: resistance must be positive, got {r!r} ohm")
    if not c >= 0:
        raise InputError(f"instrument: capacitance must not be negative, got {c!r} F")
    return float(r), float(c)


@dataclass(frozen=True)
class DividerDesign:
    """A designed divider: parts, trimmer, ratio, ratings and cautions (SI units throughout).

    Build it with :func:`design_divider`.  ``c1``/``c2`` are each arm's total capacitance
    with the trimmer at ``trimmer_nominal`` (the setting that trims nominal parts).
    """

    target_ratio: float
    top_resistors: tuple
    top_capacitors: tuple
    shunt_parts: tuple
    shunt_kind: str
    instrument_r: float
    instrument_c: float
    cable_c: float
    bottom_capacitors: tuple
    trimmer_arm: str
    trimmer_min: float
    trimmer_max: float
    trimmer_nominal: float
    ratio_error_worst: float
    earth_c: float
    sections: int
    tolerances: dict
    voltage: float | None = None
    voltage_kind: str = "unknown"
    limiting_voltage: float | None = None
    margin: float = hv.DEFAULT_VOLTAGE_MARGIN
    warnings: tuple = ()
    cautions: tuple = ()
    series: str = "E96"
    capacitor_series: str = "E12"
    extra: dict = field(default_factory=dict)

    def __post_init__(self):
        if self.trimmer_arm not in ("bottom", "top"):
            raise InputError(f"arm: must be 'bottom' or 'top', got {self.trimmer_arm!r}")
        if not self.target_ratio > 1:
            raise InputError(f"ratio: must be above 1, got {self.target_ratio!r}")
        if not self.top_resistors or min(self.top_resistors) <= 0:
            raise InputError(f"top_resistors: need positive values, got {self.top_resistors!r}")

    # ------------------------------------------------------------ derived values
    @property
    def r1(self) -> float:
        """Top arm resistance, ohm."""
        return float(sum(self.top_resistors))

    @property
    def shunt(self) -> float | None:
        """Shunt resistance across the instrument, ohm (None when there is none)."""
        if not self.shunt_parts:
            return None
        if self.shunt_kind == "parallel":
            return 1.0 / sum(1.0 / p for p in self.shunt_parts)
        return float(sum(self.shunt_parts))

    @property
    def r2(self) -> float:
        """Effective bottom arm resistance (shunt ∥ instrument), ohm."""
        sh = self.shunt
        ri = self.instrument_r
        return ri if sh is None else sh * ri / (sh + ri)

    @property
    def c1_fixed(self) -> float:
        """Fixed top capacitance (capacitors in series), F."""
        return 1.0 / sum(1.0 / c for c in self.top_capacitors) if self.top_capacitors else 0.0

    @property
    def c2_fixed(self) -> float:
        """Fixed bottom capacitance: instrument + cable + fixed capacitors, F."""
        return self.instrument_c + self.cable_c + float(sum(self.bottom_capacitors))

    @property
    def c1(self) -> float:
        return self.c1_fixed + (self.trimmer_nominal if self.trimmer_arm == "top" else 0.0)

    @property
    def c2(self) -> float:
        return self.c2_fixed + (self.trimmer_nominal if self.trimmer_arm == "bottom" else 0.0)

    @property
    def ratio(self) -> float:
        """Nominal dc ratio (R1 + R2)/R2."""
        return (self.r1 + self.r2) / self.r2

    @property
    def ratio_error(self) -> float:
        """Nominal ratio error ``ratio/target − 1`` from preferred-value rounding."""
        return self.ratio / self.target_ratio - 1.0

    @property
    def input_resistance(self) -> float:
        return self.r1 + self.r2

    def per_resistor(self) -> dict | None:
        """Voltage (V) and power (W, V²/R at the peak) of each top resistor, or None."""
        if self.voltage is None:
            return None
        i = self.voltage / self.input_resistance
        v = [i * r for r in self.top_resistors]
        return {"voltage": max(v), "power": max(vi * i for vi in v)}

    def response(self, f, trimmed: bool = True):
        """Complex gain relative to the target (``H·ratio``) at frequencies ``f`` (Hz).

        ``trimmed=False`` leaves the trimmer at its nominal setting with every part at
        the tolerance corner that spoils the compensation most.
        """
        s = 2j * np.pi * np.asarray(f, dtype=float)
        if trimmed:
            args = (self.r1, self.c1, self.r2, self.c2, self.earth_c)
        else:
            args = self.extra["worst_corner"]
        return hv.divider_column_response(s, *args) * self.target_ratio

    def response_time(self) -> float | None:
        """``T = −d/ds[H/H(0)]`` at 0 (s) of the trimmed design with its earth capacitance;
        None without one (a trimmed lumped divider has T = 0)."""
        if self.earth_c <= 0:
            return None
        return hv.response_time(
            lambda s: hv.divider_column_response(s, self.r1, self.c1, self.r2, self.c2,
                                                 self.earth_c), self.r1 * self.earth_c)

    def rational(self):
        """The lumped two-arm divider (earth capacitance ignored) as an lti Rational."""
        from ..lti import Rational

        r1, c1, r2, c2 = self.r1, self.c1, self.r2, self.c2
        return Rational.from_coeffs([r1 * r2 * c1, r2], [r1 * r2 * (c1 + c2), r1 + r2])

    # ------------------------------------------------------------ outputs
    def to_dict(self) -> dict:
        out = {
            "target_ratio": self.target_ratio,
            "top": {"resistors": list(self.top_resistors), "resistance": self.r1,
                    "capacitors": list(self.top_capacitors), "capacitance": self.c1},
            "bottom": {"resistors": list(self.shunt_parts), "shunt_kind": self.shunt_kind,
                       "resistance": self.r2, "capacitors": list(self.bottom_capacitors),
                       "capacitance": self.c2, "instrument_resistance": self.instrument_r,
                       "instrument_capacitance": self.instrument_c,
                       "cable_capacitance": self.cable_c},
            "trimmer": {"min": self.trimmer_min, "max": self.trimmer_max,
                        "nominal": self.trimmer_nominal, "arm": self.trimmer_arm},
            "input_resistance": self.input_resistance,
            "ratio": self.ratio, "ratio_error": self.ratio_error,
            "ratio_error_worst": self.ratio_error_worst,
            "yield": None,
            "series": self.series, "capacitor_series": self.capacitor_series,
            "tolerances": dict(self.tolerances),
            "response_time": self.response_time(),
            "warnings": list(self.warnings), "cautions": list(self.cautions),
        }
        if self.voltage is not None:
            out["voltage"] = self.voltage
            out["per_resistor"] = self.per_resistor()
            out["limiting_voltage"] = self.limiting_voltage
            out["margin"] = self.margin
        out.update({k: v for k, v in self.extra.items() if k != "worst_corner"})
        return out

    def summary(self) -> str:
        q = format_quantity
        lines = [f"Divider {self.target_ratio:g}:1, input {q(self.input_resistance, 'Ω')}",
                 f"  top arm:    {len(self.top_resistors)} x {q(self.top_resistors[0], 'Ω')}"
                 f" = {q(self.r1, 'Ω')}, C1 = {q(self.c1, 'F')}"
                 + (f" ({len(self.top_capacitors)} x {q(self.top_capacitors[0], 'F')} in series)"
                    if len(self.top_capacitors) > 1 else "")]
        sh = ("none" if not self.shunt_parts else
              (" ∥ " if self.shunt_kind == "parallel" else " + ").join(
                  q(p, "Ω") for p in self.shunt_parts))
        lines.append(f"  bottom arm: shunt ({sh}) ∥ instrument {q(self.instrument_r, 'Ω')}"
                     f" = {q(self.r2, 'Ω')}; C2 = {q(self.c2, 'F')} (instrument "
                     f"{q(self.instrument_c, 'F')}, cable {q(self.cable_c, 'F')}, fixed "
                     f"{q(sum(self.bottom_capacitors), 'F')})")
        lines.append(f"  trimmer ({self.trimmer_arm} arm): needs {q(self.trimmer_min, 'F')} to "
                     f"{q(self.trimmer_max, 'F')}, nominal {q(self.trimmer_nominal, 'F')}")
        lines.append(f"  ratio {self.ratio:.6g} (error {self.ratio_error:+.3%} nominal, "
                     f"±{self.ratio_error_worst:.3%} with every part at its limit)")
        pr = self.per_resistor()
        if pr:
            lines.append(f"  at {q(self.voltage, 'V')} peak: {q(pr['voltage'], 'V')} and "
                         f"{q(pr['power'], 'W')} per top resistor")
        if "capacitor_voltage" in self.extra:
            cv = self.extra["capacitor_voltage"]
            lines.append(f"  capacitor voltage: {q(cv['top'], 'V')} per top capacitor, "
                         f"{q(cv['bottom'], 'V')} across the bottom arm; stored energy "
                         f"{q(self.extra['stored_energy'], 'J')}; dissipation "
                         f"{q(self.extra['power_total'], 'W')} in all")
        if self.earth_c > 0:
            x = self.extra
            plural = "s" if self.sections > 1 else ""
            lines.append(f"  earth capacitance {q(self.earth_c, 'F')} ({self.sections} "
                         f"section{plural}): "
                         f"grading needs Cs >= {q(x['grading_capacitance_min'], 'F')} "
                         f"(midpoint error {x['grading_midpoint_error']:.2%} as built)")
            lines.append(f"  response time {q(self.response_time(), 's')} trimmed; ungraded "
                         f"column R·Ce/6 = {q(x['response_time_ungraded'], 's')}, 10-90 % "
                         f"{q(x['rise_time_ungraded'], 's')}; trimmed |H| within "
                         f"{x['trimmed_flatness']:.2%} of dc")
            if "response_time_ladder" in x:
                lines.append(f"  {self.sections}-section lumped ladder of the same column: "
                             f"response time {q(x['response_time_ladder'], 's')}")
        lines += [f"  warning: {w}" for w in self.warnings]
        lines += [f"  CAUTION: {c}" for c in self.cautions]
        return "\n".join(lines)

    def plot(self, ax=None):
        from ..plot.design import plot_divider_response

        return plot_divider_response(self, ax=ax)


# ---------------------------------------------------------------- design procedure
def _frac(value, name):
    v = float(value)
    if not (math.isfinite(v) and 0 <= v < 1):
        raise InputError(f"{name}: must be a fraction in [0, 1) such as 0.01 (1 %), got {value!r}")
    return v


def _choose_resistors(r1_target, n, ri, ratio, series, tol_r, rin):
    """Top value (from the bracket) and shunt: ratio error within a tenth of the tolerance
    first, then fewest shunt parts, then the input resistance nearest the one asked for."""
    best = None
    for each in sorted(set(eseries.bracket(r1_target / n, series))):
        r1 = n * each
        r2_need = r1 / (ratio - 1.0)
        options = [((), "none", ri)]
        if r2_need < ri:
            rsh = r2_need * ri / (ri - r2_need)
            for v in sorted(set(eseries.bracket(rsh, series))):
                options.append(((v,), "single", v))
            for c in eseries.best_pairs(rsh, series, count=1):
                options.append((c.parts, c.kind, c.value))
        for parts, kind, rsh in options:
            r2 = ri if not parts else rsh * ri / (rsh + ri)
            err = (r1 + r2) / r2 / ratio - 1.0
            key = (abs(err) > tol_r / 10, len(parts), abs(math.log((r1 + r2) / rin)), abs(err))
            if abs(err) > tol_r / 10:
                key = (True, 0, abs(err), len(parts))
            if best is None or key < best[0]:
                best = (key, each, parts, kind)
    _, each, parts, kind = best
    return each, parts, ("series" if kind == "single" else kind)


def design_divider(ratio: float, input_resistance: float | None = None, instrument="1M||14p",
                   cable_capacitance: float = 0.0, *, series: str = "E96",
                   capacitor_series: str = "E12", tolerance_r: float = 0.01,
                   tolerance_c: float = 0.05, instrument_tolerance_r: float = 0.0,
                   instrument_tolerance_c: float | None = None,
                   stray_tolerance: float | None = None, arm: str = "bottom",
                   voltage: float | None = None, voltage_kind: str = "unknown",
                   limiting_voltage: float | None = None, power_rating: float | None = None,
                   margin: float = hv.DEFAULT_VOLTAGE_MARGIN,
                   stray_capacitance: float | None = None, sections: int | None = None,
                   column_geometry: tuple | None = None,
                   grading_limit: float = 0.01, top_capacitance: float | None = None,
                   min_top_capacitance: float = DEFAULT_MIN_TOP_C,
                   trimmer_minimum: float = DEFAULT_TRIMMER_MINIMUM,
                   distribution: str = "uniform") -> DividerDesign:
    """Design both arms of a compensated divider.

    Parameters
    ----------
    ratio : float
        Target attenuation (R1 + R2)/R2, e.g. 100 for 100:1.
    input_resistance : float, optional
        Wanted dc input resistance R1 + R2, ohm; default ``ratio × instrument R`` (no shunt).
    instrument : str or (float, float)
        Instrument input ``"1M||14p"`` (ohm, F).
    cable_capacitance : float
        Cable capacitance across the bottom arm, F (lumped).
    series, capacitor_series : str
        Preferred-number series for resistors and for fixed capacitors.
    tolerance_r, tolerance_c : float
        Relative tolerance of our resistors and fixed capacitors (0.01 = 1 %).
    instrument_tolerance_r, instrument_tolerance_c, stray_tolerance : float, optional
        Relative tolerance of the instrument R and C (the latter also applied to the cable)
        and of the earth capacitance; the C ones default to ``tolerance_c``.
    arm : {"bottom", "top"}
        Arm that holds the trimmer.
    voltage : float, optional
        Peak working voltage across the divider, V; sizes the top string and prints cautions.
    voltage_kind : {"unknown", "ac", "dc"}
        For the caution threshold (30 V rms / 60 V dc).
    limiting_voltage : float, optional
        Limiting element voltage of each resistor, V (default 200 V with a warning).
    power_rating : float, optional
        Rated power of each resistor, W.
    margin : float
        Fraction of the limiting voltage and power each resistor may use.
    stray_capacitance : float, optional
        Capacitance to earth per section of the top column, F.
    sections : int, optional
        Number of sections of the column (each gets the same number of resistors and one
        grading capacitor).
    column_geometry : (float, float) or (float, float, float), optional
        Height, diameter and optionally base height above the earthed floor of the column,
        m: its earth capacitance is then estimated by
        :func:`.hv.column_capacitance_geometry` (instead of ``stray_capacitance``).
    grading_limit : float
        Allowed relative midpoint-voltage error of the graded column.
    top_capacitance : float, optional
        Use this top capacitance (F) instead of choosing one.
    min_top_capacitance, trimmer_minimum : float
        F; see :data:`DEFAULT_MIN_TOP_C`, :data:`DEFAULT_TRIMMER_MINIMUM`.
    distribution : {"uniform", "normal"}
        How the Monte Carlo of :mod:`.tolerance` draws parts (recorded with the design).

    Raises
    ------
    InputError
        For impossible requests (e.g. a bottom arm above the instrument resistance).
    """
    ratio = float(ratio)
    if not (math.isfinite(ratio) and ratio > 1):
        raise InputError(f"ratio: must be a number above 1 (e.g. 100 for 100:1), got {ratio!r}")
    ri, ci = parse_instrument(instrument)
    cable = float(cable_capacitance)
    if not (math.isfinite(cable) and cable >= 0):
        raise InputError(f"cable_capacitance: must be zero or positive, got {cable_capacitance!r}")
    if arm not in ("bottom", "top"):
        raise InputError(f"arm: must be 'bottom' or 'top', got {arm!r}")
    if distribution not in ("uniform", "normal"):
        raise InputError(f"distribution: must be 'uniform' or 'normal', got {distribution!r}")
    series = eseries._check_series(series)
    capacitor_series = eseries._check_series(capacitor_series)
    tol = {"r1": _frac(tolerance_r, "tolerance_r"), "rsh": _frac(tolerance_r, "tolerance_r"),
           "ri": _frac(instrument_tolerance_r, "instrument_tolerance_r"),
           "c1": _frac(tolerance_c, "tolerance_c"), "cb": _frac(tolerance_c, "tolerance_c"),
           "ci": _frac(tolerance_c if instrument_tolerance_c is None else instrument_tolerance_c,
                       "instrument_tolerance_c"),
           "ce": _frac(tolerance_c if stray_tolerance is None else stray_tolerance,
                       "stray_tolerance")}
    tol["cable"] = tol["ci"]
    warnings: list[str] = []
    rin = ratio * ri if input_resistance is None else float(input_resistance)
    if not (math.isfinite(rin) and rin > 0):
        raise InputError(f"input_resistance: must be positive, got {input_resistance!r}")
    if rin / ratio > ri * (1 + 1e-9):
        raise InputError(f"input_resistance: {format_quantity(rin, 'Ω')} at {ratio:g}:1 needs a "
                         f"bottom arm of {format_quantity(rin / ratio, 'Ω')}, above the "
                         f"instrument's {format_quantity(ri, 'Ω')}; at most "
                         f"{format_quantity(ratio * ri, 'Ω')} is possible")
    n_sec = 0
    ce = 0.0
    if column_geometry is not None:
        if stray_capacitance is not None:
            raise InputError("column_geometry: give either the geometry or the stray "
                             "capacitance, not both")
        geo = tuple(float(g) for g in column_geometry)
        if len(geo) not in (2, 3):
            raise InputError(f"column_geometry: expected (height, diameter[, base]) in m, "
                             f"got {column_geometry!r}")
        ce_geo = hv.column_capacitance_geometry(*geo)
        n_sec = 1 if sections is None else int(sections)
        stray_capacitance = ce_geo / max(n_sec, 1)
        warnings.append(f"earth capacitance {format_quantity(ce_geo, 'F')} estimated from the "
                        "column's geometry (cylinder at one potential over an earthed plane); a "
                        "rough figure, measure it where it matters")
    if stray_capacitance is not None:
        n_sec = 1 if sections is None else int(sections)
        if n_sec < 1 or n_sec != sections and sections is not None:
            raise InputError(f"sections: must be a whole number >= 1, got {sections!r}")
        ce = float(stray_capacitance) * n_sec
        if not ce >= 0:
            raise InputError(f"stray_capacitance: must be zero or positive, "
                             f"got {stray_capacitance!r}")
        if arm == "top" and ce > 0:
            raise InputError("arm: a trimmer across a column with earth capacitance is not "
                             "modelled; use arm='bottom' with --stray-c")
    elif sections is not None:
        raise InputError("sections: give the stray capacitance per section as well")
    r1_target = rin - rin / ratio

    # --- top string
    n = max(n_sec, 1)
    vlim = None
    if voltage is not None:
        voltage = float(voltage)
        if not (math.isfinite(voltage) and voltage > 0):
            raise InputError(f"voltage: must be positive, got {voltage!r}")
        if limiting_voltage is None:
            vlim = DEFAULT_LIMITING_VOLTAGE
            warnings.append(f"limiting voltage per resistor not given; assumed "
                            f"{format_quantity(vlim, 'V')} (check the part's data sheet)")
        else:
            vlim = float(limiting_voltage)
        v_top = voltage * (ratio - 1.0) / ratio
        n = max(n, hv.string_count(v_top, vlim, margin, r1_target, power_rating))
        if n_sec:
            n = n_sec * math.ceil(n / n_sec)
    elif limiting_voltage is not None or power_rating is not None:
        warnings.append("limiting voltage / power rating ignored: no --voltage given")
    each, shunt_parts, shunt_kind = _choose_resistors(r1_target, n, ri, ratio, series, tol["r1"],
                                                      rin)
    top_r = (each,) * n
    r1 = n * each
    if shunt_parts:
        rsh = (1.0 / sum(1.0 / p for p in shunt_parts) if shunt_kind == "parallel"
               else sum(shunt_parts))
        r2 = rsh * ri / (rsh + ri)
    else:
        rsh, r2 = math.inf, ri
    dc = (r1 + r2) / r2

    # --- capacitances: worst-case corners of everything toleranced
    k = corners(tol)
    r1c = r1 * k["r1"]
    r2c = (ri * k["ri"] if not shunt_parts else
           rsh * k["rsh"] * ri * k["ri"] / (rsh * k["rsh"] + ri * k["ri"]))
    cpar = ci * k["ci"] + cable * k["cable"]
    cec = ce * k["ce"]
    c1_min = max(min_top_capacitance, hv.grading_capacitance(ce, grading_limit) if ce > 0 else 0)
    m = max(n_sec, 1)                       # grading capacitors in series
    if top_capacitance is not None:
        candidates = [float(top_capacitance) * m]
    else:
        candidates = eseries.values(capacitor_series, c1_min * m, c1_min * m * 1e4)
    cvals = eseries.values(capacitor_series, 1e-13, 1.0)
    chosen = None
    for cap in candidates:
        c1 = cap / m
        if arm == "bottom":
            t = needed_trim("bottom", r1c, r2c, c1 * k["c1"], cpar, cec)
            fixed_ok = cvals[cvals * (1 + tol["cb"]) <= t.min() - trimmer_minimum]
            cb = float(fixed_ok[-1]) if len(fixed_ok) else 0.0
            t = t - cb * k["cb"]
            if top_capacitance is not None and t.min() < trimmer_minimum:
                # smallest top capacitance that still leaves the trimmer its minimum at the
                # worst corner: R1·C1 ≥ R2·(C_par + C_e-share + trimmer minimum), with margin
                need = float(np.max(r2c * (cpar + trimmer_minimum) / r1c / k["c1"]))
                raise InputError(
                    f"--top-c {format_quantity(float(top_capacitance), 'F')} is too small: the "
                    f"bottom arm already holds {format_quantity(ci + cable, 'F')}; use at least "
                    f"about {format_quantity(need * 1.05, 'F')}")
            if t.min() >= trimmer_minimum or top_capacitance is not None:
                chosen = ((float(cap),) * m, (cb,) if cb else (), t, c1, cb)
                break
        else:
            # bottom fixed capacitor so that the top needs at least c1 of capacitance
            for cb in np.concatenate([[0.0], cvals]):
                t_all = needed_trim("top", r1c, r2c, 0.0, cpar + cb * k["cb"], 0.0)
                if t_all.min() >= c1:
                    break
            fixed_ok = cvals[cvals * (1 + tol["c1"]) <= t_all.min() - trimmer_minimum]
            c1f = float(fixed_ok[-1]) if len(fixed_ok) else 0.0
            t = t_all - c1f * k["c1"]
            chosen = ((c1f,) if c1f else (), (float(cb),) if cb else (), t, c1f, float(cb))
            break
    if chosen is None:
        raise InputError("top_capacitance: no capacitor up to 10^4 x the minimum leaves room "
                         "for the trimmer; lower tolerances or the trimmer minimum")
    top_caps, bottom_caps, t, c1f, cb = chosen
    if t.min() < 0:
        warnings.append(f"the worst case needs a negative trimmer ({format_quantity(t.min(), 'F')})"
                        "; the fixed capacitance is too large for these tolerances")
    if t.max() > DEFAULT_TRIMMER_MAXIMUM:
        warnings.append(f"the trimmer must reach {format_quantity(t.max(), 'F')}, beyond common "
                        "trimmer capacitors; pad it with selected fixed capacitors or use "
                        "tighter capacitor tolerances")
    c1_fixed = 1.0 / sum(1.0 / c for c in top_caps) if top_caps else 0.0
    c2_fixed = ci + cable + cb
    t_nom = float(needed_trim(arm, r1, r2, c1_fixed, c2_fixed, ce))
    # corner that spoils the compensation most with the trimmer left at t_nom
    c1w = c1_fixed * k["c1"] + (t_nom if arm == "top" else 0.0)
    c2w = cpar + cb * k["cb"] + (t_nom if arm == "bottom" else 0.0)
    hf = hf_gain_ratio(r1c, r2c, c1w, c2w, cec)
    w = int(np.argmax(np.abs(hf - 1.0)))
    ratio_c = (r1c + r2c) / r2c
    extra = {"worst_corner": (float(r1c[w]), float(c1w[w]), float(r2c[w]), float(c2w[w]),
                              float(cec[w])),
             "untrimmed_hf_error_worst": float(hf[w] - 1.0)}
    c1_tot = c1_fixed + (t_nom if arm == "top" else 0.0)
    c2_tot = c2_fixed + (t_nom if arm == "bottom" else 0.0)
    extra["input_capacitance"] = c1_tot * c2_tot / (c1_tot + c2_tot)
    if ce > 0:
        extra.update({
            "earth_capacitance": ce, "sections": n_sec,
            "stray_capacitance_per_section": ce / n_sec,
            "grading_capacitance_min": hv.grading_capacitance(ce, grading_limit),
            "grading_midpoint_error": hv.midpoint_error(ce / c1_fixed),
            "response_time_ungraded": hv.response_time_ungraded(r1, ce),
            "rise_time_ungraded": hv.rise_time_ungraded(r1, ce)})
        f = np.logspace(-2, 4, 121) / (2 * np.pi * r1 * ce)
        h = np.abs(hv.divider_column_response(2j * np.pi * f, r1, c1_tot, r2, c2_tot, ce))
        extra["trimmed_flatness"] = float(np.max(np.abs(h * dc - 1.0)))
        if n_sec > 1:
            extra["response_time_ladder"] = hv.response_time(
                lambda s: hv.ladder_response(s, r1, c1_tot, r2, c2_tot, ce, n_sec), r1 * ce)
    caut = []
    if voltage is not None:
        v_top = voltage * r1 / (r1 + r2)
        a = math.sqrt(ce / c1_tot) if ce > 0 else 0.0
        # top grading capacitor carries the largest share at high frequency
        share = 1.0 - float(hv.grading_distribution(1.0 - 1.0 / len(top_caps), a * a)) \
            if len(top_caps) > 1 else 1.0
        energy = hv.stored_energy(c1_tot, v_top) + hv.stored_energy(c2_tot, voltage - v_top)
        extra.update({"capacitor_voltage": {"top": v_top * share, "bottom": voltage - v_top},
                      "stored_energy": energy,
                      "power_total": hv.dissipation(voltage, r1 + r2)})
        caut = safety_cautions(voltage, voltage_kind, elements=n, element_voltage=v_top / n,
                               limiting_voltage=vlim, trimmer_at_high_voltage=(arm == "top"),
                               stored_energy=energy)
        if v_top / n > (vlim or math.inf):
            warnings.append("voltage per resistor exceeds its limiting voltage")
    return DividerDesign(
        target_ratio=ratio, top_resistors=top_r, top_capacitors=tuple(top_caps),
        shunt_parts=tuple(shunt_parts), shunt_kind=shunt_kind if shunt_parts else "none",
        instrument_r=ri, instrument_c=ci, cable_c=cable, bottom_capacitors=tuple(bottom_caps),
        trimmer_arm=arm, trimmer_min=float(t.min()), trimmer_max=float(t.max()),
        trimmer_nominal=t_nom, ratio_error_worst=float(np.max(np.abs(ratio_c / ratio - 1.0))),
        earth_c=ce, sections=n_sec, tolerances={**tol, "distribution": distribution},
        voltage=voltage, voltage_kind=voltage_kind, limiting_voltage=vlim, margin=margin,
        warnings=tuple(warnings), cautions=tuple(caut), series=series,
        capacitor_series=capacitor_series, extra=extra)
