"""What a diagnosis assumes, and how far each assumption may be off.

A diagnosis fits the capacitances of a divider whose resistances it is told (or assumes),
and holds what the capture cannot fix: the total shunt capacitance when the plateaus are
flat, a source edge the sampling does not resolve, a ground lead whose ringing lies beyond
the sample rate.  Each held or assumed value carries a tolerance (a ± half-width, see
:mod:`taumatch.chain.tolerance`): given as ``NAME=TOL`` (the ``tolerances`` of
:func:`~taumatch.diagnosis.diagnose`, the command line's ``--tol``), from the chain spec, or a
default of common practice, and the result says which.  :mod:`taumatch.budget` turns them
into terms of the uncertainty of the gain error and the trims.

Names a user can give a tolerance for (``"shunt-c=20%"``):

========== ===============================================================================
tip-r      tip-arm resistance R1
shunt-r    shunt-arm resistance R2 (the instrument input, with any shunt resistor)
shunt-c    total shunt capacitance, when held (flat plateaus)
fixed-c    the shunt arm's capacitance apart from the trimmer (with a chain's trimmer)
trimmer    the trimmer's setting as the chain spec gives it
lead-l     ground-lead inductance, when held
lead-r     ground-lead loop resistance, when held
========== ===============================================================================
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .chain.tolerance import DEFAULT_REASONS, default_for, parse_tolerance
from .errors import InputError
from .units import format_quantity

__all__ = ["ASSUMED_SHUNT_C_TOLERANCE", "NAMES", "PLAUSIBLE", "Assumed", "check_overrides",
           "diagnosis_inputs", "held_shunt_tolerance", "parse_tol_options", "plausibility_notes"]

#: Tolerance of the shunt capacitance when nothing gives it (held at the fit's default,
#: 110 pF): a divider probe's cable (60–200 pF) and instrument input (10–50 pF) total
#: 70–250 pF (shared/CHECKS.md, common practice), so ±50 % covers most of it.
ASSUMED_SHUNT_C_TOLERANCE = 0.5
#: option name -> (key, unit, label)
NAMES = {
    "tip-r": ("tip_r", "ohm", "tip R"),
    "shunt-r": ("shunt_r", "ohm", "shunt R"),
    "shunt-c": ("shunt_c", "F", "shunt capacitance"),
    "fixed-c": ("fixed_c", "F", "fixed shunt capacitance (without the trimmer)"),
    "trimmer": ("trimmer", "F", "trimmer setting in the spec"),
    "lead-l": ("lead_l", "H", "lead inductance"),
    "lead-r": ("lead_r", "ohm", "lead loop resistance"),
}
_LABEL = {key: label for key, _, label in NAMES.values()}
_UNIT = {key: unit for key, unit, _ in NAMES.values()}
#: Usual ranges of a divider's values (common practice, no source): a value far outside
#: gets a note (a milliohm typed for a megohm, a capacitance in farads).
PLAUSIBLE = {
    "tip_r": (1e3, 1e10, "1 kΩ to 10 GΩ"),
    "shunt_r": (10.0, 1e8, "10 Ω to 100 MΩ"),
    "shunt_c": (1e-12, 1e-7, "1 pF to 100 nF"),
}


@dataclass(frozen=True)
class Assumed:
    """One held or assumed value of a diagnosis and its tolerance.

    Attributes
    ----------
    key : str
        ``tip_r``, ``shunt_r``, ``shunt_c``, ``fixed_c``, ``trimmer``, ``lead_l``, ``lead_r``,
        or ``edge`` (an unresolved source edge).
    value : float
        The value used (SI).
    half_width : float
        Its tolerance, ± (SI); the true value is taken as equally likely anywhere within it.
    origin : str
        Where the tolerance came from (an option, the chain spec, a default and why).
    maps : tuple
        ``(fit parameter, coefficient)``: the held fit parameters this value moves.
    direct : str or None
        The variable of the trim arithmetic it enters directly (``fixed``, ``trimmer``).
    label : str
        In words.
    """

    key: str
    value: float
    half_width: float
    origin: str
    maps: tuple = ()
    direct: str | None = None
    label: str = ""

    @property
    def stderr(self) -> float:
        """Standard uncertainty of a rectangular distribution: half-width/√3 (JCGM 100 4.3.7)."""
        return self.half_width / math.sqrt(3.0)

    @property
    def unit(self) -> str:
        return _UNIT.get(self.key, "s")

    def describe(self) -> str:
        """``tip R 9 MΩ ± 180 kΩ (default: common practice ...)``."""
        q = format_quantity
        unit = "Ω" if self.unit == "ohm" else self.unit
        if self.key == "edge":
            return (f"{self.label} ≤ {q(2 * self.half_width, unit)}, anywhere from 0 to that "
                    f"({self.origin})")
        rel = (f", ±{100 * self.half_width / abs(self.value):.3g} %" if self.value else "")
        return (f"{self.label} {q(self.value, unit)} ± {q(self.half_width, unit)}{rel} "
                f"({self.origin})")

    def to_dict(self) -> dict:
        return {"name": self.key, "label": self.label, "value": self.value, "unit": self.unit,
                "tolerance": self.half_width, "standard_uncertainty": self.stderr,
                "origin": self.origin}


def parse_tol_options(items) -> dict:
    """``{key: Tolerance}`` from ``--tol NAME=TOL`` texts (``"shunt-c=20%"``, ``"tip-r=50k"``).

    Raises
    ------
    InputError
        For an unknown name, a missing ``=`` or a bad tolerance.
    """
    out = {}
    for item in items or ():
        name, sep, value = str(item).partition("=")
        name = name.strip()
        if not sep or name not in NAMES:
            raise InputError(f"tolerance (tolerances=): expected NAME=TOL with NAME one of "
                             f"{', '.join(NAMES)} (e.g. shunt-c=20%), got {item!r}")
        key, unit, _ = NAMES[name]
        out[key] = parse_tolerance(value.strip(), unit, field=f"tolerance {name}")
    return out


def plausibility_notes(tip_r: float, shunt_r: float, shunt_c: float | None) -> list:
    """Notes for values far outside a divider's usual range (see :data:`PLAUSIBLE`).

    Examples
    --------
    >>> plausibility_notes(9e-3, 1e6, None)[0].split(":")[0]
    'tip R 9 mΩ lies far outside the usual range of a divider (1 kΩ to 10 GΩ)'
    """
    out = []
    for key, value in (("tip_r", tip_r), ("shunt_r", shunt_r), ("shunt_c", shunt_c)):
        if value is None:
            continue
        lo, hi, text = PLAUSIBLE[key]
        if not lo <= value <= hi:
            unit = "Ω" if _UNIT[key] == "ohm" else _UNIT[key]
            out.append(f"{_LABEL[key]} {format_quantity(value, unit)} lies far outside the usual "
                       f"range of a divider ({text}): check the value and its prefix (m is milli, "
                       "M is mega)")
    return out


def _default(key: str, value: float, reason_extra: str = "") -> tuple:
    t = default_for(_UNIT[key])
    why = DEFAULT_REASONS[_UNIT[key].split("/")[0]]
    return t.half_width(value), f"default {t.describe()}: {why}{reason_extra}"


def _tolerance(key, value, source, chain, overrides) -> tuple:
    """``(half-width, origin)`` of one value: an override, the chain's, or the default."""
    if key in overrides:
        name = next(n for n, (k, _, _) in NAMES.items() if k == key)
        return overrides[key].half_width(value), f"given for {name}"
    if source == "chain" and chain is not None and chain.tolerance(key) is not None:
        return chain.tolerance(key)
    if key == "shunt_c" and source == "default":
        why = (f"default ±{100 * ASSUMED_SHUNT_C_TOLERANCE:g} %, nothing gives it: a probe's "
               "cable and instrument input total 70–250 pF (common practice)")
        return ASSUMED_SHUNT_C_TOLERANCE * value, why
    extra = "; the divider itself was assumed (a 10:1 probe)" if source == "assumed" else ""
    return _default(key, value, extra)


