"""CLI: bandwidth, trim, predict, netlist (CliRunner against taumatch.cli.main)."""

import json
import re

import pytest
from click.testing import CliRunner

from taumatch.chain.compensation import check_trim_dict
from taumatch.cli import main

SPEC = """
name = "cli test probe (invented)"
[source]
resistance = "50"
amplitude = "{amp}"
period = "1m"
[[part]]
kind = "lead"
length = "100 mm"
radius = "0.5 mm"
[[part]]
kind = "series"
r = "9M"
c = "10p"
adjust = "c"
min = "5p"
max = "30p"
[[part]]
kind = "input"
r = "1M"
c = "110p"
"""


@pytest.fixture
def spec(tmp_path):
    path = tmp_path / "chain.toml"
    path.write_text(SPEC.format(amp="1"), encoding="utf-8")
    return path


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def test_bandwidth_json_keys(spec, tmp_path):
    res = run("bandwidth", spec, "--json", "--plot", tmp_path / "bw.png")
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    for key in ("bandwidth", "rise_time", "dc_gain", "rise_time_bandwidth_product",
                "rss_rise_time", "line_sections"):
        assert key in out
    assert set(out["loading"]) >= {"r", "c"}
    assert set(out["ringing"]) >= {"frequency", "damping", "q"}
    assert out["dc_gain"] == pytest.approx(0.1 * 1e7 / (1e7 + 50), rel=1e-9)  # 50 ohm source
    assert out["loading"]["r"] == pytest.approx(10e6, rel=1e-6)
    assert (tmp_path / "bw.png").stat().st_size > 0
    assert "cautions" not in out


def test_trim_json(spec):
    res = run("trim", spec, "--json")
    assert res.exit_code == 0, res.output
    t = json.loads(res.output)
    check_trim_dict(t)  # the one trim schema (taumatch.chain.compensation)
    assert t["part"] == 2 and t["field"] == "c"
    assert t["required"] == pytest.approx(110e-12 / 9, rel=1e-9)  # R1 C1 = R2 C2
    assert t["in_range"] is True
    text = run("trim", spec)
    assert "under-compensated" in text.output


def test_predict_csv(spec, tmp_path):
    out = tmp_path / "wave.csv"
    res = run("predict", spec, "--input", "square", "--points", "300", "--csv", out, "--json")
    assert res.exit_code == 0, res.output
    rows = out.read_text().splitlines()
    assert rows[0] == "t_s,v_V" and len(rows) == 301
    data = json.loads(res.output)
    assert data["input"] == "square" and data["points"] == 300
    res = run("predict", spec, "--input", "sine:1k", "--trimmed", "--points", "50")
    assert res.exit_code == 0, res.output
    assert "after the trim" in res.output


def parse_deck(text):
    """Our own reader of the deck (SPICE card syntax): {card name: (kind, nodes, value)}."""
    cards = {}
    lines = text.splitlines()
    for line in lines[1:]:
        if not line or line[0] in "*.":
            continue
        f = line.split()
        kind = f[0][0].upper()
        if kind in "RCL":
            cards[f[0]] = (kind, f[1:3], float(f[3]))
        elif kind == "E":
            cards[f[0]] = (kind, f[1:5], float(f[5]))
        elif kind == "V":
            cards[f[0]] = (kind, f[1:3], line)
    return cards


