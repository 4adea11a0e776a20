"""Solar and lunar eclipses: search, Besselian elements, circumstances, the shadow path.

Solar eclipses (this package's front door)::

    find_solar_eclipses(start_utc, end_utc) -> list[SolarEclipse]
    solar_eclipse_on(date) -> SolarEclipse            (NotFoundError names the nearest)
    local_circumstances(eclipse, sites) -> LocalCircumstances   (vectorised over sites)
    compute_path(eclipse, step_s=60) -> EclipsePath   (pure data for maps)

Lunar eclipses live in :mod:`domegen.eclipse.lunar`.
"""

from __future__ import annotations

from domegen.eclipse.besselian import K_PENUMBRA, K_UMBRA, BesselianElements
from domegen.eclipse.local import LocalCircumstances, local_circumstances
from domegen.eclipse.path import EclipsePath, PathCurve, compute_path
from domegen.eclipse.safety import CAUTION
from domegen.eclipse.search import find_solar_eclipses, solar_eclipse_on
from domegen.eclipse.solar import SolarEclipse

__all__ = ["BesselianElements", "CAUTION", "EclipsePath", "K_PENUMBRA", "K_UMBRA", "LocalCircumstances",
           "PathCurve", "SolarEclipse", "compute_path", "find_solar_eclipses", "local_circumstances",
           "solar_eclipse_on"]
