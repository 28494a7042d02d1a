"""What a chain spec tells the diagnosis: the two-arm divider, its trimmer, the lead loop and
how far each value may be off.

The divider is the package's one two-arm model, reduced from the chain by
:meth:`taumatch.chain.two_arm.TwoArm.from_chain`; the trimmer is
:func:`taumatch.chain.two_arm.find_trimmer`'s and the lead loop
:func:`taumatch.chain.topology.lead_loop`'s.  This module adds the tolerances: each value
of the spec carries its own (:mod:`taumatch.chain.tolerance`) or a default of common
practice, and the tolerance of an arm's R or C follows by moving each value to the end of
its tolerance and reducing the chain again — the same reduction, so no second reading of
the parts — with the moves combined in quadrature (independent contributions, JCGM 100
5.1.2; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import InputError

__all__ = ["ChainFacts", "facts_from_chain", "facts_from_spec"]

#: Where a combined tolerance came from, by how many of its contributions the spec gave.
SPEC, MIXED, DEFAULT = "chain spec", "chain spec and defaults", "default"
#: The unit of each field a tolerance can be taken for by default (per metre on a line).
_UNITS = {"r": "ohm", "c": "F", "l": "H", "g": "ohm", "branch.c": "F", "branch.r": "ohm"}


@dataclass(frozen=True)
class ChainFacts:
    """A chain as the diagnosis sees it.

    Attributes
    ----------
    arms : TwoArm
        The two-arm divider the chain reduces to (R1, C1, R2, C2).
    trimmer : Trimmer or None
        The spec's trimmer, placed in an arm.
    lead_l, lead_r : float
        Loop inductance (H) and resistance (ohm, the source's included) of the ground lead
        before the probe.
    fixed_c : float or None
        Capacitance of the trimmer's arm apart from the trimmer (F).
    tolerances : tuple
        ``(name, half-width in SI, origin)`` for ``tip_r``, ``shunt_r``, ``shunt_c``,
        ``fixed_c``, ``lead_l``, ``lead_r`` and ``trimmer``; origin "chain spec", "chain spec
        and defaults" or "default ..." (with the reason).  The trimmer may be set anywhere
        in its range, so its default is half the range, or ±50 % without one.
    source_amplitude, source_period : float or None
        The spec's source step (V) and period (s).
    name : str
    chain : Chain or None
        The chain itself (to write the fitted chain back as a spec).
    """

    arms: object
    trimmer: object = None
    lead_l: float = 0.0
    lead_r: float = 0.0
    fixed_c: float | None = None
    tolerances: tuple = ()
    source_amplitude: float | None = None
    source_period: float | None = None
    name: str = ""
    chain: object = None

    @property
    def tip_r(self) -> float:
        return self.arms.r1

    @property
    def shunt_r(self) -> float:
        return self.arms.r2

    @property
    def shunt_c(self) -> float | None:
        return self.arms.c2 if self.arms.c2 > 0 else None

    @property
    def adjust_arm(self) -> str | None:
        return self.trimmer.arm if self.trimmer is not None else None

    def tolerance(self, name: str):
        """``(half-width, origin)`` of one of :attr:`tolerances`, or None."""
        for key, half, origin in self.tolerances:
            if key == name:
                return half, origin
        return None


def _origin(given: int, count: int, unit: str | None = None) -> str:
    if count == 0 or given == 0:
        from .chain.tolerance import DEFAULT_REASONS

        return DEFAULT if unit is None else f"{DEFAULT}: {DEFAULT_REASONS[unit]}"
    return SPEC if given == count else MIXED


def _values(chain):
    """``(number, field, value)`` of every R, C, L and G the parts after the source hold."""
    for n, p in enumerate(chain.parts, 1):
        for field in _UNITS:
            try:
                value = p.value_of(field)
            except (AttributeError, InputError, TypeError):
                continue
            if value:
                yield n, field, float(value)


def _arm_tolerances(chain, arms, trimmer, given) -> list:
    """Half-widths of R1, R2, C2 and C2 without the trimmer, by moving each value of the
    chain to the end of its tolerance and reducing again."""
    from .chain.tolerance import default_for
    from .chain.two_arm import TwoArm

    sq = {"tip_r": [0.0, 0, 0], "shunt_r": [0.0, 0, 0], "shunt_c": [0.0, 0, 0],
          "fixed_c": [0.0, 0, 0]}
    base = {"tip_r": arms.r1, "shunt_r": arms.r2, "shunt_c": arms.c2}
    for n, field, value in _values(chain):
        t = given.get((n, field))
        is_trimmer = trimmer is not None and (n, field) == (trimmer.part, trimmer.field)
        if is_trimmer:
            continue  # its own tolerance (its range) below
        half = (t or default_for(_UNITS[field])).half_width(value)
        if half == 0:
            continue
        try:
            moved = TwoArm.from_chain(chain.with_value(n, field, value + half))
        except InputError:
            continue
        for key, now in (("tip_r", moved.r1), ("shunt_r", moved.r2), ("shunt_c", moved.c2)):
            d = now - base[key]
            if d != 0:
                keys = (key, "fixed_c") if key == "shunt_c" else (key,)
                for k in keys:
                    sq[k][0] += d * d
                    sq[k][1] += t is not None
                    sq[k][2] += 1
    out = {k: (math.sqrt(v[0]), v[1], v[2]) for k, v in sq.items()}
    if trimmer is not None and trimmer.arm == "shunt":
        half, origin = _trimmer_tolerance(trimmer, given)
        total, g, c = out["shunt_c"]
        out["shunt_c"] = (math.hypot(total, half), g + (origin == SPEC), c + 1)
    return out


def _trimmer_tolerance(trimmer, given) -> tuple:
    """``(half-width, origin)`` of the trimmer's setting: the spec's, else anywhere in its
    range, else ±50 %."""
    t = given.get((trimmer.part, trimmer.field))
    if t is not None:
        return t.half_width(trimmer.present), SPEC
    if trimmer.minimum is not None and trimmer.maximum is not None:
        return 0.5 * (trimmer.maximum - trimmer.minimum), "default: anywhere in its range"
    return 0.5 * trimmer.present, "default: ±50 %, no range given"


def _lead_tolerances(chain, loop, given) -> list:
    """Half-widths of the lead loop's inductance and resistance (each part's tolerance, or
    ±20 % on a lead's Grover inductance and the defaults elsewhere)."""
    from .chain.parts import Lead, Series
    from .chain.tolerance import default_for

    l_sq = r_sq = 0.0
    counts = {"l": [0, 0], "r": [0, 0]}

    def add(kind, n, field, value, unit):
        nonlocal l_sq, r_sq
        t = given.get((n, field))
        half = (t or default_for(unit)).half_width(value)
        if kind == "l":
            l_sq += half * half
        else:
            r_sq += half * half
        counts[kind][0] += t is not None
        counts[kind][1] += 1

    if chain.source.resistance:
        add("r", 0, "resistance", chain.source.resistance, "ohm")
    for n, p in enumerate(chain.parts[: loop.first_probe_part - 1], 1):
        if isinstance(p, Lead):
            add("l", n, "inductance", p.inductance, "H")
            if p.r:
                add("r", n, "r", p.r, "ohm")
        elif isinstance(p, Series):
            if p.l:
                add("l", n, "l", p.l, "H")
            if p.r:
                add("r", n, "r", p.r, "ohm")
    return [("lead_l", math.sqrt(l_sq), _origin(*counts["l"], "H")),
            ("lead_r", math.sqrt(r_sq), _origin(*counts["r"], "ohm"))]


def facts_from_chain(chain) -> ChainFacts:
    """Reduce a :class:`taumatch.chain.Chain` to what the diagnosis needs, with tolerances.

    Raises
    ------
    InputError
        When the chain is no two-arm divider (:meth:`TwoArm.from_chain`), or its trimmer
        moves no capacitance of either arm (:func:`find_trimmer`).
    """
    from .chain.topology import lead_loop
    from .chain.two_arm import TwoArm, find_trimmer

    arms = TwoArm.from_chain(chain)
    trimmer = find_trimmer(chain)
    given = {(n, f): t for n, f, t in chain.tolerances}
    tol = _arm_tolerances(chain, arms, trimmer, given)
    units = {"tip_r": "ohm", "shunt_r": "ohm", "shunt_c": "F", "fixed_c": "F"}
    tolerances = [(k, half, _origin(g, c, units[k])) for k, (half, g, c) in tol.items()
                  if k != "fixed_c" or (trimmer is not None and trimmer.arm == "shunt")]
    fixed_c = None
    if trimmer is not None:
        tolerances.append(("trimmer", *_trimmer_tolerance(trimmer, given)))
        arm_c = arms.c2 if trimmer.arm == "shunt" else arms.c1
        fixed_c = arm_c - trimmer.present
    loop = lead_loop(chain)
    if loop is not None:
        tolerances.extend(_lead_tolerances(chain, loop, given))
    return ChainFacts(arms=arms, trimmer=trimmer,
                      lead_l=loop.inductance if loop is not None else 0.0,
                      lead_r=loop.resistance if loop is not None else 0.0,
                      fixed_c=fixed_c, tolerances=tuple(tolerances),
                      source_amplitude=chain.source.amplitude,
                      source_period=chain.source.period, name=chain.name, chain=chain)


def facts_from_spec(path) -> ChainFacts:
    """Load a chain spec (TOML) and reduce it to the diagnosis's facts."""
    from .chain import load

    return facts_from_chain(load(path))
