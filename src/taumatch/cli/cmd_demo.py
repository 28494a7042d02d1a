"""``taumatch demo``: the whole diagnosis on the shipped demo capture (an invented scenario)."""

from __future__ import annotations

import click

from ._common import save_figure, to_jsonable


def demo_files():
    """Paths of the shipped demo capture and chain spec."""
    from importlib import resources
    from pathlib import Path

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
    import json
    from pathlib import Path

    from ..atomic import atomic_write
    from ..capture import read
    from ..chain_facts import facts_from_spec
    from ..correct import correct_capture
    from ..diagnosis import diagnose

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
    atomic_write(out / "corrected.csv", correct_capture(cap, d, source=cap_path.name).csv_text())
    click.echo(text.rstrip())
    click.echo(f"\nwrote {out}/summary.txt, diagnosis.json, diagnosis.png, measure.png, corrected.csv")
