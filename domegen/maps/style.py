"""domegen's own map palette and line styles (sRGB 0..1, alpha last).

Chosen for legibility on a dark dome and on print; deliberately unlike the
colour coding of published eclipse-map series: a warm amber band for a total
path, a cool aqua band for an annular one, teal dashes for partial limits.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class LineStyle:
    colour: tuple
    width_px: float
    dash_px: tuple | None = None


@dataclass(frozen=True)
class Palette:
    sea: tuple = (0.075, 0.125, 0.205, 1.0)
    sea_deep: tuple = (0.05, 0.085, 0.15, 1.0)
    land: tuple = (0.44, 0.46, 0.38, 1.0)
    land_high_lat: tuple = (0.78, 0.80, 0.80, 1.0)
    night: tuple = (0.01, 0.02, 0.075, 0.85)
    graticule: LineStyle = LineStyle((0.85, 0.9, 1.0, 0.22), 0.8)
    equator: LineStyle = LineStyle((0.85, 0.9, 1.0, 0.42), 1.0)
    terminator: LineStyle = LineStyle((1.0, 0.93, 0.6, 0.75), 1.2, (6.0, 4.0))
    band_total: tuple = (1.0, 0.66, 0.16, 0.55)
    band_annular: tuple = (0.35, 0.9, 0.88, 0.5)
    limit_total: LineStyle = LineStyle((1.0, 0.74, 0.28, 1.0), 1.4)
    limit_annular: LineStyle = LineStyle((0.45, 0.95, 0.92, 1.0), 1.4)
    central: LineStyle = LineStyle((1.0, 0.98, 0.92, 1.0), 1.3)
    tick: LineStyle = LineStyle((1.0, 0.98, 0.92, 1.0), 1.3)
    partial_limit: LineStyle = LineStyle((0.30, 0.80, 0.70, 0.95), 1.3, (9.0, 5.0))
    rise_set: LineStyle = LineStyle((0.95, 0.55, 0.75, 0.9), 1.2, (3.0, 4.0))
    magnitude: LineStyle = LineStyle((0.80, 0.78, 1.0, 0.7), 0.9, (12.0, 3.0))
    penumbra_shade: tuple = (0.0, 0.0, 0.03, 0.8)   # alpha at full obscuration
    umbra: tuple = (0.0, 0.0, 0.0, 0.88)
    umbra_edge: LineStyle = LineStyle((1.0, 0.80, 0.35, 1.0), 1.6)
    penumbra_edge: LineStyle = LineStyle((0.55, 0.85, 0.95, 0.8), 1.0)
    site: tuple = (1.0, 0.35, 0.35, 1.0)
    text: tuple = (0.97, 0.97, 0.97, 1.0)
    halo: tuple = (0.0, 0.0, 0.0, 0.7)
    limb: LineStyle = LineStyle((0.6, 0.75, 1.0, 0.55), 1.2)


DEFAULT = Palette()