def test_netlist_parses_back(tmp_path):
    """The deck holds every element with its value; cables written as pi sections."""
    path = tmp_path / "c.toml"
    path.write_text("""
[source]
resistance = "50"
amplitude = "2"
period = "1u"
rise_time = "10n"
[[part]]
kind = "series"
r = "9M"
c = "11p"
[[part]]
kind = "line"
length = "1"
r = "100"
l = "250n"
c = "100p"
[[part]]
kind = "input"
r = "1M"
c = "15p"
bandwidth = "100M"
""", encoding="utf-8")
    deck = tmp_path / "c.cir"
    res = run("netlist", path, "-o", deck, "--sections", "5", "--json")
    assert res.exit_code == 0, res.output
    text = deck.read_text()
    cards = parse_deck(text)
    kinds = [k for k, _, _ in cards.values()]
    # R: source, edge filter, tip, 5 line sections, input, front-end filter
    # C: edge filter, tip, 6 line nodes (pi: ends hold half), input, front-end filter
    # E: edge-filter buffers (2), front-end buffer (1)
    assert kinds.count("L") == 5
    assert kinds.count("R") == 1 + 1 + 1 + 5 + 1 + 1
    assert kinds.count("C") == 1 + 1 + 6 + 1 + 1
    assert kinds.count("E") == 3 and kinds.count("V") == 1
    assert cards["RP1R"][2] == 9e6 and cards["CP1C"][2] == pytest.approx(11e-12)
    assert cards["RP3R"][2] == 1e6 and cards["CP3C"][2] == pytest.approx(15e-12)
    ladder_l = [v for name, (k, _, v) in cards.items() if k == "L"]
    assert sum(ladder_l) == pytest.approx(250e-9)
    ladder_c = [v for name, (k, _, v) in cards.items() if name.startswith("CP2T")]
    assert sum(ladder_c) == pytest.approx(100e-12)
    assert sorted(ladder_c)[:2] == [pytest.approx(10e-12), pytest.approx(10e-12)]  # ends C/2
    assert re.search(r"PULSE\(0 2 0 \S+ \S+ \S+ 1e-06\)", cards["Vs"][2])
    assert re.search(r"^\.tran \S+ 2e-06$", text, re.MULTILINE) and re.search(r"^\.ac dec", text, re.MULTILINE)
    assert text.rstrip().endswith(".end")
    out = json.loads(res.output)
    assert out["line_sections"] == 5
    # the command prints the library's deck record: the 29 element cards counted above
    assert out["elements"] == len(cards) == 5 + 10 + 10 + 3 + 1
    from taumatch.chain import load
    from taumatch.chain.netlist import deck as make_deck

    d = make_deck(load(path), 5)
    assert d.text == text and {"output": str(deck), **d.to_dict()} == out
    assert d.summary() == "29 cards, cables as 5 pi sections"


def test_high_voltage_cautions(tmp_path):
    path = tmp_path / "hv.toml"
    path.write_text(SPEC.format(amp="1k"), encoding="utf-8")
    res = run("trim", path)
    assert res.exit_code == 0, res.output
    assert "IEC 61010-031" in res.output and "local codes" in res.output.lower()
    res = run("trim", path, "--json")
    assert any("earthed instrument" in c for c in json.loads(res.output)["cautions"])


@pytest.mark.parametrize(
    "args, pattern",
    [
        (["bandwidth", "missing.toml"], r"missing\.toml: cannot read"),
        (["trim", "{bad}"], r"bad\.toml: part 1 \(shunt\): c must be positive, got '-2p'"),
        (["predict", "{spec}", "--input", "ramp"], r"--input: must be step, square or sine"),
        (["predict", "{spec}", "--points", "1"], r"--points: must be at least 2"),
        (["netlist", "{spec}", "-o", "{tmp}/x.cir", "--sections", "0"], r"--sections"),
        (["bandwidth", "{spec}", "--overshoot", "150%"], r"--overshoot"),
    ],
)
def test_bad_input_exit_2_one_line(args, pattern, spec, tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text('[source]\nresistance = "50"\n[[part]]\nkind = "shunt"\nc = "-2p"\n'
                   '[[part]]\nkind = "input"\nr = "1M"\n', encoding="utf-8")
    args = [a.format(spec=spec, bad=bad, tmp=tmp_path) for a in args]
    res = CliRunner().invoke(main, args)
    assert res.exit_code == 2
    err = res.stderr if hasattr(res, "stderr") else res.output
    lines = [ln for ln in err.strip().splitlines() if ln]
    assert len(lines) == 1, err
    assert re.search(pattern, lines[0]), lines[0]
    assert "Traceback" not in err


def test_outputs_never_overwrite_the_spec_and_bad_kinds_are_one_line(tmp_path):
    """Regression: -o/--csv naming the spec, a list as kind, an unwritable folder: exit 2."""
    import shutil
    from pathlib import Path

    from click.testing import CliRunner

    from taumatch.cli import main

    spec = tmp_path / "probe.toml"
    shutil.copy(Path(__file__).resolve().parents[1] / "examples" / "bench-probe.toml", spec)
    before = spec.read_bytes()
    r = CliRunner().invoke(main, ["netlist", str(spec), "-o", str(spec)])
    assert r.exit_code == 2 and spec.read_bytes() == before
    r = CliRunner().invoke(main, ["predict", str(spec), "--csv", str(tmp_path / "no" / "x.csv")])
    assert r.exit_code == 2 and not (tmp_path / "no").exists()
    bad = tmp_path / "bad.toml"
    bad.write_text('[source]\nresistance = "50"\n[[part]]\nkind = ["series"]\n')
    r = CliRunner().invoke(main, ["bandwidth", str(bad)])
    assert r.exit_code == 2 and "kind must be one of" in r.output
