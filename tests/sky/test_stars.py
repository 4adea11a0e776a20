"""Hipparcos star field: catalogue parsing, cache, and apparent places against astropy."""

from __future__ import annotations

import warnings
from datetime import datetime, timezone

import numpy as np
import pytest

from domegen.cache import cache_dir
from domegen.errors import InputError, OutOfRangeError
from domegen.sky import stars
from domegen.sky.ephemeris import timescale
from domegen.sky.frames import altaz_to_enu, enu_to_altaz_deg
from domegen.sky.refraction import refract
from domegen.sky.site import Site

ARCSEC = 1.0 / 3600.0

# Bright and awkward stars: HIP numbers (names from memory of the Hipparcos identifications).
TEST_HIP = {
    32349: "Sirius", 30438: "Canopus", 69673: "Arcturus", 71683: "alpha Cen A",
    91262: "Vega", 24608: "Capella", 24436: "Rigel", 37279: "Procyon", 27989: "Betelgeuse",
    7588: "Achernar", 60718: "Acrux", 97649: "Altair", 11767: "Polaris",
    104382: "sigma Octantis (near the south pole)", 62956: "Alioth",
    87937: "Barnard's star (10 arcsec/yr)", 104214: "61 Cygni A",
}

SITES_AND_TIMES = [
    (Site(47.2184, -1.5536, 20.0), datetime(2026, 8, 12, 20, 0, tzinfo=timezone.utc)),   # Nantes
    (Site(42.34, -3.70, 860.0), datetime(2026, 8, 12, 18, 27, tzinfo=timezone.utc)),     # Burgos
    (Site(-77.846, 166.676, 20.0), datetime(2045, 6, 15, 22, 0, tzinfo=timezone.utc)),  # McMurdo
    (Site(-0.2299, -78.525, 2850.0), datetime(1985, 3, 10, 3, 0, tzinfo=timezone.utc)),  # Quito
    (Site(-33.8688, 151.2093, 0.0), datetime(2003, 12, 31, 13, 30, tzinfo=timezone.utc)),  # Sydney
    (Site(78.2232, 15.6267, 10.0), datetime(2019, 2, 1, 4, 45, tzinfo=timezone.utc)),    # Longyearbyen
]


def _raw_hip2_rows(hips) -> dict[int, list[str]]:
    """The test stars' lines of hip2.dat split on blanks (independent of our fixed-width parser)."""
    want = set(hips)
    out = {}
    with open(stars.catalogue_source_path(), encoding="ascii") as f:
        for line in f:
            h = int(line[:6])
            if h in want:
                out[h] = line.split()
    return out


def _astropy_enu(site: Site, when: datetime, hips) -> np.ndarray:
    """Airless apparent ENU vectors from astropy for the same Hipparcos values.

    astropy offline: no IERS download, no age limit.  Both libraries get the
    same UT1 (skyfield's UT1-UTC imposed on astropy), which matters for 2045,
    beyond the measured Earth-rotation data.  astropy includes polar motion
    (ignored by us, up to ~0.5 arcsec in the horizon) and uses its own ERFA
    Earth ephemeris.  Radial velocity is zero for both (hip2.dat has none).
    """
    import astropy.units as u
    from astropy.coordinates import AltAz, Distance, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False
    iers.conf.auto_max_age = None
    rows = _raw_hip2_rows(hips)
    # hip2.dat fields: HIP Sn So Nc RArad DErad Plx pmRA pmDE ... (ReadMe of I/311).
    ra, dec, plx, pmra, pmdec = np.array([[float(rows[h][i]) for i in (4, 5, 6, 7, 8)]
                                          for h in hips]).T
    t_sky = timescale().from_datetime(when)
    loc = EarthLocation.from_geodetic(site.lon_deg * u.deg, site.lat_deg * u.deg, site.elev_m * u.m)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # astropy's own notes (ERFA "dubious year" after 2030 etc.)
        t = Time(when, scale="utc", location=loc)
        t.delta_ut1_utc = float(t_sky.dut1)
        c = SkyCoord(ra=ra * u.rad, dec=dec * u.rad, distance=Distance(parallax=plx * u.mas),
                     pm_ra_cosdec=pmra * u.mas / u.yr, pm_dec=pmdec * u.mas / u.yr,
                     radial_velocity=np.zeros(len(hips)) * u.km / u.s,
                     obstime=Time("J1991.25", scale="tt"), frame="icrs")
        aa = c.apply_space_motion(new_obstime=t).transform_to(
            AltAz(obstime=t, location=loc, pressure=0 * u.hPa))
        return altaz_to_enu(aa.alt.deg, aa.az.deg)


