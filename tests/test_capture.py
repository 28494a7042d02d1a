"""Reading instrument exports: every layout in tests/data/captures (invented data made by
make_captures.py there), overrides, errors naming file and line, and property tests
that random bytes, truncated files and random layouts raise nothing but our own errors.

The expected values are the waveform the script wrote (its ``expected()``), rounded as
written: rtol 1e-6 for six significant digits (1e-5 for the five-digit file).
"""

from __future__ import annotations

import importlib.util
import os
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from taumatch.capture import Capture, read
from taumatch.errors import InputError, TaumatchError

DATA = Path(__file__).parent / "data" / "captures"


def _script():
    spec = importlib.util.spec_from_file_location("make_captures", DATA / "make_captures.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


MK = _script()
T, V = MK.expected()


def test_stored_files_match_the_script(tmp_path):
    """The files in tests/data/captures are what make_captures.py writes (guards drift)."""
    MK.write_all(tmp_path)
    for p in sorted(tmp_path.iterdir()):
        stored = DATA / p.name
        assert stored.exists(), p.name
        if p.suffix == ".npz":
            with np.load(p) as a, np.load(stored) as b:
                assert a.files == b.files
                for k in a.files:
                    np.testing.assert_array_equal(a[k], b[k])
        else:
            assert (MK.unpacked(p.name, p.read_bytes())
                    == MK.unpacked(p.name, stored.read_bytes())), p.name


@pytest.mark.parametrize("name, channel, rtol", [
    ("basic.csv", "CH1", 1e-6),
    ("metadata_units_line.csv", "CH1", 1e-6),
    ("units_in_names.csv", "CH1", 1e-6),        # Time (us), CH1 [mV]: scaled by prefix
    ("two_channels.csv", "Probe", 1e-6),
    ("interval_only.csv", "CH1", 1e-6),         # Sample Interval + Start Time lines
    ("dt_equals.txt", "probe", 1e-6),           # dt= / t0= lines, whitespace columns
    ("decimal_comma.csv", "Kanal 1", 1e-5),     # ; and , with +4,9E+00 and trailing ;
    ("crlf_bom_comments.csv", "CH1", 1e-6),     # BOM, CRLF, # comments inside the data
    ("tabs.tsv", "CH1", 1e-6),
    ("index_start_increment.csv", "CH1", 1e-6),  # X over Sequence; Start/Increment beside
    ("index_offset.csv", "Probe", 1e-6),        # numbers from 22; values on the line below
    ("left_metadata.csv", "CH2", 1e-6),         # key,value,unit block on the left; Source
    ("right_metadata.csv", "CH1", 1e-6),        # key,value block on the right
    ("utf16_le_bom.csv", "CH1", 1e-6),          # UTF-16 with a byte-order mark
    ("utf16_be.csv", "CH1", 1e-6),              # UTF-16 big-endian, no mark
    ("basic.csv.gz", "CH1", 1e-6),              # compressed, found from the bytes
    ("basic.csv.bz2", "CH1", 1e-6),
    ("basic.csv.xz", "CH1", 1e-6),
    ("basic_csv.zip", "CH1", 1e-6),             # the one member of a zip
    ("basic_csv.tar.gz", "CH1", 1e-6),          # the one member of a compressed tar
    ("plain_named.gz", "CH1", 1e-6),            # plain text named .gz
    ("capture_2d.npy", "CH1", 0.0),
    ("capture.npz", "CH1", 0.0),
])
def test_layouts(name, channel, rtol):
    cap = read(DATA / name)
    assert isinstance(cap, Capture)
    assert cap.source.startswith(os.fspath(DATA / name))  # an archive adds :member
    np.testing.assert_allclose(cap.time, T, rtol=rtol, atol=1e-12)
    np.testing.assert_allclose(cap.channels[channel], V, rtol=rtol, atol=1e-11)
    assert cap.channel_name() == channel  # the only channel, or the one with the step
    assert cap.units[channel] == "V"
    assert len(cap) == T.size


def test_metadata_and_units_line():
    cap = read(DATA / "metadata_units_line.csv")
    assert cap.metadata["Recorder"] == "invented bench recorder"
    assert cap.metadata["Record Length"] == "600"


def test_channel_choice_and_names():
    cap = read(DATA / "two_channels.csv")
    assert cap.names == ("Reference", "Probe")
    np.testing.assert_allclose(cap.channel(), V, rtol=1e-6, atol=1e-11)
    assert cap.channel("reference")[0] == pytest.approx(0.25)  # case ignored
    with pytest.raises(InputError, match="no channel named 'CH9'.*Reference, Probe"):
        cap.channel("CH9")
    only = read(DATA / "two_channels.csv", "Reference")
    assert only.names == ("Reference",)
    with pytest.raises(InputError, match="no channel with a step"):
        read(DATA / "no_step.csv").channel()


def test_sample_numbers_are_not_seconds(tmp_path):
    """A column of sample numbers (X over Sequence) is never read as seconds: with an
    increment in the header it gives time = start + number × increment; with none, the
    error says what to give (regression: a 1 kHz square read as a 5 mHz one)."""
    cap = read(DATA / "index_start_increment.csv")
    assert cap.names == ("CH1", "CH2")
    assert cap.metadata["Increment"] == "1.000000e-06"
    b = read(DATA / "index_start_increment.csv", sample_interval="2u")  # the user's increment
    assert b.time[1] - b.time[0] == pytest.approx(2e-6) and b.time[0] == pytest.approx(MK.T0)
    p = tmp_path / "no_increment.csv"
    p.write_text("X,CH1\nSequence,Volt\n" + "".join(f"{k},{k % 2}\n" for k in range(20)))
    with pytest.raises(InputError, match="'X' holds sample numbers.*sample_interval="):
        read(p)
    c = read(p, sample_interval="1u")
    assert c.names == ("CH1",) and c.duration == pytest.approx(19e-6)


def test_channel_by_name_or_number():
    """``--channel CH1``, ``ch1`` and ``1`` name the same channel; a position is used only
    when no name carries a number; the error lists the names and their numbers."""
    cap = read(DATA / "index_start_increment.csv")
    assert cap.channel_name("CH2") == cap.channel_name("ch2") == cap.channel_name("2") == "CH2"
    assert read(DATA / "index_start_increment.csv", "1").names == ("CH1",)
    assert read(DATA / "two_channels.csv").channel_name("2") == "Probe"
    with pytest.raises(InputError, match=r"no channel named '3'; channels are CH1, CH2 "
                                         r"\(or their numbers 1, 2\)"):
        cap.channel_name("3")


def test_overrides():
    # explicit delimiter and decimal give what the sniffer found
    a = read(DATA / "decimal_comma.csv", delimiter=";", decimal=",")
    np.testing.assert_allclose(a.channel(), V, rtol=1e-5, atol=1e-11)
    # the wrong decimal mark is an error naming a line, not silent garbage
    with pytest.raises(InputError, match="decimal_comma.csv"):
        read(DATA / "decimal_comma.csv", delimiter=";", decimal=".")
    # a sample interval replaces the time column (this file has no start-time line: 0)
    b = read(DATA / "two_channels.csv", sample_interval="2u")
    assert b.names == ("Reference", "Probe")
    assert b.time[1] - b.time[0] == pytest.approx(2e-6)
    assert b.time[0] == 0.0
    # with a start-time line in the file, the user's interval starts there
    e = read(DATA / "interval_only.csv", sample_interval="0.5u")
    assert e.time[0] == pytest.approx(MK.T0) and e.time[2] - e.time[0] == pytest.approx(1e-6)
    # time column by index and by name
    c = read(DATA / "basic.csv", time_column=0)
    d = read(DATA / "tabs.tsv", time_column="TIME")
    np.testing.assert_allclose(c.time, d.time)
    with pytest.raises(InputError, match="no column named 'clock'"):
        read(DATA / "basic.csv", time_column="clock")
    with pytest.raises(InputError, match="not both"):
        read(DATA / "basic.csv", time_column=0, sample_interval=1e-6)
    with pytest.raises(InputError, match="out of range"):
        read(DATA / "basic.csv", time_column=5)
    with pytest.raises(InputError, match="decimal mark"):
        read(DATA / "basic.csv", decimal=";")
    with pytest.raises(InputError, match="delimiter"):
        read(DATA / "basic.csv", delimiter="::")


def test_one_dimensional_npy_needs_sample_interval():
    cap = read(DATA / "capture_1d.npy", sample_interval=1e-6)
    assert cap.time[-1] == pytest.approx(599e-6)
    np.testing.assert_array_equal(cap.channel(), V)
    with pytest.raises(InputError, match="needs sample_interval="):
        read(DATA / "capture_1d.npy")


@pytest.mark.parametrize("name, pattern", [
    ("bad_cell.csv", r"bad_cell.csv: line 22: cell 'oops' in column 2"),
    ("backwards.csv", r"backwards.csv: line 32: time goes backwards"),
    ("duplicate.csv", r"duplicate.csv: line 42: duplicate time stamp"),
    ("nan.csv", r"nan.csv: line 12: cell 'NaN' .* not a finite number"),
    ("empty.csv", r"empty.csv: the file is empty"),
    ("header_only.csv", r"header_only.csv: no numeric data"),
    ("short.csv", r"short.csv: only 3 samples; an edge needs at least 4"),
])
def test_errors_name_file_and_line(name, pattern):
    with pytest.raises(InputError, match=pattern) as info:
        read(DATA / name)
    assert "\n" not in str(info.value)


def test_unreadable_paths(tmp_path):
    with pytest.raises(InputError, match="cannot open"):
        read(tmp_path / "missing.csv")
    with pytest.raises(InputError, match="folder"):
        read(tmp_path)
    (tmp_path / "bin.csv").write_bytes(b"\x00\x01\x02garbage\x00")
    with pytest.raises(InputError, match="binary"):
        read(tmp_path / "bin.csv")
    (tmp_path / "bad.npy").write_bytes(b"\x93NUMPY garbage")
    with pytest.raises(InputError, match="npy"):
        read(tmp_path / "bad.npy")
    np.save(tmp_path / "obj.npy", np.array(["a", "b"]))
    with pytest.raises(InputError, match="real numbers"):
        read(tmp_path / "obj.npy")
    np.savez(tmp_path / "nodt.npz", CH1=np.arange(10.0))
    with pytest.raises(InputError, match="sample interval"):
        read(tmp_path / "nodt.npz")
    (tmp_path / "inf.csv").write_text("t,v\n0,1\n1,2\n2,inf\n3,4\n4,5\n")
    with pytest.raises(InputError, match=r"line 4: .*finite"):
        read(tmp_path / "inf.csv")
    (tmp_path / "ragged.csv").write_text("t,v\n0,1\n1,2\n2,3\n3,4\n4,5\n5,6,7\n")
    with pytest.raises(InputError, match=r"line 7: 3 cells, expected 2"):
        read(tmp_path / "ragged.csv")


def test_cr_line_ends_quotes_and_latin1_header(tmp_path):
    """Old-style CR line ends, quoted cells and a non-UTF-8 byte in the metadata."""
    rows = [f"{k * 1e-6:.6e},{(k // 5) % 2:.1f}" for k in range(20)]
    p = tmp_path / "cr.csv"
    p.write_bytes(("Note,old\rTime (s),CH1 (V)\r" + "\r".join(rows) + "\r").encode())
    cap = read(p)
    assert len(cap) == 20 and cap.time[-1] == pytest.approx(19e-6)
    q = tmp_path / "quoted.csv"
    q.write_text('"Time (s)","CH1 (V)"\n' + "\n".join(
        '"{}","{}"'.format(*r.split(",")) for r in rows) + "\n")
    np.testing.assert_allclose(read(q).channel(), cap.channel())
    r = tmp_path / "latin1.csv"
    r.write_bytes(b"Temperature,23 \xb0C\nTime (s),CH1 (V)\n" + "\n".join(rows).encode() + b"\n")
    cap = read(r)
    assert cap.metadata["Temperature"] == "23 \u00b0C"
    np.testing.assert_allclose(cap.channel(), read(q).channel())


def test_interval_and_rate_with_units_in_key_or_value(tmp_path):
    rows = "\n".join(f"{(k // 5) % 2:.1f}" for k in range(20)) + "\n"
    a = tmp_path / "a.csv"
    a.write_text("Sample Interval (us),2\nCH1\n" + rows)
    assert read(a).time[1] == pytest.approx(2e-6)
    b = tmp_path / "b.csv"
    b.write_text("Sample Rate: 250 kHz\nt0 = -4 us\nCH1\n" + rows)
    cap = read(b)
    assert cap.time[0] == pytest.approx(-4e-6) and cap.time[1] - cap.time[0] == pytest.approx(4e-6)
    c = tmp_path / "c.csv"
    c.write_text("Sample Interval,fast\nCH1\n" + rows)
    with pytest.raises(InputError, match="line 1: Sample Interval"):
        read(c)
    d = tmp_path / "d.csv"
    d.write_text("CH1\n" + rows)
    with pytest.raises(InputError, match="one column and no sample interval"):
        read(d)


def test_capture_does_not_modify_or_copy_inputs():
    t = np.arange(8.0)
    v = np.r_[np.zeros(4), np.ones(4)]
    cap = Capture(t, {"a": v})
    assert t.flags.writeable and v.flags.writeable
    assert not cap.time.flags.writeable
    assert np.shares_memory(cap.time, t)
    with pytest.raises(InputError, match="samples but time has"):
        Capture(t, {"a": v[:5]})
    with pytest.raises(InputError, match="at least one channel"):
        Capture(t, {})


def test_a_larger_file_streams(tmp_path):
    """100 000 rows with a metadata block, read by pandas' C parser after the header."""
    n = 100_000
    t = np.arange(n) * 1e-8
    v = (np.mod(t, 1e-5) < 5e-6).astype(float)
    path = tmp_path / "big.csv"
    import pandas as pd

    with open(path, "w") as fh:
        fh.write("Note,invented\n")
    pd.DataFrame({"Time (s)": t, "CH1 (mV)": v * 1000}).to_csv(
        path, mode="a", index=False, float_format="%.8e")
    cap = read(path)
    np.testing.assert_allclose(cap.time, t, rtol=1e-8, atol=1e-20)
    np.testing.assert_allclose(cap.channel(), v, atol=1e-9)


# ----------------------------------------------------------------- property tests
def _read_or_our_error(path, **kw):
    try:
        read(path, **kw)
    except TaumatchError:
        pass


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.binary(max_size=400))
def test_random_bytes_raise_only_our_errors(tmp_path, data):
    p = tmp_path / "random.csv"
    p.write_bytes(data)
    _read_or_our_error(p)
    q = tmp_path / "random.npy"
    q.write_bytes(b"\x93NUMPY" + data)
    _read_or_our_error(q)


