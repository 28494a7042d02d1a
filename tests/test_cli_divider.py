"""``taumatch divider`` through click's CliRunner, and its chain spec read back by the chain
commands."""

from __future__ import annotations

import json

import pytest
from click.testing import CliRunner

from taumatch.cli import main

BASE = ["divider", "--ratio", "100", "--input-resistance", "10M", "--instrument", "1M||14p",
        "--cable-c", "90p"]


def _run(args):
    return CliRunner().invoke(main, args, catch_exceptions=False)


def test_json_keys_low_voltage():
    res = _run(BASE + ["--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    for key in ("tip", "shunt", "trimmer", "ratio", "ratio_error", "yield", "hf_dc_error_worst",
                "input_capacitance", "cautions", "warnings", "voltage", "column"):
        assert key in out
    assert set(out["trimmer"]) >= {"min", "max", "arm"} and out["trimmer"]["arm"] == "shunt"
    assert out["tip"]["resistors"] and out["tip"]["capacitance"] > 0
    assert out["cautions"] == [] and out["voltage"] is None and out["column"] is None
    r1, r2 = out["tip"]["resistance"], out["shunt"]["resistance"]
    # hf = dc after the trim (Millman & Taub: R1·C1 = R2·C2)
    assert r1 * out["tip"]["capacitance"] == pytest.approx(r2 * out["shunt"]["capacitance"],
                                                           rel=1e-9)
    assert (r1 + r2) / r2 == pytest.approx(out["ratio"], rel=1e-12)


def test_high_voltage_run_with_monte_carlo(tmp_path):
    plot = tmp_path / "resp.png"
    res = _run(BASE + ["--voltage", "5k", "--stray-c", "2p", "--sections", "10",
                       "--monte-carlo", "3000", "--seed", "1", "--json", "--plot", str(plot)])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert plot.stat().st_size > 0
    per = out["voltage"]["per_resistor"]
    assert per["voltage"] > 0 and per["power"] > 0
    assert per["power"] == pytest.approx(per["voltage"] ** 2 / out["tip"]["resistors"][0],
                                         rel=1e-12)
    assert out["cautions"] and any("IEC 61010-031" in c for c in out["cautions"])
    assert 0 <= out["yield"] <= 1 and out["monte_carlo"]["draws"] == 3000
    col = out["column"]
    assert col["response_time"] is not None and col["sections"] == 10
    # ungraded column: T = R·Ce/6 (Kuffel, Zaengl & Kuffel, from memory; CHECKS.md)
    assert col["response_time_ungraded"] == pytest.approx(out["tip"]["resistance"] * 20e-12 / 6)


def test_text_output_and_tip_arm():
    res = _run(["divider", "--ratio", "10", "--instrument", "1M||15p", "--cable-c", "90p",
                "--arm", "tip", "--monte-carlo", "2000", "--seed", "3"])
    assert res.exit_code == 0, res.output
    assert "trimmer (tip arm)" in res.output and "Monte Carlo, 2000 draws" in res.output


def test_monte_carlo_is_reproducible_with_seed():
    a = json.loads(_run(BASE + ["--monte-carlo", "2000", "--seed", "9", "--json"]).output)
    b = json.loads(_run(BASE + ["--monte-carlo", "2000", "--seed", "9", "--json"]).output)
    assert a["monte_carlo"] == b["monte_carlo"]


@pytest.mark.parametrize("extra,word", [
    (["--cable-c", "9x"], "--cable-c"),
    (["--arm", "middle"], "--arm"),
    (["--arm", "bottom"], "--arm: must be one of shunt, tip"),
    (["--series", "E7"], "series"),
    (["--tolerance-r", "150%"], "--tolerance-r: must be at least 0 and at most 0.5"),
    (["--input-resistance", "200M"], "input_resistance"),
    (["--input-resistance", "0"], "--input-resistance: must be at least 1 Ω"),
    (["--yield", "0"], "--yield: must be above 0"),
    (["--instrument", "1M,14p"], "instrument"),
    (["--sections", "10"], "--sections"),
    (["--sections", "2.5", "--stray-c", "1p"], "'2.5' is not a valid integer"),
    (["--sections", "0", "--stray-c", "1p"], "--sections: must be at least 1"),
    (["--monte-carlo", "-5"], "--monte-carlo: must be at least 0 and at most 1000000"),
    (["--monte-carlo", "10000000"], "at most 1000000"),
    (["--monte-carlo", "1000", "--seed", "-1"], "--seed: must be at least 0"),
    (["--voltage", "1e9"], "--voltage: must be above 0 V and at most 10 MV"),
    (["--voltage", "1M", "--limiting-voltage", "1"], "more than 10000"),
    (["--ratio", "1e9"], "--ratio"),
    (["--stray-c", "2u"], "--stray-c: must be at least 0 F and at most 1 nF"),
    (["--tip-c", "1p"], "too small"),
    (["--spec", "out.txt"], "--spec out.txt: a chain spec is TOML"),
    (["--spec", "no/such/folder/x.toml"], "does not exist"),
    (["--spec", "x.toml", "--stray-c", "1p", "--sections", "101"], "at most 100 sections"),
])
def test_bad_input_is_one_line_exit_2(extra, word):
    """Every numeric option has a physical range stated in its one-line error (the old
    ``--seed -1`` traceback included)."""
    res = CliRunner().invoke(main, BASE + extra)
    assert res.exit_code == 2, res.output
    lines = [ln for ln in res.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and word in lines[0] and "Traceback" not in res.output


def test_the_old_input_r_is_gone():
    """``--input-r`` meant R1 + R2 here and R2 in ``diagnose``: it is no option of divider
    any more (no silent alias)."""
    res = CliRunner().invoke(main, ["divider", "--ratio", "100", "--input-r", "10M"])
    assert res.exit_code == 2 and "--input-resistance" in res.output


def _example_commands():
    import shlex
    from pathlib import Path

    text = (Path(__file__).resolve().parents[1] / "examples" / "divider_examples.sh").read_text()
    text = text.replace("\\\n", " ")
    return [shlex.split(line)[1:] for line in text.splitlines()
            if line.startswith("taumatch ")]


def test_examples_run(tmp_path, monkeypatch):
    """Every command in examples/divider_examples.sh runs (invented scenario), in order, in
    a scratch folder (one writes a chain spec the next ones read)."""
    monkeypatch.chdir(tmp_path)
    cmds = _example_commands()
    assert len(cmds) >= 6
    for args in cmds:
        res = _run(args)
        assert res.exit_code == 0, (args, res.output)


def test_geometry_options():
    res = _run(BASE + ["--column-height", "0.5", "--column-diameter", "40 mm", "--sections", "5",
                       "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert out["column"]["earth_capacitance"] > 0 and out["column"]["sections"] == 5
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

    r = CliRunner().invoke(main, ["divider", "--ratio", "10", "--tip-c", "1p"])
    assert r.exit_code == 2 and "too small" in r.output
    r = CliRunner().invoke(main, ["divider", "--ratio", "10", "--plot", str(tmp_path / "x.xyz")])
    assert r.exit_code == 2 and "cannot draw" in r.output


def test_spec_round_trip_from_the_command_line(tmp_path):
    """design → spec → bandwidth / trim / predict / netlist: the chain commands read the
    written spec and agree with the design's own figures: the network trim finds the nominal
    trimmer, the DC gain is 1/ratio, the circuit sees R1 + R2 ∥ C1 C2/(C1 + C2) (Millman &
    Taub's compensated divider: flat, so the step neither over- nor undershoots)."""
    spec = tmp_path / "divider.toml"
    design = json.loads(_run(BASE + ["--spec", str(spec), "--json"]).output)
    assert design["spec"] == str(spec) and spec.exists()
    trim = json.loads(_run(["trim", str(spec), "--json"]).output)
    assert trim["required"] == pytest.approx(design["trimmer"]["nominal"], rel=1e-9)
    assert trim["state"] == "compensated" and abs(trim["hf_dc_error"]) < 1e-9
    assert (trim["min"], trim["max"]) == (design["trimmer"]["min"], design["trimmer"]["max"])
    bw = json.loads(_run(["bandwidth", str(spec), "--json"]).output)
    assert bw["dc_gain"] == pytest.approx(1 / design["ratio"], rel=1e-9)
    assert bw["loading"]["r"] == pytest.approx(design["input_resistance"], rel=1e-9)
    assert bw["loading"]["c"] == pytest.approx(design["input_capacitance"], rel=1e-6)
    pred = json.loads(_run(["predict", str(spec), "--points", "200", "--json"]).output)
    assert pred["final_value"] == pytest.approx(1 / design["ratio"], rel=1e-9)
    assert abs(pred["overshoot"]) < 1e-6
    deck = tmp_path / "divider.cir"
    assert _run(["netlist", str(spec), "-o", str(deck)]).exit_code == 0
    assert "P1R" in deck.read_text()


def test_spec_round_trip_of_a_column(tmp_path):
    """A 5 kV column written as its ten sections: trim finds the ladder's trimmer the design
    reports (to 1e-4: the network compares at a finite frequency), within 1 % of the
    distributed column's; the chain commands print the high-voltage cautions."""
    spec = tmp_path / "column.toml"
    args = BASE + ["--voltage", "5k", "--limiting-voltage", "1.6k", "--stray-c", "2p",
                   "--sections", "10", "--spec", str(spec), "--json"]
    design = json.loads(_run(args).output)
    trim = json.loads(_run(["trim", str(spec), "--json"]).output)
    assert trim["required"] == pytest.approx(design["column"]["trimmer_ladder"], rel=1e-4)
    assert trim["required"] == pytest.approx(design["trimmer"]["nominal"], rel=1e-2)
    assert any("HIGH VOLTAGE" in c for c in trim["cautions"])
    bw = json.loads(_run(["bandwidth", str(spec), "--json"]).output)
    assert bw["dc_gain"] == pytest.approx(1 / design["ratio"], rel=1e-9)
    assert bw["loading"]["r"] == pytest.approx(design["input_resistance"], rel=1e-9)


def test_random_option_values_give_an_answer_or_one_line():
    """Random values for every numeric option, from 5e-324 to 1.8e308, negative, inf, nan
    and text (hypothesis, seeded): exit 0, or 2 with one line naming the option; never a
    traceback or a warning (issue 12's divider options)."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import strategies as st

    options = ["--ratio", "--input-resistance", "--cable-c", "--tolerance-r", "--tolerance-c",
               "--voltage", "--limiting-voltage", "--power-rating", "--margin", "--stray-c",
               "--sections", "--grading-limit", "--tip-c", "--monte-carlo", "--seed", "--yield",
               "--column-height", "--column-diameter", "--instrument"]
    number = st.one_of(
        st.floats(allow_nan=True, allow_infinity=True).map(repr),
        st.sampled_from(["5e-324", "1e-300", "1.7e308", "-1", "0", "1", "2.5", "1e6", "1e7",
                         "10M", "1p", "90p", "2u", "5k", "1%", "150%", "x", "", "1M||1e300",
                         "1e-300||14p", "1M||-1p"]))

    @settings(max_examples=40, deadline=None, derandomize=True,
              suppress_health_check=[HealthCheck.too_slow])
    @given(chosen=st.dictionaries(st.sampled_from(options), number, min_size=1, max_size=3))
    def check(chosen):
        args = ["divider", "--ratio", "10"]
        for opt, value in chosen.items():
            if opt == "--ratio":
                args[2] = value
            elif opt == "--monte-carlo":  # keep the runs short: the limits are tested above
                args += [opt, value if value in ("-1", "0", "1", "x", "") else "50"]
            else:
                args += [opt, value]
        res = CliRunner().invoke(main, args)
        assert res.exit_code in (0, 2), (args, res.output, res.exception)
        assert "Traceback" not in res.output and "Warning" not in res.output, args
        if res.exit_code == 2:
            lines = [ln for ln in res.output.splitlines() if ln.strip()]
            assert len(lines) == 1 and lines[0].startswith("taumatch: error: "), (args, lines)

    check()
