"""Saros series numbers (van den Bergh numbering) from saros/inex arithmetic.

Any interval between two solar eclipses is a whole number N of synodic
months that can be written N = a * 223 + b * 358 (a saroses, b inexes;
van den Bergh 1955, "Periodicity and Variation of Solar (and Lunar)
Eclipses").  Eclipses one inex apart belong to consecutive saros series, so
the series number is the reference eclipse's number plus b.  Within the
1900-2050 span |b| stays far below 223/2, which makes the choice unique.

Reference: the total solar eclipse of 2024-04-08 (greatest 18:18 TT) is
saros 139 (NASA Five Millennium Canon, Espenak & Meeus 2006).
"""

from __future__ import annotations

SAROS_MONTHS = 223
INEX_MONTHS = 358
SYNODIC_MONTH_D = 29.530588861
#: Reference solar eclipse: TT Julian date of greatest eclipse and its saros.
REFERENCE_TT_JD = 2460409.2628  # 2024-04-08 18:18:29 TD
REFERENCE_SAROS = 139


def lunations_between(tt_jd: float, ref_tt_jd: float = REFERENCE_TT_JD) -> int:
    """Whole synodic months from the reference eclipse to ``tt_jd``."""
    return round((tt_jd - ref_tt_jd) / SYNODIC_MONTH_D)


def saros_inex(n: int) -> tuple[int, int]:
    """(a, b) with n = 223 a + 358 b and b in -111..111."""
    inv = pow(INEX_MONTHS % SAROS_MONTHS, -1, SAROS_MONTHS)
    b = (n * inv) % SAROS_MONTHS
    if b > SAROS_MONTHS // 2:
        b -= SAROS_MONTHS
    a, rem = divmod(n - INEX_MONTHS * b, SAROS_MONTHS)
    assert rem == 0
    return a, b


def solar_saros(tt_jd: float) -> int:
    """Saros series of the solar eclipse whose greatest eclipse is at ``tt_jd`` (TT)."""
    _, b = saros_inex(lunations_between(tt_jd))
    return REFERENCE_SAROS + b


__all__ = ["solar_saros", "saros_inex", "lunations_between"]
