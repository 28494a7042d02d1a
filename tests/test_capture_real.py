"""Real oscilloscope exports (../shared/real-captures, see its README) read as typed, with
no options: the right channel names, sample interval, record length and period.

Sources of the expected values, per file:

* ``DS2072A-*.csv``, ``DS4024-A.csv``: the instrument's own setup dump beside the CSV
  (``Time Scale:`` line). One screen of 14 divisions is exported as sample numbers
  0..1399 (14 divisions and 1400 points per screen: from memory; the files' own
  numbering agrees), so the increment is 14 × scale / 1400.
* ``*_CHn.csv`` and ``DS1054Z-*.csv``: the binary file of the same stem in ``binary/``,
  whose header gives the seconds per point (read by the RigolWFM package 1.6.0, as the
  folder's README says; ``test_binary_headers_agree_with_the_table`` re-reads them when
  that package is installed). The DS1204B decoder spreads the record over
  ±32.768 ms, 0.012 % more than 8 µs per point: the tolerance below allows for it.
* The period: the calibrator square wave of about 1 kHz (the folder's README; a 1 kHz
  probe-adjust output is common practice, no source), within 1 %.
"""

from __future__ import annotations

import json
import re

import numpy as np
import pytest
from click.testing import CliRunner

from taumatch.capture import read
from taumatch.cli import main

# file, channels as the file names them, seconds per point (None: from the setup dump),
# samples, a calibrator square (period about 1 ms) or a single step
TABLE = [
    ("DHO824-ch1_CH1.csv", ("CH1",), 4e-7, 10000, True),
    ("DS1000E-A_CH2.csv", ("CH2",), 1e-5, 8192, True),
    ("DS1000E-B_CH2.csv", ("CH2",), 1e-6, 8192, True),
    ("DS1054Z-ch1SquareCH2Uart.csv", ("CH1", "CH2"), 4e-8, 60000, True),
    ("DS1204B-A_CH1.csv", ("CH1",), 8e-6, 8192, True),
    ("DS1204B-A_CH3.csv", ("CH3",), 8e-6, 8192, True),
    ("DS2072A-1.csv", ("CH1", "CH2"), None, 1400, True),
    ("DS2072A-2.csv", ("CH1", "CH2"), None, 1400, True),
    ("DS2072A-3.csv", ("CH1", "CH2"), None, 1400, True),
    ("DS2072A-5.csv", ("CH1", "CH2"), None, 1400, False),
    ("DS2072A-6.csv", ("CH1",), None, 1400, True),
    ("DS2072A-7.csv", ("CH2",), None, 1400, True),
    ("DS4024-A.csv", ("CH1", "CH2"), None, 1356, True),
    ("LeCroy-trace3_CH1.csv", ("CH1",), 1e-9, 5002, False),
    ("LeCroy-trace4_CH2.csv", ("CH2",), 1e-9, 5002, False),
    ("MSO5000-A_CH1.csv", ("CH1",), 5e-6, 1000, True),
    ("MSO5000-A_CH4.csv", ("CH4",), 5e-6, 1000, True),
]
DT_RTOL = 2e-4  # the DS1204B decoder's 0.012 % (see above); every other file is exact


def _from_setup_dump(path) -> float:
    """Seconds per point from the dump's ``Time Scale:`` line: 14 divisions in 1400 points."""
    m = re.search(r"^Time Scale:\s*([0-9.eE+-]+)\s*s", path.read_text(), re.MULTILINE)
    assert m, f"{path.name}: no 'Time Scale:' line"
    return 14 * float(m.group(1)) / 1400


def test_the_table_covers_the_folder(real_captures):
    assert sorted(p.name for p in real_captures.glob("*.csv")) == sorted(r[0] for r in TABLE)


@pytest.mark.parametrize("name, channels, dt, n, square", TABLE, ids=[r[0] for r in TABLE])
def test_read_as_typed(real_captures, name, channels, dt, n, square):
    path = real_captures / name
    if dt is None:
        dt = _from_setup_dump(path.with_suffix(".txt"))
    cap = read(path)
    assert cap.names == channels
    assert len(cap) == n
    assert cap.sample_interval == pytest.approx(dt, rel=DT_RTOL)
    assert cap.duration == pytest.approx((n - 1) * dt, rel=DT_RTOL)
    assert all(u == "V" for u in cap.units.values())
    steps = np.diff(cap.time)
    assert steps.min() > 0.99 * dt and steps.max() < 1.01 * dt  # uniform, in seconds


@pytest.mark.parametrize("name", [r[0] for r in TABLE if r[4]])
def test_measure_as_typed_gives_the_calibrator_period(real_captures, name):
    """``taumatch measure FILE --json`` with no options: a period of about 1 ms."""
    result = CliRunner().invoke(main, ["measure", str(real_captures / name), "--json"])
    assert result.exit_code == 0, result.output
    out = json.loads(result.stdout)
    assert out["period"] == pytest.approx(1e-3, rel=0.01)


@pytest.mark.parametrize("typed", ["CH2", "ch2", "2"])
def test_channel_as_typed(real_captures, typed):
    """``--channel CH2`` and ``--channel 2`` both name the header's CH2."""
    path = str(real_captures / "DS2072A-1.csv")
    assert read(path, typed).names == ("CH2",)
    result = CliRunner().invoke(main, ["measure", path, "--channel", typed, "--json"])
    assert result.exit_code == 0, result.output
    assert json.loads(result.stdout)["channel"] == "CH2"