def _angle_arcsec(v1, v2) -> np.ndarray:
    cross = np.linalg.norm(np.cross(v1.T, v2.T), axis=1)
    return np.degrees(np.arctan2(cross, np.einsum("ij,ij->j", v1, v2))) * 3600.0


# ------------------------------------------------------------------ catalogue

def test_parser_reads_known_stars():
    # Values: ESA I/311 (van Leeuwen 2007) entries for Sirius, Vega, Polaris, checked here against a
    # plain whitespace split of the same lines; Sirius parallax 379.21 mas, Vega 130.23 mas,
    # Polaris at Dec +89.26 deg (common practice: the pole star is within 1 deg of the pole).
    cat = stars.catalogue()
    rows = _raw_hip2_rows([32349, 91262, 11767])
    for hip, line in rows.items():
        i = int(cat.index_of(hip)[0])
        assert cat.hip[i] == hip
        ra, dec = float(line[4]), float(line[5])
        u = np.array([np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)])
        assert np.allclose(cat.u0[:, i], u, atol=1e-12)
        assert cat.plx_mas[i] == pytest.approx(float(line[6]), abs=1e-4)
        assert cat.pmra_mas_yr[i] == pytest.approx(float(line[7]), abs=1e-3)
        assert cat.pmdec_mas_yr[i] == pytest.approx(float(line[8]), abs=1e-3)
    sirius, vega, polaris = cat.index_of([32349, 91262, 11767])
    assert cat.plx_mas[sirius] == pytest.approx(379.21, abs=0.01)
    assert cat.plx_mas[vega] == pytest.approx(130.23, abs=0.01)
    assert np.degrees(np.arcsin(cat.u0[2, polaris])) == pytest.approx(89.26, abs=0.01)
    assert cat.bv[vega] == pytest.approx(-0.001, abs=1e-6)
    assert cat.hp_mag[sirius] == pytest.approx(-1.0876, abs=1e-4)


def test_catalogue_size_and_naked_eye_count():
    # 117,955 entries in the Hipparcos new reduction (van Leeuwen 2007; issue 2).  Stars to V = 6.5:
    # about 9,000 (common practice: ~9,000 naked-eye stars; the Yale Bright Star Catalogue holds
    # 9,110 objects to about 6.5, from memory).
    cat = stars.catalogue()
    assert len(cat) == 117_955
    assert 8_500 <= cat.brighter_than(6.5) <= 9_000
    assert np.all(np.diff(cat.vmag) >= 0)
    assert len(np.unique(cat.hip)) == len(cat)


def test_v_magnitudes_of_bright_stars():
    # Johnson V from memory of the Yale Bright Star Catalogue (Hoffleit & Warren 1991):
    # Vega 0.03, Arcturus -0.04, Capella 0.08, Procyon 0.38, Altair 0.77, Polaris 2.02.
    # Derived V = Hp + (V - Hp)(B-V) with Bessell (2000) Table 2: within 0.06 mag.
    cat = stars.catalogue()
    expect = {91262: 0.03, 69673: -0.04, 24608: 0.08, 37279: 0.38, 97649: 0.77, 11767: 2.02}
    got = cat.vmag[cat.index_of(list(expect))]
    assert np.allclose(got, list(expect.values()), atol=0.06)
    # Sirius and Canopus (Hp < 0) take V from a short override list: the order of brightness
    # of the three brightest stars is Sirius, Canopus, then alpha Cen / Arcturus (common practice).
    assert list(cat.hip[:2]) == [32349, 30438]
    assert cat.vmag[0] < -1.4 and cat.vmag[1] < -0.6 and cat.vmag[2] > -0.3


