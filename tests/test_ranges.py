"""The physical ranges of taumatch.ranges: every value inside them keeps the arithmetic finite.

Chains are built at the corners of the ranges (one field at its lowest or highest value, the
rest as in an example spec; and every field at a corner at once) and run through every chain
analysis (the figures of ``taumatch bandwidth`` with their text, the predicted step and
square wave, the trim) with every warning turned into an error.  Each must end either with
finite numbers or with a ComputationError (a valid chain whose computation cannot succeed,
said in one line: exit status 1); never with an InputError (the value is inside its stated
range), another exception, a warning, or "nan"/"inf" in the printed text.

Expected behaviour: the project's rules ("values inside the range never overflow, underflow
to zero or divide by zero"; warnings never reach the user raw) and docs/ranges.md.
"""

from __future__ import annotations

import functools
import math
import re
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from taumatch.analysis import chain_figures, trim
from taumatch.analysis.predict import predict
from taumatch.chain import load, loads
from taumatch.chain.parts import Buffer, Input, Lead, Line, Series, Shunt
from taumatch.errors import ComputationError, InputError
from taumatch.ranges import RANGES, check, describe

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"

# the quantity of each field (as the spec loader has it)
FIELDS = {
    Series: {"r": "resistance", "c": "capacitance", "l": "inductance"},
    Shunt: {"r": "resistance", "c": "capacitance", "l": "inductance"},
    Line: {"length": "length", "r": "resistance_per_metre", "l": "inductance_per_metre",
           "c": "capacitance_per_metre", "g": "conductance_per_metre"},
    Lead: {"length": "length", "radius": "radius", "r": "resistance"},
    Input: {"r": "resistance", "c": "capacitance", "bandwidth": "bandwidth"},
    Buffer: {"r": "resistance", "c": "capacitance", "gain": "gain", "bandwidth": "bandwidth",
             "r_out": "resistance"},
}
SOURCE = {"resistance": "resistance", "amplitude": "amplitude", "period": "period",
          "rise_time": "rise_time"}


def _lead_ok(part, field, value):
    """A lead keeps length >= 10 radius (the straight-wire formula): move the other value."""
    if field == "length":
        return replace(part, length=value, radius=min(part.radius, value / 10))
    if field == "radius":
        return replace(part, radius=value, length=max(part.length, 10 * value))
    return replace(part, **{field: value})


def corner_chains(spec, kinds=None):
    """(label, chain) with one field of one part (or the source) at a corner of its range."""
    base = load(EXAMPLES / spec)
    for i, part in enumerate(base.parts):
        if kinds and part.kind not in kinds:
            continue
        for field, quantity in FIELDS[type(part)].items():
            if getattr(part, field) is None:
                continue
            lo, hi = RANGES[quantity][:2]
            for end, value in (("lowest", lo), ("highest", hi)):
                parts = list(base.parts)
                parts[i] = (_lead_ok(part, field, value) if isinstance(part, Lead)
                            else replace(part, **{field: value}))
                yield (f"{spec} part {i + 1} ({part.kind}) {field} {end}",
                       replace(base, parts=tuple(parts)))
    if kinds:
        return
    for field, quantity in SOURCE.items():
        if getattr(base.source, field) is None:
            continue
        for end, value in zip(("lowest", "highest"), RANGES[quantity][:2]):
            yield (f"{spec} source {field} {end}",
                   replace(base, source=replace(base.source, **{field: value})))


def all_at_corners(spec, pick):
    """Every field of every part and of the source at the corner ``pick(k)`` chooses (0 low,
    1 high) for the k-th value."""
    base = load(EXAMPLES / spec)
    k = 0
    parts = []
    for part in base.parts:
        values = {}
        for field, quantity in FIELDS[type(part)].items():
            if getattr(part, field) is not None and getattr(part, field) != 0:
                values[field] = RANGES[quantity][pick(k)]
                k += 1
        if isinstance(part, Lead):
            values["length"] = max(values["length"], 10 * values["radius"])
        new = replace(part, **values)
        parts.append(new)
    src = {f: RANGES[q][pick(k + j)] for j, (f, q) in enumerate(SOURCE.items())
           if getattr(base.source, f) is not None and getattr(base.source, f) != 0}
    return replace(base, parts=tuple(parts), source=replace(base.source, **src))