GOOD = ["basic.csv", "metadata_units_line.csv", "decimal_comma.csv", "crlf_bom_comments.csv",
        "dt_equals.txt", "capture_2d.npy", "capture.npz", "interval_only.csv",
        "index_start_increment.csv", "left_metadata.csv", "utf16_le_bom.csv", "utf16_be.csv",
        "coarse_time.csv", "basic.csv.gz", "basic.csv.bz2", "basic.csv.xz", "basic_csv.zip",
        "basic_csv.tar.gz"]


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(name=st.sampled_from(GOOD), cut=st.floats(0, 1), flip=st.integers(0, 255))
def test_truncated_and_damaged_files_raise_only_our_errors(tmp_path, name, cut, flip):
    raw = (DATA / name).read_bytes()
    k = int(cut * len(raw))
    p = tmp_path / name
    p.write_bytes(raw[:k])
    _read_or_our_error(p)
    if k < len(raw):
        damaged = bytearray(raw)
        damaged[k] = flip
        p.write_bytes(bytes(damaged))
        _read_or_our_error(p)


@st.composite
def layouts(draw):
    n = draw(st.integers(4, 40))
    nch = draw(st.integers(1, 3))
    style = draw(st.sampled_from([(",", "."), (";", ","), (";", "."), ("\t", "."), (" ", ".")]))
    header = draw(st.booleans())
    trailing = draw(st.booleans()) and style[0] != " "
    crlf = draw(st.booleans())
    bom = draw(st.booleans())
    meta = draw(st.lists(st.sampled_from(
        ["Note: invented", "Operator=nobody", "# plain comment", "Probe,10:1", ""]), max_size=3))
    values = draw(st.lists(st.floats(-1e3, 1e3, allow_nan=False, width=32),
                           min_size=n * nch, max_size=n * nch))
    exp_fmt = draw(st.sampled_from(["%.6e", "%+.4E", "%.5f"]))
    return n, nch, style, header, trailing, crlf, bom, meta, values, exp_fmt


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(layout=layouts())
def test_random_layouts_round_trip(tmp_path, layout):
    """Whatever the layout, the numbers written are the numbers read (or, for a layout
    that is ambiguous, our own error)."""
    n, nch, (sep, dec), header, trailing, crlf, bom, meta, values, fmt = layout
    t = np.arange(n) * 1e-6
    chans = np.array(values, dtype=float).reshape(nch, n)
    lines = list(meta)
    if header:
        gap = "" if sep == " " else " "  # names with blanks cannot be split on blanks
        names = [f"Time{gap}(us)"] + [f"CH{i + 1}{gap}[mV]" for i in range(nch)]
        lines.append(sep.join(names))
        scale_t, scale_v = 1e6, 1e3
    else:
        scale_t, scale_v = 1.0, 1.0
    for k in range(n):
        cells = [fmt % (t[k] * scale_t)] + [fmt % (c[k] * scale_v) for c in chans]
        if dec == ",":
            cells = [c.replace(".", ",") for c in cells]
        lines.append(sep.join(cells) + (sep if trailing else ""))
    nl = "\r\n" if crlf else "\n"
    data = (b"\xef\xbb\xbf" if bom else b"") + (nl.join(lines) + nl).encode()
    p = tmp_path / "layout.txt"
    p.write_bytes(data)
    try:
        cap = read(p)
    except TaumatchError:
        return
    written_t = np.array([float((fmt % (x * scale_t)).replace(",", ".")) for x in t]) / scale_t
    if cap.notes:  # stamps too coarse for the step: rebuilt uniform, within one printed step
        assert "rebuilt as uniform" in cap.notes[0]
        assert np.abs(cap.time - written_t).max() <= np.abs(np.diff(written_t)).max()
    else:
        np.testing.assert_allclose(cap.time, written_t, rtol=1e-12, atol=0)
    for i, c in enumerate(chans):
        want = np.array([float((fmt % (x * scale_v)).replace(",", ".")) for x in c]) / scale_v
        np.testing.assert_allclose(cap.channels[cap.names[i]], want, rtol=1e-12, atol=0)