def test_v_minus_hp_table():
    # Bessell (2000, PASP 112, 961) Table 2: V - Hp = -0.011 at B_T-V_T = 0 (B-V = -0.005) and
    # -0.155 at B_T-V_T = 1.0 (B-V = 0.878).
    assert stars.v_minus_hp(-0.005) == pytest.approx(-0.011, abs=1e-6)
    assert stars.v_minus_hp(0.878) == pytest.approx(-0.155, abs=1e-6)
    assert stars.v_minus_hp(np.nan) == 0.0


def test_cache_is_rebuilt_when_corrupt():
    path = cache_dir() / stars.CACHE_NAME
    stars.load_catalogue()
    assert path.exists()
    path.write_bytes(b"not a zip file")
    cat = stars.load_catalogue()
    assert len(cat) == 117_955
    assert stars._read_cache(path) is not None
    path.unlink()
    assert len(stars.load_catalogue()) == 117_955 and path.exists()


def test_fixed_width_parser_rejects_garbage():
    rows = np.frombuffer(b" 12.3x\n", dtype=np.uint8).reshape(1, -1)
    with pytest.raises(ValueError):
        stars._fixed_field(rows, 1, 6, 1)
    rows = np.frombuffer(b" -4.25\n      \n", dtype=np.uint8).reshape(2, -1)
    v = stars._fixed_field(rows, 1, 6, 2)
    assert v[0] == -4.25 and np.isnan(v[1])


# ------------------------------------------------------------------ apparent places

@pytest.mark.parametrize("site,when", SITES_AND_TIMES, ids=lambda x: str(x)[:20])
def test_star_places_match_astropy_within_two_arcsec(site, when):
    # Reference: astropy (ERFA: space motion, parallax, light deflection, aberration, IAU
    # precession-nutation); tolerance 2 arcsec from issue 2.
    hips = list(TEST_HIP)
    field = stars.star_field(site, when, mag_limit=None, refraction=False)
    idx = field_index(field, hips)
    ref = _astropy_enu(site, when, hips)
    sep = _angle_arcsec(field.enu[:, idx], ref)
    assert sep.max() < 2.0, dict(zip(TEST_HIP.values(), np.round(sep, 3)))
    # alt/az agree with the vectors.
    alt, az = enu_to_altaz_deg(field.enu[:, idx])
    assert np.allclose(alt, field.alt_deg[idx], atol=1e-7)


def test_star_places_match_skyfield_star_path_within_10_mas():
    # Reference: skyfield's own per-star path (Star with the same hip2 values, observe().apparent()
    # .altaz(): space motion, parallax, deflection, aberration, IAU 2000A, no polar motion - like us).
    # Measured agreement 0.0004 arcsec; the ~0.4 arcsec left against astropy is its polar motion.
    from skyfield.api import Star

    ts = timescale()
    hips = list(TEST_HIP)
    rows = _raw_hip2_rows(hips)
    ra, dec, plx, pmra, pmdec = np.array([[float(rows[h][i]) for i in (4, 5, 6, 7, 8)]
                                          for h in hips]).T
    star = Star(ra_hours=np.degrees(ra) / 15.0, dec_degrees=np.degrees(dec), ra_mas_per_year=pmra,
                dec_mas_per_year=pmdec, parallax_mas=plx, epoch=ts.J(1991.25))
    for site, when in SITES_AND_TIMES:
        field = stars.star_field(site, when, mag_limit=None, refraction=False)
        alt, az, _ = site.observer().at(ts.from_datetime(when)).observe(star).apparent().altaz()
        sep = _angle_arcsec(field.enu[:, field_index(field, hips)], altaz_to_enu(alt.degrees, az.degrees))
        assert sep.max() < 0.01, (when, dict(zip(TEST_HIP.values(), np.round(sep, 4))))


