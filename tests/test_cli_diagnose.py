"""``taumatch diagnose``, ``correct`` and ``demo`` from the outside."""

import hashlib
import json
import subprocess
import sys

import numpy as np
import pytest
from click.testing import CliRunner
from divider_synth import c1_for_error, capture, write_csv

from taumatch.cli import main


@pytest.fixture(scope="module")
def capture_file(tmp_path_factory):
    t, v = capture(c1_for_error(0.2), seed=21)
    return write_csv(tmp_path_factory.mktemp("cap") / "probe.csv", t, v)


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_diagnose_json(capture_file):
    r = run("diagnose", capture_file, "--json")
    assert r.exit_code == 0, r.output
    out = json.loads(r.output)
    assert out["verdict"] == "over-compensated"
    assert out["hf_dc_error"]["value"] == pytest.approx(0.2, abs=0.01)
    # truth: R1·C1/R2 − C2 with C2 = 100 pF (divider_synth defaults)
    truth = 9 * c1_for_error(0.2) - 100e-12
    assert out["trim"]["arm"] == "shunt" and out["trim"]["part"] is None
    assert out["trim"]["change"] == pytest.approx(truth, abs=2 * out["trim"]["change_stderr"])
    assert any("10:1 probe" in a for a in out["assumptions"])
    for key in ("metrics", "fit", "warnings", "estimates"):
        assert key in out


def test_diagnose_text_and_plot(capture_file, tmp_path):
    png = tmp_path / "fit.png"
    r = run("diagnose", capture_file, "--tip-r", "9M", "--shunt-r", "1M", "--accept", "0.5%",
            "--plot", png)
    assert r.exit_code == 0, r.output
    assert "over-compensated" in r.output and "add" in r.output
    assert png.stat().st_size > 5000


def test_correct_keeps_input_and_writes_header(capture_file, tmp_path):
    before = hashlib.sha256(capture_file.read_bytes()).hexdigest()
    out = tmp_path / "fixed.csv"
    r = run("correct", capture_file, "-o", out)
    assert r.exit_code == 0, r.output
    assert hashlib.sha256(capture_file.read_bytes()).hexdigest() == before
    text = out.read_text()
    assert text.startswith("# corrected by taumatch")
    again = run("diagnose", out, "--channel", "CH1 corrected", "--json")
    assert again.exit_code == 0, again.output
    assert json.loads(again.output)["verdict"] == "compensated"


def test_bad_inputs_exit_2(tmp_path):
    assert run("diagnose", tmp_path / "missing.csv").exit_code == 2
    bad = tmp_path / "bad.csv"
    bad.write_text("time,v\n0,1\n1,abc\n")
    proc = subprocess.run([sys.executable, "-m", "taumatch", "diagnose", str(bad)],
                          check=False, capture_output=True, text=True)
    assert proc.returncode == 2 and "Traceback" not in proc.stderr
    assert proc.stderr.count("\n") == 1


def test_refusal_exit_1(tmp_path):
    t, v = capture(c1_for_error(0.3), bits=0, seed=22)
    path = tmp_path / "clipped.csv"
    np.savetxt(path, np.column_stack([t, np.minimum(v, 0.56)]), delimiter=",", header="t,v",
               comments="")
    r = run("diagnose", path)
    assert r.exit_code == 1
    forced = run("diagnose", path, "--force")
    assert forced.exit_code == 0 and "WARNING" in forced.output


def test_demo_writes_everything(tmp_path):
    r = run("demo", "--out", tmp_path / "demo")
    assert r.exit_code == 0, r.output
    assert "INVENTED SCENARIO" in r.output
    for name in ("summary.txt", "diagnosis.json", "diagnosis.png", "measure.png", "corrected.csv"):
        assert (tmp_path / "demo" / name).stat().st_size > 100
    d = json.loads((tmp_path / "demo" / "diagnosis.json").read_text())
    assert d["verdict"] == "over-compensated"
    # the demo's truth (data/make_demo.py): C2 = 95 pF, R1·C1/R2 = 103.5 pF → add 8.5 pF
    assert d["arm_trims"]["shunt"]["change"] == pytest.approx(8.5e-12, abs=0.3e-12)
    assert d["trim"]["part"] == 4 and d["trim"]["in_range"] is True


