"""The chain spec: a TOML file that lists a chain's parts (format version 1).

See ``docs/chain-spec.md`` for the full description.  Every value is a number in SI units
or a string in engineering notation with an optional unit (``"9M"``, ``"11.5p"``,
``"120 nH"``, ``"1.2 m"``, ``"150 Ω"``).  Any mistake raises one
:class:`~taumatch.errors.InputError` whose one-line message names the file, the part
number and kind, the field and what is valid.

Examples
--------
>>> chain = loads('''
... [source]
... resistance = "50"
... [[part]]
... kind = "series"
... r = "9M"
... c = "12.2p"
... [[part]]
... kind = "input"
... r = "1M"
... c = "110p"
... ''')
>>> [p.kind for p in chain.parts]
['series', 'input']
>>> chain.parts[0].c
1.22e-11
"""

from __future__ import annotations

import math
from pathlib import Path

from .. import ranges
from ..errors import InputError, path_text, shown
from ..units import format_quantity, parse_quantity
from .parts import (
    RESPONSES,
    Adjust,
    Branch,
    Buffer,
    Chain,
    Input,
    Lead,
    Line,
    Series,
    Shunt,
    Source,
)
from .tolerance import tolerance_table

try:  # Python 3.11+
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib

__all__ = ["PART_KINDS", "SPEC_VERSION", "from_dict", "load", "loads"]

SPEC_VERSION = 1

# field -> (accepted units, may be zero, what it is, its quantity in ranges.RANGES)
_SOURCE = {
    "resistance": (("ohm",), True, "source resistance in ohm, e.g. '50'", "resistance"),
    "amplitude": (("V",), False, "step height in V, e.g. '1'", "amplitude"),
    "period": (("s",), False, "square-wave period in s, e.g. '1m'", "period"),
    "rise_time": (("s",), False, "10-90 % edge in s, e.g. '200n'", "rise_time"),
}
_R = (("ohm",), False, "resistance in ohm, e.g. '9M'", "resistance")
_C = (("F",), False, "capacitance in F, e.g. '11.5p'", "capacitance")
_L = (("H",), False, "inductance in H, e.g. '120n'", "inductance")
_BW = (("Hz",), False, "-3 dB bandwidth in Hz, e.g. '200M'", "bandwidth")
_PARTS = {
    "series": {"r": _R, "c": _C, "l": _L},
    "shunt": {"r": _R, "c": _C, "l": _L},
    "line": {
        "length": (("m",), False, "length in m, e.g. '1.2'", "length"),
        "r": (("ohm/m", "ohm"), True, "series resistance per metre, e.g. '150'",
              "resistance_per_metre"),
        "l": (("H/m", "H"), False, "inductance per metre, e.g. '250n'", "inductance_per_metre"),
        "c": (("F/m", "F"), False, "capacitance per metre, e.g. '60p'", "capacitance_per_metre"),
        "g": (("S/m", "S"), True, "conductance per metre, e.g. '0'", "conductance_per_metre"),
    },
    "lead": {
        "length": (("m",), False, "wire length in m, e.g. '152 mm'", "length"),
        "radius": (("m",), False, "wire radius in m, e.g. '0.5 mm'", "radius"),
        "r": (("ohm",), True, "series resistance in ohm, e.g. '0'", "resistance"),
    },
    "input": {"r": _R, "c": _C, "bandwidth": _BW},
    "buffer": {
        "r": _R,
        "c": _C,
        "gain": ((None,), False, "voltage gain, e.g. '1'", "gain"),
        "bandwidth": _BW,
        "r_out": (("ohm",), True, "output resistance in ohm, e.g. '50'", "resistance"),
    },
}
_REQUIRED = {
    "line": ("length", "l", "c"),
    "lead": ("length", "radius"),
    "input": ("r",),
    "buffer": ("r",),
}
# inductances are shorted in the divider reduction, so they cannot set the compensation
_ADJUSTABLE = {"series": ("r", "c"), "shunt": ("r", "c", "branch.r", "branch.c"),
               "input": ("r", "c")}
_TEXT = {"label"}
PART_KINDS = tuple(_PARTS)
_TOP = ("name", "version", "source", "part")