def field_index(field, hips) -> np.ndarray:
    order = {h: i for i, h in enumerate(field.hip.tolist())}
    return np.array([order[h] for h in hips])


def test_proper_motion_moves_barnards_star():
    # Barnard's star moves 10.4 arcsec/yr (common practice); over 1991.25 -> 2041.25 about 520
    # arcsec.  Same site and sidereal geometry: compare with the catalogue-epoch direction.
    cat = stars.catalogue()
    i = int(cat.index_of(87937)[0])
    pm_total = np.hypot(cat.pmra_mas_yr[i], cat.pmdec_mas_yr[i]) / 1000.0
    assert pm_total == pytest.approx(10.4, abs=0.1)
    jd = stars.EPOCH_JD_TT + 50 * 365.25
    zero = np.zeros(3)
    p = stars.apparent_gcrs(cat, len(cat), jd, zero, zero, np.array([1e6, 0.0, 0.0]))[:, i]
    moved = np.degrees(np.arccos(np.clip(p @ cat.u0[:, i] / np.linalg.norm(p), -1, 1))) * 3600
    assert moved == pytest.approx(50 * pm_total, rel=1e-3)


def test_refraction_lifts_stars_consistently():
    site, when = SITES_AND_TIMES[0]
    airless = stars.star_field(site, when, refraction=False)
    seen = stars.star_field(site, when, refraction=True)
    assert np.array_equal(airless.hip, seen.hip)
    assert np.allclose(seen.alt_deg, refract(airless.alt_deg, site.temperature_C, site.pressure_mbar))
    assert np.allclose(seen.az_deg, airless.az_deg)
    alt, az = enu_to_altaz_deg(seen.enu)
    assert np.allclose(alt, seen.alt_deg, atol=1e-9)
    assert np.allclose(np.linalg.norm(seen.enu, axis=0), 1.0, atol=1e-12)
    near = np.abs(airless.alt_deg + 0.57) < 0.2
    # Horizon refraction about 34 arcmin (common practice; Saemundsson 1986).
    assert near.any() and np.all(np.abs(seen.alt_deg[near]) < 0.3)


def test_star_field_fields_and_limits():
    site, when = SITES_AND_TIMES[0]
    f = stars.star_field(site, when, mag_limit=4.0)
    m = len(f)
    assert 400 < m < 600  # ~500 stars to V = 4 (common practice)
    assert f.enu.shape == (3, m) and f.enu.dtype == np.float64
    assert f.rgb.shape == (m, 3) and f.vmag.max() <= 4.0
    assert f.alt_deg.shape == f.az_deg.shape == f.bv.shape == (m,)
    assert np.all((f.az_deg >= 0) & (f.az_deg < 360))
    up = f.above_horizon()
    assert 0 < len(up) < m and np.all(up.alt_deg >= 0)
    # The same instant as POSIX seconds gives the same result.
    g = stars.star_field(site, when.timestamp(), mag_limit=4.0)
    assert np.array_equal(f.enu, g.enu)


def test_polaris_altitude_is_near_latitude():
    # Polaris sits ~0.7 deg from the pole (common practice), so its altitude is the latitude +- 0.75.
    site, when = SITES_AND_TIMES[0]
    f = stars.star_field(site, when, mag_limit=2.5, refraction=False)
    k = int(np.flatnonzero(f.hip == 11767)[0])
    assert abs(f.alt_deg[k] - site.lat_deg) < 0.75


def test_bad_times_raise_input_errors():
    site = SITES_AND_TIMES[0][0]
    with pytest.raises(OutOfRangeError):
        stars.star_field(site, datetime(1850, 1, 1, tzinfo=timezone.utc))
    with pytest.raises(InputError):
        stars.star_field(site, datetime(2026, 1, 1))
    with pytest.raises(InputError):
        stars.star_field(site, "tomorrow")
    with pytest.raises(InputError):
        stars.star_field(site, datetime(2026, 1, 1, tzinfo=timezone.utc), mag_limit=float("nan"))
