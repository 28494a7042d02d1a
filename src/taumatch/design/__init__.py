"""Design of compensated dividers: one concept per module; import from the module that holds it.

* :mod:`.divider` — :func:`~.divider.design_divider` and its result
  :class:`~.divider.DividerDesign` (``to_chain()`` writes it as a chain);
* :mod:`.resistors`, :mod:`.capacitors` — how the parts are chosen;
* :mod:`.eseries` — IEC 60063 preferred numbers;
* :mod:`.instrument` — the instrument input ``R ∥ C``;
* :mod:`.tolerance` — the parts' tolerances, their corners and the Monte Carlo;
* :mod:`.rating` — voltage and power ratings of the string, stored energy;
* :mod:`.column`, :mod:`.grading`, :mod:`.geometry`, :mod:`.ladder` — high-voltage columns:
  the request, the ungraded column's response, grading, earth capacitance from geometry,
  the lumped ladder of sections;
* :mod:`.as_chain` — a design as a :class:`taumatch.chain.Chain` (and its spec's comment);
* :mod:`.study` — a design with its Monte Carlo, as one result;
* :mod:`.ranges` — the physical range of every input.

The compensation itself is the two-arm model of :mod:`taumatch.chain.two_arm`; the trim of
any chain is an analysis of the chain (:mod:`taumatch.analysis.trim`).
"""
