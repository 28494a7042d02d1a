"""Fast-edge diagnosis (issue 14): the chain's fast part fitted to a fast-edge capture, and
the value of every adjustment that flattens the step.

Sources: captures made by an independent path (tests/edge_synth.py: ABCD matrices and the
telegrapher's equations written here, an inverse transform of the test's own; 8-bit
quantisation, noise, averaging); the targets that truly flatten the true chain, found by
scipy's least squares on that independent path; the textbook two-arm divider for the
1 kHz capture (tests/divider_synth.py; Millman & Taub, Boylestad); scikit-rf's line with
scipy's FFT and integration for the model's step.
"""

from __future__ import annotations

import json
import math
from functools import cache

import divider_synth as ds
import edge_synth as es
import numpy as np
import pytest

from taumatch.chain import (
    Adjust,
    Branch,
    Chain,
    Input,
    Lead,
    Line,
    Series,
    Shunt,
    Source,
    dumps,
    loads,
)
from taumatch.chain.two_arm import TwoArm
from taumatch.edge_diagnosis import diagnose_edge, is_fast_edge
from taumatch.errors import ComputationError
from taumatch.pulse import measure


def probe(*, lead=0.035, line_r=170.0, br=200.0, bc=15e-12, trimmer=14.5e-12, series=(),
          marks=("branch.r", "branch.c")):
    """An invented 10:1 probe: ground spring, 9 MΩ ∥ 11.5 pF tip, 1.2 m of resistive cable,
    optional series damping resistors, a compensation box (trimmer c, branch r and c
    adjustable), a 1 MΩ ∥ 14 pF input behind a 500 MHz Bessel front end; 200 ps pulser."""
    parts = [Lead(length=lead, radius=0.25e-3), Series(r=9e6, c=11.5e-12, label="tip arm"),
             Line(length=1.2, r=line_r, l=250e-9, c=50e-12)]
    parts += [Series(r=r, adjust=Adjust("r")) for r in series]
    parts += [Shunt(c=trimmer, branch=Branch(br, bc), label="box",
                    adjust=(Adjust("c", 5e-12, 30e-12),) + tuple(Adjust(m) for m in marks)),
              Input(r=1e6, c=14e-12, bandwidth=500e6, response="bessel")]
    return Chain(Source(50.0, 2.0, rise_time=200e-12), tuple(parts))


SPEC = probe(lead=0.03, line_r=150.0, br=68.0)
#: the probe as it is: spring, cable loss and the HF branch differ from the drawing
TRUTH = probe(br=110.0, bc=24e-12)
HF = [(4, "branch.r"), (4, "branch.c")]


@cache
def _diagnosis(slow: bool):
    t, v = es.capture(TRUTH if not slow else _truth_slow(), dt=100e-12, pre=200, post=1500,
                      averages=256, full_scale=0.3, seed=3 + slow)
    kw = {}
    if slow:
        kw["slow"] = ds.capture(11.5e-12, c2=(60 + 20 + 24 + 14) * 1e-12, amplitude=5.0,
                                periods=3, seed=11)
    return (t, v), diagnose_edge((t, v), SPEC, **kw)


def _truth_slow():
    return TRUTH.with_value(4, "c", 20e-12)  # the trimmer mistrimmed too


def _by_key(d):
    return {f"part{a.field.part}.{a.field.name}": a for a in d.adjustments}


