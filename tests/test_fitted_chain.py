"""`taumatch diagnose --spec` writes the fitted chain; the chain commands read it back and
agree with the diagnosis's own prediction (issue 11 item 4).  From the command line, as a
user types it.  The capture is a textbook divider (Millman & Taub; Boylestad;
shared/CHECKS.md) through ``divider_synth``; the demo pair is the invented scenario of
data/make_demo.py."""

from __future__ import annotations

import json

import numpy as np
import pytest
from click.testing import CliRunner
from divider_synth import c1_for_error, capture

from taumatch.capture import read
from taumatch.chain import load
from taumatch.chain.two_arm import TwoArm
from taumatch.cli import main
from taumatch.cli.cmd_demo import demo_files
from taumatch.diagnosis import diagnose


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    """A 1 kHz capture of a +20 % over-compensated 10:1 divider, diagnosed twice: the chain as
    found and as it will be after the trim."""
    folder = tmp_path_factory.mktemp("spec")
    t, v = capture(c1_for_error(0.2), seed=21, ramp=1.5e-6, dt=1e-7, periods=4, bits=0)
    cap = folder / "probe.csv"
    with open(cap, "w") as fh:
        fh.write("Time (s),CH1 (V)\n")
        np.savetxt(fh, np.column_stack([t, v]), delimiter=",", fmt="%.9g")
    found, trimmed = folder / "found.toml", folder / "trimmed.toml"
    r1 = run("diagnose", cap, "--spec", found, "--json")
    r2 = run("diagnose", cap, "--spec", trimmed, "--trimmed")
    assert r1.exit_code == 0 and r2.exit_code == 0, (r1.output, r2.output)
    assert json.loads(r1.output)["spec"] == str(found) and "after the trim" in r2.output
    return folder, cap, found, trimmed, diagnose(read(cap))


def _own_square(d, trimmed, t):
    """The diagnosis's own square wave (its fitted chain, the edge at its bound when the
    capture does not resolve it), from the source's zero."""
    edge = d.fit.estimates["edge_time"]
    h = d.fit.transfer(trimmed=trimmed, edge_time=None if edge.resolved else edge.bound)
    return abs(d.fit.estimates["amplitude"].value) * h.square(t, d.metrics.period, 0.5)


@pytest.mark.parametrize("which", ["found", "trimmed"])
def test_predict_from_the_spec_is_the_diagnosis_s_own(written, which):
    """`predict SPEC --input square` equals the diagnosis's square wave (as found, or after
    the trim) to 1e-6 of the swing: the spec is the fitted chain."""
    folder, _, found, trimmed, d = written
    spec = found if which == "found" else trimmed
    out = folder / f"{which}.csv"
    assert run("predict", spec, "--input", "square", "--csv", out, "--points", 3000).exit_code == 0
    t, v = np.loadtxt(out, delimiter=",", skiprows=1, unpack=True)
    own = _own_square(d, which == "trimmed", t)
    swing = abs(d.fit.estimates["amplitude"].value) * d.fit.arms.dc_gain
    assert np.max(np.abs(v - own)) <= 1e-6 * swing


def test_trim_and_bandwidth_from_the_spec_agree(written):
    """`trim` on the spec as found asks for the diagnosis's setting (to 1e-6; the network's
    regula falsi against the two-arm closed form); on the spec after the trim it finds
    nothing to do; `bandwidth` gives the trimmed chain's displayed 10-90 % within 1 % of
    the diagnosis's predicted rise time (bandwidth reads it off its own sampled step) and
    its DC gain exactly."""
    _, _, found, trimmed, d = written
    t_found = json.loads(run("trim", found, "--json").output)
    assert t_found["state"] == d.verdict
    assert t_found["required"] == pytest.approx(d.trim.required, rel=1e-6)
    t_trimmed = json.loads(run("trim", trimmed, "--json").output)
    assert t_trimmed["state"] == "compensated" and abs(t_trimmed["hf_dc_error"]) < 1e-3
    bw = json.loads(run("bandwidth", trimmed, "--json").output)
    after = d.prediction()["after"]
    rise = after["rise_time"] if after["rise_time"] is not None else after["rise_time_bound"]
    assert bw["displayed_rise_time"] == pytest.approx(rise, rel=0.01)
    assert bw["dc_gain"] == pytest.approx(d.fit.arms.dc_gain, rel=1e-9)


def test_spec_from_a_chain_keeps_its_parts(tmp_path):
    """With --chain (the demo's invented probe: cable, trimmer, input), the written chain keeps
    every part and changes only what the capture measured; it reduces to the fitted arms,
    and after the trim `trim` finds it compensated within the acceptance band."""
    cap, spec = demo_files()
    found, trimmed = tmp_path / "found.toml", tmp_path / "trimmed.toml"
    assert run("diagnose", cap, "--chain", spec, "--spec", found).exit_code == 0
    assert run("diagnose", cap, "--chain", spec, "--spec", trimmed, "--trimmed").exit_code == 0
    given, back = load(spec), load(found)
    assert [p.kind for p in back.parts] == [p.kind for p in given.parts]
    assert back.parts[2] == given.parts[2]  # the cable, untouched
    from taumatch.chain_facts import facts_from_spec

    d = diagnose(read(cap), chain=facts_from_spec(spec))
    arms = TwoArm.from_chain(back)
    assert (arms.c1, arms.c2) == (pytest.approx(d.fit.c1, rel=1e-9), pytest.approx(d.fit.c2,
                                                                                   rel=1e-9))
    assert back.parts[3].c == pytest.approx(d.trim.present, rel=1e-9)  # the trimmer
    assert load(trimmed).parts[3].c == pytest.approx(d.trim.required, rel=1e-9)
    t = json.loads(run("trim", trimmed, "--json").output)
    assert t["state"] == "compensated"


def test_spec_refusals(tmp_path, written):
    """--trimmed needs --spec; a folder that does not exist is refused before any fit; a
    capture that shows no divider has no chain to write (exit 1)."""
    _, cap, _, _, _ = written
    r = run("diagnose", cap, "--trimmed")
    assert r.exit_code == 2 and "--trimmed" in r.output
    r = run("diagnose", cap, "--spec", tmp_path / "no" / "x.toml")
    assert r.exit_code == 2 and "does not exist" in r.output
    t, v = capture(c1_for_error(0.0), amplitude=40.0, span=12.0, seed=5)  # 4 V swing: 1X
    flat = tmp_path / "flat.csv"
    np.savetxt(flat, np.column_stack([t, v]), delimiter=",", header="t,v", comments="")
    r = run("diagnose", flat, "--spec", tmp_path / "x.toml")
    assert r.exit_code == 1 and "no divider" in r.output
