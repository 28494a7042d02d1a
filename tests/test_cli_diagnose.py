"""``taumatch diagnose``, ``correct`` and ``demo`` from the outside."""

import hashlib
import json
import subprocess
import sys

import numpy as np
import pytest
from click.testing import CliRunner

from divider_synth import c1_for_error, capture
from taumatch.cli import main


@pytest.fixture(scope="module")
def capture_file(tmp_path_factory):
    t, v = capture(c1_for_error(0.2), seed=21)
    path = tmp_path_factory.mktemp("cap") / "probe.csv"
    with open(path, "w") as fh:
        fh.write("# invented test capture\nTime (s),CH1 (V)\n")
        np.savetxt(fh, np.column_stack([t, v]), delimiter=",", fmt="%.9g")
    return path


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
    assert out["trim"]["shunt_change"] == pytest.approx(truth, abs=1e-12)
    assert any("10:1 probe" in a for a in out["assumptions"])
    for key in ("metrics", "fit", "warnings", "estimates"):
        assert key in out


def test_diagnose_text_and_plot(capture_file, tmp_path):
    png = tmp_path / "fit.png"
    r = run("diagnose", capture_file, "--tip-r", "9M", "--input-r", "1M", "--tolerance", "0.5%",
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
                          capture_output=True, text=True)
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
    assert d["trim"]["shunt_change"] == pytest.approx(8.5e-12, abs=0.3e-12)
    assert d["trim"]["in_range"] is True


def test_tolerance_needs_a_clear_unit(capture_file):
    assert run("diagnose", capture_file, "--tolerance", "2").exit_code == 2
    assert run("diagnose", capture_file, "--tolerance", "-1%").exit_code == 2
    r = run("diagnose", capture_file, "--tolerance", "0.05", "--json")
    assert r.exit_code == 0 and json.loads(r.output)["tolerance"] == 0.05


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