def test_two_mistrimmed_hf_adjustments_targets_directions_and_a_flat_step():
    """Independent capture of a probe with a lossy cable and its R-C branch mistrimmed
    (110 Ω, 24 pF): each target within 5 % and within 3.5 standard errors of the value that
    truly flattens the true chain (scipy least squares on the independent path, same flat
    window); the directions right; the values now within 3.5 standard errors of the truth;
    and the true chain with the tool's targets is flat (independent step): peak departure
    and overshoot under 1.5 % where the mistrimmed probe departs by over 3 %."""
    _, d = _diagnosis(False)
    adj = _by_key(d)
    want, _ = es.true_targets(TRUTH, HF, d.window)
    for (part, name), truth_now, target, way in zip(HF, (110.0, 24e-12), want,
                                                    ("increase", "decrease")):
        a = adj[f"part{part}.{name}"]
        assert a.target == pytest.approx(target, rel=0.05)
        assert abs(a.target - target) < 3.5 * a.stderr
        assert abs(a.now - truth_now) < 3.5 * a.now_stderr
        assert a.direction == way
    assert adj["part4.c"].target is None and adj["part4.c"].low_frequency
    _, tau = es.flat_window(TRUTH)
    assert d.edge_constant == pytest.approx(tau, rel=0.03)  # the capture's own 10-90 % / ln 9
    adjusted = TRUTH
    for (part, name) in HF:
        adjusted = adjusted.with_value(part, name, adj[f"part{part}.{name}"].target)
    before = es.aberration(TRUTH, d.window)
    after = es.aberration(adjusted, d.window)
    assert np.max(np.abs(before)) > 0.03
    assert np.max(np.abs(after)) < 0.015
    assert d.after["peak"] < 0.015 and d.after["overshoot"] < 0.015
    assert d.before["peak"] > 2 * d.after["peak"]


def test_slow_capture_sets_the_low_frequency_trimmer_in_one_consistent_chain():
    """With a 1 kHz capture of the same probe (textbook two-arm divider, trimmer at 20 pF):
    the chain as found has the gain error that capture shows, the adjusted chain none
    (two-arm, Millman & Taub); the trimmer's target is within 3 standard errors of the
    value that compensates the true chain with the branch at the tool's target
    (R1 C1 / R2 minus the rest of the shunt arm); every direction right."""
    _, d = _diagnosis(True)
    adj = _by_key(d)
    e = d.low_frequency.error
    assert e == pytest.approx((9 * 11.5 - 118) / (118 + 11.5), abs=3e-3)
    assert float(TwoArm.from_chain(d.found).hf_dc_error) == pytest.approx(e, abs=1e-9)
    assert float(TwoArm.from_chain(d.adjusted).hf_dc_error) == pytest.approx(0.0, abs=1e-9)
    lf = adj["part4.c"]
    want = 9 * 11.5e-12 - (60e-12 + 14e-12 + adj["part4.branch.c"].target)
    assert abs(lf.target - want) < 3 * lf.stderr
    assert abs(lf.now - 20e-12) < 3.5 * lf.now_stderr
    assert lf.direction == "decrease"
    assert adj["part4.branch.r"].direction == "increase"
    assert adj["part4.branch.c"].direction == "decrease"
    # the HF targets with the trimmer at its target: what flattens the true chain so
    want_hf, _ = es.true_targets(_truth_slow().with_value(4, "c", lf.target), HF, d.window)
    for (part, name), w in zip(HF, want_hf):
        assert adj[f"part{part}.{name}"].target == pytest.approx(w, rel=0.05)
    held = {h.field.key: h for h in d.fit.holds}
    assert "part5.c" in held and "part 4 (shunt, box) c" in held["part5.c"].reason


def test_two_adjustments_the_capture_cannot_tell_apart_are_said_so():
    """Two damping resistors side by side (only their sum acts): the diagnosis says they are
    not separable and gives one of them the combination, instead of splitting the
    difference; the sum it finds is within 3.5 standard errors of the truth (common
    practice, no source: series resistors add)."""
    spec = probe(lead=0.035, br=110.0, series=(20.0, 10.0), marks=("branch.r",))
    truth = probe(br=110.0, series=(30.0, 10.0))
    t, v = es.capture(truth, dt=200e-12, pre=100, post=1500, averages=256, full_scale=0.3,
                      seed=5)
    d = diagnose_edge((t, v), spec)
    assert [[f.key for f in g] for g in d.fit.groups] == [["part4.r", "part5.r"]]
    adj = _by_key(d)
    held = adj["part5.r"]
    assert held.target is None and "acts alike with part 4 (series) r" in held.note
    first = adj["part4.r"]
    assert "carries the combination" in first.note
    assert abs(first.now + 10.0 - 40.0) < 3.5 * first.now_stderr
    assert "not separable" in d.summary()
    assert d.to_dict()["not_separable"] == [["part4.r", "part5.r"]]