def test_rate_key_with_unit_is_honoured_and_unknown_units_refused(tmp_path):
    """A metadata rate in MHz sets the sample interval (SI prefixes); a unit that is not a
    rate is an error naming the line."""
    from taumatch.capture import read
    from taumatch.errors import InputError

    rows = "\n".join(f"{v}" for v in ([0.0] * 50 + [1.0] * 50))
    ok = tmp_path / "rate.csv"
    ok.write_text("Sample Rate (MHz),2\nCH1\n" + rows + "\n")
    cap = read(ok)
    assert cap.sample_interval == pytest.approx(0.5e-6, rel=1e-12)
    bad = tmp_path / "bad.csv"
    bad.write_text("Sample Interval (xyz),1e-6\nCH1\n" + rows + "\n")
    with pytest.raises(InputError, match="line 1"):
        read(bad)


def test_archive_members_and_suffixes_that_lie():
    """A compressed or archived export reads as the plain one; the member is named in the
    source; plain text under a compressed name is read with a note saying so."""
    assert read(DATA / "basic_csv.tar.gz").source.endswith("basic_csv.tar.gz:basic.csv")
    assert read(DATA / "basic.csv.gz").notes == ()
    assert read(DATA / "plain_named.gz").notes == (
        "named .gz but not compressed or archived: read as it is",)


