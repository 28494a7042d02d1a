"""Every example chain spec loads and runs (invented scenarios, not reference data).

For speed the cables use a fixed 6 pi sections here; the automatic count is exercised in
test_analysis_bandwidth.py.
"""

import math
from pathlib import Path

import numpy as np
import pytest

from taumatch.analysis import ChainModel, chain_figures
from taumatch.analysis.predict import predict
from taumatch.chain import load
from taumatch.chain.build import build
from taumatch.chain.cautions import cautions
from taumatch.chain.netlist import netlist_text
from taumatch.analysis.trim import trim

EXAMPLES = sorted((Path(__file__).parent.parent / "examples").glob("*.toml"))


def test_there_are_examples():
    names = {p.name for p in EXAMPLES}
    assert {"bench-probe.toml", "ground-lead.toml", "active-probe.toml",
            "resistive-50ohm.toml", "hv-divider.toml", "mistrimmed-probe.toml"} <= names


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_example_runs(path):
    chain = load(path)
    assert "invented scenario" in path.read_text(encoding="utf-8").lower()
    model = ChainModel.from_chain(chain, sections=6)
    figs = chain_figures(chain, model=model)
    assert math.isfinite(figs.bandwidth.upper) and figs.bandwidth.upper > 0
    assert figs.rise_time > 0 and figs.loading.r > 0 and figs.loading.c > 0
    assert figs.summary()
    if chain.adjustable is not None:
        t = trim(chain)
        assert t.required > 0
    p = predict(chain, "step", points=200, model=model)
    assert np.all(np.isfinite(p.v))
    text = netlist_text(chain, build(chain), 6, tstop=1e-6, fstart=1.0, fstop=1e9)
    assert text.endswith(".end\n")
    assert bool(cautions(chain)) == (path.name == "hv-divider.toml")