def test_model_step_against_scikit_rf_line_and_scipy():
    """The fit's model (exact cascade, numerical inverse Laplace at a fixed term count)
    against a general-purpose path on the same chain: scikit-rf's lossy line (ABCD), the
    lumped parts and the front end written out, the impulse response by scipy's inverse FFT
    of the response on a fine grid of real frequencies, the step by scipy's cumulative
    trapezoid; the divider compensated at low frequency so the record's tail has no slow
    part to wrap.  Agreement within 2e-3 of the step from 2 ns on."""
    import skrf
    from scipy.fft import irfft
    from scipy.integrate import cumulative_trapezoid

    from taumatch.fit.step_model import StepModel

    chain = probe(trimmer=9 * 11.5e-12 - 60e-12 - 14e-12 - 15e-12)
    assert float(TwoArm.from_chain(chain).hf_dc_error) == pytest.approx(0.0, abs=1e-12)
    period, fmax = 2e-6, 40e9
    f = np.arange(1, int(fmax * period) + 1) / period
    media = skrf.media.DistributedCircuit(skrf.Frequency.from_f(f, unit="hz"), R=170.0,
                                          L=250e-9, G=0.0, C=50e-12)
    abcd = media.line(1.2, unit="m").a  # (n, 2, 2)
    s = 2j * np.pi * f
    L = es.grover(0.035, 0.25e-3)

    def series(z):
        m = np.zeros((f.size, 2, 2), complex)
        m[:, 0, 0] = m[:, 1, 1] = 1
        m[:, 0, 1] = z
        return m

    def shunt(y):
        m = np.zeros((f.size, 2, 2), complex)
        m[:, 0, 0] = m[:, 1, 1] = 1
        m[:, 1, 0] = y
        return m

    tip = 1 / (1 / 9e6 + s * 11.5e-12)
    box = s * chain.parts[3].c + 1 / (200.0 + 1 / (s * 15e-12)) + 1 / 1e6 + s * 14e-12
    total = series(50.0 + s * L) @ series(tip) @ abcd @ shunt(box)
    h = 1 / total[:, 0, 0] * es.front_end(500e6, "bessel")(s) / (1 + s * 200e-12 / math.log(9))
    h0 = 0.1  # the DC gain R2 / (R1 + R2)
    spectrum = np.concatenate([[h0], h])
    n = 2 * (spectrum.size - 1)
    dt = period / n
    impulse = irfft(spectrum, n=n) / dt
    t = np.arange(n) * dt
    ref = cumulative_trapezoid(impulse, t, initial=0.0)
    keep = (t > 2e-9) & (t < 150e-9)
    model = StepModel(160e-9, 25e-12, 1e9)
    got = model.at(chain, t[keep])
    assert np.max(np.abs(got - ref[keep])) < 2e-3 * h0


def test_a_fast_edge_is_told_from_a_1khz_square():
    """docs/fast-edge.md's rule: with a chain, a record with no full period (a single step)
    or a period under a tenth of the divider's time constant is a fast edge; the 1 kHz demo
    square (period 1 ms against about 100 µs) is not, nor a 20 kHz one (50 µs)."""
    from pathlib import Path

    from taumatch.capture import read

    chain = SPEC
    tau = float(TwoArm.from_chain(chain).tau)
    assert 50e-6 < tau < 200e-6
    demo = Path(__file__).parent.parent / "data" / "demo_capture.csv"
    assert not is_fast_edge(measure(read(demo)), chain)
    t, v = es.capture(TRUTH, dt=100e-12, pre=200, post=1500, averages=1, seed=1)
    assert is_fast_edge(measure((t, v)), chain)
    for period, fast in ((5e-6, True), (50e-6, False)):
        tt = np.arange(0, 4 * period, period / 2000)
        square = np.where(np.mod(tt, period) < period / 2, 1.0, 0.0) + 0.01 * np.sin(tt * 1e6)
        assert is_fast_edge(measure((tt, square)), chain) == fast, period


