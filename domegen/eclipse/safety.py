"""The eye-safety caution that ends every human-readable solar-eclipse output."""

from __future__ import annotations

#: Printed after every table, summary or narration about a solar eclipse.
CAUTION = (
    "CAUTION: never look at any partial phase of a solar eclipse without protection. "
    "Use solar viewers certified to ISO 12312-2 for every partial phase (annular phases "
    "included); remove them only during totality itself. Follow the advice of your local "
    "health authorities."
)

__all__ = ["CAUTION"]
