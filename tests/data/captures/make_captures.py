"""Write the small capture files the reader tests use.  All data are invented.

Run ``python tests/data/captures/make_captures.py`` (from the repository root) to make
them again; the test suite also regenerates them in a temporary folder and checks the
stored copies are identical.

The waveform is a 5 kHz square wave, 0 V to 1 V, with first-order edges of time
constant 5 µs, sampled every 1 µs for three periods; ``expected()`` gives it exactly as
written (six significant digits).
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

PERIOD = 200e-6  # s
TAU = 5e-6  # s
DT = 1e-6  # s
N = 600
T0 = -20e-6  # s, start of the record
DIGITS = "%.6e"


def square(t, period=PERIOD, tau=TAU, low=0.0, high=1.0, delay=10e-6):
    """First-order square wave (V) at instants t (s); rising edges at delay + k·period."""
    t = np.asarray(t, dtype=float)
    ph = np.mod(t - delay, period)
    half = period / 2
    # periodic steady state of an RC low-pass driven by a 50 % square wave
    a = np.exp(-half / tau)
    v_lo = a / (1 + a)  # value at the rising edge, fraction of amplitude
    rise = 1 - (1 - v_lo) * np.exp(-ph / tau)
    v_hi = 1 - (1 - v_lo) * a
    fall = v_hi * np.exp(-(ph - half) / tau)
    frac = np.where(ph < half, rise, fall)
    return low + (high - low) * frac


def expected(n=N, dt=DT, t0=T0):
    """Time (s) and the channel (V) as written to the files (rounded like the files)."""
    t = t0 + dt * np.arange(n)
    v = square(t)
    return np.array([float(DIGITS % x) for x in t]), np.array([float(DIGITS % x) for x in v])


def _rows(cols, fmt=DIGITS, sep=",", decimal=".", trailing=""):
    lines = []
    for row in zip(*cols):
        cells = [fmt % x for x in row]
        if decimal != ".":
            cells = [c.replace(".", decimal) for c in cells]
        lines.append(sep.join(cells) + trailing)
    return lines


def files() -> dict[str, bytes]:
    """File name to content."""
    t, v = expected()
    flat = np.round(0.25 + 0.001 * np.sin(np.arange(N) * 0.7), 6)  # a channel with no step
    out: dict[str, bytes] = {}

    def text(name, lines, newline="\n", bom=False):
        data = newline.join(lines) + newline
        out[name] = (b"\xef\xbb\xbf" if bom else b"") + data.encode("utf-8")

    text("basic.csv", ["Time (s),CH1 (V)"] + _rows([t, v]))
    text("metadata_units_line.csv",
         ["Recorder,invented bench recorder", "Record Length,600", "Vertical Scale,0.2 V/div",
          "", "Time,CH1", "s,V"] + _rows([t, v]))
    text("units_in_names.csv",
         ["Time (us),CH1 [mV]"] + _rows([t * 1e6, v * 1e3]))
    text("two_channels.csv",
         ["Time (s),Reference (V),Probe (V)"] + _rows([t, flat, v]))
    text("interval_only.csv",
         ["Sample Interval,1e-6", f"Start Time,{T0:.6e}", "CH1"] + _rows([v]))
    text("dt_equals.txt",
         ["# invented record, whitespace columns", f"dt={DT:g}", f"t0={T0:g}",
          "probe   reference"] + _rows([v, flat], sep="   "))
    text("decimal_comma.csv",
         ["Zeit;Kanal 1", "s;V"] + _rows([t, v], fmt="%+.5E", sep=";", decimal=",",
                                          trailing=";"))
    text("crlf_bom_comments.csv",
         ["# invented capture with CRLF line ends and a byte-order mark", "Time (s),CH1 (V)"]
         + _rows([t[:300], v[:300]]) + ["# a comment inside the data"]
         + _rows([t[300:], v[300:]]), newline="\r\n", bom=True)
    text("tabs.tsv", ["time\tCH1"] + _rows([t, v], sep="\t"))
    # sample numbers with the start and increment in the header's key cells and the line
    # below (a common export layout), and the same with numbers not starting at 0
    k = np.arange(N)
    text("index_start_increment.csv",
         ["X,CH1,CH2,Start,Increment,", f"Sequence,Volt,Volt,{T0:.6e},{DT:.6e},"]
         + [f"{j},{a},{b}," for j, a, b in zip(k, *(_rows([x]) for x in (v, flat)))],
         newline="\r\n")
    first = 22
    text("index_offset.csv",
         ["Index,Probe (mV),Start,Increment", f",,{T0 - first * DT:.6e},{DT:.6e}"]
         + [f"{first + j},{x * 1e3:.6e}" for j, x in enumerate(v)])
    # bad files: the tests expect the line number in the message
    bad = ["Time (s),CH1 (V)"] + _rows([t[:50], v[:50]])
    text("bad_cell.csv", bad[:21] + ["2.0e-06,oops"] + bad[22:])  # line 22
    back = list(bad)
    back[31] = back[29]  # line 32 repeats the time of line 30: time goes backwards
    text("backwards.csv", back)
    dup = list(bad)
    dup[41] = dup[40].split(",")[0] + ",0.5"  # line 42 repeats the time of line 41
    text("duplicate.csv", dup)
    nan = list(bad)
    nan[11] = nan[11].split(",")[0] + ",NaN"  # line 12
    text("nan.csv", nan)
    text("no_step.csv", ["Time (s),A (V),B (V)"] + _rows([t, flat, flat[::-1]]))
    text("short.csv", ["Time (s),CH1 (V)"] + _rows([t[:3], v[:3]]))
    text("header_only.csv", ["Time (s),CH1 (V)"])
    out["empty.csv"] = b""
    return out


def npy_files() -> dict[str, dict]:
    """Binary NumPy files: name to the arrays they hold."""
    t, v = expected()
    return {
        "capture_2d.npy": {"array": np.column_stack([t, v])},
        "capture_1d.npy": {"array": v},
        "capture.npz": {"t": t, "CH1": v, "dt": np.float64(DT)},
    }


def write_all(folder) -> list[Path]:
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    written = []
    for name, data in files().items():
        (folder / name).write_bytes(data)
        written.append(folder / name)
    for name, arrays in npy_files().items():
        path = folder / name
        if name.endswith(".npy"):
            np.save(path, arrays["array"])
        else:
            np.savez(path, **arrays)
        written.append(path)
    return written


if __name__ == "__main__":
    target = Path(sys.argv[1]) if len(sys.argv) > 1 else Path(__file__).parent
    for p in write_all(target):
        print(p)
