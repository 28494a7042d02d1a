"""Property tests for the reader (repeatable by default, fresh examples with
TAUMATCH_EXPLORE=1; see conftest.py).

* Any export written in the layouts the reader promises (a time column; sample numbers with
  the start and increment in the header; metadata beside the data, left or right), in any
  of its encodings and containers, reads back as the numbers and names written.
* Stamps printed too coarsely for the step are either rebuilt (with a note, the step within
  0.5 % of the truth, every stamp within a printed digit) or refused as repeats; never read
  as a stair.
* A channel is found by its name in any case or by its number.

The expected values are the numbers as the test printed them (Python's own formatting),
not anything the reader computed.
"""

from __future__ import annotations

import bz2
import gzip
import io
import lzma
import tarfile
import zipfile

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from taumatch.capture import read
from taumatch.capture.model import match_channel
from taumatch.errors import InputError

NAMES = ["CH1", "CH2", "CH3", "CH4", "Probe", "Ref", "Kanal 2", "MATH"]
SETTINGS = settings(max_examples=80, deadline=None,
                    suppress_health_check=[HealthCheck.function_scoped_fixture])


@st.composite
def exports(draw):
    n = draw(st.integers(6, 60))
    names = draw(st.lists(st.sampled_from(NAMES), min_size=1, max_size=3, unique=True))
    values = draw(st.lists(st.floats(-1e3, 1e3, allow_nan=False, width=32),
                           min_size=n * len(names), max_size=n * len(names)))
    return {
        "n": n, "names": names, "values": np.array(values, float).reshape(len(names), n),
        "layout": draw(st.sampled_from(["time", "index", "left", "right"])),
        "dt": draw(st.sampled_from([1e-9, 4e-8, 5e-6, 1e-3])),
        "t0": draw(st.sampled_from([0.0, -3.5e-3, -1.2e-3, 2e-6])),
        "first": draw(st.sampled_from([0, 22])),
        "encoding": draw(st.sampled_from(["utf-8", "utf-8-sig", "utf-16-le-bom", "utf-16-be"])),
        "container": draw(st.sampled_from([None, "gz", "bz2", "xz", "zip", "tar", "tar.gz"])),
        "newline": draw(st.sampled_from(["\n", "\r\n"])),
    }


def _lines(e):
    """The export's lines and the time and channels as printed."""
    n, names, dt, t0 = e["n"], e["names"], e["dt"], e["t0"]
    vals = [[f"{x:.6e}" for x in row] for row in e["values"]]
    cols = [",".join(row[k] for row in vals) for k in range(n)]
    t_cells = [f"{t0 + k * dt:.9e}" for k in range(n)]
    want_t = np.array([float(c) for c in t_cells])
    header = ",".join(names)
    if e["layout"] == "index":
        k0 = e["first"]
        start = f"{t0 - k0 * dt:.6e}"
        lines = [f"X,{header},Start,Increment,",
                 "Sequence," + ",".join("Volt" for _ in names) + f",{start},{dt:.6e},"]
        lines += [f"{k0 + k},{cols[k]}," for k in range(n)]
        want_t = float(start) + float(f"{dt:.6e}") * (k0 + np.arange(n))
    elif e["layout"] == "left":
        meta = [("Record Length", str(n), "Points"), ("Note", "invented", ""),
                ("Probe Ratio", "10", "X")]
        lines = [f",,,Time (s),{header}"]
        lines += [",".join([*meta[k], t_cells[k], cols[k]]) if k < len(meta)
                  else f",,,{t_cells[k]},{cols[k]}" for k in range(n)]
    elif e["layout"] == "right":
        meta = [("Note", "invented"), ("Operator", "nobody")]
        lines = [f"Time (s),{header}"]
        lines += [f"{t_cells[k]},{cols[k]},,{meta[k][0]},{meta[k][1]}" if k < len(meta)
                  else f"{t_cells[k]},{cols[k]},," for k in range(n)]
    else:
        lines = [f"Time (s),{header}"] + [f"{t_cells[k]},{cols[k]}" for k in range(n)]
    want_v = np.array([[float(c) for c in row] for row in vals])
    return lines, want_t, want_v


