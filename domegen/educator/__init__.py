"""The educator's layer: events at a venue, calendar files, cue sheets and preview pages.

It sits above the sky, eclipse, render and maps packages (it may import all of
them) and below the command line.
"""

from __future__ import annotations

from domegen.educator.calendar import events_at_site

__all__ = ["events_at_site"]