def held_shunt_tolerance(value: float, source: str, *, chain=None, overrides=None) -> float:
    """± half-width (F) of a shunt capacitance held at ``value`` from ``source``
    (``"option"``, ``"chain"`` or ``"default"``): with a chain's shunt-arm trimmer, the fixed
    part's and the trimmer's combined in quadrature."""
    overrides = overrides or {}
    if (source == "chain" and chain is not None and chain.adjust_arm == "shunt"
            and "shunt_c" not in overrides):
        a = _tolerance("fixed_c", chain.fixed_c, "chain", chain, overrides)[0]
        b = _tolerance("trimmer", chain.trimmer.present, "chain", chain, overrides)[0]
        return math.hypot(a, b)
    return _tolerance("shunt_c", value, source, chain, overrides)[0]


def diagnosis_inputs(fit, *, chain=None, overrides=None, r_given: dict | None = None,
                     shunt_c_from: str | None = None) -> list:
    """The held and assumed values of one diagnosis, each with its tolerance.

    Parameters
    ----------
    fit : taumatch.fit.DividerFit
    chain : ChainFacts, optional
        The chain's facts, with the tolerances of its spec.
    overrides : dict, optional
        ``{key: Tolerance}`` from ``--tol`` (:func:`parse_tol_options`).
    r_given : dict, optional
        ``{"tip_r": origin, "shunt_r": origin}``: ``"option"``, ``"chain"`` or
        ``"assumed"`` (the default 10:1 probe on 1 MΩ).
    shunt_c_from : {"option", "chain", "default"}, optional
        Where the held shunt capacitance came from (when it is held).
    """
    overrides = overrides or {}
    r_given = r_given or {}
    out = []

    def tolerance(key, value, source):
        return _tolerance(key, value, source, chain, overrides)

    for key, param, value in (("tip_r", "r1", fit.r1), ("shunt_r", "r2", fit.r2)):
        half, origin = tolerance(key, value, r_given.get(key, "option"))
        out.append(Assumed(key, value, half, origin, ((param, 1.0),), label=_LABEL[key]))
    c2 = fit.estimates["shunt_capacitance"]
    shunt_trimmer = chain is not None and chain.adjust_arm == "shunt"
    if c2.held and shunt_trimmer and shunt_c_from == "chain" and "shunt_c" not in overrides:
        for key, value in (("fixed_c", chain.fixed_c), ("trimmer", chain.trimmer.present)):
            half, origin = tolerance(key, value, "chain")
            out.append(Assumed(key, value, half, origin, (("c2", 1.0),), key.split("_")[0],
                               label=_LABEL[key]))
    else:
        if c2.held:
            half, origin = tolerance("shunt_c", c2.value, shunt_c_from or "default")
            out.append(Assumed("shunt_c", c2.value, half, origin, (("c2", 1.0),),
                               label=_LABEL["shunt_c"] + " (held)"))
        if shunt_trimmer:
            key = "trimmer" if c2.held else "fixed_c"
            value = chain.trimmer.present if c2.held else chain.fixed_c
            half, origin = tolerance(key, value, "chain")
            out.append(Assumed(key, value, half, origin, (), key.split("_")[0],
                               label=_LABEL[key]))
    edge = fit.estimates["edge_time"]
    if edge.held and edge.bound is not None:
        out.append(Assumed("edge", edge.value, 0.5 * edge.bound,
                           "not resolved by the sampling: rectangular from 0 to the bound",
                           (("edge", 1.0),), label="source edge"))
    for key, name in (("lead_l", "lead_inductance"), ("lead_r", "lead_resistance")):
        est = fit.estimates.get(name)
        if est is not None and est.held:
            half, origin = tolerance(key, est.value, "chain")
            out.append(Assumed(key, est.value, half, origin, ((key, 1.0),), label=_LABEL[key]))
    return out


def check_overrides(overrides: dict, inputs: list) -> list:
    """Notes for ``--tol`` names that this diagnosis did not use (nothing held by that name)."""
    used = {a.key for a in inputs}
    names = {k: n for n, (k, _, _) in NAMES.items()}
    return [f"the tolerance given for {names[k]} is not used: this diagnosis holds no {_LABEL[k]} (it was fitted, "
            "or the chain has none)" for k in overrides if k not in used]
