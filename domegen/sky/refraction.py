"""Atmospheric refraction (Saemundsson 1986 and Bennett 1982).

Saemundsson, Sky & Telescope 72, 70 (1986): R = 1.02 cot(h + 10.3/(h + 5.11))
arcmin for a true (airless) altitude h in degrees; Bennett, J. Navigation 35
(1982): R = cot(h_a + 7.31/(h_a + 4.4)) arcmin for an apparent altitude h_a.
Both hold for 1010 mbar and 10 deg C and are scaled by (P/1010)(283/(273+T)).
Below -1 degree (the body is well under the horizon) the refraction is tapered
smoothly to zero by -3 degrees, where the formulas no longer apply.
"""

from __future__ import annotations

import numpy as np


def _pt_factor(temperature_C: float, pressure_mbar: float) -> float:
    return (pressure_mbar / 1010.0) * (283.0 / (273.0 + temperature_C))


def _taper(h_deg):
    return np.clip((np.asarray(h_deg) + 3.0) / 2.0, 0.0, 1.0)


def refraction_true_deg(alt_true_deg, temperature_C: float = 10.0, pressure_mbar: float = 1010.0):
    """Refraction in degrees to add to a true altitude (Saemundsson 1986)."""
    h = np.maximum(np.asarray(alt_true_deg, dtype=float), -1.0)
    r_arcmin = 1.02 / np.tan(np.radians(h + 10.3 / (h + 5.11)))
    # 1.02 cot(...) reaches ~0 at the zenith; keep it from turning negative.
    r_arcmin = np.maximum(r_arcmin, 0.0)
    return r_arcmin / 60.0 * _pt_factor(temperature_C, pressure_mbar) * _taper(alt_true_deg)


def refraction_apparent_deg(alt_apparent_deg, temperature_C: float = 10.0, pressure_mbar: float = 1010.0):
    """Refraction in degrees to subtract from an apparent altitude (Bennett 1982)."""
    h = np.maximum(np.asarray(alt_apparent_deg, dtype=float), -1.0)
    r_arcmin = np.maximum(1.0 / np.tan(np.radians(h + 7.31 / (h + 4.4))), 0.0)
    return r_arcmin / 60.0 * _pt_factor(temperature_C, pressure_mbar) * _taper(alt_apparent_deg)


def refract(alt_true_deg, temperature_C: float = 10.0, pressure_mbar: float = 1010.0):
    """Apparent altitude (deg) seen for a true altitude (deg)."""
    a = np.asarray(alt_true_deg, dtype=float)
    return a + refraction_true_deg(a, temperature_C, pressure_mbar)


def unrefract(alt_apparent_deg, temperature_C: float = 10.0, pressure_mbar: float = 1010.0):
    """True altitude (deg) of a point seen at an apparent altitude (deg)."""
    a = np.asarray(alt_apparent_deg, dtype=float)
    return a - refraction_apparent_deg(a, temperature_C, pressure_mbar)