def load(path) -> Chain:
    """Read a chain spec file.

    Parameters
    ----------
    path : str or os.PathLike
        The TOML file.

    Returns
    -------
    Chain

    Raises
    ------
    InputError
        For an unreadable file, bad TOML or any invalid field (one line, naming the file).
    """
    path = Path(path)
    try:
        with open(path, "rb") as fh:  # never more than the limit, whatever the file is
            raw = fh.read(ranges.MAX_SPEC_BYTES + 1)
        if len(raw) > ranges.MAX_SPEC_BYTES:
            raise InputError(f"{path}: a chain spec is at most {ranges.MAX_SPEC_BYTES} bytes "
                             f"({ranges.MAX_PARTS} parts at most); this one is larger: split "
                             "the chain or leave out the comments")
        text = raw.decode("utf-8")
    except OSError as exc:
        raise InputError(f"{path_text(path)}: cannot read the chain spec "
                         f"({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise InputError(f"{path}: the chain spec is not UTF-8 text") from None
    return loads(text, origin=str(path.name))


def loads(text: str, origin: str = "chain.toml") -> Chain:
    """Read a chain spec from TOML text; ``origin`` names it in messages."""
    _check_nesting(text, origin)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"{origin}: not valid TOML: {_one_line(str(exc))}") from None
    return from_dict(data, origin=origin)


def from_dict(data: dict, origin: str = "chain") -> Chain:
    """Build a :class:`Chain` from the parsed TOML tables (see :func:`loads`)."""
    if not isinstance(data, dict):
        raise InputError(f"{origin}: the chain spec must be a table, got {type(data).__name__}")
    _unknown(origin, data, _TOP)
    version = data.get("version", SPEC_VERSION)
    if isinstance(version, bool) or version != SPEC_VERSION:
        raise InputError(f"{origin}: version must be {SPEC_VERSION}, got {shown(version)}")
    name = data.get("name", "")
    if not isinstance(name, str):
        raise InputError(f"{origin}: name must be text, got {shown(name)}")
    if "source" not in data:
        raise InputError(f"{origin}: [source] is required (at least resistance = '50')")
    source, source_tol = _source(origin, data["source"])
    raw_parts = data.get("part", [])
    if not isinstance(raw_parts, list) or not all(isinstance(p, dict) for p in raw_parts):
        raise InputError(f"{origin}: part must be an array of tables ([[part]])")
    if not raw_parts:
        raise InputError(f"{origin}: no parts; list them as [[part]] tables ending with kind = \"input\"")
    if len(raw_parts) > ranges.MAX_PARTS:
        raise InputError(f"{origin}: {len(raw_parts)} parts is past the limit of "
                         f"{ranges.MAX_PARTS} a chain command handles within seconds; lump "
                         "parts together (a cable of n sections is one line part)")
    read = [_part(origin, i, p) for i, p in enumerate(raw_parts, 1)]
    parts = tuple(part for part, _ in read)
    tolerances = tuple((i, key, t) for i, tols in enumerate([source_tol] + [t for _, t in read])
                       for key, t in tols.items())
    return Chain(source=source, parts=parts, name=name, origin=origin, tolerances=tolerances)


def _check_nesting(text: str, origin: str) -> None:
    """Refuse arrays or inline tables nested deeper than :data:`ranges.MAX_DEPTH` before the
    TOML reader (which recurses once per level) sees them.  One pass over the text, strings
    and comments skipped; table headers (``[source]``, ``[[part]]``) count as one or two
    levels that close at once, well below the limit."""
    depth = deepest = 0
    i, n = 0, len(text)
    while i < n:
        ch = text[i]
        if ch == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        if ch in "\"'":
            triple = text.startswith(ch * 3, i)
            end = ch * 3 if triple else ch
            j = i + len(end)
            while j < n:
                if ch == '"' and text[j] == "\\":
                    j += 2
                    continue
                if text.startswith(end, j):
                    break
                if not triple and text[j] == "\n":
                    break
                j += 1
            i = j + len(end)
            continue
        if ch in "[{":
            depth += 1
            if depth > deepest:
                deepest = depth
                if deepest > ranges.MAX_DEPTH:
                    line = text.count("\n", 0, i) + 1
                    raise InputError(f"{origin}: line {line}: arrays or tables nested more than "
                                     f"{ranges.MAX_DEPTH} deep; a chain spec needs at most 3")
        elif ch in "]}":
            depth = max(depth - 1, 0)
        i += 1


