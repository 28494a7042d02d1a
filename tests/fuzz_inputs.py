"""Generators of hostile inputs for the command line, shared by tests/test_fuzz.py (as
hypothesis strategies) and bench/stress_fuzz.py (from a seeded ``random.Random``).

Each family writes its input files into a folder and returns the command line to run:

* ``capture`` — capture text: a square wave with a corner (over- or under-compensated),
  noise and a header, or text with damaged rows, odd delimiters, decimal commas, metadata,
  huge, tiny or missing numbers, then ``measure``, ``diagnose`` or ``correct``;
* ``array`` — a NumPy ``.npy`` (or ``.npz``) of any shape and dtype, finite or not;
* ``spec`` — a chain spec in TOML: parts of every kind with values inside, at and beyond
  their ranges (``taumatch/ranges.py``), wrong types, unknown keys, adjust marks, nesting,
  or the text cut or spliced, then ``bandwidth``, ``trim``, ``predict`` or ``netlist``;
* ``options`` — a valid capture or spec with hostile option values (``--points``,
  ``--t-end``, ``--input``, ``--channel``, ``--time-column``, ``--sample-interval``,
  ``--settle-band``, ``--tip-r``, ...) and outputs that cannot be written.

Expressions (``taumatch invert``) have their own generators in tests/test_fuzz_expressions.py
and bench/stress_expressions.py.

Every generator takes ``draw``: a function of a list of choices returning one of them, and
of ``(lo, hi)`` returning a float between (hypothesis's ``data.draw`` and ``random.Random``
are both turned into one by :func:`drawer`).
"""

from __future__ import annotations

import io
import json
import math

import numpy as np

FAMILIES = ("capture", "array", "spec", "options")


class drawer:
    """``pick(seq)``, ``uniform(lo, hi)``, ``integer(lo, hi)``, ``chance(p)`` over either a
    ``random.Random`` or a hypothesis ``data`` object."""

    def __init__(self, rng=None, data=None):
        self.rng, self.data = rng, data
        # how hostile this case is: most cases are valid or nearly so (to reach the deep
        # paths: fits, closed forms, ladders), some are wild
        self.wild = self.pick([0.0, 0.0, 0.0, 0.03, 0.1, 0.4])

    def pick(self, seq):
        seq = list(seq)
        if self.data is not None:
            from hypothesis import strategies as st

            return self.data.draw(st.sampled_from(seq))
        return self.rng.choice(seq)

    def integer(self, lo, hi):
        if self.data is not None:
            from hypothesis import strategies as st

            return self.data.draw(st.integers(lo, hi))
        return self.rng.randint(lo, hi)

    def uniform(self, lo, hi):
        if self.data is not None:
            from hypothesis import strategies as st

            return self.data.draw(st.floats(lo, hi, allow_nan=False, allow_infinity=False))
        return self.rng.uniform(lo, hi)

    def chance(self, p):
        # the large draws are the rare event: hypothesis's simplest draw (0) is then the
        # benign branch, and its examples are mostly valid input, as the random ones are
        return self.integer(0, 999) >= 1000 - 1000 * p


# ---------------------------------------------------------------- numbers as text
_PREFIXES = ["", "", "", "p", "n", "u", "µ", "m", "k", "M", "G", "f", "a", "T", "P", "Meg", "x"]


def number_text(d: drawer, lo_exp=-15, hi_exp=15, hostile=None) -> str:
    """A quantity as an engineer writes it, or (with probability ``hostile``) one that
    breaks something: out of the float range, denormal, negative, nan, a stray unit."""
    if d.chance(d.wild if hostile is None else hostile):
        return d.pick(["1e-300", "5e-324", "1e300", "1.7e308", "1e400", "-1", "0", "nan",
                       "inf", "-inf", "", " ", "1,5", "1.2.3", "12 Ω/s", "9MΩ", "1e-20", "1e20",
                       "²", "١٢", "0x10", "1_000", "+1e+1", ".5", "5.", "e5", "9" * 300,
                       "1" + "0" * 400, "\x00", "ⅷ"])
    mant = d.pick([f"{d.uniform(1, 999):.4g}", str(d.integer(1, 999))])
    exp = d.integer(lo_exp, hi_exp)
    if d.chance(0.5):
        return f"{mant}e{exp}"
    return mant + d.pick(_PREFIXES[:-1])


