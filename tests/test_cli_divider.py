"""``taumatch divider`` through click's CliRunner."""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner

from taumatch.cli import main

BASE = ["divider", "--ratio", "100", "--input-r", "10M", "--instrument", "1M||14p",
        "--cable-c", "90p"]


def _run(args):
    return CliRunner().invoke(main, args, catch_exceptions=False)


def test_json_keys_low_voltage():
    res = _run(BASE + ["--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    for key in ("top", "bottom", "trimmer", "ratio", "ratio_error", "yield", "response_time",
                "cautions", "warnings"):
        assert key in out
    assert set(out["trimmer"]) >= {"min", "max", "arm"} and out["trimmer"]["arm"] == "bottom"
    assert out["top"]["resistors"] and out["top"]["capacitance"] > 0
    assert out["cautions"] == [] and "per_resistor" not in out
    r1, r2 = out["top"]["resistance"], out["bottom"]["resistance"]
    # hf = dc after the trim (Millman & Taub: R1·C1 = R2·C2)
    assert r1 * out["top"]["capacitance"] == pytest.approx(r2 * out["bottom"]["capacitance"],
                                                             rel=1e-9)
    assert (r1 + r2) / r2 == pytest.approx(out["ratio"], rel=1e-12)


def test_high_voltage_run_with_monte_carlo(tmp_path):
    plot = tmp_path / "resp.png"
    res = _run(BASE + ["--voltage", "5k", "--stray-c", "2p", "--sections", "10",
                       "--monte-carlo", "3000", "--seed", "1", "--json", "--plot", str(plot)])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert plot.stat().st_size > 0
    assert out["per_resistor"]["voltage"] > 0 and out["per_resistor"]["power"] > 0
    assert out["per_resistor"]["power"] == pytest.approx(
        out["per_resistor"]["voltage"] ** 2 / out["top"]["resistors"][0], rel=1e-12)
    assert out["cautions"] and any("IEC 61010-031" in c for c in out["cautions"])
    assert 0 <= out["yield"] <= 1 and out["monte_carlo"]["draws"] == 3000
    assert out["response_time"] is not None
    assert out["response_time_ungraded"] == pytest.approx(out["top"]["resistance"] * 20e-12 / 6)


def test_text_output_and_top_arm():
    res = _run(["divider", "--ratio", "10", "--instrument", "1M||15p", "--cable-c", "90p",
                "--arm", "top", "--monte-carlo", "2000", "--seed", "3"])
    assert res.exit_code == 0, res.output
    assert "trimmer (top arm)" in res.output and "Monte Carlo, 2000 draws" in res.output


def test_monte_carlo_is_reproducible_with_seed():
    a = json.loads(_run(BASE + ["--monte-carlo", "2000", "--seed", "9", "--json"]).output)
    b = json.loads(_run(BASE + ["--monte-carlo", "2000", "--seed", "9", "--json"]).output)
    assert a["monte_carlo"] == b["monte_carlo"]


@pytest.mark.parametrize("extra,word", [
    (["--cable-c", "9x"], "--cable-c"),
    (["--arm", "middle"], "--arm"),
    (["--series", "E7"], "series"),
    (["--tolerance-r", "150%"], "--tolerance-r"),
    (["--input-r", "200M"], "input_resistance"),
    (["--yield", "0"], "--yield"),
    (["--instrument", "1M,14p"], "instrument"),
    (["--sections", "10"], "--sections"),
    (["--monte-carlo", "-5"], "--monte-carlo"),
])
def test_bad_input_is_one_line_exit_2(extra, word):
    res = CliRunner().invoke(main, BASE + extra)
    assert res.exit_code == 2
    lines = [ln for ln in res.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and word in lines[0] and "Traceback" not in res.output


def _example_commands():
    import shlex
    from pathlib import Path

    text = (Path(__file__).resolve().parents[1] / "examples" / "divider_examples.sh").read_text()
    text = text.replace("\\\n", " ")
    return [shlex.split(line)[1:] for line in text.splitlines()
            if line.startswith("taumatch divider")]


def test_examples_run():
    """Every command in examples/divider_examples.sh runs (invented scenario)."""
    cmds = _example_commands()
    assert len(cmds) >= 4
    for args in cmds:
        res = _run(args)
        assert res.exit_code == 0, (args, res.output)


def test_geometry_options():
    res = _run(BASE + ["--column-height", "0.5", "--column-diameter", "40 mm", "--sections", "5",
                       "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert out["earth_capacitance"] > 0 and out["sections"] == 5
    bad = CliRunner().invoke(main, BASE + ["--column-height", "0.5"])
    assert bad.exit_code == 2 and "--column-diameter" in bad.output


def test_chosen_trimmer_yield():
    """A trimmer narrower than the worst case yields less than 1; the JSON says how much."""
    res = _run(BASE + ["--monte-carlo", "5000", "--seed", "2", "--trimmer", "100p,140p",
                       "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert out["monte_carlo"]["trimmer"] == {"min": 100e-12, "max": 140e-12}
    assert 0 < out["yield"] < 1
    bad = CliRunner().invoke(main, BASE + ["--trimmer", "100p"])
    assert bad.exit_code == 2 and "--trimmer" in bad.output


def test_too_small_top_capacitance_and_bad_plot_suffix_exit_2(tmp_path):
    from click.testing import CliRunner

    from taumatch.cli import main

    r = CliRunner().invoke(main, ["divider", "--ratio", "10", "--top-c", "1p"])
    assert r.exit_code == 2 and "too small" in r.output
    r = CliRunner().invoke(main, ["divider", "--ratio", "10", "--plot", str(tmp_path / "x.xyz")])
    assert r.exit_code == 2 and "cannot draw" in r.output
