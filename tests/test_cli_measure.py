"""``taumatch measure`` through click's CliRunner against taumatch.cli.main.

The capture files are the invented ones in tests/data/captures (see the README there).
Expected figures: first-order edges, τ = 5 µs, so 10–90 % = ln 9·τ = 10.99 µs (own
derivation, shared/CHECKS.md); period 200 µs.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from click.testing import CliRunner

from taumatch.cli import main

DATA = Path(__file__).parent / "data" / "captures"
TAU = 5e-6


def run(*args):
    return CliRunner().invoke(main, ["measure", *map(str, args)])


def test_text_output_has_engineering_units():
    r = run(DATA / "basic.csv")
    assert r.exit_code == 0, r.output
    assert "µs" in r.output and "kHz" in r.output
    assert "10-90 %" in r.output


def test_json_keys_and_values():
    r = run(DATA / "basic.csv", "--json")
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    for key in ("rise_time", "fall_time", "overshoot", "undershoot", "high", "low",
                "amplitude", "period", "frequency", "settling_time", "edges",
                "periods_averaged", "noise_rms", "clipped", "warnings"):
        assert key in d, key
    # 1 µs sampling of a 5 µs edge: linear interpolation within 1 % (own estimate)
    assert d["rise_time"] == pytest.approx(math.log(9) * TAU, rel=0.01)
    assert d["fall_time"] == pytest.approx(math.log(9) * TAU, rel=0.01)
    assert d["period"] == pytest.approx(200e-6, rel=1e-6)
    assert d["frequency"] == pytest.approx(5e3, rel=1e-6)
    assert d["periods_averaged"] == 2
    assert d["clipped"] is False
    assert d["overshoot"] == pytest.approx(0.0, abs=1e-3)


def test_channel_option_settle_band_levels_and_overrides(tmp_path):
    r = run(DATA / "two_channels.csv", "--channel", "probe", "--json", "--settle-band", "1%",
            "--levels", "mean")
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    assert d["channel"] == "Probe" and d["settle_band"] == pytest.approx(1.0)
    assert d["levels_method"] == "mean"
    r = run(DATA / "capture_1d.npy", "--sample-interval", "1u", "--json")
    assert r.exit_code == 0, r.output
    assert json.loads(r.output)["period"] == pytest.approx(200e-6, rel=1e-6)
    r = run(DATA / "decimal_comma.csv", "--delimiter", ";", "--decimal", ",", "--json")
    assert r.exit_code == 0, r.output
    r = run(DATA / "tabs.tsv", "--delimiter", "tab", "--time-column", "0", "--json")
    assert r.exit_code == 0, r.output


def test_plot_is_written(tmp_path):
    out = tmp_path / "step.png"
    r = run(DATA / "basic.csv", "--plot", out)
    assert r.exit_code == 0, r.output
    assert out.stat().st_size > 1000
    assert not list(tmp_path.glob(".step.png*"))  # no temporary file left behind


@pytest.mark.parametrize("args, pattern", [
    (["missing.csv"], "cannot open"),
    ([DATA / "bad_cell.csv"], "line 22"),
    ([DATA / "basic.csv", "--channel", "CH7"], "no channel named 'CH7'"),
    ([DATA / "no_step.csv"], "no channel with a step"),
    ([DATA / "basic.csv", "--settle-band", "60%"], "between 0.0001 % and 50 %"),
    ([DATA / "basic.csv", "--sample-interval", "-1u"], "positive"),
    ([DATA / "capture_1d.npy"], "sample-interval"),
    ([DATA / "empty.csv"], "empty"),
])
def test_bad_input_is_one_line_and_exit_2(args, pattern):
    r = CliRunner().invoke(main, ["measure", *map(str, args)])
    assert r.exit_code == 2, r.output
    assert pattern in r.output
    assert "Traceback" not in r.output
    err_lines = [ln for ln in r.output.strip().splitlines() if ln.strip()]
    assert len(err_lines) <= 3  # click usage errors print usage + one error line


def test_help_teaches():
    r = run("--help")
    assert r.exit_code == 0
    for word in ("IEEE Std 181", "--sample-interval", "Examples", "averaged", "decimal"):
        assert word in r.output