def run_all(chain):
    """Every chain analysis with warnings as errors: 'ok' with finite numbers, or the
    ComputationError's message."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            figs = chain_figures(chain)
            text = figs.summary()
            figs.to_dict()
            assert not re.search(r"(?<!->)\b(nan|inf)\b", text), text
            wave = "square" if chain.source.period is not None else "step"
            for kind in dict.fromkeys((wave, "step")):
                p = predict(chain, kind, points=200)
                assert np.all(np.isfinite(p.v)), kind
                assert not re.search(r"(?<!->)\b(nan|inf)\b", p.summary())
            if chain.adjustable is not None:
                t = trim(chain)
                assert math.isfinite(t.required)
                t.summary()
        except ComputationError as exc:
            assert "\n" not in str(exc)
            return str(exc)
    return "ok"


CORNERS = (list(corner_chains("bench-probe.toml"))  # series, line, shunt, input, source
           + list(corner_chains("active-probe.toml", {"buffer"}))
           + list(corner_chains("ground-lead.toml", {"lead"})))


_BY_LABEL = dict(CORNERS)


@functools.cache
def outcome(label):
    """``run_all`` of a corner chain, computed once for the tests below."""
    return run_all(_BY_LABEL[label])


@pytest.mark.parametrize("label", _BY_LABEL)
def test_one_value_at_a_corner_of_its_range(label):
    """A value at either end of its range, inside a realistic chain: finite figures, or a
    ComputationError saying why (never an InputError, a warning or a traceback)."""
    outcome(label)


def test_most_corners_give_figures():
    """The ranges are not so wide that a corner is mostly refused: of the one-value corners
    of the bench probe, most give every figure (the refusals are trims of a divider left with
    no time constant or no DC path, which is the chain's own fact)."""
    outcomes = [outcome(label) for label in _BY_LABEL if "bench-probe" in label]
    ok = outcomes.count("ok")
    assert ok >= 0.75 * len(outcomes), [o for o in outcomes if o != "ok"]
    for o in outcomes:
        assert o == "ok" or "nothing to trim" in o or "line sections" in o, o


@pytest.mark.parametrize("spec", ["bench-probe.toml", "ground-lead.toml", "active-probe.toml",
                                  "hv-divider.toml"])
@pytest.mark.parametrize("pattern", ["low", "high", "alternate", "other"])
def test_every_value_at_a_corner_at_once(spec, pattern):
    """All values at corners together (the widest spread of time constants the ranges allow):
    still finite, or refused in one line as a computation that cannot succeed."""
    pick = {"low": lambda k: 0, "high": lambda k: 1, "alternate": lambda k: k % 2,
            "other": lambda k: 1 - k % 2}[pattern]
    run_all(all_at_corners(spec, pick))


def test_a_value_outside_its_range_is_refused_in_one_line_naming_it():
    spec = '[source]\nresistance = "50"\n[[part]]\nkind = "input"\nr = "1M"\nc = "{c}"\n'
    assert loads(spec.format(c="1m")).parts[0].c == 1e-3
    for c, shown in (("1.1m", "'1.1m'"), ("0.9a", "'0.9a'")):
        with pytest.raises(InputError, match=re.escape(
                f"part 1 (input): c must be between 1 aF and 1 mF (a capacitance), got {shown}")):
            loads(spec.format(c=c))


def test_range_words_and_zero():
    assert describe("resistance", zero=True) == "0 or between 1 µΩ and 1 PΩ"
    assert check("resistance", 0.0, "r", zero=True) == 0.0
    with pytest.raises(InputError, match="r must be between"):
        check("resistance", 0.0, "r")
    with pytest.raises(InputError, match=r"got 'x{76}…' \(200 characters\)"):
        check("resistance", math.inf, "r", given="x" * 200)
