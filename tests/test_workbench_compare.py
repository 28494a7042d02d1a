"""``taumatch compare``: captures of known trims, before and after (textbook divider captures,
divider_synth; the compensation condition R1·C1 = R2·C2 of Millman & Taub / Boylestad).

With R1/R2 = 9 and C1 turned from C1b to C1a, the shunt-arm equivalent of the turn is
9·(C1b − C1a) and the prediction 9·C1b − C2, so the fraction carried out is
(C1b − C1a)/(C1b − C2/9) (own derivation from that condition).
"""

import json

import pytest
from click.testing import CliRunner
from divider_synth import c1_for_error
from workbench_files import write_capture

from taumatch.cli import main
from taumatch.workbench import DiagnosisSettings, compare, diagnose_file

S = DiagnosisSettings(tip_r=9e6, shunt_r=1e6)


@pytest.fixture(scope="module")
def diagnoses(tmp_path_factory):
    d = tmp_path_factory.mktemp("cmp")
    out = {}
    for name, e, seed in (("b", 0.05, 51), ("short", 0.02, 52), ("far", -0.03, 53),
                          ("same", 0.05, 54), ("wrong", 0.08, 55), ("flat", 0.004, 56)):
        out[name] = diagnose_file(write_capture(d / f"{name}.csv", e, seed=seed, periods=4), S)[1]
    out["folder"] = d
    return out


def truth_fraction(e_before, e_after):
    cb, ca = c1_for_error(e_before), c1_for_error(e_after)
    return (cb - ca) / (cb - 100e-12 / 9)


@pytest.mark.parametrize("after, outcome, e_after", [("short", "short", 0.02),
                                                     ("far", "too far", -0.03)])
def test_fraction_of_the_predicted_change(diagnoses, after, outcome, e_after):
    c = compare(diagnoses["b"], diagnoses[after])
    assert c.outcome == outcome
    # textbook truth; 0.1 absolute covers the diagnosis's scatter on 4-period 8-bit captures
    assert c.fraction == pytest.approx(truth_fraction(0.05, e_after), abs=0.1)
    assert 0 < c.fraction_stderr < 0.1


def test_no_change_wrong_way_and_nothing_predicted(diagnoses):
    assert compare(diagnoses["b"], diagnoses["same"]).outcome == "no measurable change"
    assert compare(diagnoses["b"], diagnoses["wrong"]).outcome == "wrong way"
    c = compare(diagnoses["flat"], diagnoses["b"])
    assert c.outcome == "no prediction" and c.fraction is None
    assert "already compensated" in c.describe()


def test_compare_command(diagnoses, tmp_path):
    folder = diagnoses["folder"]
    png = tmp_path / "both.png"
    r = CliRunner().invoke(main, ["compare", str(folder / "b.csv"), str(folder / "short.csv"),
                                  "--tip-r", "9M", "--json", "--plot", str(png)])
    assert r.exit_code == 0, r.output
    out = json.loads(r.stdout)
    assert out["outcome"] == "short"
    assert out["before"]["gain_error"] == pytest.approx(0.05, abs=0.005)
    assert out["after"]["gain_error"] == pytest.approx(0.02, abs=0.005)
    assert out["applied_change"] == pytest.approx(out["predicted_change"]
                                                  - out["after"]["shunt_change"], rel=1e-12)
    assert png.stat().st_size > 5000
    text = CliRunner().invoke(main, ["compare", str(folder / "b.csv"), str(folder / "far.csv")])
    assert "went the predicted way but too far" in text.stdout


def test_compare_plot_axes(diagnoses):
    """Both periods and the prediction on one axes, the leading corner beside it."""
    _fig, (ax, corner) = compare(diagnoses["b"], diagnoses["short"],
                                 names=("b.csv", "short.csv")).plot()
    labels = [ln.get_label() for ln in ax.get_lines()]
    assert len(labels) == 3 and len(corner.get_lines()) == 3
    assert labels[0].startswith("b.csv:") and labels[1].startswith("short.csv:")
    assert "predicted after its trim" in labels[2]
    assert ax.xaxis.get_major_formatter().unit == "s"
    assert ax.yaxis.get_major_formatter().unit == "V"
    assert "not far enough yet" in ax.get_title(loc="left")
    lo, hi = corner.get_xlim()
    assert lo < 0 < hi < 0.5e-3


def test_compare_refuses_an_unreadable_capture(diagnoses, tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("nothing here\n")
    r = CliRunner().invoke(main, ["compare", str(diagnoses["folder"] / "b.csv"), str(bad)])
    assert r.exit_code == 2 and "bad.csv" in r.stderr and r.stderr.count("\n") == 1
