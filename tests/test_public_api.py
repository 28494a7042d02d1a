"""Every public name of ``taumatch`` resolves to what it says, whatever was imported first.

Regression (issue 11 item 6; shared/REVIEW.md 4.2): the module ``taumatch/diagnose.py``
once shadowed the function ``taumatch.diagnose`` after ``import taumatch.chain_facts``
("'module' object is not callable").  The orders run in a fresh interpreter, and every
``taumatch`` module is dropped from ``sys.modules`` before each order, so each starts
from nothing.
"""

from __future__ import annotations

import subprocess
import sys

# submodules imported before the package's names are asked for: the modules the clash came
# from (each first, and the pair both ways) and the edges that import them
ORDERS = [["taumatch.chain_facts"], ["taumatch.diagnosis"], ["taumatch.correct"],
          ["taumatch.cli"], ["taumatch.chain_facts", "taumatch.diagnosis"],
          ["taumatch.diagnosis", "taumatch.chain_facts"]]

SCRIPT = """
import importlib, inspect, json, random, sys
for order in json.loads(sys.argv[1]):
    for key in [k for k in sys.modules if k == "taumatch" or k.startswith("taumatch.")]:
        del sys.modules[key]
    for name in order:
        importlib.import_module(name)
    import taumatch
    names = list(taumatch.__all__)
    random.Random(len(order) + len(order[0])).shuffle(names)  # the names in another order too
    for public in names:
        value = getattr(taumatch, public)
        assert not inspect.ismodule(value), f"taumatch.{public} is a module after {order}"
    assert callable(taumatch.diagnose) and taumatch.diagnose.__name__ == "diagnose", order
    from taumatch.diagnosis import diagnose
    assert taumatch.diagnose is diagnose, order
"""


def test_public_names_in_any_import_order():
    import json

    proc = subprocess.run([sys.executable, "-c", SCRIPT, json.dumps(ORDERS)],
                          check=False, capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, proc.stderr
