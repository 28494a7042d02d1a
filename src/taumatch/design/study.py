"""A divider design with its Monte Carlo, as one result: what ``taumatch divider`` prints."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["DividerStudy"]


@dataclass(frozen=True, eq=False)
class DividerStudy:
    """A :class:`~taumatch.design.divider.DividerDesign` and, when one was run, its
    :class:`~taumatch.design.tolerance.MonteCarloResult`."""

    design: object
    monte_carlo: object = None

    def to_dict(self) -> dict:
        """The design's JSON, with ``monte_carlo`` and its trimmer ``yield`` when run."""
        out = self.design.to_dict()
        if self.monte_carlo is not None:
            out["monte_carlo"] = self.monte_carlo.to_dict()
            out["yield"] = self.monte_carlo.yield_of_trimmer
        return out

    def summary(self) -> str:
        parts = [self.design.summary()]
        if self.monte_carlo is not None:
            parts.append(self.monte_carlo.summary())
        return "\n".join(parts)

    def plot(self, ax=None):
        """The design's frequency response (:meth:`DividerDesign.plot`)."""
        return self.design.plot(ax=ax)