def test_several_adjust_marks_write_and_load_back():
    """A chain with several marks (with and without their own ranges) written as a spec
    loads back as the same chain (chain/write.py's promise)."""
    text = dumps(SPEC)
    assert 'adjust = [{field = "c", min = 5e-12, max = 3e-11}, "branch.r", "branch.c"]' in text
    assert loads(text).parts == SPEC.parts


def test_real_fast_steps_are_refused_with_the_reason(real_captures):
    """README of the real captures: two fast single steps through no known chain.  With
    any of our example chains the diagnosis refuses and says why (the chain does not
    describe the step, or it resolves nothing to set), with the step's pulse metrics; it
    never gives a fit the capture cannot support."""
    from pathlib import Path

    from taumatch.capture import read
    from taumatch.chain import load

    examples = Path(__file__).parent.parent / "examples"
    for name, spec in (("LeCroy-trace3_CH1.csv", "fast-edge-probe.toml"),
                       ("LeCroy-trace4_CH2.csv", "bench-probe.toml")):
        with pytest.raises(ComputationError, match="no fast-edge diagnosis") as info:
            diagnose_edge(read(real_captures / name), load(examples / spec))
        msg = str(info.value)
        assert "does not describe the capture" in msg or "resolves none of the" in msg
        assert "pulse metrics: 10-90 %" in msg or "residual" in msg


def test_cli_json_spec_and_bad_options(tmp_path):
    """The worked example through the command line: JSON `adjustments` as
    {part, field, now, target, stderr} and the aberrations before and after; --spec writes
    the chain as found (and --trimmed as adjusted) as a spec that loads back and that
    `bandwidth`, `predict` and `netlist` read; bad option combinations are one line and
    exit 2 (sources: the spec's own rules; common practice, no source)."""
    from pathlib import Path

    from click.testing import CliRunner

    from taumatch.chain import load
    from taumatch.cli import main

    ex = Path(__file__).parent.parent / "examples"
    cap, spec, slow = (ex / "fast-edge-capture.csv", ex / "fast-edge-probe.toml",
                       ex / "fast-edge-1khz.csv")
    run = CliRunner().invoke
    found = tmp_path / "found.toml"
    r = run(main, ["diagnose", str(cap), "--chain", str(spec), "--slow", str(slow), "--json",
                   "--spec", str(found), "--plot", str(tmp_path / "edge.png")])
    assert r.exit_code == 0, r.output
    out = json.loads(r.output)
    rows = {(a["part"], a["field"]): a for a in out["adjustments"]}
    assert set(rows) == {(4, "c"), (4, "branch.r"), (4, "branch.c")}
    for a in rows.values():
        assert {"part", "field", "now", "target", "stderr"} <= set(a)
        assert a["target"] is not None and a["stderr"] > 0
    assert {"before", "after"} == set(out["aberrations"])
    assert out["aberrations"]["after"]["peak"] < out["aberrations"]["before"]["peak"]
    chain = load(found)
    assert chain.parts[3].branch.r == pytest.approx(rows[(4, "branch.r")]["now"])
    assert (tmp_path / "edge.png").stat().st_size > 0
    for cmd in (["bandwidth", str(found)], ["predict", str(found)],
                ["netlist", str(found), "-o", str(tmp_path / "deck.cir")]):
        assert run(main, cmd).exit_code == 0, cmd
    # --trimmed writes the chain as adjusted: the targets in place (the no-slow diagnosis)
    from taumatch.chain.write import dump
    from taumatch.fitted_chain import edge_fitted_chain

    _, d = _diagnosis(False)
    trimmed = tmp_path / "trimmed.toml"
    chain, comment = edge_fitted_chain(d, True, "capture.csv")
    dump(chain, trimmed, comment=comment)
    box, adj = load(trimmed).parts[3], _by_key(d)
    assert box.branch.r == pytest.approx(adj["part4.branch.r"].target, rel=1e-12)
    assert box.branch.c == pytest.approx(adj["part4.branch.c"].target, rel=1e-12)
    assert box.c == pytest.approx(adj["part4.c"].now, rel=1e-12)  # no target without --slow
    assert "after the adjustments" in trimmed.read_text()
    for args, pattern in (
            (["--slow", str(slow)], "needs the chain"),
            (["--chain", str(spec), "--trimmed"], "--trimmed"),
            (["--chain", str(spec), "--spec", str(cap)], "that is the input"),
            (["--chain", str(spec), "--report", str(tmp_path / "r.html")], "no HTML report"),
    ):
        r = run(main, ["diagnose", str(cap)] + args)
        assert r.exit_code == 2 and pattern in r.output, r.output
    r = run(main, ["diagnose", str(slow), "--chain", str(spec), "--slow", str(slow)])
    assert r.exit_code == 2 and "1 kHz capture, not a fast edge" in r.output