def test_accept_needs_a_clear_unit(capture_file):
    assert run("diagnose", capture_file, "--accept", "2").exit_code == 2
    assert run("diagnose", capture_file, "--accept", "-1%").exit_code == 2
    r = run("diagnose", capture_file, "--accept", "0.05", "--json")
    assert r.exit_code == 0 and json.loads(r.output)["accept"] == 0.05


def test_old_option_names_are_gone(capture_file):
    """One vocabulary (issue 11 item 6): --input-r became --shunt-r and --tolerance (the
    acceptance band) became --accept; the old names are refused, not kept as aliases."""
    for old, value in (("--input-r", "1M"), ("--tolerance", "1%")):
        r = run("diagnose", capture_file, old, value)
        assert r.exit_code == 2 and "No such option" in r.output


def test_correct_refuses_to_overwrite_its_input(capture_file):
    before = capture_file.read_bytes()
    r = run("correct", capture_file, "-o", capture_file)
    assert r.exit_code == 2
    assert capture_file.read_bytes() == before


def test_outputs_get_the_usual_file_mode(capture_file, tmp_path):
    """Atomic outputs are not left with the temporary file's private mode (umask applies)."""
    import os

    out = tmp_path / "fixed.csv"
    assert run("correct", capture_file, "-o", out).exit_code == 0
    mask = os.umask(0)
    os.umask(mask)
    assert out.stat().st_mode & 0o777 == 0o666 & ~mask


def _hv_capture(tmp_path, amplitude):
    """The invented 1000:1 divider of examples/hv-divider.toml (99.9 MΩ ∥ 1 pF over
    111.1 kΩ ∥ 1 MΩ with 950 + 100 + 15 pF) on a 10 kHz square wave of ``amplitude`` volts,
    by the textbook formulas (divider_synth)."""
    r2 = 1 / (1 / 111.1e3 + 1 / 1e6)
    t, v = capture(1e-12, r1=99.9e6, r2=r2, c2=1065e-12, amplitude=amplitude, period=1e-4,
                   dt=5e-8, periods=10, noise=2e-3, bits=0, seed=4)
    path = tmp_path / f"hv{amplitude:g}.csv"
    np.savetxt(path, np.column_stack([t, v]), delimiter=",", header="t,v", comments="")
    return path


def test_high_voltage_chain_prints_the_cautions(tmp_path):
    """REVIEW 2.1 / issue 11 item 6: `diagnose --chain examples/hv-divider.toml` concerns a
    1 kV source, so the usual cautions print (as `trim` on the same spec prints them), in
    text and JSON; the threshold is safety.py's (30 V rms / 60 V dc, IEC 61010 family)."""
    from pathlib import Path

    spec = Path(__file__).parent.parent / "examples" / "hv-divider.toml"
    cap = _hv_capture(tmp_path, 1000.0)
    text = run("diagnose", cap, "--chain", spec)
    assert text.exit_code == 0, text.output
    assert "caution: HIGH VOLTAGE" in text.output and "IEC 61010-031" in text.output
    trim = run("trim", spec)
    assert "HIGH VOLTAGE" in trim.output
    out = json.loads(run("diagnose", cap, "--chain", spec, "--json").output)
    assert out["cautions"] and out["cautions"][0].startswith("HIGH VOLTAGE")


def test_high_voltage_source_seen_through_a_divider_without_a_chain(tmp_path):
    """Without a chain the fitted source step is the displayed swing over the divider's DC
    gain: a 0.4 V swing through the 1000:1 divider given by --tip-r/--shunt-r is a 400 V
    source and gets the cautions; the same divider on a 40 V square wave (below the 42.4 V
    peak of 30 V rms) gets none."""
    args = ["--tip-r", "99.9M", "--shunt-r", str(1 / (1 / 111.1e3 + 1 / 1e6)), "--shunt-c",
            "1065p"]
    high = run("diagnose", _hv_capture(tmp_path, 400.0), *args)
    assert high.exit_code == 0, high.output
    assert "caution: HIGH VOLTAGE: 399" in high.output or "caution: HIGH VOLTAGE: 400" in high.output
    low = run("diagnose", _hv_capture(tmp_path, 40.0), *args)
    assert low.exit_code == 0, low.output
    assert "caution:" not in low.output
