"""``domegen preview-page --evening``: moments from sunset into the night."""

from __future__ import annotations

import re
from datetime import date

import numpy as np

from domegen.cli.main import main
from domegen.educator.evening import evening_moments
from domegen.sky.site import Site

NANTES = Site(47.2184, -1.5536, 20.0, timezone="Europe/Paris", name="Nantes")


def test_moments_are_the_twilight_boundaries():
    from domegen.sky.ephemeris import body

    m = evening_moments(NANTES, date(2025, 1, 16))
    assert [k for k, _, _ in m] == ["sunset", "civil_dusk", "nautical_dusk", "astronomical_dusk",
                                    "late"]
    times = [t for _, _, t in m]
    assert times == sorted(times)
    # the Sun's airless altitude at each boundary, from skyfield itself (the definitions:
    # sunset = upper limb on the horizon with 34' refraction, i.e. centre at -0.833 deg; common practice)
    from domegen.sky.times import to_time

    alt, _, _ = NANTES.observer().at(to_time(np.array([t.timestamp() for t in times[:4]]))).observe(
        body("Sun")).apparent().altaz()
    assert np.allclose(alt.degrees, [-0.833, -6.0, -12.0, -18.0], atol=0.1)


def test_evening_page_written(tmp_path, capsys):
    assert main(["preview-page", "--evening", "2025-01-16", "--place", "Nantes", "-o", str(tmp_path),
                 "--size", "64"]) == 0
    text = (tmp_path / "index.html").read_text(encoding="utf-8")
    ids = re.findall(r'id="fig-([a-z_]+)"', text)
    assert ids == ["sunset", "civil_dusk", "nautical_dusk", "astronomical_dusk", "late"]
    assert text.count('src="data:image/jpeg;base64,') == 5
    assert "Mars at opposition" in text and "CET" in text
    assert not re.search(r"(?i)(src|href)\s*=\s*[\"']?https?:", text)