def test_the_worked_example_is_reproducible(tmp_path, monkeypatch):
    """examples/make_fast_edge.py (seeded) makes the example's captures again, byte for
    byte (the files the docs and the command-line test use)."""
    import importlib.util
    from pathlib import Path

    ex = Path(__file__).parent.parent / "examples"
    spec = importlib.util.spec_from_file_location("make_fast_edge", ex / "make_fast_edge.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    monkeypatch.setattr(mod, "HERE", tmp_path)
    (tmp_path / "fast-edge-probe.toml").write_bytes((ex / "fast-edge-probe.toml").read_bytes())
    for made in mod.main():
        assert made.read_bytes() == (ex / made.name).read_bytes()


@pytest.mark.parametrize("name", ["tip_r_5e-324.toml", "line_length_5e-324.toml"])
def test_extreme_chains_are_refused_not_crashed(bad_inputs, name):
    """Regression: a chain whose step jumps at once (a vanishing tip resistance) or whose
    cable's delay underflows to zero (a length of 5e-324 m) crashed the fast-edge path
    (division by zero); now it is one line, exit 1."""
    from pathlib import Path

    from click.testing import CliRunner

    from taumatch.cli import main

    cap = Path(__file__).parent.parent / "examples" / "fast-edge-capture.csv"
    r = CliRunner().invoke(main, ["diagnose", str(cap), "--chain",
                                  str(bad_inputs / "extreme" / name)])
    assert r.exit_code == 1 and "no fast-edge diagnosis" in r.output, r.output
    assert "Traceback" not in r.output and len(r.output.strip().splitlines()) == 1


@pytest.mark.parametrize("extra", [["--tol", "shunt-c=5%"], ["--accept", "0.5%"],
                                   ["--tip-r", "9M"]])
def test_square_wave_options_are_refused_not_ignored(extra):
    """An option only the 1 kHz diagnosis reads (a tolerance by two-arm name, the acceptance
    band, a resistance) typed with a fast edge was silently dropped; now it is refused in one
    line with exit 2 before any fitting (common practice, no source: an ignored option is a
    number the user thinks was used)."""
    from pathlib import Path

    from click.testing import CliRunner

    from taumatch.cli import main

    ex = Path(__file__).parent.parent / "examples"
    r = CliRunner().invoke(main, ["diagnose", str(ex / "fast-edge-capture.csv"), "--chain",
                                  str(ex / "fast-edge-probe.toml"), *extra])
    assert r.exit_code == 2, r.output
    line = r.output.strip().splitlines()
    assert len(line) == 1 and extra[0] in line[0] and "fast edge" in line[0], r.output