def _one_line(text: str) -> str:
    return " ".join(text.split())


def _unknown(where: str, table: dict, valid) -> None:
    for key in table:
        if key not in valid:
            raise InputError(
                f"{where}: unknown key {shown(key)}; valid keys are {', '.join(sorted(valid))}"
            )


def _value(where: str, table: dict, key: str, spec, *, required: bool = False):
    units, may_be_zero, what, quantity = spec
    if key not in table:
        if required:
            raise InputError(f"{where}: {key} is required ({what})")
        return None
    raw = table[key]
    value = None
    error = None
    for unit in units:
        try:
            value = parse_quantity(raw, unit, field=f"{where}: {key}")
            break
        except InputError as exc:
            error = error or exc
    if value is None:
        raise InputError(f"{error} ({what})")
    if not math.isfinite(value) or value < 0 or (value == 0 and not may_be_zero):
        want = "zero or positive" if may_be_zero else "positive"
        raise InputError(f"{where}: {key} must be {want}, got {shown(raw)} ({what})")
    return ranges.check(quantity, value, f"{where}: {key}", zero=may_be_zero, given=raw)


def _source(origin: str, table) -> Source:
    where = f"{origin}: source"
    if not isinstance(table, dict):
        raise InputError(f"{where}: must be a table [source]")
    _unknown(where, table, set(_SOURCE) | {"tolerance"})
    values = {k: _value(where, table, k, spec, required=(k == "resistance"))
              for k, spec in _SOURCE.items()}
    tols = _tolerances(where, table, _SOURCE, values)
    if values["amplitude"] is None:
        values["amplitude"] = 1.0
    return _construct(where, "source", Source, values), tols


def _tolerances(where: str, table: dict, fields: dict, values: dict) -> dict:
    """The part's ``tolerance`` entry by field (see :mod:`taumatch.chain.tolerance`)."""
    if "tolerance" not in table:
        return {}
    units = {k: fields[k][0][0] or "" for k, v in values.items() if k in fields and v is not None}
    tols = tolerance_table(where, table["tolerance"], units)
    for key, t in tols.items():
        # an absolute tolerance below the value itself, as a relative one is below 100 % (a
        # value of 0, an ideal source, may have one up to the top of its range)
        top = values[key] or ranges.RANGES[fields[key][3]][1]
        if not t.relative and not t.amount < top:
            unit = {"ohm": "Ω", "ohm/m": "Ω/m"}.get(units[key], units[key])
            what = (f"the value {format_quantity(values[key], unit)} itself" if values[key]
                    else f"the top of its range, {format_quantity(top, unit)}")
            raise InputError(f"{where}: tolerance.{key} = {format_quantity(t.amount, unit)} is "
                             f"not below {what}; a tolerance that large leaves the value's "
                             "sign open")
    return tols


def _part(origin: str, number: int, table: dict):
    kind = table.get("kind")
    if kind is None:
        raise InputError(f"{origin}: part {number}: kind is required; one of {', '.join(PART_KINDS)}")
    if not isinstance(kind, str) or kind not in _PARTS:
        raise InputError(
            f"{origin}: part {number}: kind must be one of {', '.join(PART_KINDS)}, got {shown(kind)}"
        )
    where = f"{origin}: part {number} ({kind})"
    fields = _PARTS[kind]
    valid = set(fields) | {"kind", "tolerance"} | _TEXT
    if kind in _ADJUSTABLE:
        valid |= {"adjust", "min", "max"}
    if kind in ("input", "buffer"):
        valid.add("response")
    if kind == "shunt":
        valid.add("branch")
    _unknown(where, table, valid)
    if "label" in table and not isinstance(table["label"], str):
        raise InputError(f"{where}: label must be text, got {shown(table['label'])}")
    values = {k: _value(where, table, k, spec, required=k in _REQUIRED.get(kind, ()))
              for k, spec in fields.items()}
    values = {k: v for k, v in values.items() if v is not None}
    tols = _tolerances(where, table, fields, values)
    if "label" in table:
        values["label"] = table["label"]
    if kind in ("input", "buffer") and "response" in table:
        response = table["response"]
        if not isinstance(response, str) or response not in RESPONSES:
            raise InputError(
                f"{where}: response must be one of {', '.join(RESPONSES)}, got {shown(response)}"
            )
        if "bandwidth" not in values:
            raise InputError(f"{where}: response needs a bandwidth (e.g. bandwidth = '200M')")
        values["response"] = response
    if kind == "shunt" and "branch" in table:
        values["branch"] = _branch(where, table["branch"])
    if kind in _ADJUSTABLE:
        values["adjust"] = _adjust(where, kind, table, values)
    elif kind == "buffer" and "gain" not in values:
        values["gain"] = 1.0
    cls = {"series": Series, "shunt": Shunt, "line": Line, "lead": Lead, "input": Input,
           "buffer": Buffer}[kind]
    part = _construct(where, kind, cls, values)
    for adj in part.adjust_marks() if kind in _ADJUSTABLE else ():
        if adj.contains(part.value_of(adj.field)) is False:
            raise InputError(
                f"{where}: {adj.field} = {shown(part.value_of(adj.field))} lies outside the trimmer's "
                f"own range min = {shown(adj.min)} to max = {shown(adj.max)}; a trimmer cannot be set there"
            )
    return part, tols


