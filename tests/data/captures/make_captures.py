"""Write the small capture files the reader tests use.  All data are invented.

Run ``python tests/data/captures/make_captures.py`` (from the repository root) to make
them again; the test suite also regenerates them in a temporary folder and checks the
stored copies are identical.

The waveform is a 5 kHz square wave, 0 V to 1 V, with first-order edges of time
constant 5 µs, sampled every 1 µs for three periods; ``expected()`` gives it exactly as
written (six significant digits).
"""

from __future__ import annotations

import bz2
import gzip
import io
import lzma
import sys
import tarfile
import zipfile
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


STAIR_DT = 1.5e-6  # s, printed to 1 us in stair_time.csv


def stair_expected(n=400):
    """Time (s) and channel (V) of stair_time.csv before its time was printed coarsely."""
    t = T0 + STAIR_DT * np.arange(n)
    v = square(t)
    return t, np.array([float(DIGITS % x) for x in v])


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
    # metadata blocks beside the data: on the left (key, value, unit; the channel named by
    # a Source line), and on the right
    left = [("Record Length", "600", "Points"), ("Sample Interval", f"{DT:.6e}", "s"),
            ("Trigger Point", "20", "Samples"), ("Source", "CH2", ""),
            ("Vertical Units", "V", ""), ("Horizontal Units", "s", "")]
    rows = _rows([t, v])
    text("left_metadata.csv",
         [f"{a},{b},{c},{r}," for (a, b, c), r in zip(left, rows)]
         + [f",,,{r}," for r in rows[len(left):]])
    right = [("Note", "invented right-hand block"), ("Sample Interval", f"{DT:.6e}")]
    text("right_metadata.csv",
         ["Time (s),CH1 (V)"] + [f"{r},,{a},{b}" for (a, b), r in zip(right, rows)]
         + [f"{r},," for r in rows[len(right):]])
    # UTF-16 text, with a byte-order mark (little-endian) and without (big-endian)
    plain = "\r\n".join(["Time (s),CH1 (V)"] + rows) + "\r\n"
    out["utf16_le_bom.csv"] = b"\xff\xfe" + plain.encode("utf-16-le")
    out["utf16_be.csv"] = plain.encode("utf-16-be")
    # time printed too coarsely: stamps repeat (two significant digits), or stair-step
    # (1.5 us steps printed to 1 us)
    text("coarse_time.csv", ["Time (s),CH1 (V)"]
         + [f"{a:.1e},{b}" for a, b in zip(t, _rows([v]))])
    ts, vs = stair_expected()
    text("stair_time.csv", ["Time (ms),CH1 (V)"]
         + [f"{a * 1e3:.3f},{b}" for a, b in zip(ts, _rows([vs]))])
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


def packed_files() -> dict[str, bytes]:
    """basic.csv compressed and archived, and plain text under a compressed name (fixed
    dates and owners, so the content is the same at every run)."""
    basic = files()["basic.csv"]
    out = {
        "basic.csv.gz": gzip.compress(basic, mtime=0),
        "basic.csv.bz2": bz2.compress(basic),
        "basic.csv.xz": lzma.compress(basic),
        "plain_named.gz": basic,
    }
    buf = io.BytesIO()
    with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr(zipfile.ZipInfo("basic.csv", date_time=(1980, 1, 1, 0, 0, 0)), basic)
    out["basic_csv.zip"] = buf.getvalue()
    buf = io.BytesIO()
    with tarfile.open(fileobj=buf, mode="w", format=tarfile.USTAR_FORMAT) as tf:
        info = tarfile.TarInfo("basic.csv")
        info.size, info.mtime, info.mode = len(basic), 0, 0o644
        tf.addfile(info, io.BytesIO(basic))
    out["basic_csv.tar.gz"] = gzip.compress(buf.getvalue(), mtime=0)
    return out


def unpacked(name: str, data: bytes) -> bytes:
    """What a packed file holds (the test compares contents: compressors' bytes vary with
    their library version)."""
    if name.endswith(".zip"):
        with zipfile.ZipFile(io.BytesIO(data)) as zf:
            return b"".join(zf.read(n) for n in zf.namelist())
    if name.endswith(".tar.gz"):
        with tarfile.open(fileobj=io.BytesIO(gzip.decompress(data))) as tf:
            return b"".join(tf.extractfile(m).read() for m in tf.getmembers())
    if name.endswith(".gz") and data[:2] == b"\x1f\x8b":
        return gzip.decompress(data)
    if name.endswith(".bz2"):
        return bz2.decompress(data)
    if name.endswith(".xz"):
        return lzma.decompress(data)
    return data


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
    for name, data in {**files(), **packed_files()}.items():
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
