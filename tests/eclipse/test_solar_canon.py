"""Global circumstances and Besselian elements against the NASA canons (sources in data/solar_canon.json)."""

from __future__ import annotations

import numpy as np
import pytest

from domegen.eclipse import solar_eclipse_on
from domegen.eclipse.besselian import K_PENUMBRA, K_UMBRA, fit_elements
from tests.eclipse._solar_data import canon, eclipses, t0_tt_jd, td_instant

TYPE = {"T": "total", "A": "annular", "H": "hybrid", "P": "partial"}
ROWS = eclipses()
IDS = [r["date"] for r in ROWS]


def test_the_reference_set_covers_all_four_types():
    types = {r["type"] for r in ROWS}
    assert types == {"T", "A", "H", "P"} and len(ROWS) >= 8


@pytest.mark.parametrize("ref", ROWS, ids=IDS)
def test_type_time_gamma_magnitude_saros(ref):
    e = solar_eclipse_on(ref["date"])
    assert e.type == TYPE[ref["type"]]
    published = td_instant(ref["date"], ref["greatest_td"])
    assert abs((e.greatest_tt - published).total_seconds()) <= 5.0  # canon TD vs our TT
    assert abs(e.gamma - ref["gamma"]) <= 0.001
    assert abs(e.magnitude - ref["magnitude"]) <= 0.001
    assert e.saros == ref["saros"]


@pytest.mark.parametrize("ref", [r for r in ROWS if r["lat_deg"] is not None], ids=lambda r: r["date"])
def test_point_of_greatest_eclipse(ref):
    e = solar_eclipse_on(ref["date"])
    # The canon's longitude rests on its own Delta T: shift by the difference (15.04"/s, i.e. 0.00417807 deg/s).
    shift = 0.0 if ref["delta_t_s"] is None else (e.delta_t_s - ref["delta_t_s"]) * 0.00417807
    lon_ref = ref["lon_deg"] + shift
    assert abs(e.lat_deg - ref["lat_deg"]) <= 0.2
    assert abs(((e.lon_deg - lon_ref + 180) % 360) - 180) <= 0.2
    if ref["sun_alt_deg"] is not None:
        assert abs(e.sun_alt_deg - ref["sun_alt_deg"]) <= 0.2
    if ref.get("sun_az_deg") is not None:
        assert abs(((e.sun_az_deg - ref["sun_az_deg"] + 180) % 360) - 180) <= 0.5


@pytest.mark.parametrize("ref", [r for r in ROWS if r["path_width_km"] is not None], ids=lambda r: r["date"])
def test_path_width_and_central_duration(ref):
    e = solar_eclipse_on(ref["date"])
    assert abs(e.path_width_km - ref["path_width_km"]) <= 3.0
    assert abs(e.central_duration_s - ref["central_duration_s"]) <= 3.0


def test_partial_eclipses_have_no_width_or_duration():
    e = solar_eclipse_on("2019-01-06")
    assert e.path_width_km is None and e.central_duration_s is None and not e.central
    assert e.sun_alt_deg == 0.0  # greatest eclipse of a partial is on the limb


@pytest.mark.parametrize("ref", [r for r in ROWS if r["x0"] is not None], ids=lambda r: r["date"])
def test_besselian_x_y_at_t0(ref):
    b = fit_elements([t0_tt_jd(ref["date"], ref["t0_td_hours"])])[0]
    assert abs(b.coefficients["x"][0] - ref["x0"]) <= 0.0005
    assert abs(b.coefficients["y"][0] - ref["y0"]) <= 0.0005


def test_besselian_elements_against_the_1999_bulletin():
    ref = canon()["bulletin_1999"]
    b = fit_elements([t0_tt_jd("1999-08-11", ref["t0_td_hours"])])[0]
    assert abs(b.coefficients["x"][0] - ref["x0"]) <= 0.0005
    assert abs(b.coefficients["y"][0] - ref["y0"]) <= 0.0005
    # The bulletin uses the same lunar radius constants.
    assert (K_PENUMBRA, K_UMBRA) == (0.2725076, 0.272281)
    e = solar_eclipse_on("1999-08-11")
    assert abs(e.gamma - ref["gamma"]) <= 0.001 and abs(e.magnitude - ref["magnitude"]) <= 0.001


def test_elements_reproduce_the_raw_ephemeris_geometry():
    """The cubic fit stays within 1e-6 Earth radii of the unfitted elements over +-3 h."""
    from domegen.eclipse.besselian import raw_elements

    b = solar_eclipse_on("2024-04-08").besselian
    t = np.linspace(-3, 3, 13)
    raw = raw_elements(b.tt_jd(t))
    ev = b.at(t)
    for name in ("x", "y", "l1", "l2"):
        assert np.max(np.abs(ev[name] - raw[name])) < 2e-6
    assert np.max(np.abs(ev["d"] - raw["d"])) < 1e-5


def test_besselian_json_states_the_constants():
    data = solar_eclipse_on("2024-04-08").besselian.as_json()
    assert data["k_penumbra"] == 0.2725076 and data["k_umbra"] == 0.272281
    assert data["t0_tt"] == "2024-04-08T18:00:00"
    for key in ("x", "y", "d", "mu", "l1", "l2"):
        assert len(data[key]) == 4