def _branch(where: str, table) -> Branch:
    bwhere = f"{where}: branch"
    if not isinstance(table, dict):
        raise InputError(f"{bwhere}: must be an inline table like {{r = '100', c = '1n'}}, got {shown(table)}")
    _unknown(bwhere, table, ("r", "c"))
    r = _value(bwhere, table, "r", _R, required=True)
    c = _value(bwhere, table, "c", _C, required=True)
    return Branch(r=r, c=c)


def _adjust(where: str, kind: str, table: dict, values: dict):
    if "adjust" not in table:
        for key in ("min", "max"):
            if key in table:
                raise InputError(f"{where}: {key} needs adjust = 'c' (the field it limits)")
        return None
    name = table["adjust"]
    if isinstance(name, list):
        return _adjust_list(where, kind, table, values)
    allowed = _ADJUSTABLE[kind]
    if name not in allowed:
        raise InputError(f"{where}: adjust must be one of {', '.join(allowed)}, got {shown(name)}")
    if name.startswith("branch."):
        if "branch" not in values:
            raise InputError(f"{where}: adjust = {shown(name)} needs a branch")
        present = getattr(values["branch"], name.split(".", 1)[1])
    else:
        present = values.get(name)
    if present is None:
        raise InputError(f"{where}: adjust = {shown(name)} but {name} has no value; give its present value")
    spec = {"r": _R, "c": _C, "l": _L}[name.split(".")[-1]]
    lo = _value(where, table, "min", spec)
    hi = _value(where, table, "max", spec)
    if lo is not None and hi is not None and not lo < hi:
        raise InputError(f"{where}: min must be below max, got min={shown(table['min'])}, max={shown(table['max'])}")
    return Adjust(name, lo, hi)


def _adjust_list(where: str, kind: str, table: dict, values: dict) -> tuple:
    """Several marks: ``adjust = ["branch.r", {field = "branch.c", min = "5p", max = "50p"}]``."""
    for key in ("min", "max"):
        if key in table:
            raise InputError(f"{where}: with several adjust marks give each its range, e.g. "
                             f"adjust = [{{field = 'c', {key} = ...}}]; a {key} beside them is "
                             "ambiguous")
    marks = table["adjust"]
    if not marks:
        raise InputError(f"{where}: adjust = [] marks nothing; name a field or leave adjust out")
    out = []
    for item in marks:
        if isinstance(item, str):
            item = {"field": item}
        if not isinstance(item, dict) or "field" not in item:
            raise InputError(f"{where}: each adjust mark must be a field name or a table "
                             f"{{field = 'c', min = ..., max = ...}}, got {shown(item)}")
        _unknown(f"{where}: adjust", item, ("field", "min", "max"))
        out.append(_adjust(where, kind, {"adjust": item["field"],
                                         **{k: v for k, v in item.items() if k != "field"}},
                           values))
    return tuple(out)


def _construct(where: str, kind: str, cls, values: dict):
    try:
        return cls(**values)
    except InputError as exc:
        msg = str(exc)
        prefix = f"{kind}: "
        msg = msg.removeprefix(prefix)
        raise InputError(f"{where}: {msg}") from None
