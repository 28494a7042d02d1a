"""``taumatch demo``: the whole diagnosis on the shipped demo capture (an invented scenario)."""

from __future__ import annotations

import json
from importlib import resources
from pathlib import Path

import click

from ..atomic import atomic_write
from ._common import save_figure, to_jsonable


def demo_files():
    """Paths of the shipped demo capture and chain spec."""
    base = resources.files("taumatch") / "demo"
    cap = Path(str(base / "demo_capture.csv"))
    spec = Path(str(base / "demo_chain.toml"))
    return cap, spec


@click.command("demo")
@click.option("--out", "out_dir", type=click.Path(file_okay=False), default="taumatch-demo",
              show_default=True, help="Folder for the summary, the JSON and the plots.")
def command(out_dir):
    """Diagnose the shipped demo capture and write the results to --out.

    The capture is an invented scenario, simulated by the project's own model
    (data/make_demo.py): a 10:1 probe on a 1 kHz reference whose trimmer has been
    turned away from its nominal value. Writes summary.txt, diagnosis.json,
    diagnosis.png (capture, fit, prediction after the trim), measure.png and
    corrected.csv (the capture with the mis-compensation undone in software).
    """
    from ..capture import read
    from ..chain_facts import facts_from_spec
    from ..correct import apply_correction, correction_for
    from ..diagnose import diagnose

    cap_path, spec_path = demo_files()
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    cap = read(cap_path)
    facts = facts_from_spec(spec_path)
    d = diagnose(cap, chain=facts)
    header = (f"taumatch demo — INVENTED SCENARIO, simulated data, not a measurement\n"
              f"capture: {cap_path.name}, chain: {facts.name}\n\n")
    text = header + d.summary() + "\n"
    atomic_write(out / "summary.txt", text)
    atomic_write(out / "diagnosis.json", json.dumps(to_jsonable(d.to_dict()), indent=2) + "\n")
    fig, _ = d.plot()
    save_figure(fig, out / "diagnosis.png")
    fig, _ = d.metrics.plot()
    save_figure(fig, out / "measure.png")
    import io

    import numpy as np

    corr = correction_for(d.fit)
    name = cap.channel_name(None)
    t = np.asarray(cap.time, dtype=float)
    v = np.asarray(cap.channels[name], dtype=float)
    y = apply_correction(t, v, corr, period=d.metrics.period)
    buf = io.StringIO()
    buf.write(f"# corrected by taumatch demo: {corr.describe()}\n")
    buf.write(f"time (s),{name} (V),{name} corrected (V)\n")
    np.savetxt(buf, np.column_stack([t, v, y]), delimiter=",", fmt="%.9g")
    atomic_write(out / "corrected.csv", buf.getvalue())
    click.echo(text.rstrip())
    click.echo(f"\nwrote {out}/summary.txt, diagnosis.json, diagnosis.png, measure.png, corrected.csv")
