"""The cautions taumatch prints with every result that concerns high voltage or mains.

One function, :func:`cautions`, returns the text as a list of strings so that every
command and report shows the same words.  Below the threshold (30 V rms / 60 V dc;
a sine of 30 V rms peaks at 42.4 V) it returns an empty list.

The threshold and the cautions are general words drawn from IEC 61010-031 (hand-held
probe assemblies), IEC 61010-2-030 (measurement categories), IEC 60664-1 (insulation
co-ordination: creepage, clearance, overvoltage categories) and common practice.  They
are reminders, not a safety assessment: local codes, the standards and licensed
practice decide.

Examples
--------
>>> cautions(12.0)
[]
>>> len(cautions(5000.0)) > 5
True
"""

from __future__ import annotations

import math

from .errors import InputError
from .units import format_quantity

__all__ = ["THRESHOLD_DC", "THRESHOLD_RMS", "cautions", "is_hazardous"]

THRESHOLD_RMS = 30.0
"""V rms above which an ac voltage is treated as hazardous (IEC 61010 family)."""
THRESHOLD_DC = 60.0
"""V dc above which a dc voltage is treated as hazardous (IEC 61010 family)."""

_KINDS = ("ac", "dc", "unknown")


def is_hazardous(voltage_peak: float, kind: str = "unknown") -> bool:
    """True when the voltage exceeds 30 V rms (ac, sine assumed) or 60 V dc.

    Parameters
    ----------
    voltage_peak : float
        Peak working voltage, V (absolute value is used).
    kind : {"ac", "dc", "unknown"}
        ``"unknown"`` applies the stricter ac limit (42.4 V peak).
    """
    v = _check(voltage_peak, kind)
    if kind == "dc":
        return v > THRESHOLD_DC
    return v > THRESHOLD_RMS * math.sqrt(2.0)


def _check(voltage_peak, kind) -> float:
    if kind not in _KINDS:
        raise InputError(f"kind: must be one of {', '.join(_KINDS)}, got {kind!r}")
    try:
        v = abs(float(voltage_peak))
    except (TypeError, ValueError):
        raise InputError(f"voltage_peak: expected a number in volts, got {voltage_peak!r}")
    if not math.isfinite(v):
        raise InputError(f"voltage_peak: must be finite, got {voltage_peak!r}")
    return v


def cautions(voltage_peak: float, kind: str = "unknown", *, elements: int | None = None,
             element_voltage: float | None = None, limiting_voltage: float | None = None,
             frequency: float | None = None, trimmer_at_high_voltage: bool = False,
             stored_energy: float | None = None) -> list[str]:
    """Safety cautions for a result at ``voltage_peak``; empty below the threshold.

    Parameters
    ----------
    voltage_peak : float
        Peak working voltage across the divider or probe, V.
    kind : {"ac", "dc", "unknown"}
        Kind of voltage, for the threshold (30 V rms / 60 V dc).
    elements : int, optional
        Number of resistors sharing the voltage in a string.
    element_voltage : float, optional
        Voltage across each element at ``voltage_peak``, V.
    limiting_voltage : float, optional
        The elements' rated limiting voltage, V.
    frequency : float, optional
        Highest frequency of interest, Hz (probe ratings fall with frequency).
    trimmer_at_high_voltage : bool
        True when an adjustable part sits in the high-voltage (tip) arm.
    stored_energy : float, optional
        Energy stored in the divider's capacitors at ``voltage_peak``, J.

    Returns
    -------
    list of str
        One caution per item.
    """
    if not is_hazardous(voltage_peak, kind):
        return []
    v = abs(float(voltage_peak))
    out = [
        (f"HIGH VOLTAGE: {format_quantity(v, 'V')} peak exceeds 30 V rms / 60 V dc. These "
         "figures are design aids, not a safety assessment; local codes, the applicable "
         "standards and licensed practice decide."),
        ("Ratings: every resistor, capacitor, trimmer, connector and cable must be rated for the "
         "voltage and power it sees, with margin; check each element, not only the total."),
    ]
    if elements is not None and elements > 1:
        text = (f"A failed (shorted) element raises the stress on the rest: with {elements} "
                f"in the string, one short puts {elements / (elements - 1):.3g}x the voltage on "
                "each remaining element")
        if element_voltage is not None:
            after = element_voltage * elements / (elements - 1)
            text += (f" ({format_quantity(after, 'V')} instead of "
                     f"{format_quantity(element_voltage, 'V')})")
            if limiting_voltage is not None:
                state = "within" if after <= limiting_voltage else "ABOVE"
                text += f", {state} the {format_quantity(limiting_voltage, 'V')} limiting voltage"
        out.append(text + ".")
    out += [
        ("Creepage and clearance: lay out the high-voltage arm for its working voltage, "
         "pollution degree and altitude per IEC 60664-1; surface leakage on a dirty board also "
         "spoils the ratio."),
        ("Measurement category: hand-held probe assemblies fall under IEC 61010-031 and "
         "measurements on mains under the categories (CAT II/III/IV) of IEC 61010-2-030; a "
         "home-built divider carries no rating until it has been assessed."),
        ("Earthing: an earthed instrument's ground lead connected to a live node is a short "
         "circuit; use a differential or isolated measurement where the reference is not earth."),
        ("Clamp the low-voltage arm (e.g. a surge suppressor or spark gap across the shunt arm) "
         "so that an open tip-arm connection or a flashover cannot bring the full voltage to the "
         "instrument."),
        ("Passive-probe voltage ratings derate with frequency; check the derating curve of every "
         "probe and cable at the highest frequency present"
         + (f" ({format_quantity(frequency, 'Hz')})." if frequency else ".")),
    ]
    if trimmer_at_high_voltage:
        out.append("The trimmer sits in the high-voltage (tip) arm: adjust it only with the "
                   "circuit de-energised and discharged, or with an insulated tool rated for the "
                   "voltage.")
    if stored_energy is not None and stored_energy > 0:
        out.append(f"Stored energy: the capacitors hold {format_quantity(stored_energy, 'J')} at "
                   "this voltage; discharge and short them before touching the divider.")
    return out