# ---------------------------------------------------------------- captures
def square_rows(d: drawer):
    """A square wave through a mis-compensated divider: (times, values)."""
    n = d.pick([20, 200, 1000, 4000])
    periods = d.pick([0.5, 1, 3, 10])
    dt = 10 ** d.uniform(-10, -3)
    t = np.arange(n) * dt
    period = n * dt / periods
    high = (np.floor(2 * t / period) % 2 == 0).astype(float)
    tau = period * 10 ** d.uniform(-3, 0)
    phase = np.mod(t, period / 2)
    corner = d.uniform(-0.3, 0.3) * np.exp(-phase / tau) * np.where(high > 0, 1, -1)
    amp = 10 ** d.uniform(-4, 3)
    v = amp * (high + corner) + 10 ** d.uniform(-6, -1.5) * amp * np.sin(np.arange(n) * 1.7)
    v += d.pick([0.0, 0.0, 10 ** d.uniform(-3, 2)])
    return t, v


def capture_text(d: drawer) -> str:
    t, v = square_rows(d)
    delim = d.pick([",", ";", "\t", " "] if not d.chance(d.wild) else ["|", ",,", ":"])
    lines = []
    for _ in range(d.integer(0, 3) if d.chance(0.5) else 0):
        lines.append(d.pick(["Model,XYZ", "Sample Interval,1e-9", "Record Length,1000",
                             "# comment", "Vertical Units,V", "Horizontal Offset,-1e300",
                             "Sample Interval,5e-324", "x" * 500, "", "\ufeff", "=" * 20]))
    header = d.pick(["Time,CH1", "TIME,CH1,CH2", "t (s);v (mV)", "Time [s],Ch 1 [V],Ch 2 [V]"]
                    if not d.chance(d.wild) else ["s,Volt", "", "Time,Time", "CH1",
                                                  "a,b,c,d,e,f,g,h"])
    if header:
        lines.append(header.replace(",", delim))
    two = d.chance(0.3)
    comma = delim != "," and d.chance(0.2)
    for k in range(len(t)):
        cells = [repr(float(t[k])), repr(float(v[k]))] + ([repr(float(-v[k]))] if two else [])
        if comma:
            cells = [c.replace(".", ",") for c in cells]
        lines.append(delim.join(cells))
    # damage
    for _ in range(d.pick([1, 3]) if d.chance(d.wild) else 0):
        if not lines:
            break
        i = d.integer(0, len(lines) - 1)
        lines[i] = d.pick(["", "nan,nan", "1e400,1", "x,y", lines[i] * 3, lines[i][: len(lines[i]) // 2],
                           ",".join(["0"] * d.pick([3, 50, 2000])), "inf,-inf", "\x00\x01",
                           number_text(d, hostile=0.8) + delim + number_text(d, hostile=0.8)])
    if d.chance(d.wild / 4):
        lines = lines[::-1]
    end = d.pick(["\n", "\r\n", "\r"])
    return end.join(lines) + end


def capture_case(d: drawer, folder) -> tuple:
    """(args, inputs): a capture file and the command reading it."""
    from pathlib import Path

    name = d.pick(["cap.csv", "cap.txt", "cap.tsv", "cap.dat", "cap.csv.gz"])
    path = Path(folder) / name
    text = capture_text(d)
    if name.endswith(".gz"):
        import gzip

        data = gzip.compress(text.encode()) if not d.chance(d.wild) else text.encode()[:200]
        path.write_bytes(data)
    elif d.chance(d.wild / 4):
        path.write_bytes(bytes(d.integer(0, 255) for _ in range(d.integer(0, 300))))
    else:
        path.write_text(text, encoding=d.pick(["utf-8", "utf-8", "utf-16", "latin-1"]),
                        errors="replace")
    cmd = d.pick(["measure", "measure", "diagnose", "correct"])
    args = [cmd, str(path)]
    if cmd == "correct":
        args += ["-o", str(Path(folder) / "out.csv")]
    if cmd != "measure" and d.chance(0.3):
        args += ["--tip-r", d.pick(["9M", "90M", "1M", "9"]), "--shunt-r", "1M"]
    if d.chance(0.3):
        args.append("--json")
    return args, [path]


# ---------------------------------------------------------------- arrays
def array_case(d: drawer, folder) -> tuple:
    from pathlib import Path

    kind = "square" if not d.chance(d.wild + 0.2) else d.pick(["random", "random", "weird"])
    if kind == "square":
        t, v = square_rows(d)
        a = np.column_stack([t, v] + ([v * 0.5] if d.chance(0.3) else []))
        if d.chance(0.2):
            a = a[:, 1]  # one column: needs --sample-interval
    elif kind == "random":
        shape = d.pick([(0,), (1,), (5,), (100,), (0, 2), (3, 0), (100, 2), (50, 5), (2, 2, 2),
                        (1, 100000)])
        a = np.full(shape, 1.0)
        if a.size:
            flat = a.reshape(-1)
            for i in range(min(flat.size, 50)):
                flat[d.integer(0, flat.size - 1)] = d.pick([0.0, 1.0, -1.0, math.nan, math.inf,
                                                           1e308, 5e-324, 1e-300, -1e308])
    else:
        a = np.array(d.pick([[1 + 2j, 3j], ["a", "b"], [True, False], [[1, 2], [3, 4]]]))
    dtype = (d.pick(["float32", "int16", "float16", "int64", "uint8"])
             if d.chance(d.wild + 0.05) else d.pick([None, "float32"]))
    if dtype is not None and a.dtype.kind in "fiub":
        with np.errstate(all="ignore"):
            a = np.nan_to_num(a, nan=0.0, posinf=1e4, neginf=-1e4).astype(dtype) \
                if dtype[0] in "iu" else a.astype(dtype)
    if d.chance(0.3):
        path = Path(folder) / "cap.npz"
        names = d.pick([("t", "ch1"), ("time", "v"), ("t", "CH1", "CH2")] if not d.chance(d.wild)
                       else [("x",), ("t",), ("t", "t2", "CH1")])
        if a.ndim == 2 and a.shape[1] and not d.chance(d.wild):
            members = {n: a[:, min(i, a.shape[1] - 1)] for i, n in enumerate(names)}
        else:
            members = {n: a for n in names}
        buf = io.BytesIO()
        (np.savez_compressed if d.chance(0.5) else np.savez)(buf, **members)
        data = buf.getvalue()
        if d.chance(d.wild / 2):
            data = data[: len(data) // 2]
        path.write_bytes(data)
    else:
        path = Path(folder) / "cap.npy"
        buf = io.BytesIO()
        np.save(buf, a, allow_pickle=False)
        data = buf.getvalue()
        if d.chance(d.wild / 2):
            data = data[: d.integer(0, len(data))]
        path.write_bytes(data)
    args = [d.pick(["measure", "measure", "diagnose"]), str(path)]
    if a.ndim == 1 or d.chance(0.2):
        args += ["--sample-interval", f"{10 ** d.uniform(-11, -4):.3g}"
                 if not d.chance(d.wild) else number_text(d, -20, 20, hostile=0.5)]
    return args, [path]


# ---------------------------------------------------------------- chain specs
# field -> (a typical value, its quantity in taumatch.ranges.RANGES)
_FIELDS = {
    "series": {"r": ("9M", "resistance"), "c": ("11.5p", "capacitance"),
               "l": ("120n", "inductance")},
    "shunt": {"r": ("1M", "resistance"), "c": ("17.5p", "capacitance"),
              "l": ("10n", "inductance")},
    "line": {"length": ("1.2", "length"), "r": ("150", "resistance_per_metre"),
             "l": ("250n", "inductance_per_metre"), "c": ("60p", "capacitance_per_metre"),
             "g": ("0", "conductance_per_metre")},
    "lead": {"length": ("152 mm", "length"), "radius": ("0.5 mm", "radius"),
             "r": ("0", "resistance")},
    "input": {"r": ("1M", "resistance"), "c": ("14p", "capacitance"),
              "bandwidth": ("200M", "bandwidth")},
    "buffer": {"r": ("10M", "resistance"), "c": ("1p", "capacitance"), "gain": ("1", "gain"),
               "bandwidth": ("1G", "bandwidth"), "r_out": ("50", "resistance")},
}


def in_range(d: drawer, quantity: str):
    """A value inside the range of ``quantity``: log-uniform, a corner now and then."""
    from taumatch.ranges import RANGES

    lo, hi = RANGES[quantity][:2]
    if d.chance(0.1):
        return float(d.pick([lo, hi]))
    v = 10 ** d.uniform(math.log10(lo), math.log10(hi))
    return float(f"{v:.4g}") if d.chance(0.5) else f"{v:.4g}"


def _value(d: drawer, typical):
    text, quantity = typical
    if not d.chance(d.wild):
        return text if d.chance(0.6) else in_range(d, quantity)
    roll = d.integer(0, 99)
    if roll < 45:
        return number_text(d, -18, 15, hostile=0.5)
    if roll < 75:
        return float(d.pick([1e-300, 5e-324, 1e300, 1.7e308, -1.0, 0.0, 1e-7, 1e16, 1e-19,
                             1e-2, 1e5, math.inf, math.nan, 12.0]))
    return d.pick([True, 12, -3, [1, 2], {"x": 1}, [[[]]], "", "nan"])


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, str):
        return json.dumps(v, ensure_ascii=False)
    if isinstance(v, list):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{" + ", ".join(f"{k} = {_toml_value(x)}" for k, x in v.items()) + "}"
    raise TypeError(v)


def spec_text(d: drawer) -> str:
    lines = []
    w = d.wild
    if d.chance(0.2):
        lines.append(f"version = {_toml_value(d.pick([1, 1, 2, '1', True]) if d.chance(w) else 1)}")
    if d.chance(0.2):
        lines.append(f"name = {_toml_value(d.pick(['x' * 300, 5]) if d.chance(w) else 'probe')}")
    if not d.chance(w / 4):
        lines.append("[source]")
        src = {"resistance": ("50", "resistance"), "amplitude": ("1", "amplitude"),
               "period": ("1m", "period"), "rise_time": ("200n", "rise_time")}
        for key, typical in src.items():
            if key == "resistance" or d.chance(0.5):
                lines.append(f"{key} = {_toml_value(_value(d, typical))}")
        if d.chance(w / 2):
            lines.append(f"tolerance = {_toml_value(d.pick(['5%', '1e300', {'resistance': '2%'}]))}")
    kinds = [d.pick(["series", "series", "shunt", "line", "lead", "buffer"])
             for _ in range(d.integer(0, 4))]
    if not d.chance(w / 4):
        kinds.append("input")
    if d.chance(w / 4):
        kinds = kinds[::-1]
    for kind in kinds:
        lines.append("[[part]]")
        lines.append(f"kind = {_toml_value(kind if not d.chance(w / 4) else d.pick(['cable', 3, '']))}")
        fields = _FIELDS[kind]
        chosen = [k for k in fields if d.chance(0.6)] or [next(iter(fields))]
        if kind == "line":
            chosen = sorted(set(chosen) | {"length", "l", "c"})
        if kind == "lead":
            chosen = sorted(set(chosen) | {"length", "radius"})
        if kind in ("input", "buffer") and not d.chance(w / 4):
            chosen = sorted(set(chosen) | {"r"})
        for key in chosen:
            lines.append(f"{key} = {_toml_value(_value(d, fields[key]))}")
        if kind in ("series", "shunt", "input") and d.chance(0.2):
            mark = d.pick(["c", "r", ["c", "r"], [{"field": "c", "min": "5p", "max": "30p"}]]
                          if not d.chance(w) else ["l", "x", []])
            lines.append(f"adjust = {_toml_value(mark)}")
            if isinstance(mark, str) and d.chance(0.5):
                lines.append(f"min = {_toml_value(_value(d, ('5p', 'capacitance')))}")
                lines.append(f"max = {_toml_value(_value(d, ('30p', 'capacitance')))}")
        if kind in ("input", "buffer") and d.chance(0.15):
            lines.append(f"response = {_toml_value(d.pick(['bessel', 'two-pole', 'single-pole', 'x']))}")
        if kind == "shunt" and d.chance(0.1):
            lines.append(f"branch = {_toml_value({'r': _value(d, ('100', 'resistance')), 'c': _value(d, ('1n', 'capacitance'))})}")
        if d.chance(w / 4):
            lines.append(f"{d.pick(['colour', 'R', 'len'])} = 1")
        if d.chance(w / 2):
            lines.append(f"tolerance = {_toml_value(d.pick(['5%', '2p', '1e300', '-1%', {'c': '1%'}]))}")
    text = "\n".join(lines) + "\n"
    roll = d.integer(0, 99) if d.chance(w) else 99
    if roll < 30:
        text = text[: d.integer(0, len(text))]
    elif roll < 60:
        i = d.integer(0, len(text))
        text = text[:i] + d.pick(["[", "]", "=", '"', "\x00", "\n[[part]]\n", "[" * 40,
                                  "x = " + "[" * 30 + "]" * 30 + "\n", "\ud7ff", "é"]) + text[i:]
    elif roll < 70:
        text = "x = " + "[" * d.pick([17, 200, 1000]) + "]" * 3
    return text


def spec_case(d: drawer, folder) -> tuple:
    from pathlib import Path

    path = Path(folder) / "chain.toml"
    path.write_text(spec_text(d), encoding="utf-8", errors="surrogatepass")
    cmd = d.pick(["bandwidth", "bandwidth", "trim", "predict", "predict", "netlist"])
    args = [cmd, str(path)]
    if cmd == "predict":
        args += ["--input", d.pick(["step", "step", "square", "sine:1M", "sine:1"]
                                   + (["sine:1e13"] if d.chance(d.wild) else [])),
                 "--points", str(d.pick([2, 50, 300]))]
        if d.chance(0.2):
            args.append("--trimmed")
    if cmd == "netlist":
        args += ["-o", str(Path(folder) / "deck.cir")]
    if d.chance(0.3):
        args.append("--json")
    return args, [path]


# ---------------------------------------------------------------- option values
GOOD_SPEC = """[source]
resistance = "150"
period = "1m"
rise_time = "200n"
[[part]]
kind = "series"
l = "120n"
[[part]]
kind = "series"
r = "9M"
c = "11.5p"
[[part]]
kind = "shunt"
c = "17.5p"
adjust = "c"
[[part]]
kind = "input"
r = "1M"
c = "14p"
"""


def options_case(d: drawer, folder) -> tuple:
    from pathlib import Path

    folder = Path(folder)
    if d.chance(0.5):
        spec = folder / "chain.toml"
        spec.write_text(GOOD_SPEC, encoding="utf-8")
        cmd = d.pick(["predict", "bandwidth", "trim", "netlist"])
        args = [cmd, str(spec)]
        if cmd == "predict":
            args += ["--points", d.pick(["2", "100000", "1000", "300"] if not d.chance(d.wild) else
                                        ["1", "0", "-5", "100001", "10000000000", "1e3", "x"]),
                     "--input", d.pick(["step", "square", "sine:" + number_text(d, -3, 12)]
                                       if not d.chance(d.wild) else
                                       ["sine:", "ramp", "SQUARE", "sine:1e300", "sine:1e-4"])]
            if d.chance(0.5):
                args += ["--t-end", number_text(d, -16, 7, hostile=0.4)]
        if cmd == "bandwidth":
            args += ["--overshoot", d.pick(["5%", "0.5", "1e-6"] if not d.chance(d.wild) else
                                           ["0", "100%", "150%", "1e-300", "x"])]
        if cmd == "trim" and d.chance(0.5):
            args += ["--part", d.pick(["2", "3", "4"] if not d.chance(d.wild) else
                                      ["0", "1", "99", "-1", "x"]),
                     "--field", d.pick(["c", "r"] if not d.chance(d.wild) else
                                       ["zz", "branch.c", "", "l"])]
        if cmd == "netlist":
            args += ["-o", str(folder / (d.pick(["deck.cir"]) if not d.chance(d.wild) else
                                         d.pick(["nofolder/deck.cir", "chain.toml"]))),
                     "--sections", d.pick(["1", "3", "2000"] if not d.chance(d.wild) else
                                          ["0", "2001", "100000000", "x"])]
        inputs = [spec]
    else:
        cap = folder / "cap.csv"
        t, v = square_rows(d)
        cap.write_text("Time,CH1\n" + "".join(f"{a!r},{b!r}\n" for a, b in zip(t.tolist(),
                                                                           v.tolist())))
        cmd = d.pick(["measure", "measure", "diagnose"])
        args = [cmd, str(cap)]
        for opt, good, bad in (("--channel", ["CH1", "1"], ["2", "CH9", "", "²", "0"]),
                               ("--time-column", ["0", "Time"], ["1", "²", "-1", "99", "x"]),
                               ("--delimiter", [","], [";", "tab", "whitespace", "|", "ab", ""]),
                               ("--decimal", ["."], [",", "x"]),
                               ("--sample-interval", ["1n"], ["1e-300", "1e300", "0", "-1u", "x"])):
            if d.chance(0.25):
                args += [opt, d.pick(bad if d.chance(d.wild) else good)]
        if cmd == "measure" and d.chance(0.4):
            args += ["--settle-band", d.pick(["2%", "0.1", "1e-6"] if not d.chance(d.wild) else
                                             ["0", "50%", "1e-300", "x"])]
        if cmd == "diagnose":
            for opt, q in (("--tip-r", ("9M", "resistance")), ("--shunt-r", ("1M", "resistance")),
                           ("--shunt-c", ("110p", "capacitance"))):
                if d.chance(0.3):
                    args += [opt, _as_text(_value(d, q))]
            if d.chance(0.3):
                args += ["--accept", d.pick(["1%", "0.5%"] if not d.chance(d.wild) else
                                            ["0", "100%", "2", "x", "1e-300"])]
        inputs = [cap]
    if d.chance(0.2) and cmd != "netlist":
        args += ["--plot", str(folder / d.pick(["p.png"] if not d.chance(d.wild + 0.3) else
                                               ["p.toml", "nofolder/p.png", "p"]))]
    if d.chance(0.3):
        args.append("--json")
    return args, inputs


def _as_text(v) -> str:
    return v if isinstance(v, str) else repr(v)


CASES = {"capture": capture_case, "array": array_case, "spec": spec_case,
         "options": options_case}