def test_metadata_beside_the_data():
    """Key/value cells on the left or right of the numbers are metadata, not columns; a
    headerless channel takes its name from a Source line, its units from the unit lines."""
    left = read(DATA / "left_metadata.csv")
    assert left.names == ("CH2",) and left.units["CH2"] == "V"
    assert left.metadata["Record Length"] == "600 Points"
    assert left.metadata["Sample Interval"] == "1.000000e-06 s"
    right = read(DATA / "right_metadata.csv")
    assert right.metadata["Note"] == "invented right-hand block"


def test_coarse_time_stamps_rebuilt_with_a_note():
    """Stamps printed to two digits repeat; stamps of 1.5 us printed to 1 us stair-step.
    Both are uniform within their printed resolution, so the time base is rebuilt from the
    record, and one note says so. The expected step is what make_captures.py sampled at
    (its DT and STAIR_DT); the fit must find it to 0.1 % (the reader's stated precision)."""
    coarse = read(DATA / "coarse_time.csv")
    assert coarse.sample_interval == pytest.approx(MK.DT, rel=1e-3)
    np.testing.assert_allclose(coarse.time, T, atol=0.5e-5)  # half of the coarsest digit
    np.testing.assert_allclose(coarse.channel(), V, rtol=1e-6, atol=1e-11)
    assert len(coarse.notes) == 1 and "stamps repeat" in coarse.notes[0]
    assert "1 µs steps" in coarse.notes[0]
    stair = read(DATA / "stair_time.csv")
    ts, _ = MK.stair_expected()
    assert stair.sample_interval == pytest.approx(MK.STAIR_DT, rel=1e-3)
    np.testing.assert_allclose(stair.time, ts, atol=0.5e-6)
    assert "stamps stair-step" in stair.notes[0] and "1.5 µs steps" in stair.notes[0]
    assert np.all(np.diff(stair.time) > 0)


def test_stamps_too_coarse_to_fix_the_step_are_refused(tmp_path):
    """Ten samples of 1 us printed to 10 us: the step cannot be fixed to 0.1 %, so the
    repeat is reported with its line, as any duplicate stamp."""
    p = tmp_path / "few.csv"
    p.write_text("Time (s),CH1 (V)\n" + "".join(f"{k * 1e-6:.5f},{k % 2}\n" for k in range(10)))
    with pytest.raises(InputError, match=r"few.csv: line 3: duplicate time stamp"):
        read(p)


def test_compressed_numpy_array(tmp_path):
    """A gzipped .npy reads as the array (its header checked before its data)."""
    import gzip
    import io

    buf = io.BytesIO()
    np.save(buf, np.column_stack([T, V]))
    p = tmp_path / "capture.npy.gz"
    p.write_bytes(gzip.compress(buf.getvalue()))
    cap = read(p)
    np.testing.assert_array_equal(cap.time, T)
    np.testing.assert_array_equal(cap.channel(), V)