def _encoded(text: str, encoding: str) -> bytes:
    if encoding == "utf-16-le-bom":
        return b"\xff\xfe" + text.encode("utf-16-le")
    return text.encode(encoding)


def _packed(data: bytes, container) -> bytes:
    if container == "gz":
        return gzip.compress(data)
    if container == "bz2":
        return bz2.compress(data)
    if container == "xz":
        return lzma.compress(data)
    buf = io.BytesIO()
    if container == "zip":
        with zipfile.ZipFile(buf, "w", zipfile.ZIP_DEFLATED) as zf:
            zf.writestr("export.csv", data)
        return buf.getvalue()
    if container in ("tar", "tar.gz"):
        with tarfile.open(fileobj=buf, mode="w") as tf:
            info = tarfile.TarInfo("export.csv")
            info.size = len(data)
            tf.addfile(info, io.BytesIO(data))
        raw = buf.getvalue()
        return gzip.compress(raw) if container == "tar.gz" else raw
    return data


@SETTINGS
@given(e=exports())
def test_every_promised_layout_reads_back(tmp_path, e):
    lines, want_t, want_v = _lines(e)
    data = _packed(_encoded(e["newline"].join(lines) + e["newline"], e["encoding"]),
                   e["container"])
    path = tmp_path / "export.dat"
    path.write_bytes(data)
    cap = read(path)
    assert cap.names == tuple(e["names"])
    assert cap.notes == ()
    np.testing.assert_allclose(cap.time, want_t, rtol=1e-12, atol=1e-21)
    for name, want in zip(e["names"], want_v):
        np.testing.assert_array_equal(cap.channels[name], want)


@SETTINGS
@given(n=st.integers(50, 3000), dt_exp=st.floats(-9, -3), ratio=st.floats(0.3, 30),
       t0_steps=st.integers(-500, 500), sci=st.booleans())
def test_coarse_stamps_are_rebuilt_or_refused(tmp_path, n, dt_exp, ratio, t0_steps, sci):
    """Stamps of a uniform record printed to a digit ``ratio`` times the step."""
    dt = 10.0 ** dt_exp
    t = (t0_steps + np.arange(n)) * dt
    digit = int(np.floor(np.log10(dt * ratio)))
    if sci:  # mantissa digits so that the largest stamp is printed to about that digit
        top = int(np.floor(np.log10(max(abs(t[0]), abs(t[-1]), dt))))
        cells = [f"{x:.{max(0, top - digit)}e}" for x in t]
    else:
        cells = [f"{x:.{max(0, -digit)}f}" for x in t]
    printed = np.array([float(c) for c in cells])
    path = tmp_path / "coarse.csv"
    path.write_text("Time (s),CH1 (V)\n" + "".join(f"{c},{k % 7}\n" for k, c in enumerate(cells)))
    try:
        cap = read(path)
    except InputError as exc:
        assert "duplicate time stamp" in str(exc) or "time goes backwards" in str(exc)
        assert not np.all(np.diff(printed) > 0)  # refused only when stamps repeat
        return
    if cap.notes:
        assert "rebuilt as uniform" in cap.notes[0]
        assert cap.sample_interval == pytest.approx(dt, rel=5e-3)
        step = np.abs(np.diff(printed)).max()
        assert np.abs(cap.time - printed).max() <= step
        np.testing.assert_allclose(np.diff(cap.time), cap.sample_interval, rtol=1e-6)
    else:
        np.testing.assert_array_equal(cap.time, printed)


@given(names=st.lists(st.sampled_from(NAMES), min_size=1, max_size=4, unique=True),
       pick=st.integers(0, 3), case=st.sampled_from([str.lower, str.upper, str]))
def test_channel_by_name_or_number(names, pick, case):
    name = names[pick % len(names)]
    assert match_channel(case(name), names) == name
    digits = [c for c in name if c.isdigit()]
    numbered = [n for n in names if sum(c.isdigit() for c in n) == 1]
    if len(digits) == 1 and [n for n in numbered if digits[0] in n] == [name]:
        assert match_channel(digits[0], names) == name
