"""Voltage and power ratings of a divider: how many resistors share the voltage, what each
part carries, the energy the capacitors store, and the cautions.

Common practice (no source beyond ``shared/CHECKS.md``): share the voltage of a divider
over several resistors with margin on each one's limiting voltage (one shorted element
raises the stress on the rest); dissipation ``V²/R`` (10 kV on 100 MΩ = 1 W); rate every
capacitor for the voltage it sees and mind its stored energy ``½CV²`` (100 pF at 10 kV =
5 mJ).  SI units throughout.

Examples
--------
>>> dissipation(10e3, 100e6)
1.0
>>> string_count(5e3, 1.6e3, 0.5)
7
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from ..units import format_quantity
from .ranges import check, positive

__all__ = [
    "DEFAULT_LIMITING_VOLTAGE",
    "DEFAULT_VOLTAGE_MARGIN",
    "Rating",
    "VoltageStress",
    "dissipation",
    "stored_energy",
    "string_count",
    "voltage_stress",
]

DEFAULT_VOLTAGE_MARGIN = 0.5
"""Each resistor works at no more than this fraction of its limiting voltage (and of its
power rating).  Common practice, no source: half the rating leaves room for one shorted
element, transients and the uneven sharing of a real column."""
DEFAULT_LIMITING_VOLTAGE = 200.0
"""V, assumed per resistor when a voltage is given without one: a common figure for small
through-hole metal-film parts (common practice, no source); the design warns."""
_KINDS = ("unknown", "ac", "dc")


@dataclass(frozen=True)
class Rating:
    """What the divider must stand: the peak working voltage and each resistor's ratings.

    Parameters
    ----------
    voltage : float
        Peak working voltage across the divider [V] (for ac the peak: 230 V rms is 325 V).
    kind : {"unknown", "ac", "dc"}
        For the cautions' threshold (30 V rms / 60 V dc; unknown takes the ac one).
    limiting_voltage : float, optional
        Each resistor's limiting element voltage [V] (default
        :data:`DEFAULT_LIMITING_VOLTAGE`, with a warning).
    power_rating : float, optional
        Each resistor's rated power [W].
    margin : float
        Fraction (0, 1] of the limiting voltage and power each resistor may use.
    """

    voltage: float
    kind: str = "unknown"
    limiting_voltage: float | None = None
    power_rating: float | None = None
    margin: float = DEFAULT_VOLTAGE_MARGIN

    def __post_init__(self):
        object.__setattr__(self, "voltage", check("voltage", self.voltage))
        if self.kind not in _KINDS:
            raise InputError(f"kind: must be one of {', '.join(_KINDS)}, got {self.kind!r}")
        if self.limiting_voltage is not None:
            object.__setattr__(self, "limiting_voltage",
                               check("limiting_voltage", self.limiting_voltage))
        if self.power_rating is not None:
            object.__setattr__(self, "power_rating", check("power_rating", self.power_rating))
        object.__setattr__(self, "margin", check("margin", self.margin))

    @property
    def limiting(self) -> float:
        """The limiting voltage used [V] (the default when none was given)."""
        return DEFAULT_LIMITING_VOLTAGE if self.limiting_voltage is None else self.limiting_voltage


def string_count(voltage: float, limiting_voltage: float, margin: float = DEFAULT_VOLTAGE_MARGIN,
                 resistance: float | None = None, power_rating: float | None = None) -> int:
    """Number of equal resistors a string needs to share ``voltage``.

    Parameters
    ----------
    voltage : float
        Peak working voltage across the string [V].
    limiting_voltage : float
        Each resistor's limiting element voltage [V].
    margin : float
        Fraction (0, 1] of the limiting voltage and power rating each element may use.
    resistance : float, optional
        Total string resistance [ohm] (needed with ``power_rating``).
    power_rating : float, optional
        Each resistor's rated power [W]; dissipation is taken as ``V²/R`` with the peak
        voltage (the dc worst case).

    Returns
    -------
    int
        At least 1.
    """
    voltage = check("voltage", voltage)
    limiting_voltage = check("limiting_voltage", limiting_voltage)
    margin = check("margin", margin)
    n = math.ceil(voltage / (limiting_voltage * margin) * (1 - 1e-12))
    if power_rating is not None:
        if resistance is None:
            raise InputError("resistance: needed together with power_rating")
        total = dissipation(voltage, resistance)
        # n equal elements each dissipate total/n.
        n = max(n, math.ceil(total / (check("power_rating", power_rating) * margin)
                             * (1 - 1e-12)))
    return max(int(n), 1)


def dissipation(voltage: float, resistance: float) -> float:
    """Power ``V²/R`` [W] for ``voltage`` [V, dc or rms] across ``resistance`` [ohm]."""
    return float(voltage) ** 2 / positive(resistance, "resistance")


def stored_energy(capacitance: float, voltage: float) -> float:
    """Energy ``½CV²`` [J] held by ``capacitance`` [F] charged to ``voltage`` [V]."""
    c = float(capacitance)
    if not (math.isfinite(c) and c >= 0):
        raise InputError(f"capacitance: must be zero or positive, got {capacitance!r}")
    return 0.5 * c * float(voltage) ** 2


@dataclass(frozen=True)
class VoltageStress:
    """What each part of a designed divider carries at the peak working voltage.

    Attributes
    ----------
    voltage : float
        Peak working voltage across the divider [V].
    resistor_voltage, resistor_power : float
        Largest voltage [V] and power [W, ``V²/R`` at the peak] of one tip resistor.
    tip_capacitor_voltage : float
        Largest voltage across one tip (grading) capacitor [V].
    shunt_voltage : float
        Voltage across the shunt arm [V].
    stored_energy : float
        ``½ C1 V1² + ½ C2 V2²`` [J].
    power_total : float
        Dissipation of the whole divider [W].
    limiting_voltage : float
        The limiting voltage the string was sized for [V].
    """

    voltage: float
    resistor_voltage: float
    resistor_power: float
    tip_capacitor_voltage: float
    shunt_voltage: float
    stored_energy: float
    power_total: float
    limiting_voltage: float

    def to_dict(self) -> dict:
        return {"voltage": self.voltage,
                "per_resistor": {"voltage": self.resistor_voltage, "power": self.resistor_power},
                "capacitor_voltage": {"tip": self.tip_capacitor_voltage,
                                      "shunt": self.shunt_voltage},
                "stored_energy": self.stored_energy, "power_total": self.power_total,
                "limiting_voltage": self.limiting_voltage}

    def summary(self) -> str:
        q = format_quantity
        return (f"  at {q(self.voltage, 'V')} peak: {q(self.resistor_voltage, 'V')} and "
                f"{q(self.resistor_power, 'W')} per tip resistor\n"
                f"  capacitor voltage: {q(self.tip_capacitor_voltage, 'V')} per tip capacitor, "
                f"{q(self.shunt_voltage, 'V')} across the shunt arm; stored energy "
                f"{q(self.stored_energy, 'J')}; dissipation {q(self.power_total, 'W')} in all")


def voltage_stress(arms, rating: Rating, tip_resistors, tip_capacitors, arm: str,
                   warnings: list) -> tuple:
    """What each part of a design carries at the rating's voltage, and the cautions.

    Parameters
    ----------
    arms : TwoArm
        The trimmed design (earth capacitance included).
    rating : Rating
    tip_resistors, tip_capacitors : tuple of float
        The tip string [ohm] and its capacitors [F].
    arm : {"shunt", "tip"}
        Where the trimmer sits (a tip trimmer is on the high-voltage side: a caution).
    warnings : list
        Appended to when a resistor is above its limiting voltage.

    Returns
    -------
    (VoltageStress, tuple of str)
    """
    from ..safety import cautions
    from .grading import grading_distribution

    v = rating.voltage
    i = v / arms.input_resistance
    v_tip = v * arms.r1 / arms.input_resistance
    n = len(tip_resistors)
    # the top grading capacitor carries the largest share at high frequency
    share = (1.0 - float(grading_distribution(1.0 - 1.0 / len(tip_capacitors),
                                              arms.ce / arms.c1))
             if len(tip_capacitors) > 1 else 1.0)
    energy = stored_energy(arms.c1, v_tip) + stored_energy(arms.c2, v - v_tip)
    r_max = max(tip_resistors)
    stress = VoltageStress(v, i * r_max, i * i * r_max, v_tip * share, v - v_tip, energy,
                           dissipation(v, arms.input_resistance), rating.limiting)
    if v_tip / n > rating.limiting:
        warnings.append("voltage per resistor exceeds its limiting voltage")
    caut = cautions(v, rating.kind, elements=n, element_voltage=v_tip / n,
                    limiting_voltage=rating.limiting,
                    trimmer_at_high_voltage=(arm == "tip"), stored_energy=energy)
    return stress, tuple(caut)
