"""Binary waveform files of bench oscilloscopes (../shared/real-captures/binary), read
through the optional decoder (the ``scopes`` extra, part of the ``test`` extra).

Reference: the CSVs beside them, which the folder's README says were decoded from these
files with the RigolWFM package (1.6.0) and written with nine significant digits, so each
decoded file must give the same numbers to that precision. ``DS1054Z-*.csv`` is not
decoded: it is the instrument's own export of the same acquisition, 60000 of the binary
file's 60256 samples. Their volts and time labels differ (the decoder gives 0.05 V per code
and a start 4.08 µs earlier, the instrument's export about 0.044 V per code: measured
here, not asserted), so for it the test holds what must agree: the channels, the sampling,
and the samples themselves, code for code.
"""

from __future__ import annotations

import json
import sys

import numpy as np
import pytest
from click.testing import CliRunner

from taumatch.capture import read
from taumatch.cli import main
from taumatch.errors import InputError
from taumatch.pulse import measure

# binary file, its channels, and the decoded CSVs beside it (channel -> CSV)
DECODED = [
    ("DHO824-ch1.bin", ("CH1",), {"CH1": "DHO824-ch1_CH1.csv"}),
    ("DS1000E-A.wfm", ("CH1", "CH2"), {"CH2": "DS1000E-A_CH2.csv"}),
    ("DS1000E-B.wfm", ("CH1", "CH2"), {"CH2": "DS1000E-B_CH2.csv"}),
    ("DS1204B-A.wfm", ("CH1", "CH2", "CH3", "CH4"),
     {"CH1": "DS1204B-A_CH1.csv", "CH3": "DS1204B-A_CH3.csv"}),
    ("MSO5000-A.bin", ("CH1", "CH2", "CH3", "CH4"),
     {"CH1": "MSO5000-A_CH1.csv", "CH4": "MSO5000-A_CH4.csv"}),
    ("trace3.000", ("CH1",), {"CH1": "LeCroy-trace3_CH1.csv"}),
    ("trace4.000", ("CH2",), {"CH2": "LeCroy-trace4_CH2.csv"}),
]
NINE_DIGITS = 1e-8  # relative: the CSVs' nine significant digits, with a little room


@pytest.mark.parametrize("binary, channels, csvs", DECODED, ids=[d[0] for d in DECODED])
def test_decoded_file_agrees_with_its_csv(real_captures, binary, channels, csvs):
    cap = read(real_captures / "binary" / binary)
    assert cap.names == channels
    assert cap.metadata["decoder"].startswith("RigolWFM")
    for name, csv_name in csvs.items():
        ref = read(real_captures / csv_name)
        assert ref.names == (name,)
        np.testing.assert_allclose(cap.time, ref.time, rtol=NINE_DIGITS,
                                   atol=NINE_DIGITS * ref.sample_interval)
        np.testing.assert_allclose(cap.channels[name], ref.channels[name], rtol=NINE_DIGITS,
                                   atol=1e-12)


def test_instrument_export_and_binary_of_the_same_acquisition(real_captures):
    """DS1054Z: the same channels, 40 ns per point (the CSV header's Increment), and every
    sample of the export is the binary's sample 26 places on, as the same converter code
    (codes numbered by rank in each file); the export's period is the calibrator's 1 ms."""
    wfm = read(real_captures / "binary" / "DS1054Z-ch1SquareCH2Uart.wfm")
    csv = read(real_captures / "DS1054Z-ch1SquareCH2Uart.csv")
    assert wfm.names == csv.names == ("CH1", "CH2")
    assert wfm.sample_interval == pytest.approx(csv.sample_interval, rel=1e-6)
    assert len(wfm) == 60256 and len(csv) == 60000
    for name in csv.names:
        a, b = wfm.channels[name], csv.channels[name]
        code_a = np.searchsorted(np.unique(a), a)[26:26 + len(b)]
        code_b = np.searchsorted(np.unique(b), b)
        np.testing.assert_array_equal(code_a, code_b)
    assert measure(csv, "CH1").period == pytest.approx(1e-3, rel=0.01)


def test_measure_a_binary_file_as_typed(real_captures):
    result = CliRunner().invoke(main, ["measure", str(real_captures / "binary" / "DS1000E-B.wfm"),
                                       "--channel", "2", "--json"])
    assert result.exit_code == 0, result.output
    out = json.loads(result.stdout)
    assert out["channel"] == "CH2" and out["period"] == pytest.approx(1e-3, rel=0.01)


def test_without_the_decoder_one_line_names_the_extra(real_captures, monkeypatch, tmp_path):
    """The decoder absent (simulated): a scope file is refused naming the extra; other
    binary bytes are called what they are."""
    monkeypatch.setitem(sys.modules, "RigolWFM", None)
    with pytest.raises(InputError, match=r"DS1000E-A.wfm: an oscilloscope's binary waveform "
                                         r"file; .* pip install 'taumatch\[scopes\]'"):
        read(real_captures / "binary" / "DS1000E-A.wfm")
    junk = tmp_path / "junk.bin"
    junk.write_bytes(b"\x00\x01\x02junk\x00" * 10)
    with pytest.raises(InputError, match=r"a binary file, not a text export or a NumPy array"):
        read(junk)


def test_damaged_or_unknown_binary_files(real_captures, tmp_path):
    """With the decoder: unknown bytes and a truncated waveform file give one line each."""
    junk = tmp_path / "junk.bin"
    junk.write_bytes(b"\x00\x01\x02junk\x00" * 10)
    with pytest.raises(InputError, match=r"junk.bin: a binary file the waveform decoder does "
                                         r"not recognise") as info:
        read(junk)
    assert "\n" not in str(info.value)
    cut = tmp_path / "cut.wfm"
    cut.write_bytes((real_captures / "binary" / "DS1000E-A.wfm").read_bytes()[:300])
    with pytest.raises(InputError, match=r"cut.wfm: ") as info:
        read(cut)
    assert "\n" not in str(info.value)
